//! The pipeline after growth (`RunView::new`): named passes, each computed once per change of
//! the network and shared by the readings, the CSV, the run record, the page and the SVG (drawn in
//! `ramulus-draw`).
//!
//! 1. **topology**: `Network::check`, then the forest view (`Topology`) and Strahler orders
//!    when the network is a forest (`topology_pass`);
//! 2. **conducting network**: which segments carry flow (`conducting_network`): those draining
//!    at least `vein_area` (every segment when it is 0); with a threshold, the vein network
//!    (`veins::vein_network`) is what the metrics measure and its Strahler orders are the
//!    table's (tissue segments have order 0 and width 0);
//! 3. **widths**: the per-segment table of flows, widths, orders and lengths (`SegmentTable`);
//! 4. **sizing**: room for sizing pipes or channels from flows (`Sizing`, empty for now, so
//!    nothing is sized yet);
//! 5. **metrics**: every entry of the metric table (`measure_with`);
//! 6. **digest**: the hash of the exact geometry and topology.

use crate::digest::digest_hex;
use crate::metrics::{measure_with, Measured, Metrics};
use crate::network::{Network, Topology, TopologyError, NO_PARENT};
use crate::params::Params;
use crate::segments::{strahler_orders, SegmentTable, WidthRule};
use crate::veins::{conducting_segments, vein_network};

/// The forest view and Strahler orders of a forest, the output of the topology pass.
#[derive(Clone, Debug)]
pub struct ForestView {
    /// Parents, children, order and flows.
    pub topology: Topology,
    /// Strahler order of each node's downstream segment (see `segments::strahler_orders`).
    pub orders: Vec<u32>,
}

/// Which segments conduct, the output of the conducting-network pass: one entry per segment.
#[derive(Clone, Debug, Default)]
pub struct ConductingNetwork {
    /// Whether segment `k` conducts.
    pub conducts: Vec<bool>,
    /// The vein network when some segment of a forest is tissue; `None` when every segment
    /// conducts (the whole network is the vein network).
    pub veins: Option<VeinView>,
}

/// The vein network (conducting segments only) with its forest view.
#[derive(Clone, Debug)]
pub struct VeinView {
    /// The conducting segments and their nodes (`veins::vein_network`).
    pub network: Network,
    /// Its forest view and Strahler orders.
    pub forest: ForestView,
    /// Each whole-network node's index in `network`, `NO_PARENT` for tissue nodes.
    pub index: Vec<u32>,
}

impl ConductingNetwork {
    /// How many segments are tissue (do not conduct).
    pub fn tissue_count(&self) -> usize {
        self.conducts.iter().filter(|&&conducts| !conducts).count()
    }
}

/// The output of the sizing pass. Room for sizing from flows (pipe or channel sizes of a site,
/// later); it holds nothing yet and no pass fills it.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Sizing {}

/// A network together with every pass's output.
#[derive(Clone, Debug)]
pub struct RunView {
    /// The network in physical units.
    pub network: Network,
    /// Topology pass: the forest view, `None` when the network has loops.
    pub forest: Option<ForestView>,
    /// Conducting-network pass.
    pub conducting: ConductingNetwork,
    /// Widths pass: flow, width, order and length per segment.
    pub table: SegmentTable,
    /// Sizing pass (room, empty).
    pub sizing: Sizing,
    /// Metrics pass: every metric that applies.
    pub metrics: Metrics,
    /// Digest of the exact geometry and topology, 16 hex digits.
    pub digest: String,
}

/// Topology pass: checks the network and derives the forest view when it is a forest.
pub fn topology_pass(network: &Network) -> Result<Option<ForestView>, TopologyError> {
    // `Network::topology` runs `Network::check` first, so its check errors are the invalid
    // networks and its other errors the valid networks that are not forests.
    match network.topology() {
        Ok(topology) => {
            let orders = strahler_orders(network, &topology);
            Ok(Some(ForestView { topology, orders }))
        }
        Err(TopologyError::TwoDownstream { .. } | TopologyError::Cycle { .. }) => Ok(None),
        Err(error) => Err(error),
    }
}

