//! The `grow`, `measure` and `presets` commands: read inputs, call the core, print results
//! (`measure` hands specimens and folders to `specimens.rs`).

use ramulus_core::growth::{Growth, StopReason};
use ramulus_core::import::mask_from_bytes;
use ramulus_core::link::{decode_link, encode_link};
use ramulus_core::metrics::Metrics;
use ramulus_core::params::file::read_parameter_file;
use ramulus_core::params::Params;
use ramulus_core::presets::presets as all_presets;
use ramulus_core::record::{read_record, write_record_to};
use ramulus_core::run::{RunView, SITE_CAUTION};
use ramulus_core::utf8_text::utf8_text;
use ramulus_draw::texts::stop_text;
use ramulus_draw::{run_svg, Colouring};
use serde_json::json;

use ramulus_core::network_export::{cells_outline, network_edge_csv, network_geojson};

use crate::options::{assemble_params, CliError, GrowOptions, MeasureOptions, PresetsOptions};
use crate::output::OutputPlan;

fn read_bytes(path: &str) -> Result<Vec<u8>, CliError> {
    std::fs::read(path).map_err(|error| CliError::Failed(format!("{path}: cannot read: {error}")))
}

/// A file's text; bytes that are not UTF-8 are refused naming the byte offset and line.
pub(crate) fn read_text(path: &str) -> Result<String, CliError> {
    let bytes = read_bytes(path)?;
    utf8_text(&bytes)
        .map(str::to_string)
        .map_err(|error| CliError::Failed(format!("{path}: {error}")))
}

/// The parameter file of `--params`, read and checked (keys, types, repeated keys), with its
/// path.
pub(crate) fn parameter_file(
    path: Option<&str>,
) -> Result<Option<(&str, ramulus_core::params::file::ParameterFile)>, CliError> {
    match path {
        Some(path) => {
            let file = read_parameter_file(&read_bytes(path)?)
                .map_err(|error| CliError::Failed(format!("{path}: {error}")))?;
            Ok(Some((path, file)))
        }
        None => Ok(None),
    }
}

/// The parameters of `--link` (refused when not UTF-8, naming the byte); each field the link
/// had to reset is a warning on stderr.
pub(crate) fn link_parameters(link: Option<&std::ffi::OsStr>) -> Result<Option<Params>, CliError> {
    let Some(link) = link else {
        return Ok(None);
    };
    let text = utf8_text(link.as_encoded_bytes())
        .map_err(|error| CliError::Failed(format!("--link: {error}")))?;
    let read = decode_link(text);
    for problem in &read.problems {
        eprintln!("warning: {problem}");
    }
    Ok(Some(read.params))
}

