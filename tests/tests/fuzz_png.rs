//! Fuzzing the PNG mask reader (`import::mask_from_png`, as `mask_from_bytes` picks it) on the
//! corpus in `tests/fuzz-corpus/png/` (see `ramulus_tests::fuzz`; the long run and its figures
//! are in DEVELOPERS.md). Half the cases have their chunk CRCs repaired after the edits, so the
//! edits reach the decoder instead of stopping at a checksum.
//!
//! Properties of every input: no panic, no input over a second; an accepted image has the
//! width and height of its IHDR chunk (PNG specification, W3C 2003, section 11.2.2: bytes 16
//! to 23, big-endian) and equals, pixel for pixel, the `png` crate's own decoding (palettes
//! and low depths expanded, 16-bit samples cut) under the mask rule: luminance
//! (299 R + 587 G + 114 B) / 1000 below 128 (ITU-R BT.601 weights) and alpha at least 128.

use proptest::prelude::*;
use ramulus_core::import::mask_from_bytes;
use ramulus_core::mask::MaskGrid;
use ramulus_tests::fuzz::{fuzz, FuzzInput, Verdict};

/// Chunk types and values the edits insert.
const TOKENS: &[&[u8]] = &[
    b"IHDR",
    b"PLTE",
    b"tRNS",
    b"IDAT",
    b"IEND",
    b"acTL",
    b"fcTL",
    b"fdAT",
    b"\x00\x00\x00\x00",
    b"\xff\xff\xff\xff",
    b"\x00\x00\x00\x0d",
    b"\x78\x9c",
    b"\x08\x03",
    b"\x10\x06",
    b"\x01\x02",
];

/// Recomputes the CRC of every complete chunk (PNG specification, section 5.3).
fn repair_crcs(bytes: &mut [u8]) {
    let mut at = 8;
    while at + 12 <= bytes.len() {
        let length = u32::from_be_bytes([bytes[at], bytes[at + 1], bytes[at + 2], bytes[at + 3]]);
        let Some(end) = (at + 8).checked_add(length as usize) else {
            return;
        };
        if end + 4 > bytes.len() {
            return;
        }
        let crc = crc32(&bytes[at + 4..end]);
        bytes[end..end + 4].copy_from_slice(&crc.to_be_bytes());
        at = end + 4;
    }
}

/// CRC-32 as the PNG specification (annex D) computes it, bit by bit.
fn crc32(bytes: &[u8]) -> u32 {
    let mut crc = 0xffff_ffffu32;
    for &byte in bytes {
        crc ^= u32::from(byte);
        for _ in 0..8 {
            crc = if crc & 1 == 1 {
                (crc >> 1) ^ 0xedb8_8320
            } else {
                crc >> 1
            };
        }
    }
    crc ^ 0xffff_ffff
}

/// The `png` crate's decoding of the same bytes under the mask rule.
fn reference(bytes: &[u8]) -> Option<(u32, u32, Vec<bool>)> {
    let mut decoder = png::Decoder::new(bytes);
    decoder.set_transformations(png::Transformations::EXPAND | png::Transformations::STRIP_16);
    // Text chunks do not change pixels; the mask reader skips them too.
    decoder.set_ignore_text_chunk(true);
    let mut reader = decoder.read_info().ok()?;
    let (colour, _) = reader.output_color_type();
    let channels = colour.samples();
    let mut buffer = vec![0u8; reader.output_buffer_size()];
    let frame = reader.next_frame(&mut buffer).ok()?;
    let mut pixels = Vec::new();
    for row in buffer.chunks(frame.line_size).take(frame.height as usize) {
        for pixel in row.chunks(channels).take(frame.width as usize) {
            let (luminance, alpha) = match *pixel {
                [grey] => (u32::from(grey), 255),
                [grey, alpha] => (u32::from(grey), alpha),
                [r, g, b] => (
                    (299 * u32::from(r) + 587 * u32::from(g) + 114 * u32::from(b)) / 1000,
                    255,
                ),
                [r, g, b, alpha] => (
                    (299 * u32::from(r) + 587 * u32::from(g) + 114 * u32::from(b)) / 1000,
                    alpha,
                ),
                _ => return None,
            };
            pixels.push(luminance < 128 && alpha >= 128);
        }
    }
    Some((frame.width, frame.height, pixels))
}

fn check(input: &FuzzInput) -> Result<Verdict, TestCaseError> {
    let mut bytes = input.bytes.clone();
    if input.choice % 2 == 1 {
        repair_crcs(&mut bytes);
    }
    let Ok(grid) = mask_from_bytes(&bytes) else {
        return Ok(Verdict::Refused);
    };
    prop_assert!(grid.validate(grid.width, grid.height).is_ok());
    if !bytes.starts_with(b"\x89PNG") {
        // A PBM made by the edits (the signature chose another reader): checked elsewhere.
        return Ok(Verdict::Refused);
    }
    let header =
        |at: usize| u32::from_be_bytes([bytes[at], bytes[at + 1], bytes[at + 2], bytes[at + 3]]);
    prop_assert_eq!((grid.width, grid.height), (header(16), header(20)));
    let expected = reference(&bytes);
    prop_assert!(
        expected.is_some(),
        "the png crate cannot decode an accepted image"
    );
    let (width, height, pixels) = expected.expect("checked");
    prop_assert!(
        grid == MaskGrid::from_bits(width, height, &pixels),
        "pixels differ"
    );
    Ok(Verdict::Accepted)
}

#[test]
fn fuzz_png_reader() {
    fuzz("png", TOKENS, check);
}
