//! `Metrics`: every measurement of a `Network` (densities, components and loops, branching
//! angles, Strahler streams and Horton ratios, Hack exponent, tortuosity, transport cost,
//! outline), computed by `measure`, and the metric table (`METRIC_TABLE`) that names, describes
//! and reads each one for the readings, the CSV and README.
//!
//! One code path serves grown, recorded and looped networks. Each measurement lives in its own
//! file: `densities` (lengths, junctions, tips), `loops` (components and independent loops,
//! with petgraph), `areoles` (bounded faces of the plane drawing), `angles`, `strahler_horton`, `hack`, `tortuosity`, `transport`, `outline`,
//! with the least-squares fit in `regression` and the table in `table`. Transcendental
//! functions come from `libm`, so native and wasm builds agree to the bit.
//!
//! Values that a given network leaves undefined (no bifurcation, no area, fewer than two orders)
//! are `None`, and so are forest-only values on a looped network; measuring never panics on a
//! network that passes `Network::check`.

use serde::{Deserialize, Serialize};

use crate::network::{Network, NetworkKind, Topology, TopologyError};
use crate::segments::strahler_orders;

mod angles;
pub(crate) mod areoles;
mod densities;
mod hack;
mod loops;
pub mod margin;
mod nesting;
mod outline;
mod regression;
mod strahler_horton;
mod table;
mod tortuosity;
mod transport;

pub use outline::blade_length_width;
pub use table::{
    metric_readme_table, metric_rows, metric_rows_explained, metric_rows_noted, metrics_csv,
    AppliesTo, Measured, MetricEntry, MetricUnit, Reading, METRIC_TABLE,
};

/// Number of bins of the branching-angle histogram.
pub const ANGLE_HISTOGRAM_BINS: usize = 18;

/// Width of one branching-angle histogram bin, in degrees (bins cover 0 to 180 degrees).
pub const ANGLE_BIN_WIDTH_DEGREES: f64 = 10.0;

