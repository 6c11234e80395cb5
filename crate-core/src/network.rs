//! `Network`: a grown or imported forest in physical units, the one input of every metric and
//! exporter, plus `Topology` (children, traversal order, flows) derived from it.

use serde::{Deserialize, Serialize};

/// Marks a root in `Node::parent`.
pub const NO_PARENT: u32 = u32::MAX;

/// One node of a network.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct Node {
    /// x in physical units, growing to the right.
    pub x: f64,
    /// y in physical units, growing down the page.
    pub y: f64,
    /// Index of the downstream neighbour, or `NO_PARENT` for a root.
    pub parent: u32,
    /// Flow this node adds itself, in physical area units (cell area for a leaf cell; runoff
    /// coefficient times cell area for a site cell; 0 for a junction off the cell centres).
    pub weight: f64,
}

impl Node {
    /// Whether this node is a root.
    pub fn is_root(&self) -> bool {
        self.parent == NO_PARENT
    }
}

/// A forest of nodes; segment `i` runs from node `i` to its parent (flow goes downstream).
#[derive(Clone, Debug, PartialEq, Default, Serialize, Deserialize)]
pub struct Network {
    /// The nodes; parents may come before or after their children.
    pub nodes: Vec<Node>,
    /// Area of the leaf or site the network drains, in squared units.
    pub area: f64,
    /// Length unit name (`mm`, `m`, ...).
    pub units: String,
    /// Lattice cell size in `units` (0 when not grown on a lattice).
    pub cell_size: f64,
    /// Occupied cells, for the outline metrics; empty when not grown on a lattice.
    pub cells: CellSet,
}

/// The occupied cells of a lattice, as column-row pairs.
#[derive(Clone, Debug, PartialEq, Default, Serialize, Deserialize)]
pub struct CellSet {
    /// Lattice width in cells.
    pub width: u32,
    /// Lattice height in cells.
    pub height: u32,
    /// Occupied cells, as row-major indices.
    pub occupied: Vec<u32>,
}

/// Structure derived from a `Network`: children, a root-first order, and segment flows.
#[derive(Clone, Debug)]
pub struct Topology {
    /// Children (upstream neighbours) of each node, in increasing index order.
    pub children: Children,
    /// Every node reachable from a root, parents before children (breadth first from roots in
    /// index order).
    pub order: Vec<u32>,
    /// Flow through segment `i` (node `i` to its parent): the weights of node `i` and of every
    /// node upstream of it. Roots hold the total flow of their tree.
    pub flow: Vec<f64>,
    /// Length of segment `i`, 0 for roots.
    pub length: Vec<f64>,
}

/// The children of every node in compressed rows: one list of child indices, grouped by
/// parent, and where each parent's group starts (one allocation however many nodes).
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Children {
    /// `start[i] .. start[i + 1]` is node `i`'s group in `list`; `node count + 1` entries.
    start: Vec<u32>,
    /// Child indices, grouped by parent, each group in increasing index order.
    list: Vec<u32>,
}

impl Children {
    /// Groups the nodes by parent (`NO_PARENT` or an index below `parents.len()`; others are
    /// left out).
    pub fn from_parents(parents: impl Iterator<Item = u32> + Clone, count: usize) -> Children {
        let mut children = Children::default();
        children.rebuild(parents, count);
        children
    }

    /// Regroups in place, reusing the allocations (the growth engine does this at every flow
    /// refresh).
    pub fn rebuild(&mut self, parents: impl Iterator<Item = u32> + Clone, count: usize) {
        let start = &mut self.start;
        start.clear();
        start.resize(count + 1, 0);
        for parent in parents.clone() {
            if (parent as usize) < count {
                start[parent as usize + 1] += 1;
            }
        }
        for index in 0..count {
            start[index + 1] += start[index];
        }
        self.list.clear();
        self.list.resize(start[count] as usize, 0);
        // Fill each group from its start, then shift the starts back one group.
        for (node, parent) in parents.enumerate() {
            if (parent as usize) < count {
                let slot = &mut start[parent as usize];
                self.list[*slot as usize] = node as u32;
                *slot += 1;
            }
        }
        for index in (1..=count).rev() {
            start[index] = start[index - 1];
        }
        start[0] = 0;
    }

