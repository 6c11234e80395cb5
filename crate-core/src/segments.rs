//! `SegmentTable`: one row per segment of a network (flow, width flow^(1/gamma), Strahler order,
//! length, whether it conducts), the values every exporter reads, and `strahler_orders`.

use crate::network::{Network, Topology};

/// Per-segment values: row `k` describes `Network::segments[k]`.
///
/// On a network that is not a forest, flows are not known (a later flow solve will give them):
/// such rows hold flow 0, the width of one cell's flow (`WidthRule::base_width`) and order 0.
#[derive(Clone, Debug, PartialEq, Default)]
pub struct SegmentTable {
    /// Flow through the segment, in squared length units.
    pub flow: Vec<f64>,
    /// Drawn width in length units: `base_width * (flow / reference_flow)^(1 / gamma)`; 0 for a
    /// segment that does not conduct.
    pub width: Vec<f64>,
    /// Strahler order (Strahler 1957): 1 without tributaries; two of order n meeting give n + 1;
    /// a lower order joining leaves n unchanged; 0 when the network is not a forest.
    pub order: Vec<u32>,
    /// Segment length in length units.
    pub length: Vec<f64>,
    /// Whether the segment belongs to the conducting network (see `run::conducting_network`).
    pub conducts: Vec<bool>,
}

/// How widths are scaled.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct WidthRule {
    /// Width exponent gamma (3 = Murray's law, 2 = area preserving).
    pub gamma: f64,
    /// Width of a segment that carries `reference_flow`, in length units.
    pub base_width: f64,
    /// The flow that gets `base_width` (one cell's weight on a lattice).
    pub reference_flow: f64,
}

impl WidthRule {
    /// The width of a segment carrying `flow`.
    pub fn width(&self, flow: f64) -> f64 {
        if flow <= 0.0 || self.reference_flow <= 0.0 {
            0.0
        } else {
            self.base_width * crate::fast_libm::pow(flow / self.reference_flow, 1.0 / self.gamma)
        }
    }
}

impl SegmentTable {
    /// Computes one row per segment. `forest` is the forest view and its Strahler orders (one
    /// per node, from `strahler_orders`), `None` when the network is not a forest; `conducts`
    /// has one entry per segment (missing entries conduct).
    pub fn compute(
        network: &Network,
        forest: Option<(&Topology, &[u32])>,
        conducts: &[bool],
        rule: WidthRule,
    ) -> SegmentTable {
        let count = network.segments.len();
        let mut table = SegmentTable {
            flow: Vec::with_capacity(count),
            width: Vec::with_capacity(count),
            order: Vec::with_capacity(count),
            length: Vec::with_capacity(count),
            conducts: Vec::with_capacity(count),
        };
        for (index, segment) in network.segments.iter().enumerate() {
            let conducting = conducts.get(index).copied().unwrap_or(true);
            let from = segment.from as usize;
            let (flow, width, order, length) = match forest {
                Some((topology, orders)) if topology.parent.get(from) == Some(&segment.to) => (
                    topology.flow[from],
                    rule.width(topology.flow[from]),
                    orders.get(from).copied().unwrap_or(1),
                    topology.length[from],
                ),
                _ => (
                    0.0,
                    rule.base_width,
                    0,
                    network.segment_length(segment.from, segment.to),
                ),
            };
            table.flow.push(flow);
            table.width.push(if conducting { width } else { 0.0 });
            table.order.push(order);
            table.length.push(length);
            table.conducts.push(conducting);
        }
        table
    }

    /// Number of rows.
    pub fn len(&self) -> usize {
        self.width.len()
    }

    /// Whether the table has no rows.
    pub fn is_empty(&self) -> bool {
        self.width.is_empty()
    }
}

/// Strahler order of every node's downstream segment in a forest, computed upstream to
/// downstream (a root holds the order its tree would pass on).
pub fn strahler_orders(network: &Network, topology: &Topology) -> Vec<u32> {
    let mut order = vec![1u32; network.nodes.len()];
    // Children come after parents in `topology.order`, so the reverse visits children first.
    for &node in topology.order.iter().rev() {
        let node = node as usize;
        let children = &topology.children[node];
        if children.is_empty() {
            continue;
        }
        let highest = children
            .iter()
            .map(|&child| order[child as usize])
            .max()
            .unwrap_or(1);
        let at_highest = children
            .iter()
            .filter(|&&child| order[child as usize] == highest)
            .count();
        order[node] = if at_highest >= 2 {
            highest + 1
        } else {
            highest
        };
    }
    order
}