/// `ramulus grow`.
pub fn grow(options: GrowOptions) -> Result<(), CliError> {
    // Every output is checked against the inputs and the other outputs before any work.
    let mut plan = OutputPlan::default();
    if let Some(path) = &options.params_file {
        plan.input("--params", path);
    }
    if let Some(path) = &options.mask_file {
        plan.input("--mask", path);
    }
    if let Some(path) = &options.record_file {
        plan.output("--record", path)?;
    }
    if let Some(path) = &options.svg_file {
        plan.output("--svg", path)?;
    }
    if let Some(path) = &options.geojson_file {
        plan.output("--geojson", path)?;
    }
    if let Some(path) = &options.edge_list_file {
        plan.output("--edge-list", path)?;
    }
    let file = parameter_file(options.params_file.as_deref())?;
    let link_params = link_parameters(options.link.as_deref())?;
    let mask = match &options.mask_file {
        Some(path) => {
            let bytes = read_bytes(path)?;
            let mask = mask_from_bytes(&bytes)
                .map_err(|error| CliError::Failed(format!("{path}: {error}")))?;
            Some((path.as_str(), mask))
        }
        None => None,
    };
    let params = assemble_params(
        link_params,
        options.preset.as_deref(),
        file,
        &options.sets,
        mask,
    )?;
    let colour = match options.colour.as_deref() {
        None | Some("order") => Colouring::ByOrder,
        Some("flow") => Colouring::ByFlow,
        Some("plain") => Colouring::Plain,
        Some(other) => {
            return Err(CliError::Usage(format!(
                "`--colour {other}`: use order, flow or plain"
            )))
        }
    };
    let mut growth = Growth::new(&params).map_err(|error| CliError::Failed(error.to_string()))?;
    let stopped = growth.run();
    let cell_count = growth.cell_count();
    // The grower's lattice and node arrays are not needed past this point.
    let network = growth.into_network();
    let view = RunView::new(network, &params).map_err(|error| {
        CliError::Failed(format!("internal: grown network is not a forest: {error}"))
    })?;
    if let Some(path) = &options.record_file {
        // Streamed into the temporary file: the record is never held in memory whole.
        plan.stage_writing(path, |writer| {
            write_record_to(writer, &view, &params, Some(stopped.name()))
        })?;
    }
    if let Some(path) = &options.svg_file {
        let svg = run_svg(&view, &params, colour);
        plan.stage(path, &svg)?;
    }
    if let Some(path) = &options.geojson_file {
        let network = &view.network;
        let outline = cells_outline(&network.cells, network.cell_size);
        let text = network_geojson(network, Some(&view.table.width), outline.as_deref());
        plan.stage(path, &text)?;
    }
    if let Some(path) = &options.edge_list_file {
        plan.stage(
            path,
            &network_edge_csv(&view.network, Some(&view.table.width)),
        )?;
    }
    // Only now, with every output written in full beside its target, are they put in place.
    plan.commit()?;
    if options.json {
        say!(
            "{}",
            grow_json(&view, &params, cell_count, stopped, &options.page)
        );
    } else {
        say!("stopped: {}", stop_text(stopped));
        say!(
            "cells: {}   segments: {}   digest: {}",
            cell_count,
            view.network.segment_count(),
            view.digest
        );
        print_table(&view.metrics, &params.domain.units);
        say!(
            "\nopen on the page: {}#{}",
            options.page,
            encode_link(&params)
        );
        if params.is_site() {
            say!("\nCAUTION: {SITE_CAUTION}");
        }
    }
    Ok(())
}

/// The one JSON value `grow --json` prints.
pub fn grow_json(
    view: &RunView,
    params: &Params,
    cell_count: u64,
    stopped: StopReason,
    page: &str,
) -> serde_json::Value {
    let mut value = json!({
        "digest": view.digest,
        "cells": cell_count,
        "nodes": view.network.nodes.len(),
        "segments": view.network.segment_count(),
        "total_length": view.metrics.total_length,
        "units": params.domain.units,
        "stopped": stopped.name(),
        "metrics": view.metrics,
        "caution": params.is_site().then_some(SITE_CAUTION),
        "link": format!("{page}#{}", encode_link(params)),
        "fragment": format!("#{}", encode_link(params)),
    });
    // Only with `energy_sweeps` > 0, so the output of other runs stays as it was.
    if let Some(energy) = &view.energy {
        value["channel_energy"] = json!({
            "exponent": ramulus_core::channel_energy::GAMMA_E,
            "before": energy.energy_before,
            "after": energy.energy_after,
            "moves": energy.moves(),
            "sweeps": energy.sweeps.iter().map(|sweep| json!({
                "energy": sweep.energy,
                "moves": sweep.moves,
                "blocked": sweep.blocked,
            })).collect::<Vec<_>>(),
        });
    }
    value
}

pub(crate) fn print_table(metrics: &Metrics, units: &str) {
    // Long values (the angle histogram) go on their own line so the columns stay narrow.
    const LONG: usize = 24;
    let rows = ramulus_draw::texts::readings_rows(metrics, units);
    let short = rows.iter().filter(|row| row.1.len() <= LONG);
    let label_width = short.clone().map(|row| row.0.len()).max().unwrap_or(0);
    let value_width = short.map(|row| row.1.len()).max().unwrap_or(0);
    for (label, value, unit) in rows {
        if value.len() > LONG {
            say!("  {label} ({unit}):\n    {value}");
        } else {
            say!("  {label:<label_width$}  {value:>value_width$}  {unit}");
        }
    }
}

