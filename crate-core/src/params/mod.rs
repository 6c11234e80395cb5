//! Growth parameters: `Params` in four named parts (`Domain`, `CostWeights`, `RunControl`,
//! `Widths`), their reading from JSON and their validation (`ParamError`).
//!
//! Every field is documented with its unit, default and allowed range; the parameter table
//! (`table`) holds the same facts as data, and validation, defaults, the page's schema, the
//! run link and README's table are read off it. The JSON keys are the field names, flat;
//! unknown keys are refused against the table so that a typo never passes silently.

use serde::{Deserialize, Serialize};

use crate::mask::MaskGrid;

pub mod file;
pub mod table;
mod text;

pub use crate::limits::{MAX_CELLS, MAX_LEVELS, MAX_RADIUS, MAX_ZONES};

/// Every parameter of a run, in four named parts. The JSON keys and link keys are the field
/// names of the parts (flat: `{"width": 200, "alpha": 0.5}`, never nested).
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(try_from = "serde_json::Value")]
pub struct Params {
    /// The domain: lattice, roots, allowed region and terrain.
    #[serde(flatten)]
    pub domain: Domain,
    /// The cost weights.
    #[serde(flatten)]
    pub costs: CostWeights,
    /// Run control: seed, budget, joining rule, refresh.
    #[serde(flatten)]
    pub run: RunControl,
    /// The width rule.
    #[serde(flatten)]
    pub widths: Widths,
}

/// The domain: lattice, roots, allowed region and terrain.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct Domain {
    /// Lattice width in cells. Default 120; 1 ..= 20000, and `width * height <= 25,000,000`.
    pub width: u32,
    /// Lattice height in cells (rows counted from the top). Default 120; 1 ..= 20000.
    pub height: u32,
    /// Side of one cell in physical units. Default 0.15; > 0 and finite.
    pub cell_size: f64,
    /// Name of the physical length unit: `mm` (leaves) or `m` (sites); also `cm`, `um`, `ft`.
    pub units: String,
    /// Node jitter, as a fraction of a cell in x and in y. Default 0.35; 0 ..= 0.49.
    pub jitter: f64,
    /// Roots (a petiole base, an outlet): cells with their outflow directions. At least one.
    pub roots: Vec<Root>,
    /// Allowed region as a polygon of `[x, y]` points in cell coordinates; none allows the whole
    /// lattice. A cell is allowed when its centre lies inside.
    pub outline: Option<Vec<[f64; 2]>>,
    /// Obstacles: polygons in cell coordinates whose cells are never occupied.
    pub obstacles: Vec<Vec<[f64; 2]>>,
    /// Allowed cells from an image (run-length coded, see `mask`); none allows every cell.
    pub mask: Option<MaskGrid>,
    /// Terrain rise per unit run along +x (m/m), for the uphill term. Default 0; -1 ..= 1.
    pub grade_x: f64,
    /// Terrain rise per unit run along +y, i.e. down the page (m/m). Default 0; -1 ..= 1.
    pub grade_y: f64,
    /// Runoff coefficient of every cell (sites); a cell's flow weight. Default 1; > 0 ..= 1.
    /// Cells inside a runoff zone (`zones`) take the zone's coefficient instead.
    pub runoff: f64,
    /// Spot levels `[x, y, z]`: x and y in cells, z (ground elevation) in the length unit.
    /// When set, the uphill term reads the ground from these levels interpolated by inverse
    /// distance weighting (`terrain::SpotSurface`) instead of the tilted plane of `grade_x`
    /// and `grade_y`. Default none (empty); at most `MAX_LEVELS`, no two at one place.
    pub levels: Vec<[f64; 3]>,
    /// Runoff zones: polygons in cells, each with its own runoff coefficient. A cell whose
    /// centre lies inside takes the coefficient of the last zone listed that holds it; cells
    /// in no zone take `runoff`. Default none (empty); at most `MAX_ZONES`.
    pub zones: Vec<Zone>,
    /// Lattice refinement: every cell is split into `refine x refine` cells before growth while
    /// every physical quantity keeps its value (growth applies it). Default 1; 1 ..= 4;
    /// 1 for parameters saved before the key existed.
    #[serde(default = "one")]
    pub refine: u32,
    /// Whether cells behind the line through a root across its outflow (behind the petiole)
    /// are kept out of growth. Default false; false in parameters saved before the key existed.
    #[serde(default)]
    pub front_only: bool,
    /// Midrib laid before growth: the fraction of the straight run of allowed cells from each
    /// root against its outflow (from the petiole toward the apex) occupied first as a chain of
    /// cells, so the blade grows from a primary vein (`growth::midrib`). Default 0 (none);
    /// 0 ..= 1; 0 in parameters saved before the key existed.
    #[serde(default)]
    pub midrib: f64,
}

