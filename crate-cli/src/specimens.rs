//! `ramulus measure` on traced specimens (SVG, GeoJSON, CSV edge lists), cleared-leaf images
//! (PNG, JPEG) and folders: reads the files, hands them to
//! `ramulus_core::specimen::build_specimen` or `ramulus_core::cleared::build_cleared_specimen`,
//! measures each network with the same pipeline as a grown one (`RunView`), and prints a
//! table, one CSV row per file, or JSON, with the repair report and each image step's numbers
//! on stderr (or under `repairs` and `image`); writes an image's intermediate masks on request.

use std::io::IsTerminal;

use ramulus_core::cleared::decode::{decode_image, is_image};
use ramulus_core::cleared::{
    build_cleared_specimen, ClearedLeaf, ClearedOptions, VeinThreshold, DEFAULT_SPUR_LENGTH,
};
use ramulus_core::metrics::Metrics;
use ramulus_core::params::Params;
use ramulus_core::record::read_record;
use ramulus_core::run::RunView;
use ramulus_core::specimen::{
    build_specimen, specimen_table_csv, ScaleRule, Specimen, SpecimenOptions, SpecimenRow,
    DEFAULT_FLATTEN_TOLERANCE,
};
use serde_json::json;

use crate::options::{CliError, ImageArgs, MeasureOptions, SpecimenArgs};
use crate::output::OutputPlan;

/// File name endings a folder is searched for.
const SPECIMEN_ENDINGS: [&str; 7] = [".svg", ".geojson", ".json", ".csv", ".png", ".jpg", ".jpeg"];

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
    let image = &options.image;
    specimen.units.is_some()
        || image.leaf_light
        || image.veins_light
        || image.local_threshold.is_some()
        || image.spur.is_some()
        || image.write_leaf_mask.is_some()
        || image.write_veins.is_some()
        || image.write_skeleton.is_some()
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

/// The core's image options from the command line's.
fn cleared_options(options: &ImageArgs) -> Result<ClearedOptions, CliError> {
    let vein_threshold = match &options.local_threshold {
        Some(text) => {
            let values = numbers("--local-threshold", text, 2, "WINDOW,OFFSET")?;
            if values[0] < 3.0 || values[0] > 1001.0 || values[0].fract() != 0.0 {
                return Err(CliError::Usage(format!(
                    "`--local-threshold {text}`: WINDOW must be a whole number of pixels from 3 \
                     to 1001"
                )));
            }
            VeinThreshold::Local {
                window: values[0] as u32,
                offset: values[1],
            }
        }
        None => VeinThreshold::Global,
    };
    let spur_length = options.spur.unwrap_or(DEFAULT_SPUR_LENGTH);
    if !(spur_length >= 0.0 && spur_length.is_finite()) {
        return Err(CliError::Usage(format!(
            "`--spur {spur_length}`: expected a length in pixels, 0 or more"
        )));
    }
    Ok(ClearedOptions {
        leaf_darker: !options.leaf_light,
        veins_darker: !options.veins_light,
        vein_threshold,
        spur_length,
        ..ClearedOptions::default()
    })
}

/// The intermediate images asked for, with their flags.
fn image_outputs(options: &ImageArgs) -> Vec<(&'static str, &str)> {
    [
        ("--write-leaf-mask", &options.write_leaf_mask),
        ("--write-veins", &options.write_veins),
        ("--write-skeleton", &options.write_skeleton),
    ]
    .into_iter()
    .filter_map(|(flag, path)| path.as_deref().map(|path| (flag, path)))
    .collect()
}

/// A black-on-white 8-bit grey PNG of a mask.
fn mask_png(width: u32, height: u32, on: &[bool]) -> std::io::Result<Vec<u8>> {
    let mut bytes = Vec::new();
    {
        let mut encoder = png::Encoder::new(&mut bytes, width, height);
        encoder.set_color(png::ColorType::Grayscale);
        encoder.set_depth(png::BitDepth::Eight);
        let mut writer = encoder.write_header().map_err(std::io::Error::other)?;
        let grey: Vec<u8> = on.iter().map(|&b| if b { 0 } else { 255 }).collect();
        writer
            .write_image_data(&grey)
            .map_err(std::io::Error::other)?;
    }
    Ok(bytes)
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
                    "{path}: the folder holds no .svg, .geojson, .json, .csv, .png, .jpg or \
                     .jpeg file"
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
    /// Each step's numbers, for an image.
    image: Option<serde_json::Value>,
}

