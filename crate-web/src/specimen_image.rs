//! Cleared-leaf images traced on the page: the RGBA pixels the browser decoded plus the page's
//! calibration and image options in, the measured specimen out (`trace_cleared_image`, the
//! same JSON as `measure_specimen` with each step's numbers under `image`), and one step's
//! picture (leaf outline mask, vein mask, skeleton) as RGBA for display
//! (`cleared_image_step_rgba`). Thresholds, thinning, the skeleton graph, calibration and
//! repair are the core's (`ramulus_core::cleared`); this file only translates, and keeps the
//! last trace's steps so that showing another step does not trace again.

use std::cell::RefCell;

use ramulus_core::cleared::{
    build_cleared_specimen, ClearedLeaf, ClearedOptions, GreyImage, VeinThreshold,
    DEFAULT_SPUR_LENGTH,
};
use serde_json::{json, Value};
use wasm_bindgen::prelude::*;

use crate::specimen::{options_from_json, specimen_json};

thread_local! {
    /// The steps of the last image traced (the page is single-threaded).
    static LAST_TRACE: RefCell<Option<ClearedLeaf>> = const { RefCell::new(None) };
}

/// Millimetres per pixel a PNG file states in its `pHYs` chunk in metres (PNG specification,
/// W3C 2003, section 11.3.5.3), or NaN when it states none (a JPEG's density is not read
/// here): the browser's decoding drops it, so the page asks when an image is opened. Reads
/// the chunk headers only (the page's wasm has no image decoder).
#[wasm_bindgen]
pub fn cleared_image_stated_resolution(bytes: &[u8]) -> f64 {
    png_millimetres_per_pixel(bytes).unwrap_or(f64::NAN)
}

fn png_millimetres_per_pixel(bytes: &[u8]) -> Option<f64> {
    const SIGNATURE: [u8; 8] = [137, 80, 78, 71, 13, 10, 26, 10];
    if bytes.get(..8)? != SIGNATURE {
        return None;
    }
    let mut at = 8;
    while at + 8 <= bytes.len() {
        let length = u32::from_be_bytes(bytes[at..at + 4].try_into().ok()?) as usize;
        let kind = &bytes[at + 4..at + 8];
        let data = bytes.get(at + 8..(at + 8).checked_add(length)?)?;
        match kind {
            b"pHYs" if length == 9 => {
                let x = u32::from_be_bytes(data[0..4].try_into().ok()?);
                let y = u32::from_be_bytes(data[4..8].try_into().ok()?);
                // Unit 1: pixels per metre; square pixels only.
                return (data[8] == 1 && x == y && x > 0).then(|| 1000.0 / f64::from(x));
            }
            b"IDAT" | b"IEND" => return None,
            _ => at += 12 + length,
        }
    }
    None
}

/// Traces veins from a cleared-leaf image and measures them. `rgba`: `width x height` pixels,
/// four bytes each, rows from the top. `options_json`: the options of `measure_specimen`
/// (`units`, `scale`, `root`, `snap`; points and the factor per image pixel) plus `image`:
/// `{"leaf": "dark" | "light", "veins": "dark" | "light", "threshold": "otsu" | {"window": W,
/// "offset": O}, "spur": S | "", "millimetres_per_pixel": M | null}` (M: the file's stated
/// resolution, used when the scale is "file"). Returns `{error: {message}}` or the
/// specimen's JSON (as `measure_specimen`) with `image` holding each step's numbers.
#[wasm_bindgen]
pub fn trace_cleared_image(rgba: &[u8], width: u32, height: u32, options_json: &str) -> String {
    console_error_panic_hook::set_once();
    match trace(rgba, width, height, options_json) {
        Ok(value) => value.to_string(),
        Err(message) => json!({ "error": { "message": message } }).to_string(),
    }
}

