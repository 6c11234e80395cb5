//! The `drain` command: grows a drainage layout on a site (a site file, a preset or a run link),
//! sizes every channel for the design storm given on the command line, and prints or writes the
//! schedule, the channels as GeoJSON and the plan, each with the concept-design caution.

use clap::Args;
use ramulus_core::drainage::units::{metres_per_network_unit, UnitSystem};
use ramulus_core::drainage::{schedule_csv, site_geojson};
use ramulus_core::growth::Growth;
use ramulus_core::params::Params;
use ramulus_core::run::{RunView, SITE_CAUTION};
use ramulus_core::site::{
    ground_flow, read_geotiff, read_site, read_spot_levels_csv, GroundFlow, Site, Terrain,
    UnreachedPart,
};
use ramulus_core::site_plan_svg::{parse_svg_scale, read_site_svg};
use ramulus_core::site_sizing::{size_run, RainForm, SizingForm};
use ramulus_draw::site_plan::plan_svg;
use ramulus_draw::site_texts::{
    area_text, flags_summary, site_plan_input, site_tables, unreached_summary,
};
use serde_json::json;

use crate::commands::link_parameters;
use crate::options::{assemble_params, key_equals_value, CliError};
use crate::output::OutputPlan;

/// Options of `ramulus drain`; the doc comments are its help text.
#[derive(Default, Args)]
#[command(after_help = DRAIN_NOTES)]
pub struct DrainOptions {
    /// The site: a GeoJSON FeatureCollection whose features carry
    /// properties.role (outline, obstacle, zone with
    /// runoff_coefficient, outlet, level with elevation);
    /// properties.units of the collection is m (default) or ft.
    /// Or a site plan drawn as SVG (with --svg-scale), each shape
    /// with data-role or in a group whose id names the role
    #[arg(long, value_name = "SITE.geojson|PLAN.svg", conflicts_with_all = ["preset", "link"], verbatim_doc_comment)]
    pub site: Option<String>,
    /// Scale of an SVG site plan: 1:N (with the drawing's width in
    /// mm, cm or in) or a ground length per drawing unit, such as
    /// "0.05 m per unit" or "0.2 ft per unit"; with --site
    #[arg(
        long = "svg-scale",
        value_name = "SCALE",
        requires = "site",
        verbatim_doc_comment
    )]
    pub svg_scale: Option<String>,
    /// Grid cell of the layout, in the site's unit (default 0.5 m
    /// or 1.5 ft); with --site
    #[arg(
        long = "cell-size",
        value_name = "LENGTH",
        requires = "site",
        verbatim_doc_comment
    )]
    pub cell_size: Option<f64>,
    /// Spot levels x,y,z (one per line, the site's coordinates and
    /// unit) replacing the site file's own; with --site
    #[arg(
        long,
        value_name = "LEVELS.csv",
        requires = "site",
        verbatim_doc_comment
    )]
    pub levels: Option<String>,
    /// Ground from an elevation raster (GeoTIFF with its
    /// georeferencing), sampled on a grid of 64 x 64 points; with
    /// --site
    #[arg(
        long,
        value_name = "GROUND.tif",
        requires = "site",
        conflicts_with = "levels",
        verbatim_doc_comment
    )]
    pub terrain: Option<String>,
    /// Start from this named parameter set (default: garden-site)
    #[arg(long, value_name = "NAME", conflicts_with = "link")]
    pub preset: Option<String>,
    /// Start from a run link copied from the page (a URL or its #fragment)
    #[arg(long, value_name = "LINK", value_parser = clap::value_parser!(std::ffi::OsString))]
    pub link: Option<std::ffi::OsString>,
    /// Override one growth parameter (KEY=VALUE); repeat for more keys
    #[arg(long = "set", value_name = "KEY=VALUE", value_parser = key_equals_value)]
    pub sets: Vec<String>,
    /// Design rainfall intensity from local records, mm/h (or in/h
    /// with --units us), the same for every duration
    #[arg(
        long,
        value_name = "VALUE",
        conflicts_with = "idf",
        verbatim_doc_comment
    )]
    pub intensity: Option<String>,
    /// Intensity-duration relation i = A / (t + B)^C from local
    /// records (t in minutes; i in mm/h, or in/h with --units us)
    #[arg(long, value_name = "A,B,C", verbatim_doc_comment)]
    pub idf: Option<String>,
    /// Units of the results and of the values given: si (m, ha,
    /// m³/s, mm/h, mm pipes) or us (ft, acres, ft³/s, in/h, inch
    /// pipes), whatever the site's own length unit
    #[arg(long, value_name = "SYSTEM", default_value = "si", value_parser = ["si", "us"], verbatim_doc_comment)]
    pub units: String,
    /// Inlet (overland) time, minutes (default 5)
    #[arg(long = "inlet-time", value_name = "MIN")]
    pub inlet_time: Option<String>,
    /// Nominal pipe diameters to choose from, mm or in (default: a
    /// common list of the unit system)
    #[arg(long, value_name = "LIST", verbatim_doc_comment)]
    pub pipes: Option<String>,
    /// Size grassed swales instead of pipes
    #[arg(long)]
    pub swale: bool,
    /// Manning's n of the channels (default 0.013 for pipes, 0.030
    /// for swales)
    #[arg(long = "manning-n", value_name = "N", verbatim_doc_comment)]
    pub manning_n: Option<String>,
    /// Least grade, percent (default 0.5)
    #[arg(long = "min-grade", value_name = "PERCENT")]
    pub min_grade: Option<String>,
    /// Write the plan drawing (SVG, to a stated map scale)
    #[arg(long = "svg", value_name = "OUT.svg")]
    pub svg_file: Option<String>,
    /// Write the channels with their flows and sizes (GeoJSON)
    #[arg(long = "geojson", value_name = "OUT.geojson")]
    pub geojson_file: Option<String>,
    /// Write the channel schedule (CSV)
    #[arg(long = "csv", value_name = "OUT.csv")]
    pub csv_file: Option<String>,
    /// Print exactly one JSON object on stdout instead of the tables
    #[arg(long)]
    pub json: bool,
}