/// Every measurement of one network, in the network's physical units.
///
/// "units" below means the network's length unit (`Network::units`, e.g. mm for a leaf, m for a
/// site); areas are in squared units and flows, which are sums of node weights, are areas too.
///
/// Reading JSON, every missing field takes its default (absent, 0 or empty), so records written
/// before a metric existed keep loading. Which values apply to which network kind is said in
/// `METRIC_TABLE`; forest-only values are `None` (or 0 and empty) on a looped network.
#[derive(Clone, Debug, PartialEq, Default, Serialize, Deserialize)]
#[serde(default)]
pub struct Metrics {
    /// Shape of the network's graph: `forest`, `looped`, or `looped_on_tree` (loops closed after
    /// growth; the forest-only values are the grown vein tree's).
    pub kind: NetworkKind,
    /// Area of the leaf or site the network drains (`Network::area`), in units^2.
    pub area: f64,
    /// Number of nodes (count).
    pub node_count: u64,
    /// Number of roots: petiole bases or outlets (count).
    pub root_count: u64,
    /// Number of segments (count).
    pub segment_count: u64,
    /// Connected components of the network's graph, a lone node counting as one (count).
    pub component_count: u64,
    /// Independent loops: the cyclomatic number `segments - nodes + components` (count).
    pub loop_count: u64,
    /// Areoles: bounded faces of the network drawn in the plane, `segments - nodes +
    /// components` of them by Euler's formula (count); 0 for a forest; `None` when the network
    /// has loops but two of its segments cross or overlap (see `metrics/areoles.rs`).
    pub areoles: Option<u64>,
    /// Areoles per area, in 1/units^2; `None` when the area is not positive or the areoles are
    /// unknown.
    pub areole_density: Option<f64>,
    /// Mean area of an areole (shoelace formula over its boundary walk), in units^2; `None`
    /// without areoles.
    pub mean_areole_area: Option<f64>,
    /// Sample standard deviation of the areole areas (divisor `count - 1`), in units^2; `None`
    /// with fewer than two areoles.
    pub areole_area_sd: Option<f64>,
    /// Free-ending veinlets (nodes of degree 1) inside areoles per areole (dimensionless);
    /// `None` without areoles.
    pub veinlets_per_areole: Option<f64>,
    /// Decades spanned by the areole areas, `log10(largest / smallest)` (dimensionless); `None`
    /// without areoles.
    pub areole_area_decades: Option<f64>,
    /// Nesting of loops: one minus the mean topological asymmetry of the hierarchical loop
    /// decomposition, thinnest segments removed first (Katifori & Magnasco 2012; see
    /// `metrics/nesting.rs`); 1 for loops halved evenly inside loops, 0 for a ladder
    /// (dimensionless). Needs segment widths: `None` without them (a record measured again)
    /// or without a merge of more than two areoles.
    pub nesting_number: Option<f64>,
    /// Loopiness: independent loops per area, `loop_count / area`, in 1/units^2; `None` when
    /// the area is not positive.
    pub loopiness: Option<f64>,
    /// Sum of all segment lengths, in units.
    pub total_length: f64,
    /// Vein length per area (`total_length / area`), in units/units^2 (1/units); `None` when the
    /// area is not positive.
    pub vein_density: Option<f64>,
    /// Number of junctions: nodes of degree 3 or more, the degree counting every segment at
    /// the node (count).
    pub junction_count: u64,
    /// Junctions per area, in 1/units^2; `None` when the area is not positive.
    pub junction_density: Option<f64>,
    /// Number of free-ending veinlets: nodes of degree 1 with a downstream segment (in a forest:
    /// non-root nodes without children) (count).
    pub tip_count: u64,
    /// Free-ending veinlets per area, in 1/units^2; `None` when the area is not positive.
    pub tip_density: Option<f64>,
    /// Number of branching angles measured (count); see `measure_with` for the rule.
    pub branching_angle_count: u64,
    /// Mean branching angle, in degrees; `None` when no angle was measured.
    pub branching_angle_mean: Option<f64>,
    /// Sample standard deviation of the branching angles (divisor `count - 1`), in degrees;
    /// `None` when fewer than two angles were measured.
    pub branching_angle_sd: Option<f64>,
    /// Branching angles counted in 18 bins of 10 degrees: bin `i` holds angles in
    /// `[10 i, 10 (i + 1))` degrees, and the last bin also holds exactly 180 (counts).
    pub branching_angle_histogram: [u64; ANGLE_HISTOGRAM_BINS],
    /// Highest Strahler order carried by a segment (Strahler 1957); 0 without segments; `None`
    /// on a looped network.
    pub max_strahler_order: Option<u32>,
    /// Stream count and mean stream length of each order present, lowest order first.
    pub streams: Vec<StreamOrder>,
    /// Horton bifurcation ratio `R_B = 10^(-slope)` of the least-squares line of
    /// `log10 N_w` on `w` over all orders (dimensionless); `None` with fewer than two orders.
    pub bifurcation_ratio: Option<f64>,
    /// Horton length ratio `R_L = 10^(slope)` of the least-squares line of `log10 L_w` on `w`
    /// over all orders with a positive mean stream length (dimensionless); `None` with fewer
    /// than two such orders.
    pub length_ratio: Option<f64>,
    /// Hack exponent: least-squares slope of `ln(longest upstream length)` on
    /// `ln(upstream area)`, one point per segment (dimensionless); see `measure_with`. `None`
    /// with fewer than two usable points or when all areas are equal.
    pub hack_exponent: Option<f64>,
    /// Mean, over nodes with positive weight and positive straight distance to their root, of
    /// network path length to the root divided by that straight distance (dimensionless, >= 1);
    /// `None` when no node qualifies.
    pub tortuosity: Option<f64>,
    /// The exponent alpha the transport cost was computed with (dimensionless).
    pub transport_alpha: f64,
    /// Branched-transport cost `sum over segments of flow^alpha * length`, in
    /// (units^2)^alpha * units; segments that carry no flow cost nothing. `None` when alpha or
    /// the sum is not a finite number.
    pub transport_cost: Option<f64>,
    /// Area of the occupied lattice cells (cell count times `cell_size^2`), in units^2; `None`
    /// without cells or without a positive cell size.
    pub outline_area: Option<f64>,
    /// Length of the outline traced by marching squares over the occupied cells, in units;
    /// `None` without cells or without a positive cell size.
    pub outline_perimeter: Option<f64>,
    /// Circularity `4 pi A / P^2` of the smooth margin (`margin::blade_margin`; dimensionless,
    /// 1 for a circle); `None` without cells or for a lone cell.
    pub circularity: Option<f64>,
    /// Aspect ratio `sqrt(lambda_1 / lambda_2)` of the covariance of occupied cell centres,
    /// largest eigenvalue over smallest (dimensionless, >= 1); `None` with fewer than two cells
    /// or when the cells lie on one line.
    pub aspect_ratio: Option<f64>,
}