    /// The children of `node`; empty for a node out of range.
    pub fn of(&self, node: usize) -> &[u32] {
        self.get(node).unwrap_or(&[])
    }

    /// The children of `node`, or `None` when out of range.
    pub fn get(&self, node: usize) -> Option<&[u32]> {
        let from = *self.start.get(node)? as usize;
        let to = *self.start.get(node + 1)? as usize;
        self.list.get(from..to)
    }

    /// Number of nodes.
    pub fn len(&self) -> usize {
        self.start.len().saturating_sub(1)
    }

    /// Whether there are no nodes.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The children of every node in index order.
    pub fn iter(&self) -> impl Iterator<Item = &[u32]> {
        (0..self.len()).map(|node| self.of(node))
    }
}

impl std::ops::Index<usize> for Children {
    type Output = [u32];

    fn index(&self, node: usize) -> &[u32] {
        self.of(node)
    }
}

/// Why a list of nodes is not a forest.
#[derive(Clone, Debug, PartialEq)]
pub enum TopologyError {
    /// A parent index points past the end of the node list.
    ParentOutOfRange {
        /// The node whose parent is wrong.
        node: usize,
        /// The parent index it names.
        parent: u32,
    },
    /// Following parents from this node never reaches a root.
    Cycle {
        /// A node on or leading into the cycle.
        node: usize,
    },
    /// A coordinate or weight is NaN or infinite.
    NotFinite {
        /// The node holding the value.
        node: usize,
    },
}

impl std::fmt::Display for TopologyError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            TopologyError::ParentOutOfRange { node, parent } => {
                write!(f, "node {node} names parent {parent}, which does not exist")
            }
            TopologyError::Cycle { node } => {
                write!(
                    f,
                    "node {node} lies on a cycle: following parents never reaches a root"
                )
            }
            TopologyError::NotFinite { node } => {
                write!(
                    f,
                    "node {node} has a coordinate or weight that is not a finite number"
                )
            }
        }
    }
}

impl std::error::Error for TopologyError {}

impl Network {
    /// Derives children, order and flows; fails when the nodes are not a forest.
    pub fn topology(&self) -> Result<Topology, TopologyError> {
        let count = self.nodes.len();
        for (index, node) in self.nodes.iter().enumerate() {
            if !node.x.is_finite() || !node.y.is_finite() || !node.weight.is_finite() {
                return Err(TopologyError::NotFinite { node: index });
            }
            if node.parent != NO_PARENT && node.parent as usize >= count {
                return Err(TopologyError::ParentOutOfRange {
                    node: index,
                    parent: node.parent,
                });
            }
        }
        let children = Children::from_parents(self.nodes.iter().map(|node| node.parent), count);
        let mut order = Vec::with_capacity(count);
        for (index, node) in self.nodes.iter().enumerate() {
            if node.is_root() {
                order.push(index as u32);
            }
        }
        let mut head = 0;
        while head < order.len() {
            let node = order[head] as usize;
            head += 1;
            order.extend_from_slice(children.of(node));
        }
        if order.len() != count {
            let mut seen = vec![false; count];
            for &node in &order {
                seen[node as usize] = true;
            }
            let node = seen.iter().position(|&reached| !reached).unwrap_or(0);
            return Err(TopologyError::Cycle { node });
        }
        let mut flow: Vec<f64> = self.nodes.iter().map(|node| node.weight).collect();
        for &node in order.iter().rev() {
            let parent = self.nodes[node as usize].parent;
            if parent != NO_PARENT {
                flow[parent as usize] += flow[node as usize];
            }
        }
        let length = self
            .nodes
            .iter()
            .map(|node| {
                if node.is_root() {
                    0.0
                } else {
                    let parent = &self.nodes[node.parent as usize];
                    crate::fast_libm::hypot(node.x - parent.x, node.y - parent.y)
                }
            })
            .collect();
        Ok(Topology {
            children,
            order,
            flow,
            length,
        })
    }

    /// Number of segments (non-root nodes).
    pub fn segment_count(&self) -> usize {
        self.nodes.iter().filter(|node| !node.is_root()).count()
    }
}
