//! Fuzzing the run-link reader (`link::decode_link`, after the command line's UTF-8 check of
//! `--link`) on the corpus in `tests/fuzz-corpus/link/` (see `ramulus_tests::fuzz`; the long
//! run and its figures are in DEVELOPERS.md).
//!
//! Properties of every input: no panic, no input over a second; `utf8_text` refuses exactly
//! at the first byte that is not UTF-8; the decoded parameters validate (ARCHITECTURE.md:
//! `decode_link` never fails and always returns parameters that validate); and the link
//! written from them reads back to the same parameters with no problem reported.

use proptest::prelude::*;
use ramulus_core::link::{decode_link, encode_link};
use ramulus_core::utf8_text::utf8_text;
use ramulus_tests::fuzz::{fuzz, FuzzInput, Verdict};

/// Pieces of link syntax the edits insert.
const TOKENS: &[&[u8]] = &[
    b"&",
    b"=",
    b"#",
    b"%",
    b"%2",
    b";",
    b",",
    b"v=1",
    b"v=2",
    b"width=",
    b"height=",
    b"cells=",
    b"roots=",
    b"outline=",
    b"obstacles=",
    b"mask=",
    b"seed=",
    b"alpha=",
    b"1e308",
    b"-0",
    b"NaN",
    b"inf",
    b"none",
    b"5000",
    b"64x48:",
    b".",
    b"999999999999",
];

fn check(input: &FuzzInput) -> Result<Verdict, TestCaseError> {
    let text = match utf8_text(&input.bytes) {
        Ok(text) => text.to_string(),
        Err(error) => {
            // RFC 3629: everything before the named byte is UTF-8, the named byte starts no
            // valid character.
            prop_assert!(std::str::from_utf8(&input.bytes[..error.offset]).is_ok());
            prop_assert!(std::str::from_utf8(&input.bytes[error.offset..]).is_err());
            // The page hands the reader text from the address bar; read what survives.
            String::from_utf8_lossy(&input.bytes).into_owned()
        }
    };
    let read = decode_link(&text);
    prop_assert!(
        read.params.validate().is_ok(),
        "decoded parameters fail validation: {:?}",
        read.params.validate()
    );
    let again = decode_link(&encode_link(&read.params));
    prop_assert_eq!(
        &again.problems,
        &Vec::new(),
        "a written link reads back with problems"
    );
    prop_assert!(
        again.params == read.params,
        "a written link reads back different"
    );
    Ok(if read.problems.is_empty() {
        Verdict::Accepted
    } else {
        Verdict::Refused
    })
}

#[test]
fn fuzz_link_reader() {
    fuzz("link", TOKENS, check);
}
