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

use crate::mask::MaskGrid;
use crate::params::{CostWeights, Domain, RunControl, Widths};
use crate::params::{Joining, Params, Root};
use crate::schema::fields;

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
    for spec in fields() {
        out.push('&');
        out.push_str(spec.key);
        out.push('=');
        percent_encode_into(&field_text(params, spec.key).unwrap_or_default(), &mut out);
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
        if field_text(&params, &key).is_none() {
            problems.push(problem(&key, &value, "not a field of this format; ignored"));
        } else if let Err(message) = set_field(&mut params, &key, &value) {
            problems.push(problem(&key, &value, &format!("{message}; default used")));
        }
    }
    repair(&mut params, &mut problems);
    LinkRead {
        params,
        version,
        problems,
    }
}

/// The defaults of format version 1, frozen: keys missing from a version 1 link take these.
pub fn version_1_defaults() -> Params {
    Params {
        domain: Domain {
            width: 120,
            height: 120,
            cell_size: 0.15,
            units: "mm".to_string(),
            roots: vec![Root {
                x: 60,
                y: 100,
                outflow: [0.0, 1.0],
            }],
            jitter: 0.35,
            grade_x: 0.0,
            grade_y: 0.0,
            runoff: 1.0,
            outline: None,
            obstacles: Vec::new(),
            mask: None,
        },
        costs: CostWeights {
            w_len: 1.0,
            w_turn: 1.0,
            w_flow: 0.5,
            alpha: 0.5,
            w_path: 0.0,
            w_grade: 0.0,
            branch_angle: None,
            elongation: 1.0,
            rear_cost: 1.0,
        },
        run: RunControl {
            seed: 1,
            cells: 10_000,
            radius: 4.0,
            joining: Joining::Weighted,
            temperature: 0.5,
            threshold: None,
            attach_to_segments: false,
            refresh: 0.05,
        },
        widths: Widths {
            gamma: 3.0,
            tip_width: 0.12,
        },
    }
}

/// One field as link text; `None` for an unknown key.
pub fn field_text(params: &Params, key: &str) -> Option<String> {
    let text = match key {
        "width" => params.domain.width.to_string(),
        "height" => params.domain.height.to_string(),
        "cell_size" => number(params.domain.cell_size),
        "units" => params.domain.units.clone(),
        "roots" => params
            .domain
            .roots
            .iter()
            .map(|root| {
                format!(
                    "{},{},{},{}",
                    root.x,
                    root.y,
                    number(root.outflow[0]),
                    number(root.outflow[1])
                )
            })
            .collect::<Vec<_>>()
            .join(";"),
        "seed" => params.run.seed.to_string(),
        "cells" => params.run.cells.to_string(),
        "radius" => number(params.run.radius),
        "jitter" => number(params.domain.jitter),
        "w_len" => number(params.costs.w_len),
        "w_turn" => number(params.costs.w_turn),
        "w_flow" => number(params.costs.w_flow),
        "alpha" => number(params.costs.alpha),
        "w_path" => number(params.costs.w_path),
        "w_grade" => number(params.costs.w_grade),
        "joining" => joining_name(params.run.joining).to_string(),
        "temperature" => number(params.run.temperature),
        "threshold" => optional(params.run.threshold),
        "attach_to_segments" => params.run.attach_to_segments.to_string(),
        "gamma" => number(params.widths.gamma),
        "tip_width" => number(params.widths.tip_width),
        "branch_angle" => optional(params.costs.branch_angle),
        "elongation" => number(params.costs.elongation),
        "rear_cost" => number(params.costs.rear_cost),
        "grade_x" => number(params.domain.grade_x),
        "grade_y" => number(params.domain.grade_y),
        "runoff" => number(params.domain.runoff),
        "refresh" => number(params.run.refresh),
        "outline" => match &params.domain.outline {
            Some(points) => polygon_text(points),
            None => "none".to_string(),
        },
        "obstacles" => params
            .domain
            .obstacles
            .iter()
            .map(|polygon| polygon_text(polygon))
            .collect::<Vec<_>>()
            .join("~"),
        "mask" => match &params.domain.mask {
            Some(mask) => format!(
                "{}x{}:{}",
                mask.width,
                mask.height,
                mask.runs
                    .iter()
                    .map(u32::to_string)
                    .collect::<Vec<_>>()
                    .join(".")
            ),
            None => "none".to_string(),
        },
        _ => return None,
    };
    Some(text)
}

