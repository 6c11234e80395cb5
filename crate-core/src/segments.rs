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
///
/// With one exponent (`gamma_major == gamma`) a width is a function of flow alone,
/// `base_width * (flow / reference_flow)^(1 / gamma)`. With an exponent by order
/// (`gamma_major != gamma`) widths follow a branching rule junction by junction, from the tips
/// down: the downstream segment of a node whose segment has Strahler order `w` is
/// `r = (r_own^g + sum over children r_c^g)^(1/g)` with `g = exponent(w)` (see
/// `WidthRule::exponent`) and `r_own = base_width * (weight / reference_flow)^(1/g)` the width
/// the node's own weight would have alone. With one exponent this is the flow rule again
/// (`r^g` adds up like flow); with `g = 3` it is Murray's law at each junction
/// (`r_0^3 = r_1^3 + r_2^3`, Murray 1926), with `g = 2` area-preserving branching. Measured
/// leaves follow Murray's law in minor veins and move toward area-preserving in major ones
/// (Price, Knox & Brodribb 2013, PLoS ONE 8).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct WidthRule {
    /// Width exponent gamma (3 = Murray's law, 2 = area preserving), of order 1 (every order
    /// when `gamma_major == gamma`).
    pub gamma: f64,
    /// Width exponent at Strahler order `major_order` and above; equal to `gamma` for one
    /// exponent everywhere.
    pub gamma_major: f64,
    /// The Strahler order from which `gamma_major` applies in full (at least 2).
    pub major_order: u32,
    /// Width of a segment that carries `reference_flow`, in length units.
    pub base_width: f64,
    /// The flow that gets `base_width` (one cell's weight on a lattice).
    pub reference_flow: f64,
}

impl WidthRule {
    /// One exponent for every order: `gamma_major` and `major_order` set so that
    /// `WidthRule::width` (flow alone) gives every width.
    pub fn single(gamma: f64, base_width: f64, reference_flow: f64) -> WidthRule {
        WidthRule {
            gamma,
            gamma_major: gamma,
            major_order: 2,
            base_width,
            reference_flow,
        }
    }

    /// Whether the exponent changes with Strahler order (widths then need the forest, not only
    /// each segment's flow).
    pub fn by_order(&self) -> bool {
        self.gamma_major != self.gamma
    }

    /// The width exponent at a junction whose downstream segment has Strahler order `order`:
    /// `gamma` at order 1 (and 0, tissue), `gamma_major` from `major_order` on, evenly between:
    /// `gamma + (gamma_major - gamma) * min(1, (order - 1) / (major_order - 1))`.
    pub fn exponent(&self, order: u32) -> f64 {
        if order <= 1 || !self.by_order() {
            return self.gamma;
        }
        let span = f64::from(self.major_order.max(2) - 1);
        let share = (f64::from(order - 1) / span).min(1.0);
        self.gamma + (self.gamma_major - self.gamma) * share
    }

    /// The width of a segment carrying `flow`.
    pub fn width(&self, flow: f64) -> f64 {
        if flow <= 0.0 || self.reference_flow <= 0.0 {
            0.0
        } else {
            self.base_width * crate::fast_libm::pow(flow / self.reference_flow, 1.0 / self.gamma)
        }
    }
}

/// `WidthRule::width` with the last widths remembered by the exact bits of their flow, so that
/// the many segments carrying the same flow (every tip carries one cell's weight, every
/// two-cell branch two, ...) take one `pow` between them. A grown network of 210,000 segments
/// holds about 21,000 distinct flows, and this table finds about seven in eight widths
/// without computing them. The widths are the very bits `width` gives.
struct WidthMemo {
    rule: WidthRule,
    /// `(flow bits, width)` per slot; flow bits 0 (flow 0, never stored) marks an empty slot.
    slots: Vec<(u64, f64)>,
}

/// Slots of `WidthMemo`, a power of two: 4,096 slots (64 KiB) keep it in the processor cache.
const WIDTH_MEMO_BITS: u32 = 12;

impl WidthMemo {
    fn new(rule: WidthRule) -> WidthMemo {
        WidthMemo {
            rule,
            slots: vec![(0, 0.0); 1 << WIDTH_MEMO_BITS],
        }
    }

