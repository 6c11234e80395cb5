//! `mask_from_pbm`: reads a Netpbm bitmap (plain P1 or raw P4) into a `MaskGrid`; black
//! pixels (1) are allowed cells.
//!
//! Header: the magic number, then width and height as decimal numbers separated by whitespace,
//! with `#` comments (through the end of the line) allowed between the fields. P1 rasters are
//! `0`/`1` characters in which whitespace and comments are skipped, so digits may be packed
//! without spaces. P4 rasters follow exactly one whitespace character after the height and pack
//! 8 pixels a byte, most significant bit first, each row padded to a whole byte (padding bits
//! are ignored). PBM has no maxval line (Netpbm PBM format specification), so a P4 header
//! followed by one (`P4 8 2 1` and a line end, as a PGM would have) is refused by name rather
//! than read as pixels. After the last pixel only whitespace and comments (P1) may follow
//! before the data ends or a next image starts (`P`), whose bytes are ignored: a file may hold
//! several images and the first is read.

use super::{check_size, printable, unknown_format, ImportError, RunBuilder};
use crate::mask::MaskGrid;

/// Reads a PBM file (P1 or P4); black (1) pixels become allowed cells.
pub fn mask_from_pbm(bytes: &[u8]) -> Result<MaskGrid, ImportError> {
    let raw = match bytes {
        [b'P', b'1', ..] => false,
        [b'P', b'4', ..] => true,
        _ => return Err(unknown_format(bytes)),
    };
    let mut reader = Reader { bytes, position: 2 };
    match reader.peek() {
        Some(byte) if is_whitespace(byte) || byte == b'#' => {}
        _ => return Err(reader.bad_header("whitespace after the magic number")),
    }
    reader.skip_separators();
    let width = reader.number("width")?;
    match reader.peek() {
        Some(byte) if is_whitespace(byte) || byte == b'#' => {}
        _ => return Err(reader.bad_header("whitespace after the width")),
    }
    reader.skip_separators();
    let height = reader.number("height")?;
    let (width, height) = check_size("PBM", width, height)?;
    if raw {
        reader.raster_separator()?;
        let start = reader.position;
        let mask = read_raw(bytes, start, width, height)?;
        let end = start + (width as usize).div_ceil(8) * height as usize;
        check_after_raw(&reader, start, end)?;
        Ok(mask)
    } else {
        match reader.peek() {
            Some(byte) if is_whitespace(byte) || byte == b'#' => {}
            None => {}
            Some(_) => return Err(reader.bad_header("whitespace after the height")),
        }
        read_plain(&mut reader, width, height)
    }
}

/// Netpbm whitespace: blank, tab, line feed, vertical tab, form feed, carriage return.
fn is_whitespace(byte: u8) -> bool {
    matches!(byte, b' ' | b'\t' | b'\n' | 0x0b | 0x0c | b'\r')
}

/// A position in the file, with the helpers the header and P1 raster need.
struct Reader<'a> {
    bytes: &'a [u8],
    position: usize,
}

impl Reader<'_> {
    fn peek(&self) -> Option<u8> {
        self.bytes.get(self.position).copied()
    }

    /// Line number (from 1) of a byte offset.
    fn line_of(&self, offset: usize) -> usize {
        let end = offset.min(self.bytes.len());
        1 + self.bytes[..end]
            .iter()
            .filter(|&&byte| byte == b'\n')
            .count()
    }

    /// What stands at the current position, for error messages.
    fn found_here(&self) -> String {
        match self.peek() {
            None => "the end of the data".to_string(),
            Some(_) => {
                let end = (self.position + 8).min(self.bytes.len());
                format!("\"{}\"", printable(&self.bytes[self.position..end]))
            }
        }
    }

    fn bad_header(&self, field: &'static str) -> ImportError {
        ImportError::BadHeader {
            field,
            offset: self.position,
            line: self.line_of(self.position),
            found: self.found_here(),
        }
    }

    /// Skips a comment from `#` through (not including) the next CR or LF.
    fn skip_comment(&mut self) {
        while let Some(byte) = self.peek() {
            if byte == b'\n' || byte == b'\r' {
                break;
            }
            self.position += 1;
        }
    }

    /// Skips whitespace and comments.
    fn skip_separators(&mut self) {
        while let Some(byte) = self.peek() {
            if is_whitespace(byte) {
                self.position += 1;
            } else if byte == b'#' {
                self.skip_comment();
            } else {
                break;
            }
        }
    }

    /// Reads a decimal number; one beyond any image size (more than `MAX_CELLS`) is refused
    /// with its digits as written.
    fn number(&mut self, field: &'static str) -> Result<u64, ImportError> {
        let start = self.position;
        let mut value: u64 = 0;
        while let Some(byte) = self.peek() {
            if !byte.is_ascii_digit() {
                break;
            }
            value = value
                .saturating_mul(10)
                .saturating_add(u64::from(byte - b'0'));
            self.position += 1;
        }
        if self.position == start {
            return Err(self.bad_header(field));
        }
        if value > crate::limits::MAX_CELLS {
            let digits = &self.bytes[start..self.position];
            let written = match digits.len() {
                0..=40 => printable(digits),
                count => format!("{}... ({count} digits)", printable(&digits[..20])),
            };
            return Err(ImportError::NumberTooLarge {
                field,
                offset: start,
                line: self.line_of(start),
                written,
            });
        }
        Ok(value)
    }

    /// Consumes the single whitespace character (or a comment and its line end) that ends a P4
    /// header.
    fn raster_separator(&mut self) -> Result<(), ImportError> {
        match self.peek() {
            Some(b'#') => {
                self.skip_comment();
                match self.peek() {
                    Some(b'\r') if self.bytes.get(self.position + 1) == Some(&b'\n') => {
                        self.position += 2;
                    }
                    Some(_) => self.position += 1,
                    None => return Err(self.bad_header("raster separator")),
                }
            }
            Some(byte) if is_whitespace(byte) => self.position += 1,
            _ => return Err(self.bad_header("raster separator")),
        }
        Ok(())
    }
}

