//! Fuzzing the elevation-raster reader as `ramulus drain --terrain` reads a file
//! (`site::read_geotiff`) on the corpus in `tests/fuzz-corpus/geotiff/` (small GeoTIFFs written
//! by `tests/fuzz-corpus/make-site-seeds.py`; see `ramulus_tests::fuzz`; the long run and its
//! figures are in DEVELOPERS.md).
//!
//! Properties of every input: no panic, no input over a second; an accepted raster has the size
//! its TIFF header states (read again with the `tiff` crate's own decoder), one elevation per
//! pixel (finite or NaN for no data, never infinite), finite georeferencing with a positive
//! pixel size, and reads its own pixel values back at the pixel centres away from pixels without data.

use std::io::Cursor;

use proptest::prelude::*;
use ramulus_core::site::read_geotiff;
use ramulus_tests::fuzz::{fuzz, FuzzInput, Verdict};
use tiff::decoder::Decoder;

/// Pieces of TIFF the edits insert: byte orders, tag numbers of the placement tags (both byte
/// orders), field types, large counts.
const TOKENS: &[&[u8]] = &[
    b"II*\0",
    b"MM\0*",
    b"\x0e\x83",
    b"\x83\x0e",
    b"\x82\x84",
    b"\x84\x82",
    b"\xaf\x87",
    b"\x81\xa4",
    b"\x00\x01",
    b"\x01\x01",
    b"\x0c\x00",
    b"\x03\x00",
    b"\xff\xff\xff\xff",
    b"\x00\x00\x80\x7f",
    b"\x00\x00\xc0\x7f",
    b"\x00\x00\x00\x00\x00\x00\xf0\x7f",
    b"\x00\x00\x00\x00",
];

fn check(input: &FuzzInput) -> Result<Verdict, TestCaseError> {
    let Ok(raster) = read_geotiff(&input.bytes) else {
        return Ok(Verdict::Refused);
    };
    let stated = Decoder::new(Cursor::new(&input.bytes[..])).and_then(|mut d| d.dimensions());
    prop_assert!(stated.is_ok(), "the tiff crate cannot read the size again");
    let (width, height) = stated.unwrap_or_default();
    prop_assert_eq!(
        (raster.width, raster.height),
        (width as usize, height as usize),
        "accepted size differs from the header's"
    );
    prop_assert_eq!(raster.values.len(), raster.width * raster.height);
    prop_assert!(
        raster.values.iter().all(|value| !value.is_infinite()),
        "an infinite elevation"
    );
    prop_assert!(
        raster.first_centre.iter().all(|value| value.is_finite()),
        "first pixel centre {:?}",
        raster.first_centre
    );
    prop_assert!(
        raster
            .pixel
            .iter()
            .all(|value| value.is_finite() && *value > 0.0),
        "pixel size {:?}",
        raster.pixel
    );
    // Pixel centres read back their own values (bilinear weights 1 and 0 there), on a few
    // pixels so large rasters stay quick. Skipped where the centres are not distinct numbers
    // (a pixel too small for the coordinates' precision).
    let step = (raster.width * raster.height / 64).max(1);
    for index in (0..raster.width * raster.height).step_by(step) {
        let (column, row) = (index % raster.width, index / raster.width);
        let x = raster.first_centre[0] + column as f64 * raster.pixel[0];
        let y = raster.first_centre[1] - row as f64 * raster.pixel[1];
        let exact = (x - raster.first_centre[0]) / raster.pixel[0] == column as f64
            && (raster.first_centre[1] - y) / raster.pixel[1] == row as f64;
        if !exact {
            continue;
        }
        let value = raster.values[index];
        let read = raster.at(x, y);
        // `at` reads nothing next to a pixel without data (its documented rule).
        let next_to_no_data = (column.saturating_sub(1)..(column + 2).min(raster.width))
            .flat_map(|c| {
                (row.saturating_sub(1)..(row + 2).min(raster.height)).map(move |r| (c, r))
            })
            .any(|(c, r)| raster.values[r * raster.width + c].is_nan());
        if value.is_nan() {
            prop_assert_eq!(read, None, "a pixel without data reads {:?}", read);
        } else if !next_to_no_data {
            prop_assert!(
                read.is_some_and(|z| (z - value).abs() <= 1e-9 * value.abs().max(1.0)),
                "pixel ({}, {}) holds {} but reads {:?}",
                column,
                row,
                value,
                read
            );
        }
    }
    Ok(Verdict::Accepted)
}

#[test]
fn fuzz_geotiff_reader() {
    fuzz("geotiff", TOKENS, check);
}
