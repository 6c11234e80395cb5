//! Tortuosity (`mean_tortuosity`): network path length to the root over straight distance to
//! the root, averaged over weighted nodes.

use crate::network::{Network, Topology};

/// Mean over nodes with positive weight and positive straight distance to their root of
/// `path length to the root / straight distance to the root`; `None` when no node qualifies.
/// The ratios are summed in `topology.order`.
pub(crate) fn mean_tortuosity(network: &Network, topology: &Topology) -> Option<f64> {
    let node_count = network.nodes.len();
    // Each node's ratio does not depend on the order nodes are visited in, as long as parents
    // come first: with parents first by index, the arrays are read in turn.
    let ratios = if topology.parents_first() {
        ratios_visiting(network, topology, 0..node_count)
    } else {
        ratios_visiting(
            network,
            topology,
            topology.order.iter().map(|&node| node as usize),
        )
    };
    let mut ratio_sum = 0.0;
    let mut ratio_count = 0u64;
    for &node in &topology.order {
        let ratio = ratios.get(node as usize).copied().unwrap_or(NOT_COUNTED);
        if ratio != NOT_COUNTED {
            ratio_sum += ratio;
            ratio_count += 1;
        }
    }
    (ratio_count > 0).then(|| ratio_sum / ratio_count as f64)
}

/// Marks a node whose ratio does not count (a root, no weight, or no straight distance); a
/// ratio itself is never negative (a length over a positive distance), though it may be NaN.
const NOT_COUNTED: f64 = -1.0;

/// Each node's ratio (or `NOT_COUNTED`), visiting the nodes in `visit`, which must list every
/// parent before its children.
fn ratios_visiting(
    network: &Network,
    topology: &Topology,
    visit: impl Iterator<Item = usize>,
) -> Vec<f64> {
    let node_count = network.nodes.len();
    let mut path_length = vec![0.0f64; node_count];
    let mut root_of: Vec<usize> = (0..node_count).collect();
    let mut ratios = vec![NOT_COUNTED; node_count];
    for node in visit {
        let Some(current) = network.nodes.get(node) else {
            continue;
        };
        if topology.is_root(node) {
            continue;
        }
        let parent = topology.parent[node] as usize;
        let parent_path = path_length.get(parent).copied().unwrap_or(0.0);
        let own_length = topology.length.get(node).copied().unwrap_or(0.0);
        let root = root_of.get(parent).copied().unwrap_or(parent);
        path_length[node] = parent_path + own_length;
        root_of[node] = root;
        let Some(root_node) = network.nodes.get(root) else {
            continue;
        };
        let straight = crate::fast_libm::hypot(current.x - root_node.x, current.y - root_node.y);
        if current.weight > 0.0 && straight > 0.0 {
            ratios[node] = path_length[node] / straight;
        }
    }
    ratios
}

#[cfg(test)]
mod tests {
    use super::*;

    /// On trees with parents first by index, each node's ratio comes out with the same bits
    /// whether the nodes are visited by index or in breadth-first order (both put parents
    /// first).
    #[test]
    fn ratios_by_index_equal_ratios_by_order() {
        use crate::network::trees_for_tests::{bits, parents_first_forest};
        for seed in [1, 2] {
            let (network, topology) = parents_first_forest(3_000, seed);
            let count = network.nodes.len();
            let by_index = bits(&ratios_visiting(&network, &topology, 0..count));
            let order = topology.order.iter().map(|&node| node as usize);
            let by_order = bits(&ratios_visiting(&network, &topology, order));
            assert_eq!(by_index, by_order);
            // Every node but the root counts (each has weight and lies right of the root), and
            // no path is shorter than the straight line (the triangle inequality: ratio at
            // least 1, to rounding).
            let counted: Vec<f64> = by_index
                .iter()
                .map(|&r| f64::from_bits(r))
                .filter(|&r| r != NOT_COUNTED)
                .collect();
            assert_eq!(counted.len(), count - 1);
            assert!(counted.iter().all(|&r| r >= 1.0 - 1e-12));
        }
    }
}