const DRAIN_NOTES: &str = "\
The design rainfall has no default: give --intensity or --idf from your local records.
CAUTION: layouts, flows and sizes are for concept design only. A licensed engineer must
check any design against local stormwater codes before anything is built.";

/// `ramulus drain`.
pub fn drain(options: DrainOptions) -> Result<(), CliError> {
    let mut plan = OutputPlan::default();
    // The inputs first, so that an output naming one of them is refused before anything is
    // read or written (an `--svg` onto the `--site` file replaced the site).
    for (flag, path) in [
        ("--site", &options.site),
        ("--levels", &options.levels),
        ("--terrain", &options.terrain),
    ] {
        if let Some(path) = path {
            plan.input(flag, path);
        }
    }
    for (flag, path) in [
        ("--svg", &options.svg_file),
        ("--geojson", &options.geojson_file),
        ("--csv", &options.csv_file),
    ] {
        if let Some(path) = path {
            plan.output(flag, path)?;
        }
    }
    let form = design_form(&options)?;
    let design = form
        .design()
        .map_err(|error| CliError::Failed(format!("design storm and sizing: {error}")))?;
    let site_file = read_site_file(&options)?;
    let params = match &site_file {
        Some(site) => site_params(site, &options)?,
        None => drain_params(&options)?,
    };
    if !params.is_site() {
        return Err(CliError::Failed(format!(
            "a site's lengths are in m or ft; these parameters are in {:?} (a leaf?): use \
             --preset drainage-site, a site's run link, or --set units=m",
            params.domain.units
        )));
    }
    let mut growth = Growth::new(&params).map_err(|error| CliError::Failed(error.to_string()))?;
    growth.run();
    let view = RunView::new(growth.into_network(), &params)
        .map_err(|error| CliError::Failed(format!("internal: {error}")))?;
    let sized =
        size_run(&view, &params, &design).map_err(|error| CliError::Failed(error.to_string()))?;
    let site = &sized.hydraulics;
    let natural = natural_flow(&params, site_file.as_ref(), design.system)?;
    let unreached = unreached_json(&sized.unreached, &params, site_file.as_ref(), design.system)?;
    let unreached_text = unreached_summary(
        &sized.unreached,
        &params.domain.units,
        design.system,
        site_file.as_ref(),
    );

    if let Some(path) = &options.csv_file {
        plan.stage(path, &schedule_csv(site))?;
    }
    if let Some(path) = &options.geojson_file {
        plan.stage(path, &site_geojson(&sized.network, site, &sized.unreached))?;
    }
    if let Some(path) = &options.svg_file {
        let metadata = json!({ "params": params, "digest": view.digest }).to_string();
        let input = site_plan_input(
            &sized,
            &params,
            &design,
            site_file.as_ref(),
            SITE_CAUTION,
            metadata,
        );
        plan.stage(path, &plan_svg(&input))?;
    }
    plan.commit()?;

    let units = design.system;
    if options.json {
        let outlets: Vec<_> = site
            .outlets
            .iter()
            .map(|outlet| {
                json!({
                    "node": outlet.node,
                    "area": units.area_from_si(outlet.contributing_area),
                    "runoff_coefficient": outlet.runoff_coefficient,
                    "time_of_concentration": outlet.time_of_concentration,
                    "intensity": units.intensity_from_si(outlet.intensity),
                    "peak_flow": units.flow_from_si(outlet.peak_flow),
                })
            })
            .collect();
        let segments: Vec<_> = site
            .segments
            .iter()
            .map(|segment| {
                let mut value = json!({
                    "segment": segment.segment,
                    "from": segment.from,
                    "to": segment.to,
                    "length": units.length_from_si(segment.length),
                    "grade": segment.grade,
                    "area": units.area_from_si(segment.drained_area),
                    "runoff_coefficient": segment.runoff_coefficient,
                    "time_of_concentration": segment.time_of_concentration,
                    "intensity": units.intensity_from_si(segment.intensity),
                    "peak_flow": units.flow_from_si(segment.peak_flow),
                    "roughness": segment.manning_n,
                    "velocity": units.velocity_from_si(segment.velocity),
                    "flags": segment.flags.iter().map(|flag| flag.key()).collect::<Vec<_>>(),
                });
                match segment.size {
                    ramulus_core::drainage::ChannelSize::Pipe { diameter } => {
                        value["diameter"] = json!(units.length_from_si(diameter));
                    }
                    ramulus_core::drainage::ChannelSize::Swale { depth } => {
                        value["swale"] = json!({ "depth": units.length_from_si(depth) });
                    }
                }
                value
            })
            .collect();
        say!(
            "{}",
            json!({
                "caution": SITE_CAUTION,
                "units": {
                    "system": options.units,
                    "length": units.length_unit(),
                    "area": units.area_unit(),
                    "flow": units.flow_unit(),
                    "intensity": units.intensity_unit(),
                    "velocity": units.velocity_unit(),
                    "diameter": units.length_unit(),
                },
                "seed": params.run.seed,
                "digest": view.digest,
                "outlets": outlets,
                "segments": segments,
                "ground_flow": natural.json,
                "low_spots": natural.low_spots,
                "unreached": unreached,
            })
        );
        return Ok(());
    }
    let tables = site_tables(site, site_file.as_ref());
    say!("CAUTION: {SITE_CAUTION}");
    say!("");
    say!("Outlets");
    for outlet in &tables.outlets {
        say!(
            "  {}: contributing area {}, peak flow {}, time of concentration {}",
            outlet.name,
            outlet.area_text,
            outlet.peak_flow_text,
            outlet.time_text
        );
    }
    say!("");
    say!(
        "{} channel segments. {}",
        site.segments.len(),
        flags_summary(site)
    );
    say!("");
    if let Some(text) = &unreached_text {
        say!("{text}");
        say!("");
    }
    for line in &natural.lines {
        say!("{line}");
    }
    say!("Channel schedule: --csv FILE writes every row; --svg FILE the plan.");
    Ok(())
}

