//! `ramulus measure` on traced specimens (SVG, GeoJSON, CSV edge lists) and folders: reads the
//! files, hands them to `ramulus_core::specimen::build_specimen`, measures each network with
//! the same pipeline as a grown one (`RunView`), and prints a table, one CSV row per file, or
//! JSON, with the repair report on stderr (or under `repairs`).

use std::io::IsTerminal;

use ramulus_core::metrics::Metrics;
use ramulus_core::params::Params;
use ramulus_core::record::read_record;
use ramulus_core::run::RunView;
use ramulus_core::specimen::{
    build_specimen, specimen_table_csv, ScaleRule, Specimen, SpecimenOptions, SpecimenRow,
    DEFAULT_FLATTEN_TOLERANCE,
};
use serde_json::json;

use crate::options::{CliError, MeasureOptions, SpecimenArgs};

/// File name endings a folder is searched for.
const SPECIMEN_ENDINGS: [&str; 4] = [".svg", ".geojson", ".json", ".csv"];

/// Whether the bytes are a run record rather than a specimen: a JSON object that names the
/// `ramulus-run` format, or one without a `"type"` key (which every GeoJSON object has), so
/// that a damaged record gets the record reader's message.
pub(crate) fn is_record(bytes: &[u8]) -> bool {
    let start = bytes.iter().position(|b| !b.is_ascii_whitespace());
    let has = |needle: &[u8]| bytes.windows(needle.len()).any(|window| window == needle);
    start.is_some_and(|index| bytes[index] == b'{')
        && (has(b"\"ramulus-run\"") || !has(b"\"type\""))
}

/// Whether `measure` has specimen work: a folder, a file that is not a run record, or a
/// specimen option.
pub fn wanted(options: &MeasureOptions) -> bool {
    let specimen = &options.specimen;
    specimen.units.is_some()
        || specimen.scale.is_some()
        || specimen.scale_bar.is_some()
        || specimen.root.is_some()
        || specimen.snap.is_some()
        || specimen.flatten.is_some()
        || options.files.iter().any(|path| {
            let path = std::path::Path::new(path);
            path.is_dir() || std::fs::read(path).is_ok_and(|bytes| !is_record(&bytes))
        })
}

fn numbers(option: &str, text: &str, count: usize, shape: &str) -> Result<Vec<f64>, CliError> {
    let values: Vec<f64> = text
        .split(',')
        .map(|part| part.trim().parse::<f64>())
        .collect::<Result<_, _>>()
        .map_err(|_| {
            CliError::Usage(format!("`{option} {text}`: expected {shape}, numbers only"))
        })?;
    if values.len() != count || values.iter().any(|value| !value.is_finite()) {
        return Err(CliError::Usage(format!(
            "`{option} {text}`: expected {shape} ({count} finite numbers separated by commas)"
        )));
    }
    Ok(values)
}

/// The core's options from the command line's.
pub(crate) fn specimen_options(options: &SpecimenArgs) -> Result<SpecimenOptions, CliError> {
    let scale = match (&options.scale, &options.scale_bar) {
        (Some(factor), _) => ScaleRule::Factor(*factor),
        (None, Some(text)) => {
            let values = numbers("--scale-bar", text, 5, "X1,Y1,X2,Y2,LENGTH")?;
            ScaleRule::TwoPoints {
                from: (values[0], values[1]),
                to: (values[2], values[3]),
                distance: values[4],
            }
        }
        (None, None) => ScaleRule::FromFile,
    };
    let root = match &options.root {
        Some(text) => {
            let values = numbers("--root", text, 2, "X,Y")?;
            Some((values[0], values[1]))
        }
        None => None,
    };
    Ok(SpecimenOptions {
        units: options.units.clone(),
        scale,
        root,
        snap_tolerance: options.snap,
        flatten_tolerance: options.flatten.unwrap_or(DEFAULT_FLATTEN_TOLERANCE),
    })
}

/// The files named, folders replaced by their specimen files in name order.
fn expand(files: &[String]) -> Result<Vec<String>, CliError> {
    let mut paths = Vec::new();
    for path in files {
        if std::path::Path::new(path).is_dir() {
            let entries = std::fs::read_dir(path)
                .map_err(|error| CliError::Failed(format!("{path}: cannot list: {error}")))?;
            let mut found: Vec<String> = entries
                .filter_map(|entry| entry.ok())
                .map(|entry| entry.path())
                .filter(|inner| inner.is_file())
                .map(|inner| inner.to_string_lossy().into_owned())
                .filter(|name| {
                    let lower = name.to_lowercase();
                    SPECIMEN_ENDINGS
                        .iter()
                        .any(|ending| lower.ends_with(ending))
                })
                .collect();
            found.sort();
            if found.is_empty() {
                return Err(CliError::Failed(format!(
                    "{path}: the folder holds no .svg, .geojson, .json or .csv file"
                )));
            }
            paths.extend(found);
        } else {
            paths.push(path.clone());
        }
    }
    Ok(paths)
}

/// One measured file.
struct Measured {
    file: String,
    format: String,
    specimen: Option<Specimen>,
    units: String,
    nodes: usize,
    segments: usize,
    metrics: Metrics,
}