/// Conducting-network pass: a segment of a forest conducts when it drains at least
/// `vein_area` (`veins::conducting_segments`); the vein network is built when some segment does
/// not. Every segment of a network with loops conducts (its flows are unknown).
pub fn conducting_network(
    network: &Network,
    forest: Option<&ForestView>,
    params: &Params,
) -> ConductingNetwork {
    let topology = forest.map(|view| &view.topology);
    let conducts = conducting_segments(
        network,
        topology,
        params.widths.vein_area,
        params.domain.runoff,
    );
    let veins = match topology {
        Some(topology) if conducts.iter().any(|&conducts| !conducts) => {
            let (veins, index) = vein_network(network, topology, &conducts);
            // The vein network of a forest is a forest (conducting segments hold the roots).
            topology_pass(&veins).ok().flatten().map(|forest| VeinView {
                network: veins,
                forest,
                index,
            })
        }
        _ => None,
    };
    ConductingNetwork { conducts, veins }
}

/// The conducting-network pass as the pipeline runs it: `conducting_network`, then the forest
/// view's Strahler orders replaced by those counted on the vein network (0 for tissue) when some
/// segment is tissue.
pub fn conducting_pass(
    network: &Network,
    forest: &mut Option<ForestView>,
    params: &Params,
) -> ConductingNetwork {
    let conducting = conducting_network(network, forest.as_ref(), params);
    if let Some(view) = forest.as_mut() {
        if conducting.veins.is_some() {
            view.orders = conducting_orders(view, &conducting);
        }
    }
    conducting
}

/// The Strahler order of each node's downstream segment counted on the vein network, 0 for
/// tissue; the whole network's orders when every segment conducts.
fn conducting_orders(forest: &ForestView, conducting: &ConductingNetwork) -> Vec<u32> {
    let Some(veins) = &conducting.veins else {
        return forest.orders.clone();
    };
    (0..forest.orders.len())
        .map(|node| {
            let segment = forest.topology.segment_of[node];
            // A root has no downstream segment; it is always in the vein network.
            let conducts = segment == NO_PARENT
                || conducting
                    .conducts
                    .get(segment as usize)
                    .copied()
                    .unwrap_or(true);
            match veins.index[node] {
                vein_node if conducts && vein_node != NO_PARENT => {
                    veins.forest.orders[vein_node as usize]
                }
                _ => 0,
            }
        })
        .collect()
}

/// Widths pass: the per-segment table.
pub fn widths_pass(
    network: &Network,
    forest: Option<&ForestView>,
    conducting: &ConductingNetwork,
    rule: WidthRule,
) -> SegmentTable {
    let forest = forest.map(|view| (&view.topology, view.orders.as_slice()));
    SegmentTable::compute(network, forest, &conducting.conducts, rule)
}

impl RunView {
    /// How the readings of this view read when its network was grown on the lattice: every
    /// segment conducting (no tissue, as with `vein_area` 0) means the network runs through
    /// every cell, and the readings marked `follows_lattice` measure the cell size.
    pub fn grown_measured(&self) -> Measured {
        if self.conducting.tissue_count() == 0 {
            Measured::EveryCellConducts
        } else {
            Measured::AsGiven
        }
    }

    /// Runs every pass on a network with the parameters that set widths and `alpha`; fails
    /// only when the network is not valid (`Network::check`).
    pub fn new(network: Network, params: &Params) -> Result<RunView, TopologyError> {
        let mut forest = topology_pass(&network)?;
        let conducting = conducting_pass(&network, &mut forest, params);
        let table = widths_pass(&network, forest.as_ref(), &conducting, width_rule(params));
        let sizing = Sizing::default();
        let metrics = match &conducting.veins {
            Some(veins) => measure_with(
                &veins.network,
                Some((&veins.forest.topology, veins.forest.orders.as_slice())),
                params.costs.alpha,
            ),
            None => measure_with(
                &network,
                forest
                    .as_ref()
                    .map(|view| (&view.topology, view.orders.as_slice())),
                params.costs.alpha,
            ),
        };
        let digest = digest_hex(&network);
        Ok(RunView {
            network,
            forest,
            conducting,
            table,
            sizing,
            metrics,
            digest,
        })
    }

    /// The forest view's topology, when the network is a forest.
    pub fn topology(&self) -> Option<&Topology> {
        self.forest.as_ref().map(|view| &view.topology)
    }
}

/// Widths: a segment carrying one cell's weight is `tip_width * cell_size` wide, and width
/// grows as flow^(1/gamma).
pub fn width_rule(params: &Params) -> WidthRule {
    WidthRule {
        gamma: params.widths.gamma,
        base_width: params.widths.tip_width * params.domain.cell_size,
        reference_flow: params.domain.runoff * params.domain.cell_size * params.domain.cell_size,
    }
}

/// Caution carried by every drainage output (SVG, record, command line, page).
pub const SITE_CAUTION: &str = "Concept layout only: flows and sizes are rough estimates for \
early design. They are not a drainage design. Check every figure against local codes and have \
a licensed engineer design the system.";
