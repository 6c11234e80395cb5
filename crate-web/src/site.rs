//! Drainage sites for the page: the runoff table and the sizing defaults of each unit system
//! (`runoff_surfaces_json`, `drainage_defaults_json`), and the texts of a sized run (tables,
//! CSV, GeoJSON, plan) that `Simulation`'s drainage methods return. Computing is the core's,
//! words and drawing `ramulus-draw`'s.

use ramulus_core::drainage::units::metres_per_network_unit;
use ramulus_core::drainage::{
    schedule_csv, site_geojson, Conveyance, RunoffTable, SizingRules, UnitSystem,
};
use ramulus_core::link::encode_link;
use ramulus_core::params::Params;
use ramulus_core::run::{RunView, SITE_CAUTION};
use ramulus_core::site::{ground_flow, read_site, unreached_parts, Site, Terrain};
use ramulus_core::site_sizing::{read_sizing_form, size_run, SiteDesign, SizedSite};
use ramulus_draw::site_overlay::ground_flow_lines;
use ramulus_draw::site_plan::plan_svg;
use ramulus_draw::site_texts::{
    site_plan_input, site_summary, site_tables, unreached_plan, unreached_summary,
};
use serde_json::json;
use wasm_bindgen::prelude::*;

/// The runoff table's surfaces as `[{surface, coefficient, low, high, source}]` (HEC-22's
/// ranges; the coefficient offered is the upper end).
#[wasm_bindgen]
pub fn runoff_surfaces_json() -> String {
    let rows: Vec<_> = RunoffTable::default()
        .surfaces
        .into_iter()
        .map(|row| {
            json!({ "surface": row.label, "key": row.surface, "coefficient": row.c,
                    "low": row.low, "high": row.high, "source": row.source })
        })
        .collect();
    serde_json::Value::Array(rows).to_string()
}

/// The design form's defaults and unit labels for `si` or `us`: pipe sizes (mm or in),
/// velocity limits, and the unit of each quantity.
#[wasm_bindgen]
pub fn drainage_defaults_json(system: &str) -> String {
    let system = if system == "us" {
        UnitSystem::Us
    } else {
        UnitSystem::Si
    };
    let rules = SizingRules::pipes(system);
    let pipe_sizes: Vec<f64> = match &rules.conveyance {
        Conveyance::Pipes { diameters } => diameters
            .iter()
            .map(|&d| (system.diameter_from_si(d) * 1000.0).round() / 1000.0)
            .collect(),
        Conveyance::Swale(_) => Vec::new(),
    };
    let round = |v: f64| (v * 100.0).round() / 100.0;
    json!({
        "pipe_sizes": pipe_sizes,
        "velocity_min": round(system.velocity_from_si(rules.min_velocity)),
        "velocity_max": round(system.velocity_from_si(rules.max_velocity)),
        "units": {
            "intensity": system.intensity_unit(),
            "diameter": system.diameter_unit(),
            "velocity": system.velocity_unit(),
            "length": system.length_unit(),
        },
    })
    .to_string()
}

/// A site file checked: `{summary}` (its size, area and features in a sentence) or `{error}`
/// naming the feature and what is wrong.
#[wasm_bindgen]
pub fn site_summary_json(text: &str) -> String {
    match read_site(text.as_bytes()) {
        Ok(site) => json!({ "summary": site_summary(&site) }).to_string(),
        Err(error) => json!({ "error": error.to_string() }).to_string(),
    }
}

/// A site plan drawn as SVG, read at the scale `scale_text` (`1:200`, `0.05 m per unit`):
/// `{geojson}` (the same site as a site file, for the site panel to open) or `{error}` naming
/// the element, its line and what is wrong.
#[wasm_bindgen]
pub fn site_svg_json(text: &str, scale_text: &str) -> String {
    let read = ramulus_core::site_plan_svg::parse_svg_scale(scale_text)
        .and_then(|scale| ramulus_core::site_plan_svg::read_site_svg(text.as_bytes(), &scale));
    match read {
        Ok(site) => json!({ "geojson": site.to_geojson() }).to_string(),
        Err(error) => json!({ "error": error.to_string() }).to_string(),
    }
}

