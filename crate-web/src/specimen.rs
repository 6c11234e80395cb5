//! Specimens on the page: a traced SVG, GeoJSON or CSV file's bytes plus the page's calibration
//! options in, JSON out (`measure_specimen`): the repaired network's segments for drawing, its
//! metrics in the metric table's keys (the same `RunView` pipeline and the same JSON as
//! `ramulus measure --json`), the repair report with a marker point per repair, and how the
//! scale and root were chosen. `specimen_comparison_json` lines a specimen's metrics up with
//! those of several seeds of a grown run (mean, seed-to-seed standard deviation, difference in
//! standard deviations). Reading, calibrating, repairing and measuring are the core's; this
//! file only translates.

use ramulus_core::metrics::{Metrics, Reading, METRIC_TABLE};
use ramulus_core::params::Params;
use ramulus_core::run::RunView;
use ramulus_core::specimen::{
    build_specimen, Repair, ScaleRule, Specimen, SpecimenError, SpecimenFormat, SpecimenOptions,
    DEFAULT_FLATTEN_TOLERANCE, MAX_SPECIMEN_BYTES,
};
use ramulus_draw::format::four_digits;
use ramulus_draw::scale_bar::scale_bar;
use serde_json::{json, Value};
use wasm_bindgen::prelude::*;

/// The repair kinds in the order of `RepairReport::counts`, with the words the page lists them
/// under and the colour of their markers (Okabe-Ito colours, Okabe & Ito 2008, "Color Universal
/// Design", chosen to stay apart for colour-blind readers).
const REPAIR_KINDS: [(&str, &str, &str); 6] = [
    ("merged_ends", "line ends merged", "#0072b2"),
    ("joined_to_line", "ends joined to a line", "#009e73"),
    ("split_crossing", "crossings split", "#d55e00"),
    (
        "dropped_zero_length",
        "zero-length pieces dropped",
        "#cc79a7",
    ),
    ("dropped_duplicate", "pieces drawn twice dropped", "#e69f00"),
    ("disconnected_part", "disconnected parts", "#56b4e9"),
];

/// Largest specimen file the page reads, in bytes: the core's limit, so the page can refuse a
/// larger file before reading it.
#[wasm_bindgen]
pub fn specimen_max_bytes() -> f64 {
    MAX_SPECIMEN_BYTES as f64
}

/// Reads, calibrates, repairs and measures a specimen. `options_json`:
/// `{"units": "mm" | null, "scale": "file" | {"factor": F} | {"from": [x, y], "to": [x, y],
/// "distance": D}, "root": [x, y] | null, "snap": S | null}`, points in file coordinates.
/// Returns JSON `{error: {message}}` or the specimen (see the module comment): `format`,
/// `units`, `calibration {factor, rule}`, `to_file [sx, sy]` (file coordinates per output
/// unit along x and y), `snap_tolerance`, `nodes`, `segments`, `total_length`, `metrics`,
/// `rows`, `ends` (x0, y0, x1, y1 per segment), `bounds`, `outline`, `repairs`, `kinds`,
/// `roots`, `notes`, `scale_bars`.
#[wasm_bindgen]
pub fn measure_specimen(bytes: &[u8], options_json: &str) -> String {
    console_error_panic_hook::set_once();
    match measure(bytes, options_json) {
        Ok(value) => value.to_string(),
        Err(message) => json!({ "error": { "message": message } }).to_string(),
    }
}

/// The core's refusal of a file of `bytes` bytes as too large to be a specimen, or "" when
/// its size is allowed: the page asks before reading the file.
#[wasm_bindgen]
pub fn specimen_size_refusal(bytes: f64) -> String {
    if bytes > MAX_SPECIMEN_BYTES as f64 {
        SpecimenError::TooLarge {
            bytes: bytes as usize,
        }
        .to_string()
    } else {
        String::new()
    }
}

/// A number as the readings write it (up to four significant digits, `format::four_digits`).
#[wasm_bindgen]
pub fn specimen_number_text(value: f64) -> String {
    four_digits(value)
}

/// A round scale bar about `target_pixels` long in `units` (see `ramulus_draw::scale_bar`), as
/// JSON `{length, pixels, label}`.
#[wasm_bindgen]
pub fn specimen_scale_bar_json(pixels_per_unit: f64, target_pixels: f64, units: &str) -> String {
    serde_json::to_string(&scale_bar(pixels_per_unit, target_pixels, units))
        .unwrap_or_else(|_| "{}".to_string())
}

