//! Mask importer tests: PBM against the worked example of the Netpbm PBM format description,
//! PNG against images written by the `png` crate's encoder, and fuzzing of `mask_from_bytes`.

use proptest::prelude::*;
use ramulus_core::import::{mask_from_bytes, mask_from_pbm, mask_from_png, ImportError};
use ramulus_core::mask::MaskGrid;

/// The letter "J" of the Netpbm PBM format description (netpbm.sourceforge.net/doc/pbm.html),
/// plain format, with its comment line.
const J_PLAIN: &str = "P1
# This is an example bitmap of the letter \"J\"
6 10
0 0 0 0 1 0
0 0 0 0 1 0
0 0 0 0 1 0
0 0 0 0 1 0
0 0 0 0 1 0
0 0 0 0 1 0
1 0 0 0 1 0
0 1 1 1 0 0
0 0 0 0 0 0
0 0 0 0 0 0
";

/// The same image as the description's second listing: the raster digits packed, no spaces.
const J_PACKED: &str = "P1
# This is an example bitmap of the letter \"J\"
6 10
000010000010000010000010000010000010100010011100000000000000
";

/// The "J" bits, row by row, read off the listing above.
const J_ROWS: [&str; 10] = [
    "000010", "000010", "000010", "000010", "000010", "000010", "100010", "011100", "000000",
    "000000",
];

/// Bits of rows written as `0`/`1` strings (1 = black = allowed).
fn bits_of(rows: &[&str]) -> Vec<bool> {
    rows.iter()
        .flat_map(|row| row.chars().map(|digit| digit == '1'))
        .collect()
}

/// A P4 file: header then the raster bytes.
fn raw_pbm(width: u32, height: u32, raster: &[u8]) -> Vec<u8> {
    let mut bytes = format!("P4\n{width} {height}\n").into_bytes();
    bytes.extend_from_slice(raster);
    bytes
}

/// A P1 file from rows of digits.
fn plain_pbm(rows: &[&str]) -> Vec<u8> {
    let width = rows.first().map_or(0, |row| row.len());
    format!("P1\n{width} {}\n{}\n", rows.len(), rows.join("\n")).into_bytes()
}

fn allowed_count(grid: &MaskGrid) -> usize {
    grid.to_bits()
        .expect("runs decode")
        .iter()
        .filter(|&&allowed| allowed)
        .count()
}

#[test]
fn netpbm_j_example_plain_and_packed() {
    // Netpbm PBM description: the "J" is 6 wide and 10 high; 1 is black.
    let expected = MaskGrid::from_bits(6, 10, &bits_of(&J_ROWS));
    let plain = mask_from_pbm(J_PLAIN.as_bytes()).unwrap();
    let packed = mask_from_pbm(J_PACKED.as_bytes()).unwrap();
    assert_eq!(plain, expected);
    assert_eq!(packed, expected);
    // Six rows with one black pixel, then "100010" (2) and "011100" (3): 11 black pixels.
    assert_eq!(allowed_count(&plain), 11);
    assert_eq!((plain.width, plain.height), (6, 10));
}

#[test]
fn netpbm_j_example_raw() {
    // Netpbm PBM description, raw format: 8 pixels a byte, most significant bit first, each
    // row padded to a byte. Hand-packed: "000010" -> 0000_1000, "100010" -> 1000_1000,
    // "011100" -> 0111_0000.
    let raster = [0x08, 0x08, 0x08, 0x08, 0x08, 0x08, 0x88, 0x70, 0x00, 0x00];
    let raw = mask_from_pbm(&raw_pbm(6, 10, &raster)).unwrap();
    assert_eq!(raw, mask_from_pbm(J_PLAIN.as_bytes()).unwrap());
    // The description says padding bits are ignored: set them all and get the same mask.
    let padded: Vec<u8> = raster.iter().map(|byte| byte | 0b0000_0011).collect();
    assert_eq!(mask_from_pbm(&raw_pbm(6, 10, &padded)).unwrap(), raw);
    // The sniffer picks the same reader.
    assert_eq!(mask_from_bytes(&raw_pbm(6, 10, &raster)).unwrap(), raw);
}

