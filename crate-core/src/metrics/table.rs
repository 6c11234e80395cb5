//! The metric table (`METRIC_TABLE`): one entry per metric giving its key, label, unit,
//! description and the network kinds it applies to. The readings (`metric_rows`), the CSV
//! (`metrics_csv`) and README's metrics table (`metric_readme_table`) are all read from it.

use super::{Metrics, StreamOrder, ANGLE_HISTOGRAM_BINS};
use crate::network::NetworkKind;

/// Text shown for a value the network leaves undefined.
const UNDEFINED_TEXT: &str = "n/a";

/// Unit text of dimensionless values and counts.
const NO_UNIT: &str = "-";

/// The unit of a metric, written from the network's length unit.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum MetricUnit {
    /// A count (no unit).
    Count,
    /// A dimensionless ratio or exponent.
    Dimensionless,
    /// A length, in units.
    Length,
    /// An area, in units^2.
    Area,
    /// Length per area, in units/units^2.
    LengthPerArea,
    /// A count per area, in 1/units^2.
    PerArea,
    /// An angle, in degrees.
    Degrees,
    /// Branched-transport cost, in (units^2)^alpha x units = units^(2 alpha + 1).
    TransportCost,
}

impl MetricUnit {
    /// The unit text for length unit `unit` (`mm`, `m`, ...) and transport exponent `alpha`.
    /// Powers are written with superscript digits (`mm²`, SI Brochure, 9th edition, 2019,
    /// section 5.4.3); a power that is not a whole number keeps a caret (`mm^1.6`).
    pub fn text(self, unit: &str, alpha: f64) -> String {
        match self {
            MetricUnit::Count | MetricUnit::Dimensionless => NO_UNIT.to_string(),
            MetricUnit::Length => unit.to_string(),
            MetricUnit::Area => format!("{unit}\u{b2}"),
            MetricUnit::LengthPerArea => format!("{unit}/{unit}\u{b2}"),
            MetricUnit::PerArea => format!("1/{unit}\u{b2}"),
            MetricUnit::Degrees => "\u{b0}".to_string(),
            MetricUnit::TransportCost => format!("{unit}{}", power_text(2.0 * alpha + 1.0)),
        }
    }

    /// The unit text of README's table, in terms of "units".
    pub fn readme_text(self) -> &'static str {
        match self {
            MetricUnit::Count | MetricUnit::Dimensionless => NO_UNIT,
            MetricUnit::Length => "units",
            MetricUnit::Area => "units^2",
            MetricUnit::LengthPerArea => "units/units^2",
            MetricUnit::PerArea => "1/units^2",
            MetricUnit::Degrees => "degrees",
            MetricUnit::TransportCost => "(units^2)^alpha x units",
        }
    }
}

/// The exponent `power` written after a unit: superscript digits for a whole power from 0 to
/// 99 (nothing for 1), a caret and the number otherwise.
fn power_text(power: f64) -> String {
    const SUPERSCRIPTS: [char; 10] = [
        '\u{2070}', '\u{b9}', '\u{b2}', '\u{b3}', '\u{2074}', '\u{2075}', '\u{2076}', '\u{2077}',
        '\u{2078}', '\u{2079}',
    ];
    if power == 1.0 {
        return String::new();
    }
    if power.fract() == 0.0 && (0.0..100.0).contains(&power) {
        return (power as u32)
            .to_string()
            .chars()
            .map(|digit| SUPERSCRIPTS[digit.to_digit(10).unwrap_or(0) as usize])
            .collect();
    }
    format!("^{power}")
}

/// Which network kinds a metric applies to.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum AppliesTo {
    /// Forests and looped networks alike.
    AnyNetwork,
    /// Forests only (needs flow directions, parents or Strahler orders); absent on a looped
    /// network.
    ForestOnly,
}

impl AppliesTo {
    /// Whether the metric applies to a network of `kind`.
    pub fn includes(self, kind: NetworkKind) -> bool {
        self == AppliesTo::AnyNetwork || kind != NetworkKind::Looped
    }

    /// README text.
    pub fn text(self) -> &'static str {
        match self {
            AppliesTo::AnyNetwork => "any",
            AppliesTo::ForestOnly => "forest",
        }
    }
}

