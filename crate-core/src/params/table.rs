//! The parameter table: one `ParamSpec` per key (group, label, unit, kind, bounds, default,
//! help, link-version-1 default, fitting scale and accessor), in the order the page shows them.
//!
//! Everything else about a parameter comes from here: `Params::default` and
//! `link::version_1_defaults` (the two default columns), `Params::validate` (bounds and the
//! per-kind rules), the page's schema (`schema::fields`), the run-link codec (`text` and
//! `set_text`), README's parameter table (`readme_table`) and the test strategies in `tests/`.
//! Adding a parameter is one entry here plus its field in a part of `Params` and its use in the
//! model.

use super::text;
use super::{check_polygon, format_number, Joining, ParamError, Params, Root, Zone, UNITS};
use crate::limits::{MAX_CELLS, MAX_LEVELS, MAX_RADIUS, MAX_ZONES};
use crate::mask::MaskGrid;

/// One parameter: what the page shows, what validation allows, and how to reach its field.
#[derive(Clone, Copy)]
pub struct ParamSpec {
    /// The JSON key and the link key.
    pub key: &'static str,
    /// The panel group on the page.
    pub group: &'static str,
    /// Short human label.
    pub label: &'static str,
    /// Unit shown beside the control; `length` means the run's own length unit.
    pub unit: &'static str,
    /// Smallest and largest allowed value (numeric kinds only).
    pub bounds: Option<Bounds>,
    /// Why the bounds are what they are (numeric kinds only; empty otherwise).
    pub bounds_why: &'static str,
    /// The default, as link text.
    pub default: &'static str,
    /// The default of link format version 1, as link text: frozen, never changed.
    pub link_v1_default: &'static str,
    /// How a fit to measured targets should step this parameter; `None` when it is not fitted.
    pub fit: Option<FitScale>,
    /// One line of help.
    pub help: &'static str,
    /// The field in `Params`, which also decides the kind of value.
    pub access: Access,
}

/// The allowed range of a numeric parameter.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Bounds {
    /// Smallest allowed value.
    pub min: f64,
    /// Whether `min` itself is excluded.
    pub min_excluded: bool,
    /// Largest allowed value (included); `f64::MAX` means only "finite".
    pub max: f64,
}

/// How a fit steps a parameter: evenly, or evenly in its logarithm (positive values spanning
/// several orders of magnitude).
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum FitScale {
    /// Even steps of the value.
    Linear,
    /// Even steps of the logarithm of the value.
    Log,
}

/// What sort of value a field holds, which decides the form control and the link syntax.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum FieldKind {
    /// A whole number.
    Integer,
    /// A real number.
    Number,
    /// A real number or `none` (off).
    OptionalNumber,
    /// `true` or `false`.
    Flag,
    /// One of `choices`.
    Choice,
    /// Roots as `x,y,dx,dy` groups separated by `;`.
    Roots,
    /// One polygon as `x,y` points separated by `;`, or `none`.
    Polygon,
    /// Several polygons separated by `~`, or empty.
    Polygons,
    /// A run-length coded image mask, set by importing an image.
    Mask,
    /// Spot levels as `x,y,z` groups separated by `;`, or `none`.
    Levels,
    /// Runoff zones as `C:x,y;x,y;x,y` separated by `~`, or empty.
    Zones,
}

/// Reads and writes one field of `Params`: a getter and a mutable getter of the field's type.
#[derive(Clone, Copy)]
pub enum Access {
    /// A whole number that fits 32 bits.
    Count32(fn(&Params) -> &u32, fn(&mut Params) -> &mut u32),
    /// A whole number that fits 64 bits.
    Count64(fn(&Params) -> &u64, fn(&mut Params) -> &mut u64),
    /// A finite real number.
    Real(fn(&Params) -> &f64, fn(&mut Params) -> &mut f64),
    /// A finite real number or none.
    OptionalReal(
        fn(&Params) -> &Option<f64>,
        fn(&mut Params) -> &mut Option<f64>,
    ),
    /// A flag.
    Flag(fn(&Params) -> &bool, fn(&mut Params) -> &mut bool),
    /// The joining rule.
    Joining(fn(&Params) -> &Joining, fn(&mut Params) -> &mut Joining),
    /// The length unit, one of `UNITS`.
    Units(fn(&Params) -> &String, fn(&mut Params) -> &mut String),
    /// The roots.
    Roots(fn(&Params) -> &Vec<Root>, fn(&mut Params) -> &mut Vec<Root>),
    /// One polygon or none.
    Polygon(
        fn(&Params) -> &Option<Vec<[f64; 2]>>,
        fn(&mut Params) -> &mut Option<Vec<[f64; 2]>>,
    ),
    /// Several polygons.
    Polygons(
        fn(&Params) -> &Vec<Vec<[f64; 2]>>,
        fn(&mut Params) -> &mut Vec<Vec<[f64; 2]>>,
    ),
    /// The image mask or none.
    Mask(
        fn(&Params) -> &Option<MaskGrid>,
        fn(&mut Params) -> &mut Option<MaskGrid>,
    ),
    /// Spot levels `[x, y, z]`.
    Levels(
        fn(&Params) -> &Vec<[f64; 3]>,
        fn(&mut Params) -> &mut Vec<[f64; 3]>,
    ),
    /// Runoff zones.
    Zones(fn(&Params) -> &Vec<Zone>, fn(&mut Params) -> &mut Vec<Zone>),
}

/// `field!(Real, costs.alpha)`: the accessor of `params.costs.alpha`.
macro_rules! field {
    ($variant:ident, $part:ident . $name:ident) => {
        Access::$variant(
            |params| &params.$part.$name,
            |params| &mut params.$part.$name,
        )
    };
}

/// Bounds `[min, max]`.
const fn closed(min: f64, max: f64) -> Option<Bounds> {
    Some(Bounds {
        min,
        min_excluded: false,
        max,
    })
}

