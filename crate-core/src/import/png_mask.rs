//! `mask_from_png`: reads a PNG image of any colour type and bit depth into a `MaskGrid`; dark,
//! opaque pixels are allowed cells.
//!
//! Before decoding, every chunk's length and CRC is checked (`check_chunks`), so a damaged file
//! is named by chunk and byte offset. Pixels are brought to 8 bits a channel (low bit depths
//! expanded, 16-bit samples cut to their high byte); palette images are expanded here, refusing
//! an index beyond the palette. A pixel is allowed when its luminance
//! `(299 R + 587 G + 114 B) / 1000` (integer division; grey images use the grey value) is below
//! 128 and, where the image has alpha (an alpha channel or a transparency chunk), its alpha is
//! at least 128.

use png::{BitDepth, ColorType, DecodingError, Transformations};

use super::{check_size, printable, ImportError, RunBuilder, PNG_SIGNATURE};
use crate::mask::MaskGrid;

/// The largest chunk length the PNG specification allows (section 5.3: 2^31 - 1).
const MAX_CHUNK_LENGTH: u32 = 0x7fff_ffff;

/// Reads a PNG image; dark, opaque pixels become allowed cells.
pub fn mask_from_png(bytes: &[u8]) -> Result<MaskGrid, ImportError> {
    if !bytes.starts_with(&PNG_SIGNATURE) {
        return Err(ImportError::Png {
            message: "the data does not start with the PNG signature".to_string(),
        });
    }
    check_chunks(bytes)?;
    let mut decoder = png::Decoder::new(bytes);
    // Text chunks are not needed and could be large.
    decoder.set_ignore_text_chunk(true);
    let (width, height, colour_type, bit_depth) = {
        let info = decoder.read_header_info().map_err(png_error)?;
        (info.width, info.height, info.color_type, info.bit_depth)
    };
    // The decoder's own palette expansion reads an index beyond the palette as opaque black, so
    // palette images come out as indexes and are expanded by `indexed_pixels`.
    decoder.set_transformations(if colour_type == ColorType::Indexed {
        Transformations::IDENTITY
    } else {
        Transformations::EXPAND | Transformations::STRIP_16
    });
    // Guard before the decoder or this function allocates anything the size of the image.
    let (width, height) = check_size("PNG", u64::from(width), u64::from(height))?;
    // Deflate expands at most 1032-fold, so a file much smaller than its pixels is cut short;
    // say so before allocating the image.
    let raw_bytes = u64::from(height)
        * (1 + (u64::from(width) * colour_type.samples() as u64 * u64::from(bit_depth as u8))
            .div_ceil(8));
    if raw_bytes > 1100 * bytes.len() as u64 + 4096 {
        return Err(ImportError::Png {
            message: format!(
                "the file ({} bytes) is too short to hold a {width} x {height} image (truncated?)",
                bytes.len()
            ),
        });
    }
    let mut reader = decoder.read_info().map_err(png_error)?;
    if colour_type == ColorType::Indexed {
        return indexed_pixels(&mut reader, width, height);
    }
    let (colour, depth) = reader.output_color_type();
    if depth != BitDepth::Eight {
        return Err(ImportError::Png {
            message: format!("unexpected decoded bit depth {depth:?} after expansion"),
        });
    }
    let channels = match colour {
        ColorType::Grayscale => 1,
        ColorType::GrayscaleAlpha => 2,
        ColorType::Rgb => 3,
        ColorType::Rgba => 4,
        ColorType::Indexed => {
            return Err(ImportError::Png {
                message: "the palette was not expanded to colours".to_string(),
            })
        }
    };
    let mut buffer = vec![0u8; reader.output_buffer_size()];
    let frame = reader.next_frame(&mut buffer).map_err(png_error)?;
    let line_size = frame.line_size;
    let needed = line_size.saturating_mul(height as usize);
    if line_size < channels * width as usize || buffer.len() < needed {
        return Err(ImportError::Png {
            message: "the decoded image is smaller than its header says".to_string(),
        });
    }
    let mut builder = RunBuilder::new();
    for row in buffer.chunks(line_size).take(height as usize) {
        for pixel in row.chunks(channels).take(width as usize) {
            builder.push(pixel_allowed(pixel));
        }
    }
    Ok(builder.finish(width, height))
}