/// `refine` of parameters saved before the key existed.
fn one() -> u32 {
    1
}

/// A runoff zone: a polygon in cell coordinates and the runoff coefficient of its surface.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Zone {
    /// Runoff coefficient C of the zone's surface (rational method); 0.01 ..= 1.
    pub runoff: f64,
    /// The zone's polygon, `[x, y]` points in cells.
    pub polygon: Vec<[f64; 2]>,
}

/// The cost of joining a cell: the weight of each term and the shape of each term.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct CostWeights {
    /// Weight of the length term. Default 1; >= 0.
    pub w_len: f64,
    /// Weight of the junction-angle term. Default 1; >= 0.
    pub w_turn: f64,
    /// Preferred branching angle in degrees; none gives the plain `1 - cos(phi)` penalty.
    /// Default none; 0 ..= 150.
    pub branch_angle: Option<f64>,
    /// Weight of the branched-transport term. Default 0.5; >= 0.
    pub w_flow: f64,
    /// Exponent of branched transport, a segment carrying q costs `q^alpha * length`. Default 0.5; 0 ..= 1.
    pub alpha: f64,
    /// Weight of the supply-distance term. Default 0; >= 0.
    pub w_path: f64,
    /// Anisotropy of the supply-distance term: lengths along a root's outflow axis count
    /// `1 / elongation`. Default 1 (isotropic); 1 ..= 10.
    pub elongation: f64,
    /// Supply distance of flow running back against a root's outflow axis (growth behind the
    /// root) counts this many times. Default 1; 1 ..= 10.
    pub rear_cost: f64,
    /// Weight of the uphill (terrain) term; sites only. Default 0; >= 0.
    pub w_grade: f64,
}

