//! The options of each command (`GrowOptions`, `MeasureOptions`, `PresetsOptions`,
//! `BenchOptions`, read by clap; their doc comments are the help text), `CliError`, and
//! parameter assembly from a preset, a parameter file and `--set` overrides.

use clap::Args;
use ramulus_core::mask::MaskGrid;
use ramulus_core::params::file::ParameterFile;
use ramulus_core::params::Params;
use ramulus_core::presets::preset;
use serde_json::{Map, Value};

/// A command-line failure: wrong usage (exit 2) or a failed operation (exit 1).
pub enum CliError {
    /// The arguments are wrong.
    Usage(String),
    /// The arguments are fine but the work failed (bad file, bad parameter).
    Failed(String),
}

/// Options of `ramulus grow`. The doc comments of the fields are the help text of `ramulus grow
/// --help`.
#[derive(Default, Args)]
#[command(after_help = GROW_NOTES)]
pub struct GrowOptions {
    /// Start from this named parameter set (default: ovate-leaf;
    /// `ramulus presets` lists them)
    #[arg(long, value_name = "NAME", verbatim_doc_comment)]
    pub preset: Option<String>,
    /// Start from the defaults plus the keys of this JSON object
    /// of parameters
    #[arg(long = "params", value_name = "FILE.json", verbatim_doc_comment)]
    pub params_file: Option<String>,
    /// Override one parameter after the preset, file or link; VALUE
    /// is read as JSON, else taken as text; repeat for more keys
    #[arg(
        long = "set",
        value_name = "KEY=VALUE",
        value_parser = key_equals_value,
        verbatim_doc_comment
    )]
    pub sets: Vec<String>,
    /// Image of the allowed cells: PBM (P1 or P4; black = allowed)
    /// or PNG (dark = allowed, transparent = blocked); one pixel is
    /// one cell, so the image size sets width and height in cells
    #[arg(long = "mask", value_name = "FILE", verbatim_doc_comment)]
    pub mask_file: Option<String>,
    /// Start from a run link copied from the page, a whole URL or
    /// its #fragment (not with --preset or --params)
    #[arg(
        long,
        value_name = "LINK",
        conflicts_with_all = ["preset", "params_file"],
        value_parser = clap::value_parser!(std::ffi::OsString),
        verbatim_doc_comment
    )]
    pub link: Option<std::ffi::OsString>,
    /// Write the run record (parameters, network with lengths in
    /// the run's units, digest) to this JSON file
    #[arg(long = "record", value_name = "OUT.json", verbatim_doc_comment)]
    pub record_file: Option<String>,
    /// Write an SVG drawing of the network at true scale (lengths
    /// in the run's units), with scale bar and legend, to this file
    #[arg(long = "svg", value_name = "OUT.svg", verbatim_doc_comment)]
    pub svg_file: Option<String>,
    /// Write the network as GeoJSON (a LineString per segment with
    /// its width, the outline of the grown cells as a Polygon; y
    /// north, in the run's units) to this file
    #[arg(long = "geojson", value_name = "OUT.geojson", verbatim_doc_comment)]
    pub geojson_file: Option<String>,
    /// Write the network as a CSV edge list x1,y1,x2,y2,width (the
    /// run's units, y down) to this file
    #[arg(long = "edge-list", value_name = "OUT.csv", verbatim_doc_comment)]
    pub edge_list_file: Option<String>,
    /// How --svg colours segments: `order` (Strahler order, the
    /// default), `flow` or `plain` (all alike)
    #[arg(
        long,
        visible_alias = "color",
        value_name = "COLOURING",
        value_parser = ["order", "flow", "plain"],
        hide_possible_values = true,
        verbatim_doc_comment
    )]
    pub colour: Option<String>,
    /// Print exactly one JSON object on stdout instead of the table
    #[arg(long)]
    pub json: bool,
    /// Address of the page the printed run link opens (default
    /// http://127.0.0.1:8080/, where `./x serve` serves it)
    #[arg(
        long,
        value_name = "URL",
        default_value = DEFAULT_PAGE,
        value_parser = page_address,
        verbatim_doc_comment
    )]
    pub page: String,
}

/// Where `./x serve` serves the page by default.
pub const DEFAULT_PAGE: &str = "http://127.0.0.1:8080/";

