//! Browser layer over `ramulus-core` and `ramulus-draw`: the `Simulation` handle
//! (`simulation`) with typed-array views of its screen geometry, plus free functions for
//! presets, the parameter schema, run links and colours. Errors come back as readable strings;
//! nothing here computes or draws.

use ramulus_core::import::mask_from_bytes;
use ramulus_core::link::{decode_link, encode_link, field_text, set_field};
use ramulus_core::presets::presets;
use ramulus_core::run::SITE_CAUTION;
use ramulus_core::schema::fields;
use ramulus_draw::palette::colour_scheme;
use serde_json::json;
use wasm_bindgen::prelude::*;

mod simulation;

pub use simulation::Simulation;

/// Every preset as a JSON array of `{name, description, params, link}`.
#[wasm_bindgen]
pub fn presets_json() -> String {
    let list: Vec<serde_json::Value> = presets()
        .iter()
        .map(|preset| {
            json!({
                "name": preset.name,
                "description": preset.description,
                "params": preset.params,
                "link": encode_link(&preset.params),
            })
        })
        .collect();
    serde_json::Value::Array(list).to_string()
}

/// The parameter form's fields (key, group, label, unit, kind, bounds, help) as JSON.
#[wasm_bindgen]
pub fn schema_json() -> String {
    serde_json::to_string(&fields()).unwrap_or_else(|_| "[]".to_string())
}

/// Reads a link and returns JSON `{link, version, problems: [{key, value, message}], fields:
/// {key: text}}`, where `link` is the repaired fragment that grows exactly these fields.
#[wasm_bindgen]
pub fn read_link(text: &str) -> String {
    console_error_panic_hook::set_once();
    let read = decode_link(text);
    link_summary(&read.params, read.version, &read.problems)
}

/// Sets one field of a (valid) link from text. Returns JSON `{link, fields}` with the new
/// link, or `{error: {key, message}}` naming the field at fault, leaving the link unchanged.
#[wasm_bindgen]
pub fn set_link_field(link: &str, key: &str, text: &str) -> String {
    let mut params = decode_link(link).params;
    if let Err(message) = set_field(&mut params, key, text) {
        return field_error(key, &message);
    }
    if let Err(error) = params.validate() {
        return invalid(&error);
    }
    link_summary(&params, ramulus_core::link::LINK_VERSION, &[])
}

/// The link of a parameter JSON object (keys as in the run record and `ramulus presets`);
/// missing keys take their defaults. Returns JSON `{link, fields}` or `{error: {key, message}}`.
#[wasm_bindgen]
pub fn link_from_params(params_json: &str) -> String {
    let params = match ramulus_core::params::Params::from_json(params_json) {
        Ok(params) => params,
        Err(error) => {
            let message = format!("{}: {}", error.value, error.allowed);
            return field_error(&error.key, &message);
        }
    };
    if let Err(error) = params.validate() {
        return invalid(&error);
    }
    link_summary(&params, ramulus_core::link::LINK_VERSION, &[])
}

/// Applies an image mask (PNG or PBM bytes, dark = allowed) to a link: the image's size sets
/// the lattice. Returns JSON like `set_link_field`.
#[wasm_bindgen]
pub fn set_link_mask(link: &str, image: &[u8]) -> String {
    let mut params = decode_link(link).params;
    let mask = match mask_from_bytes(image) {
        Ok(mask) => mask,
        Err(error) => return field_error("mask", &error.to_string()),
    };
    params.width = mask.width;
    params.height = mask.height;
    params.mask = Some(mask);
    if let Err(error) = params.validate() {
        let message = format!(
            "with this {} x {} image, {} = {} is not allowed: {}",
            params.width, params.height, error.key, error.value, error.allowed
        );
        return field_error(&error.key, &message);
    }
    link_summary(&params, ramulus_core::link::LINK_VERSION, &[])
}

/// Colours shared with the SVG export: `{order: [...], flow: [...], plain}`.
#[wasm_bindgen]
pub fn colours_json() -> String {
    serde_json::to_string(&colour_scheme()).unwrap_or_else(|_| "{}".to_string())
}

/// The caution every drainage-site output carries.
#[wasm_bindgen]
pub fn site_caution() -> String {
    SITE_CAUTION.to_string()
}

/// The JSON `{error: {key, message}}` that names the field at fault.
fn field_error(key: &str, message: &str) -> String {
    json!({ "error": { "key": key, "message": message } }).to_string()
}

/// Rejection of parameters that parse but do not validate.
fn invalid(error: &ramulus_core::ParamError) -> String {
    field_error(
        &error.key,
        &format!("{} is not allowed: {}", error.value, error.allowed),
    )
}

fn link_summary(
    params: &ramulus_core::params::Params,
    version: u32,
    problems: &[ramulus_core::link::LinkProblem],
) -> String {
    let field_texts: serde_json::Map<String, serde_json::Value> = fields()
        .iter()
        .map(|spec| {
            let text = field_text(params, spec.key).unwrap_or_default();
            (spec.key.to_string(), serde_json::Value::String(text))
        })
        .collect();
    let problems: Vec<serde_json::Value> = problems
        .iter()
        .map(|problem| json!({ "key": problem.key, "value": problem.value, "message": problem.message }))
        .collect();
    json!({
        "link": encode_link(params),
        "version": version,
        "problems": problems,
        "fields": field_texts,
    })
    .to_string()
}

#[cfg(test)]
mod tests {
    use super::*;
    use ramulus_core::params::Params;

    #[test]
    fn presets_json_lists_every_core_preset_with_parameters_that_parse_back() {
        let list: Vec<serde_json::Value> = serde_json::from_str(&presets_json()).unwrap();
        let core = presets();
        assert_eq!(list.len(), core.len());
        for (entry, preset) in list.iter().zip(&core) {
            assert_eq!(entry["name"], preset.name);
            let params = Params::from_json_value(entry["params"].clone()).unwrap();
            assert_eq!(params, preset.params);
            let link = entry["link"].as_str().unwrap();
            assert_eq!(decode_link(link).params, preset.params);
        }
    }

    #[test]
    fn setting_a_field_names_the_field_a_bad_value_breaks() {
        let link = encode_link(&presets()[0].params);
        let out: serde_json::Value =
            serde_json::from_str(&set_link_field(&link, "alpha", "2")).unwrap();
        assert_eq!(out["error"]["key"], "alpha");
        let out: serde_json::Value =
            serde_json::from_str(&set_link_field(&link, "alpha", "0.25")).unwrap();
        assert_eq!(out["fields"]["alpha"], "0.25");
        assert_eq!(
            decode_link(out["link"].as_str().unwrap()).params.alpha,
            0.25
        );
    }

    #[test]
    fn parameter_json_becomes_the_same_link_as_the_core_writes() {
        let preset = &presets()[3];
        let text = serde_json::to_string(&preset.params).unwrap();
        let out: serde_json::Value = serde_json::from_str(&link_from_params(&text)).unwrap();
        assert_eq!(out["link"], encode_link(&preset.params));
        let out: serde_json::Value =
            serde_json::from_str(&link_from_params(r#"{"gamma": 0.5}"#)).unwrap();
        assert_eq!(out["error"]["key"], "gamma");
    }
}
