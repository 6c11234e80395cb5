//! The conducting network: which segments drain at least `vein_area` (veins in a leaf,
//! channels on a site), and the vein network (those segments alone, each vein node carrying the
//! tissue it supplies) that the metrics measure.
//!
//! A segment conducts when the area upstream of it is at least the threshold (channel
//! initiation at a drained-area threshold: Montgomery & Dietrich 1988, Nature 336; Tarboton,
//! Bras & Rodriguez-Iturbe 1991, Hydrol. Processes 5). Drained area only grows downstream, so
//! the conducting segments of a forest form a forest holding the roots: the tissue is the fringe
//! of finest segments cut away.

use crate::network::{Network, Node, Segment, Topology, NO_PARENT};

/// The drained area of the segment below node `node`: its flow over the runoff coefficient
/// (a node's weight is its area times the runoff coefficient).
fn drained_area(topology: &Topology, node: usize, runoff: f64) -> f64 {
    topology.flow[node] / runoff
}

/// Whether each segment of a forest conducts: its drained area is at least `vein_area`.
/// Without a forest view (a network with loops, whose flows are unknown) every segment
/// conducts, and so does every segment when `vein_area` is 0.
pub fn conducting_segments(
    network: &Network,
    topology: Option<&Topology>,
    vein_area: f64,
    runoff: f64,
) -> Vec<bool> {
    let count = network.segments.len();
    let Some(topology) = topology.filter(|_| vein_area > 0.0 && runoff > 0.0) else {
        return vec![true; count];
    };
    network
        .segments
        .iter()
        .map(|segment| {
            let from = segment.from as usize;
            topology.parent.get(from) != Some(&segment.to)
                || drained_area(topology, from, runoff) >= vein_area
        })
        .collect()
}

/// Like `conducting_segments`, with each node's own plain area given (`node_area`, as
/// `site::node_area_runoff` gives it), for runs whose runoff coefficient varies by zone: the
/// drained area is then the sum of the areas upstream, not the flow over one coefficient.
pub fn conducting_segments_by_area(
    network: &Network,
    topology: Option<&Topology>,
    vein_area: f64,
    node_area: &[f64],
) -> Vec<bool> {
    let count = network.segments.len();
    let Some(topology) =
        topology.filter(|topology| vein_area > 0.0 && node_area.len() == topology.parent.len())
    else {
        return vec![true; count];
    };
    // Leaves first (the reverse of the root-first order), each node's area passed downstream.
    let mut drained = node_area.to_vec();
    for &node in topology.order.iter().rev() {
        let parent = topology.parent[node as usize];
        if parent != NO_PARENT {
            drained[parent as usize] += drained[node as usize];
        }
    }
    network
        .segments
        .iter()
        .map(|segment| {
            let from = segment.from as usize;
            topology.parent.get(from) != Some(&segment.to) || drained[from] >= vein_area
        })
        .collect()
}