#[test]
fn raw_rows_are_padded_to_whole_bytes() {
    // Widths 10 and 17 leave 6 and 7 padding bits a row (Netpbm PBM description).
    let rows_10 = ["1000000001", "0110000110", "0001111000"];
    let raster_10 = [
        0b1000_0000,
        0b0100_0000, //
        0b0110_0001,
        0b1011_1111, // padding bits set
        0b0001_1110,
        0b0000_0000,
    ];
    let rows_17 = [
        "10101010101010101",
        "01010101010101010",
        "11111111111111111",
    ];
    let raster_17 = [
        0xaa, 0xaa, 0x80, //
        0x55, 0x55, 0x00, //
        0xff, 0xff, 0xff, // padding bits set
    ];
    for (rows, raster) in [
        (&rows_10[..], &raster_10[..]),
        (&rows_17[..], &raster_17[..]),
    ] {
        let width = rows[0].len() as u32;
        let expected = MaskGrid::from_bits(width, 3, &bits_of(rows));
        assert_eq!(
            mask_from_pbm(&raw_pbm(width, 3, raster)).unwrap(),
            expected,
            "P4 {width}"
        );
        assert_eq!(
            mask_from_pbm(&plain_pbm(rows)).unwrap(),
            expected,
            "P1 {width}"
        );
        // One byte short is truncated.
        let short = raw_pbm(width, 3, &raster[..raster.len() - 1]);
        assert!(matches!(
            mask_from_pbm(&short),
            Err(ImportError::Truncated { .. })
        ));
    }
}

#[test]
fn comments_and_line_endings() {
    // Netpbm PBM description: a comment runs from '#' to the next CR or LF, anywhere in the
    // header, and any whitespace separates the fields.
    let text = "P1#magic\r\n# a whole line\r\n6# width\r\n\t10 # height\r\n000010 000010\r\n\
                000010 000010 000010 000010 100010 011100 000000 000000";
    assert_eq!(
        mask_from_pbm(text.as_bytes()).unwrap(),
        mask_from_pbm(J_PLAIN.as_bytes()).unwrap()
    );
    // P4: a comment after the height ends at its newline, which is the raster separator.
    let mut raw = b"P4 # the J\n6 10# size\n".to_vec();
    raw.extend_from_slice(&[0x08, 0x08, 0x08, 0x08, 0x08, 0x08, 0x88, 0x70, 0x00, 0x00]);
    assert_eq!(
        mask_from_pbm(&raw).unwrap(),
        mask_from_pbm(J_PLAIN.as_bytes()).unwrap()
    );
}

#[test]
fn several_images_read_the_first() {
    // Netpbm PBM description: a file may hold several images one after another.
    let mut two = J_PACKED.as_bytes().to_vec();
    two.extend_from_slice(b"P1 1 1 1\n");
    assert_eq!(
        mask_from_pbm(&two).unwrap(),
        mask_from_pbm(J_PLAIN.as_bytes()).unwrap()
    );
}

/// A check of an error: the input, the variant it must give, and words its message must hold.
fn check_error(input: &[u8], matches: fn(&ImportError) -> bool, words: &[&str]) {
    let error = match mask_from_bytes(input) {
        Ok(grid) => panic!("{:?} parsed as {grid:?}", String::from_utf8_lossy(input)),
        Err(error) => error,
    };
    assert!(
        matches(&error),
        "{:?}: unexpected {error:?}",
        String::from_utf8_lossy(input)
    );
    let message = error.to_string();
    for word in words {
        assert!(message.contains(word), "{message:?} lacks {word:?}");
    }
}

