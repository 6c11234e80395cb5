//! Browser layer over `ramulus-core` and `ramulus-draw`: the `Simulation` handle
//! (`simulation`) with typed-array views of its screen geometry, plus free functions for
//! presets, the parameter schema, run links and colours, and the page's memory ceiling
//! (`memory`). Errors come back as readable strings;
//! nothing here computes or draws.

use ramulus_core::import::mask_from_bytes;
use ramulus_core::link::{decode_link, encode_link, field_text, set_field};
use ramulus_core::presets::presets;
use ramulus_core::run::SITE_CAUTION;
use ramulus_core::schema::fields;
use ramulus_draw::palette::colour_scheme;
use serde_json::json;
use wasm_bindgen::prelude::*;

pub mod memory;
mod passes;
mod simulation;

// ---- specimens (issue 10, page side): traced files measured for the page; see specimen.rs ----
mod specimen;
pub use specimen::{
    measure_specimen, specimen_comparison_json, specimen_max_bytes, specimen_number_text,
    specimen_scale_bar_json, specimen_size_refusal,
};
mod specimen_image;
pub use specimen_image::{
    cleared_image_stated_resolution, cleared_image_step_rgba, trace_cleared_image,
};
// ---- end of specimens ----

// ---- drainage sites (issue 12, page side): see site.rs ----
mod site;
pub use site::{
    drainage_defaults_json, runoff_surfaces_json, site_link_json, site_summary_json, site_svg_json,
};
// ---- end of drainage sites ----

pub use memory::RunMemory;
pub use simulation::Simulation;

// ---- page fitting (issue 11): the fit panel's coordinator and Web Worker handles ----
pub mod fitting;
pub use fitting::{FitSession, FitWorker};
// ---- end of page fitting ----

/// Every preset as a JSON array of `{name, title, description, params, link}`.
#[wasm_bindgen]
pub fn presets_json() -> String {
    let list: Vec<serde_json::Value> = presets()
        .iter()
        .map(|preset| {
            json!({
                "name": preset.name,
                "title": preset.title,
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
    params.domain.width = mask.width;
    params.domain.height = mask.height;
    params.domain.mask = Some(mask);
    if let Err(error) = params.validate() {
        let message = format!(
            "with this {} x {} image, {} = {} is not allowed: {}",
            params.domain.width, params.domain.height, error.key, error.value, error.allowed
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

/// What the run a link describes needs of the page's memory at most, as JSON (see
/// `RunMemory::to_json`): the page refuses a run whose `fits` is false, showing `message`.
#[wasm_bindgen]
pub fn run_memory_json(link: &str) -> String {
    RunMemory::of(&decode_link(link).params).to_json()
}

/// What the page says after a run from `link` trapped the instance (see
/// `RunMemory::trap_message`).
#[wasm_bindgen]
pub fn trap_message(link: &str, progress: &str, error: &str) -> String {
    RunMemory::of(&decode_link(link).params).trap_message(progress, error)
}

/// Bytes of wasm linear memory this instance holds now (it only ever grows; 0 off wasm).
#[wasm_bindgen]
pub fn wasm_memory_bytes() -> f64 {
    #[cfg(target_arch = "wasm32")]
    {
        (core::arch::wasm32::memory_size(0) as f64) * 65_536.0
    }
    #[cfg(not(target_arch = "wasm32"))]
    {
        0.0
    }
}

/// The caution every drainage-site output carries.
#[wasm_bindgen]
pub fn site_caution() -> String {
    SITE_CAUTION.to_string()
}

/// The tissue control in the words of the network's kind (`site`: a drainage site), as JSON
/// `{label, choices: [{value, text}]}` (`ramulus_draw::tissue::tissue_control`).
#[wasm_bindgen]
pub fn tissue_control_json(site: bool) -> String {
    serde_json::to_string(&ramulus_draw::tissue::tissue_control(site)).unwrap_or_default()
}

// ---- page-ux: export confirmation ----
/// The sentence confirming an export: file name, what it holds and its size.
#[wasm_bindgen]
pub fn saved_text(file_name: &str, what: &str, bytes: f64) -> String {
    ramulus_draw::texts::saved_text(file_name, what, bytes.max(0.0) as u64)
}
// ---- end page-ux ----

/// The JSON `{error: {key, message}}` that names the field at fault.
fn field_error(key: &str, message: &str) -> String {
    json!({ "error": { "key": key, "field": form_field(key), "message": message } }).to_string()
}

/// The form field that shows an error about `key`: the parameter it belongs to, and the
/// lattice width for the joint `width * height` rule.
fn form_field(key: &str) -> &str {
    match ramulus_core::link::field_of_key(key) {
        "width * height" => "width",
        field => field,
    }
}

/// How the form shows a field's link text: the run-length mask as its size in words, other
/// fields as written.
fn shown_text(params: &ramulus_core::params::Params, key: &str, text: String) -> String {
    if key != "mask" {
        return text;
    }
    match &params.domain.mask {
        Some(mask) => format!("image mask, {} \u{d7} {} cells", mask.width, mask.height),
        None => "none".to_string(),
    }
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
            let shown = shown_text(params, spec.key, text);
            (spec.key.to_string(), serde_json::Value::String(shown))
        })
        .collect();
    let problems: Vec<serde_json::Value> = problems
        .iter()
        .map(|problem| json!({ "key": problem.key, "field": form_field(&problem.key), "value": problem.value, "message": problem.message }))
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
            decode_link(out["link"].as_str().unwrap())
                .params
                .costs
                .alpha,
            0.25
        );
    }

    /// The form shows an error on the field it belongs to: a root's column on `roots`, the
    /// joint lattice-size rule on `width`; a mask is shown by its size, never its runs.
    #[test]
    fn errors_name_the_form_field_and_masks_read_as_their_size() {
        let link = encode_link(&presets()[0].params);
        let out: serde_json::Value =
            serde_json::from_str(&set_link_field(&link, "roots", "9999,1,0,1")).unwrap();
        assert_eq!(out["error"]["key"], "roots[0].x");
        assert_eq!(out["error"]["field"], "roots");
        let out: serde_json::Value = serde_json::from_str(&set_link_field(
            "v=1&width=1000&height=20000&roots=0,0,0,1",
            "width",
            "20000",
        ))
        .unwrap();
        assert_eq!(out["error"]["key"], "width * height");
        assert_eq!(out["error"]["field"], "width");
        let read: serde_json::Value = serde_json::from_str(&read_link(
            "v=1&width=3&height=2&mask=3x2:0.2.4&roots=0,0,0,1",
        ))
        .unwrap();
        assert_eq!(read["problems"].as_array().unwrap().len(), 0, "{read}");
        assert_eq!(read["fields"]["mask"], "image mask, 3 \u{d7} 2 cells");
    }

    #[test]
    fn parameter_json_becomes_the_same_link_as_the_core_writes() {
        let preset = &presets()
            .into_iter()
            .find(|preset| preset.name == "drainage-site")
            .expect("the drainage preset");
        let text = serde_json::to_string(&preset.params).unwrap();
        let out: serde_json::Value = serde_json::from_str(&link_from_params(&text)).unwrap();
        assert_eq!(out["link"], encode_link(&preset.params));
        let out: serde_json::Value =
            serde_json::from_str(&link_from_params(r#"{"gamma": 0.5}"#)).unwrap();
        assert_eq!(out["error"]["key"], "gamma");
    }
}
