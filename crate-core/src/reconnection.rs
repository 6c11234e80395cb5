//! Loop closing after growth (`close_loops`): free-ending veins join the vein network at
//! several scales, coarse veins first, so that major veins close large loops and finer veins
//! divide them (parameters `reconnect` and `loop_levels`).
//!
//! The rule, level by level for `k = 0 ..= loop_levels`, with the conducting threshold of level
//! `k` being `A_k = A * 4^(loop_levels - k)` (`A` the finest: `vein_area`, or one cell's area
//! when every segment conducts):
//! - the network of level `k` is the veins draining at least `A_k` plus every loop wall closed
//!   at a coarser level; its free-ending tips are its nodes without a child in it;
//! - a tip `t` closes its loop through the finer veins it feeds: from a vein `u` upstream of `t`
//!   (within `2 sqrt(A_k)` along the veins) a new segment joins a vein node `v` of another
//!   branch across the gap of tissue (at most `1.5 max(cell, sqrt(A))` long), and the loop's new
//!   wall is the chain `t .. u`, the new segment `u v`, and the chain from `v` down to the first
//!   node `a` of the level's network;
//! - the join is taken when the way round through the level's network from `t` to `a` is at
//!   least `reconnect` times the new wall's length (the local reconnection rule of developing
//!   leaves, veins joining where they shortcut a long path: Scarpella et al. 2006, Genes Dev. 20;
//!   closed venation patterns, Runions et al. 2005, ACM Trans. Graph. 24), the shortest such
//!   wall first, and never when the new segment would cross or touch a vein or a loop segment.
//!
//! Coarse levels wall in large domains first and the finer levels divide them, so loops nest
//! (hierarchical space-dividing patterns: Bohn, Douady & Couder 2005, PRL 94). Walls follow the
//! grown veins and only the short new segments are added, so the network stays a plane graph.
//!
//! With `nest` (`nest_loops`) a level closes its loops in rounds: at the start of a round the
//! faces of the looped network so far are traced (only those joins changed are walked again:
//! `rotation`); a tip hanging in the outside joins at once as above, but a tip hanging in a
//! closed face only offers its join, and each closed face takes one offer per round, the one
//! whose way round (up to half the face's boundary) is longest, so that the new wall divides
//! the face most evenly; the other tips of that face try again in the next round, inside one
//! of the two halves. Rounds repeat until no face
//! takes an offer. Each face is thus halved, and its halves halved again by smaller veins,
//! as each new vein divides an areole in the sequential reticulation of developing leaves
//! (Couder et al. 2002, Eur. Phys. J. B 28; Bohn, Douady & Couder 2005).
//!
//! A tip tries at most `TRIES_PER_TIP` joins, shortest wall first. With `arches` a join whose
//! anchor lies, along the tree, less than `reconnect` times the new wall from the tip is passed
//! over without counting as a try: the way round can only be shorter than that tree path, so
//! the join would fail. The shortest joins of a major vein's end mostly land on its own side
//! veins; passed over, they leave the tries to joins reaching the next major vein, which close
//! the large loops between secondary veins of brochidodromous leaves (arches; Ellis et al.
//! 2009, Manual of Leaf Architecture).
//!
//! Flows: tree segments keep the tree's flows; a loop wall is drawn at least as wide as the
//! flow of the tip that closed it (`Reconnection::wall_flow`), and each new segment carries that
//! tip's flow. No Kirchhoff solve: the walls' widths record the scale of the loop they close.
//!
//! The pass is held between calls by `LoopClosing` (`closing.rs`), so a caller can run it a
//! bounded amount of work at a time; `close_loops` runs it in one go. Its search structures
//! (grids, bounded A*, paths along the tree) are in `search.rs`, the faces walked for `nest`
//! in `rotation.rs`.

mod closing;
mod rotation;
mod search;

use crate::network::{Network, Segment, Topology};
pub use closing::{next_part_size, GrownVeins, LoopClosing, LoopProgress};

/// How loops close.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct LoopRule {
    /// Path-to-gap ratio (`reconnect`), at least 1.
    pub ratio: f64,
    /// Coarser levels above the finest (`loop_levels`).
    pub levels: u32,
    /// The finest level's conducting threshold, in squared units (> 0).
    pub finest_area: f64,
    /// Runoff coefficient: a node's flow over it is its drained area.
    pub runoff: f64,
    /// Lattice cell size, in units.
    pub cell_size: f64,
    /// Loops split faces one at a time (`nest_loops`): within a level, each bounded face takes
    /// at most one new wall per round, and rounds repeat while walls are added.
    pub nest: bool,
    /// A tip's tries go only to joins whose loop could be long enough (`arches`): a join is
    /// passed over, without counting as a try, when the path along the tree from the tip to
    /// the join's anchor is already shorter than `ratio` times the new wall (the way round
    /// is never longer than that path, so the join would fail). Major veins then reach the
    /// next major vein instead of spending their tries on their own side veins.
    pub arches: bool,
}