#[test]
fn bad_pbm_files_are_errors_that_say_where() {
    check_error(
        b"P1\n6 10\n0 0 0 0 1 0\n",
        |e| matches!(e, ImportError::Truncated { .. }),
        &["6 of 60 pixels", "byte offset 20"],
    );
    check_error(
        b"P1\n3 1\n0 2 0\n",
        |e| matches!(e, ImportError::BadDigit { .. }),
        &[
            "line 3",
            "byte offset 9", // counted from 0: "P1", LF, "3 1", LF, "0 " make 9 bytes
            "\"2\"",
        ],
    );
    check_error(
        b"P1\n0 5\n",
        |e| matches!(e, ImportError::BadSize { .. }),
        &["0 x 5"],
    );
    check_error(
        b"P4\n10000 10000\n",
        |e| matches!(e, ImportError::BadSize { .. }),
        &["10000 x 10000", "25000000"],
    );
    check_error(
        b"P4\n99999999999999999999999 2\n",
        |e| matches!(e, ImportError::NumberTooLarge { field: "width", .. }),
        &["PBM header", "width 99999999999999999999999"],
    );
    check_error(
        b"P1\n6 ",
        |e| {
            matches!(
                e,
                ImportError::BadHeader {
                    field: "height",
                    ..
                }
            )
        },
        &["line 2", "height", "end of the data"],
    );
    check_error(
        b"P1\n6 x\n",
        |e| matches!(e, ImportError::BadHeader { .. }),
        &["\"x"],
    );
    check_error(
        b"P16 10\n",
        |e| matches!(e, ImportError::BadHeader { .. }),
        &["magic"],
    );
    check_error(
        b"P4 8 2\n\xff",
        |e| matches!(e, ImportError::Truncated { .. }),
        &["1 of 2 bytes"],
    );
    check_error(
        b"P4 8 1",
        |e| matches!(e, ImportError::BadHeader { .. }),
        &["separator"],
    );
    check_error(
        b"",
        |e| matches!(e, ImportError::UnknownFormat { .. }),
        &["empty", "PNG"],
    );
    check_error(
        b"P6\n1 1\n255\nabc",
        |e| matches!(e, ImportError::UnknownFormat { .. }),
        &["PPM", "PBM"],
    );
}

// ---------------------------------------------------------------------------------------------
// PNG

/// Encodes an image with the `png` crate's encoder.
fn encode_png(
    width: u32,
    height: u32,
    colour: png::ColorType,
    depth: png::BitDepth,
    data: &[u8],
    palette: Option<(&[u8], Option<&[u8]>)>,
) -> Vec<u8> {
    let mut bytes = Vec::new();
    {
        let mut encoder = png::Encoder::new(&mut bytes, width, height);
        encoder.set_color(colour);
        encoder.set_depth(depth);
        if let Some((palette, transparency)) = palette {
            encoder.set_palette(palette.to_vec());
            if let Some(transparency) = transparency {
                encoder.set_trns(transparency.to_vec());
            }
        }
        let mut writer = encoder.write_header().unwrap();
        writer.write_image_data(data).unwrap();
    }
    bytes
}

/// The stated rule, written out independently: luminance `(299 R + 587 G + 114 B) / 1000`
/// (the ITU-R BT.601 luma weights) below 128, and alpha at least 128.
fn rule(red: u8, green: u8, blue: u8, alpha: u8) -> bool {
    let luminance = (299 * red as u32 + 587 * green as u32 + 114 * blue as u32) / 1000;
    luminance < 128 && alpha >= 128
}

/// Decodes and compares cell by cell with `expected`.
fn check_png(bytes: &[u8], width: u32, height: u32, expected: &[bool]) {
    let grid = mask_from_png(bytes).unwrap();
    assert_eq!((grid.width, grid.height), (width, height));
    let bits = grid.to_bits().expect("runs add up");
    for (cell, (&got, &want)) in bits.iter().zip(expected).enumerate() {
        assert_eq!(
            got,
            want,
            "cell {cell} (column {}, row {})",
            cell as u32 % width,
            cell as u32 / width
        );
    }
    assert_eq!(bits.len(), expected.len());
    assert_eq!(
        mask_from_bytes(bytes).unwrap(),
        grid,
        "the sniffer reads PNG the same way"
    );
}

#[test]
fn png_grey_8_bit() {
    let data: Vec<u8> = vec![0, 1, 127, 128, 129, 255, 64, 200, 127, 128, 0, 255];
    let expected: Vec<bool> = data
        .iter()
        .map(|&grey| rule(grey, grey, grey, 255))
        .collect();
    assert_eq!(expected.iter().filter(|&&allowed| allowed).count(), 6);
    let bytes = encode_png(
        4,
        3,
        png::ColorType::Grayscale,
        png::BitDepth::Eight,
        &data,
        None,
    );
    check_png(&bytes, 4, 3, &expected);
}

#[test]
fn png_rgb_8_bit() {
    // Pure green 218 has luminance 127 (allowed), 219 has 128 (blocked); pure red and blue
    // stay dark even at full strength.
    let pixels: [[u8; 3]; 6] = [
        [0, 218, 0],
        [0, 219, 0],
        [255, 0, 0],
        [0, 0, 255],
        [255, 255, 255],
        [100, 120, 140],
    ];
    let data: Vec<u8> = pixels.iter().flatten().copied().collect();
    let expected: Vec<bool> = pixels.iter().map(|&[r, g, b]| rule(r, g, b, 255)).collect();
    assert_eq!(expected, [true, false, true, true, false, true]);
    let bytes = encode_png(3, 2, png::ColorType::Rgb, png::BitDepth::Eight, &data, None);
    check_png(&bytes, 3, 2, &expected);
}