/// The value of one metric as the table reads it from `Metrics`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Reading<'a> {
    /// A number, `None` when undefined.
    Number(Option<f64>),
    /// A whole count.
    Count(u64),
    /// A whole count that may be undefined.
    OptionalCount(Option<u64>),
    /// Counts per histogram bin.
    Histogram(&'a [u64; ANGLE_HISTOGRAM_BINS]),
    /// Stream count and mean stream length per Strahler order (two rows per order).
    Streams(&'a [StreamOrder]),
}

/// One metric: how it is named, measured in, described and read.
#[derive(Clone, Copy, Debug)]
pub struct MetricEntry {
    /// Field name in `Metrics` and in JSON.
    pub key: &'static str,
    /// Label for people (the readings, the CSV).
    pub label: &'static str,
    /// Unit.
    pub unit: MetricUnit,
    /// One-line definition for README.
    pub description: &'static str,
    /// The label in drainage words, for sites (lengths in m or ft); empty when `label` suits
    /// leaves and sites alike.
    pub site_label: &'static str,
    /// A short explanation for people beside the reading: what it measures and when it says
    /// little.
    pub about: &'static str,
    /// Network kinds it applies to.
    pub applies_to: AppliesTo,
    /// Whether the reading follows the cell size rather than the model when every cell of a
    /// grown network is a vein (`Measured::EveryCellConducts`): lengths and counts per area
    /// of a network through every cell are fixed by the cell spacing.
    pub follows_lattice: bool,
    /// Reads the value from `Metrics`.
    pub read: for<'a> fn(&'a Metrics) -> Reading<'a>,
}

