//! `Geometry`: per-segment buffers (end points, widths, orders, flows, lengths) that the page
//! reads through typed-array views into wasm memory, refilled in place from a network.

use ramulus_core::network::Network;
use ramulus_core::segments::{SegmentTable, WidthRule};

/// Flat buffers, one entry per node: segment `i` runs from node `i` to its parent; a root's
/// entry has both ends at the root and zero length.
#[derive(Default)]
pub struct Geometry {
    /// `x0, y0, x1, y1` per segment, physical units (y down).
    pub ends: Vec<f32>,
    /// Drawn width, physical units.
    pub widths: Vec<f32>,
    /// Strahler order (1 for a tip segment).
    pub orders: Vec<u32>,
    /// Flow, squared units.
    pub flows: Vec<f32>,
    /// Length, units.
    pub lengths: Vec<f32>,
    /// Smallest and largest positive flow (0, 0 when none).
    pub flow_range: (f64, f64),
    /// Highest order present.
    pub max_order: u32,
}

impl Geometry {
    /// Refills every buffer from `network`, reusing their allocations. Returns false (and
    /// empties the buffers) when the nodes are not a forest, which a grown network always is.
    pub fn fill(&mut self, network: &Network, rule: WidthRule) -> bool {
        self.clear();
        let Ok(topology) = network.topology() else {
            return false;
        };
        let table = SegmentTable::compute(network, &topology, rule);
        let mut low = f64::INFINITY;
        let mut high = 0.0f64;
        for (index, node) in network.nodes.iter().enumerate() {
            let (x1, y1) = match network.nodes.get(node.parent as usize) {
                Some(parent) if !node.is_root() => (parent.x, parent.y),
                _ => (node.x, node.y),
            };
            self.ends
                .extend_from_slice(&[node.x as f32, node.y as f32, x1 as f32, y1 as f32]);
            self.widths.push(table.width[index] as f32);
            self.orders.push(table.order[index]);
            let flow = table.flow[index];
            self.flows.push(flow as f32);
            self.lengths.push(table.length[index] as f32);
            if flow > 0.0 && !node.is_root() {
                low = low.min(flow);
                high = high.max(flow);
            }
            if !node.is_root() {
                self.max_order = self.max_order.max(table.order[index]);
            }
        }
        self.flow_range = if high > 0.0 { (low, high) } else { (0.0, 0.0) };
        true
    }

    /// Number of entries (nodes).
    pub fn len(&self) -> usize {
        self.widths.len()
    }

    fn clear(&mut self) {
        self.ends.clear();
        self.widths.clear();
        self.orders.clear();
        self.flows.clear();
        self.lengths.clear();
        self.flow_range = (0.0, 0.0);
        self.max_order = 0;
    }
}