/// Bounds `(min, max]`.
const fn open_below(min: f64, max: f64) -> Option<Bounds> {
    Some(Bounds {
        min,
        min_excluded: true,
        max,
    })
}

/// Largest cost weight: larger weights only rescale the cost, and keep sums far from overflow.
const MAX_WEIGHT: f64 = 1.0e6;
/// Why a bound is what it is, shared by keys of one sort.
const WEIGHT_BOUNDS: &str = "Weights are relative; 0 turns a term off and 1e6 is six orders above the others, where the term alone decides.";
/// Why a bound is what it is, shared by keys of one sort.
const GRADE_BOUNDS: &str =
    "A rise of at most 1 per unit run (45 degrees) covers sites and terrain that can be built on.";
/// Why a bound is what it is, shared by keys of one sort.
const SIDE_BOUNDS: &str = "20,000 cells a side at most, and width x height within 25,000,000.";

/// The parameter table, in the order the page shows the fields and links write them.
static PARAMETERS: &[ParamSpec] = &[
    ParamSpec {
        key: "seed",
        group: "Run",
        label: "Random seed",
        unit: "",
        bounds: closed(0.0, u64::MAX as f64),
        bounds_why: "Any 64-bit number: the seed only starts the ChaCha8 generator.",
        default: "1",
        link_v1_default: "1",
        fit: None,
        help: "Same seed and settings grow the same network; another seed grows another specimen of the same kind (seed of the ChaCha8 generator).",
        access: field!(Count64, run.seed),
    },
    ParamSpec {
        key: "cells",
        group: "Run",
        label: "Cells to grow",
        unit: "cells",
        bounds: closed(1.0, MAX_CELLS as f64),
        bounds_why: "At least the roots; at most 25,000,000, the largest lattice (memory, see limits).",
        default: "10000",
        link_v1_default: "10000",
        fit: None,
        help: "Growth stops after this many cells, roots included: the cell budget. A run may end sooner at its stop threshold or when no allowed cell is left.",
        access: field!(Count64, run.cells),
    },
    ParamSpec {
        key: "joining",
        group: "Run",
        label: "How a cell is chosen",
        unit: "",
        bounds: None,
        bounds_why: "",
        default: "weighted",
        link_v1_default: "weighted",
        fit: None,
        help: "The joining rule: cheapest always takes the cheapest frontier cell; weighted takes cheaper cells more often, with weight exp(-(C - Cmin)/T); uniform takes any frontier cell alike.",
        access: field!(Joining, run.joining),
    },
    ParamSpec {
        key: "temperature",
        group: "Run",
        label: "Randomness of the choice",
        unit: "cost",
        bounds: open_below(0.0, f64::MAX),
        bounds_why: "Any positive finite value: the weights exp(-(C - Cmin)/T) stay in [0, 1]; a tiny T acts as cheapest, a huge one as uniform.",
        default: "0.5",
        link_v1_default: "0.5",
        fit: Some(FitScale::Log),
        help: "Larger is more random, smaller closer to cheapest-first; used by weighted joining only (temperature T, in cost units).",
        access: field!(Real, run.temperature),
    },
    ParamSpec {
        key: "threshold",
        group: "Run",
        label: "Stop when cells cost more than",
        unit: "cost",
        bounds: closed(-1.0e12, 1.0e12),
        bounds_why: "Costs of a cell lie far inside +-1e12 at every allowed weight, so wider bounds would only hide typing errors (common practice, no source).",
        default: "none",
        link_v1_default: "none",
        fit: Some(FitScale::Linear),
        help: "Open growth: the run ends once no frontier cell costs less than this (the stop threshold), before the cell budget; leave empty to grow to the budget.",
        access: field!(OptionalReal, run.threshold),
    },
    ParamSpec {
        key: "radius",
        group: "Run",
        label: "Reach of a new cell",
        unit: "cells",
        bounds: closed(1.0, MAX_RADIUS),
        bounds_why: "1 cell reaches the 4 side neighbours; 12 cells keeps each join's search at about 450 cells.",
        default: "4",
        link_v1_default: "4",
        fit: Some(FitScale::Linear),
        help: "Farthest a new cell may lie from the node or segment it joins (joining distance).",
        access: field!(Real, run.radius),
    },
    ParamSpec {
        key: "attach_to_segments",
        group: "Run",
        label: "Join along a branch, not only at nodes",
        unit: "",
        bounds: None,
        bounds_why: "",
        default: "false",
        link_v1_default: "false",
        fit: None,
        help: "Lets a new cell join the middle of a segment, splitting it (attach to segment sides).",
        access: field!(Flag, run.attach_to_segments),
    },
    ParamSpec {
        key: "planar",
        group: "Run",
        label: "No crossings",
        unit: "",
        bounds: None,
        bounds_why: "",
        default: "true",
        link_v1_default: "false",
        fit: None,
        help: "Keeps each new segment from crossing or running over an existing one, so the network lies flat as natural transport networks do (a plane network).",
        access: field!(Flag, run.planar),
    },
    ParamSpec {
        key: "keep_clear",
        group: "Run",
        label: "Segments go round blocked ground",
        unit: "",
        bounds: None,
        bounds_why: "",
        default: "false",
        link_v1_default: "false",
        fit: None,
        help: "Keeps each new segment off the cells outside the allowed region (areas kept clear, ground outside the outline or mask): a segment may not jump across a narrow obstacle to a node on its far side. On for sites read from files and the drainage presets.",
        access: field!(Flag, run.keep_clear),
    },
    ParamSpec {
        key: "refresh",
        group: "Run",
        label: "How often flows are updated",
        unit: "fraction",
        bounds: closed(0.001, 1.0),
        bounds_why: "From every 0.1 % of growth (slow but exact) to only once per doubling.",
        default: "0.05",
        link_v1_default: "0.05",
        fit: None,
        help: "Flows are recomputed each time the network grows by this fraction (flow refresh); smaller is slower and closer to exact.",
        access: field!(Real, run.refresh),
    },
    ParamSpec {
        key: "relax_junctions",
        group: "Run",
        label: "Junction relaxation sweeps",
        unit: "sweeps",
        bounds: closed(0.0, 50.0),
        bounds_why: "0 leaves every junction on its cell (as version-1 links grew); the cost settles within a few sweeps, and 50 is far past that.",
        default: "0",
        link_v1_default: "0",
        fit: None,
        help: "After growth, moves each junction off the grid to where its segments carry flow most cheaply (the flow-weighted Fermat point), so branching angles follow the flows; each sweep visits every junction once, never letting segments cross (junction relaxation).",
        access: field!(Count32, run.relax_junctions),
    },
    ParamSpec {
        key: "energy_sweeps",
        group: "Run",
        label: "Channel energy sweeps",
        unit: "sweeps",
        bounds: closed(0.0, 50.0),
        bounds_why: "0 leaves every node draining where it grew (as version-1 links grew); most of the drop comes in the first few sweeps, and 50 is far past that.",
        default: "0",
        link_v1_default: "0",
        fit: None,
        help: "After growth, changes where nodes drain (to another node within the reach) whenever that lowers the network's energy, the sum of flow^0.5 times length (optimal channel networks); each sweep visits every node once, never letting segments cross or making a loop.",
        access: field!(Count32, run.energy_sweeps),
    },
    ParamSpec {
        key: "energy_reach",
        group: "Run",
        label: "Channel energy reach",
        unit: "cells",
        bounds: closed(1.0, 50.0),
        bounds_why: "1.5 cells reaches the 8 neighbours, the move set of lattice studies of optimal channel networks; below 1 no neighbour is in reach, and 50 cells is far past any growth reach.",
        default: "none",
        link_v1_default: "none",
        fit: None,
        help: "How far the channel energy sweeps may re-point where a node drains, in cells; empty uses the growth reach. 1.5 (the 8 neighbours) moves the drained-area statistics toward those published for optimal channel networks; longer reaches lower the energy more.",
        access: field!(OptionalReal, run.energy_reach),
    },
    ParamSpec {
        key: "w_len",
        group: "Costs",
        label: "Cost of length",
        unit: "",
        bounds: closed(0.0, MAX_WEIGHT),
        bounds_why: WEIGHT_BOUNDS,
        default: "1",
        link_v1_default: "1",
        fit: Some(FitScale::Linear),
        help: "How much each unit of segment length adds to a cell's cost (length weight).",
        access: field!(Real, costs.w_len),
    },
    ParamSpec {
        key: "w_turn",
        group: "Costs",
        label: "Cost of bending",
        unit: "",
        bounds: closed(0.0, MAX_WEIGHT),
        bounds_why: WEIGHT_BOUNDS,
        default: "1",
        link_v1_default: "1",
        fit: Some(FitScale::Linear),
        help: "How much a junction angle away from the favoured one adds (angle weight).",
        access: field!(Real, costs.w_turn),
    },
    ParamSpec {
        key: "branch_angle",
        group: "Costs",
        label: "Favoured branching angle",
        unit: "°",
        bounds: closed(0.0, 150.0),
        bounds_why: "0 favours straight continuation; past 150 degrees a branch would run back along its parent.",
        default: "none",
        link_v1_default: "none",
        fit: Some(FitScale::Linear),
        help: "The junction angle that costs nothing; leave empty to favour running straight on (preferred angle).",
        access: field!(OptionalReal, costs.branch_angle),
    },
    ParamSpec {
        key: "w_flow",
        group: "Costs",
        label: "Cost of carrying flow",
        unit: "",
        bounds: closed(0.0, MAX_WEIGHT),
        bounds_why: WEIGHT_BOUNDS,
        default: "0.5",
        link_v1_default: "0.5",
        fit: Some(FitScale::Linear),
        help: "How much carrying flow adds: branched transport, (flow to the power α) × length (transport weight).",
        access: field!(Real, costs.w_flow),
    },
    ParamSpec {
        key: "alpha",
        group: "Costs",
        label: "Trunk sharing (lower merges more)",
        unit: "",
        bounds: closed(0.0, 1.0),
        bounds_why: "0 counts every branch alike whatever it carries; 1 makes transport cost additive, so sharing a trunk saves nothing; above 1 is not a transport network.",
        default: "0.5",
        link_v1_default: "0.5",
        fit: Some(FitScale::Linear),
        help: "Transport exponent α: below 1 one shared trunk costs less than parallel branches, so flows merge early; 1 gives no saving.",
        access: field!(Real, costs.alpha),
    },
    ParamSpec {
        key: "w_path",
        group: "Costs",
        label: "Cost of distance to the root",
        unit: "",
        bounds: closed(0.0, MAX_WEIGHT),
        bounds_why: WEIGHT_BOUNDS,
        default: "0",
        link_v1_default: "0",
        fit: Some(FitScale::Linear),
        help: "How much the path length back along the network to the root adds (supply-distance weight).",
        access: field!(Real, costs.w_path),
    },
    ParamSpec {
        key: "elongation",
        group: "Costs",
        label: "Stretch along the root's direction",
        unit: "",
        bounds: closed(1.0, 10.0),
        bounds_why: "1 is isotropic; past 10 the blade is a line of cells along the axis.",
        default: "1",
        link_v1_default: "1",
        fit: Some(FitScale::Log),
        help: "Distances along the root's direction count 1/elongation, so growth reaches farther that way (elongation).",
        access: field!(Real, costs.elongation),
    },
    ParamSpec {
        key: "rear_cost",
        group: "Costs",
        label: "Cost of growing behind the root",
        unit: "",
        bounds: closed(1.0, 10.0),
        bounds_why: "1 is isotropic; past 10 nothing grows behind the root in any case.",
        default: "1",
        link_v1_default: "1",
        fit: Some(FitScale::Log),
        help: "Distances behind the root count this many times (rear cost).",
        access: field!(Real, costs.rear_cost),
    },
    ParamSpec {
        key: "w_grade",
        group: "Terrain",
        label: "Cost of running uphill",
        unit: "",
        bounds: closed(0.0, MAX_WEIGHT),
        bounds_why: WEIGHT_BOUNDS,
        default: "0",
        link_v1_default: "0",
        fit: Some(FitScale::Linear),
        help: "How much running uphill adds, for sites (uphill weight).",
        access: field!(Real, costs.w_grade),
    },
    ParamSpec {
        key: "grade_x",
        group: "Terrain",
        label: "Ground slope to the right",
        unit: "m/m",
        bounds: closed(-1.0, 1.0),
        bounds_why: GRADE_BOUNDS,
        default: "0",
        link_v1_default: "0",
        fit: Some(FitScale::Linear),
        help: "Rise of the ground per unit of run to the right (east); negative falls (grade).",
        access: field!(Real, domain.grade_x),
    },
    ParamSpec {
        key: "grade_y",
        group: "Terrain",
        label: "Ground slope down the page",
        unit: "m/m",
        bounds: closed(-1.0, 1.0),
        bounds_why: GRADE_BOUNDS,
        default: "0",
        link_v1_default: "0",
        fit: Some(FitScale::Linear),
        help: "Rise of the ground per unit of run down the page (south); negative falls (grade).",
        access: field!(Real, domain.grade_y),
    },
    ParamSpec {
        key: "runoff",
        group: "Terrain",
        label: "Share of rain that runs off",
        unit: "",
        bounds: closed(0.01, 1.0),
        bounds_why: "Handbook runoff coefficients run from about 0.05 (flat sandy lawn) to 0.95 (roofs, pavement) (US FHWA HEC-22, table 3-1, from memory); from 0.01 flows and widths stay far from underflow; 1 means all rain runs off.",
        default: "1",
        link_v1_default: "1",
        fit: Some(FitScale::Linear),
        help: "Runoff coefficient C of the rational method, for sites: about 0.05 on sandy lawn to 0.95 on roofs and paving; 1 for leaves.",
        access: field!(Real, domain.runoff),
    },
    ParamSpec {
        key: "levels",
        group: "Terrain",
        label: "Spot levels of the ground",
        unit: "",
        bounds: None,
        bounds_why: "",
        default: "none",
        link_v1_default: "none",
        fit: None,
        help: "Ground levels x,y,z;x,y,z;... with x and y in cells and z the elevation in the length unit; when given, the ground between them is interpolated by inverse distance weighting (Shepard 1968, power 2) and replaces the slopes above in the uphill cost; none uses the slopes (spot levels).",
        access: Access::Levels(|params| &params.domain.levels, |params| &mut params.domain.levels),
    },
    ParamSpec {
        key: "zones",
        group: "Terrain",
        label: "Surfaces with their own runoff",
        unit: "",
        bounds: None,
        bounds_why: "",
        default: "",
        link_v1_default: "",
        fit: None,
        help: "Runoff zones C:x,y;x,y;x,y separated by ~, each a runoff coefficient C and a polygon in cells (roof 0.9:..., lawn 0.2:...); a cell takes the coefficient of the last zone holding its centre, other cells the share of rain that runs off above (runoff zones).",
        access: Access::Zones(|params| &params.domain.zones, |params| &mut params.domain.zones),
    },
    ParamSpec {
        key: "gamma",
        group: "Widths",
        label: "How width follows flow",
        unit: "",
        bounds: closed(1.0, 10.0),
        bounds_why: "2 keeps the cross-section area (da Vinci's rule), 3 is Murray's law (Murray 1926); 1 to 10 spans every published exponent with room.",
        default: "3",
        link_v1_default: "3",
        fit: Some(FitScale::Linear),
        help: "Width grows as flow to the power 1/γ (width exponent γ): 3 is Murray's law, 2 keeps the cross-section area.",
        access: field!(Real, widths.gamma),
    },
    ParamSpec {
        key: "tip_width",
        group: "Widths",
        label: "Width of the finest branches",
        unit: "cells",
        bounds: closed(0.001, 1.0),
        bounds_why: "From 1/1000 of a cell (below any drawing's resolution, yet a positive width) to a whole cell, as wide as a cell holds.",
        default: "0.12",
        link_v1_default: "0.12",
        fit: Some(FitScale::Log),
        help: "Width of a one-cell branch end, as a fraction of a cell (tip width).",
        access: field!(Real, widths.tip_width),
    },
    ParamSpec {
        key: "vein_area",
        group: "Widths",
        label: "Smallest drained area that conducts",
        unit: "area",
        bounds: closed(0.0, 1e12),
        bounds_why: "0 makes every segment conduct (as version-1 links drew); up to 10^12 square units, far beyond any blade or site, when no segment should conduct.",
        default: "0",
        link_v1_default: "0",
        fit: Some(FitScale::Linear),
        help: "A segment conducts when the area it drains is at least this; finer segments are the ground it serves (tissue in a leaf, hillslope on a site), drawn without width and left out of the measurements (the conducting threshold: canalisation in a leaf, channel initiation on a site).",
        access: field!(Real, widths.vein_area),
    },
    ParamSpec {
        key: "reconnect",
        group: "Widths",
        label: "Close loops: path-to-gap ratio",
        unit: "",
        bounds: closed(1.0, 100.0),
        bounds_why: "A free-ending vein joins only where the way round through the network is at least this many times the new connection; below 1 every neighbour would qualify, above 100 no loop closes on a lattice leaf (common practice, no source).",
        default: "none",
        link_v1_default: "none",
        fit: Some(FitScale::Log),
        help: "After growth, free ends of the network join a nearby conducting segment when the way round through the network is at least this many times longer than the new connection (the reconnection ratio), coarse branches first, so major branches close large loops and finer ones divide them; leave empty for a tree.",
        access: field!(OptionalReal, widths.reconnect),
    },
    ParamSpec {
        key: "loop_levels",
        group: "Widths",
        label: "Scales of loops",
        unit: "",
        bounds: closed(0.0, 8.0),
        bounds_why: "Each level quarters the drained area of the veins that close loops; 8 levels span a factor 65,536, beyond the range from midrib to veinlet of any lattice leaf.",
        default: "3",
        link_v1_default: "3",
        fit: None,
        help: "How many coarser scales close loops before the finest branches do: at each, the segments draining at least 4^level times the conducting threshold close their loops first, so loops nest.",
        access: field!(Count32, widths.loop_levels),
    },
    ParamSpec {
        key: "nest_loops",
        group: "Widths",
        label: "Loops split faces one at a time",
        unit: "",
        bounds: None,
        bounds_why: "",
        default: "false",
        link_v1_default: "false",
        fit: None,
        help: "With loops closing: at each scale, every closed loop takes at most one new wall per round, from its largest free end, and rounds repeat until no wall is added, so each wall divides a loop closed by a thicker one (nested loops); off, every free end of a scale joins in one pass.",
        access: field!(Flag, widths.nest_loops),
    },
    ParamSpec {
        key: "arches",
        group: "Widths",
        label: "Major branches loop with the next",
        unit: "",
        bounds: None,
        bounds_why: "",
        default: "false",
        link_v1_default: "false",
        fit: None,
        help: "With loops closing: a free end tries only joins whose loop could pass the path-to-gap ratio, so the end of a major branch reaches past its own side branches to the next major branch and closes a large loop; off, its few tries go to the shortest joins, which mostly end on its own side branches.",
        access: field!(Flag, widths.arches),
    },
    ParamSpec {
        key: "gamma_major",
        group: "Widths",
        label: "Width exponent of major branches",
        unit: "",
        bounds: closed(1.0, 10.0),
        bounds_why: "As for γ: 2 keeps the cross-section area, 3 is Murray's law; 1 to 10 spans every published exponent with room.",
        default: "none",
        link_v1_default: "none",
        fit: Some(FitScale::Linear),
        help: "Leave empty for one exponent γ everywhere; else the exponent at each junction moves from γ in the finest branches to this in the major ones, as measured networks move from Murray's law toward area-preserving branching (width exponent by order).",
        access: field!(OptionalReal, widths.gamma_major),
    },
    ParamSpec {
        key: "major_order",
        group: "Widths",
        label: "Order of the major branches",
        unit: "order",
        bounds: closed(2.0, 12.0),
        bounds_why: "Order 1 keeps γ, so the change needs at least order 2; 12 is beyond the highest Strahler order of any leaf or site.",
        default: "4",
        link_v1_default: "4",
        fit: None,
        help: "The Strahler order from which the major branches' width exponent applies in full; orders between move evenly from γ to it.",
        access: field!(Count32, widths.major_order),
    },
    ParamSpec {
        key: "width",
        group: "Lattice",
        label: "Grid width",
        unit: "cells",
        bounds: closed(1.0, 20_000.0),
        bounds_why: SIDE_BOUNDS,
        default: "120",
        link_v1_default: "120",
        fit: None,
        help: "Columns of the lattice; width × height is at most 25,000,000.",
        access: field!(Count32, domain.width),
    },
    ParamSpec {
        key: "height",
        group: "Lattice",
        label: "Grid height",
        unit: "cells",
        bounds: closed(1.0, 20_000.0),
        bounds_why: SIDE_BOUNDS,
        default: "120",
        link_v1_default: "120",
        fit: None,
        help: "Rows of the lattice, counted from the top.",
        access: field!(Count32, domain.height),
    },
    ParamSpec {
        key: "cell_size",
        group: "Lattice",
        label: "Size of one cell",
        unit: "length",
        bounds: closed(0.001, 1000.0),
        bounds_why: "From 1/1000 to 1000 of the length unit (1 nm to 1 mm in um, 1 mm to 1 km in m): lengths, areas and the drawing's size in mm stay finite and printable; finer or coarser cells call for another unit.",
        default: "0.15",
        link_v1_default: "0.15",
        fit: None,
        help: "Side of one lattice cell, in the length unit (cell size).",
        access: field!(Real, domain.cell_size),
    },
    ParamSpec {
        key: "refine",
        group: "Lattice",
        label: "Finer lattice",
        unit: "",
        bounds: closed(1.0, 4.0),
        bounds_why: "1 grows on the given cells; 4 splits each into 16 cells, 16 times the cells and work (memory, see limits).",
        default: "1",
        link_v1_default: "1",
        fit: None,
        help: "Splits every cell into refine x refine smaller cells while outline, roots, reach, costs per unit length, budget (as area) and thresholds keep their physical values (lattice refinement).",
        access: field!(Count32, domain.refine),
    },
    ParamSpec {
        key: "units",
        group: "Lattice",
        label: "Length unit",
        unit: "",
        bounds: None,
        bounds_why: "",
        default: "mm",
        link_v1_default: "mm",
        fit: None,
        help: "mm or um (micrometres) for leaves; m or ft for sites, which carry the concept-layout caution.",
        access: field!(Units, domain.units),
    },
    ParamSpec {
        key: "jitter",
        group: "Lattice",
        label: "Irregularity of node positions",
        unit: "cells",
        bounds: closed(0.0, 0.49),
        bounds_why: "Below half a cell, so a node never leaves its own cell.",
        default: "0.35",
        link_v1_default: "0.35",
        fit: Some(FitScale::Linear),
        help: "Random offset of each node from its cell centre, in x and in y, as a fraction of a cell (jitter).",
        access: field!(Real, domain.jitter),
    },
    ParamSpec {
        key: "roots",
        group: "Shape",
        label: "Where flow leaves",
        unit: "",
        bounds: None,
        bounds_why: "",
        default: "60,100,0,1",
        link_v1_default: "60,100,0,1",
        fit: None,
        help: "One group x,y,dx,dy per root, in cells: the petiole of a leaf or the outlet of a site, and the direction its flow leaves (roots).",
        access: field!(Roots, domain.roots),
    },
    ParamSpec {
        key: "front_only",
        group: "Shape",
        label: "Nothing behind the root",
        unit: "",
        bounds: None,
        bounds_why: "",
        default: "false",
        link_v1_default: "false",
        fit: None,
        help: "Keeps growth off every cell behind the line through each root across its outflow, so nothing grows behind where flow leaves (front of the root only).",
        access: field!(Flag, domain.front_only),
    },
    ParamSpec {
        key: "midrib",
        group: "Shape",
        label: "Main branch laid first",
        unit: "fraction",
        bounds: closed(0.0, 1.0),
        bounds_why: "A share of the straight run of allowed cells from the root: 0 lays none (as version-1 links grew), 1 lays it to the edge of the allowed region.",
        default: "0",
        link_v1_default: "0",
        fit: None,
        help: "Before growth, lays a main branch from each root straight against its outflow over this share of the way to the edge of the allowed region (a leaf's midrib, from the petiole toward the apex; a main channel on a site), with no supply distance along it, so the rest grows from its whole length and side branches leave it on both sides, as the midvein forms first in a developing leaf (laid midrib).",
        access: field!(Real, domain.midrib),
    },
    ParamSpec {
        key: "outline",
        group: "Shape",
        label: "Outline to fill",
        unit: "",
        bounds: None,
        bounds_why: "",
        default: "none",
        link_v1_default: "none",
        fit: None,
        help: "Polygon x,y;x,y;... in cells; a cell may be grown when its centre lies inside; none allows the whole grid (allowed outline).",
        access: field!(Polygon, domain.outline),
    },
    ParamSpec {
        key: "obstacles",
        group: "Shape",
        label: "Areas to keep clear",
        unit: "",
        bounds: None,
        bounds_why: "",
        default: "",
        link_v1_default: "",
        fit: None,
        help: "Polygons in cells, separated by ~; their cells stay empty (obstacles).",
        access: field!(Polygons, domain.obstacles),
    },
    ParamSpec {
        key: "mask",
        group: "Shape",
        label: "Allowed cells from an image",
        unit: "",
        bounds: None,
        bounds_why: "",
        default: "none",
        link_v1_default: "none",
        fit: None,
        help: "Set by loading an image: only its allowed cells grow; Clear allows every cell (image mask).",
        access: field!(Mask, domain.mask),
    },
];

