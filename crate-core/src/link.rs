//! Run links: `encode_link` writes every parameter of a run as a URL fragment
//! (`v=1&seed=7&width=220&...`), `decode_link` reads one back field by field, and
//! `field_text` / `set_field` read and write one field as text (the page's form uses them).
//!
//! Decoding never fails: a field that does not parse, or that validation rejects, falls back to
//! its default and is reported as a `LinkProblem` naming the field. Numbers are written with
//! Rust's shortest round-trip formatting, so a decoded link holds the very same bits.
//!
//! Format version 1 (`v=1`) is the first. Every version writes all of its keys; a key missing
//! from a link takes the default of that version (`version_1_defaults`), so changing
//! `Params::default` later never changes what an old link grows.

use crate::limits::MAX_CELLS;
use crate::params::table::{parameter, parameters};
use crate::params::Params;
use crate::region::{allowed_cells, check_start};

/// The link format version this build writes.
pub const LINK_VERSION: u32 = 1;

/// A field of a link that could not be used as written.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct LinkProblem {
    /// The field key (`alpha`, `roots`, `v`, ...).
    pub key: String,
    /// The text found, shortened.
    pub value: String,
    /// What is wrong and what was done instead.
    pub message: String,
}

impl std::fmt::Display for LinkProblem {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "link field `{}` = {:?}: {}",
            self.key, self.value, self.message
        )
    }
}

/// The outcome of reading a link: parameters that always validate, and what was wrong.
#[derive(Clone, Debug, PartialEq)]
pub struct LinkRead {
    /// Parameters to run; every problem field holds its default.
    pub params: Params,
    /// The format version the link declared (1 when it declared none or a bad one).
    pub version: u32,
    /// Fields that were damaged, unknown or rejected, in the order found.
    pub problems: Vec<LinkProblem>,
}

/// Writes every parameter as a URL fragment without the leading `#`.
pub fn encode_link(params: &Params) -> String {
    let mut out = format!("v={LINK_VERSION}");
    for spec in parameters() {
        out.push('&');
        out.push_str(spec.key);
        out.push('=');
        percent_encode_into(&spec.text(params), &mut out);
    }
    out
}

/// Reads a link: a whole URL, a `#fragment` or a bare fragment. Never fails.
pub fn decode_link(text: &str) -> LinkRead {
    let text = text.trim();
    let fragment = match text.find('#') {
        Some(index) => text[index..].trim_start_matches('#'),
        None => text,
    };
    let mut params = version_1_defaults();
    let mut problems = Vec::new();
    let mut version = 1;
    let mut seen: Vec<String> = Vec::new();
    for pair in fragment.split('&').filter(|pair| !pair.is_empty()) {
        let (raw_key, raw_value) = pair.split_once('=').unwrap_or((pair, ""));
        let key = percent_decode(raw_key).unwrap_or_else(|| raw_key.to_string());
        let Some(value) = percent_decode(raw_value) else {
            problems.push(problem(&key, raw_value, "bad %-escape; default used"));
            continue;
        };
        if seen.contains(&key) {
            problems.push(problem(&key, &value, "given twice; the later one is used"));
        }
        seen.push(key.clone());
        if key == "v" {
            match value.parse::<u32>() {
                Ok(found) if found == LINK_VERSION => version = found,
                Ok(found) if found > LINK_VERSION => {
                    version = LINK_VERSION;
                    problems.push(problem(&key, &value, &format!("made by a newer format; read as version {LINK_VERSION}, unknown fields ignored")));
                }
                _ => problems.push(problem(
                    &key,
                    &value,
                    "not a known format version; read as version 1",
                )),
            }
            continue;
        }
        if parameter(&key).is_none() {
            problems.push(problem(&key, &value, "not a field of this format; ignored"));
        } else if let Err(message) = set_field(&mut params, &key, &value) {
            problems.push(problem(&key, &value, &format!("{message}; default used")));
        }
    }
    cap_cell_budget(&mut params, &mut problems);
    repair(&mut params, &mut problems);
    repair_start(&mut params, &mut problems);
    LinkRead {
        params,
        version,
        problems,
    }
}

/// Version 1 links were accepted with any cell budget, while the budget is now at most
/// `MAX_CELLS`. No lattice holds more cells than that, so a larger budget grows the very same
/// network as `MAX_CELLS`: cap it (and say so) instead of resetting it to the default.
fn cap_cell_budget(params: &mut Params, problems: &mut Vec<LinkProblem>) {
    if params.run.cells > MAX_CELLS {
        problems.push(problem(
            "cells",
            &params.run.cells.to_string(),
            &format!(
                "above the largest budget; {MAX_CELLS} used, which grows the same network since \
                 no lattice holds more cells"
            ),
        ));
        params.run.cells = MAX_CELLS;
    }
}

/// The defaults of format version 1, frozen: keys missing from a version 1 link take these
/// (the `link_v1_default` column of the parameter table).
pub fn version_1_defaults() -> Params {
    Params::from_table_column(|spec| spec.link_v1_default)
}

