//! `LengthAndDegreeCounts`: total segment length, root and segment counts, and the junctions
//! and free-ending tips found from node degrees.

use crate::network::Network;

/// Counts that the density metrics divide by the area.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct LengthAndDegreeCounts {
    /// Number of roots.
    pub(crate) root_count: u64,
    /// Number of segments.
    pub(crate) segment_count: u64,
    /// Sum of segment lengths, in length units.
    pub(crate) total_length: f64,
    /// Nodes of degree 3 or more.
    pub(crate) junction_count: u64,
    /// Nodes of degree 1 with a downstream segment.
    pub(crate) tip_count: u64,
}

/// Counts roots, segments, junctions and tips, and adds up segment lengths, from the segment
/// list alone (any network, looped or not).
///
/// The degree of a node is its number of segments. A root is a node with no downstream
/// segment (in a forest: a node without parent); a tip is a node of degree 1 that has a
/// downstream segment. So a root with three children is a junction and a root alone is neither
/// junction nor tip.
///
/// `lengths_by_upstream_node`, when given (a forest's `Topology::length`), holds each
/// segment's length at its upstream node, taken there instead of measuring it again; it must
/// hold `Network::segment_length` of every segment (as `Network::topology` fills it).
pub(crate) fn count_lengths_and_degrees(
    network: &Network,
    lengths_by_upstream_node: Option<&[f64]>,
) -> LengthAndDegreeCounts {
    let node_count = network.nodes.len();
    let mut degree = vec![0u32; node_count];
    let mut has_downstream = vec![false; node_count];
    let mut total_length = 0.0;
    for segment in &network.segments {
        let (from, to) = (segment.from as usize, segment.to as usize);
        if from >= node_count || to >= node_count {
            continue;
        }
        degree[from] += 1;
        degree[to] += 1;
        has_downstream[from] = true;
        total_length += match lengths_by_upstream_node.and_then(|lengths| lengths.get(from)) {
            Some(&length) => length,
            None => network.segment_length(segment.from, segment.to),
        };
    }
    let mut counts = LengthAndDegreeCounts {
        root_count: 0,
        segment_count: network.segments.len() as u64,
        total_length,
        junction_count: 0,
        tip_count: 0,
    };
    for node in 0..node_count {
        if !has_downstream[node] {
            counts.root_count += 1;
        } else if degree[node] == 1 {
            counts.tip_count += 1;
        }
        if degree[node] >= 3 {
            counts.junction_count += 1;
        }
    }
    counts
}