/// The streams of one Strahler order: a stream of order w is a maximal chain of consecutive
/// segments of order w.
#[derive(Clone, Debug, PartialEq, Default, Serialize, Deserialize)]
#[serde(default)]
pub struct StreamOrder {
    /// The Strahler order w (1 for segments without tributaries).
    pub order: u32,
    /// Number of streams of this order, N_w (count).
    pub stream_count: u64,
    /// Mean length of the streams of this order, L_w, in units.
    pub mean_stream_length: f64,
}

/// Measures a network of any kind: checks it, derives the forest view and Strahler orders when
/// it is a forest, then calls `measure_with`.
///
/// `alpha` is the branched-transport exponent of `Metrics::transport_cost` (in [0, 1] in the
/// model; any finite value is accepted). Fails only when the network is not valid
/// (`Network::check`): a looped network is measured, its forest-only values absent.
pub fn measure(network: &Network, alpha: f64) -> Result<Metrics, TopologyError> {
    network.check()?;
    let topology = network.topology().ok();
    let orders = topology
        .as_ref()
        .map(|topology| strahler_orders(network, topology));
    let forest = topology.as_ref().zip(orders.as_deref());
    Ok(measure_with(network, forest, alpha))
}

/// Measures a valid network (`Network::check`) given its forest view and Strahler orders (one
/// per node, as returned by `segments::strahler_orders`), or `None` when it is not a forest.
///
/// When the forest view's lengths do not match the node count, it is left out and the
/// forest-only values are absent.
///
/// Rules behind the values:
/// - **Branching angle.** At every node with two or more children (upstream segments), the
///   *main* child is the one with the largest flow; among equal flows, the lowest node index.
///   Each other child gives one angle: the angle between the vectors from the node to the main
///   child and from the node to that other child, in degrees (0 to 180). A child at the same
///   position as the node (a zero-length segment) has no direction and gives no angle; when the
///   main child has zero length, the node gives none.
/// - **Strahler streams.** A segment starts a new stream when none of its children has its own
///   order; otherwise it continues the stream of that child. Roots are not segments, so
///   `max_strahler_order` is the highest order carried by a segment.
/// - **Hack exponent.** Each segment (node `i` to its parent) is a measuring point at its
///   downstream end: its upstream area is the segment's flow, and its longest upstream length is
///   the segment's own length plus the longest upstream length of its children (0 for a tip).
///   Points with positive length and positive area enter the fit.
pub fn measure_with(network: &Network, forest: Option<(&Topology, &[u32])>, alpha: f64) -> Metrics {
    measure_weighted(network, forest, alpha, None)
}

/// `measure_with` plus the nesting of loops, which needs one width per segment (`widths`, in
/// the order of `network.segments`; the thinnest segments are removed first).
pub fn measure_weighted(
    network: &Network,
    forest: Option<(&Topology, &[u32])>,
    alpha: f64,
    widths: Option<&[f64]>,
) -> Metrics {
    let node_count = network.nodes.len();
    let forest = forest.filter(|&forest| fits(network, forest));
    let area = network.area;
    let per_area = |amount: f64| {
        if area > 0.0 && area.is_finite() {
            Some(amount / area)
        } else {
            None
        }
    };

    let counts = densities::count_lengths_and_degrees(
        network,
        forest.map(|(topology, _)| topology.length.as_slice()),
    );
    let components = loops::count_components_and_loops(network);
    let outline = outline::measure_outline(&network.cells, network.cell_size);
    let areoles = areoles::find_areoles(network, components.loop_count);
    let areole_summary = summarise_areas(&areoles.areas);
    let mut metrics = Metrics {
        kind: NetworkKind::Looped,
        area,
        node_count: node_count as u64,
        root_count: counts.root_count,
        segment_count: counts.segment_count,
        component_count: components.component_count,
        loop_count: components.loop_count,
        areoles: areoles.count,
        areole_density: areoles.count.and_then(|count| per_area(count as f64)),
        mean_areole_area: areole_summary.0,
        areole_area_sd: areole_summary.1,
        veinlets_per_areole: match areoles.count {
            Some(count) if count > 0 => Some(areoles.veinlets_inside as f64 / count as f64),
            _ => None,
        },
        areole_area_decades: nesting::area_decades(&areoles.areas),
        nesting_number: match (widths, areoles.count) {
            (Some(widths), Some(count)) if count > 1 && widths.len() == network.segments.len() => {
                let points: Vec<(f64, f64)> = network.nodes.iter().map(|n| (n.x, n.y)).collect();
                let edges: Vec<(u32, u32)> =
                    network.segments.iter().map(|s| (s.from, s.to)).collect();
                let (leaves, merges) = nesting::loop_hierarchy(&points, &edges, widths);
                nesting::nesting_number(leaves, &merges)
            }
            _ => None,
        },
        loopiness: per_area(components.loop_count as f64),
        total_length: counts.total_length,
        vein_density: per_area(counts.total_length),
        junction_count: counts.junction_count,
        junction_density: per_area(counts.junction_count as f64),
        tip_count: counts.tip_count,
        tip_density: per_area(counts.tip_count as f64),
        transport_alpha: alpha,
        outline_area: outline.area,
        outline_perimeter: outline.perimeter,
        circularity: outline.circularity,
        aspect_ratio: outline.aspect_ratio,
        ..Metrics::default()
    };
    if let Some(forest) = forest {
        add_forest_readings(&mut metrics, network, forest, alpha);
        metrics.kind = NetworkKind::Forest;
    }
    metrics
}