    fn width(&mut self, flow: f64) -> f64 {
        if flow <= 0.0 {
            return self.rule.width(flow);
        }
        let bits = flow.to_bits();
        // Fibonacci hashing (Knuth, TAOCP vol. 3, 6.4): the top bits of the product by
        // 2^64 / golden ratio spread nearby flows over the slots.
        let slot = (bits.wrapping_mul(0x9e37_79b9_7f4a_7c15) >> (64 - WIDTH_MEMO_BITS)) as usize;
        match self.slots.get_mut(slot) {
            Some((key, width)) if *key == bits => *width,
            Some(entry) => {
                let width = self.rule.width(flow);
                *entry = (bits, width);
                width
            }
            None => self.rule.width(flow),
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
        let mut widths = WidthMemo::new(rule);
        let by_order = match forest {
            Some((topology, orders)) if rule.by_order() => {
                Some(widths_by_order(network, topology, orders, rule))
            }
            _ => None,
        };
        for (index, segment) in network.segments.iter().enumerate() {
            let conducting = conducts.get(index).copied().unwrap_or(true);
            let from = segment.from as usize;
            let (flow, width, order, length) = match forest {
                Some((topology, orders)) if topology.parent.get(from) == Some(&segment.to) => (
                    topology.flow[from],
                    match &by_order {
                        Some(by_order) => by_order[from],
                        None => widths.width(topology.flow[from]),
                    },
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

/// The width of every node's downstream segment under a rule whose exponent changes with
/// Strahler order (`orders`, one per node), by the branching rule of `WidthRule`, tips first.
/// Widths of tissue segments are computed too (their flow reaches the veins); the table draws
/// them 0.
fn widths_by_order(
    network: &Network,
    topology: &Topology,
    orders: &[u32],
    rule: WidthRule,
) -> Vec<f64> {
    use crate::fast_libm::pow;
    let mut width = vec![0.0; network.nodes.len()];
    if rule.reference_flow <= 0.0 {
        return width;
    }
    // Children come after parents in `topology.order`: the reverse settles children first.
    for &node in topology.order.iter().rev() {
        let node = node as usize;
        let exponent = rule.exponent(orders.get(node).copied().unwrap_or(1));
        let own = network.nodes[node].weight;
        let mut sum = if own > 0.0 {
            pow(rule.base_width, exponent) * (own / rule.reference_flow)
        } else {
            0.0
        };
        for &child in topology.children.of(node) {
            let child_width = width[child as usize];
            if child_width > 0.0 {
                sum += pow(child_width, exponent);
            }
        }
        width[node] = if sum > 0.0 {
            pow(sum, 1.0 / exponent)
        } else {
            0.0
        };
    }
    width
}

/// Strahler order of every node's downstream segment in a forest, computed upstream to
/// downstream (a root holds the order its tree would pass on).
pub fn strahler_orders(network: &Network, topology: &Topology) -> Vec<u32> {
    let count = network.nodes.len();
    let mut order = vec![1u32; count];
    // What each node's children pass on so far, packed as `highest order << 2 | how many
    // children have it` (the count stops at 2, all the rule asks); 0 while no child is seen.
    let mut upstream = vec![0u32; count];
    // Children come after parents in `topology.order`, so the reverse visits every child
    // before its parent: each node's own order is settled when it is reached, and it passes
    // it to its parent at once. What a parent is passed does not depend on the order its
    // children come in, so with every parent before its children by index, decreasing index
    // order serves as well and reads the arrays in turn.
    let mut settle = |node: usize| {
        let seen = upstream[node];
        let own = match (seen >> 2, seen & 3) {
            (0, _) => 1,
            (highest, 1) => highest,
            (highest, _) => highest + 1,
        };
        order[node] = own;
        let Some(&parent) = topology.parent.get(node) else {
            return;
        };
        if let Some(slot) = upstream.get_mut(parent as usize) {
            let highest = *slot >> 2;
            if own > highest {
                *slot = own << 2 | 1;
            } else if own == highest {
                *slot = own << 2 | 2;
            }
        }
    };
    if topology.parents_first() && topology.parent.len() == count {
        (0..count).rev().for_each(&mut settle);
    } else {
        for &node in topology.order.iter().rev() {
            settle(node as usize);
        }
    }
    order
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The memo answers with the very bits of `WidthRule::width`, for repeated flows, flows
    /// that share a slot and flows that are zero or negative.
    #[test]
    fn remembered_widths_equal_computed_widths() {
        let rule = WidthRule::single(3.0, 0.05, 0.01);
        let mut memo = WidthMemo::new(rule);
        // 20,000 flows over 3,000 values: more values than slots, each seen several times.
        for step in 0..20_000u32 {
            let flow = f64::from(step % 3_000) * 0.01 - 0.02;
            assert_eq!(
                memo.width(flow).to_bits(),
                rule.width(flow).to_bits(),
                "flow {flow}"
            );
        }
    }

    /// Strahler orders do not depend on how nodes are numbered: on a parents-first tree (walked
    /// by index) and on the same tree numbered backwards (no parent before its children, so walked
    /// in reverse breadth-first order) every segment gets the same order.
    #[test]
    fn strahler_orders_do_not_depend_on_numbering() {
        let (network, topology) = crate::network::trees_for_tests::parents_first_forest(3_000, 1);
        let count = network.nodes.len() as u32;
        let renumber = |node: u32| count - 1 - node;
        let mut backwards = network.clone();
        backwards.nodes.reverse();
        for segment in &mut backwards.segments {
            *segment = crate::network::Segment {
                from: renumber(segment.from),
                to: renumber(segment.to),
            };
        }
        let backwards_topology = backwards
            .topology()
            .unwrap_or_else(|error| panic!("{error}"));
        assert!(!backwards_topology.parents_first());
        let orders = strahler_orders(&network, &topology);
        let backwards_orders = strahler_orders(&backwards, &backwards_topology);
        for node in 0..count {
            assert_eq!(
                orders[node as usize],
                backwards_orders[renumber(node) as usize]
            );
        }
        // The tree branches to order 3 at least, so the comparison covers merging orders.
        assert!(orders.iter().copied().max().unwrap_or(0) >= 3);
    }
}
