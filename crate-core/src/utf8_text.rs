//! `utf8_text`: bytes read as UTF-8 text, or `NotUtf8` naming the byte offset and line of the
//! first byte that is not UTF-8. Callers pass the bytes of a file or argument; nothing here
//! reads files.

/// Why bytes are not UTF-8 text, and where.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct NotUtf8 {
    /// Byte offset of the first invalid byte, from 0 at the start of the data.
    pub offset: usize,
    /// Line of that byte, counted from 1 (line feeds before it plus one).
    pub line: usize,
    /// The invalid bytes as hexadecimal (`0xff`, or `0xe2 0x82` for a cut-short character).
    pub found: String,
    /// Whether the data ends inside a character that began validly (`true`) rather than
    /// holding a byte that cannot stand there (`false`).
    pub cut_short: bool,
}

impl std::fmt::Display for NotUtf8 {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        let NotUtf8 {
            offset,
            line,
            found,
            cut_short,
        } = self;
        if *cut_short {
            write!(
                f,
                "not UTF-8 text: the data ends inside a character that starts at byte offset \
                 {offset} (line {line}) with {found}"
            )
        } else {
            write!(
                f,
                "not UTF-8 text: byte offset {offset} (line {line}) holds {found}, which is not \
                 valid UTF-8 there; save the file as UTF-8"
            )
        }
    }
}

impl std::error::Error for NotUtf8 {}

/// The bytes as text, or where they stop being UTF-8 (RFC 3629).
pub fn utf8_text(bytes: &[u8]) -> Result<&str, NotUtf8> {
    std::str::from_utf8(bytes).map_err(|error| {
        let offset = error.valid_up_to();
        let length = error.error_len().unwrap_or(bytes.len() - offset).min(4);
        let found: Vec<String> = bytes[offset..offset + length]
            .iter()
            .map(|byte| format!("0x{byte:02x}"))
            .collect();
        NotUtf8 {
            offset,
            line: 1 + bytes[..offset]
                .iter()
                .filter(|&&byte| byte == b'\n')
                .count(),
            found: found.join(" "),
            cut_short: error.error_len().is_none(),
        }
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_the_first_invalid_byte() {
        // RFC 3629, section 3: 0xff never appears in UTF-8.
        let error = utf8_text(b"{\n\"seed\": \xff}").unwrap_err();
        assert_eq!(
            error,
            NotUtf8 {
                offset: 10,
                line: 2,
                found: "0xff".to_string(),
                cut_short: false
            }
        );
        assert!(error.to_string().contains("byte offset 10 (line 2)"));
        // "é" is 0xc3 0xa9; cut after its first byte.
        let error = utf8_text(b"caf\xc3").unwrap_err();
        assert_eq!((error.offset, error.cut_short), (3, true));
        assert_eq!(utf8_text("café".as_bytes()), Ok("café"));
    }
}