/// Run control: the seed, the budget, how the next cell is picked and when flows are refreshed.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct RunControl {
    /// Seed of the random generator (ChaCha8). Default 1.
    pub seed: u64,
    /// Cell budget: growth stops after this many cells, roots included. Default 10000;
    /// 1 ..= 25,000,000 and at least the number of roots.
    pub cells: u64,
    /// Rule that picks the next cell. Default `weighted`.
    pub joining: Joining,
    /// Temperature of weighted joining, in cost units. Default 0.5; > 0.
    pub temperature: f64,
    /// Open growth: stop when no frontier cell costs less than this. Default none (off); finite.
    pub threshold: Option<f64>,
    /// Joining distance in cells: the farthest a new cell may lie from the node or segment it
    /// joins. Default 4; 1 ..= 12.
    pub radius: f64,
    /// Whether a new cell may attach to the interior of a segment, splitting it. Default false.
    pub attach_to_segments: bool,
    /// Whether a new segment must not cross or overlap an existing one (veins and channels
    /// never cross): an attachment that would is passed over for the cheapest one that does not.
    /// Default true; false in version-1 links, whose runs could cross themselves, and in
    /// parameters saved before the key existed (records and files read by serde).
    #[serde(default)]
    pub planar: bool,
    /// Whether a new segment must stay off the cells outside the allowed region (obstacles,
    /// outside the outline or mask): an attachment whose straight segment passes over such a
    /// cell is not offered, so a channel goes round a narrow building instead of across it.
    /// Default false; true for sites read from files and the drainage presets; false in
    /// version-1 links and in parameters saved before the key existed.
    #[serde(default)]
    pub keep_clear: bool,
    /// Flows and transport costs are recomputed exactly whenever the network has grown by this
    /// fraction since the last refresh. Default 0.05; 0.001 ..= 1.
    pub refresh: f64,
    /// Junction relaxation after growth (`junctions::relax_junctions`): at most this many
    /// sweeps moving each junction off the lattice to lower `sum q^alpha L`. Default 0 (off, as
    /// version-1 links and parameters saved before the key existed); 0 ..= 50.
    #[serde(default)]
    pub relax_junctions: u32,
    /// Channel energy optimisation after growth (`channel_energy::lower_energy`): at most this
    /// many sweeps re-pointing where nodes drain to lower `sum Q^0.5 L`. Default 0 (off, as
    /// version-1 links and parameters saved before the key existed); 0 ..= 50.
    #[serde(default)]
    pub energy_sweeps: u32,
    /// How far (in cells) the channel energy optimisation may re-point where a node drains.
    /// Default none: the growth reach `radius`; 1 ..= 50. None in parameters saved before the
    /// key existed.
    #[serde(default)]
    pub energy_reach: Option<f64>,
}

/// The width rule: how a segment's drawn width follows its flow.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct Widths {
    /// Width exponent: width ~ flow^(1/gamma); 3 is Murray's law, 2 area-preserving. Default 3; 1 ..= 10.
    pub gamma: f64,
    /// Width of a one-cell veinlet, as a fraction of the cell size. Default 0.12; > 0 ..= 1.
    pub tip_width: f64,
    /// Conducting threshold: a segment is a vein (a channel) when the area it drains, in the
    /// run's length unit squared, is at least this. Default 0 (every segment conducts); 0 ..= 1e12.
    pub vein_area: f64,
    /// Loop closing after growth (`reconnection.rs`): a free-ending vein tip joins the vein
    /// network when the network path it shortcuts is at least this many times the new
    /// connection's length. Default none (off, the network stays a tree); 1 ..= 100. Absent in
    /// records and version-1 links, which grew trees.
    #[serde(default)]
    pub reconnect: Option<f64>,
    /// Scales of loop closing: levels 0 ..= `loop_levels`, the conducting threshold of level
    /// `k` being the finest one times 4^(`loop_levels` - k). Default 3; 0 ..= 8.
    #[serde(default = "default_loop_levels")]
    pub loop_levels: u32,
    /// Loops split faces one at a time (`reconnection.rs`): within each level, each bounded
    /// face of the looped network takes at most one new loop wall per round, from its largest
    /// free-ending vein, and rounds repeat until no wall is added, so each wall divides a face
    /// that a thicker wall closed. Default false (every tip of a level joins in one pass, as
    /// before the key existed).
    #[serde(default)]
    pub nest_loops: bool,
    /// Major veins close arches (`reconnection.rs`): a free-ending vein's tries go only to
    /// joins whose loop could be long enough, so the end of a major vein reaches the next major
    /// vein instead of spending its tries on its own side veins. Default false (the shortest
    /// joins are tried whatever their loop, as before the key existed).
    #[serde(default)]
    pub arches: bool,
    /// Width exponent of the major veins (`segments::WidthRule`): the exponent at each junction
    /// moves from `gamma` at Strahler order 1 to this at order `major_order` and above. Default
    /// none (one exponent `gamma` for every order, as before the key existed); 1 ..= 10.
    #[serde(default)]
    pub gamma_major: Option<f64>,
    /// The Strahler order from which `gamma_major` applies in full. Default 4; 2 ..= 12.
    #[serde(default = "default_major_order")]
    pub major_order: u32,
}