/// Every metric, in reading order. Adding a metric: a file in `metrics/`, its field in
/// `Metrics`, and one entry here.
pub const METRIC_TABLE: &[MetricEntry] = &[
    MetricEntry {
        key: "area",
        label: "area",
        unit: MetricUnit::Area,
        description: "area of the leaf or site the network drains (occupied cells x cell area)",
        site_label: "",
        about: "Area the network fills: occupied cells × cell area.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Number(Some(m.area)),
    },
    MetricEntry {
        key: "node_count",
        label: "nodes",
        unit: MetricUnit::Count,
        description: "number of nodes",
        site_label: "",
        about: "Points where segments meet, bend or end.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Count(m.node_count),
    },
    MetricEntry {
        key: "root_count",
        label: "roots",
        unit: MetricUnit::Count,
        description: "nodes without a downstream segment (petiole bases, outlets)",
        site_label: "outlets",
        about: "Where flow leaves the network.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Count(m.root_count),
    },
    MetricEntry {
        key: "segment_count",
        label: "segments",
        unit: MetricUnit::Count,
        description: "number of segments",
        site_label: "",
        about: "Straight pieces between two nodes.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Count(m.segment_count),
    },
    MetricEntry {
        key: "component_count",
        label: "connected components",
        unit: MetricUnit::Count,
        description: "connected components of the network's graph, a lone node counting as one",
        site_label: "",
        about: "Separate pieces of network: one per root when each root grows its own tree.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Count(m.component_count),
    },
    MetricEntry {
        key: "loop_count",
        label: "loops",
        unit: MetricUnit::Count,
        description: "independent loops: cyclomatic number segments - nodes + components (0 for a forest)",
        site_label: "",
        about: "Closed circuits; 0 for a tree-like network, as growth alone gives (loops close after growth when the loop ratio is set).",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Count(m.loop_count),
    },
    MetricEntry {
        key: "areoles",
        label: "areoles",
        unit: MetricUnit::Count,
        description: "bounded faces of the plane drawing (segments - nodes + components by Euler's formula); n/a when segments cross",
        site_label: "enclosed areas",
        about: "Smallest regions closed off on all sides by the network, counted on the plane drawing; 0 for a tree-like network, n/a when segments cross without a junction.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::OptionalCount(m.areoles),
    },
    MetricEntry {
        key: "areole_density",
        label: "areole density",
        unit: MetricUnit::PerArea,
        description: "areoles / area",
        site_label: "enclosed areas per area",
        about: "Enclosed areas per unit of area; meaningful only when the network has loops.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Number(m.areole_density),
    },
    MetricEntry {
        key: "mean_areole_area",
        label: "mean areole area",
        unit: MetricUnit::Area,
        description: "mean area inside an areole's boundary (shoelace formula)",
        site_label: "mean enclosed area",
        about: "Average enclosed area; n/a without loops.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Number(m.mean_areole_area),
    },
    MetricEntry {
        key: "areole_area_sd",
        label: "areole area standard deviation",
        unit: MetricUnit::Area,
        description: "sample standard deviation of the areole areas (divisor n - 1)",
        site_label: "spread of enclosed areas",
        about: "How much the enclosed areas vary (sample standard deviation); needs at least two.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Number(m.areole_area_sd),
    },
    MetricEntry {
        key: "veinlets_per_areole",
        label: "free-ending veinlets per areole",
        unit: MetricUnit::Dimensionless,
        description: "nodes of degree 1 inside areoles / areoles",
        site_label: "free channel ends per enclosed area",
        about: "Free ends of the network lying inside enclosed areas, per enclosed area; n/a without any.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Number(m.veinlets_per_areole),
    },
    MetricEntry {
        key: "areole_area_decades",
        label: "areole area span",
        unit: MetricUnit::Dimensionless,
        description: "log10(largest areole area / smallest areole area): decades the areole areas span",
        site_label: "span of enclosed areas",
        about: "Orders of magnitude between the largest and the smallest enclosed area: 0 when all are equal, 1 or more when loops of several scales enclose one another; n/a without enclosed areas.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Number(m.areole_area_decades),
    },
    MetricEntry {
        key: "nesting_number",
        label: "nesting of loops",
        unit: MetricUnit::Dimensionless,
        description: "1 - mean topological asymmetry of the hierarchical loop decomposition, thinnest segments removed first (Katifori & Magnasco 2012); needs widths",
        site_label: "nesting of enclosed areas",
        about: "How evenly loops divide into smaller loops when the thinnest segments are taken away first: 1 when each loop splits into equal halves, 0 for a ladder of loops; n/a for a tree or a network without widths.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Number(m.nesting_number),
    },
    MetricEntry {
        key: "loopiness",
        label: "loopiness",
        unit: MetricUnit::PerArea,
        description: "independent loops / area",
        site_label: "",
        about: "Independent closed circuits per unit area; 0 for a tree-like network.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Number(m.loopiness),
    },
    MetricEntry {
        key: "total_length",
        label: "total vein length",
        unit: MetricUnit::Length,
        description: "sum of segment lengths",
        site_label: "total channel length",
        about: "Sum of all segment lengths.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Number(Some(m.total_length)),
    },
    MetricEntry {
        key: "vein_density",
        label: "vein density",
        unit: MetricUnit::LengthPerArea,
        description: "total segment length / area",
        site_label: "drainage density",
        about: "Length per area: total length ÷ area.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: true,
        read: |m| Reading::Number(m.vein_density),
    },
    MetricEntry {
        key: "junction_count",
        label: "junctions",
        unit: MetricUnit::Count,
        description: "nodes of degree >= 3 (every segment at the node counts)",
        site_label: "",
        about: "Nodes where three or more segments meet.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Count(m.junction_count),
    },
    MetricEntry {
        key: "junction_density",
        label: "junction density",
        unit: MetricUnit::PerArea,
        description: "junctions / area",
        site_label: "",
        about: "Junctions per area.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: true,
        read: |m| Reading::Number(m.junction_density),
    },
    MetricEntry {
        key: "tip_count",
        label: "free-ending veinlets",
        unit: MetricUnit::Count,
        description: "nodes of degree 1 with a downstream segment (non-root nodes without children)",
        site_label: "channel heads",
        about: "Branches that end without feeding another: where flow starts.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Count(m.tip_count),
    },
    MetricEntry {
        key: "tip_density",
        label: "free-ending veinlet density",
        unit: MetricUnit::PerArea,
        description: "free-ending veinlets / area",
        site_label: "channel head density",
        about: "Free ends per area.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: true,
        read: |m| Reading::Number(m.tip_density),
    },
    MetricEntry {
        key: "branching_angle_count",
        label: "branching angles measured",
        unit: MetricUnit::Count,
        description: "angles measured: at each node with >= 2 upstream segments, one per upstream segment other than the main (largest-flow) one",
        site_label: "",
        about: "How many angles the mean and spread below come from; under about 10 they say little.",
        applies_to: AppliesTo::ForestOnly,
        follows_lattice: false,
        read: |m| Reading::Count(m.branching_angle_count),
    },
    MetricEntry {
        key: "branching_angle_mean",
        label: "mean branching angle",
        unit: MetricUnit::Degrees,
        description: "mean angle between the main upstream segment and each other one",
        site_label: "",
        about: "Angle between a side branch and the main branch where they meet, averaged; n/a without junctions.",
        applies_to: AppliesTo::ForestOnly,
        follows_lattice: false,
        read: |m| Reading::Number(m.branching_angle_mean),
    },
    MetricEntry {
        key: "branching_angle_sd",
        label: "branching angle standard deviation",
        unit: MetricUnit::Degrees,
        description: "sample standard deviation of the branching angles (divisor n - 1)",
        site_label: "",
        about: "Spread of those angles; needs at least two.",
        applies_to: AppliesTo::ForestOnly,
        follows_lattice: false,
        read: |m| Reading::Number(m.branching_angle_sd),
    },
    MetricEntry {
        key: "branching_angle_histogram",
        label: "branching angles per 10-degree bin, 0 to 180",
        unit: MetricUnit::Count,
        description: "branching angles in 18 bins of 10 degrees",
        site_label: "",
        about: "How many branching angles fall in each 10° bin (plotted below).",
        applies_to: AppliesTo::ForestOnly,
        follows_lattice: false,
        read: |m| Reading::Histogram(&m.branching_angle_histogram),
    },
    MetricEntry {
        key: "max_strahler_order",
        label: "highest Strahler order",
        unit: MetricUnit::Count,
        description: "highest Strahler order carried by a segment (Strahler 1957)",
        site_label: "",
        about: "Order of the main trunk: free ends are order 1; two streams of one order meeting start the next.",
        applies_to: AppliesTo::ForestOnly,
        follows_lattice: false,
        read: |m| Reading::OptionalCount(m.max_strahler_order.map(u64::from)),
    },
    MetricEntry {
        key: "streams",
        label: "streams",
        unit: MetricUnit::Count,
        description: "per Strahler order w: stream count N_w (-) and mean stream length L_w (units); a stream is a maximal chain of segments of one order",
        site_label: "",
        about: "Per order: how many streams (chains of one order) and their mean length. The top order is cut off at the root, where several of its streams may meet, so its mean length can be shorter than the next order's.",
        applies_to: AppliesTo::ForestOnly,
        follows_lattice: false,
        read: |m| Reading::Streams(&m.streams),
    },
    MetricEntry {
        key: "bifurcation_ratio",
        label: "bifurcation ratio",
        unit: MetricUnit::Dimensionless,
        description: "Horton R_B = 10^-(slope of log10 N_w on w), least squares over all orders",
        site_label: "",
        about: "How many times more streams each lower order has (Horton); needs three orders or more to mean much.",
        applies_to: AppliesTo::ForestOnly,
        follows_lattice: false,
        read: |m| Reading::Number(m.bifurcation_ratio),
    },
    MetricEntry {
        key: "length_ratio",
        label: "length ratio",
        unit: MetricUnit::Dimensionless,
        description: "Horton R_L = 10^(slope of log10 L_w on w), least squares over all orders",
        site_label: "",
        about: "How many times longer streams get from one order to the next (Horton); needs three orders or more.",
        applies_to: AppliesTo::ForestOnly,
        follows_lattice: false,
        read: |m| Reading::Number(m.length_ratio),
    },
    MetricEntry {
        key: "hack_exponent",
        label: "Hack exponent",
        unit: MetricUnit::Dimensionless,
        description: "least-squares slope of ln(longest upstream length) on ln(upstream area), one point per segment",
        site_label: "",
        about: "How the longest path upstream grows with the area drained (length ∝ area to this power, Hack's law).",
        applies_to: AppliesTo::ForestOnly,
        follows_lattice: false,
        read: |m| Reading::Number(m.hack_exponent),
    },
    MetricEntry {
        key: "tortuosity",
        label: "tortuosity",
        unit: MetricUnit::Dimensionless,
        description: "mean over cells of path length to root / straight distance to root",
        site_label: "",
        about: "Path along the network to the root ÷ straight distance, averaged over cells: 1 is perfectly straight.",
        applies_to: AppliesTo::ForestOnly,
        follows_lattice: false,
        read: |m| Reading::Number(m.tortuosity),
    },
    MetricEntry {
        key: "transport_cost",
        label: "transport cost",
        unit: MetricUnit::TransportCost,
        description: "sum over segments of q^alpha x length (the label names alpha)",
        site_label: "",
        about: "What growth saves on carrying flow: the sum of flow to the power α × length; compare runs with the same α only.",
        applies_to: AppliesTo::ForestOnly,
        follows_lattice: false,
        read: |m| Reading::Number(m.transport_cost),
    },
    MetricEntry {
        key: "outline_area",
        label: "outline area",
        unit: MetricUnit::Area,
        description: "occupied cells x cell area",
        site_label: "",
        about: "Area inside the grown shape's edge.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Number(m.outline_area),
    },
    MetricEntry {
        key: "outline_perimeter",
        label: "outline perimeter",
        unit: MetricUnit::Length,
        description: "perimeter by marching squares through edge midpoints",
        site_label: "",
        about: "Length of the grown shape's edge, ragged growth front included.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Number(m.outline_perimeter),
    },
    MetricEntry {
        key: "circularity",
        label: "circularity",
        unit: MetricUnit::Dimensionless,
        description: "4 pi A / P^2 of the smooth margin (cells closed, filled, traced and smoothed)",
        site_label: "",
        about: "4πA/P² of the shape's smooth margin, 1 for a disc: the ragged growth front is smoothed away first (gaps under about 4 cells closed), so it reads the outline of the grown area.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Number(m.circularity),
    },
    MetricEntry {
        key: "aspect_ratio",
        label: "aspect ratio",
        unit: MetricUnit::Dimensionless,
        description: "sqrt(l1 / l2) of the covariance of occupied cell centres",
        site_label: "",
        about: "Length ÷ breadth of the grown shape, from the spread of its cells; 1 when round.",
        applies_to: AppliesTo::AnyNetwork,
        follows_lattice: false,
        read: |m| Reading::Number(m.aspect_ratio),
    },
];