/// The new segments and the loop walls, in the whole network's node indices.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Reconnection {
    /// The new segments, `from` on the tip's side.
    pub links: Vec<Segment>,
    /// The flow each new segment carries: that of the tip that made it (tree flow units).
    pub link_flow: Vec<f64>,
    /// The level (0 coarsest) at which each new segment closed its loop.
    pub link_level: Vec<u32>,
    /// Per node: the flow its downstream segment is drawn with as a loop wall (0 when it is
    /// not a wall).
    pub wall_flow: Vec<f64>,
}

/// With `nest`, a wall dividing a closed face is drawn with at most this share of the flow of
/// the face's thinnest wall, so a finer wall is always thinner than the walls of the face it
/// divides (veins formed later in a leaf are the finer ones). Any share below 1 orders the
/// walls; 0.9 keeps each wall's width near its own flow's (common practice, no source).
const FINER_WALL_SHARE: f64 = 0.9;

/// Most candidate joins tried per tip (shortest first).
const TRIES_PER_TIP: usize = 8;

/// Closes loops on a grown forest whose conducting segments are marked in `conducts` (one per
/// segment; missing entries conduct): `LoopClosing` set up, run to its end and finished.
pub fn close_loops(
    network: &Network,
    topology: &Topology,
    conducts: &[bool],
    rule: &LoopRule,
) -> Reconnection {
    let veins = GrownVeins {
        network,
        topology,
        conducts,
    };
    LoopClosing::new(veins, rule).finish(veins)
}

#[cfg(test)]
mod tests {
    use super::search::TreePaths;
    use super::*;
    use crate::network::{CellSet, Node};

    /// Two parallel veins from a root at the bottom, each a column of 6 nodes one unit apart,
    /// two units apart side by side, joined at the root by a base segment: the tips face each
    /// other across a gap of 2 with a way round of 2 + 2 x 6 = 14 through the root.
    fn two_veins() -> Network {
        let rows: Vec<f64> = (1..=6).rev().map(f64::from).collect();
        columns_from_root((1.0, 7.0), [0.0, 2.0], &rows, 13.0)
    }

    /// A root at `root` and one vein per column, its nodes at the heights `rows`, the first
    /// joined to the root and each next to the one before.
    fn columns_from_root(root: (f64, f64), columns: [f64; 2], rows: &[f64], area: f64) -> Network {
        let mut nodes = vec![Node {
            x: root.0,
            y: root.1,
            weight: 1.0,
        }];
        let mut segments = Vec::new();
        for column in columns {
            let mut below = 0u32;
            for &row in rows {
                nodes.push(Node {
                    x: column,
                    y: row,
                    weight: 1.0,
                });
                let index = nodes.len() as u32 - 1;
                segments.push(Segment {
                    from: index,
                    to: below,
                });
                below = index;
            }
        }
        Network {
            nodes,
            segments,
            area,
            units: "mm".into(),
            cell_size: 1.0,
            cells: CellSet::default(),
        }
    }

    fn rule(ratio: f64) -> LoopRule {
        LoopRule {
            ratio,
            levels: 0,
            finest_area: 1.0,
            runoff: 1.0,
            cell_size: 2.0 / 1.5,
            nest: false,
            arches: false,
        }
    }

    /// The gap rule allows 2 units; the tips (nodes 6 and 12 at y = 1) face each other. The way
    /// round from tip 6 to tip 12's side: down 5 + 5 and the two base pieces of length
    /// sqrt(1 + 1) each, about 12.8; the new wall is 2 long (ratio 6.4).
    #[test]
    fn a_tip_joins_the_other_vein_when_the_way_round_is_long_enough() {
        let network = two_veins();
        let topology = network.topology().expect("a tree");
        let conducts = vec![true; network.segments.len()];
        let closed = close_loops(&network, &topology, &conducts, &rule(6.0));
        assert_eq!(closed.links.len(), 1);
        let link = closed.links[0];
        let (a, b) = (
            network.nodes[link.from as usize],
            network.nodes[link.to as usize],
        );
        assert_eq!((a.y, b.y), (1.0, 1.0));
        assert_eq!((a.x - b.x).abs(), 2.0);
        // A ratio of 7 asks for a way round of 14: none.
        let closed = close_loops(&network, &topology, &conducts, &rule(7.0));
        assert!(closed.links.is_empty());
    }