/// `loop_levels` of parameters saved before the key existed (no effect: reconnection is off).
fn default_loop_levels() -> u32 {
    3
}

/// `Widths::major_order` of parameters saved before the key existed (it only matters with
/// `gamma_major` set, which they lack).
fn default_major_order() -> u32 {
    4
}

/// A root of one tree: a cell and the direction its flow leaves the network.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Root {
    /// Column of the root cell, 0 at the left.
    pub x: u32,
    /// Row of the root cell, 0 at the top.
    pub y: u32,
    /// Outflow direction `[dx, dy]` in lattice axes (y down); need not be unit length.
    pub outflow: [f64; 2],
}

/// The rule that picks which frontier cell joins next.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Joining {
    /// The cheapest frontier cell, ties to the oldest frontier slot (deterministic).
    Cheapest,
    /// A frontier cell drawn with probability proportional to `exp(-(C - C_min) / T)`.
    Weighted,
    /// A frontier cell drawn uniformly (Eden growth).
    Uniform,
}

/// A parameter that fails validation: which one, its value, and what is allowed.
#[derive(Clone, Debug, PartialEq)]
pub struct ParamError {
    /// The parameter key, e.g. `alpha` or `roots[1].x`.
    pub key: String,
    /// The offending value as text.
    pub value: String,
    /// What would be accepted.
    pub allowed: String,
}

impl std::fmt::Display for ParamError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "parameter `{}` = {}: {}",
            self.key, self.value, self.allowed
        )
    }
}

impl std::error::Error for ParamError {}

/// Defaults of every key (the `default` column of the parameter table). Run links of format
/// version 1 fill missing keys from their own frozen column (`link::version_1_defaults`), so a
/// change here never changes an old link.
impl Default for Params {
    fn default() -> Self {
        Params::from_table_column(|spec| spec.default)
    }
}

impl Default for Domain {
    fn default() -> Self {
        Params::default().domain
    }
}

impl CostWeights {
    /// The costs of a drainage layout: length, junction angle and transport alike, the
    /// transport exponent of channels (0.6), no supply-distance term, and the uphill term on.
    /// The `drainage-site` preset and every site read from a file share them.
    pub fn drainage() -> CostWeights {
        CostWeights {
            w_len: 1.0,
            w_turn: 0.5,
            w_flow: 0.5,
            alpha: 0.6,
            w_path: 0.0,
            w_grade: 1.0,
            ..CostWeights::default()
        }
    }
}

impl Default for CostWeights {
    fn default() -> Self {
        Params::default().costs
    }
}

impl Default for RunControl {
    fn default() -> Self {
        Params::default().run
    }
}

impl Default for Widths {
    fn default() -> Self {
        Params::default().widths
    }
}

impl TryFrom<serde_json::Value> for Params {
    type Error = ParamError;

    fn try_from(value: serde_json::Value) -> Result<Params, ParamError> {
        Params::from_json_value(value)
    }
}

/// Reads each part from the same flat object; each part ignores the other parts' keys (unknown
/// keys are refused before this, against `known_keys`).
fn parts_from_value(value: &serde_json::Value) -> Result<Params, serde_json::Error> {
    Ok(Params {
        domain: Domain::deserialize(value)?,
        costs: CostWeights::deserialize(value)?,
        run: RunControl::deserialize(value)?,
        widths: Widths::deserialize(value)?,
    })
}

/// Physical length units that the exporters know how to label.
pub const UNITS: [&str; 5] = ["um", "mm", "cm", "m", "ft"];

/// Whether length unit `units` is a drainage site's (metres or feet) rather than a leaf's.
pub fn is_site_unit(units: &str) -> bool {
    units == "m" || units == "ft"
}