/// The parts of the site no outlet reaches, for `--json`: each part's cells, area and the
/// centre of its bounding box (site coordinates when the site came from a file, else the
/// plan's), in the units of the results.
fn unreached_json(
    parts: &[UnreachedPart],
    params: &Params,
    site_file: Option<&Site>,
    units: UnitSystem,
) -> Result<Vec<serde_json::Value>, CliError> {
    let metres = metres_per_network_unit(&params.domain.units)
        .map_err(|error| CliError::Failed(format!("internal: {error}")))?;
    Ok(parts
        .iter()
        .map(|part| {
            let [x, y] = match site_file {
                Some(site) => site.network_to_site(part.centre),
                None => part.centre,
            };
            json!({
                "cells": part.cells,
                "area": units.area_from_si(part.area * metres * metres),
                "x": units.length_from_si(x * metres),
                "y": units.length_from_si(y * metres),
            })
        })
        .collect())
}

/// The ground's own flow (D8, before any channel) in the units of the results.
struct NaturalFlow {
    /// The `ground_flow` object of `--json`.
    json: serde_json::Value,
    /// The `low_spots` array of `--json`.
    low_spots: Vec<serde_json::Value>,
    /// The summary lines.
    lines: Vec<String>,
}

/// Low spots listed in the summary (all are in `--json`).
const LOW_SPOTS_LISTED: usize = 5;

