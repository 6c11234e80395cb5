//! Tortuosity (`mean_tortuosity`): network path length to the root over straight distance to
//! the root, averaged over weighted nodes.

use crate::network::{Network, Topology};

/// Mean over nodes with positive weight and positive straight distance to their root of
/// `path length to the root / straight distance to the root`; `None` when no node qualifies.
pub(crate) fn mean_tortuosity(network: &Network, topology: &Topology) -> Option<f64> {
    let node_count = network.nodes.len();
    let mut path_length = vec![0.0f64; node_count];
    let mut root_of: Vec<usize> = (0..node_count).collect();
    let mut ratio_sum = 0.0;
    let mut ratio_count = 0u64;
    // Parents come before children in `topology.order`, so each parent is final when read.
    for &node in &topology.order {
        let node = node as usize;
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
            ratio_sum += path_length[node] / straight;
            ratio_count += 1;
        }
    }
    (ratio_count > 0).then(|| ratio_sum / ratio_count as f64)
}