/// Every parameter, in the order the page shows them and links write them.
pub fn parameters() -> &'static [ParamSpec] {
    PARAMETERS
}

/// The entry of `key`, if it is a parameter.
pub fn parameter(key: &str) -> Option<&'static ParamSpec> {
    PARAMETERS.iter().find(|spec| spec.key == key)
}

impl std::fmt::Debug for ParamSpec {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("ParamSpec")
            .field("key", &self.key)
            .field("kind", &self.kind())
            .field("bounds", &self.bounds)
            .field("default", &self.default)
            .finish()
    }
}

impl ParamSpec {
    /// The kind of value, from the accessor.
    pub fn kind(&self) -> FieldKind {
        match self.access {
            Access::Count32(..) | Access::Count64(..) => FieldKind::Integer,
            Access::Real(..) => FieldKind::Number,
            Access::OptionalReal(..) => FieldKind::OptionalNumber,
            Access::Flag(..) => FieldKind::Flag,
            Access::Joining(..) | Access::Units(..) => FieldKind::Choice,
            Access::Roots(..) => FieldKind::Roots,
            Access::Polygon(..) => FieldKind::Polygon,
            Access::Polygons(..) => FieldKind::Polygons,
            Access::Mask(..) => FieldKind::Mask,
            Access::Levels(..) => FieldKind::Levels,
            Access::Zones(..) => FieldKind::Zones,
        }
    }

