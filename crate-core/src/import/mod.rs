//! Mask importers: `mask_from_bytes` (format sniffing), `mask_from_pbm` (Netpbm P1 and P4),
//! `mask_from_png`, and their error type `ImportError`. Callers pass bytes; nothing here reads
//! files.
//!
//! In every format a dark pixel is an allowed cell and a light one a blocked cell, and rows run
//! from the top of the image down, as in `MaskGrid`.

mod pbm;
pub(crate) mod png_mask;

pub use pbm::mask_from_pbm;
pub use png_mask::mask_from_png;

use crate::mask::MaskGrid;

/// The eight bytes every PNG file starts with.
pub(crate) const PNG_SIGNATURE: [u8; 8] = [0x89, b'P', b'N', b'G', b'\r', b'\n', 0x1a, b'\n'];

/// Formats this module reads, for error messages.
const ACCEPTED: &str = "PBM (plain P1 or raw P4) or PNG";

/// Why bytes could not be read as a mask.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum ImportError {
    /// The bytes begin with no signature of an accepted format.
    UnknownFormat {
        /// The first bytes, shown printable (non-ASCII bytes as `\xNN`).
        start: String,
        /// A hint when the start names a related format that is not read (e.g. a greyscale PGM).
        hint: Option<String>,
    },
    /// A PBM header field (width or height) is missing, not a decimal number, or too long.
    BadHeader {
        /// Which field: `width`, `height` or `raster separator`.
        field: &'static str,
        /// Byte offset from the start of the file.
        offset: usize,
        /// Line number, counted from 1.
        line: usize,
        /// What was found there, shown printable.
        found: String,
    },
    /// The declared image has no cells or more than `limits::MAX_CELLS`.
    BadSize {
        /// The format whose header declared the size (`PBM` or `PNG`).
        format: &'static str,
        /// Declared width in pixels.
        width: u64,
        /// Declared height in pixels.
        height: u64,
    },
    /// A plain (P1) raster holds a character other than `0`, `1`, whitespace or a comment.
    BadDigit {
        /// Byte offset from the start of the file.
        offset: usize,
        /// Line number, counted from 1.
        line: usize,
        /// The offending character, shown printable.
        found: String,
    },
    /// The data ends before the raster is complete.
    Truncated {
        /// The format being read (`PBM P1`, `PBM P4`).
        format: &'static str,
        /// Byte offset where the data ends (the file length).
        offset: usize,
        /// How many pixels (P1) or bytes (P4) the raster needed.
        expected: u64,
        /// How many it had.
        found: u64,
        /// Whether `expected` and `found` count pixels (`true`) or bytes (`false`).
        pixels: bool,
    },
    /// A PBM header number (width or height) is larger than any image this program reads.
    NumberTooLarge {
        /// Which field: `width` or `height`.
        field: &'static str,
        /// Byte offset of its first digit.
        offset: usize,
        /// Line number, counted from 1.
        line: usize,
        /// The number as written in the file (shortened when very long).
        written: String,
    },
    /// A P4 (raw) image has a maxval line between its height and its raster; PBM has none
    /// (that line belongs to PGM and PPM).
    MaxvalLine {
        /// Byte offset where the raster was expected to start.
        offset: usize,
        /// Line number of that byte, counted from 1.
        line: usize,
        /// The line found there, shown printable.
        found: String,
    },
    /// Data follows the last pixel of the image where the format allows none.
    ExtraData {
        /// The format being read (`PBM P1`, `PBM P4`).
        format: &'static str,
        /// Byte offset of the first extra byte.
        offset: usize,
        /// Line number of that byte, counted from 1.
        line: usize,
        /// What was found there, shown printable.
        found: String,
    },
    /// A PNG chunk is cut short, too long, or fails its CRC check.
    PngChunk {
        /// The chunk's four-letter type (`IHDR`, `IDAT`, ...), shown printable.
        chunk: String,
        /// Byte offset of the chunk's start (its length field).
        offset: usize,
        /// What is wrong, in words.
        problem: String,
    },
    /// A palette image uses an index its palette does not have (an error by the PNG
    /// specification, W3C 2003, section 11.2.3).
    PaletteIndex {
        /// The index found.
        index: u8,
        /// How many entries the palette (PLTE chunk) holds.
        palette_entries: usize,
        /// Column of the first such pixel, from 0 at the left.
        column: u32,
        /// Row of the first such pixel, from 0 at the top.
        row: u32,
    },
    /// The PNG decoder rejected the data.
    Png {
        /// The decoder's complaint, in words.
        message: String,
    },
}

