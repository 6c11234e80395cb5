//! `RunView`: everything derived from a grown (or loaded) network in one place: topology,
//! per-segment table, metrics and digest, computed once and shared by the exporters (the
//! run record here, the SVG in `ramulus-draw`).

use crate::digest::digest_hex;
use crate::metrics::{measure_with, Metrics};
use crate::network::{Network, Topology, TopologyError};
use crate::params::Params;
use crate::segments::{SegmentTable, WidthRule};

/// A network together with its derived values.
#[derive(Clone, Debug)]
pub struct RunView {
    /// The network in physical units.
    pub network: Network,
    /// Children, order and flows.
    pub topology: Topology,
    /// Flow, width, order and length per segment.
    pub table: SegmentTable,
    /// Every metric that applies.
    pub metrics: Metrics,
    /// Digest of the exact geometry and topology, 16 hex digits.
    pub digest: String,
}

impl RunView {
    /// Derives everything from a network and the parameters that set widths and `alpha`.
    pub fn new(network: Network, params: &Params) -> Result<RunView, TopologyError> {
        let topology = network.topology()?;
        let rule = width_rule(params);
        let table = SegmentTable::compute(&network, &topology, rule);
        let metrics = measure_with(&network, &topology, &table.order, params.alpha);
        let digest = digest_hex(&network);
        Ok(RunView {
            network,
            topology,
            table,
            metrics,
            digest,
        })
    }
}

/// Widths: a segment carrying one cell's weight is `tip_width * cell_size` wide, and width
/// grows as flow^(1/gamma).
pub fn width_rule(params: &Params) -> WidthRule {
    WidthRule {
        gamma: params.gamma,
        base_width: params.tip_width * params.cell_size,
        reference_flow: params.runoff * params.cell_size * params.cell_size,
    }
}

/// Caution carried by every drainage output (SVG, record, command line, page).
pub const SITE_CAUTION: &str = "Concept layout only: flows and sizes are rough estimates for \
early design. They are not a drainage design. Check every figure against local codes and have \
a licensed engineer design the system.";