/// A site file as a run link on cells of `cell_text` (the site's unit): `{link, summary}`, or
/// `{error}` naming what is wrong (the file or the cell size). Parts no outlet can reach are
/// no error: the finished run shows them (`unreached_json`). The ground comes from the file's
/// spot levels, or is taken as flat when it has none.
#[wasm_bindgen]
pub fn site_link_json(text: &str, cell_text: &str) -> String {
    let error = |message: String| json!({ "error": message }).to_string();
    let site = match read_site(text.as_bytes()) {
        Ok(site) => site,
        Err(problem) => return error(problem.to_string()),
    };
    let cell: f64 = match cell_text.trim().parse() {
        Ok(value) => value,
        Err(_) => {
            return error(format!(
                "grid cell: \"{}\" is not a length in {}",
                cell_text.chars().take(40).collect::<String>(),
                site.units
            ))
        }
    };
    let terrain = if site.levels.len() >= 3 {
        Terrain::SpotLevels
    } else {
        Terrain::Grade {
            east: 0.0,
            north: 0.0,
        }
    };
    match site.to_params(cell, &terrain) {
        Ok(params) => {
            let flat = if matches!(terrain, Terrain::Grade { .. }) {
                " No spot levels: the ground is taken as flat, so every channel will be flagged as flatter than the least grade."
            } else {
                ""
            };
            json!({
                "link": encode_link(&params),
                "summary": format!("{}{flat}", site_summary(&site)),
            })
            .to_string()
        }
        Err(problem) => error(problem.to_string()),
    }
}

/// The site file the page's site panel grew, if its text reads.
pub(crate) fn site_file(text: &str) -> Option<Site> {
    (!text.trim().is_empty())
        .then(|| read_site(text.as_bytes()).ok())
        .flatten()
}

/// A run sized for the design form `form_json`, or the message naming what is wrong.
pub(crate) fn sized(
    view: &RunView,
    params: &Params,
    form_json: &str,
) -> Result<(SizedSite, SiteDesign), String> {
    let design = read_sizing_form(form_json).map_err(|error| error.to_string())?;
    let sized = size_run(view, params, &design).map_err(|error| error.to_string())?;
    Ok((sized, design))
}

/// The page's tables as JSON `{columns, rows, outlets, flags_text, caution}`, or `{error}`.
pub(crate) fn drainage_tables_json(
    view: &RunView,
    params: &Params,
    form_json: &str,
    site_text: &str,
) -> String {
    match sized(view, params, form_json) {
        Ok((sized, _)) => {
            let site = site_file(site_text);
            let tables = site_tables(&sized.hydraulics, site.as_ref());
            let mut value = serde_json::to_value(&tables).unwrap_or_else(|_| json!({}));
            value["caution"] = json!(SITE_CAUTION);
            value.to_string()
        }
        Err(message) => json!({ "error": message }).to_string(),
    }
}

/// The schedule as CSV.
pub(crate) fn drainage_csv(
    view: &RunView,
    params: &Params,
    form_json: &str,
) -> Result<String, String> {
    sized(view, params, form_json).map(|(sized, _)| schedule_csv(&sized.hydraulics))
}

/// The channels as GeoJSON.
pub(crate) fn drainage_geojson(
    view: &RunView,
    params: &Params,
    form_json: &str,
) -> Result<String, String> {
    sized(view, params, form_json)
        .map(|(sized, _)| site_geojson(&sized.network, &sized.hydraulics, &sized.unreached))
}

/// The drainage plan as SVG.
/// `site_text`: the site file the run was made from (names on the plan), or empty.
pub(crate) fn drainage_plan_svg(
    view: &RunView,
    params: &Params,
    form_json: &str,
    site_text: &str,
) -> Result<String, String> {
    let (sized, design) = sized(view, params, form_json)?;
    let metadata = json!({ "params": params, "digest": view.digest }).to_string();
    let site = site_file(site_text);
    Ok(plan_svg(&site_plan_input(
        &sized,
        params,
        &design,
        site.as_ref(),
        SITE_CAUTION,
        metadata,
    )))
}