/// A page address: http, https or file, without a fragment (the run link adds its own).
fn page_address(text: &str) -> Result<String, String> {
    let scheme_ok = ["http://", "https://", "file://"]
        .iter()
        .any(|scheme| text.starts_with(scheme) && text.len() > scheme.len());
    if !scheme_ok {
        return Err("a page address starts with http://, https:// or file://".into());
    }
    if text.contains('#') {
        return Err("a page address must not hold a `#`: the run link adds its own".into());
    }
    Ok(text.to_string())
}

/// What `ramulus grow --help` adds below the options.
const GROW_NOTES: &str = "\
Parameters come from the preset, or from --params (defaults plus the file's keys), or from
--link (a damaged field of the link takes its default, with a warning on stderr); each --set
then overrides one key, for example --set seed=9 --set alpha=0.7 or
--set 'roots=[{\"x\":5,\"y\":0,\"outflow\":[0,-1]}]'. Lengths are in the run's `units`
(cell_size per cell); --mask replaces `width` and `height` (cells) by the image size.

With --json stdout holds one object: digest (16 hex digits), cells, nodes, segments,
total_length (units), units, stopped (why growth ended), metrics, caution (sites; else null),
link (the --page address plus the run's fragment: open it in a browser to see this run) and
fragment (the #fragment alone).";

/// Options of `ramulus measure`.
#[derive(Args)]
#[command(after_help = MEASURE_NOTES)]
pub struct MeasureOptions {
    /// Run records (RECORD.json, written by `ramulus grow --record`
    /// or kept on the page), traced specimens (SVG, GeoJSON, CSV
    /// edge list x1,y1,x2,y2[,width]), cleared-leaf images (PNG,
    /// JPEG), told apart by content, or folders of them; several
    /// are all measured
    #[arg(value_name = "FILE", required = true, verbatim_doc_comment)]
    pub files: Vec<String>,
    /// Print exactly one JSON object on stdout instead of the tables
    #[arg(long)]
    pub json: bool,
    /// How traced specimens are calibrated and repaired
    #[command(flatten)]
    pub specimen: SpecimenArgs,
    /// How cleared-leaf images are read
    #[command(flatten)]
    pub image: ImageArgs,
}

/// How cleared-leaf images (PNG, JPEG) are read by `measure`.
#[derive(Args, Clone, Default)]
pub struct ImageArgs {
    /// Images: the leaf is lighter than its background (default:
    /// darker, as with light shining through from behind)
    #[arg(long = "leaf-light", verbatim_doc_comment)]
    pub leaf_light: bool,
    /// Images: the veins are lighter than the tissue around them
    /// (default: darker, as stained veins)
    #[arg(long = "veins-light", verbatim_doc_comment)]
    pub veins_light: bool,
    /// Images: tell veins by the mean grey level of the leaf in a
    /// WINDOW x WINDOW pixel square minus OFFSET grey levels (for
    /// uneven light), instead of Otsu's threshold over the leaf
    #[arg(
        long = "local-threshold",
        value_name = "WINDOW,OFFSET",
        verbatim_doc_comment
    )]
    pub local_threshold: Option<String>,
    /// Images: prune skeleton spurs (a chain from an end point)
    /// shorter than this many pixels (default 10)
    #[arg(long, value_name = "PIXELS", verbatim_doc_comment)]
    pub spur: Option<f64>,
    /// Images: write the leaf mask (black leaf on white) to this
    /// PNG, for tuning (one image only)
    #[arg(long = "write-leaf-mask", value_name = "OUT.png", verbatim_doc_comment)]
    pub write_leaf_mask: Option<String>,
    /// Images: write the vein mask (black veins on white) to this
    /// PNG, for tuning (one image only)
    #[arg(long = "write-veins", value_name = "OUT.png", verbatim_doc_comment)]
    pub write_veins: Option<String>,
    /// Images: write the skeleton (black on white) to this PNG,
    /// for tuning (one image only)
    #[arg(long = "write-skeleton", value_name = "OUT.png", verbatim_doc_comment)]
    pub write_skeleton: Option<String>,
}

