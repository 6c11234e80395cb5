//! Connected components and independent loops (`count_components_and_loops`) of any network,
//! with petgraph's union-find.

use petgraph::unionfind::UnionFind;

use crate::network::Network;

/// Components and loops of a network's graph.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct ComponentsAndLoops {
    /// Connected components, a lone node counting as one (count).
    pub(crate) component_count: u64,
    /// Independent loops: the cyclomatic number `E - V + C` (Kirchhoff 1847; the circuit rank of
    /// graph theory), 0 for a forest (count).
    pub(crate) loop_count: u64,
}

/// Counts components with petgraph's union-find over the segments, then the cyclomatic number
/// `segments - nodes + components`. Segments naming a missing node are left out.
pub(crate) fn count_components_and_loops(network: &Network) -> ComponentsAndLoops {
    let node_count = network.nodes.len();
    let mut sets: UnionFind<usize> = UnionFind::new(node_count);
    let mut segment_count = 0u64;
    for segment in &network.segments {
        let (from, to) = (segment.from as usize, segment.to as usize);
        if from < node_count && to < node_count {
            sets.union(from, to);
            segment_count += 1;
        }
    }
    // Each component has exactly one representative: the node that is its own label.
    let component_count = (0..node_count)
        .filter(|&node| sets.find_mut(node) == node)
        .count() as u64;
    ComponentsAndLoops {
        component_count,
        loop_count: (segment_count + component_count).saturating_sub(node_count as u64),
    }
}