impl Params {
    /// Parses parameters from JSON text; unknown keys and wrong types are errors naming the key.
    pub fn from_json(text: &str) -> Result<Params, ParamError> {
        // A UTF-8 byte-order mark (some editors write one) is not part of the JSON.
        let text = text.strip_prefix('\u{feff}').unwrap_or(text);
        let value: serde_json::Value = serde_json::from_str(text).map_err(|error| ParamError {
            key: "(json)".to_string(),
            value: format!("line {} column {}", error.line(), error.column()),
            allowed: error.to_string(),
        })?;
        Params::from_json_value(value)
    }

    /// Builds parameters from a JSON object; missing keys take their defaults. A wrong type or
    /// an unknown key gives an error naming that key.
    pub fn from_json_value(value: serde_json::Value) -> Result<Params, ParamError> {
        let serde_json::Value::Object(map) = &value else {
            return Err(ParamError {
                key: "(parameters)".into(),
                value: short_text(&value.to_string()),
                allowed: "a JSON object of parameters".into(),
            });
        };
        if let Some((key, entry)) = map.iter().find(|(key, _)| table::parameter(key).is_none()) {
            let known: Vec<&str> = table::parameters().iter().map(|spec| spec.key).collect();
            return Err(ParamError {
                key: key.clone(),
                value: short_text(&entry.to_string()),
                allowed: format!("a known parameter key, one of {}", known.join(", ")),
            });
        }
        let error = match parts_from_value(&value) {
            Ok(params) => return Ok(params),
            Err(error) => error,
        };
        // Try each key alone on top of the defaults to find the one that fails.
        for (key, entry) in map {
            let mut single = serde_json::Map::new();
            single.insert(key.clone(), entry.clone());
            if let Err(key_error) = parts_from_value(&serde_json::Value::Object(single)) {
                return Err(ParamError {
                    key: key.clone(),
                    value: short_text(&entry.to_string()),
                    allowed: key_error.to_string(),
                });
            }
        }
        Err(ParamError {
            key: "(parameters)".into(),
            value: String::new(),
            allowed: error.to_string(),
        })
    }

    /// Whether the run is a drainage site (lengths in metres or feet) rather than a leaf.
    pub fn is_site(&self) -> bool {
        is_site_unit(&self.domain.units)
    }

    /// Checks every parameter; the first failure is returned, naming the key. The lattice size
    /// comes first (roots and the mask are checked against it), then every entry of the
    /// parameter table (bounds and the rules of its kind), then the rules across fields.
    pub fn validate(&self) -> Result<(), ParamError> {
        let lattice = ["width", "height"];
        for key in lattice {
            if let Some(spec) = table::parameter(key) {
                spec.check(self)?;
            }
        }
        let total = self.domain.width as u64 * self.domain.height as u64;
        if total > MAX_CELLS {
            return Err(ParamError {
                key: "width * height".into(),
                value: format!(
                    "{} x {} = {} cells",
                    self.domain.width, self.domain.height, total
                ),
                allowed: format!("at most {MAX_CELLS} cells fit in memory"),
            });
        }
        for spec in table::parameters() {
            if !lattice.contains(&spec.key) {
                spec.check(self)?;
            }
        }
        // The refined lattice and budget must fit the same limits as a given one.
        let factor = u64::from(self.domain.refine) * u64::from(self.domain.refine);
        if factor > 1
            && (total * factor > MAX_CELLS || self.run.cells.saturating_mul(factor) > MAX_CELLS)
        {
            return Err(ParamError {
                key: "refine".into(),
                value: self.domain.refine.to_string(),
                allowed: format!(
                    "a refinement whose lattice ({total} cells) and budget ({} cells) times {factor} stay within {MAX_CELLS} cells",
                    self.run.cells
                ),
            });
        }
        // The budget counts the roots, which are all planted at once: it must hold them.
        if self.run.cells < self.domain.roots.len() as u64 {
            return Err(ParamError {
                key: "cells".into(),
                value: self.run.cells.to_string(),
                allowed: format!(
                    "at least the number of roots ({}), since the budget counts the roots",
                    self.domain.roots.len()
                ),
            });
        }
        Ok(())
    }