/// README's metrics table in Markdown, generated from `METRIC_TABLE` (a test keeps README in
/// step).
pub fn metric_readme_table() -> String {
    let mut text = String::from(
        "| key | metric | definition | unit | applies to |\n| --- | --- | --- | --- | --- |\n",
    );
    for entry in METRIC_TABLE {
        let unit = match entry.unit {
            _ if entry.key == "streams" => "-, units",
            unit => unit.readme_text(),
        };
        text.push_str(&format!(
            "| `{}` | {} | {} | {} | {} |\n",
            entry.key,
            entry.label,
            entry.description,
            unit,
            entry.applies_to.text()
        ));
    }
    text
}

/// Rows of (label, value text, unit text) describing `metrics`, one or more per entry of
/// `METRIC_TABLE`, in its order, each number written by `format_number`.
///
/// `units` is the network's length unit (`mm`, `m`, ...); an empty string is shown as `unit`.
/// Counts are whole numbers, and undefined values, and values of metrics that do not apply to
/// the network's kind, read `n/a`. Per-order rows follow the maximum Strahler order, lowest
/// order first. The readings people see format numbers in `ramulus-draw`; the CSV here writes
/// them at full precision.
pub fn metric_rows(
    metrics: &Metrics,
    units: &str,
    format_number: fn(f64) -> String,
) -> Vec<(String, String, String)> {
    rows(metrics, units, format_number)
}