/// Reads a P1 raster starting at the reader's position.
fn read_plain(reader: &mut Reader, width: u32, height: u32) -> Result<MaskGrid, ImportError> {
    let total = u64::from(width) * u64::from(height);
    let mut builder = RunBuilder::new();
    let mut count = 0u64;
    while count < total {
        let Some(byte) = reader.peek() else {
            return Err(ImportError::Truncated {
                format: "PBM P1",
                offset: reader.bytes.len(),
                expected: total,
                found: count,
                pixels: true,
            });
        };
        match byte {
            b'0' | b'1' => {
                builder.push(byte == b'1');
                count += 1;
                reader.position += 1;
            }
            b'#' => reader.skip_comment(),
            _ if is_whitespace(byte) => reader.position += 1,
            _ => {
                let end = (reader.position + 1).min(reader.bytes.len());
                return Err(ImportError::BadDigit {
                    offset: reader.position,
                    line: reader.line_of(reader.position),
                    found: format!("\"{}\"", printable(&reader.bytes[reader.position..end])),
                });
            }
        }
    }
    reader.skip_separators();
    // A next image may follow (`P1`, `P4`, ...); its bytes are ignored.
    if let Some(byte) = reader.peek().filter(|&byte| byte != b'P') {
        let end = (reader.position + 8).min(reader.bytes.len());
        let found = match byte {
            b'0' | b'1' => format!(
                "\"{}\" (more pixels than {width} x {height})",
                printable(&reader.bytes[reader.position..end])
            ),
            _ => format!("\"{}\"", printable(&reader.bytes[reader.position..end])),
        };
        return Err(ImportError::ExtraData {
            format: "PBM P1 raster",
            offset: reader.position,
            line: reader.line_of(reader.position),
            found,
        });
    }
    Ok(builder.finish(width, height))
}

/// After a P4 raster (bytes `start..end`) the data must end or a next image begin with `P`.
/// A raster that starts with a decimal number and one whitespace character, followed by extra
/// bytes, is a maxval line shifting the raster and is refused by that name.
fn check_after_raw(reader: &Reader, start: usize, end: usize) -> Result<(), ImportError> {
    let bytes = reader.bytes;
    match bytes.get(end) {
        None | Some(b'P') => return Ok(()),
        Some(_) => {}
    }
    // A maxval has 1 to 5 digits (at most 65535, Netpbm PGM format specification).
    let digits = bytes[start..]
        .iter()
        .take(6)
        .take_while(|byte| byte.is_ascii_digit())
        .count();
    let maxval_line = (1..=5).contains(&digits)
        && bytes
            .get(start + digits)
            .copied()
            .is_some_and(is_whitespace);
    if maxval_line {
        return Err(ImportError::MaxvalLine {
            offset: start,
            line: reader.line_of(start),
            found: format!("\"{}\"", printable(&bytes[start..start + digits + 1])),
        });
    }
    let shown_end = (end + 8).min(bytes.len());
    Err(ImportError::ExtraData {
        format: "PBM P4 raster",
        offset: end,
        line: reader.line_of(end),
        found: format!(
            "{} more bytes (starting \"{}\")",
            bytes.len() - end,
            printable(&bytes[end..shown_end])
        ),
    })
}

/// Reads a P4 raster starting at byte `start`.
fn read_raw(bytes: &[u8], start: usize, width: u32, height: u32) -> Result<MaskGrid, ImportError> {
    let row_bytes = (width as usize).div_ceil(8);
    let needed = row_bytes as u64 * u64::from(height);
    let available = bytes.len().saturating_sub(start) as u64;
    if available < needed {
        return Err(ImportError::Truncated {
            format: "PBM P4",
            offset: bytes.len(),
            expected: needed,
            found: available,
            pixels: false,
        });
    }
    let raster = bytes.get(start..).unwrap_or(&[]);
    let mut builder = RunBuilder::new();
    for row in raster.chunks(row_bytes.max(1)).take(height as usize) {
        for column in 0..width as usize {
            let byte = row.get(column / 8).copied().unwrap_or(0);
            let bit = (byte >> (7 - column % 8)) & 1;
            builder.push(bit == 1);
        }
    }
    Ok(builder.finish(width, height))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn plain_two_by_two() {
        let grid = mask_from_pbm(b"P1\n2 2\n1 0\n0 1\n").unwrap();
        assert_eq!(grid, MaskGrid::from_bits(2, 2, &[true, false, false, true]));
    }

    #[test]
    fn raw_comment_before_raster() {
        let grid = mask_from_pbm(b"P4 3 1# note\n\xa0").unwrap();
        assert_eq!(grid, MaskGrid::from_bits(3, 1, &[true, false, true]));
    }

    #[test]
    fn errors_name_their_place() {
        let error = mask_from_pbm(b"P1\n2 2\n1 0\n0 x\n").unwrap_err();
        assert_eq!(
            error,
            ImportError::BadDigit {
                offset: 13,
                line: 4,
                found: "\"x\"".to_string()
            }
        );
        let error = mask_from_pbm(b"P1\nwide 2\n").unwrap_err();
        assert!(matches!(
            error,
            ImportError::BadHeader {
                field: "width",
                line: 2,
                ..
            }
        ));
        let error = mask_from_pbm(b"P4 9 2\n\x00\x00\x00").unwrap_err();
        assert!(error.to_string().contains("3 of 4 bytes"), "{error}");
    }
}