/// The digest and metrics of one run record, recomputed from its network.
struct Measured {
    path: String,
    digest: String,
    stored_digest: String,
    segments: usize,
    units: String,
    metrics: Metrics,
}

/// Reads one run record and measures its network.
fn measure_record(path: &str) -> Result<Measured, CliError> {
    let bytes = read_bytes(path)?;
    let text = utf8_text(&bytes).map_err(|error| CliError::Failed(format!("{path}: {error}")))?;
    let (record, network) =
        read_record(text).map_err(|error| CliError::Failed(format!("{path}: {error}")))?;
    let alpha = record
        .params
        .as_ref()
        .map_or(0.5, |params| params.costs.alpha);
    let metrics = match crate::record_readings::regrown_metrics(&record, &network) {
        Some(metrics) => metrics,
        None => ramulus_core::metrics::measure(&network, alpha)
            .map_err(|error| CliError::Failed(format!("{path}: {error}")))?,
    };
    let digest = ramulus_core::digest::digest_hex(&network);
    Ok(Measured {
        path: path.to_string(),
        digest,
        stored_digest: record.digest,
        segments: network.segment_count(),
        units: network.units.clone(),
        metrics,
    })
}

/// The JSON object of one measured record (the whole output when one file is given).
fn measured_json(measured: &Measured) -> serde_json::Value {
    json!({
        "digest": measured.digest,
        "stored_digest": measured.stored_digest,
        "digest_matches": measured.digest == measured.stored_digest,
        "segments": measured.segments,
        "total_length": measured.metrics.total_length,
        "metrics": measured.metrics,
    })
}

/// `ramulus measure RECORD.json...`: measures every file; if any fails, names each failing
/// file and prints nothing on stdout.
pub fn measure(options: MeasureOptions) -> Result<(), CliError> {
    if crate::specimens::wanted(&options) {
        return crate::specimens::measure_specimens(options);
    }
    let mut measured = Vec::new();
    let mut failures = Vec::new();
    for path in &options.files {
        match measure_record(path) {
            Ok(one) => measured.push(one),
            Err(CliError::Failed(message) | CliError::Usage(message)) => failures.push(message),
        }
    }
    if !failures.is_empty() {
        return Err(CliError::Failed(if options.files.len() == 1 {
            failures.join("\n")
        } else {
            format!(
                "{} of {} records could not be measured, so none is printed:\n  {}",
                failures.len(),
                options.files.len(),
                failures.join("\n  ")
            )
        }));
    }
    for one in measured
        .iter()
        .filter(|one| one.digest != one.stored_digest)
    {
        eprintln!(
            "warning: {}: the network's digest {} differs from the digest {} stored in the \
             record: it was edited or damaged after it was written, or not written by this tool",
            one.path, one.digest, one.stored_digest
        );
    }
    if options.json {
        let output = match measured.as_slice() {
            [one] => measured_json(one),
            several => {
                let records: Vec<serde_json::Value> = several
                    .iter()
                    .map(|one| {
                        let mut object = measured_json(one);
                        object["file"] = json!(one.path);
                        object
                    })
                    .collect();
                json!({ "records": records })
            }
        };
        say!("{output}");
        return Ok(());
    }
    for (index, one) in measured.iter().enumerate() {
        if measured.len() > 1 {
            say!("{}{}:", if index == 0 { "" } else { "\n" }, one.path);
        }
        say!(
            "digest: {}{}",
            one.digest,
            if one.digest == one.stored_digest {
                ""
            } else {
                "  (differs from the digest stored in the record)"
            }
        );
        print_table(&one.metrics, &one.units);
    }
    Ok(())
}

/// `ramulus presets`.
pub fn presets(options: PresetsOptions) -> Result<(), CliError> {
    if options.json {
        say!(
            "{}",
            serde_json::to_string(&all_presets()).unwrap_or_default()
        );
        return Ok(());
    }
    for preset in all_presets() {
        let params = serde_json::to_string(&preset.params).unwrap_or_default();
        say!("{}: {}\n  {params}\n", preset.name, preset.description);
    }
    Ok(())
}