/// The rows of `metric_rows` as CSV (RFC 4180: comma separated, CRLF line ends, fields with
/// a comma, quote or line break quoted), header `metric,value,unit`, with every value at full
/// precision (shortest text that reads back to the same `f64`). A
/// `caution` (drainage sites) becomes a last row `caution,<text>,-`.
pub fn metrics_csv(metrics: &Metrics, units: &str, caution: Option<&str>) -> String {
    let mut csv = String::from("metric,value,unit\r\n");
    let mut all = rows(metrics, units, format_precise);
    if let Some(text) = caution {
        all.push(("caution".into(), text.into(), NO_UNIT.into()));
    }
    for (label, value, unit) in all {
        let line = [label, value, unit]
            .map(|field| csv_field(&field))
            .join(",");
        csv.push_str(&line);
        csv.push_str("\r\n");
    }
    csv
}

fn csv_field(text: &str) -> String {
    if text.contains([',', '"', '\r', '\n']) {
        format!("\"{}\"", text.replace('"', "\"\""))
    } else {
        text.to_string()
    }
}

/// Shortest round-trip text, or `n/a` when not finite.
fn format_precise(value: f64) -> String {
    if value.is_finite() {
        format!("{value}")
    } else {
        UNDEFINED_TEXT.to_string()
    }
}

