//! `NetworkMarks`: what the page needs to frame and mark a network on its canvas: the extent
//! of its nodes (`bounds`, to fit the view to the network rather than the lattice) and where
//! its roots are (`roots`: petiole bases of a leaf, outlets of a site), each with its marker
//! radius.

use ramulus_core::network::Network;

/// Extent and roots of a network, in its physical units.
#[derive(Clone, Debug, Default, PartialEq, serde::Serialize)]
pub struct NetworkMarks {
    /// `[min x, min y, max x, max y]` of its finite nodes, `None` when it has none.
    pub bounds: Option<[f64; 4]>,
    /// `[x, y]` of every finite node without a downstream segment.
    pub roots: Vec<[f64; 2]>,
}

/// The marks of `network`: one pass over nodes and segments.
pub fn network_marks(network: &Network) -> NetworkMarks {
    let mut has_downstream = vec![false; network.nodes.len()];
    for segment in &network.segments {
        if let Some(flag) = has_downstream.get_mut(segment.from as usize) {
            *flag = true;
        }
    }
    let mut marks = NetworkMarks::default();
    for (node, downstream) in network.nodes.iter().zip(&has_downstream) {
        let (x, y) = (node.x, node.y);
        if !x.is_finite() || !y.is_finite() {
            continue;
        }
        marks.bounds = Some(match marks.bounds {
            None => [x, y, x, y],
            Some([x0, y0, x1, y1]) => [x0.min(x), y0.min(y), x1.max(x), y1.max(y)],
        });
        if !downstream {
            marks.roots.push([x, y]);
        }
    }
    marks
}

#[cfg(test)]
mod tests {
    use super::*;
    use ramulus_core::network::{Node, Segment};

    #[test]
    fn bounds_span_the_nodes_and_roots_are_nodes_without_a_downstream_segment() {
        let node = |x, y| Node { x, y, weight: 1.0 };
        let network = Network {
            nodes: vec![
                node(1.0, 5.0),
                node(2.0, 4.0),
                node(-3.0, 7.5),
                node(f64::NAN, 0.0),
            ],
            // Node 1 drains into node 0 and node 2 into node 1: node 0 is the one root.
            segments: vec![Segment { from: 1, to: 0 }, Segment { from: 2, to: 1 }],
            ..Network::default()
        };
        let marks = network_marks(&network);
        assert_eq!(marks.bounds, Some([-3.0, 4.0, 2.0, 7.5]));
        assert_eq!(marks.roots, vec![[1.0, 5.0]]);
        assert_eq!(network_marks(&Network::default()), NetworkMarks::default());
    }
}