fn natural_flow(
    params: &Params,
    site_file: Option<&Site>,
    units: UnitSystem,
) -> Result<NaturalFlow, CliError> {
    let flat = params.domain.levels.is_empty()
        && params.domain.grade_x == 0.0
        && params.domain.grade_y == 0.0;
    if flat {
        return Ok(NaturalFlow {
            json: json!({ "method": "D8", "flat": true }),
            low_spots: Vec::new(),
            lines: vec![
                "Ground flow: the ground is flat, so it shows no natural flow and no low spots."
                    .to_string(),
            ],
        });
    }
    let flow: GroundFlow = ground_flow(params);
    let metres = metres_per_network_unit(&params.domain.units)
        .map_err(|error| CliError::Failed(format!("internal: {error}")))?;
    let length = |value: f64| units.length_from_si(value * metres);
    let area = |value: f64| units.area_from_si(value * metres * metres);
    // Site coordinates (y north) when the site came from a file; else the plan's frame.
    let place = |centre: [f64; 2]| match site_file {
        Some(site) => site.network_to_site(centre),
        None => centre,
    };
    let frame = if site_file.is_some() {
        "site (x east, y north)"
    } else {
        "plan (x right, y down from the top-left corner)"
    };
    let outlet_name = |index: usize| {
        site_file
            .and_then(|site| site.outlets.get(index))
            .and_then(|outlet| outlet.name.clone())
            .unwrap_or_else(|| format!("outlet {}", index + 1))
    };
    let low_spots: Vec<_> = flow
        .low_spots
        .iter()
        .map(|spot| {
            let [x, y] = place(spot.centre);
            json!({
                "x": length(x),
                "y": length(y),
                "elevation": length(spot.elevation),
                "area": area(spot.area),
            })
        })
        .collect();
    let pond_area: f64 = flow.low_spots.iter().map(|spot| spot.area).sum();
    let json = json!({
        "method": "D8",
        "flat": false,
        "frame": frame,
        "site_area": area(flow.allowed_area),
        "outlet_areas": flow.outlet_areas.iter().map(|&value| area(value)).collect::<Vec<_>>(),
        "off_site_area": area(flow.off_site_area),
        "low_spot_area": area(pond_area),
    });
    let length_unit = units.length_unit();
    let said = |value: f64| area_text(value * metres * metres, units);
    let mut lines = vec![format!(
        "Ground flow before any channel (D8, steepest of 8 neighbours; O'Callaghan & Mark 1984), \
         of {}:",
        said(flow.allowed_area)
    )];
    for (index, &value) in flow.outlet_areas.iter().enumerate() {
        lines.push(format!(
            "  {} reaches {} over the ground",
            said(value),
            outlet_name(index)
        ));
    }
    lines.push(format!(
        "  {} runs off over the site's edge",
        said(flow.off_site_area)
    ));
    if flow.low_spots.is_empty() {
        lines.push("  no low spots: all water runs to an outlet or off the site".to_string());
    } else {
        lines.push(format!(
            "  {} ends in {} low spot(s), where water ponds unless the ground is graded; the \
             largest:",
            said(pond_area),
            flow.low_spots.len()
        ));
        for spot in flow.low_spots.iter().take(LOW_SPOTS_LISTED) {
            let [x, y] = place(spot.centre);
            lines.push(format!(
                "    at ({:.2}, {:.2}) {length_unit}, ground {:.3} {length_unit}: {} drains there",
                length(x),
                length(y),
                length(spot.elevation),
                said(spot.area)
            ));
        }
    }
    Ok(NaturalFlow {
        json,
        low_spots,
        lines,
    })
}

