//! Hydraulics of a drainage site: peak flows by the Rational Method and channel sizes by
//! Manning's equation, segment by segment over a forest network, plus the schedule (CSV) and
//! map (GeoJSON) that report them.
//!
//! The one entry point is [`size_network`]: a `Network` with its forest view, the plain
//! per-node inputs (`HydraulicsInput`: drained area, runoff coefficient, ground elevation), the
//! design rainfall (`DesignStorm`, always given by the user from local records) and the sizing
//! rules (`SizingRules`: inlet time, pipe list or swale, Manning's n, velocity limits, minimum
//! grade) give a `SiteHydraulics`, which `schedule_csv`, `outlet_csv` and `site_geojson` turn
//! into text carrying [`DRAINAGE_CAUTION`].
//!
//! Modules: `units` (SI and US customary units, exact conversions), `rational` (Rational
//! Method, composite runoff coefficient, the runoff table), `rainfall` (design intensity),
//! `manning` (pipes and swales), `site_flows` (the pass over the network), `report` (CSV and
//! GeoJSON). Everything computes in SI (m, m^2, m^3/s, mm/h, m/s, minutes) and converts only
//! when reporting. Invariant: no I/O, nothing guessed: there is no default rainfall.

pub mod manning;
pub mod rainfall;
pub mod rational;
pub mod report;
pub mod site_flows;
pub mod units;

pub use manning::SwaleShape;
pub use rainfall::DesignStorm;
pub use rational::{composite_runoff, peak_flow, RunoffTable, SurfaceRunoff};
pub use report::{outlet_csv, schedule_csv, site_geojson};
pub use site_flows::{
    size_network, ChannelSize, Conveyance, HydraulicFlag, HydraulicsInput, OutletHydraulics,
    SegmentHydraulics, SiteHydraulics, SizingRules,
};
pub use units::UnitSystem;

/// The caution every output of site flows or sizes carries: the one site caution (it holds no
/// comma, so it stays one CSV field).
pub const DRAINAGE_CAUTION: &str = crate::run::SITE_CAUTION;

/// Why drainage figures cannot be computed: each names the field and the value (and the node
/// or segment) that is wrong.
#[derive(Clone, Debug, PartialEq)]
pub enum DrainageError {
    /// The network's length unit is not one a site can be sized in.
    LengthUnit {
        /// The unit given.
        unit: String,
    },
    /// A constant design intensity that is not a finite positive number.
    Intensity {
        /// The value given.
        value: f64,
    },
    /// An intensity-duration coefficient that is not usable (`a` must be positive; all finite).
    StormCoefficient {
        /// `a`, `b` or `c`.
        name: &'static str,
        /// The value given.
        value: f64,
    },
    /// The intensity-duration relation gives no finite positive intensity at a duration used.
    IntensityAtDuration {
        /// The duration (time of concentration), minutes.
        duration_minutes: f64,
        /// The intensity it gives (NaN when `t + b` is not positive).
        value: f64,
    },
    /// A runoff table row with a coefficient outside 0 to 1 or a range out of order.
    RunoffTable {
        /// The row's surface key.
        surface: String,
        /// `c`, `low` or `high`.
        field: &'static str,
        /// The value given.
        value: f64,
    },
    /// A surface the runoff table does not list.
    UnknownSurface {
        /// The surface key asked for.
        surface: String,
        /// The keys the table lists.
        known: Vec<String>,
    },
    /// A per-node input list whose length is not the node count.
    InputLength {
        /// The list (`node_area`, `node_runoff`, `node_ground`).
        field: &'static str,
        /// Nodes in the network.
        expected: usize,
        /// Entries given.
        found: usize,
    },
    /// A per-node value out of range: an area negative or not finite, a runoff coefficient
    /// outside 0 to 1, a ground elevation not finite.
    NodeValue {
        /// The list.
        field: &'static str,
        /// The node.
        node: usize,
        /// The value given.
        value: f64,
    },
    /// A sizing rule out of range.
    Rule {
        /// The rule (`inlet_time_minutes`, `manning_n`, `min_velocity`, ...).
        field: &'static str,
        /// The value given.
        value: f64,
    },
    /// The pipe list is empty.
    NoPipeSizes,
    /// A pipe diameter that is not a finite positive number.
    PipeSize {
        /// Its position in the list.
        index: usize,
        /// The value given, m.
        value: f64,
    },
    /// The forest view does not belong to the network (different node counts or ends).
    TopologyMismatch {
        /// Nodes in the network.
        nodes: usize,
        /// Entries in the forest view.
        topology: usize,
    },
    /// A segment whose two ends lie on the same point, so it has no grade.
    ZeroLength {
        /// The segment's index.
        segment: usize,
    },
}

impl std::fmt::Display for DrainageError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            DrainageError::LengthUnit { unit } => write!(
                f,
                "network length unit {unit:?} cannot be sized: use m or ft"
            ),
            DrainageError::Intensity { value } => write!(
                f,
                "design rainfall intensity {value} is not a positive number: give the intensity \
                 for the design storm from local rainfall records"
            ),
            DrainageError::StormCoefficient { name, value } => write!(
                f,
                "intensity-duration coefficient {name} = {value} is not usable: a must be a \
                 positive number and b and c finite numbers, from local rainfall records"
            ),
            DrainageError::IntensityAtDuration {
                duration_minutes,
                value,
            } => write!(
                f,
                "the intensity-duration relation gives intensity {value} at a duration of \
                 {duration_minutes} min, not a positive number: check coefficients a, b and c"
            ),
            DrainageError::RunoffTable {
                surface,
                field,
                value,
            } => write!(
                f,
                "runoff table, surface {surface:?}: {field} = {value} must lie between 0 and 1 \
                 (and low at most high)"
            ),
            DrainageError::UnknownSurface { surface, known } => write!(
                f,
                "runoff table has no surface {surface:?}; it lists {}",
                known.join(", ")
            ),
            DrainageError::InputLength {
                field,
                expected,
                found,
            } => write!(
                f,
                "{field} holds {found} values but the network has {expected} nodes"
            ),
            DrainageError::NodeValue { field, node, value } => {
                let need = match *field {
                    "node_runoff" => "a runoff coefficient between 0 and 1",
                    "node_area" => "a drained area of zero or more",
                    _ => "a finite number",
                };
                write!(f, "{field} of node {node} is {value}: it must be {need}")
            }
            DrainageError::Rule { field, value } => {
                write!(f, "sizing rule {field} = {value} is out of range")
            }
            DrainageError::NoPipeSizes => write!(f, "the pipe list holds no diameters"),
            DrainageError::PipeSize { index, value } => write!(
                f,
                "pipe diameter {index} of the list is {value} m, not a positive number"
            ),
            DrainageError::TopologyMismatch { nodes, topology } => write!(
                f,
                "the forest view describes {topology} nodes but the network has {nodes}"
            ),
            DrainageError::ZeroLength { segment } => write!(
                f,
                "segment {segment} has zero length (both ends on one point), so it has no grade"
            ),
        }
    }
}

impl std::error::Error for DrainageError {}