/// Calibration and repair of traced specimens (shared by `measure` and `fit`).
#[derive(Args, Clone, Default)]
pub struct SpecimenArgs {
    /// Specimens: the output length unit (mm, cm, m, in, um for an
    /// SVG's physical size, default mm); GeoJSON and CSV need it
    #[arg(long, value_name = "UNIT", verbatim_doc_comment)]
    pub units: Option<String>,
    /// Specimens: output units per file unit (per pixel for an
    /// image), instead of the SVG's or image's stated size
    #[arg(
        long,
        value_name = "FACTOR",
        conflicts_with = "scale_bar",
        verbatim_doc_comment
    )]
    pub scale: Option<f64>,
    /// Specimens: two points of the drawing (file coordinates) a
    /// known distance apart, in output units: X1,Y1,X2,Y2,LENGTH
    #[arg(
        long = "scale-bar",
        value_name = "X1,Y1,X2,Y2,LENGTH",
        verbatim_doc_comment
    )]
    pub scale_bar: Option<String>,
    /// Specimens: the root (petiole base) in file coordinates; the
    /// nearest node is taken (default: the line end nearest the
    /// drawing's bottom edge, and the report says so)
    #[arg(
        long,
        value_name = "X,Y",
        allow_hyphen_values = true,
        verbatim_doc_comment
    )]
    pub root: Option<String>,
    /// Specimens: snap tolerance in output units for line ends and
    /// T-junctions (default 0.2 % of the drawing's larger extent)
    #[arg(long, value_name = "TOL", verbatim_doc_comment)]
    pub snap: Option<f64>,
    /// Specimens: largest distance between a curve and the straight
    /// pieces replacing it, in output units (default 0.01)
    #[arg(long, value_name = "TOL", verbatim_doc_comment)]
    pub flatten: Option<f64>,
}

/// What `ramulus measure --help` adds below the options.
const MEASURE_NOTES: &str = "\
Several files are all measured, in the order given; if any one cannot be read or measured,
each failing file is named on stderr and nothing is printed on stdout (exit 1).