/// Rows of `metric_rows` with a fourth field: the short explanation people read beside the
/// reading (`MetricEntry::about`; for the per-order stream rows, the streams' explanation on the
/// first row and why the top order's mean length can be short on its row).
pub fn metric_rows_explained(
    metrics: &Metrics,
    units: &str,
    format_number: fn(f64) -> String,
) -> Vec<(String, String, String, String)> {
    explained_rows(metrics, units, format_number, Measured::AsGiven)
        .into_iter()
        .map(|(label, value, unit, about, _)| (label, value, unit, about))
        .collect()
}

/// How the measured network came about, as far as the readings need to know.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum Measured {
    /// Any network whose readings say what they say: a traced specimen, or a grown network
    /// with a conducting threshold.
    #[default]
    AsGiven,
    /// A grown network in which every segment conducts (`vein_area` 0): it runs through every
    /// cell, so the readings marked `follows_lattice` measure the cell size, not the model.
    EveryCellConducts,
}

/// The note that replaces a reading's explanation when it follows the cell size, in leaf
/// and in drainage words.
pub const FOLLOWS_LATTICE_NOTE: &str = "Says little here: every cell is a vein, so this follows the cell size, not the model. Set \"Smallest drained area that conducts\" above 0 to measure veins.";

/// Added to the text of a forest-only reading of a network whose loops closed after growth.
pub const TREE_NOTE: &str = "Measured on the grown vein tree, before its loops closed.";

/// `TREE_NOTE` in drainage words.
pub const TREE_NOTE_SITE: &str = "Measured on the grown channel tree, before its loops closed.";

/// `FOLLOWS_LATTICE_NOTE` in drainage words.
pub const FOLLOWS_LATTICE_NOTE_SITE: &str = "Says little here: every cell is a channel, so this follows the cell size, not the layout. Set \"Smallest drained area that conducts\" above 0 to measure channels.";

/// Rows of `metric_rows_explained` with a fifth field: whether the reading says little about
/// the model for a network measured as `measured` says (then its explanation is
/// `FOLLOWS_LATTICE_NOTE` or its drainage form).
pub fn metric_rows_noted(
    metrics: &Metrics,
    units: &str,
    format_number: fn(f64) -> String,
    measured: Measured,
) -> Vec<(String, String, String, String, bool)> {
    explained_rows(metrics, units, format_number, measured)
}

fn rows(
    metrics: &Metrics,
    units: &str,
    format_number: fn(f64) -> String,
) -> Vec<(String, String, String)> {
    explained_rows(metrics, units, format_number, Measured::AsGiven)
        .into_iter()
        .map(|(label, value, unit, _, _)| (label, value, unit))
        .collect()
}

/// Why the top order's mean stream length can be shorter than the next order's.
const TOP_ORDER_ABOUT: &str = "The top order's streams end at the root, where several may meet, so their mean length can be shorter than the order below.";