fn measure_one(path: &str, options: &SpecimenOptions) -> Result<Measured, CliError> {
    let bytes = std::fs::read(path)
        .map_err(|error| CliError::Failed(format!("{path}: cannot read: {error}")))?;
    let params = Params::default();
    if is_record(&bytes) {
        let text = String::from_utf8_lossy(&bytes);
        let (_, network) =
            read_record(&text).map_err(|error| CliError::Failed(format!("{path}: {error}")))?;
        let view = RunView::new(network, &params)
            .map_err(|error| CliError::Failed(format!("{path}: {error}")))?;
        return Ok(Measured {
            file: path.to_string(),
            format: "record".to_string(),
            specimen: None,
            units: view.network.units.clone(),
            nodes: view.network.nodes.len(),
            segments: view.network.segment_count(),
            metrics: view.metrics,
        });
    }
    let specimen = build_specimen(&bytes, options)
        .map_err(|error| CliError::Failed(format!("{path}: {error}")))?;
    // The same pipeline as a grown network: topology, conducting network, widths, metrics.
    let view = RunView::new(specimen.network.clone(), &params).map_err(|error| {
        CliError::Failed(format!(
            "{path}: internal: the repaired network is not valid: {error}"
        ))
    })?;
    Ok(Measured {
        file: path.to_string(),
        format: specimen.format.name().to_string(),
        units: specimen.calibration.units.clone(),
        nodes: view.network.nodes.len(),
        segments: view.network.segment_count(),
        metrics: view.metrics,
        specimen: Some(specimen),
    })
}

fn report_on_stderr(one: &Measured) {
    let Some(specimen) = &one.specimen else {
        return;
    };
    eprintln!(
        "{}: {} specimen, scale {}",
        one.file,
        specimen.format.name(),
        specimen.calibration.rule
    );
    for note in &specimen.notes {
        eprintln!("  note: {note}");
    }
    for (from, to, element) in &specimen.scale_bars {
        eprintln!(
            "  scale bar {element} from ({}, {}) to ({}, {}) (file coordinates; give \
             --scale-bar X1,Y1,X2,Y2,LENGTH to use it)",
            from.0, from.1, to.0, to.1
        );
    }
    eprintln!(
        "  repairs (snap tolerance {:.4} {}, coordinates in {}):",
        specimen.report.snap_tolerance, one.units, one.units
    );
    for repair in &specimen.report.repairs {
        eprintln!("    {repair}");
    }
}

fn measured_json(one: &Measured) -> serde_json::Value {
    let specimen = one.specimen.as_ref();
    json!({
        "file": one.file,
        "format": one.format,
        "units": one.units,
        "calibration": specimen.map(|s| json!({
            "factor": s.calibration.factor,
            "rule": s.calibration.rule,
        })),
        "snap_tolerance": specimen.map(|s| s.report.snap_tolerance),
        "nodes": one.nodes,
        "segments": one.segments,
        "total_length": one.metrics.total_length,
        "metrics": one.metrics,
        "repairs": specimen.map(|s| {
            s.report.repairs.iter().map(|repair| {
                let mut object = serde_json::to_value(repair).unwrap_or_default();
                object["message"] = json!(repair.to_string());
                object
            }).collect::<Vec<_>>()
        }),
        "notes": specimen.map(|s| s.notes.clone()),
        "scale_bars": specimen.map(|s| s.scale_bars.iter().map(|(from, to, element)| json!({
            "from": [from.0, from.1], "to": [to.0, to.1], "element": element,
        })).collect::<Vec<_>>()),
    })
}

/// `ramulus measure` with specimens: every file is measured; if any fails, each failing file is
/// named and nothing is printed on stdout.
pub fn measure_specimens(options: MeasureOptions) -> Result<(), CliError> {
    let core_options = specimen_options(&options.specimen)?;
    let paths = expand(&options.files)?;
    let progress = paths.len() > 1 && std::io::stderr().is_terminal();
    let mut measured = Vec::new();
    let mut failures = Vec::new();
    for (index, path) in paths.iter().enumerate() {
        if progress {
            eprint!("\rmeasuring {} of {}: {path}\x1b[K", index + 1, paths.len());
        }
        match measure_one(path, &core_options) {
            Ok(one) => measured.push(one),
            Err(CliError::Failed(message) | CliError::Usage(message)) => failures.push(message),
        }
    }
    if progress {
        eprint!("\r\x1b[K");
    }
    if !failures.is_empty() {
        return Err(CliError::Failed(if paths.len() == 1 {
            failures.join("\n")
        } else {
            format!(
                "{} of {} files could not be measured, so none is printed:\n  {}",
                failures.len(),
                paths.len(),
                failures.join("\n  ")
            )
        }));
    }
    if options.json {
        let output = match measured.as_slice() {
            [one] => measured_json(one),
            several => {
                json!({ "specimens": several.iter().map(measured_json).collect::<Vec<_>>() })
            }
        };
        say!("{output}");
        return Ok(());
    }
    for one in &measured {
        report_on_stderr(one);
    }
    if let [one] = measured.as_slice() {
        say!(
            "{} ({}): {} nodes, {} segments",
            one.file,
            one.format,
            one.nodes,
            one.segments
        );
        crate::commands::print_table(&one.metrics, &one.units);
        return Ok(());
    }
    let rows: Vec<SpecimenRow> = measured
        .iter()
        .map(|one| SpecimenRow {
            file: &one.file,
            format: &one.format,
            specimen: one.specimen.as_ref(),
            units: &one.units,
            metrics: &one.metrics,
        })
        .collect();
    let table = specimen_table_csv(&rows);
    say!("{}", table.trim_end_matches("\r\n"));
    Ok(())
}