impl std::fmt::Display for ImportError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            ImportError::UnknownFormat { start, hint } => {
                write!(f, "unrecognised image format (the data starts with \"{start}\")")?;
                if let Some(hint) = hint {
                    write!(f, "; {hint}")?;
                }
                write!(f, "; accepted formats are {ACCEPTED}")
            }
            ImportError::BadHeader { field, offset, line, found } => write!(
                f,
                "PBM header, line {line} (byte offset {offset}): expected the {field}, found {found}"
            ),
            ImportError::BadSize { format, width, height } => write!(
                f,
                "{format} header: image size {width} x {height} pixels is not allowed; a mask \
                 needs at least 1 and at most {} cells",
                crate::limits::MAX_CELLS
            ),
            ImportError::BadDigit { offset, line, found } => write!(
                f,
                "PBM P1 raster, line {line} (byte offset {offset}): found {found} where only \
                 0, 1, whitespace or a # comment may stand"
            ),
            ImportError::Truncated { format, offset, expected, found, pixels } => {
                let what = if *pixels { "pixels" } else { "bytes" };
                write!(
                    f,
                    "{format} raster is truncated: the data ends at byte offset {offset} after \
                     {found} of {expected} {what}"
                )
            }
            ImportError::NumberTooLarge { field, offset, line, written } => write!(
                f,
                "PBM header, line {line} (byte offset {offset}): the {field} {written} is too \
                 large; a mask needs at most {} cells",
                crate::limits::MAX_CELLS
            ),
            ImportError::MaxvalLine { offset, line, found } => write!(
                f,
                "PBM P4 header, line {line} (byte offset {offset}): found {found} where the \
                 raster was expected; this looks like a maxval line, which PBM does not have \
                 (only PGM and PPM do): remove that line"
            ),
            ImportError::ExtraData { format, offset, line, found } => write!(
                f,
                "{format}, line {line} (byte offset {offset}): found {found} after the last \
                 pixel of the image, where only the end of the data or another image (starting \
                 with P) may follow"
            ),
            ImportError::PngChunk { chunk, offset, problem } => {
                write!(f, "PNG chunk {chunk} at byte offset {offset}: {problem}")
            }
            ImportError::PaletteIndex { index, palette_entries, column, row } => write!(
                f,
                "PNG image data: the pixel at column {column}, row {row} (from 0 at the top \
                 left) uses palette index {index}, but the palette (PLTE chunk) has only \
                 {palette_entries} entries (indexes 0 to {}); the PNG specification (section \
                 11.2.3) makes an index beyond the palette an error",
                palette_entries.saturating_sub(1)
            ),
            ImportError::Png { message } => write!(f, "PNG: {message}"),
        }
    }
}

impl std::error::Error for ImportError {}

/// Reads a mask from PBM (P1 or P4) or PNG bytes, chosen by the file's signature.
pub fn mask_from_bytes(bytes: &[u8]) -> Result<MaskGrid, ImportError> {
    if bytes.starts_with(b"P1") || bytes.starts_with(b"P4") {
        return mask_from_pbm(bytes);
    }
    if bytes.starts_with(&PNG_SIGNATURE) {
        return mask_from_png(bytes);
    }
    Err(unknown_format(bytes))
}