/// Sets one field from link text. The error says what the text should look like; the
/// parameters are untouched on error. Ranges are left to `Params::validate`.
pub fn set_field(params: &mut Params, key: &str, text: &str) -> Result<(), String> {
    let text = text.trim();
    match key {
        "width" => params.domain.width = whole(text)?,
        "height" => params.domain.height = whole(text)?,
        "cell_size" => params.domain.cell_size = real(text)?,
        "units" => params.domain.units = text.to_string(),
        "roots" => params.domain.roots = roots(text)?,
        "seed" => params.run.seed = whole(text)?,
        "cells" => params.run.cells = whole(text)?,
        "radius" => params.run.radius = real(text)?,
        "jitter" => params.domain.jitter = real(text)?,
        "w_len" => params.costs.w_len = real(text)?,
        "w_turn" => params.costs.w_turn = real(text)?,
        "w_flow" => params.costs.w_flow = real(text)?,
        "alpha" => params.costs.alpha = real(text)?,
        "w_path" => params.costs.w_path = real(text)?,
        "w_grade" => params.costs.w_grade = real(text)?,
        "joining" => params.run.joining = joining(text)?,
        "temperature" => params.run.temperature = real(text)?,
        "threshold" => params.run.threshold = optional_real(text)?,
        "attach_to_segments" => params.run.attach_to_segments = flag(text)?,
        "gamma" => params.widths.gamma = real(text)?,
        "tip_width" => params.widths.tip_width = real(text)?,
        "branch_angle" => params.costs.branch_angle = optional_real(text)?,
        "elongation" => params.costs.elongation = real(text)?,
        "rear_cost" => params.costs.rear_cost = real(text)?,
        "grade_x" => params.domain.grade_x = real(text)?,
        "grade_y" => params.domain.grade_y = real(text)?,
        "runoff" => params.domain.runoff = real(text)?,
        "refresh" => params.run.refresh = real(text)?,
        "outline" => {
            params.domain.outline = if text == "none" || text.is_empty() {
                None
            } else {
                Some(polygon(text)?)
            }
        }
        "obstacles" => {
            params.domain.obstacles = text
                .split('~')
                .filter(|part| !part.trim().is_empty())
                .map(polygon)
                .collect::<Result<_, _>>()?
        }
        "mask" => params.domain.mask = mask(text)?,
        _ => return Err(format!("`{key}` is not a parameter")),
    }
    Ok(())
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
        let failing = base_key(&error.key);
        // A field that fails again after its reset does not fit the lattice: reset the size.
        let reset: &[&str] = match failing {
            _ if already_reset.contains(&failing.to_string()) => &["width", "height"],
            "width * height" => &["width", "height"],
            "width" => &["width"],
            "height" => &["height"],
            key => match fields().iter().find(|spec| spec.key == key) {
                Some(spec) => &[spec.key][..],
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

/// `roots[1].x` -> `roots`, `obstacles[0][2]` -> `obstacles`, `mask.runs` -> `mask`.
fn base_key(key: &str) -> &str {
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

fn number(value: f64) -> String {
    format!("{value}")
}

fn optional(value: Option<f64>) -> String {
    value.map(number).unwrap_or_else(|| "none".to_string())
}

fn polygon_text(points: &[[f64; 2]]) -> String {
    points
        .iter()
        .map(|point| format!("{},{}", number(point[0]), number(point[1])))
        .collect::<Vec<_>>()
        .join(";")
}

fn joining_name(joining: Joining) -> &'static str {
    match joining {
        Joining::Cheapest => "cheapest",
        Joining::Weighted => "weighted",
        Joining::Uniform => "uniform",
    }
}

fn whole<T: std::str::FromStr>(text: &str) -> Result<T, String> {
    if text.is_empty() || !text.bytes().all(|byte| byte.is_ascii_digit()) {
        return Err("expected a whole number".to_string());
    }
    text.parse()
        .map_err(|_| "whole number out of range".to_string())
}

fn real(text: &str) -> Result<f64, String> {
    let value: f64 = text
        .parse()
        .map_err(|_| "expected a number such as 0.5 or 1e-3".to_string())?;
    if value.is_finite() {
        Ok(value)
    } else {
        Err("expected a finite number".to_string())
    }
}

fn optional_real(text: &str) -> Result<Option<f64>, String> {
    if text == "none" || text.is_empty() {
        return Ok(None);
    }
    real(text)
        .map(Some)
        .map_err(|_| "expected a number or none".to_string())
}

fn flag(text: &str) -> Result<bool, String> {
    match text {
        "true" => Ok(true),
        "false" => Ok(false),
        _ => Err("expected true or false".to_string()),
    }
}

fn joining(text: &str) -> Result<Joining, String> {
    match text {
        "cheapest" => Ok(Joining::Cheapest),
        "weighted" => Ok(Joining::Weighted),
        "uniform" => Ok(Joining::Uniform),
        _ => Err("expected cheapest, weighted or uniform".to_string()),
    }
}

fn roots(text: &str) -> Result<Vec<Root>, String> {
    text.split(';')
        .filter(|part| !part.trim().is_empty())
        .map(|group| {
            let parts: Vec<&str> = group.split(',').map(str::trim).collect();
            let [x, y, dx, dy] = parts[..] else {
                return Err(format!("root {group:?}: expected x,y,dx,dy"));
            };
            Ok(Root {
                x: whole(x).map_err(|error| format!("root {group:?}: x: {error}"))?,
                y: whole(y).map_err(|error| format!("root {group:?}: y: {error}"))?,
                outflow: [
                    real(dx).map_err(|error| format!("root {group:?}: dx: {error}"))?,
                    real(dy).map_err(|error| format!("root {group:?}: dy: {error}"))?,
                ],
            })
        })
        .collect()
}

fn polygon(text: &str) -> Result<Vec<[f64; 2]>, String> {
    text.split(';')
        .filter(|part| !part.trim().is_empty())
        .map(|point| {
            let Some((x, y)) = point.split_once(',') else {
                return Err(format!("point {point:?}: expected x,y"));
            };
            Ok([
                real(x.trim()).map_err(|error| format!("point {point:?}: {error}"))?,
                real(y.trim()).map_err(|error| format!("point {point:?}: {error}"))?,
            ])
        })
        .collect()
}

fn mask(text: &str) -> Result<Option<MaskGrid>, String> {
    if text == "none" || text.is_empty() {
        return Ok(None);
    }
    let shape_error = || "expected none or WIDTHxHEIGHT:run.run.run".to_string();
    let (size, runs) = text.split_once(':').ok_or_else(shape_error)?;
    let (width, height) = size.split_once('x').ok_or_else(shape_error)?;
    Ok(Some(MaskGrid {
        width: whole(width)?,
        height: whole(height)?,
        runs: runs.split('.').map(whole).collect::<Result<_, _>>()?,
    }))
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