/// The specimen's metrics beside a grown run's over several seeds. `specimen_metrics`: one
/// metrics object (as `measure_specimen` gives); `run_metrics`: a JSON array of metrics
/// objects, one per seed (as `Simulation::metrics_json` gives). Returns JSON `{seeds, rows:
/// [{key, label, unit, specimen, mean, spread, difference, texts: [specimen, mean, spread,
/// difference]}]}` for every single-valued metric of the metric table, or `{error: {message}}`.
#[wasm_bindgen]
pub fn specimen_comparison_json(
    specimen_metrics: &str,
    run_metrics: &str,
    specimen_units: &str,
    run_units: &str,
) -> String {
    match comparison(specimen_metrics, run_metrics, specimen_units, run_units) {
        Ok(value) => value.to_string(),
        Err(message) => json!({ "error": { "message": message } }).to_string(),
    }
}

/// A number of an options object, as a JSON number or as the text the user typed; `None`
/// when absent, null or empty.
fn number(value: &Value, what: &str) -> Result<Option<f64>, String> {
    match value {
        Value::Null => Ok(None),
        Value::Number(number) => Ok(number.as_f64()),
        Value::String(text) if text.trim().is_empty() => Ok(None),
        Value::String(text) => match text.trim().parse::<f64>() {
            Ok(number) if number.is_finite() => Ok(Some(number)),
            _ => Err(format!(
                "{what} must be a finite number, is \"{}\"",
                text.trim()
            )),
        },
        other => Err(format!("{what} must be a number, is {other}")),
    }
}

fn point(value: &Value, what: &str) -> Result<Option<(f64, f64)>, String> {
    match value {
        Value::Null => Ok(None),
        Value::Array(pair) if pair.len() == 2 => {
            match (number(&pair[0], what)?, number(&pair[1], what)?) {
                (Some(x), Some(y)) => Ok(Some((x, y))),
                _ => Err(format!("{what} must be two numbers [x, y]")),
            }
        }
        other => Err(format!("{what} must be two numbers [x, y], is {other}")),
    }
}

/// The core's options from the page's JSON.
pub(crate) fn options_from_json(options_json: &str) -> Result<SpecimenOptions, String> {
    let options: Value = serde_json::from_str(options_json)
        .map_err(|error| format!("specimen options are not JSON: {error}"))?;
    let units = match &options["units"] {
        Value::Null => None,
        Value::String(text) if text.trim().is_empty() => None,
        Value::String(text) => Some(text.trim().to_string()),
        other => return Err(format!("units must be text, are {other}")),
    };
    let scale = match &options["scale"] {
        Value::Null => ScaleRule::FromFile,
        Value::String(text) if text == "file" => ScaleRule::FromFile,
        object @ Value::Object(_) if !object["factor"].is_null() => ScaleRule::Factor(
            number(&object["factor"], "the scale factor")?.ok_or_else(|| {
                "the scale factor is empty: type the units per file unit".to_string()
            })?,
        ),
        object @ Value::Object(_) => {
            let from = point(&object["from"], "the scale bar's first point")?;
            let to = point(&object["to"], "the scale bar's second point")?;
            let distance = number(&object["distance"], "the scale bar's length")?;
            match (from, to, distance) {
                (Some(from), Some(to), Some(distance)) => {
                    ScaleRule::TwoPoints { from, to, distance }
                }
                (Some(_), Some(_), None) => {
                    return Err("the scale bar's length is empty: type it".to_string())
                }
                _ => {
                    return Err(
                        "a scale bar needs two points and the length between them".to_string()
                    )
                }
            }
        }
        other => return Err(format!("scale must be \"file\" or an object, is {other}")),
    };
    Ok(SpecimenOptions {
        units,
        scale,
        root: point(&options["root"], "the root")?,
        snap_tolerance: number(&options["snap"], "the snap tolerance")?,
        flatten_tolerance: DEFAULT_FLATTEN_TOLERANCE,
    })
}

/// Where the page marks a repair, in output units.
fn marker_of(repair: &Repair) -> (f64, f64) {
    match repair {
        Repair::MergedEnds { at, .. }
        | Repair::JoinedToLine { at, .. }
        | Repair::SplitCrossing { at }
        | Repair::DroppedZeroLength { at, .. }
        | Repair::Root { at, .. } => *at,
        Repair::DroppedDuplicate { from, to } => ((from.0 + to.0) / 2.0, (from.1 + to.1) / 2.0),
        Repair::DisconnectedPart { root, .. } => *root,
    }
}

