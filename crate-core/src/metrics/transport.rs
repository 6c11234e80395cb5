//! Branched-transport cost (`transport_cost`): every segment pays its flow to the power alpha
//! times its length.

use crate::network::{Network, Topology};

/// `sum over segments of flow^alpha * length`, flows in the network's area units.
///
/// A segment that carries no flow costs nothing (also for alpha = 0, where `0^0` would
/// otherwise count its length). `None` when alpha or the sum is not finite.
pub(crate) fn transport_cost(network: &Network, topology: &Topology, alpha: f64) -> Option<f64> {
    if !alpha.is_finite() {
        return None;
    }
    let mut cost = 0.0;
    for index in 0..network.nodes.len() {
        if topology.is_root(index) {
            continue;
        }
        let flow = topology.flow.get(index).copied().unwrap_or(0.0);
        let length = topology.length.get(index).copied().unwrap_or(0.0);
        if flow > 0.0 {
            cost += crate::fast_libm::pow(flow, alpha) * length;
        }
    }
    cost.is_finite().then_some(cost)
}