/// The parts of a finished site no outlet reaches, for the page's canvas and panel: JSON
/// `{parts: [{rings: [[x, y, x, y, ...], ...], label, label_at: [x, y]}], text}` in the
/// network's frame (physical units, y down the page); `text` is null when every part is
/// reached. `site_text`: the site file the run came from (places in its coordinates), or
/// empty; `system`: `si` or `us` (the units of the words).
pub(crate) fn unreached_json(
    view: &RunView,
    params: &Params,
    site_text: &str,
    system: &str,
) -> String {
    let system = if system == "us" {
        UnitSystem::Us
    } else {
        UnitSystem::Si
    };
    let parts = unreached_parts(params, &view.network);
    let site = site_file(site_text);
    let units = &params.domain.units;
    let shown: Vec<_> = unreached_plan(&parts, units, system)
        .into_iter()
        .map(|part| {
            let rings: Vec<Vec<f64>> = part
                .rings
                .iter()
                .map(|ring| ring.iter().flat_map(|&[x, y]| [x, y]).collect())
                .collect();
            json!({ "rings": rings, "label": part.label, "label_at": part.label_at })
        })
        .collect();
    json!({
        "parts": shown,
        "text": unreached_summary(&parts, units, system, site.as_ref()),
    })
    .to_string()
}

/// The site's areas kept clear (buildings, trees, paths) for the page's canvas, JSON: a list
/// of `{ring, name}`, `ring` being `x, y` pairs in the network's frame (the run's obstacles,
/// given in cells, times the cell size) and `name` the site file's name for it, or empty.
/// Empty off a site. The names come from `site_text` (the file the run came from, or empty)
/// when it lists as many obstacles as the run has, which it does in file order.
pub(crate) fn obstacles_json(params: &Params, site_text: &str) -> String {
    if !params.is_site() {
        return "[]".to_string();
    }
    let size = params.domain.cell_size;
    let names: Vec<String> = site_file(site_text)
        .filter(|site| site.obstacles.len() == params.domain.obstacles.len())
        .map(|site| {
            site.obstacles
                .iter()
                .map(|obstacle| obstacle.name.clone().unwrap_or_default())
                .collect()
        })
        .unwrap_or_default();
    let shown: Vec<_> = params
        .domain
        .obstacles
        .iter()
        .enumerate()
        .map(|(index, ring)| {
            let ring: Vec<f64> = ring
                .iter()
                .flat_map(|&[x, y]| [x * size, y * size])
                .collect();
            let name = names.get(index).cloned().unwrap_or_default();
            json!({ "ring": ring, "name": name })
        })
        .collect();
    serde_json::Value::from(shown).to_string()
}

/// Natural flow on a site's bare ground for the page's canvas: `{lines, flat, text}`, `lines`
/// being `x0, y0, x1, y1, class` per cell that passes its water on (`site_overlay`), in the
/// network's frame; none on flat ground, which `text` then says.
pub(crate) fn ground_flow_overlay(params: &Params) -> (Vec<f32>, String) {
    let flat = params.domain.levels.is_empty()
        && params.domain.grade_x == 0.0
        && params.domain.grade_y == 0.0;
    if !params.is_site() || flat || metres_per_network_unit(&params.domain.units).is_err() {
        return (
            Vec::new(),
            "The ground is flat: water shows no way of its own before any channel.".into(),
        );
    }
    let flow = ground_flow(params);
    let lines = ground_flow_lines(&flow, params.domain.cell_size);
    let text = format!(
        "Where water runs on the bare ground, cell by cell to the steepest of its eight neighbours (D8, O'Callaghan & Mark 1984); {} low spot{} where it ponds.",
        flow.low_spots.len(),
        if flow.low_spots.len() == 1 { "" } else { "s" }
    );
    (lines, text)
}