fn measure(bytes: &[u8], options_json: &str) -> Result<Value, String> {
    let options = options_from_json(options_json)?;
    let specimen = build_specimen(bytes, &options).map_err(|error| error.to_string())?;
    specimen_json(&specimen)
}

/// The page's JSON of a calibrated, repaired specimen (see `measure_specimen`).
pub(crate) fn specimen_json(specimen: &Specimen) -> Result<Value, String> {
    // The same pipeline as a grown network and as `ramulus measure`: topology, conducting
    // network, widths, metrics.
    let view = RunView::new(specimen.network.clone(), &Params::default())
        .map_err(|error| format!("internal: the repaired network is not valid: {error}"))?;
    let network = &view.network;
    let mut ends = Vec::with_capacity(network.segments.len() * 4);
    let (mut low, mut high) = (
        (f64::INFINITY, f64::INFINITY),
        (f64::NEG_INFINITY, f64::NEG_INFINITY),
    );
    let mut widen = |x: f64, y: f64| {
        low = (low.0.min(x), low.1.min(y));
        high = (high.0.max(x), high.1.max(y));
    };
    for segment in &network.segments {
        let a = &network.nodes[segment.from as usize];
        let b = &network.nodes[segment.to as usize];
        ends.extend([a.x, a.y, b.x, b.y]);
        widen(a.x, a.y);
        widen(b.x, b.y);
    }
    if let Some(ring) = &specimen.outline {
        for &(x, y) in ring {
            widen(x, y);
        }
    }
    let factor = specimen.calibration.factor;
    let y_sign = if specimen.format == SpecimenFormat::GeoJson {
        -1.0
    } else {
        1.0
    };
    let to_output = |(x, y): (f64, f64)| [x * factor, y * y_sign * factor];
    let repairs: Vec<Value> = specimen
        .report
        .repairs
        .iter()
        .filter(|repair| !matches!(repair, Repair::Root { .. }))
        .map(|repair| {
            let mut object = serde_json::to_value(repair).unwrap_or_else(|_| json!({}));
            let (x, y) = marker_of(repair);
            object["marker"] = json!([x, y]);
            object["message"] = json!(repair.to_string());
            object
        })
        .collect();
    let counts = specimen.report.counts();
    let kinds: Vec<Value> = REPAIR_KINDS
        .iter()
        .zip(counts)
        .map(|(&(kind, label, colour), count)| {
            json!({ "kind": kind, "label": label, "colour": colour, "count": count })
        })
        .collect();
    let roots: Vec<Value> = specimen
        .report
        .repairs
        .iter()
        .filter_map(|repair| match repair {
            Repair::Root { part, at, rule, .. } => Some(json!({
                "part": part, "at": [at.0, at.1], "rule": rule, "message": repair.to_string(),
            })),
            _ => None,
        })
        .collect();
    let units = specimen.calibration.units.clone();
    Ok(json!({
        "format": specimen.format.name(),
        "units": units,
        "calibration": { "factor": factor, "rule": specimen.calibration.rule },
        "to_file": [1.0 / factor, y_sign / factor],
        "snap_tolerance": specimen.report.snap_tolerance,
        "nodes": network.nodes.len(),
        "segments": network.segment_count(),
        "total_length": view.metrics.total_length,
        "metrics": view.metrics,
        "rows": ramulus_draw::texts::readings_rows(&view.metrics, &units),
        "ends": ends,
        "bounds": [low.0, low.1, high.0, high.1],
        "outline": specimen.outline.as_ref().map(|ring| ring.iter().map(|&(x, y)| [x, y]).collect::<Vec<_>>()),
        "repairs": repairs,
        "kinds": kinds,
        "roots": roots,
        "notes": specimen.notes,
        "scale_bars": specimen.scale_bars.iter().map(|&(from, to, ref element)| json!({
            "from": [from.0, from.1], "to": [to.0, to.1], "element": element,
            "from_output": to_output(from), "to_output": to_output(to),
        })).collect::<Vec<_>>(),
    }))
}

