//! The pipeline after growth (`RunView::new`): named passes, each computed once per change of
//! the network and shared by the readings, the CSV, the run record, the page and the SVG (drawn in
//! `ramulus-draw`).
//!
//! 1. **topology**: `Network::check`, then the forest view (`Topology`) and Strahler orders
//!    when the network is a forest (`topology_pass`);
//! 2. **conducting network**: which segments carry flow (`conducting_network`); today every
//!    segment conducts, and a later area threshold will drop the finest ones here;
//! 3. **widths**: the per-segment table of flows, widths, orders and lengths (`SegmentTable`);
//! 4. **sizing**: room for sizing pipes or channels from flows (`Sizing`, empty for now, so
//!    nothing is sized yet);
//! 5. **metrics**: every entry of the metric table (`measure_with`);
//! 6. **digest**: the hash of the exact geometry and topology.

use crate::digest::digest_hex;
use crate::metrics::{measure_with, Metrics};
use crate::network::{Network, Topology, TopologyError};
use crate::params::Params;
use crate::segments::{strahler_orders, SegmentTable, WidthRule};

/// The forest view and Strahler orders of a forest, the output of the topology pass.
#[derive(Clone, Debug)]
pub struct ForestView {
    /// Parents, children, order and flows.
    pub topology: Topology,
    /// Strahler order of each node's downstream segment (see `segments::strahler_orders`).
    pub orders: Vec<u32>,
}

/// Which segments conduct, the output of the conducting-network pass: one entry per segment.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct ConductingNetwork {
    /// Whether segment `k` conducts.
    pub conducts: Vec<bool>,
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

/// Conducting-network pass: every segment conducts (identity). A threshold on the area a
/// segment drains will drop the finest segments here, and every later pass reads the result.
pub fn conducting_network(network: &Network) -> ConductingNetwork {
    ConductingNetwork {
        conducts: vec![true; network.segments.len()],
    }
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
    /// Runs every pass on a network with the parameters that set widths and `alpha`; fails
    /// only when the network is not valid (`Network::check`).
    pub fn new(network: Network, params: &Params) -> Result<RunView, TopologyError> {
        let forest = topology_pass(&network)?;
        let conducting = conducting_network(&network);
        let table = widths_pass(&network, forest.as_ref(), &conducting, width_rule(params));
        let sizing = Sizing::default();
        let metrics = measure_with(
            &network,
            forest
                .as_ref()
                .map(|view| (&view.topology, view.orders.as_slice())),
            params.costs.alpha,
        );
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