With --json and one file, stdout holds one object: digest (recomputed), stored_digest (as
written in the record), digest_matches, segments, total_length (in the record's units) and
metrics. A record whose stored digest differs is also named in a warning on stderr. With several files it holds one object {\"records\": [...]} with
one such object per file, in the order given, each with its `file` added.

Specimens (any file that is not a run record, or a folder: its .svg, .geojson, .json and .csv
files in name order) are read, calibrated and repaired, then measured like a grown network.
Every repair (merged ends, ends joined to a line, crossings split into junctions, zero-length
and repeated pieces dropped, disconnected parts, the roots chosen) is listed on stderr with
coordinates, or under `repairs` with --json. One specimen prints its table; several print one
CSV row per file (header first) on stdout, for a spreadsheet or R. With --json: one object
(several: {\"specimens\": [...]}) with file, format, units, calibration, nodes, segments,
total_length, metrics (the keys of `grow --json`), repairs and notes.

Cleared-leaf images (PNG or JPEG, told by their signatures) are read step by step: the leaf by
Otsu's threshold (largest part, holes filled), the veins by a second Otsu threshold over the
leaf or --local-threshold, Zhang-Suen thinning, the skeleton's graph with spurs under --spur
pixels pruned, widths from the distance transform. Coordinates (--root, --scale-bar) are in
pixels from the top-left corner; the scale comes from the image's stated resolution (PNG pHYs,
JPEG density) or --scale (output units per pixel). Each step's numbers are listed on stderr,
or under `image` with --json; --write-leaf-mask, --write-veins and --write-skeleton write the
intermediate images for tuning.";

/// Options of `ramulus presets`.
#[derive(Args)]
pub struct PresetsOptions {
    /// Print one JSON array of {name, description, params}
    /// instead of the text list
    #[arg(long, verbatim_doc_comment)]
    pub json: bool,
}

/// Options of `ramulus bench`.
#[derive(Args)]
pub struct BenchOptions {
    /// Smaller cases (a 300 x 300 cell lattice; 25,000 and 100,000
    /// cells) that finish in a few seconds
    #[arg(long, verbatim_doc_comment)]
    pub quick: bool,
    /// Print one JSON array, one object per case (case, link,
    /// cells, seconds), instead of the table
    #[arg(long, verbatim_doc_comment)]
    pub json: bool,
    /// Time a fit instead: 3 keys, 4 metrics, 4 seeds per set against
    /// a 20,000-cell specimen, on 1 and on every core, and as shards
    #[arg(long, verbatim_doc_comment)]
    pub fit: bool,
    /// Time reading a drawn cleared-leaf image of 2000 x 2000
    /// pixels (1000 x 1000 with --quick), step by step
    #[arg(long, verbatim_doc_comment, conflicts_with = "fit")]
    pub image: bool,
    /// Measure identifiability instead: for every leaf preset (with a
    /// conducting threshold of 20 cells) and every parameter a fit may
    /// vary, each metric's change per step over its seed-to-seed spread
    /// (3 levels x 5 seeds; 2 seeds and 6,000 cells with --quick), the
    /// independent metric directions and the confounded pairs
    #[arg(long, verbatim_doc_comment, conflicts_with_all = ["fit", "image"])]
    pub identifiability: bool,
    /// Time the page's geometry refill while a 210,000-cell run
    /// grows (60,000 with --quick), natively, step by step
    #[arg(long, verbatim_doc_comment, conflicts_with_all = ["fit", "image"])]
    pub refill: bool,
    /// Time the passes after growth instead: channel energy sweeps on
    /// the 2-hectare sloping field at 0.5 m cells, and the ovate-leaf
    /// preset scaled to 100,000 and 400,000 cells (growth and loops;
    /// 25,000 and 100,000 with --quick)
    #[arg(long, verbatim_doc_comment, conflicts_with_all = ["fit", "image", "refill"])]
    pub passes: bool,
}

/// Accepts a `--set` value of the form KEY=VALUE (an empty VALUE is allowed).
pub(crate) fn key_equals_value(text: &str) -> Result<String, String> {
    match text.split_once('=') {
        Some((key, _)) if !key.trim().is_empty() => Ok(text.to_string()),
        _ => Err("needs the form KEY=VALUE, e.g. seed=9".to_string()),
    }
}

/// The JSON value of `--set KEY=TEXT`: JSON when it parses, `null` for `none` on a key that
/// may be off (as a run link writes it, and as the parameter's help says), else the text.
fn set_value(key: &str, text: &str) -> Value {
    if let Ok(value) = serde_json::from_str(text) {
        return value;
    }
    let may_be_off = ramulus_core::params::table::parameter(key)
        .is_some_and(|spec| spec.kind() == ramulus_core::params::table::FieldKind::OptionalNumber);
    if may_be_off && text.trim() == "none" {
        return Value::Null;
    }
    Value::String(text.to_string())
}

/// Assembles parameters: a link's parameters, or a preset (or defaults when a file is given),
/// then file keys, then `--set`s, then the image mask `(path, mask)`, whose size is the
/// lattice's: a `--set` of `width` or `height` that disagrees with it is refused, and
/// everything is validated only once the mask has set the size.
pub fn assemble_params(
    link_params: Option<Params>,
    preset_name: Option<&str>,
    file: Option<(&str, ParameterFile)>,
    sets: &[String],
    mask: Option<(&str, MaskGrid)>,
) -> Result<Params, CliError> {
    let base = match (preset_name, file.as_ref()) {
        _ if link_params.is_some() => link_params.unwrap_or_default(),
        (Some(name), _) => preset(name).ok_or_else(|| {
            let names: Vec<&str> = ramulus_core::presets::presets()
                .iter()
                .map(|preset| preset.name)
                .collect();
            CliError::Failed(format!(
                "no preset named `{name}`; presets: {}",
                names.join(", ")
            ))
        })?,
        (None, Some(_)) => Params::default(),
        (None, None) => preset("ovate-leaf").unwrap_or_default(),
    };
    let mut object = match serde_json::to_value(&base) {
        Ok(Value::Object(object)) => object,
        _ => Map::new(),
    };
    if let Some((path, file)) = file {
        for (key, count) in &file.repeated {
            eprintln!("warning: {path}: key `{key}` is given {count} times; the last one is used");
        }
        for (key, value) in file.keys {
            object.insert(key, value);
        }
    }
    for set in sets {
        let Some((key, text)) = set.split_once('=') else {
            return Err(CliError::Usage(format!(
                "`--set {set}` needs the form KEY=VALUE"
            )));
        };
        object.insert(key.trim().to_string(), set_value(key.trim(), text));
    }
    if let Some((path, mask)) = mask {
        for (key, size) in [("width", mask.width), ("height", mask.height)] {
            let set = sets.iter().rev().find_map(|set| {
                let (set_key, text) = set.split_once('=')?;
                (set_key.trim() == key).then_some(text)
            });
            if let Some(text) = set.filter(|text| text.trim() != size.to_string()) {
                return Err(CliError::Usage(format!(
                    "`--set {key}={text}` disagrees with --mask {path}, which is {} x {} \
                     cells (one pixel a cell sets the lattice size); leave out the --set",
                    mask.width, mask.height
                )));
            }
            object.insert(key.to_string(), Value::from(size));
        }
        object.insert(
            "mask".to_string(),
            serde_json::to_value(&mask).unwrap_or(Value::Null),
        );
    }
    let params = Params::from_json_value(Value::Object(object))
        .map_err(|error| CliError::Failed(error.to_string()))?;
    params
        .validate()
        .map_err(|error| CliError::Failed(error.to_string()))?;
    Ok(params)
}