    /// The allowed words of a choice or flag; empty for other kinds.
    pub fn choices(&self) -> &'static [&'static str] {
        match self.access {
            Access::Joining(..) => &text::JOINING_NAMES,
            Access::Units(..) => &UNITS,
            Access::Flag(..) => &["false", "true"],
            _ => &[],
        }
    }

    /// The field's value as link text.
    pub fn text(&self, params: &Params) -> String {
        match self.access {
            Access::Count32(get, _) => get(params).to_string(),
            Access::Count64(get, _) => get(params).to_string(),
            Access::Real(get, _) => text::number(*get(params)),
            Access::OptionalReal(get, _) => text::optional(*get(params)),
            Access::Flag(get, _) => get(params).to_string(),
            Access::Joining(get, _) => text::joining_name(*get(params)).to_string(),
            Access::Units(get, _) => get(params).clone(),
            Access::Roots(get, _) => text::roots_text(get(params)),
            Access::Polygon(get, _) => match get(params) {
                Some(points) => text::polygon_text(points),
                None => "none".to_string(),
            },
            Access::Polygons(get, _) => get(params)
                .iter()
                .map(|polygon| text::polygon_text(polygon))
                .collect::<Vec<_>>()
                .join("~"),
            Access::Mask(get, _) => match get(params) {
                Some(mask) => text::mask_text(mask),
                None => "none".to_string(),
            },
            Access::Levels(get, _) => text::levels_text(get(params)),
            Access::Zones(get, _) => text::zones_text(get(params)),
        }
    }

    /// Sets the field from link text; on error the parameters are untouched and the message
    /// says what the text should look like. Ranges are left to `Params::validate`.
    pub fn set_text(&self, params: &mut Params, value: &str) -> Result<(), String> {
        let value = value.trim();
        match self.access {
            Access::Count32(_, get) => *get(params) = text::whole(value)?,
            Access::Count64(_, get) => *get(params) = text::whole(value)?,
            Access::Real(_, get) => *get(params) = text::real(value)?,
            Access::OptionalReal(_, get) => *get(params) = text::optional_real(value)?,
            Access::Flag(_, get) => *get(params) = text::flag(value)?,
            Access::Joining(_, get) => *get(params) = text::joining(value)?,
            Access::Units(_, get) => *get(params) = value.to_string(),
            Access::Roots(_, get) => *get(params) = text::roots(value)?,
            Access::Polygon(_, get) => {
                *get(params) = if value == "none" || value.is_empty() {
                    None
                } else {
                    Some(text::polygon(value)?)
                }
            }
            Access::Polygons(_, get) => {
                *get(params) = value
                    .split('~')
                    .filter(|part| !part.trim().is_empty())
                    .map(text::polygon)
                    .collect::<Result<_, _>>()?
            }
            Access::Mask(_, get) => *get(params) = text::mask(value)?,
            Access::Levels(_, get) => *get(params) = text::levels(value)?,
            Access::Zones(_, get) => *get(params) = text::zones(value)?,
        }
        Ok(())
    }

    /// The field's value as a number (numeric kinds; `None` for an unset optional value).
    pub fn number(&self, params: &Params) -> Option<f64> {
        match self.access {
            Access::Count32(get, _) => Some(*get(params) as f64),
            Access::Count64(get, _) => Some(*get(params) as f64),
            Access::Real(get, _) => Some(*get(params)),
            Access::OptionalReal(get, _) => *get(params),
            _ => None,
        }
    }

    /// Checks this field alone against its bounds and the rules of its kind (roots inside the
    /// lattice, polygons of at least three finite points, a mask the lattice's size).
    pub fn check(&self, params: &Params) -> Result<(), ParamError> {
        if let (Some(bounds), Some(value)) = (self.bounds, self.number(params)) {
            if !bounds.contains(value) {
                return Err(ParamError {
                    key: self.key.to_string(),
                    value: format_number(value),
                    allowed: self.allowed_text(),
                });
            }
        }
        match self.access {
            Access::Units(get, _) if !UNITS.contains(&get(params).as_str()) => Err(ParamError {
                key: self.key.into(),
                value: super::short_text(&format!("{:?}", get(params))),
                allowed: format!("one of {}", UNITS.join(", ")),
            }),
            Access::Roots(get, _) => check_roots(params, get(params)),
            Access::Polygon(get, _) => match get(params) {
                Some(points) => check_polygon(self.key, points),
                None => Ok(()),
            },
            Access::Polygons(get, _) => {
                for (index, polygon) in get(params).iter().enumerate() {
                    check_polygon(&format!("{}[{index}]", self.key), polygon)?;
                }
                Ok(())
            }
            Access::Mask(get, _) => match get(params) {
                Some(mask) => mask
                    .validate(params.domain.width, params.domain.height)
                    .map_err(|error| ParamError {
                        key: error.key().into(),
                        value: error.value(),
                        allowed: error.allowed(),
                    }),
                None => Ok(()),
            },
            Access::Levels(get, _) => check_levels(self.key, get(params)),
            Access::Zones(get, _) => check_zones(self.key, get(params)),
            _ => Ok(()),
        }
    }

    /// What validation accepts, in words (the `allowed` of a `ParamError`).
    pub fn allowed_text(&self) -> String {
        let Some(bounds) = self.bounds else {
            return self.rule_text();
        };
        let noun = match self.kind() {
            FieldKind::Integer => "a whole number",
            _ => "a finite number",
        };
        let range = if bounds.max == u64::MAX as f64 {
            format!("{noun} from 0 to 2^64 - 1")
        } else if bounds.max == f64::MAX {
            if bounds.min_excluded {
                format!("{noun} greater than {}", format_number(bounds.min))
            } else {
                format!("{noun} of at least {}", format_number(bounds.min))
            }
        } else {
            format!(
                "{noun} in {}{}, {}]",
                if bounds.min_excluded { "(" } else { "[" },
                format_number(bounds.min),
                format_number(bounds.max)
            )
        };
        if self.kind() == FieldKind::OptionalNumber {
            format!("{range}, or none")
        } else {
            range
        }
    }

    /// The allowed values in short form, as README shows them.
    pub fn rule_text(&self) -> String {
        if let Some(bounds) = self.bounds {
            let low = format_number(bounds.min);
            let text = if bounds.max == f64::MAX {
                format!("{} {low}", if bounds.min_excluded { ">" } else { ">=" })
            } else if bounds.max == u64::MAX as f64 {
                "any whole number".to_string()
            } else if bounds.min_excluded {
                format!("({low}, {}]", format_number(bounds.max))
            } else {
                format!("{low} ..= {}", format_number(bounds.max))
            };
            return match self.kind() {
                FieldKind::OptionalNumber => format!("{text} or none"),
                _ => text,
            };
        }
        match self.kind() {
            FieldKind::Choice | FieldKind::Flag => self.choices().join(", "),
            FieldKind::Roots => {
                "at least one; each inside the lattice, a finite non-zero outflow".to_string()
            }
            FieldKind::Polygon => "none or at least 3 finite points".to_string(),
            FieldKind::Polygons => "each at least 3 finite points".to_string(),
            FieldKind::Mask => "none or the lattice's size, runs adding up to it".to_string(),
            FieldKind::Levels => format!(
                "none or at most {MAX_LEVELS} x,y,z levels within +-1e6, no two at one place"
            ),
            FieldKind::Zones => format!(
                "at most {MAX_ZONES}, each a coefficient in [0.01, 1] and at least 3 finite points"
            ),
            _ => String::new(),
        }
    }
}

