//! `LengthAndDegreeCounts`: total segment length, root and segment counts, and the junctions
//! and free-ending tips found from node degrees.

use crate::network::{Network, Topology};

/// Counts that the density metrics divide by the area.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct LengthAndDegreeCounts {
    /// Number of roots.
    pub(crate) root_count: u64,
    /// Number of segments (non-root nodes).
    pub(crate) segment_count: u64,
    /// Sum of segment lengths, in length units.
    pub(crate) total_length: f64,
    /// Nodes of degree 3 or more (parent segment plus child segments).
    pub(crate) junction_count: u64,
    /// Non-root nodes of degree 1 (no children).
    pub(crate) tip_count: u64,
}

/// Counts roots, segments, junctions and tips, and adds up segment lengths.
///
/// The degree of a node is its number of child segments plus one when it has a parent, so a
/// root with three children is a junction and a root alone is neither junction nor tip.
pub(crate) fn count_lengths_and_degrees(
    network: &Network,
    topology: &Topology,
) -> LengthAndDegreeCounts {
    let mut counts = LengthAndDegreeCounts {
        root_count: 0,
        segment_count: 0,
        total_length: 0.0,
        junction_count: 0,
        tip_count: 0,
    };
    for (index, node) in network.nodes.iter().enumerate() {
        let child_count = topology.children.get(index).map_or(0, <[u32]>::len);
        let is_root = node.is_root();
        let degree = child_count + usize::from(!is_root);
        if is_root {
            counts.root_count += 1;
        } else {
            counts.segment_count += 1;
            counts.total_length += topology.length.get(index).copied().unwrap_or(0.0);
            if degree == 1 {
                counts.tip_count += 1;
            }
        }
        if degree >= 3 {
            counts.junction_count += 1;
        }
    }
    counts
}
