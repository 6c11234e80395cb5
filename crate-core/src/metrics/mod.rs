//! `Metrics`: every measurement of a `Network` (densities, branching angles, Strahler streams and
//! Horton ratios, Hack exponent, tortuosity, transport cost, outline), computed by `measure`, and
//! `metrics_table`, the same values as labelled rows for people to read.
//!
//! One code path serves grown and imported networks. Each measurement lives in its own file:
//! `densities` (lengths, junctions, tips), `angles`, `strahler_horton`, `hack`, `tortuosity`,
//! `transport`, `outline`, with the least-squares fit in `regression` and the readable rows in
//! `table`. Transcendental functions come from `libm`, so native and wasm builds agree to the bit.
//!
//! Values that a given network leaves undefined (no bifurcation, no area, fewer than two orders)
//! are `None`; measuring never panics on a network whose `Network::topology` succeeds.

use serde::{Deserialize, Serialize};

use crate::network::{Network, Topology, TopologyError};
use crate::segments::strahler_orders;

mod angles;
mod densities;
mod hack;
mod outline;
mod regression;
mod strahler_horton;
mod table;
mod tortuosity;
mod transport;

pub use table::{metrics_csv, metrics_table};

/// Number of bins of the branching-angle histogram.
pub const ANGLE_HISTOGRAM_BINS: usize = 18;

/// Width of one branching-angle histogram bin, in degrees (bins cover 0 to 180 degrees).
pub const ANGLE_BIN_WIDTH_DEGREES: f64 = 10.0;

/// Every measurement of one network, in the network's physical units.
///
/// "units" below means the network's length unit (`Network::units`, e.g. mm for a leaf, m for a
/// site); areas are in squared units and flows, which are sums of node weights, are areas too.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Metrics {
    /// Area of the leaf or site the network drains (`Network::area`), in units^2.
    pub area: f64,
    /// Number of nodes (count).
    pub node_count: u64,
    /// Number of roots: petiole bases or outlets (count).
    pub root_count: u64,
    /// Number of segments, one per non-root node (count).
    pub segment_count: u64,
    /// Sum of all segment lengths, in units.
    pub total_length: f64,
    /// Vein length per area (`total_length / area`), in units/units^2 (1/units); `None` when the
    /// area is not positive.
    pub vein_density: Option<f64>,
    /// Number of junctions: nodes of degree 3 or more, where the degree counts the parent
    /// segment (if any) and every child segment (count).
    pub junction_count: u64,
    /// Junctions per area, in 1/units^2; `None` when the area is not positive.
    pub junction_density: Option<f64>,
    /// Number of free-ending veinlets: non-root nodes of degree 1, i.e. without children (count).
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
    /// Highest Strahler order carried by a segment (Strahler 1957); 0 without segments.
    pub max_strahler_order: u32,
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
    /// Circularity `4 pi A / P^2` of the outline (dimensionless, 1 for a circle); `None`
    /// without cells.
    pub circularity: Option<f64>,
    /// Aspect ratio `sqrt(lambda_1 / lambda_2)` of the covariance of occupied cell centres,
    /// largest eigenvalue over smallest (dimensionless, >= 1); `None` with fewer than two cells
    /// or when the cells lie on one line.
    pub aspect_ratio: Option<f64>,
}

/// The streams of one Strahler order: a stream of order w is a maximal chain of consecutive
/// segments of order w.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct StreamOrder {
    /// The Strahler order w (1 for segments without tributaries).
    pub order: u32,
    /// Number of streams of this order, N_w (count).
    pub stream_count: u64,
    /// Mean length of the streams of this order, L_w, in units.
    pub mean_stream_length: f64,
}

/// Measures a network: derives its topology and Strahler orders, then calls `measure_with`.
///
/// `alpha` is the branched-transport exponent of `Metrics::transport_cost` (in [0, 1] in the
/// model; any finite value is accepted). Fails only when the nodes are not a forest.
pub fn measure(network: &Network, alpha: f64) -> Result<Metrics, TopologyError> {
    let topology = network.topology()?;
    let orders = strahler_orders(network, &topology);
    Ok(measure_with(network, &topology, &orders, alpha))
}

/// Measures a network whose topology and Strahler orders (one per node, as returned by
/// `segments::strahler_orders`) the caller already has.
///
/// `topology` and `orders` must have been derived from `network`; when their lengths do not
/// match the node count, the topology and orders are derived afresh (and if the network is
/// not a forest, only the values that need no topology are filled in).
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
pub fn measure_with(network: &Network, topology: &Topology, orders: &[u32], alpha: f64) -> Metrics {
    let node_count = network.nodes.len();
    let consistent = topology.children.len() == node_count
        && topology.flow.len() == node_count
        && topology.length.len() == node_count
        && topology.order.len() == node_count
        && orders.len() == node_count;
    if consistent {
        return measure_consistent(network, topology, orders, alpha);
    }
    match network.topology() {
        Ok(fresh_topology) => {
            let fresh_orders = strahler_orders(network, &fresh_topology);
            measure_consistent(network, &fresh_topology, &fresh_orders, alpha)
        }
        Err(_) => {
            let empty_network = Network {
                nodes: Vec::new(),
                area: network.area,
                units: network.units.clone(),
                cell_size: network.cell_size,
                cells: network.cells.clone(),
            };
            let empty_topology = Topology {
                children: Default::default(),
                order: Vec::new(),
                flow: Vec::new(),
                length: Vec::new(),
            };
            measure_consistent(&empty_network, &empty_topology, &[], alpha)
        }
    }
}

/// `measure_with` once the topology and orders are known to match the node list.
fn measure_consistent(
    network: &Network,
    topology: &Topology,
    orders: &[u32],
    alpha: f64,
) -> Metrics {
    let area = network.area;
    let per_area = |amount: f64| {
        if area > 0.0 && area.is_finite() {
            Some(amount / area)
        } else {
            None
        }
    };

    let counts = densities::count_lengths_and_degrees(network, topology);
    let angles = angles::branching_angles(network, topology);
    let angle_summary = angles::summarise_angles(&angles);
    let streams = strahler_horton::streams_by_order(network, topology, orders);
    let horton = strahler_horton::horton_ratios(&streams);
    let outline = outline::measure_outline(&network.cells, network.cell_size);

    Metrics {
        area,
        node_count: network.nodes.len() as u64,
        root_count: counts.root_count,
        segment_count: counts.segment_count,
        total_length: counts.total_length,
        vein_density: per_area(counts.total_length),
        junction_count: counts.junction_count,
        junction_density: per_area(counts.junction_count as f64),
        tip_count: counts.tip_count,
        tip_density: per_area(counts.tip_count as f64),
        branching_angle_count: angle_summary.count,
        branching_angle_mean: angle_summary.mean,
        branching_angle_sd: angle_summary.standard_deviation,
        branching_angle_histogram: angle_summary.histogram,
        max_strahler_order: streams.last().map_or(0, |stream| stream.order),
        streams,
        bifurcation_ratio: horton.bifurcation_ratio,
        length_ratio: horton.length_ratio,
        hack_exponent: hack::hack_exponent(network, topology),
        tortuosity: tortuosity::mean_tortuosity(network, topology),
        transport_alpha: alpha,
        transport_cost: transport::transport_cost(network, topology, alpha),
        outline_area: outline.area,
        outline_perimeter: outline.perimeter,
        circularity: outline.circularity,
        aspect_ratio: outline.aspect_ratio,
    }
}