/// The `UnknownFormat` error for `bytes`, with a hint for the other Netpbm kinds.
pub(crate) fn unknown_format(bytes: &[u8]) -> ImportError {
    let hint = match bytes {
        [b'P', b'2' | b'5', ..] => Some("this is a greyscale PGM; save it as a bitmap (PBM)"),
        [b'P', b'3' | b'6', ..] => Some("this is a colour PPM; save it as a bitmap (PBM) or PNG"),
        [b'P', b'7', ..] => Some("this is a PAM; save it as a bitmap (PBM) or PNG"),
        [] => Some("the data is empty"),
        _ => None,
    };
    ImportError::UnknownFormat {
        start: printable(&bytes[..bytes.len().min(8)]),
        hint: hint.map(str::to_string),
    }
}

/// Shows bytes as ASCII text, escaping everything else as `\xNN`.
pub(crate) fn printable(bytes: &[u8]) -> String {
    let mut text = String::new();
    for &byte in bytes {
        match byte {
            b'\n' => text.push_str("\\n"),
            b'\r' => text.push_str("\\r"),
            b'\t' => text.push_str("\\t"),
            b'"' => text.push_str("\\\""),
            b'\\' => text.push_str("\\\\"),
            0x20..=0x7e => text.push(byte as char),
            _ => text.push_str(&format!("\\x{byte:02x}")),
        }
    }
    text
}

/// Builds run lengths pixel by pixel, without a full boolean image.
///
/// Gives the same runs as `MaskGrid::from_bits` on the same pixels.
pub(crate) struct RunBuilder {
    runs: Vec<u32>,
    current: bool,
    length: u32,
}

impl RunBuilder {
    /// An empty builder.
    pub(crate) fn new() -> RunBuilder {
        RunBuilder {
            runs: Vec::new(),
            current: false,
            length: 0,
        }
    }

    /// Appends one pixel (`true` = allowed).
    pub(crate) fn push(&mut self, allowed: bool) {
        if allowed == self.current {
            // Sizes are checked against MAX_CELLS (< u32::MAX) before any pixel is pushed.
            self.length = self.length.saturating_add(1);
        } else {
            self.runs.push(self.length);
            self.current = allowed;
            self.length = 1;
        }
    }

    /// The finished mask.
    pub(crate) fn finish(mut self, width: u32, height: u32) -> MaskGrid {
        self.runs.push(self.length);
        MaskGrid {
            width,
            height,
            runs: self.runs,
        }
    }
}

/// Checks a declared size against `MAX_CELLS`, returning it as `u32`s.
pub(crate) fn check_size(
    format: &'static str,
    width: u64,
    height: u64,
) -> Result<(u32, u32), ImportError> {
    let cells = width.checked_mul(height);
    let fits = matches!(cells, Some(cells) if (1..=crate::limits::MAX_CELLS).contains(&cells));
    match (fits, u32::try_from(width), u32::try_from(height)) {
        (true, Ok(width), Ok(height)) => Ok((width, height)),
        _ => Err(ImportError::BadSize {
            format,
            width,
            height,
        }),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn run_builder_matches_from_bits() {
        let bits = [true, true, false, true, false, false, false, true];
        let mut builder = RunBuilder::new();
        for &bit in &bits {
            builder.push(bit);
        }
        assert_eq!(builder.finish(4, 2), MaskGrid::from_bits(4, 2, &bits));
    }

    #[test]
    fn unknown_format_names_the_accepted_ones() {
        let error = mask_from_bytes(b"GIF89a....").unwrap_err();
        let text = error.to_string();
        assert!(text.contains("GIF89a"), "{text}");
        assert!(text.contains("PBM") && text.contains("PNG"), "{text}");
        let error = mask_from_bytes(b"P5\n2 2\n255\n....").unwrap_err();
        assert!(error.to_string().contains("PGM"), "{error}");
    }

    #[test]
    fn sizes_are_bounded() {
        assert!(check_size("PBM", 0, 5).is_err());
        assert!(check_size("PBM", 5000, 5001).is_err());
        assert!(check_size("PBM", u64::MAX, u64::MAX).is_err());
        assert_eq!(check_size("PBM", 5000, 5000).unwrap(), (5000, 5000));
    }
}