    /// Parameters with every field set from one text column of the parameter table.
    pub(crate) fn from_table_column(column: fn(&table::ParamSpec) -> &'static str) -> Params {
        let mut params = blank();
        for spec in table::parameters() {
            let result = spec.set_text(&mut params, column(spec));
            debug_assert!(result.is_ok(), "default of `{}` does not read", spec.key);
        }
        params
    }
}

/// Placeholder values that `from_table_column` overwrites field by field (every field has a
/// table entry: `tests/tests/parameter_table.rs` checks the table's keys against the JSON keys).
fn blank() -> Params {
    Params {
        domain: Domain {
            width: 0,
            height: 0,
            cell_size: 0.0,
            units: String::new(),
            jitter: 0.0,
            roots: Vec::new(),
            outline: None,
            obstacles: Vec::new(),
            mask: None,
            grade_x: 0.0,
            grade_y: 0.0,
            runoff: 0.0,
            levels: Vec::new(),
            zones: Vec::new(),
            refine: 0,
            front_only: false,
            midrib: 0.0,
        },
        costs: CostWeights {
            w_len: 0.0,
            w_turn: 0.0,
            branch_angle: None,
            w_flow: 0.0,
            alpha: 0.0,
            w_path: 0.0,
            elongation: 0.0,
            rear_cost: 0.0,
            w_grade: 0.0,
        },
        run: RunControl {
            seed: 0,
            cells: 0,
            joining: Joining::Cheapest,
            temperature: 0.0,
            threshold: None,
            radius: 0.0,
            attach_to_segments: false,
            planar: false,
            keep_clear: false,
            refresh: 0.0,
            relax_junctions: 0,
            energy_sweeps: 0,
            energy_reach: None,
        },
        widths: Widths {
            gamma: 0.0,
            tip_width: 0.0,
            vein_area: 0.0,
            reconnect: None,
            loop_levels: 0,
            nest_loops: false,
            arches: false,
            gamma_major: None,
            major_order: 0,
        },
    }
}

pub(crate) fn check_polygon(key: &str, points: &[[f64; 2]]) -> Result<(), ParamError> {
    if points.len() < 3 {
        return Err(ParamError {
            key: key.to_string(),
            value: format!("{} points", points.len()),
            allowed: "a polygon of at least 3 [x, y] points".into(),
        });
    }
    for (index, point) in points.iter().enumerate() {
        if !point[0].is_finite() || !point[1].is_finite() {
            return Err(ParamError {
                key: format!("{key}[{index}]"),
                value: format!("[{}, {}]", point[0], point[1]),
                allowed: "finite coordinates in cells".into(),
            });
        }
    }
    Ok(())
}

/// Shortens a value for an error message.
pub(crate) fn short_text(text: &str) -> String {
    if text.chars().count() <= 60 {
        return text.to_string();
    }
    let head: String = text.chars().take(57).collect();
    format!("{head}...")
}

/// Formats a number for an error message (`NaN`, `inf` and `-inf` stay readable).
pub(crate) fn format_number(value: f64) -> String {
    if value.is_nan() {
        "NaN".to_string()
    } else if value.is_infinite() {
        if value > 0.0 { "inf" } else { "-inf" }.to_string()
    } else if value.abs() >= 1.0e5 && is_one_digit_power(value) {
        // 1e6 and 1e12 read better than 1000000 and 1000000000000; 25000000 stays whole.
        format!("{value:e}")
    } else {
        format!("{value}")
    }
}

/// Whether `value` is one digit times a power of ten (`1e6`, `-1e12`, `5e5`).
fn is_one_digit_power(value: f64) -> bool {
    let text = format!("{:e}", value.abs());
    text.split_once('e')
        .is_some_and(|(digits, _)| digits.len() == 1)
}
