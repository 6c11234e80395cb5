//! `independent_cycles`: edges - vertices + components of a network, the components counted by
//! petgraph's union-find; by Euler's formula for plane graphs (Euler 1758; e.g. Bondy & Murty
//! 2008, Graph Theory, theorem 10.2 generalised to C components) the number of bounded faces
//! of a plane network, and in any graph its cycle rank.

use petgraph::unionfind::UnionFind;
use ramulus_core::network::Network;

/// Edges - vertices + components, the components by petgraph's union-find.
pub fn independent_cycles(network: &Network) -> u64 {
    let mut sets = UnionFind::new(network.nodes.len());
    for segment in &network.segments {
        sets.union(segment.from as usize, segment.to as usize);
    }
    let mut labels = sets.into_labeling();
    labels.sort_unstable();
    labels.dedup();
    network.segments.len() as u64 + labels.len() as u64 - network.nodes.len() as u64
}