/// The vein network: the conducting segments and the nodes they join, plus every root. Each
/// kept node's weight is its flow less its conducting children's flows, so it carries the
/// tissue it supplies and every vein's flow is the same as in the whole network. Area, units,
/// cell size and occupied cells stay those of the whole network (the blade or site).
///
/// Also returns, for each node of the whole network, its index in the vein network
/// (`NO_PARENT` for tissue nodes).
pub fn vein_network(
    network: &Network,
    topology: &Topology,
    conducts: &[bool],
) -> (Network, Vec<u32>) {
    let node_count = network.nodes.len();
    let mut kept = vec![false; node_count];
    for (index, segment) in network.segments.iter().enumerate() {
        if conducts.get(index).copied().unwrap_or(true) {
            kept[segment.from as usize] = true;
            kept[segment.to as usize] = true;
        }
    }
    for (node, &parent) in topology.parent.iter().enumerate() {
        if parent == NO_PARENT {
            kept[node] = true;
        }
    }
    let mut new_index = vec![NO_PARENT; node_count];
    let mut nodes = Vec::new();
    for node in 0..node_count {
        if kept[node] {
            new_index[node] = nodes.len() as u32;
            nodes.push(network.nodes[node]);
        }
    }
    // A kept node supplies itself and the tissue upstream of it: its flow less the flows of
    // its kept children (whose segments conduct, since a kept child is a segment's end).
    let mut supplied: Vec<f64> = (0..node_count).map(|node| topology.flow[node]).collect();
    let mut segments = Vec::new();
    for (index, segment) in network.segments.iter().enumerate() {
        if !conducts.get(index).copied().unwrap_or(true) {
            continue;
        }
        let (from, to) = (segment.from as usize, segment.to as usize);
        if topology.parent.get(from) == Some(&segment.to) {
            supplied[to] -= topology.flow[from];
        }
        segments.push(Segment {
            from: new_index[from],
            to: new_index[to],
        });
    }
    for node in 0..node_count {
        if kept[node] {
            let weight = supplied[node].max(0.0);
            nodes[new_index[node] as usize] = Node {
                weight,
                ..network.nodes[node]
            };
        }
    }
    let veins = Network {
        nodes,
        segments,
        area: network.area,
        units: network.units.clone(),
        cell_size: network.cell_size,
        cells: network.cells.clone(),
    };
    (veins, new_index)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::network::CellSet;

    /// A root R(0,0) with a main vein to A(0,1), which has two tips B(-1,2) and C(1,2), and a
    /// tip D(0,-1) below the root; every node weighs 1 (area 1 at runoff 1).
    fn small_tree() -> Network {
        let node = |x: f64, y: f64| Node { x, y, weight: 1.0 };
        Network {
            nodes: vec![
                node(0.0, 0.0),
                node(0.0, 1.0),
                node(-1.0, 2.0),
                node(1.0, 2.0),
                node(0.0, -1.0),
            ],
            segments: vec![
                Segment { from: 1, to: 0 },
                Segment { from: 2, to: 1 },
                Segment { from: 3, to: 1 },
                Segment { from: 4, to: 0 },
            ],
            area: 5.0,
            units: "mm".into(),
            cell_size: 1.0,
            cells: CellSet::default(),
        }
    }

    #[test]
    fn threshold_keeps_the_segments_draining_enough() {
        let tree = small_tree();
        let topology = tree.topology().expect("a tree");
        // Drained areas: A's segment 3 (A, B, C), B's 1, C's 1, D's 1.
        assert_eq!(
            conducting_segments(&tree, Some(&topology), 2.0, 1.0),
            vec![true, false, false, false]
        );
        assert_eq!(
            conducting_segments(&tree, Some(&topology), 0.0, 1.0),
            vec![true; 4]
        );
        // At runoff 0.5 a node of area 1 weighs 1 here, so it stands for area 2.
        assert_eq!(
            conducting_segments(&tree, Some(&topology), 2.0, 0.5),
            vec![true; 4]
        );
    }

    #[test]
    fn vein_network_keeps_flows_and_moves_tissue_onto_veins() {
        let tree = small_tree();
        let topology = tree.topology().expect("a tree");
        let conducts = conducting_segments(&tree, Some(&topology), 2.0, 1.0);
        let (veins, index) = vein_network(&tree, &topology, &conducts);
        assert_eq!(veins.nodes.len(), 2);
        assert_eq!(veins.segments, vec![Segment { from: 1, to: 0 }]);
        assert_eq!(index, vec![0, 1, NO_PARENT, NO_PARENT, NO_PARENT]);
        // A supplies itself, B and C; the root itself and D.
        assert_eq!(veins.nodes[1].weight, 3.0);
        assert_eq!(veins.nodes[0].weight, 2.0);
        let vein_topology = veins.topology().expect("a tree");
        assert_eq!(vein_topology.flow[1], topology.flow[1]);
        assert_eq!(vein_topology.flow[0], topology.flow[0]);
    }
}
