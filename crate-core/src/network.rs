//! `Network`: nodes and the segments between them (a forest, or a network with loops) in
//! physical units, the one input of every metric and exporter, plus `Topology`, the forest view
//! (parents, children, traversal order, flows) derived from it when it is a forest.

use serde::{Deserialize, Serialize};

/// Marks a root (no downstream node, no downstream segment) in the forest view.
pub const NO_PARENT: u32 = u32::MAX;

/// One node of a network.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct Node {
    /// x in physical units, growing to the right.
    pub x: f64,
    /// y in physical units, growing down the page.
    pub y: f64,
    /// Flow this node adds itself, in physical area units (cell area for a leaf cell; runoff
    /// coefficient times cell area for a site cell; 0 for a junction off the cell centres).
    pub weight: f64,
}

/// One segment (an edge of the network's graph) between two nodes. In a forest, flow runs from
/// `from` (upstream) to `to` (downstream); in a network with loops the direction only names the
/// ends.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Segment {
    /// Upstream end (node index).
    pub from: u32,
    /// Downstream end (node index).
    pub to: u32,
}

/// What shape a network's graph has, which decides the metrics that apply to it.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum NetworkKind {
    /// Every node drains into at most one downstream node and following them always reaches a
    /// root: trees, one per root. Flows, Strahler orders and the forest view exist. The
    /// default, since every record written before loops existed holds a forest.
    #[default]
    Forest,
    /// At least one loop (two paths between the same nodes) or a node with two downstream
    /// segments: no forest view; only the metrics that need no flow direction apply.
    Looped,
    /// A grown network whose loops closed after growth (`reconnect`): the loop metrics are the
    /// looped network's, and the metrics that need a forest (branching angles, Strahler orders
    /// and streams, Hack exponent, tortuosity, transport cost) are those of the grown vein
    /// tree before its loops closed.
    #[serde(rename = "looped_on_tree")]
    LoopedOnTree,
}

/// A network: nodes, the segments between them, and the drained area; the one input of every
/// metric and exporter. Segments may close loops; when they do not, `Network::topology` gives
/// the forest view.
#[derive(Clone, Debug, PartialEq, Default, Serialize, Deserialize)]
pub struct Network {
    /// The nodes.
    pub nodes: Vec<Node>,
    /// The segments; a grown network lists them in the order of their upstream nodes.
    pub segments: Vec<Segment>,
    /// Area of the leaf or site the network drains, in squared units.
    pub area: f64,
    /// Length unit name (`mm`, `m`, ...).
    pub units: String,
    /// Lattice cell size in `units` (0 when not grown on a lattice).
    pub cell_size: f64,
    /// Occupied cells, for the outline metrics; empty when not grown on a lattice.
    pub cells: CellSet,
}