impl Bounds {
    /// Whether `value` is finite and inside the bounds.
    pub fn contains(&self, value: f64) -> bool {
        let above_min = if self.min_excluded {
            value > self.min
        } else {
            value >= self.min
        };
        value.is_finite() && above_min && value <= self.max
    }
}

/// Roots: at least one, each inside the lattice, with a finite non-zero outflow direction.
fn check_roots(params: &Params, roots: &[Root]) -> Result<(), ParamError> {
    if roots.is_empty() {
        return Err(ParamError {
            key: "roots".into(),
            value: "[]".into(),
            allowed: "at least one root".into(),
        });
    }
    let (width, height) = (params.domain.width, params.domain.height);
    for (index, root) in roots.iter().enumerate() {
        let key = |field: &str| format!("roots[{index}].{field}");
        if root.x >= width {
            return Err(ParamError {
                key: key("x"),
                value: root.x.to_string(),
                allowed: format!("0 ..= {} (inside the lattice)", width.saturating_sub(1)),
            });
        }
        if root.y >= height {
            return Err(ParamError {
                key: key("y"),
                value: root.y.to_string(),
                allowed: format!("0 ..= {} (inside the lattice)", height.saturating_sub(1)),
            });
        }
        let [dx, dy] = root.outflow;
        if !dx.is_finite() || !dy.is_finite() || (dx == 0.0 && dy == 0.0) {
            return Err(ParamError {
                key: key("outflow"),
                value: format!("[{dx}, {dy}]"),
                allowed: "a finite, non-zero direction [dx, dy]".into(),
            });
        }
    }
    Ok(())
}