#[test]
fn png_rgba_with_transparent_pixels() {
    // A dark pixel that is transparent is not allowed; the cut is at alpha 128.
    let pixels: [[u8; 4]; 6] = [
        [0, 0, 0, 255],
        [0, 0, 0, 0],
        [0, 0, 0, 127],
        [0, 0, 0, 128],
        [255, 255, 255, 255],
        [255, 255, 255, 0],
    ];
    let data: Vec<u8> = pixels.iter().flatten().copied().collect();
    let expected: Vec<bool> = pixels
        .iter()
        .map(|&[r, g, b, a]| rule(r, g, b, a))
        .collect();
    assert_eq!(expected, [true, false, false, true, false, false]);
    let bytes = encode_png(
        2,
        3,
        png::ColorType::Rgba,
        png::BitDepth::Eight,
        &data,
        None,
    );
    check_png(&bytes, 2, 3, &expected);
}

#[test]
fn png_grey_1_bit_with_row_padding() {
    // PNG specification: 1-bit samples pack 8 to a byte, MSB first, rows padded to a byte;
    // 0 is black. Width 10 needs 2 bytes a row.
    let rows = ["0110000001", "1111111110"];
    let data = [0b0110_0000, 0b0100_0000, 0b1111_1111, 0b1000_0000];
    let expected: Vec<bool> = rows
        .iter()
        .flat_map(|row| row.chars().map(|sample| sample == '0'))
        .collect();
    let bytes = encode_png(
        10,
        2,
        png::ColorType::Grayscale,
        png::BitDepth::One,
        &data,
        None,
    );
    check_png(&bytes, 10, 2, &expected);
}

#[test]
fn png_16_bit_grey_and_rgb() {
    // 16-bit samples are big-endian (PNG specification); the 8-bit value is the high byte,
    // so 0x7fff counts as 127 and 0x8000 as 128.
    let grey: [u16; 4] = [0x0000, 0x7fff, 0x8000, 0xffff];
    let data: Vec<u8> = grey
        .iter()
        .flat_map(|sample| sample.to_be_bytes())
        .collect();
    let expected: Vec<bool> = grey
        .iter()
        .map(|&sample| {
            let high = (sample >> 8) as u8;
            rule(high, high, high, 255)
        })
        .collect();
    assert_eq!(expected, [true, true, false, false]);
    let bytes = encode_png(
        2,
        2,
        png::ColorType::Grayscale,
        png::BitDepth::Sixteen,
        &data,
        None,
    );
    check_png(&bytes, 2, 2, &expected);

    let rgb: [[u16; 3]; 3] = [[0, 0xda00, 0], [0, 0xdb00, 0], [0x1234, 0x5678, 0x9abc]];
    let data: Vec<u8> = rgb
        .iter()
        .flatten()
        .flat_map(|sample| sample.to_be_bytes())
        .collect();
    let expected: Vec<bool> = rgb
        .iter()
        .map(|&[r, g, b]| rule((r >> 8) as u8, (g >> 8) as u8, (b >> 8) as u8, 255))
        .collect();
    assert_eq!(expected, [true, false, true]);
    let bytes = encode_png(
        3,
        1,
        png::ColorType::Rgb,
        png::BitDepth::Sixteen,
        &data,
        None,
    );
    check_png(&bytes, 3, 1, &expected);

    let grey_alpha: [[u16; 2]; 2] = [[0, 0xffff], [0, 0x7fff]];
    let data: Vec<u8> = grey_alpha
        .iter()
        .flatten()
        .flat_map(|sample| sample.to_be_bytes())
        .collect();
    let bytes = encode_png(
        2,
        1,
        png::ColorType::GrayscaleAlpha,
        png::BitDepth::Sixteen,
        &data,
        None,
    );
    check_png(&bytes, 2, 1, &[true, false]);
}

