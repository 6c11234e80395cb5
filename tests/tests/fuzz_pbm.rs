//! Fuzzing the PBM mask reader (`import::mask_from_pbm`, as `mask_from_bytes` picks it) on the
//! corpus in `tests/fuzz-corpus/pbm/` (see `ramulus_tests::fuzz`; the long run and its figures
//! are in DEVELOPERS.md).
//!
//! Properties of every input: no panic, no input over a second; an accepted image equals, pixel
//! for pixel, what a small reference reader written here from the Netpbm PBM format
//! specification makes of the same bytes (header fields between whitespace and `#` comments;
//! P1 digits with whitespace and comments skipped; P4 rows of whole bytes, most significant
//! bit first, after one whitespace character).

use proptest::prelude::*;
use ramulus_core::import::mask_from_bytes;
use ramulus_core::mask::MaskGrid;
use ramulus_tests::fuzz::{fuzz, FuzzInput, Verdict};

/// Pieces of PBM syntax the edits insert.
const TOKENS: &[&[u8]] = &[
    b"P1",
    b"P4",
    b"P1\n",
    b"P4\n",
    b"#",
    b"# c\n",
    b"\n",
    b"\r\n",
    b" ",
    b"0",
    b"1",
    b"255\n",
    b"5000",
    b"99999999999999999999",
    b"\xff",
    b"\x00",
];

/// Netpbm whitespace: blank, TAB, LF, VT, FF, CR.
fn is_space(byte: u8) -> bool {
    matches!(byte, b' ' | b'\t' | b'\n' | 0x0b | 0x0c | b'\r')
}

/// Skips whitespace and comments (`#` through the line end) from `at`.
fn skip(bytes: &[u8], mut at: usize) -> usize {
    while at < bytes.len() {
        if is_space(bytes[at]) {
            at += 1;
        } else if bytes[at] == b'#' {
            while at < bytes.len() && bytes[at] != b'\n' && bytes[at] != b'\r' {
                at += 1;
            }
        } else {
            break;
        }
    }
    at
}

/// A decimal number at `at`, and the position after it.
fn number(bytes: &[u8], at: usize) -> Option<(u64, usize)> {
    let digits = bytes[at..]
        .iter()
        .take_while(|b| b.is_ascii_digit())
        .count();
    let text = std::str::from_utf8(&bytes[at..at + digits]).ok()?;
    Some((text.parse().ok()?, at + digits))
}

/// The reference reading: width, height and pixels (1 = black = allowed), when the header
/// parses; `None` when it does not.
fn reference(bytes: &[u8]) -> Option<(u32, u32, Vec<bool>)> {
    let (width, at) = number(bytes, skip(bytes, 2))?;
    let (height, at) = number(bytes, skip(bytes, at))?;
    let (width, height) = (u32::try_from(width).ok()?, u32::try_from(height).ok()?);
    let total = width as usize * height as usize;
    let mut pixels = Vec::with_capacity(total);
    if bytes.starts_with(b"P1") {
        let mut at = at;
        while pixels.len() < total {
            at = skip(bytes, at);
            match bytes.get(at)? {
                b'0' => pixels.push(false),
                b'1' => pixels.push(true),
                _ => return None,
            }
            at += 1;
        }
    } else {
        // One whitespace character; a comment there runs to its line end, which ends it.
        let mut at = at;
        if bytes.get(at) == Some(&b'#') {
            while !matches!(bytes.get(at), Some(b'\n' | b'\r') | None) {
                at += 1;
            }
            if bytes.get(at) == Some(&b'\r') && bytes.get(at + 1) == Some(&b'\n') {
                at += 1;
            }
        }
        let start = at + 1;
        let row_bytes = (width as usize).div_ceil(8);
        for row in 0..height as usize {
            for column in 0..width as usize {
                let byte = *bytes.get(start + row * row_bytes + column / 8)?;
                pixels.push(byte >> (7 - column % 8) & 1 == 1);
            }
        }
    }
    Some((width, height, pixels))
}

fn check(input: &FuzzInput) -> Result<Verdict, TestCaseError> {
    // Most inputs keep a PBM signature so the edits reach the reader.
    let mut bytes = input.bytes.clone();
    if !input.choice.is_multiple_of(4) && !bytes.starts_with(b"P1") && !bytes.starts_with(b"P4") {
        bytes.splice(
            0..0,
            if input.choice.is_multiple_of(2) {
                *b"P1"
            } else {
                *b"P4"
            },
        );
    }
    let Ok(grid) = mask_from_bytes(&bytes) else {
        return Ok(Verdict::Refused);
    };
    prop_assert!(grid.validate(grid.width, grid.height).is_ok());
    let expected = reference(&bytes);
    prop_assert!(
        expected.is_some(),
        "the reference cannot read an accepted image"
    );
    let (width, height, pixels) = expected.expect("checked");
    prop_assert_eq!((grid.width, grid.height), (width, height));
    prop_assert!(
        grid == MaskGrid::from_bits(width, height, &pixels),
        "pixels differ"
    );
    Ok(Verdict::Accepted)
}

#[test]
fn fuzz_pbm_reader() {
    fuzz("pbm", TOKENS, check);
}
