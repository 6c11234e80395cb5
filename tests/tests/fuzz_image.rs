//! Fuzzing the cleared-leaf image readers (`cleared::decode::decode_image`, PNG and JPEG, then
//! `cleared::analyse_cleared_leaf`) on the corpus in `tests/fuzz-corpus/image/` (see
//! `ramulus_tests::fuzz`; written by `tests/fuzz-corpus/make-cleared-images.py`). Half the
//! cases have their PNG chunk CRCs repaired after the edits, so the edits reach the decoder.
//!
//! Properties of every input: no panic, no input over a second; an accepted image has as many
//! pixels as its size says, within the size limits, and a PNG the width and height of its
//! IHDR chunk (PNG specification, W3C 2003, section 11.2.2). Accepted images of up to 200,000
//! pixels are read step by step (the global or the local threshold, dark or light leaf, by the
//! case's choice byte): veins lie inside the leaf, the skeleton inside the veins, the leaf's
//! outline ring has the leaf's pixel count as its shoelace area (Braden 1986), and every vein
//! point lies inside the image.

use proptest::prelude::*;
use ramulus_core::cleared::decode::{decode_image, PNG_SIGNATURE};
use ramulus_core::cleared::{
    analyse_cleared_leaf, ClearedOptions, VeinThreshold, MAX_IMAGE_PIXELS, MAX_IMAGE_SIDE,
};
use ramulus_core::specimen::ring_area;
use ramulus_tests::fuzz::{fuzz, FuzzInput, Verdict};

/// Chunk types, JPEG markers and values the edits insert.
const TOKENS: &[&[u8]] = &[
    b"IHDR",
    b"PLTE",
    b"IDAT",
    b"IEND",
    b"pHYs",
    b"\xff\xd8\xff",
    b"\xff\xc0",
    b"\xff\xc2",
    b"\xff\xc4",
    b"\xff\xdb",
    b"\xff\xda",
    b"\xff\xd9",
    b"\xff\xdd\x00\x04\x00\x01",
    b"\x00\x00\x00\x00",
    b"\xff\xff\xff\xff",
    b"\x00\x01\x86\xa0",
];

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

/// Recomputes the CRC of every complete PNG chunk (PNG specification, section 5.3).
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

fn check(input: &FuzzInput) -> Result<Verdict, TestCaseError> {
    let mut bytes = input.bytes.clone();
    if input.choice % 2 == 1 && bytes.starts_with(&PNG_SIGNATURE) {
        repair_crcs(&mut bytes);
    }
    let Ok(image) = decode_image(&bytes) else {
        return Ok(Verdict::Refused);
    };
    let (width, height) = (image.width as usize, image.height as usize);
    prop_assert_eq!(image.pixels.len(), width * height);
    prop_assert!(image.width <= MAX_IMAGE_SIDE && image.height <= MAX_IMAGE_SIDE);
    prop_assert!((width * height) as u64 <= MAX_IMAGE_PIXELS);
    if bytes.starts_with(&PNG_SIGNATURE) {
        let header = |at: usize| {
            u32::from_be_bytes([bytes[at], bytes[at + 1], bytes[at + 2], bytes[at + 3]])
        };
        prop_assert_eq!((image.width, image.height), (header(16), header(20)));
    }
    if width * height > 200_000 {
        return Ok(Verdict::Accepted);
    }
    let options = ClearedOptions {
        leaf_darker: input.choice & 4 == 0,
        vein_threshold: if input.choice & 2 == 0 {
            VeinThreshold::Global
        } else {
            VeinThreshold::Local {
                window: 3 + u32::from(input.choice >> 3),
                offset: 5.0,
            }
        },
        ..ClearedOptions::default()
    };
    let Ok(leaf) = analyse_cleared_leaf(&image, &options) else {
        return Ok(Verdict::Accepted);
    };
    prop_assert!(leaf.leaf_pixels <= width * height);
    prop_assert!(leaf.vein_pixels <= leaf.leaf_pixels);
    for index in 0..width * height {
        prop_assert!(!leaf.vein_mask[index] || leaf.leaf_mask[index]);
        prop_assert!(!leaf.skeleton[index] || leaf.vein_mask[index]);
    }
    prop_assert_eq!(ring_area(&leaf.outline), leaf.leaf_pixels as f64);
    for vein in &leaf.veins {
        for &(x, y) in &vein.points {
            prop_assert!(x >= 0.0 && y >= 0.0 && x <= width as f64 && y <= height as f64);
        }
        prop_assert!(vein.width >= 1.0 && vein.width.is_finite());
    }
    Ok(Verdict::Accepted)
}

#[test]
fn fuzz_image_readers() {
    let accepted = fuzz("image", TOKENS, check);
    assert!(accepted > 0, "no fuzzed image was accepted");
}