/// One step of the last trace as RGBA pixels for display, `step` one of "leaf", "veins",
/// "skeleton": the step's pixels in its colour, the rest transparent. Empty when nothing was
/// traced yet or the step is unknown.
#[wasm_bindgen]
pub fn cleared_image_step_rgba(step: &str) -> Vec<u8> {
    LAST_TRACE.with(|last| {
        let last = last.borrow();
        let Some(leaf) = last.as_ref() else {
            return Vec::new();
        };
        // Okabe-Ito colours (Okabe & Ito 2008, "Color Universal Design"), lightened for the
        // leaf so the traced veins drawn over it stay readable.
        let (on, colour): (&[bool], [u8; 4]) = match step {
            "leaf" => (&leaf.leaf_mask, [200, 228, 214, 255]),
            "veins" => (&leaf.vein_mask, [86, 180, 233, 255]),
            "skeleton" => (&leaf.skeleton, [213, 94, 0, 255]),
            _ => return Vec::new(),
        };
        let mut pixels = Vec::with_capacity(on.len() * 4);
        for &set in on {
            pixels.extend(if set { colour } else { [0, 0, 0, 0] });
        }
        pixels
    })
}

/// A number of the image options, as a JSON number or typed text; `None` when empty.
fn image_number(value: &Value, what: &str) -> Result<Option<f64>, String> {
    match value {
        Value::Null => Ok(None),
        Value::Number(number) => Ok(number.as_f64()),
        Value::String(text) if text.trim().is_empty() => Ok(None),
        Value::String(text) => match text.trim().parse::<f64>() {
            Ok(number) if number.is_finite() => Ok(Some(number)),
            _ => Err(format!("{what} must be a number, is \"{}\"", text.trim())),
        },
        other => Err(format!("{what} must be a number, is {other}")),
    }
}

/// The core's image options from the page's `image` object (the same limits as
/// `ramulus measure --local-threshold` and `--spur`).
fn cleared_options(image: &Value) -> Result<ClearedOptions, String> {
    let vein_threshold = match &image["threshold"] {
        Value::Null => VeinThreshold::Global,
        Value::String(text) if text == "otsu" => VeinThreshold::Global,
        object @ Value::Object(_) => {
            let window = image_number(&object["window"], "the window")?
                .ok_or("the window is empty: type its side in pixels")?;
            if !(3.0..=1001.0).contains(&window) || window.fract() != 0.0 {
                return Err(format!(
                    "the window must be a whole number of pixels from 3 to 1001, is {window}"
                ));
            }
            let offset = image_number(&object["offset"], "the offset")?.unwrap_or(0.0);
            VeinThreshold::Local {
                window: window as u32,
                offset,
            }
        }
        other => {
            return Err(format!(
                "threshold must be \"otsu\" or an object, is {other}"
            ))
        }
    };
    let spur_length =
        image_number(&image["spur"], "the spur length")?.unwrap_or(DEFAULT_SPUR_LENGTH);
    if spur_length < 0.0 {
        return Err(format!(
            "the spur length must be 0 or more pixels, is {spur_length}"
        ));
    }
    Ok(ClearedOptions {
        leaf_darker: image["leaf"].as_str() != Some("light"),
        veins_darker: image["veins"].as_str() != Some("light"),
        vein_threshold,
        spur_length,
        ..ClearedOptions::default()
    })
}

