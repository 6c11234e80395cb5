//! `mask_from_png`: reads a PNG image of any colour type and bit depth into a `MaskGrid`; dark,
//! opaque pixels are allowed cells.
//!
//! Pixels are brought to 8 bits a channel (palettes and low bit depths expanded, 16-bit samples
//! cut to their high byte). A pixel is allowed when its luminance
//! `(299 R + 587 G + 114 B) / 1000` (integer division; grey images use the grey value) is below
//! 128 and, where the image has alpha (an alpha channel or a transparency chunk), its alpha is
//! at least 128.

use png::{BitDepth, ColorType, DecodingError, Transformations};

use super::{check_size, ImportError, RunBuilder, PNG_SIGNATURE};
use crate::mask::MaskGrid;

/// Reads a PNG image; dark, opaque pixels become allowed cells.
pub fn mask_from_png(bytes: &[u8]) -> Result<MaskGrid, ImportError> {
    if !bytes.starts_with(&PNG_SIGNATURE) {
        return Err(ImportError::Png {
            message: "the data does not start with the PNG signature".to_string(),
        });
    }
    let mut decoder = png::Decoder::new(bytes);
    decoder.set_transformations(Transformations::EXPAND | Transformations::STRIP_16);
    // Text chunks are not needed and could be large.
    decoder.set_ignore_text_chunk(true);
    let (width, height, colour_type, bit_depth) = {
        let info = decoder.read_header_info().map_err(png_error)?;
        (info.width, info.height, info.color_type, info.bit_depth)
    };
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
fn png_error(error: DecodingError) -> ImportError {
    let message = match error {
        DecodingError::IoError(error) if error.kind() == std::io::ErrorKind::UnexpectedEof => {
            "the data ends before the image does (truncated file)".to_string()
        }
        DecodingError::IoError(error) => format!("read error: {error}"),
        DecodingError::Format(error) => format!("malformed file: {error}"),
        DecodingError::Parameter(error) => format!("decoder misuse: {error}"),
        DecodingError::LimitsExceeded => {
            "the image needs more memory than the decoder allows".to_string()
        }
    };
    ImportError::Png { message }
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
        assert!(error.to_string().starts_with("PNG: "), "{error}");
    }
}