fn design_form(options: &DrainOptions) -> Result<SizingForm, CliError> {
    let rain = match (&options.intensity, &options.idf) {
        (Some(intensity), None) => RainForm {
            kind: "constant".into(),
            intensity: intensity.clone(),
            ..RainForm::default()
        },
        (None, Some(idf)) => {
            let parts: Vec<&str> = idf.split(',').collect();
            let [a, b, c] = parts.as_slice() else {
                return Err(CliError::Usage(format!(
                    "`--idf {idf}` needs three numbers A,B,C for i = A / (t + B)^C"
                )));
            };
            RainForm {
                kind: "idf".into(),
                a: a.to_string(),
                b: b.to_string(),
                c: c.to_string(),
                ..RainForm::default()
            }
        }
        _ => {
            return Err(CliError::Usage(
                "give the design rainfall from your local records: --intensity VALUE or \
                 --idf A,B,C (there is no default)"
                    .into(),
            ))
        }
    };
    Ok(SizingForm {
        system: options.units.clone(),
        rain,
        inlet_time: options.inlet_time.clone().unwrap_or_default(),
        conveyance: if options.swale { "swale" } else { "pipe" }.into(),
        pipe_sizes: options.pipes.clone().unwrap_or_default(),
        manning_n: options.manning_n.clone().unwrap_or_default(),
        min_grade_percent: options.min_grade.clone().unwrap_or_default(),
        velocity_min: String::new(),
        velocity_max: String::new(),
    })
}

fn drain_params(options: &DrainOptions) -> Result<Params, CliError> {
    let link = link_parameters(options.link.as_deref())?;
    let preset = if link.is_none() {
        Some(options.preset.as_deref().unwrap_or("garden-site"))
    } else {
        None
    };
    assemble_params(link, preset, None, &options.sets, None)
}

/// Largest site file read: 256 MiB (far above 20,000 features of rings of 10,000 positions
/// written compactly).
const MAX_SITE_FILE_BYTES: u64 = 256 << 20;
/// Largest spot-level file read: 64 MiB (a run takes 4,096 levels).
const MAX_LEVELS_FILE_BYTES: u64 = 64 << 20;
/// Largest GeoTIFF read: 1 GiB (64 million 64-bit elevations, `MAX_RASTER_PIXELS`, and tags).
const MAX_RASTER_FILE_BYTES: u64 = 1 << 30;

