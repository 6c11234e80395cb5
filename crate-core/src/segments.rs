//! `SegmentTable`: per-segment flow, width (flow^(1/gamma)), Strahler order and length, the
//! values every exporter and metric reads.

use crate::network::{Network, Topology};

/// Per-segment values, indexed by the segment's upstream node (entries of roots describe the
/// root node itself: its total flow, the width that flow would have, and its order).
#[derive(Clone, Debug, PartialEq)]
pub struct SegmentTable {
    /// Flow through the segment, in squared length units.
    pub flow: Vec<f64>,
    /// Drawn width in length units: `base_width * (flow / reference_flow)^(1 / gamma)`.
    pub width: Vec<f64>,
    /// Strahler order (Strahler 1957): 1 without tributaries; two of order n meeting give n + 1;
    /// a lower order joining leaves n unchanged.
    pub order: Vec<u32>,
    /// Segment length in length units (0 for roots).
    pub length: Vec<f64>,
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

impl SegmentTable {
    /// Computes flows, widths, orders and lengths for a network whose topology is known.
    pub fn compute(network: &Network, topology: &Topology, rule: WidthRule) -> SegmentTable {
        let order = strahler_orders(network, topology);
        let exponent = 1.0 / rule.gamma;
        let width = topology
            .flow
            .iter()
            .map(|&flow| {
                if flow <= 0.0 || rule.reference_flow <= 0.0 {
                    0.0
                } else {
                    rule.base_width * crate::fast_libm::pow(flow / rule.reference_flow, exponent)
                }
            })
            .collect();
        SegmentTable {
            flow: topology.flow.clone(),
            width,
            order,
            length: topology.length.clone(),
        }
    }
}

/// Strahler order of every segment, computed upstream to downstream.
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