/// The metrics of a looped network grown as a tree whose loops closed after growth: `looped`
/// (measured with `measure_weighted`, no forest view) gains the forest-only readings of `tree`,
/// the grown vein tree before its loops closed, with its forest view and Strahler orders; the
/// kind becomes `NetworkKind::LoopedOnTree`. Only `tree`'s nodes are read (the forest view
/// holds the tree's links), so the looped network itself may stand for it. A forest view that
/// does not fit the nodes leaves `looped` as it was.
pub fn with_tree_readings(
    mut looped: Metrics,
    tree: &Network,
    forest: (&Topology, &[u32]),
    alpha: f64,
) -> Metrics {
    if fits(tree, forest) {
        add_forest_readings(&mut looped, tree, forest, alpha);
        looped.kind = NetworkKind::LoopedOnTree;
    }
    looped
}

/// Whether a forest view and its orders have one entry per node of `network`.
fn fits(network: &Network, (topology, orders): (&Topology, &[u32])) -> bool {
    let count = network.nodes.len();
    topology.children.len() == count
        && topology.parent.len() == count
        && topology.flow.len() == count
        && topology.length.len() == count
        && topology.order.len() == count
        && orders.len() == count
}

/// Sets the forest-only readings of `metrics` from a forest and its view.
fn add_forest_readings(
    metrics: &mut Metrics,
    network: &Network,
    forest: (&Topology, &[u32]),
    alpha: f64,
) {
    let (topology, orders) = forest;
    let angles = angles::branching_angles(network, topology);
    let angle_summary = angles::summarise_angles(&angles);
    let streams = strahler_horton::streams_by_order(network, topology, orders);
    let horton = strahler_horton::horton_ratios(&streams);
    metrics.branching_angle_count = angle_summary.count;
    metrics.branching_angle_mean = angle_summary.mean;
    metrics.branching_angle_sd = angle_summary.standard_deviation;
    metrics.branching_angle_histogram = angle_summary.histogram;
    metrics.max_strahler_order = Some(streams.last().map_or(0, |stream| stream.order));
    metrics.streams = streams;
    metrics.bifurcation_ratio = horton.bifurcation_ratio;
    metrics.length_ratio = horton.length_ratio;
    metrics.hack_exponent = hack::hack_exponent(network, topology);
    metrics.tortuosity = tortuosity::mean_tortuosity(network, topology);
    metrics.transport_cost = transport::transport_cost(network, topology, alpha);
}

/// Mean and sample standard deviation (divisor n - 1) of areole areas.
fn summarise_areas(areas: &[f64]) -> (Option<f64>, Option<f64>) {
    if areas.is_empty() {
        return (None, None);
    }
    let count = areas.len() as f64;
    let mean = areas.iter().sum::<f64>() / count;
    let sd = (areas.len() > 1).then(|| {
        let squares: f64 = areas.iter().map(|area| (area - mean) * (area - mean)).sum();
        (squares / (count - 1.0)).sqrt()
    });
    (Some(mean), sd)
}
