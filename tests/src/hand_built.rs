//! Hand-built networks and cell sets for the reference tests: single nodes, symmetric binary
//! trees with real geometry, and cell sets chosen by a predicate (discs, ellipses, blocks).

use ramulus_core::network::{segments_from_parents, CellSet, Network, Node, NO_PARENT};

/// Length unit every hand-built network uses.
pub const HAND_BUILT_UNITS: &str = "mm";

/// A node of a hand-built forest and the node it drains into (`NO_PARENT` for a root).
#[derive(Clone, Copy, Debug)]
pub struct ForestNode {
    /// The node.
    pub node: Node,
    /// Its downstream neighbour.
    pub parent: u32,
}

/// A node at (`x`, `y`) draining into `parent` (`None` for a root) and adding `weight` flow.
pub fn node_at(x: f64, y: f64, parent: Option<u32>, weight: f64) -> ForestNode {
    ForestNode {
        node: Node { x, y, weight },
        parent: parent.unwrap_or(NO_PARENT),
    }
}

/// A forest of `nodes` draining a leaf of `area` square millimetres, not on a lattice: one
/// segment from each non-root node to its parent, in node order.
pub fn network_of(nodes: Vec<ForestNode>, area: f64) -> Network {
    let parents: Vec<u32> = nodes.iter().map(|entry| entry.parent).collect();
    Network {
        nodes: nodes.iter().map(|entry| entry.node).collect(),
        segments: segments_from_parents(&parents),
        area,
        units: HAND_BUILT_UNITS.to_string(),
        cell_size: 0.0,
        cells: CellSet::default(),
    }
}

/// A symmetric binary tree with `depth` levels of segments.
///
/// The root sits at the origin; level 0 is one trunk segment of `trunk_length` pointing up the
/// page (towards negative y), and every level after it splits each segment into two children
/// turned by plus and minus `half_angle_degrees` from their parent's direction, half as long as
/// their parent. The tips are level `depth - 1`. Every node but the root has weight 1.
pub fn symmetric_binary_tree(depth: u32, trunk_length: f64, half_angle_degrees: f64) -> Network {
    let mut nodes = vec![node_at(0.0, 0.0, None, 0.0)];
    if depth == 0 {
        return network_of(nodes, 1.0);
    }
    nodes.push(node_at(0.0, -trunk_length, Some(0), 1.0));
    // (node index, heading in degrees measured from straight up, length of its segment)
    let mut level = vec![(1u32, 0.0f64, trunk_length)];
    for _ in 1..depth {
        let mut next_level = Vec::with_capacity(level.len() * 2);
        for &(parent, heading, length) in &level {
            let parent_node = nodes[parent as usize].node;
            for turn in [-half_angle_degrees, half_angle_degrees] {
                let child_heading = heading + turn;
                let child_length = length / 2.0;
                let radians = child_heading.to_radians();
                let x = parent_node.x + child_length * radians.sin();
                let y = parent_node.y - child_length * radians.cos();
                nodes.push(node_at(x, y, Some(parent), 1.0));
                next_level.push(((nodes.len() - 1) as u32, child_heading, child_length));
            }
        }
        level = next_level;
    }
    network_of(nodes, 1.0)
}

/// The cells of a `width` by `height` lattice whose column and row satisfy `is_inside`.
pub fn cells_where(width: u32, height: u32, is_inside: impl Fn(u32, u32) -> bool) -> CellSet {
    let mut occupied = Vec::new();
    for row in 0..height {
        for column in 0..width {
            if is_inside(column, row) {
                occupied.push(row * width + column);
            }
        }
    }
    CellSet {
        width,
        height,
        occupied,
    }
}