/// Decodes a palette image as indexes and expands each through the palette (PLTE) and its
/// alpha values (tRNS), refusing an index the palette does not have.
fn indexed_pixels(
    reader: &mut png::Reader<&[u8]>,
    width: u32,
    height: u32,
) -> Result<MaskGrid, ImportError> {
    let (palette, transparency) = {
        let info = reader.info();
        let palette = info.palette.as_deref().unwrap_or(&[]).to_vec();
        (palette, info.trns.as_deref().unwrap_or(&[]).to_vec())
    };
    let entries = palette.len() / 3;
    if entries == 0 {
        return Err(ImportError::Png {
            message: "a palette image (colour type 3) without a PLTE chunk".to_string(),
        });
    }
    // Alpha per entry; entries beyond tRNS are opaque (PNG specification, section 11.3.2.1).
    // A tRNS longer than the palette is ignored, as the decoder did before.
    let transparency = if transparency.len() <= entries {
        transparency
    } else {
        Vec::new()
    };
    let alphas: Vec<u8> = (0..entries)
        .map(|entry| transparency.get(entry).copied().unwrap_or(255))
        .collect();
    let (_, depth) = reader.output_color_type();
    let bits = depth as u8 as usize;
    if !matches!(bits, 1 | 2 | 4 | 8) {
        return Err(ImportError::Png {
            message: format!("a palette image with a bit depth of {bits}"),
        });
    }
    let mut buffer = vec![0u8; reader.output_buffer_size()];
    let frame = reader.next_frame(&mut buffer).map_err(png_error)?;
    let line_size = frame.line_size;
    let row_bits = width as usize * bits;
    let needed = line_size.saturating_mul(height as usize);
    if line_size * 8 < row_bits || buffer.len() < needed {
        return Err(ImportError::Png {
            message: "the decoded image is smaller than its header says".to_string(),
        });
    }
    let mask = (1u16 << bits) - 1;
    let mut builder = RunBuilder::new();
    for (row_number, row) in buffer.chunks(line_size).take(height as usize).enumerate() {
        for column in 0..width as usize {
            let bit = column * bits;
            let shift = 8 - bits - bit % 8;
            let index = (u16::from(row[bit / 8]) >> shift) & mask;
            let entry = index as usize;
            if entry >= entries {
                return Err(ImportError::PaletteIndex {
                    index: index as u8,
                    palette_entries: entries,
                    column: column as u32,
                    row: row_number as u32,
                });
            }
            let colour = &palette[3 * entry..3 * entry + 3];
            builder.push(pixel_allowed(&[
                colour[0],
                colour[1],
                colour[2],
                alphas[entry],
            ]));
        }
    }
    Ok(builder.finish(width, height))
}

/// Walks the chunks from the signature to `IEND` (or the end of the data), checking that each
/// fits in the data, has a length the specification allows and matches its CRC (PNG
/// specification, W3C 2003, section 5.3); the first failure names the chunk and its byte
/// offset.
pub(crate) fn check_chunks(bytes: &[u8]) -> Result<(), ImportError> {
    let mut offset = PNG_SIGNATURE.len();
    while offset < bytes.len() {
        let chunk_name = |bytes: &[u8]| match bytes.get(offset + 4..offset + 8) {
            Some(name) => printable(name),
            None => "(unnamed)".to_string(),
        };
        let Some(header) = bytes.get(offset..offset + 8) else {
            return Err(ImportError::PngChunk {
                chunk: chunk_name(bytes),
                offset,
                problem: format!(
                    "the data ends at byte offset {} inside the chunk's 8-byte header \
                     (truncated file)",
                    bytes.len()
                ),
            });
        };
        let length = u32::from_be_bytes([header[0], header[1], header[2], header[3]]);
        let name = printable(&header[4..8]);
        if length > MAX_CHUNK_LENGTH {
            return Err(ImportError::PngChunk {
                chunk: name,
                offset,
                problem: format!(
                    "its length {length} exceeds the largest the PNG specification allows \
                     ({MAX_CHUNK_LENGTH})"
                ),
            });
        }
        // Checked sums: a 32-bit `usize` (wasm32) could otherwise wrap past the data's end.
        let data_end = (offset + 8).checked_add(length as usize);
        let crc_end = data_end.and_then(|end| end.checked_add(4));
        let (Some(data_end), Some(stored)) =
            (data_end, crc_end.and_then(|end| bytes.get(end - 4..end)))
        else {
            return Err(ImportError::PngChunk {
                chunk: name,
                offset,
                problem: format!(
                    "it declares {length} data bytes and a 4-byte CRC, ending at byte offset \
                     {}, but the data ends at byte offset {} (truncated file)",
                    u64::from(length) + offset as u64 + 12,
                    bytes.len()
                ),
            });
        };
        let stored = u32::from_be_bytes([stored[0], stored[1], stored[2], stored[3]]);
        let computed = crc32fast::hash(&bytes[offset + 4..data_end]);
        if stored != computed {
            return Err(ImportError::PngChunk {
                chunk: name,
                offset,
                problem: format!(
                    "CRC mismatch: the chunk stores 0x{stored:08x} (at byte offset {data_end}) \
                     but its type and data give 0x{computed:08x}; the file is damaged"
                ),
            });
        }
        // Section 11.2.3: 1 to 256 entries of 3 bytes. (The decoder's palette expansion
        // panics on a length that is not a multiple of 3; this reader never reaches it.)
        if &header[4..8] == b"PLTE" && (length % 3 != 0 || !(3..=768).contains(&length)) {
            return Err(ImportError::PngChunk {
                chunk: name,
                offset,
                problem: format!(
                    "its length {length} is not 3 bytes for each of 1 to 256 palette entries \
                     (PNG specification, section 11.2.3)"
                ),
            });
        }
        if &header[4..8] == b"IEND" {
            break;
        }
        offset = data_end + 4;
    }
    Ok(())
}