/// The value of a single-valued metric, `None` where undefined; `Err` for the histogram and
/// the per-order streams, which have no single value.
fn single_value(reading: Reading) -> Result<Option<f64>, ()> {
    match reading {
        Reading::Number(value) => Ok(value.filter(|value| value.is_finite())),
        Reading::Count(count) => Ok(Some(count as f64)),
        Reading::OptionalCount(count) => Ok(count.map(|count| count as f64)),
        Reading::Histogram(_) | Reading::Streams(_) => Err(()),
    }
}

/// Mean and sample standard deviation (divisor n - 1) of the values; the deviation is `None`
/// for fewer than two values.
pub fn mean_and_deviation(values: &[f64]) -> (Option<f64>, Option<f64>) {
    if values.is_empty() {
        return (None, None);
    }
    let count = values.len() as f64;
    let mean = values.iter().sum::<f64>() / count;
    if values.len() < 2 {
        return (Some(mean), None);
    }
    let squares: f64 = values
        .iter()
        .map(|value| (value - mean) * (value - mean))
        .sum();
    (Some(mean), Some((squares / (count - 1.0)).sqrt()))
}

fn comparison(
    specimen_metrics: &str,
    run_metrics: &str,
    specimen_units: &str,
    run_units: &str,
) -> Result<Value, String> {
    let specimen: Metrics = serde_json::from_str(specimen_metrics)
        .map_err(|error| format!("the specimen's metrics are not readable: {error}"))?;
    let runs: Vec<Metrics> = serde_json::from_str(run_metrics)
        .map_err(|error| format!("the runs' metrics are not readable: {error}"))?;
    let text = |value: Option<f64>| value.map_or_else(|| "n/a".to_string(), four_digits);
    let mut rows = Vec::new();
    for entry in METRIC_TABLE {
        let Ok(own) = single_value((entry.read)(&specimen)) else {
            continue;
        };
        let values: Vec<f64> = runs
            .iter()
            .filter_map(|run| single_value((entry.read)(run)).ok().flatten())
            .collect();
        let (mean, spread) = mean_and_deviation(&values);
        let difference = match (own, mean, spread) {
            (Some(own), Some(mean), Some(spread)) if spread > 0.0 => Some((own - mean) / spread),
            _ => None,
        };
        let difference_text = match (own, mean, spread, difference) {
            (_, _, _, Some(difference)) => four_digits(difference),
            (Some(own), Some(mean), Some(_), None) if own == mean => "0 (no spread)".to_string(),
            (Some(_), Some(_), Some(_), None) => "n/a (no spread)".to_string(),
            _ => "n/a".to_string(),
        };
        let alpha = specimen.transport_alpha;
        let unit = entry.unit.text(specimen_units, alpha);
        let run_unit = entry.unit.text(run_units, alpha);
        rows.push(json!({
            "key": entry.key,
            "label": entry.label,
            "unit": if unit == run_unit { unit } else { format!("{unit} / {run_unit}") },
            "specimen": own,
            "mean": mean,
            "spread": spread,
            "difference": difference,
            "defined_runs": values.len(),
            "texts": [text(own), text(mean), text(spread), difference_text],
        }));
    }
    Ok(json!({
        "seeds": runs.len(),
        "same_units": specimen_units == run_units,
        "rows": rows,
    }))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Sample standard deviation of 2, 4, 4, 4, 5, 5, 7, 9: mean 5, sum of squared deviations
    /// 32, so sqrt(32 / 7) (the worked example of the population and sample standard
    /// deviation in any statistics text, e.g. Freedman, Pisani & Purves 2007, "Statistics",
    /// ch. 4 and 26; recalled from memory).
    #[test]
    fn mean_and_sample_deviation_of_a_worked_example() {
        let (mean, deviation) = mean_and_deviation(&[2.0, 4.0, 4.0, 4.0, 5.0, 5.0, 7.0, 9.0]);
        assert_eq!(mean, Some(5.0));
        assert!((deviation.unwrap() - (32.0_f64 / 7.0).sqrt()).abs() < 1e-12);
        assert_eq!(mean_and_deviation(&[3.0]), (Some(3.0), None));
        assert_eq!(mean_and_deviation(&[]), (None, None));
    }

    /// A CSV edge list of an L (3 + 4 units) measures a total length of 7 and its repairs and
    /// roots come back; a bad line is named.
    #[test]
    fn a_csv_trace_measures_and_a_bad_line_is_named() {
        let csv = b"x1,y1,x2,y2\n0,0,3,0\n3,0,3,4\n";
        let out: Value = serde_json::from_str(&measure_specimen(
            csv,
            r#"{"units": "mm", "scale": "file", "root": null}"#,
        ))
        .unwrap();
        assert!(out["error"].is_null(), "{out}");
        assert_eq!(out["total_length"], 7.0);
        assert_eq!(out["metrics"]["total_length"], 7.0);
        assert_eq!(out["segments"], 2);
        assert_eq!(out["ends"].as_array().unwrap().len(), 8);
        assert_eq!(out["roots"].as_array().unwrap().len(), 1);
        assert_eq!(out["kinds"].as_array().unwrap().len(), 6);
        let bad = b"x1,y1,x2,y2\n0,0,3,0\n3,0,oops,4\n";
        let out: Value =
            serde_json::from_str(&measure_specimen(bad, r#"{"units": "mm"}"#)).unwrap();
        let message = out["error"]["message"].as_str().unwrap();
        assert!(message.contains("line 3"), "{message}");
    }

    /// A factor of 2 doubles lengths; a root given in file coordinates is taken (the node
    /// nearest it); a scale bar of two points 3 file units apart said to be 6 mm doubles too.
    #[test]
    fn factor_scale_bar_and_root_reach_the_core() {
        let csv = b"x1,y1,x2,y2\n0,0,3,0\n3,0,3,4\n";
        let doubled: Value = serde_json::from_str(&measure_specimen(
            csv,
            r#"{"units": "mm", "scale": {"factor": 2}, "root": [3, 4]}"#,
        ))
        .unwrap();
        assert_eq!(doubled["total_length"], 14.0);
        assert_eq!(doubled["roots"][0]["rule"], "given");
        assert_eq!(doubled["roots"][0]["at"], json!([6.0, 8.0]));
        assert_eq!(doubled["to_file"], json!([0.5, 0.5]));
        let bar: Value = serde_json::from_str(&measure_specimen(
            csv,
            r#"{"units": "mm", "scale": {"from": [0, 0], "to": [3, 0], "distance": 6}}"#,
        ))
        .unwrap();
        assert_eq!(bar["total_length"], 14.0);
        let refused: Value = serde_json::from_str(&measure_specimen(
            csv,
            r#"{"units": "mm", "scale": {"factor": -1}}"#,
        ))
        .unwrap();
        assert!(refused["error"]["message"]
            .as_str()
            .unwrap()
            .contains("scale factor"));
        // Typed text: a number reads, anything else is named, never taken as absent.
        let typed: Value = serde_json::from_str(&measure_specimen(
            csv,
            r#"{"units": "mm", "scale": {"factor": " 2 "}, "snap": ""}"#,
        ))
        .unwrap();
        assert_eq!(typed["total_length"], 14.0);
        let typo: Value =
            serde_json::from_str(&measure_specimen(csv, r#"{"units": "mm", "snap": "0,1"}"#))
                .unwrap();
        assert_eq!(
            typo["error"]["message"],
            "the snap tolerance must be a finite number, is \"0,1\""
        );
    }

    /// The comparison: a specimen with total length 10 against runs of 8, 10 and 12 (mean 10,
    /// sample deviation 2) differs by 0 deviations; against 6, 8, 10 (mean 8, deviation 2) by
    /// +1.
    #[test]
    fn differences_are_in_seed_to_seed_deviations() {
        let metrics = |length: f64| {
            serde_json::to_value(Metrics {
                total_length: length,
                ..Metrics::default()
            })
            .unwrap()
        };
        let specimen = metrics(10.0).to_string();
        let runs = json!([metrics(6.0), metrics(8.0), metrics(10.0)]).to_string();
        let out: Value =
            serde_json::from_str(&specimen_comparison_json(&specimen, &runs, "mm", "mm")).unwrap();
        assert_eq!(out["seeds"], 3);
        let row = out["rows"]
            .as_array()
            .unwrap()
            .iter()
            .find(|row| row["key"] == "total_length")
            .unwrap();
        assert_eq!(row["mean"], 8.0);
        assert_eq!(row["spread"], 2.0);
        assert_eq!(row["difference"], 1.0);
        assert_eq!(row["texts"][3], "1");
        // Histograms and per-order streams have no single value and are left out.
        assert!(out["rows"]
            .as_array()
            .unwrap()
            .iter()
            .all(|row| row["key"] != "branching_angle_histogram" && row["key"] != "streams"));
    }
}
