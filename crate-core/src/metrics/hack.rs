//! Hack exponent (`hack_exponent`): how the longest upstream length grows with the upstream
//! area, fitted on logarithms over every segment.

use super::regression::fit_line;
use crate::network::{Network, Topology, NO_PARENT};

/// Least-squares slope of `ln(longest upstream length)` on `ln(upstream area)`.
///
/// Each segment is a measuring point at its downstream end: the upstream area is the segment's
/// flow, and the longest upstream length is the segment's length plus the largest longest
/// upstream length among its children (a tip segment's is its own length). Points where either
/// value is not positive are left out; `None` with fewer than two points or equal areas.
pub(crate) fn hack_exponent(network: &Network, topology: &Topology) -> Option<f64> {
    let longest = longest_upstream_lengths(network, topology);
    let mut logarithms = LogMemo::new();
    let points: Vec<(f64, f64)> = network
        .nodes
        .iter()
        .enumerate()
        .filter(|&(index, _)| !topology.is_root(index))
        .filter_map(|(index, _)| {
            let area = topology.flow.get(index).copied().unwrap_or(0.0);
            let length = longest.get(index).copied().unwrap_or(0.0);
            (area > 0.0 && length > 0.0).then(|| (logarithms.ln(area), logarithms.ln(length)))
        })
        .collect();
    fit_line(&points).map(|line| line.slope)
}

/// `libm::log` with the last results remembered by the exact bits of their argument: the
/// areas (flows) and upstream lengths of a grown network repeat a great deal (every tip drains
/// one cell), so most logarithms are found, not computed. The results are the very bits
/// `libm::log` gives.
struct LogMemo {
    /// `(argument bits, logarithm)` per slot; argument bits 0 (the argument 0, never stored,
    /// since only positive arguments come) marks an empty slot.
    slots: Vec<(u64, f64)>,
}

/// Slots of `LogMemo`, a power of two: 8,192 slots (128 KiB) stay in the processor cache.
const LOG_MEMO_BITS: u32 = 13;

impl LogMemo {
    fn new() -> LogMemo {
        LogMemo {
            slots: vec![(0, 0.0); 1 << LOG_MEMO_BITS],
        }
    }

    fn ln(&mut self, value: f64) -> f64 {
        let bits = value.to_bits();
        if bits == 0 {
            return libm::log(value);
        }
        // Fibonacci hashing (Knuth, TAOCP vol. 3, 6.4), as for the widths in `segments`.
        let slot = (bits.wrapping_mul(0x9e37_79b9_7f4a_7c15) >> (64 - LOG_MEMO_BITS)) as usize;
        match self.slots.get_mut(slot) {
            Some((key, logarithm)) if *key == bits => *logarithm,
            Some(entry) => {
                let logarithm = libm::log(value);
                *entry = (bits, logarithm);
                logarithm
            }
            None => libm::log(value),
        }
    }
}

/// Longest path length from any upstream tip down to the downstream end of each segment
/// (for a root: down to the root itself).
fn longest_upstream_lengths(network: &Network, topology: &Topology) -> Vec<f64> {
    if topology.parents_first() {
        longest_upstream_lengths_by_index(network, topology)
    } else {
        longest_upstream_lengths_by_order(network, topology)
    }
}

/// `longest_upstream_lengths` in reverse breadth-first order (any forest).
fn longest_upstream_lengths_by_order(network: &Network, topology: &Topology) -> Vec<f64> {
    let mut longest = vec![0.0f64; network.nodes.len()];
    // Children follow their parents in `topology.order`, so the reverse visits them first.
    for &node in topology.order.iter().rev() {
        let node = node as usize;
        let upstream = topology.children.get(node).map_or(0.0, |children| {
            children
                .iter()
                .map(|&child| longest.get(child as usize).copied().unwrap_or(0.0))
                .fold(0.0, f64::max)
        });
        let own_length = topology.length.get(node).copied().unwrap_or(0.0);
        if let Some(slot) = longest.get_mut(node) {
            *slot = own_length + upstream;
        }
    }
    longest
}

/// `longest_upstream_lengths` when every parent has a lower index: walking nodes from the
/// last down, each node's children (higher indices) are done before it, and each hands its
/// length up to its parent by `max`. The largest of the children's lengths is the same
/// whichever order they come in (`f64::max` passes over NaN either way, and no length is -0:
/// lengths are sums of `hypot`s from +0), so the lengths have the very bits of the walk in
/// reverse breadth-first order.
fn longest_upstream_lengths_by_index(network: &Network, topology: &Topology) -> Vec<f64> {
    let count = network.nodes.len();
    // The largest upstream length handed in so far, then the node's own longest length.
    let mut longest = vec![0.0f64; count];
    for node in (0..count).rev() {
        let own_length = topology.length.get(node).copied().unwrap_or(0.0);
        let value = own_length + longest[node];
        longest[node] = value;
        let parent = topology.parent.get(node).copied().unwrap_or(NO_PARENT);
        if let Some(slot) = longest.get_mut(parent as usize) {
            *slot = slot.max(value);
        }
    }
    longest
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The memo answers with the very bits of `libm::log`, for repeated values, values that
    /// share a slot, and more values than slots.
    #[test]
    fn remembered_logarithms_equal_computed_ones() {
        let mut memo = LogMemo::new();
        for step in 0..60_000u32 {
            let value = f64::from(step % 20_000) * 0.37 + 1e-3;
            assert_eq!(memo.ln(value).to_bits(), libm::log(value).to_bits());
        }
        assert_eq!(memo.ln(0.0), f64::NEG_INFINITY);
    }

    /// On trees with parents first by index, the lengths handed up by index have the bits of
    /// the walk in reverse breadth-first order (the definition).
    #[test]
    fn longest_lengths_by_index_equal_those_by_order() {
        use crate::network::trees_for_tests::{bits, parents_first_forest};
        for seed in [1, 2] {
            let (network, topology) = parents_first_forest(3_000, seed);
            let by_index = bits(&longest_upstream_lengths_by_index(&network, &topology));
            let by_order = bits(&longest_upstream_lengths_by_order(&network, &topology));
            assert_eq!(by_index, by_order);
            // A tip's longest length is its own segment's; the root's covers the network.
            assert!(by_index.iter().any(|&l| f64::from_bits(l) > 0.0));
        }
    }
}