    /// Two veins 1.9 apart, nodes every 0.2 from y = 0 to y = 6, joined below at a root at
    /// (0.95, -1). Within 1.9 of the left tip (0, 6) lie eight of its own vein's nodes below
    /// its parent (y = 5.6 .. 4.2), nearer than any node of the right vein: the eight
    /// shortest joins all end on its own vein, each with a way round (at most 1.8) shorter
    /// than 6 times its length.
    fn two_dense_veins() -> Network {
        let rows: Vec<f64> = (0..=30).map(|row| f64::from(row) * 0.2).collect();
        columns_from_root((0.95, -1.0), [0.0, 1.9], &rows, 63.0)
    }

    /// Without `arches` the left tip spends its eight tries on its own vein and no loop
    /// closes; with it those joins are passed over and the tip joins the right vein's tip
    /// (1.9 across; way round 6 + 2 x sqrt(0.95^2 + 1) + 6, about 14.76, at least 6 x 1.9).
    #[test]
    fn arches_let_a_tip_reach_past_its_own_vein() {
        let network = two_dense_veins();
        let topology = network.topology().expect("a tree");
        let conducts = vec![true; network.segments.len()];
        let mut rule = rule(6.0);
        rule.cell_size = 2.0 / 1.5; // joins up to 2 long
        let closed = close_loops(&network, &topology, &conducts, &rule);
        assert!(closed.links.is_empty(), "{:?}", closed.links);
        rule.arches = true;
        let closed = close_loops(&network, &topology, &conducts, &rule);
        assert_eq!(closed.links.len(), 1);
        let link = closed.links[0];
        let (a, b) = (
            network.nodes[link.from as usize],
            network.nodes[link.to as usize],
        );
        assert_eq!((a.x, a.y, b.x, b.y), (0.0, 6.0, 1.9, 6.0));
        // At a ratio the way round cannot meet (14.76 < 8 x 1.9), no loop closes either way.
        rule.ratio = 8.0;
        assert!(close_loops(&network, &topology, &conducts, &rule)
            .links
            .is_empty());
    }

    /// Paths along a forest against petgraph's Dijkstra on the same segments (an undirected
    /// graph; in a tree the shortest path is the only one): random trees of 300 nodes in two
    /// components, every pair from 40 nodes.
    #[test]
    fn tree_paths_match_dijkstra_on_the_same_forest() {
        use petgraph::graph::UnGraph;
        use rand_chacha::ChaCha8Rng;
        use rand_core::{RngCore, SeedableRng};
        let mut rng = ChaCha8Rng::seed_from_u64(11);
        for _ in 0..5 {
            let count = 300;
            let mut nodes = Vec::new();
            let mut segments = Vec::new();
            for index in 0..count {
                let coordinate = |rng: &mut ChaCha8Rng| (rng.next_u32() % 10_000) as f64 / 100.0;
                nodes.push(Node {
                    x: coordinate(&mut rng),
                    y: coordinate(&mut rng),
                    weight: 1.0,
                });
                // Nodes 0 and 150 are roots; every other joins an earlier node of its half.
                if index != 0 && index != 150 {
                    let first = if index < 150 { 0 } else { 150 };
                    let to = first + rng.next_u32() % (index - first);
                    segments.push(Segment { from: index, to });
                }
            }
            let network = Network {
                nodes,
                segments,
                area: 1.0,
                units: "mm".into(),
                cell_size: 1.0,
                cells: CellSet::default(),
            };
            let topology = network.topology().expect("a forest");
            let length = |a: usize, b: usize| {
                let (p, q) = (network.nodes[a], network.nodes[b]);
                (p.x - q.x).hypot(p.y - q.y)
            };
            let paths = TreePaths::new(&topology, length);
            let mut graph = UnGraph::<(), f64>::new_undirected();
            let ids: Vec<_> = (0..count).map(|_| graph.add_node(())).collect();
            for segment in &network.segments {
                let (a, b) = (segment.from as usize, segment.to as usize);
                graph.add_edge(ids[a], ids[b], length(a, b));
            }
            for a in (0..count as usize).step_by(8) {
                let reference =
                    petgraph::algo::dijkstra(&graph, ids[a], None, |edge| *edge.weight());
                for b in (0..count as usize).step_by(8) {
                    let ours = paths.between(&topology, a, b);
                    match reference.get(&ids[b]) {
                        Some(&expected) => {
                            assert!(
                                (ours - expected).abs() <= 1e-9 * expected.max(1.0),
                                "{a} {b}: {ours} {expected}"
                            )
                        }
                        None => assert!(ours.is_infinite(), "{a} {b}: {ours}"),
                    }
                }
            }
        }
    }
}