/// One field as link text; `None` for an unknown key.
pub fn field_text(params: &Params, key: &str) -> Option<String> {
    parameter(key).map(|spec| spec.text(params))
}

/// Sets one field from link text. The error says what the text should look like; the
/// parameters are untouched on error. Ranges are left to `Params::validate`.
pub fn set_field(params: &mut Params, key: &str, text: &str) -> Result<(), String> {
    match parameter(key) {
        Some(spec) => spec.set_text(params, text),
        None => Err(format!("`{key}` is not a parameter")),
    }
}

/// Resets fields that validation rejects to their defaults, reporting each, until the
/// parameters validate; as a last resort every field takes its default.
fn repair(params: &mut Params, problems: &mut Vec<LinkProblem>) {
    let defaults = version_1_defaults();
    let mut already_reset: Vec<String> = Vec::new();
    for _ in 0..64 {
        let Err(error) = params.validate() else {
            return;
        };
        let failing = field_of_key(&error.key);
        // A field that fails again after its reset does not fit the lattice: reset the size.
        let reset: &[&str] = match failing {
            _ if already_reset.contains(&failing.to_string()) => &["width", "height"],
            "width * height" => &["width", "height"],
            "width" => &["width"],
            "height" => &["height"],
            key => match parameter(key) {
                Some(spec) => std::slice::from_ref(&spec.key),
                None => break,
            },
        };
        already_reset.push(failing.to_string());
        for &key in reset {
            let value = field_text(params, key).unwrap_or_default();
            let default = field_text(&defaults, key).unwrap_or_default();
            let _ = set_field(params, key, &default);
            problems.push(problem(
                key,
                &value,
                &format!("{} ({}); default {default} used", error.allowed, error.key),
            ));
        }
    }
    if params.validate().is_err() {
        *params = defaults;
        problems.push(problem(
            "(all)",
            "",
            "the fields do not fit together; every default used",
        ));
    }
}

/// Resets the region and then the roots, reporting each, until the run can start (every root
/// on an allowed cell of its own, at least one allowed cell): parameters that validate may
/// still place a root inside an obstacle or leave no cell to grow in.
fn repair_start(params: &mut Params, problems: &mut Vec<LinkProblem>) {
    let defaults = version_1_defaults();
    let mut allowed = allowed_cells(params);
    for key in ["obstacles", "outline", "mask", "roots"] {
        let Err(error) = check_start(params, &allowed) else {
            return;
        };
        let is_region_error = !error.allowed.contains("already taken");
        if key != "roots" && !is_region_error {
            continue;
        }
        let value = field_text(params, key).unwrap_or_default();
        let default = field_text(&defaults, key).unwrap_or_default();
        if value == default {
            continue;
        }
        let _ = set_field(params, key, &default);
        allowed = allowed_cells(params);
        problems.push(problem(
            key,
            &value,
            &format!(
                "the run cannot start: {} ({}); default {default} used",
                error.allowed, error.key
            ),
        ));
    }
    if params.validate().is_err() || check_start(params, &allowed).is_err() {
        *params = defaults;
        problems.push(problem(
            "(all)",
            "",
            "the run cannot start with these fields; every default used",
        ));
    }
}

/// The parameter an error key belongs to: `roots[1].x` -> `roots`, `obstacles[0][2]` ->
/// `obstacles`, `mask.runs` -> `mask`; the joint rule `width * height` stays as it is.
pub fn field_of_key(key: &str) -> &str {
    if key == "width * height" {
        return key;
    }
    let end = key.find(['[', '.']).unwrap_or(key.len());
    &key[..end]
}

fn problem(key: &str, value: &str, message: &str) -> LinkProblem {
    let value = if value.chars().count() > 40 {
        format!("{}...", value.chars().take(37).collect::<String>())
    } else {
        value.to_string()
    };
    LinkProblem {
        key: key.to_string(),
        value,
        message: message.to_string(),
    }
}

/// Characters written as they are; everything else is %-escaped (RFC 3986, section 2.3
/// unreserved characters plus the separators `,;:` that the field syntax uses).
fn is_plain(byte: u8) -> bool {
    byte.is_ascii_alphanumeric() || b"-._~,;:".contains(&byte)
}

fn percent_encode_into(text: &str, out: &mut String) {
    for &byte in text.as_bytes() {
        if is_plain(byte) {
            out.push(byte as char);
        } else {
            out.push_str(&format!("%{byte:02X}"));
        }
    }
}

/// Decodes %-escapes; `None` for a broken escape or bytes that are not UTF-8.
fn percent_decode(text: &str) -> Option<String> {
    let bytes = text.as_bytes();
    let mut out = Vec::with_capacity(bytes.len());
    let mut index = 0;
    while index < bytes.len() {
        if bytes[index] == b'%' {
            let hex = bytes.get(index + 1..index + 3)?;
            if !hex.iter().all(u8::is_ascii_hexdigit) {
                return None;
            }
            out.push(u8::from_str_radix(std::str::from_utf8(hex).ok()?, 16).ok()?);
            index += 3;
        } else {
            out.push(bytes[index]);
            index += 1;
        }
    }
    String::from_utf8(out).ok()
}