/// Largest size of a spot level's coordinates and elevation: a million cells is fifty lattices
/// wide and a million length units higher than any ground, and the inverse-distance weights of
/// levels so placed stay far from overflow.
const MAX_LEVEL_COORDINATE: f64 = 1.0e6;

/// Spot levels: within `MAX_LEVEL_COORDINATE`, at most `MAX_LEVELS`, no two at the same place (the interpolated ground
/// would not be a function there).
fn check_levels(key: &str, levels: &[[f64; 3]]) -> Result<(), ParamError> {
    if levels.len() > MAX_LEVELS {
        return Err(ParamError {
            key: key.into(),
            value: format!("{} levels", levels.len()),
            allowed: format!("at most {MAX_LEVELS} spot levels"),
        });
    }
    for (index, level) in levels.iter().enumerate() {
        if !level
            .iter()
            .all(|value| value.abs() <= MAX_LEVEL_COORDINATE)
        {
            return Err(ParamError {
                key: format!("{key}[{index}]"),
                value: format!(
                    "[{}, {}, {}]",
                    format_number(level[0]),
                    format_number(level[1]),
                    format_number(level[2])
                ),
                allowed: "x and y in cells and the elevation z each within +-1e6".into(),
            });
        }
    }
    let mut order: Vec<usize> = (0..levels.len()).collect();
    order.sort_by(|&a, &b| {
        levels[a][0]
            .total_cmp(&levels[b][0])
            .then(levels[a][1].total_cmp(&levels[b][1]))
    });
    for pair in order.windows(2) {
        let (first, second) = (levels[pair[0]], levels[pair[1]]);
        if first[0] == second[0] && first[1] == second[1] {
            let later = pair[0].max(pair[1]);
            return Err(ParamError {
                key: format!("{key}[{later}]"),
                value: format!("[{}, {}]", second[0], second[1]),
                allowed: format!(
                    "a place of its own: level {} stands at the same x,y",
                    pair[0].min(pair[1])
                ),
            });
        }
    }
    Ok(())
}