#[test]
fn png_palette_with_transparency() {
    // PNG specification: a palette image stores indices; tRNS gives the palette entries alpha.
    let palette = [0, 0, 0, 255, 255, 255, 20, 40, 60, 0, 0, 0];
    let transparency = [255, 255, 255, 0]; // the fourth entry (black) is transparent
    let entries: [[u8; 4]; 4] = [
        [0, 0, 0, 255],
        [255, 255, 255, 255],
        [20, 40, 60, 255],
        [0, 0, 0, 0],
    ];
    let indices = [0u8, 1, 2, 3, 3, 2, 1, 0];
    let expected: Vec<bool> = indices
        .iter()
        .map(|&index| {
            let [r, g, b, a] = entries[index as usize];
            rule(r, g, b, a)
        })
        .collect();
    let bytes = encode_png(
        4,
        2,
        png::ColorType::Indexed,
        png::BitDepth::Eight,
        &indices,
        Some((&palette, Some(&transparency))),
    );
    check_png(&bytes, 4, 2, &expected);
}

/// CRC-32 as the PNG specification (annex D) computes it over a chunk's type and data.
fn crc32(bytes: &[u8]) -> u32 {
    let mut crc = 0xffff_ffffu32;
    for &byte in bytes {
        crc ^= byte as u32;
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

/// Recomputes the CRC of every complete chunk, so that edits reach past the checksum test.
fn fix_crcs(bytes: &mut [u8]) {
    let mut position = 8;
    while position + 12 <= bytes.len() {
        let length = u32::from_be_bytes([
            bytes[position],
            bytes[position + 1],
            bytes[position + 2],
            bytes[position + 3],
        ]) as usize;
        let end = match (position + 8).checked_add(length) {
            Some(end) if end + 4 <= bytes.len() => end,
            _ => return,
        };
        let crc = crc32(&bytes[position + 4..end]);
        bytes[end..end + 4].copy_from_slice(&crc.to_be_bytes());
        position = end + 4;
    }
}

fn small_png() -> Vec<u8> {
    let data: Vec<u8> = (0..48u8).map(|value| value.wrapping_mul(37)).collect();
    encode_png(4, 4, png::ColorType::Rgb, png::BitDepth::Eight, &data, None)
}

#[test]
fn png_checks_our_crc_helper() {
    // PNG specification annex D check value: CRC-32 of "123456789" is cbf43926.
    assert_eq!(crc32(b"123456789"), 0xcbf4_3926);
    // The encoder's own CRCs survive a recomputation unchanged.
    let original = small_png();
    let mut fixed = original.clone();
    fix_crcs(&mut fixed);
    assert_eq!(fixed, original);
}

#[test]
fn png_huge_declared_size_is_refused_before_decoding() {
    // IHDR starts at byte 16: width and height, big-endian (PNG specification 11.2.2).
    let mut bytes = small_png();
    bytes[16..20].copy_from_slice(&100_000u32.to_be_bytes());
    bytes[20..24].copy_from_slice(&100_000u32.to_be_bytes());
    fix_crcs(&mut bytes);
    let error = mask_from_png(&bytes).unwrap_err();
    assert!(
        matches!(
            error,
            ImportError::BadSize {
                width: 100_000,
                height: 100_000,
                ..
            }
        ),
        "{error:?}"
    );
    // Within the cell limit but far more pixels than the file could hold.
    bytes[16..20].copy_from_slice(&4000u32.to_be_bytes());
    bytes[20..24].copy_from_slice(&4000u32.to_be_bytes());
    fix_crcs(&mut bytes);
    let error = mask_from_png(&bytes).unwrap_err();
    assert!(error.to_string().contains("too short"), "{error}");
}

#[test]
fn png_broken_files_are_errors() {
    let bytes = small_png();
    for cut in [8, 20, 33, bytes.len() / 2, bytes.len() - 13] {
        let error = mask_from_png(&bytes[..cut]).unwrap_err();
        assert!(
            error.to_string().starts_with("PNG"),
            "cut at {cut}: {error}"
        );
    }
    // A flipped bit in the header fails its CRC (see png_crc_error_names_chunk_and_offset).
    let mut corrupt = bytes.clone();
    corrupt[17] ^= 0x40;
    assert!(matches!(
        mask_from_png(&corrupt),
        Err(ImportError::PngChunk { .. })
    ));
    // Zero width is refused (the PNG specification forbids it).
    let mut zero = bytes;
    zero[16..20].copy_from_slice(&0u32.to_be_bytes());
    fix_crcs(&mut zero);
    assert!(mask_from_png(&zero).is_err());
}

// ---------------------------------------------------------------------------------------------
// Files that used to be misread (issue 8): each refused with a message naming where.

#[test]
fn pbm_p4_with_a_maxval_line_is_refused() {
    // Netpbm PBM format specification: after the height comes one whitespace character and
    // then the raster; there is no maxval (PGM and PPM have one). Read as pixels, the line "1"
    // and its line end would shift the raster by two bytes.
    let mut bytes = b"P4\n8 2\n1\n".to_vec();
    bytes.extend_from_slice(&[0xff, 0x00]);
    let error = mask_from_pbm(&bytes).unwrap_err();
    assert_eq!(
        error,
        ImportError::MaxvalLine {
            offset: 7, // "P4", LF, "8 2", LF make 7 bytes
            line: 3,
            found: "\"1\\n\"".to_string(),
        }
    );
    let message = error.to_string();
    for words in ["line 3", "byte offset 7", "maxval", "raster was expected"] {
        assert!(message.contains(words), "{message:?} lacks {words:?}");
    }
    // A raster that merely starts with many digit bytes is extra data, shown shortened.
    let mut digits = b"P4 8 1000\n".to_vec();
    digits.extend(std::iter::repeat_n(b'7', 1000));
    digits.extend_from_slice(b"\n\x00");
    let message = mask_from_pbm(&digits).unwrap_err().to_string();
    assert!(message.contains("2 more bytes"), "{message}");
    assert!(message.len() < 300, "{message}");
    // The same raster without the line reads as 8 black pixels over 8 white ones.
    let grid = mask_from_pbm(b"P4\n8 2\n\xff\x00").unwrap();
    assert_eq!(allowed_count(&grid), 8);
}

#[test]
fn pbm_p4_with_bytes_after_the_raster_is_refused() {
    // Netpbm PBM format specification: "There are no data, delimiters, or padding before,
    // after, or between images."
    check_error(
        b"P4 8 1\n\xff\x07\x07",
        |e| {
            matches!(
                e,
                ImportError::ExtraData {
                    format: "PBM P4 raster",
                    offset: 8,
                    ..
                }
            )
        },
        &["byte offset 8", "2 more bytes", "last pixel"],
    );
}

#[test]
fn pbm_p1_with_pixels_after_the_last_is_refused() {
    // "P1", LF, "2 1", LF, "1 0", LF make 11 bytes; the extra "1" stands on line 4.
    check_error(
        b"P1\n2 1\n1 0\n1\n",
        |e| {
            matches!(
                e,
                ImportError::ExtraData {
                    format: "PBM P1 raster",
                    offset: 11,
                    line: 4,
                    ..
                }
            )
        },
        &["line 4", "byte offset 11", "more pixels than 2 x 1"],
    );
    check_error(
        b"P1\n2 1\n1 0 x",
        |e| matches!(e, ImportError::ExtraData { line: 3, .. }),
        &["line 3", "\"x\""],
    );
    // Whitespace and comments after the last pixel are allowed.
    let grid = mask_from_pbm(b"P1\n2 1\n1 0\n# end\n\n").unwrap();
    assert_eq!(grid, MaskGrid::from_bits(2, 1, &[true, false]));
}

#[test]
fn pbm_huge_width_is_reported_as_written() {
    let error = mask_from_pbm(b"P1\n100000000000000000000000000 2\n").unwrap_err();
    assert_eq!(
        error,
        ImportError::NumberTooLarge {
            field: "width",
            offset: 3,
            line: 2,
            written: "100000000000000000000000000".to_string(),
        }
    );
    let message = error.to_string();
    assert!(
        message.contains("width 100000000000000000000000000"),
        "{message}"
    );
    // The saturated value of a 64-bit integer must not appear in place of the number.
    assert!(!message.contains("18446744073709551615"), "{message}");
    // A height of many thousand digits is shown shortened, with its digit count.
    let mut long = b"P4 2 ".to_vec();
    long.extend(std::iter::repeat_n(b'7', 5000));
    long.push(b'\n');
    let message = mask_from_pbm(&long).unwrap_err().to_string();
    assert!(
        message.contains("height 77777777777777777777..."),
        "{message}"
    );
    assert!(message.contains("(5000 digits)"), "{message}");
}

#[test]
fn png_palette_index_beyond_the_palette_is_refused() {
    // PNG specification (W3C 2003), section 11.2.3: "It is an error if the index value of a
    // pixel exceeds the number of palette entries." Two entries (0 and 1); index 5 at column 2
    // of row 1.
    let palette = [0, 0, 0, 255, 255, 255];
    let indices = [0u8, 1, 0, 1, 0, 1, 5, 0];
    let bytes = encode_png(
        4,
        2,
        png::ColorType::Indexed,
        png::BitDepth::Eight,
        &indices,
        Some((&palette, None)),
    );
    let error = mask_from_png(&bytes).unwrap_err();
    assert_eq!(
        error,
        ImportError::PaletteIndex {
            index: 5,
            palette_entries: 2,
            column: 2,
            row: 1,
        }
    );
    let message = error.to_string();
    for words in [
        "palette index 5",
        "only 2 entries",
        "column 2, row 1",
        "11.2.3",
    ] {
        assert!(message.contains(words), "{message:?} lacks {words:?}");
    }
    // At 2 bits a pixel, most significant bits first (section 7.2): 0b10_01_00_11 packs the
    // indexes 2, 1, 0, 3; the palette has three entries, so the last pixel (column 3) is wrong.
    let palette = [0, 0, 0, 255, 255, 255, 10, 10, 10];
    let bytes = encode_png(
        4,
        1,
        png::ColorType::Indexed,
        png::BitDepth::Two,
        &[0b1001_0011],
        Some((&palette, None)),
    );
    assert_eq!(
        mask_from_png(&bytes).unwrap_err(),
        ImportError::PaletteIndex {
            index: 3,
            palette_entries: 3,
            column: 3,
            row: 0,
        }
    );
    // Within the palette the same 2-bit image reads: index 2 (dark grey) and 0 (black) are
    // allowed, 1 (white) is not.
    let bytes = encode_png(
        4,
        1,
        png::ColorType::Indexed,
        png::BitDepth::Two,
        &[0b1001_0010],
        Some((&palette, None)),
    );
    check_png(&bytes, 4, 1, &[true, false, true, true]);
}

/// Found by `fuzz_png`: a palette of 28 bytes (9 entries and one byte more) passed the reader
/// and panicked the `png` crate's own palette expansion. The PNG specification (W3C 2003),
/// section 11.2.3, makes a PLTE length that is not a multiple of 3 an error.
#[test]
fn png_palette_length_not_a_multiple_of_three_is_refused() {
    let mut palette = vec![0u8; 27];
    palette[3..6].copy_from_slice(&[255, 255, 255]);
    let mut bytes = encode_png(
        4,
        2,
        png::ColorType::Indexed,
        png::BitDepth::Two,
        &[0b0001_0000, 0b0100_0100],
        Some((&palette, None)),
    );
    // PLTE follows IHDR at byte 33 (8 signature + 25 IHDR); grow its length from 27 to 28 and
    // insert one data byte, then repair the CRCs so only the length is wrong.
    assert_eq!(&bytes[37..41], b"PLTE");
    bytes[33..37].copy_from_slice(&28u32.to_be_bytes());
    bytes.insert(41 + 27, 7);
    fix_crcs(&mut bytes);
    let error = mask_from_png(&bytes).unwrap_err();
    let message = error.to_string();
    assert!(
        matches!(&error, ImportError::PngChunk { chunk, offset: 33, .. } if chunk == "PLTE"),
        "{error:?}"
    );
    for words in ["PNG chunk PLTE at byte offset 33", "length 28", "11.2.3"] {
        assert!(message.contains(words), "{message:?} lacks {words:?}");
    }
}

#[test]
fn png_crc_error_names_chunk_and_offset() {
    // PNG specification (W3C 2003), section 5.3: each chunk is length (4 bytes), type (4),
    // data, CRC (4) over type and data. IHDR is the first chunk, right after the 8-byte
    // signature; byte 17 is inside its width.
    let mut bytes = small_png();
    bytes[17] ^= 0x40;
    let error = mask_from_png(&bytes).unwrap_err();
    let ImportError::PngChunk { chunk, offset, .. } = &error else {
        panic!("unexpected {error:?}");
    };
    assert_eq!((chunk.as_str(), *offset), ("IHDR", 8));
    let message = error.to_string();
    for words in [
        "PNG chunk IHDR at byte offset 8",
        "CRC mismatch",
        "byte offset 29",
    ] {
        assert!(message.contains(words), "{message:?} lacks {words:?}");
    }
    // No decoder structure (`ChunkType { type: .. }`) in the message.
    assert!(
        !message.contains('{') && !message.contains("ChunkType"),
        "{message}"
    );
    // A chunk cut short names itself: IHDR ends at byte 33, where the next chunk starts.
    let error = mask_from_png(&small_png()[..40]).unwrap_err();
    let message = error.to_string();
    assert!(message.contains("at byte offset 33"), "{message}");
    assert!(message.contains("truncated"), "{message}");
}

// ---------------------------------------------------------------------------------------------
// Fuzzing

/// Any result is fine but a panic; an `Ok` mask must be internally consistent.
fn check_no_nonsense(bytes: &[u8]) -> Result<(), TestCaseError> {
    if let Ok(grid) = mask_from_bytes(bytes) {
        let sum: u64 = grid.runs.iter().map(|&run| run as u64).sum();
        prop_assert_eq!(sum, grid.width as u64 * grid.height as u64);
        prop_assert!(grid.width >= 1 && grid.height >= 1);
        prop_assert!(grid.validate(grid.width, grid.height).is_ok());
    }
    Ok(())
}

/// An edit of a valid file: overwrite, insert, delete or cut.
#[derive(Clone, Debug)]
enum Edit {
    Set(usize, u8),
    Insert(usize, u8),
    Remove(usize),
    Truncate(usize),
}

fn edit_strategy() -> impl Strategy<Value = Edit> {
    prop_oneof![
        4 => (any::<usize>(), any::<u8>()).prop_map(|(at, byte)| Edit::Set(at, byte)),
        1 => (any::<usize>(), any::<u8>()).prop_map(|(at, byte)| Edit::Insert(at, byte)),
        1 => any::<usize>().prop_map(Edit::Remove),
        1 => any::<usize>().prop_map(Edit::Truncate),
    ]
}

fn apply(mut bytes: Vec<u8>, edits: &[Edit]) -> Vec<u8> {
    for edit in edits {
        let length = bytes.len();
        match *edit {
            Edit::Set(at, byte) if length > 0 => bytes[at % length] = byte,
            Edit::Insert(at, byte) => bytes.insert(at % (length + 1), byte),
            Edit::Remove(at) if length > 0 => {
                bytes.remove(at % length);
            }
            Edit::Truncate(at) => bytes.truncate(at % (length + 1)),
            _ => {}
        }
    }
    bytes
}

fn valid_files() -> Vec<Vec<u8>> {
    let grey: Vec<u8> = (0..30u8).map(|value| value.wrapping_mul(53)).collect();
    vec![
        J_PLAIN.as_bytes().to_vec(),
        J_PACKED.as_bytes().to_vec(),
        raw_pbm(
            6,
            10,
            &[0x08, 0x08, 0x08, 0x08, 0x08, 0x08, 0x88, 0x70, 0x00, 0x00],
        ),
        small_png(),
        encode_png(
            5,
            6,
            png::ColorType::Grayscale,
            png::BitDepth::Eight,
            &grey,
            None,
        ),
        encode_png(
            10,
            2,
            png::ColorType::Grayscale,
            png::BitDepth::One,
            &[0x60, 0x40, 0xff, 0x80],
            None,
        ),
    ]
}

proptest! {
    #[test]
    fn random_bytes_never_panic(bytes in proptest::collection::vec(any::<u8>(), 0..300)) {
        check_no_nonsense(&bytes)?;
    }

    #[test]
    fn random_bytes_behind_a_signature_never_panic(
        kind in 0usize..3,
        tail in proptest::collection::vec(any::<u8>(), 0..300),
    ) {
        let mut bytes = match kind {
            0 => b"P1".to_vec(),
            1 => b"P4".to_vec(),
            _ => vec![0x89, b'P', b'N', b'G', b'\r', b'\n', 0x1a, b'\n'],
        };
        bytes.extend_from_slice(&tail);
        check_no_nonsense(&bytes)?;
    }

    #[test]
    fn edited_valid_files_never_panic(
        which in 0usize..6,
        edits in proptest::collection::vec(edit_strategy(), 1..6),
        repair_crcs in any::<bool>(),
    ) {
        let original = valid_files().swap_remove(which);
        let mut bytes = apply(original, &edits);
        if repair_crcs {
            // Reach the PNG decoder's inner stages instead of stopping at a checksum.
            fix_crcs(&mut bytes);
        }
        check_no_nonsense(&bytes)?;
    }
}
