//! Hack exponent (`hack_exponent`): how the longest upstream length grows with the upstream
//! area, fitted on logarithms over every segment.

use super::regression::fit_line;
use crate::network::{Network, Topology};

/// Least-squares slope of `ln(longest upstream length)` on `ln(upstream area)`.
///
/// Each segment is a measuring point at its downstream end: the upstream area is the segment's
/// flow, and the longest upstream length is the segment's length plus the largest longest
/// upstream length among its children (a tip segment's is its own length). Points where either
/// value is not positive are left out; `None` with fewer than two points or equal areas.
pub(crate) fn hack_exponent(network: &Network, topology: &Topology) -> Option<f64> {
    let longest = longest_upstream_lengths(network, topology);
    let points: Vec<(f64, f64)> = network
        .nodes
        .iter()
        .enumerate()
        .filter(|&(index, _)| !topology.is_root(index))
        .filter_map(|(index, _)| {
            let area = topology.flow.get(index).copied().unwrap_or(0.0);
            let length = longest.get(index).copied().unwrap_or(0.0);
            (area > 0.0 && length > 0.0).then(|| (libm::log(area), libm::log(length)))
        })
        .collect();
    fit_line(&points).map(|line| line.slope)
}

/// Longest path length from any upstream tip down to the downstream end of each segment
/// (for a root: down to the root itself).
fn longest_upstream_lengths(network: &Network, topology: &Topology) -> Vec<f64> {
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