fn explained_rows(
    metrics: &Metrics,
    units: &str,
    format_number: fn(f64) -> String,
    measured: Measured,
) -> Vec<(String, String, String, String, bool)> {
    let unit = if units.is_empty() { "unit" } else { units };
    let site = crate::params::is_site_unit(units);
    let alpha = metrics.transport_alpha;
    let mut rows: Vec<(String, String, String, String, bool)> = Vec::new();
    for entry in METRIC_TABLE {
        let unit_text = entry.unit.text(unit, alpha);
        let name = if site && !entry.site_label.is_empty() {
            entry.site_label
        } else {
            entry.label
        };
        let label = if entry.unit == MetricUnit::TransportCost {
            format!("{name} (\u{3b1} = {alpha})")
        } else {
            name.to_string()
        };
        let says_little = entry.follows_lattice && measured == Measured::EveryCellConducts;
        let about = match (says_little, site) {
            (false, _) => entry.about.to_string(),
            (true, false) => FOLLOWS_LATTICE_NOTE.to_string(),
            (true, true) => FOLLOWS_LATTICE_NOTE_SITE.to_string(),
        };
        let about = if metrics.kind == NetworkKind::LoopedOnTree
            && entry.applies_to == AppliesTo::ForestOnly
        {
            let tree = if site { TREE_NOTE_SITE } else { TREE_NOTE };
            format!("{about} {tree}")
        } else {
            about
        };
        if !entry.applies_to.includes(metrics.kind) {
            if !matches!((entry.read)(metrics), Reading::Streams(_)) {
                rows.push((label, UNDEFINED_TEXT.to_string(), unit_text, about, false));
            }
            continue;
        }
        let value = match (entry.read)(metrics) {
            Reading::Number(value) => {
                value.map_or_else(|| UNDEFINED_TEXT.to_string(), format_number)
            }
            Reading::Count(count) => count.to_string(),
            Reading::OptionalCount(count) => {
                count.map_or_else(|| UNDEFINED_TEXT.to_string(), |count| count.to_string())
            }
            Reading::Histogram(counts) => counts
                .iter()
                .map(|count| count.to_string())
                .collect::<Vec<_>>()
                .join(" "),
            Reading::Streams(streams) => {
                for (index, stream) in streams.iter().enumerate() {
                    rows.push((
                        format!("streams of order {}", stream.order),
                        stream.stream_count.to_string(),
                        NO_UNIT.to_string(),
                        if index == 0 {
                            about.clone()
                        } else {
                            String::new()
                        },
                        false,
                    ));
                    rows.push((
                        format!("mean stream length of order {}", stream.order),
                        format_number(stream.mean_stream_length),
                        unit.to_string(),
                        if index + 1 == streams.len() && index > 0 {
                            TOP_ORDER_ABOUT.to_string()
                        } else {
                            String::new()
                        },
                        false,
                    ));
                }
                continue;
            }
        };
        rows.push((label, value, unit_text, about, says_little));
    }
    rows
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Every field of `Metrics` has one entry in the table (besides the network kind and the
    /// transport exponent, which describe how the values were measured), and keys are unique.
    #[test]
    fn the_table_covers_every_metric_once() {
        let json = serde_json::to_value(Metrics::default()).expect("metrics serialise");
        let mut fields: Vec<&str> = json
            .as_object()
            .expect("an object")
            .keys()
            .map(String::as_str)
            .filter(|key| !matches!(*key, "kind" | "transport_alpha"))
            .collect();
        let mut keys: Vec<&str> = METRIC_TABLE.iter().map(|entry| entry.key).collect();
        fields.sort_unstable();
        keys.sort_unstable();
        let before = keys.len();
        keys.dedup();
        assert_eq!(keys.len(), before, "a key appears twice");
        assert_eq!(keys, fields);
    }

    /// Full precision: the shortest text that reads back to the same `f64` (Rust's `Display`
    /// for floats), and `n/a` for what is not a number.
    #[test]
    fn csv_numbers_read_back_exactly() {
        for value in [8.123456, 0.1 + 0.2, 2.5e7, 1e-300] {
            assert_eq!(format_precise(value).parse::<f64>(), Ok(value));
        }
        assert_eq!(format_precise(f64::NAN), "n/a");
    }
}