fn trace(rgba: &[u8], width: u32, height: u32, options_json: &str) -> Result<Value, String> {
    let options = options_from_json(options_json)?;
    let page: Value = serde_json::from_str(options_json)
        .map_err(|error| format!("image options are not JSON: {error}"))?;
    let image_options = cleared_options(&page["image"])?;
    let mut image = GreyImage::from_rgba(width, height, rgba).map_err(|error| error.to_string())?;
    image.millimetres_per_pixel = image_number(
        &page["image"]["millimetres_per_pixel"],
        "the stated resolution",
    )?
    .filter(|millimetres| *millimetres > 0.0);
    // A failed trace forgets the last one's steps: they no longer belong to the settings.
    LAST_TRACE.with(|last| *last.borrow_mut() = None);
    let read = build_cleared_specimen(&image, &image_options, &options)
        .map_err(|error| error.to_string())?;
    drop(image);
    let mut value = specimen_json(&read.specimen)?;
    value["image"] = ramulus_core::cleared::report::steps_report(
        &read.leaf,
        &image_options,
        read.specimen.calibration.factor,
    );
    LAST_TRACE.with(|last| *last.borrow_mut() = Some(read.leaf));
    Ok(value)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A 40 x 40 white sheet with a dark leaf (grey 120) and darker veins (grey 30) drawn as a
    /// T, each line 3 pixels wide: a stem of 20 pixels and an arm of 16 (thinning keeps the
    /// middle line, Zhang & Suen 1984), 18 mm at 0.5 mm per pixel.
    fn t_shaped_leaf() -> Vec<u8> {
        let mut rgba = Vec::with_capacity(40 * 40 * 4);
        for y in 0..40 {
            for x in 0..40 {
                let leaf = (5..35).contains(&x) && (5..35).contains(&y);
                let stem = (19..22).contains(&x) && (10..30).contains(&y);
                let arm = (12..28).contains(&x) && (13..16).contains(&y);
                let grey = if leaf && (stem || arm) {
                    30
                } else if leaf {
                    120
                } else {
                    255
                };
                rgba.extend([grey, grey, grey, 255]);
            }
        }
        rgba
    }

    #[test]
    fn a_t_shaped_vein_traces_and_its_steps_come_back() {
        let options = r#"{"units": "mm", "scale": "file", "root": null,
            "image": {"threshold": "otsu", "spur": 2, "millimetres_per_pixel": 0.5}}"#;
        let out: Value =
            serde_json::from_str(&trace_cleared_image(&t_shaped_leaf(), 40, 40, options)).unwrap();
        assert!(out["error"].is_null(), "{out}");
        let total = out["total_length"].as_f64().unwrap();
        // Thinning eats into each of the three free ends, so the trace is shorter than the
        // lines drawn (18 mm) but longer than the stem alone (10 mm): the arms were kept.
        assert!(total > 10.0 && total <= 18.0, "total length {total} mm");
        assert_eq!(out["image"]["branch_points"], 1, "{}", out["image"]);
        let skeleton = cleared_image_step_rgba("skeleton");
        assert_eq!(skeleton.len(), 40 * 40 * 4);
        let on = skeleton.chunks_exact(4).filter(|p| p[3] == 255).count();
        assert_eq!(on as u64, out["image"]["skeleton_pixels"].as_u64().unwrap());
        assert!(cleared_image_step_rgba("photo").is_empty());
    }

    /// 50 000 pixels per metre is 0.02 mm per pixel (PNG specification, W3C 2003, 11.3.5.3).
    #[test]
    fn a_png_phys_chunk_gives_millimetres_per_pixel() {
        let mut png = vec![137, 80, 78, 71, 13, 10, 26, 10];
        png.extend([0, 0, 0, 9]);
        png.extend(b"pHYs");
        png.extend(50_000u32.to_be_bytes());
        png.extend(50_000u32.to_be_bytes());
        png.extend([1, 0, 0, 0, 0]);
        assert!((cleared_image_stated_resolution(&png) - 0.02).abs() < 1e-15);
        png[24] = 0; // unit unknown: no physical size
        assert!(cleared_image_stated_resolution(&png).is_nan());
        assert!(cleared_image_stated_resolution(b"GIF89a").is_nan());
    }

    #[test]
    fn a_zero_size_image_and_a_short_buffer_are_named() {
        let out: Value =
            serde_json::from_str(&trace_cleared_image(&[], 0, 0, r#"{"image": {}}"#)).unwrap();
        let message = out["error"]["message"].as_str().unwrap();
        assert!(message.contains("0 x 0 pixels"), "{message}");
        let out: Value =
            serde_json::from_str(&trace_cleared_image(&[0; 12], 2, 2, r#"{"image": {}}"#)).unwrap();
        let message = out["error"]["message"].as_str().unwrap();
        assert!(message.contains("16"), "{message}");
        assert!(cleared_image_step_rgba("leaf").is_empty());
        let out: Value = serde_json::from_str(&trace_cleared_image(
            &t_shaped_leaf(),
            40,
            40,
            r#"{"image": {"threshold": {"window": 2, "offset": 0}}}"#,
        ))
        .unwrap();
        assert!(out["error"]["message"].as_str().unwrap().contains("window"));
    }
}