/// Runoff zones: at most `MAX_ZONES`, each a coefficient in [0.01, 1] (the bounds of `runoff`)
/// and a polygon of at least three finite points.
fn check_zones(key: &str, zones: &[Zone]) -> Result<(), ParamError> {
    if zones.len() > MAX_ZONES {
        return Err(ParamError {
            key: key.into(),
            value: format!("{} zones", zones.len()),
            allowed: format!("at most {MAX_ZONES} runoff zones"),
        });
    }
    for (index, zone) in zones.iter().enumerate() {
        if !(zone.runoff.is_finite() && (0.01..=1.0).contains(&zone.runoff)) {
            return Err(ParamError {
                key: format!("{key}[{index}].runoff"),
                value: format_number(zone.runoff),
                allowed: "a runoff coefficient in [0.01, 1], as for `runoff`".into(),
            });
        }
        check_polygon(&format!("{key}[{index}]"), &zone.polygon)?;
    }
    Ok(())
}

/// Start marker of the generated parameter table in README.md.
pub const README_TABLE_START: &str =
    "<!-- parameter table: generated from crate-core/src/params/table.rs, do not edit by hand -->";
/// End marker of the generated parameter table in README.md.
pub const README_TABLE_END: &str = "<!-- end of parameter table -->";

/// README's parameter table (Markdown, between and without the markers), from the table.
pub fn readme_table() -> String {
    let mut out = String::from(
        "| key | group | meaning | unit | default | allowed | why these bounds | fit |\n| --- | --- | --- | --- | --- | --- | --- | --- |\n",
    );
    for spec in parameters() {
        let unit = match spec.unit {
            "" => "-".to_string(),
            "length" => "`units`".to_string(),
            "area" => "`units`²".to_string(),
            unit => unit.to_string(),
        };
        let default = match spec.default {
            "" => "(empty)".to_string(),
            text => format!("`{text}`"),
        };
        let fit = match spec.fit {
            Some(FitScale::Linear) => "linear",
            Some(FitScale::Log) => "log",
            None => "-",
        };
        out.push_str(&format!(
            "| `{}` | {} | {}: {} | {} | {} | {} | {} | {} |\n",
            spec.key,
            spec.group,
            spec.label,
            spec.help.replace('|', "\\|"),
            unit,
            default,
            spec.rule_text().replace('|', "\\|"),
            match spec.bounds_why {
                "" => "-",
                why => why,
            }
            .replace('|', "\\|"),
            fit
        ));
    }
    out
}
