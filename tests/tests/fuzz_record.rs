//! Fuzzing the run-record reader as `ramulus measure` reads it (`utf8_text`, then
//! `record::read_record`) on the corpus in `tests/fuzz-corpus/record/` (see
//! `ramulus_tests::fuzz`; the long run and its figures are in DEVELOPERS.md).
//!
//! Properties of every input: no panic, no input over a second; an accepted record measures,
//! with node and segment counts equal to the network read and a cyclomatic number
//! E - V + C >= 0 (Kirchhoff 1847); written back and read again it gives the same digest.

use proptest::prelude::*;
use ramulus_core::digest::digest_hex;
use ramulus_core::metrics::measure;
use ramulus_core::network::NetworkKind;
use ramulus_core::record::{read_record, write_record};
use ramulus_core::utf8_text::utf8_text;
use ramulus_tests::fuzz::{fuzz, FuzzInput, Verdict};

/// Pieces of JSON and record keys the edits insert.
const TOKENS: &[&[u8]] = &[
    b"{",
    b"}",
    b"[",
    b"]",
    b",",
    b":",
    b"\"",
    b"null",
    b"-1",
    b"1e308",
    b"0",
    b"4294967295",
    b"\"version\": ",
    b"\"nodes\": ",
    b"\"segments\": ",
    b"\"from\": ",
    b"\"to\": ",
    b"\"units\": ",
    b"\"params\": ",
    b"\"digest\": ",
    b"[0, 0, 1]",
    b"NaN",
];

fn check(input: &FuzzInput) -> Result<Verdict, TestCaseError> {
    let Ok(text) = utf8_text(&input.bytes) else {
        return Ok(Verdict::Refused);
    };
    let Ok((record, network)) = read_record(text) else {
        return Ok(Verdict::Refused);
    };
    let metrics = measure(&network, 0.5);
    prop_assert!(
        metrics.is_ok(),
        "an accepted record measures: {:?}",
        metrics.err()
    );
    let metrics = metrics.expect("checked");
    prop_assert_eq!(metrics.node_count, network.nodes.len() as u64);
    prop_assert_eq!(metrics.segment_count, network.segments.len() as u64);
    prop_assert_eq!(
        metrics.loop_count + network.nodes.len() as u64,
        network.segments.len() as u64 + metrics.component_count
    );
    prop_assert_eq!(
        metrics.kind == NetworkKind::Forest,
        network.topology().is_ok()
    );
    let digest = digest_hex(&network);
    let written = write_record(&record);
    let again = read_record(&written);
    prop_assert!(
        again.is_ok(),
        "a record written back is refused: {:?}",
        again.err()
    );
    let (_, network_again) = again.expect("checked");
    prop_assert_eq!(digest_hex(&network_again), digest);
    Ok(Verdict::Accepted)
}

#[test]
fn fuzz_record_reader() {
    fuzz("record", TOKENS, check);
}
