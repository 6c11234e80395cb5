//! Decoding PNG and JPEG bytes into a `GreyImage` (`decode_image`, told apart by their
//! signatures), with the size checked from the header before any pixel buffer is allocated.
//! Only with the feature `image-decode` (the command line and the tests; the page decodes
//! with the browser).
//!
//! PNG goes through the `png` crate after the chunk walk of the mask reader (lengths and CRCs,
//! palette length), palette images expanded here; JPEG through `zune-jpeg`, asked for grey
//! (its luma). Colour becomes grey by BT.709 luma (`super::luma`); transparent pixels are laid
//! over white, as a scan's background. A PNG `pHYs` chunk in metres, or a JPEG's JFIF density
//! in dots per inch or per centimetre, gives `millimetres_per_pixel`.

use png::{BitDepth, ColorType, Transformations};
use zune_jpeg::zune_core::bytestream::ZCursor;
use zune_jpeg::zune_core::colorspace::ColorSpace;
use zune_jpeg::zune_core::options::DecoderOptions;

use super::{check_image_size, luma, ClearedError, GreyImage, MAX_IMAGE_SIDE};
use crate::import::png_mask::{check_chunks, png_error};
use crate::specimen::printable_start;

/// The eight bytes every PNG file starts with (PNG specification, section 5.2).
pub const PNG_SIGNATURE: [u8; 8] = [0x89, b'P', b'N', b'G', b'\r', b'\n', 0x1a, b'\n'];

/// The start-of-image marker every JPEG file starts with (ITU-T T.81, B.1.1.3).
pub const JPEG_SIGNATURE: [u8; 3] = [0xff, 0xd8, 0xff];

/// Whether the bytes start like a PNG or JPEG image.
pub fn is_image(bytes: &[u8]) -> bool {
    bytes.starts_with(&PNG_SIGNATURE) || bytes.starts_with(&JPEG_SIGNATURE)
}

/// Decodes PNG or JPEG bytes into grey pixels.
pub fn decode_image(bytes: &[u8]) -> Result<GreyImage, ClearedError> {
    if bytes.starts_with(&PNG_SIGNATURE) {
        decode_png(bytes)
    } else if bytes.starts_with(&JPEG_SIGNATURE) {
        decode_jpeg(bytes)
    } else {
        Err(ClearedError::NotAnImage {
            start: printable_start(bytes),
        })
    }
}

fn png_problem(message: String) -> ClearedError {
    ClearedError::Decode {
        format: "PNG",
        problem: message,
    }
}

fn from_import(error: crate::import::ImportError) -> ClearedError {
    png_problem(error.to_string())
}

/// Lays a grey level with alpha over white.
fn over_white(grey: u8, alpha: u8) -> u8 {
    let (g, a) = (u32::from(grey), u32::from(alpha));
    ((g * a + 255 * (255 - a) + 127) / 255) as u8
}