fn measure_one(
    path: &str,
    options: &SpecimenOptions,
    image_options: &ClearedOptions,
    keep_masks: Option<&mut Option<ClearedLeaf>>,
) -> Result<Measured, CliError> {
    let bytes = std::fs::read(path)
        .map_err(|error| CliError::Failed(format!("{path}: cannot read: {error}")))?;
    let params = Params::default();
    if is_image(&bytes) {
        let image =
            decode_image(&bytes).map_err(|error| CliError::Failed(format!("{path}: {error}")))?;
        drop(bytes);
        let read = build_cleared_specimen(&image, image_options, options)
            .map_err(|error| CliError::Failed(format!("{path}: {error}")))?;
        let view = RunView::new(read.specimen.network.clone(), &params).map_err(|error| {
            CliError::Failed(format!(
                "{path}: internal: the repaired network is not valid: {error}"
            ))
        })?;
        let report = ramulus_core::cleared::report::steps_report(
            &read.leaf,
            image_options,
            read.specimen.calibration.factor,
        );
        if let Some(slot) = keep_masks {
            *slot = Some(read.leaf);
        }
        return Ok(Measured {
            file: path.to_string(),
            format: read.specimen.format.name().to_string(),
            units: read.specimen.calibration.units.clone(),
            nodes: view.network.nodes.len(),
            segments: view.network.segment_count(),
            metrics: view.metrics,
            specimen: Some(read.specimen),
            image: Some(report),
        });
    }
    if is_record(&bytes) {
        let text = String::from_utf8_lossy(&bytes);
        let (record, network) =
            read_record(&text).map_err(|error| CliError::Failed(format!("{path}: {error}")))?;
        let (units, nodes, segments) = (
            network.units.clone(),
            network.nodes.len(),
            network.segment_count(),
        );
        // The run's own readings when it is grown again; else the network as it stands.
        let metrics = match crate::record_readings::regrown_metrics(&record, &network) {
            Some(metrics) => metrics,
            None => {
                RunView::new(network, &params)
                    .map_err(|error| CliError::Failed(format!("{path}: {error}")))?
                    .metrics
            }
        };
        return Ok(Measured {
            file: path.to_string(),
            format: "record".to_string(),
            specimen: None,
            units,
            nodes,
            segments,
            metrics,
            image: None,
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
        image: None,
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
    if let Some(image) = &one.image {
        let number = |key: &str| image[key].to_string();
        eprintln!(
            "  image {} x {} pixels: leaf split from background at grey level {} (Otsu), {} \
             pixels ({} in holes filled)",
            number("width"),
            number("height"),
            number("leaf_threshold"),
            number("leaf_pixels"),
            number("leaf_holes_filled")
        );
        let threshold = &image["vein_threshold"];
        let rule = if threshold["otsu"].is_null() {
            format!(
                "below the local mean of a {} pixel window minus {} grey levels",
                threshold["local_mean"]["window"], threshold["local_mean"]["offset"]
            )
        } else {
            format!("at grey level {} (Otsu over the leaf)", threshold["otsu"])
        };
        eprintln!("  veins: {} pixels, split {rule}", number("vein_pixels"));
        eprintln!(
            "  skeleton: {} pixels after {} Zhang-Suen iterations; {} end points, {} spurs \
             under {} pixels pruned, {} lone pixels dropped",
            number("skeleton_pixels"),
            number("thinning_iterations"),
            number("end_points_before_pruning"),
            number("spurs_pruned"),
            number("spur_length_pixels"),
            number("lone_pixels")
        );
        eprintln!(
            "  graph: {} chains, {} end points, {} branch points; mean vein width {} pixels \
             ({} {})",
            number("chains"),
            number("end_points"),
            number("branch_points"),
            image["mean_vein_width_pixels"]
                .as_f64()
                .map_or("n/a".to_string(), |w| format!("{w:.2}")),
            image["mean_vein_width"]
                .as_f64()
                .map_or("n/a".to_string(), |w| format!("{w:.4}")),
            one.units
        );
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
        "image": one.image,
        "scale_bars": specimen.map(|s| s.scale_bars.iter().map(|(from, to, element)| json!({
            "from": [from.0, from.1], "to": [to.0, to.1], "element": element,
        })).collect::<Vec<_>>()),
    })
}

/// `ramulus measure` with specimens: every file is measured; if any fails, each failing file is
/// named and nothing is printed on stdout.
pub fn measure_specimens(options: MeasureOptions) -> Result<(), CliError> {
    let core_options = specimen_options(&options.specimen)?;
    let image_options = cleared_options(&options.image)?;
    let paths = expand(&options.files)?;
    let writes = image_outputs(&options.image);
    let mut plan = OutputPlan::default();
    if !writes.is_empty() {
        if paths.len() != 1 {
            return Err(CliError::Usage(format!(
                "`{}` writes the steps of one image; {} files were given",
                writes[0].0,
                paths.len()
            )));
        }
        plan.input("FILE", &paths[0]);
        for (flag, path) in &writes {
            plan.output(flag, path)?;
        }
    }
    let mut masks: Option<ClearedLeaf> = None;
    let progress = paths.len() > 1 && std::io::stderr().is_terminal();
    let mut measured = Vec::new();
    let mut failures = Vec::new();
    for (index, path) in paths.iter().enumerate() {
        if progress {
            eprint!("\rmeasuring {} of {}: {path}\x1b[K", index + 1, paths.len());
        }
        let keep = (!writes.is_empty()).then_some(&mut masks);
        match measure_one(path, &core_options, &image_options, keep) {
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
    if !writes.is_empty() {
        let Some(leaf) = masks.take() else {
            return Err(CliError::Failed(format!(
                "{}: not a PNG or JPEG image, so it has no leaf mask, veins or skeleton to write",
                paths[0]
            )));
        };
        for (flag, path) in &writes {
            let on = match *flag {
                "--write-leaf-mask" => &leaf.leaf_mask,
                "--write-veins" => &leaf.vein_mask,
                _ => &leaf.skeleton,
            };
            let bytes = mask_png(leaf.width, leaf.height, on)
                .map_err(|error| CliError::Failed(format!("{path}: cannot encode: {error}")))?;
            plan.stage_writing(path, |writer| writer.write_all(&bytes))?;
        }
        plan.commit()?;
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