/// The bytes of an input file of at most `limit` bytes, read through that limit, so that a
/// huge file, a device such as `/dev/zero` or a pipe cannot fill the memory.
fn read_input(path: &str, what: &str, limit: u64) -> Result<Vec<u8>, CliError> {
    use std::io::Read as _;
    let cannot = |error: std::io::Error| CliError::Failed(format!("{path}: cannot read: {error}"));
    let too_large = || {
        CliError::Failed(format!(
            "{path}: larger than {} MiB, the most a {what} may hold",
            limit >> 20
        ))
    };
    let file = std::fs::File::open(path).map_err(cannot)?;
    if file.metadata().map_err(cannot)?.len() > limit {
        return Err(too_large());
    }
    let mut bytes = Vec::new();
    file.take(limit + 1)
        .read_to_end(&mut bytes)
        .map_err(cannot)?;
    if bytes.len() as u64 > limit {
        return Err(too_large());
    }
    Ok(bytes)
}

/// The site file of `--site` with the spot levels of `--levels`, if given.
fn read_site_file(options: &DrainOptions) -> Result<Option<Site>, CliError> {
    let Some(path) = &options.site else {
        return Ok(None);
    };
    let bytes = read_input(path, "site file", MAX_SITE_FILE_BYTES)?;
    let is_svg = bytes.iter().find(|byte| {
        !byte.is_ascii_whitespace() && **byte != 0xEF && **byte != 0xBB && **byte != 0xBF
    }) == Some(&b'<');
    let mut site = if is_svg {
        let Some(scale) = &options.svg_scale else {
            return Err(CliError::Failed(format!(
                "{path}: an SVG site plan needs its scale: give --svg-scale 1:N (with the \
                 drawing's width in mm) or --svg-scale \"0.05 m per unit\""
            )));
        };
        let scale = parse_svg_scale(scale)
            .map_err(|error| CliError::Failed(format!("--svg-scale: {error}")))?;
        read_site_svg(&bytes, &scale)
    } else {
        if options.svg_scale.is_some() {
            return Err(CliError::Usage(format!(
                "--svg-scale is for a site plan drawn as SVG; {path} is not SVG"
            )));
        }
        read_site(&bytes)
    }
    .map_err(|error| CliError::Failed(format!("{path}: {error}")))?;
    if let Some(levels_path) = &options.levels {
        let bytes = read_input(levels_path, "spot-level file", MAX_LEVELS_FILE_BYTES)?;
        let levels = read_spot_levels_csv(&bytes)
            .map_err(|error| CliError::Failed(format!("{levels_path}: {error}")))?;
        // An empty file would silently replace the site's own levels with flat ground.
        if levels.is_empty() {
            return Err(CliError::Failed(format!(
                "{levels_path}: no spot levels in the file; give at least 3 lines x,y,z"
            )));
        }
        site.set_levels(levels)
            .map_err(|error| CliError::Failed(format!("{levels_path}: {error}")))?;
    }
    Ok(Some(site))
}

/// The run parameters of a site: its cells, terrain (a raster, its spot levels, or flat with
/// a warning) and the `--set` overrides.
fn site_params(site: &Site, options: &DrainOptions) -> Result<Params, CliError> {
    let cell = options
        .cell_size
        .unwrap_or(if site.units == "ft" { 1.5 } else { 0.5 });
    let terrain = if let Some(path) = &options.terrain {
        let bytes = read_input(path, "GeoTIFF", MAX_RASTER_FILE_BYTES)?;
        let raster =
            read_geotiff(&bytes).map_err(|error| CliError::Failed(format!("{path}: {error}")))?;
        Terrain::Raster {
            raster,
            per_side: 64,
        }
    } else if site.levels.len() >= 3 {
        Terrain::SpotLevels
    } else {
        eprintln!(
            "warning: the site has no spot levels (give --levels or --terrain): the ground is \
             taken as flat, so every channel is flagged as flatter than the least grade"
        );
        Terrain::Grade {
            east: 0.0,
            north: 0.0,
        }
    };
    let params = site
        .to_params(cell, &terrain)
        .map_err(|error| CliError::Failed(format!("--site: {error}")))?;
    if options.sets.is_empty() {
        return Ok(params);
    }
    assemble_params(Some(params), None, None, &options.sets, None)
}