/// Whether one 8-bit pixel (grey, grey+alpha, RGB or RGBA) is dark and opaque.
fn pixel_allowed(pixel: &[u8]) -> bool {
    let (luminance, alpha) = match *pixel {
        [grey] => (u32::from(grey), 255),
        [grey, alpha] => (u32::from(grey), alpha),
        [red, green, blue] => (luminance(red, green, blue), 255),
        [red, green, blue, alpha] => (luminance(red, green, blue), alpha),
        _ => (255, 0),
    };
    luminance < 128 && alpha >= 128
}

/// Integer luma with the ITU-R BT.601 weights, on 0..=255.
fn luminance(red: u8, green: u8, blue: u8) -> u32 {
    (299 * u32::from(red) + 587 * u32::from(green) + 114 * u32::from(blue)) / 1000
}

/// Puts a decoder error into words.
pub(crate) fn png_error(error: DecodingError) -> ImportError {
    let message = match error {
        DecodingError::IoError(error) if error.kind() == std::io::ErrorKind::UnexpectedEof => {
            "the data ends before the image does (truncated file)".to_string()
        }
        DecodingError::IoError(error) => format!("read error: {error}"),
        DecodingError::Format(error) => {
            format!("malformed file: {}", plain_chunk_names(&error.to_string()))
        }
        DecodingError::Parameter(error) => format!("decoder misuse: {error}"),
        DecodingError::LimitsExceeded => {
            "the image needs more memory than the decoder allows".to_string()
        }
    };
    ImportError::Png { message }
}

/// The decoder writes chunk types as a structure
/// (`ChunkType { type: PLTE, critical: true, ... }`); people read the four letters.
fn plain_chunk_names(text: &str) -> String {
    const START: &str = "ChunkType { type: ";
    let mut plain = String::new();
    let mut rest = text;
    while let Some(at) = rest.find(START) {
        plain.push_str(&rest[..at]);
        let after = &rest[at + START.len()..];
        let name_end = after.find(',').unwrap_or(after.len());
        plain.push_str(&after[..name_end]);
        rest = match after.find('}') {
            Some(close) => &after[close + 1..],
            None => "",
        };
    }
    plain.push_str(rest);
    plain
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn luminance_threshold() {
        assert!(pixel_allowed(&[127]));
        assert!(!pixel_allowed(&[128]));
        assert!(!pixel_allowed(&[0, 127]));
        assert!(pixel_allowed(&[0, 128]));
        // 299 * 0 + 587 * 218 + 114 * 0 = 127966 -> 127.
        assert!(pixel_allowed(&[0, 218, 0]));
        assert!(!pixel_allowed(&[0, 219, 0]));
    }

    #[test]
    fn not_png() {
        assert!(mask_from_png(b"P1 1 1 1").is_err());
        let mut truncated = PNG_SIGNATURE.to_vec();
        truncated.extend_from_slice(&[0, 0, 0, 13, b'I', b'H']);
        let error = mask_from_png(&truncated).unwrap_err();
        assert!(error.to_string().starts_with("PNG"), "{error}");
    }

    #[test]
    fn chunk_structures_become_names() {
        let text = "Chunk ChunkType { type: tRNS, critical: false, private: false, \
                    reserved: false, safecopy: false } must appear at most once.";
        assert_eq!(
            plain_chunk_names(text),
            "Chunk tRNS must appear at most once."
        );
        assert_eq!(plain_chunk_names("no chunk here"), "no chunk here");
    }
}
