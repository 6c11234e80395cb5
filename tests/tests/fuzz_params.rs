//! Fuzzing the parameter-file reader as `ramulus grow --params FILE` reads it
//! (`params::file::read_parameter_file`, the file's keys over the defaults,
//! `Params::from_json_value`, `validate`) on the corpus in `tests/fuzz-corpus/params/` (see
//! `ramulus_tests::fuzz`; the long run and its figures are in DEVELOPERS.md).
//!
//! Properties of every input: no panic, no input over a second; accepted parameters (valid,
//! with every root on an allowed cell) survive a JSON round trip and a run-link round trip
//! unchanged, and small ones start a growth.

use proptest::prelude::*;
use ramulus_core::growth::Growth;
use ramulus_core::link::{decode_link, encode_link};
use ramulus_core::params::file::read_parameter_file;
use ramulus_core::params::Params;
use ramulus_core::region::{allowed_cells, check_start};
use ramulus_tests::fuzz::{fuzz, FuzzInput, Verdict};
use serde_json::Value;

/// Pieces of JSON and parameter keys the edits insert.
const TOKENS: &[&[u8]] = &[
    b"{",
    b"}",
    b"[",
    b"]",
    b",",
    b":",
    b"\"",
    b"null",
    b"true",
    b"-",
    b"1e308",
    b"1e-320",
    b"0.0",
    b"\"width\": ",
    b"\"height\": ",
    b"\"cells\": ",
    b"\"roots\": ",
    b"\"outline\": ",
    b"\"obstacles\": ",
    b"\"mask\": ",
    b"\"units\": \"m\"",
    b"\"cell_size\": ",
    b"5000",
    b"\\u0000",
    b"\\ud800",
    b"\xef\xbb\xbf",
    b"[[1,1],[9,1],[9,9]]",
];

fn check(input: &FuzzInput) -> Result<Verdict, TestCaseError> {
    let Ok(file) = read_parameter_file(&input.bytes) else {
        return Ok(Verdict::Refused);
    };
    // As the command line does without a preset: the defaults, then the file's keys.
    let Ok(Value::Object(mut object)) = serde_json::to_value(Params::default()) else {
        return Err(TestCaseError::fail("the defaults are a JSON object"));
    };
    object.extend(file.keys);
    let Ok(params) = Params::from_json_value(Value::Object(object)) else {
        return Ok(Verdict::Refused);
    };
    if params.validate().is_err() {
        return Ok(Verdict::Refused);
    }
    // Validation checks each field and the lattice; whether the roots stand on allowed cells
    // is `Growth::new`'s check (`region::check_start`), named as an error by the command line.
    if check_start(&params, &allowed_cells(&params)).is_err() {
        return Ok(Verdict::Refused);
    }
    let json = serde_json::to_value(&params).expect("parameters serialise");
    prop_assert!(
        Params::from_json_value(json).as_ref() == Ok(&params),
        "accepted parameters change in a JSON round trip"
    );
    let read = decode_link(&encode_link(&params));
    prop_assert_eq!(
        &read.problems,
        &Vec::new(),
        "their link reads back with problems"
    );
    prop_assert!(read.params == params, "their link reads back different");
    // Growth::new is the one fallible step after validation; on a small lattice it must
    // start (ARCHITECTURE.md: only parameter reading and Growth::new can fail).
    if u64::from(params.domain.width) * u64::from(params.domain.height) <= 250_000 {
        let growth = Growth::new(&params);
        prop_assert!(
            growth.is_ok(),
            "validated parameters do not start: {:?}",
            growth.err()
        );
    }
    Ok(Verdict::Accepted)
}

#[test]
fn fuzz_params_reader() {
    fuzz("params", TOKENS, check);
}