fn decode_png(bytes: &[u8]) -> Result<GreyImage, ClearedError> {
    check_chunks(bytes).map_err(from_import)?;
    let mut decoder = png::Decoder::new(bytes);
    decoder.set_ignore_text_chunk(true);
    let (width, height, colour_type, bit_depth) = {
        let info = decoder
            .read_header_info()
            .map_err(|error| from_import(png_error(error)))?;
        (info.width, info.height, info.color_type, info.bit_depth)
    };
    // Before anything the size of the image is allocated.
    check_image_size(width, height)?;
    let raw_bytes = u64::from(height)
        * (1 + (u64::from(width) * colour_type.samples() as u64 * u64::from(bit_depth as u8))
            .div_ceil(8));
    // Deflate expands at most 1032-fold (zlib's technical details).
    if raw_bytes > 1100 * bytes.len() as u64 + 4096 {
        return Err(png_problem(format!(
            "the file ({} bytes) is too short to hold a {width} x {height} image (truncated?)",
            bytes.len()
        )));
    }
    decoder.set_transformations(if colour_type == ColorType::Indexed {
        Transformations::IDENTITY
    } else {
        Transformations::EXPAND | Transformations::STRIP_16
    });
    let mut reader = decoder
        .read_info()
        .map_err(|error| from_import(png_error(error)))?;
    let millimetres_per_pixel = reader.info().pixel_dims.and_then(|dims| {
        (dims.unit == png::Unit::Meter && dims.xppu > 0).then(|| 1000.0 / f64::from(dims.xppu))
    });
    let palette: Vec<[u8; 4]> = {
        let info = reader.info();
        let colours = info.palette.as_deref().unwrap_or(&[]);
        let alphas = info.trns.as_deref().unwrap_or(&[]);
        colours
            .chunks_exact(3)
            .enumerate()
            .map(|(entry, c)| [c[0], c[1], c[2], alphas.get(entry).copied().unwrap_or(255)])
            .collect()
    };
    let (colour, depth) = reader.output_color_type();
    let mut buffer = vec![0u8; reader.output_buffer_size()];
    let frame = reader
        .next_frame(&mut buffer)
        .map_err(|error| from_import(png_error(error)))?;
    let line_size = frame.line_size;
    let (w, h) = (width as usize, height as usize);
    if buffer.len() < line_size.saturating_mul(h) {
        return Err(png_problem(
            "the decoded image is smaller than its header says".to_string(),
        ));
    }
    let mut pixels = Vec::with_capacity(w * h);
    if colour == ColorType::Indexed {
        if palette.is_empty() {
            return Err(png_problem(
                "a palette image (colour type 3) without a PLTE chunk".to_string(),
            ));
        }
        let bits = depth as u8 as usize;
        if !matches!(bits, 1 | 2 | 4 | 8) || line_size * 8 < w * bits {
            return Err(png_problem(format!(
                "a palette image with a bit depth of {bits}"
            )));
        }
        let mask = (1u16 << bits) - 1;
        for (row_number, row) in buffer.chunks(line_size).take(h).enumerate() {
            for column in 0..w {
                let bit = column * bits;
                let index = ((u16::from(row[bit / 8]) >> (8 - bits - bit % 8)) & mask) as usize;
                let Some(&[r, g, b, a]) = palette.get(index) else {
                    return Err(png_problem(format!(
                        "the pixel at column {column}, row {row_number} uses palette index \
                         {index}, but the palette has {} entries",
                        palette.len()
                    )));
                };
                pixels.push(over_white(luma(r, g, b), a));
            }
        }
    } else {
        if depth != BitDepth::Eight {
            return Err(png_problem(format!(
                "unexpected decoded bit depth {depth:?} after expansion"
            )));
        }
        let channels = colour.samples();
        if line_size < channels * w {
            return Err(png_problem(
                "the decoded rows are shorter than the header says".to_string(),
            ));
        }
        for row in buffer.chunks(line_size).take(h) {
            for p in row.chunks(channels).take(w) {
                pixels.push(match *p {
                    [g] => g,
                    [g, a] => over_white(g, a),
                    [r, g, b] => luma(r, g, b),
                    [r, g, b, a] => over_white(luma(r, g, b), a),
                    _ => 255,
                });
            }
        }
    }
    let mut image = GreyImage::new(width, height, pixels)?;
    image.millimetres_per_pixel = millimetres_per_pixel;
    Ok(image)
}

fn decode_jpeg(bytes: &[u8]) -> Result<GreyImage, ClearedError> {
    let jpeg_problem = |problem: String| ClearedError::Decode {
        format: "JPEG",
        problem,
    };
    let options = DecoderOptions::default()
        .set_max_width(MAX_IMAGE_SIDE as usize)
        .set_max_height(MAX_IMAGE_SIDE as usize)
        .jpeg_set_out_colorspace(ColorSpace::Luma);
    let mut decoder = zune_jpeg::JpegDecoder::new_with_options(ZCursor::new(bytes), options);
    decoder
        .decode_headers()
        .map_err(|error| jpeg_problem(format!("{error:?}")))?;
    let (width, height) = decoder
        .dimensions()
        .ok_or_else(|| jpeg_problem("the header gives no size".to_string()))?;
    let (width, height) = (
        u32::try_from(width).unwrap_or(u32::MAX),
        u32::try_from(height).unwrap_or(u32::MAX),
    );
    // Before anything the size of the image is allocated.
    check_image_size(width, height)?;
    // Even a very compressed JPEG needs some bytes per 8 x 8 block of each component; a file
    // far smaller than its blocks is cut short (common practice, no source: a flat grey block
    // costs at least 2 bits).
    let blocks = u64::from(width).div_ceil(8) * u64::from(height).div_ceil(8);
    if blocks > 8 * bytes.len() as u64 + 4096 {
        return Err(jpeg_problem(format!(
            "the file ({} bytes) is too short to hold a {width} x {height} image (truncated?)",
            bytes.len()
        )));
    }
    let millimetres_per_pixel = decoder.info().and_then(|info| {
        let density = f64::from(info.x_density);
        match info.pixel_density {
            1 if density > 0.0 => Some(25.4 / density),
            2 if density > 0.0 => Some(10.0 / density),
            _ => None,
        }
    });
    let pixels = decoder
        .decode()
        .map_err(|error| jpeg_problem(format!("{error:?}")))?;
    let expected = width as usize * height as usize;
    let pixels = match pixels.len() {
        n if n == expected => pixels,
        n if n == expected * 3 => pixels
            .chunks_exact(3)
            .map(|p| luma(p[0], p[1], p[2]))
            .collect(),
        n => {
            return Err(jpeg_problem(format!(
                "the decoder gave {n} values for a {width} x {height} image"
            )))
        }
    };
    let mut image = GreyImage::new(width, height, pixels)?;
    image.millimetres_per_pixel = millimetres_per_pixel;
    Ok(image)
}