/// The segments of a forest given as one downstream index per node (`NO_PARENT` for a root):
/// segment `k` runs from the `k`-th non-root node to its parent, in node order.
pub fn segments_from_parents(parents: &[u32]) -> Vec<Segment> {
    parents
        .iter()
        .enumerate()
        .filter(|(_, &parent)| parent != NO_PARENT)
        .map(|(node, &parent)| Segment {
            from: node as u32,
            to: parent,
        })
        .collect()
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

/// The forest view of a `Network` (only when it is a forest): parents, children, a root-first
/// order, and flows. Per-node arrays: entry `i` describes node `i` and its downstream segment.
#[derive(Clone, Debug)]
pub struct Topology {
    /// Downstream neighbour of each node, `NO_PARENT` for a root.
    pub parent: Vec<u32>,
    /// Index in `Network::segments` of each node's downstream segment, `NO_PARENT` for a root.
    pub segment_of: Vec<u32>,
    /// Children (upstream neighbours) of each node, in increasing index order.
    pub children: Children,
    /// Every node reachable from a root, parents before children (breadth first from roots in
    /// index order).
    pub order: Vec<u32>,
    /// Flow through node `i`'s downstream segment: the weights of node `i` and of every
    /// node upstream of it. Roots hold the total flow of their tree.
    pub flow: Vec<f64>,
    /// Length of node `i`'s downstream segment, 0 for roots.
    pub length: Vec<f64>,
    /// Whether every parent has a lower index (`parents_first`), found with the rest.
    parents_first: bool,
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

/// Why a network is not valid, or not a forest.
#[derive(Clone, Debug, PartialEq)]
pub enum TopologyError {
    /// A segment names a node that does not exist, or runs from a node to itself.
    BadSegment {
        /// The segment's index.
        segment: usize,
        /// Its upstream end.
        from: u32,
        /// Its downstream end.
        to: u32,
    },
    /// A node has two downstream segments: the network is not a forest.
    TwoDownstream {
        /// The node.
        node: usize,
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
            TopologyError::BadSegment { segment, from, to } => write!(
                f,
                "segment {segment} runs from node {from} to node {to}: an end does not exist or \
                 both ends are the same node"
            ),
            TopologyError::TwoDownstream { node } => write!(
                f,
                "node {node} has two downstream segments, so the network is not a forest"
            ),
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
    /// Checks what every network must satisfy: finite coordinates and weights, segment ends
    /// that exist and differ.
    pub fn check(&self) -> Result<(), TopologyError> {
        for (index, node) in self.nodes.iter().enumerate() {
            if !node.x.is_finite() || !node.y.is_finite() || !node.weight.is_finite() {
                return Err(TopologyError::NotFinite { node: index });
            }
        }
        let count = self.nodes.len();
        for (index, segment) in self.segments.iter().enumerate() {
            if segment.from as usize >= count
                || segment.to as usize >= count
                || segment.from == segment.to
            {
                return Err(TopologyError::BadSegment {
                    segment: index,
                    from: segment.from,
                    to: segment.to,
                });
            }
        }
        Ok(())
    }

    /// The downstream neighbour of every node, when every node has at most one downstream
    /// segment (`NO_PARENT` for a root) and every upstream end exists.
    pub fn parents(&self) -> Result<Vec<u32>, TopologyError> {
        let mut parent = vec![NO_PARENT; self.nodes.len()];
        for (index, segment) in self.segments.iter().enumerate() {
            let Some(slot) = parent.get_mut(segment.from as usize) else {
                return Err(TopologyError::BadSegment {
                    segment: index,
                    from: segment.from,
                    to: segment.to,
                });
            };
            if *slot != NO_PARENT {
                return Err(TopologyError::TwoDownstream {
                    node: segment.from as usize,
                });
            }
            *slot = segment.to;
        }
        Ok(parent)
    }

    /// The forest view: parents, children, order and flows; fails when the network is not
    /// valid or not a forest.
    pub fn topology(&self) -> Result<Topology, TopologyError> {
        self.check()?;
        // `parents` and each node's downstream segment in one pass (`check` has found every
        // end in range).
        let count = self.nodes.len();
        let mut parent = vec![NO_PARENT; count];
        let mut segment_of = vec![NO_PARENT; count];
        for (index, segment) in self.segments.iter().enumerate() {
            let from = segment.from as usize;
            if parent[from] != NO_PARENT {
                return Err(TopologyError::TwoDownstream { node: from });
            }
            parent[from] = segment.to;
            segment_of[from] = index as u32;
        }
        let children = Children::from_parents(parent.iter().copied(), count);
        let mut order = Vec::with_capacity(count);
        for (index, &up) in parent.iter().enumerate() {
            if up == NO_PARENT {
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
        // Each parent receives its children's flows, each final, in decreasing index order:
        // the reversed breadth-first order lists a parent's children together in that order
        // after everything upstream of them. When every parent comes before its children, so
        // does plain decreasing index order, to the same bits, reading the arrays in turn.
        let mut add_into_parent = |node: usize| {
            let down = parent[node];
            if down != NO_PARENT {
                flow[down as usize] += flow[node];
            }
        };
        let parents_first = parent
            .iter()
            .enumerate()
            .all(|(node, &up)| up == NO_PARENT || (up as usize) < node);
        if parents_first {
            (0..count).rev().for_each(&mut add_into_parent);
        } else {
            order
                .iter()
                .rev()
                .for_each(|&node| add_into_parent(node as usize));
        }
        let length = (0..count)
            .map(|index| match parent[index] {
                NO_PARENT => 0.0,
                down => self.segment_length(index as u32, down),
            })
            .collect();
        Ok(Topology {
            parent,
            segment_of,
            children,
            order,
            flow,
            length,
            parents_first,
        })
    }

    /// Straight length between two nodes, in units.
    #[inline]
    pub fn segment_length(&self, from: u32, to: u32) -> f64 {
        let (a, b) = (&self.nodes[from as usize], &self.nodes[to as usize]);
        crate::fast_libm::hypot(a.x - b.x, a.y - b.y)
    }

    /// Number of segments.
    pub fn segment_count(&self) -> usize {
        self.segments.len()
    }
}

impl Topology {
    /// Whether node `node` is a root of the forest.
    pub fn is_root(&self, node: usize) -> bool {
        self.parent.get(node).is_none_or(|&up| up == NO_PARENT)
    }

    /// Whether every node's parent has a lower index (as in a grown tree whose segments were
    /// never split): then increasing index order is also a parents-first order, and a pass
    /// may walk the arrays in turn instead of in `order`, where that gives the same bits.
    pub fn parents_first(&self) -> bool {
        self.parents_first
    }
}

/// Trees for tests of the passes over a forest, built without the growth engine (which the
/// modules those passes live in do not use).
#[cfg(test)]
pub(crate) mod trees_for_tests {
    use super::{segments_from_parents, CellSet, Network, Node, Topology, NO_PARENT};

    /// `parents_first_tree` and its forest view, which must find the parents first.
    pub(crate) fn parents_first_forest(count: usize, seed: u64) -> (Network, Topology) {
        let network = parents_first_tree(count, seed);
        let topology = network.topology().unwrap_or_else(|error| panic!("{error}"));
        assert!(topology.parents_first());
        (network, topology)
    }

    /// The bits of each value, to compare results bit for bit.
    pub(crate) fn bits(values: &[f64]) -> Vec<u64> {
        values.iter().map(|value| value.to_bits()).collect()
    }

    /// A tree of `count` nodes whose parents all have lower indices, as growth makes them:
    /// node 0 is the root at the origin; each later node hangs off one of the 40 nodes before
    /// it (picked by a 64-bit linear congruential generator from `seed`, Knuth's MMIX
    /// constants), one step away, always to the right, so no node lies on the root. Weights
    /// lie between 0.5 and 1.5 and are not whole, so sums of them round differently in
    /// different orders.
    pub(crate) fn parents_first_tree(count: usize, seed: u64) -> Network {
        let mut state = seed;
        let mut draw = move || {
            state = state
                .wrapping_mul(6_364_136_223_846_793_005)
                .wrapping_add(1_442_695_040_888_963_407);
            (state >> 33) as f64 / (1u64 << 31) as f64
        };
        let mut nodes = vec![Node {
            x: 0.0,
            y: 0.0,
            weight: 0.5 + draw(),
        }];
        let mut parents = vec![NO_PARENT];
        for index in 1..count {
            let back = 1 + (draw() * index.min(40) as f64) as usize;
            let parent = index - back.min(index);
            let (dx, dy) = (0.2 + draw(), draw() - 0.5);
            nodes.push(Node {
                x: nodes[parent].x + dx,
                y: nodes[parent].y + dy,
                weight: 0.5 + draw(),
            });
            parents.push(parent as u32);
        }
        Network {
            nodes,
            segments: segments_from_parents(&parents),
            area: count as f64,
            units: "mm".into(),
            cell_size: 0.0,
            cells: CellSet::default(),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn network(points: usize, ends: &[(u32, u32)]) -> Network {
        Network {
            nodes: (0..points)
                .map(|index| Node {
                    x: index as f64,
                    y: 0.0,
                    weight: 1.0,
                })
                .collect(),
            segments: ends
                .iter()
                .map(|&(from, to)| Segment { from, to })
                .collect(),
            ..Network::default()
        }
    }

    /// A path 2 -> 1 -> 0 listed out of node order: parents, children and flows (each node's
    /// weight plus everything upstream) follow the segments, not their order.
    #[test]
    fn forest_view_of_a_path() {
        let path = network(3, &[(2, 1), (1, 0)]);
        let topology = path.topology().expect("a forest");
        assert_eq!(topology.parent, vec![NO_PARENT, 0, 1]);
        assert_eq!(topology.segment_of, vec![NO_PARENT, 1, 0]);
        assert_eq!(topology.order, vec![0, 1, 2]);
        assert_eq!(topology.flow, vec![3.0, 2.0, 1.0]);
        assert_eq!(topology.length, vec![0.0, 1.0, 1.0]);
        assert_eq!(topology.children.of(0), &[1]);
    }

    #[test]
    fn segments_from_parents_skip_roots() {
        assert_eq!(
            segments_from_parents(&[NO_PARENT, 0, 0, NO_PARENT, 3]),
            vec![
                Segment { from: 1, to: 0 },
                Segment { from: 2, to: 0 },
                Segment { from: 4, to: 3 },
            ]
        );
    }

    #[test]
    fn invalid_and_looped_networks_are_told_apart() {
        assert_eq!(
            network(2, &[(1, 1)]).check(),
            Err(TopologyError::BadSegment {
                segment: 0,
                from: 1,
                to: 1
            })
        );
        assert_eq!(
            network(2, &[(0, 1), (1, 5)]).check(),
            Err(TopologyError::BadSegment {
                segment: 1,
                from: 1,
                to: 5
            })
        );
        // A triangle: valid, but node 0 drains two ways, so no forest view.
        let triangle = network(3, &[(1, 0), (2, 1), (0, 2), (0, 1)]);
        assert_eq!(triangle.check(), Ok(()));
        assert_eq!(
            triangle.topology().unwrap_err(),
            TopologyError::TwoDownstream { node: 0 }
        );
        // Three nodes draining round in a circle: one downstream each, no root.
        let circle = network(3, &[(0, 1), (1, 2), (2, 0)]);
        assert!(matches!(
            circle.topology(),
            Err(TopologyError::Cycle { .. })
        ));
    }

    /// On a tree with parents before children by index, the flows walked by index are the
    /// flows walked in reverse breadth-first order, the definition, bit for bit: each parent
    /// receives its children's final flows in decreasing index order either way.
    #[test]
    fn flows_by_index_equal_flows_by_order_on_a_parents_first_tree() {
        for seed in [1, 2] {
            let (network, topology) = super::trees_for_tests::parents_first_forest(3_000, seed);
            let mut by_order: Vec<f64> = network.nodes.iter().map(|node| node.weight).collect();
            for &node in topology.order.iter().rev() {
                let down = topology.parent[node as usize];
                if down != NO_PARENT {
                    by_order[down as usize] += by_order[node as usize];
                }
            }
            assert_eq!(
                super::trees_for_tests::bits(&topology.flow),
                super::trees_for_tests::bits(&by_order)
            );
        }
    }
}
