//! `read_parameter_file`: the bytes of a JSON parameter file (as `ramulus grow --params` reads
//! it) as an object of keys, with the keys given more than once; `ParamFileError` says why a
//! file cannot be read, naming the byte, line or column. Checking the keys is
//! `Params::from_json_value`'s work, after the caller has merged them over its base.

use serde_json::{Map, Value};

use crate::utf8_text::{utf8_text, NotUtf8};

/// The keys of a parameter file.
#[derive(Clone, Debug, PartialEq)]
pub struct ParameterFile {
    /// Every key with its value (the last one where a key is repeated).
    pub keys: Map<String, Value>,
    /// Keys given more than once, with their counts, in first-seen order (JSON readers keep
    /// the last value of a repeated key, RFC 8259 section 4, so the others are dropped).
    pub repeated: Vec<(String, usize)>,
}

/// Why a parameter file cannot be read.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum ParamFileError {
    /// The bytes are not UTF-8 text.
    NotUtf8(NotUtf8),
    /// The text is not JSON.
    Json {
        /// Line, from 1.
        line: usize,
        /// Column, from 1.
        column: usize,
        /// The JSON reader's complaint.
        message: String,
    },
    /// The JSON is not an object.
    NotAnObject,
}

impl std::fmt::Display for ParamFileError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            ParamFileError::NotUtf8(error) => write!(f, "{error}"),
            ParamFileError::Json {
                line,
                column,
                message,
            } => write!(
                f,
                "not valid JSON at line {line} column {column}: {message}"
            ),
            ParamFileError::NotAnObject => write!(f, "expected a JSON object of parameters"),
        }
    }
}

impl std::error::Error for ParamFileError {}

/// Reads a parameter file's bytes: UTF-8 (a leading byte-order mark, which some editors write,
/// is skipped), JSON, an object.
pub fn read_parameter_file(bytes: &[u8]) -> Result<ParameterFile, ParamFileError> {
    let text = utf8_text(bytes).map_err(ParamFileError::NotUtf8)?;
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let value: Value = serde_json::from_str(text).map_err(|error| ParamFileError::Json {
        line: error.line(),
        column: error.column(),
        message: error.to_string(),
    })?;
    let Value::Object(keys) = value else {
        return Err(ParamFileError::NotAnObject);
    };
    Ok(ParameterFile {
        keys,
        repeated: repeated_keys(text),
    })
}

/// Top-level keys that a JSON object gives more than once, with their counts, in first-seen
/// order. Empty for text that is not an object.
fn repeated_keys(text: &str) -> Vec<(String, usize)> {
    struct Keys(Vec<String>);
    impl<'de> serde::Deserialize<'de> for Keys {
        fn deserialize<D: serde::Deserializer<'de>>(deserializer: D) -> Result<Keys, D::Error> {
            struct Visitor;
            impl<'de> serde::de::Visitor<'de> for Visitor {
                type Value = Keys;
                fn expecting(&self, formatter: &mut std::fmt::Formatter) -> std::fmt::Result {
                    formatter.write_str("a JSON object")
                }
                fn visit_map<A: serde::de::MapAccess<'de>>(
                    self,
                    mut map: A,
                ) -> Result<Keys, A::Error> {
                    let mut keys = Vec::new();
                    while let Some((key, serde::de::IgnoredAny)) = map.next_entry::<String, _>()? {
                        keys.push(key);
                    }
                    Ok(Keys(keys))
                }
            }
            deserializer.deserialize_map(Visitor)
        }
    }
    let Ok(Keys(keys)) = serde_json::from_str::<Keys>(text) else {
        return Vec::new();
    };
    let mut counts: std::collections::HashMap<&str, usize> = std::collections::HashMap::new();
    for key in &keys {
        *counts.entry(key.as_str()).or_insert(0) += 1;
    }
    let mut repeated = Vec::new();
    for key in &keys {
        if let Some(count) = counts.remove(key.as_str()).filter(|&count| count > 1) {
            repeated.push((key.clone(), count));
        }
    }
    repeated
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_keys_and_names_repeats() {
        let file = read_parameter_file(b"\xef\xbb\xbf{\"seed\": 1, \"alpha\": 0.5, \"seed\": 2}")
            .expect("a BOM and a repeated key are read");
        assert_eq!(file.keys["seed"], Value::from(2));
        assert_eq!(file.repeated, vec![("seed".to_string(), 2)]);
    }

    #[test]
    fn errors_say_where() {
        let error = read_parameter_file(b"{\"units\": \"\xe9\"}").unwrap_err();
        assert!(
            matches!(&error, ParamFileError::NotUtf8(not) if not.offset == 11),
            "{error:?}"
        );
        let error = read_parameter_file(b"{\n  \"seed\": }").unwrap_err();
        assert!(
            matches!(error, ParamFileError::Json { line: 2, .. }),
            "{error:?}"
        );
        assert_eq!(
            read_parameter_file(b"[1, 2]").unwrap_err(),
            ParamFileError::NotAnObject
        );
    }
}
