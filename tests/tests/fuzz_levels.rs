//! Fuzzing the spot-level reader as `ramulus drain --levels` reads a file
//! (`site::read_spot_levels_csv`) on the corpus in `tests/fuzz-corpus/levels/` (see
//! `ramulus_tests::fuzz`; the long run and its figures are in DEVELOPERS.md).
//!
//! Properties of every input: no panic, no input over a second; every accepted level is three
//! finite numbers, and the levels written back as `x,y,z` lines (Rust's shortest round-trip
//! decimal form of each number) read back equal, in order.

use proptest::prelude::*;
use ramulus_core::site::read_spot_levels_csv;
use ramulus_tests::fuzz::{fuzz, FuzzInput, Verdict};

/// Pieces of CSV and numbers the edits insert.
const TOKENS: &[&[u8]] = &[
    b",",
    b"\n",
    b"\r\n",
    b"x,y,z\n",
    b"X,Y,Z",
    b" ",
    b"-",
    b"+",
    b".",
    b"e",
    b"1e308",
    b"1e309",
    b"-0",
    b"NaN",
    b"inf",
    b"0x10",
    b"1_000",
    b"\"",
    b"\xef\xbb\xbf",
    b"\xe9",
];

fn check(input: &FuzzInput) -> Result<Verdict, TestCaseError> {
    let Ok(levels) = read_spot_levels_csv(&input.bytes) else {
        return Ok(Verdict::Refused);
    };
    let mut text = String::new();
    if input.choice & 1 == 1 {
        text.push_str("x,y,z\n");
    }
    for level in &levels {
        prop_assert!(
            level.x.is_finite() && level.y.is_finite() && level.z.is_finite(),
            "{}: ({}, {}, {}) is not finite",
            level.place,
            level.x,
            level.y,
            level.z
        );
        text.push_str(&format!("{},{},{}\n", level.x, level.y, level.z));
    }
    let again = read_spot_levels_csv(text.as_bytes());
    prop_assert!(
        again.is_ok(),
        "written levels do not read back: {:?}",
        again.err()
    );
    let again = again.unwrap_or_default();
    prop_assert_eq!(again.len(), levels.len());
    for (first, second) in levels.iter().zip(&again) {
        // Bit for bit, so -0 stays -0.
        prop_assert!(
            first.x.to_bits() == second.x.to_bits()
                && first.y.to_bits() == second.y.to_bits()
                && first.z.to_bits() == second.z.to_bits(),
            "{} reads back as ({}, {}, {})",
            first.place,
            second.x,
            second.y,
            second.z
        );
    }
    Ok(Verdict::Accepted)
}

#[test]
fn fuzz_levels_reader() {
    fuzz("levels", TOKENS, check);
}
