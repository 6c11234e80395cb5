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

mod rotation;

use std::cmp::Reverse;
use std::collections::BinaryHeap;

use crate::metrics::areoles::segments_conflict;
use crate::network::{Network, Segment, Topology, NO_PARENT};
use rotation::RotationSystem;

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
/// segment; missing entries conduct).
pub fn close_loops(
    network: &Network,
    topology: &Topology,
    conducts: &[bool],
    rule: &LoopRule,
) -> Reconnection {
    let count = network.nodes.len();
    let mut out = Reconnection {
        wall_flow: vec![0.0; count],
        ..Reconnection::default()
    };
    if count == 0
        || rule.ratio.partial_cmp(&1.0) == Some(std::cmp::Ordering::Less)
        || rule.ratio.is_nan()
        || rule.finest_area.is_nan()
        || rule.finest_area <= 0.0
        || rule.runoff.is_nan()
        || rule.runoff <= 0.0
        || topology.parent.len() != count
    {
        return out;
    }
    let conducts_below = |node: usize| -> bool {
        let segment = topology.segment_of[node];
        segment != NO_PARENT && conducts.get(segment as usize).copied().unwrap_or(true)
    };
    // Vein nodes: roots and both ends of conducting segments.
    let mut vein = vec![false; count];
    for node in 0..count {
        if topology.parent[node] == NO_PARENT {
            vein[node] = true;
        } else if conducts_below(node) {
            vein[node] = true;
            vein[topology.parent[node] as usize] = true;
        }
    }
    let levels = rule.levels;
    let threshold = |level: u32| rule.finest_area * libm::pow(4.0, f64::from(levels - level));
    // The first level whose network holds each node (levels + 1 for none).
    let mut level_of: Vec<u32> = (0..count)
        .map(|node| {
            if !vein[node] {
                return levels + 1;
            }
            let drained = topology.flow[node] / rule.runoff;
            let mut level = levels;
            while level > 0 && drained >= threshold(level - 1) {
                level -= 1;
            }
            level
        })
        .collect();
    let point = |node: usize| (network.nodes[node].x, network.nodes[node].y);
    let distance = |a: usize, b: usize| {
        let (p, q) = (point(a), point(b));
        crate::fast_libm::hypot(p.0 - q.0, p.1 - q.1)
    };
    let gap = 1.5 * rule.cell_size.max(rule.finest_area.sqrt());
    let veins: Vec<u32> = (0..count).filter(|&n| vein[n]).map(|n| n as u32).collect();
    let nodes_grid = Grid::of_points(veins.iter().map(|&n| (n, point(n as usize))), gap);
    let mut segments: Vec<(u32, u32)> = (0..count)
        .filter(|&n| conducts_below(n))
        .map(|n| (n as u32, topology.parent[n]))
        .collect();
    let tree_count = segments.len();
    // With `nest`: every node's position, and the neighbours of each in angular order, kept
    // as joins are made, for walking the faces each round.
    let positions: Vec<(f64, f64)> = if rule.nest {
        network.nodes.iter().map(|node| (node.x, node.y)).collect()
    } else {
        Vec::new()
    };
    let mut rotation = rule
        .nest
        .then(|| RotationSystem::new(&positions, &segments));
    // Per node: the index of its downstream segment in `segments` (for `nest`).
    let mut tree_segment_of = vec![u32::MAX; if rule.nest { count } else { 0 }];
    if rule.nest {
        for (index, &(from, _)) in segments.iter().enumerate() {
            tree_segment_of[from as usize] = index as u32;
        }
    }
    // Each segment sits in every cell its bounding box covers; a segment that meets the new
    // one shares a cell with the new one's bounding box.
    let mut segment_grid = Grid::of_points(std::iter::empty(), gap);
    for (index, &(a, b)) in segments.iter().enumerate() {
        segment_grid.insert_box(index as u32, point(a as usize), point(b as usize));
    }
    // With `arches`: paths along the tree, to pass over joins whose loop would be too short.
    let tree_paths = rule.arches.then(|| TreePaths::new(topology, distance));
    let mut linked: Vec<Vec<u32>> = vec![Vec::new(); count];
    let mut in_loop = vec![false; count];
    let mut search = PathSearch::new(count);
    let mut candidates: Vec<Candidate> = Vec::new();
    // With `nest`, per tip: the candidates that failed when it last offered a join within
    // this level. Within a level segments and ways round are only ever added, so a join that
    // crossed a segment still crosses it, and a way round shorter than the bound stays so;
    // such candidates fail again without being checked.
    let mut failed: Vec<Vec<CandidateKey>> = vec![Vec::new(); if rule.nest { count } else { 0 }];
    let mut failed_before: Vec<CandidateKey> = Vec::new();
    let mut stack: Vec<(u32, f64)> = Vec::new();

    // Makes tip `t`'s join: the walls t .. u and v .. anchor, and the new segment u v.
    macro_rules! join_tip {
        ($t:expr, $join:expr, $level:expr, $flow:expr) => {{
            let (t, join, level, flow): (usize, Candidate, u32, f64) = ($t, $join, $level, $flow);
            let (u, v, anchor) = (join.u as usize, join.v as usize, join.anchor as usize);
            for (start, end) in [(u, t), (v, anchor)] {
                let mut node = start;
                while node != end {
                    // The wall's flow may change: the faces beside it are walked again.
                    if let Some(rotation) = rotation.as_mut() {
                        rotation.forget_faces_beside(node as u32, topology.parent[node]);
                    }
                    level_of[node] = level_of[node].min(level);
                    in_loop[node] = true;
                    out.wall_flow[node] = out.wall_flow[node].max(flow);
                    node = topology.parent[node] as usize;
                }
            }
            in_loop[t] = true;
            if let Some(rotation) = rotation.as_mut() {
                rotation.add(&positions, u as u32, v as u32, segments.len() as u32);
            }
            linked[u].push(v as u32);
            linked[v].push(u as u32);
            segment_grid.insert_box(segments.len() as u32, point(u), point(v));
            segments.push((u as u32, v as u32));
            out.links.push(Segment {
                from: u as u32,
                to: v as u32,
            });
            out.link_flow.push(flow);
            out.link_level.push(level);
        }};
    }

    for level in 0..=levels {
        let reach = 2.0 * threshold(level).sqrt();
        // Tips of this level's network: active, not a root, no active vein child, not on a
        // loop wall.
        let active = |level_of: &[u32], node: usize| level_of[node] <= level;
        // Whether a new segment u v would cross, touch or run over a vein or a new segment.
        macro_rules! crosses {
            ($u:expr, $v:expr) => {{
                let (u, v): (usize, usize) = ($u, $v);
                let new = (point(u), point(v));
                segment_grid.in_box(new.0, new.1).iter().any(|&index| {
                    let (a, b) = segments[index as usize];
                    segments_conflict(
                        new,
                        (point(a as usize), point(b as usize)),
                        (u as u32, v as u32),
                        (a, b),
                    )
                })
            }};
        }
        // The way round from `from` to `to` through this level's network and the new
        // segments, when shorter than `bound`.
        macro_rules! way_round {
            ($from:expr, $to:expr, $bound:expr) => {
                search.shortest(
                    $from,
                    $to,
                    $bound,
                    |node, visit| {
                        let parent = topology.parent[node];
                        if parent != NO_PARENT && conducts_below(node) {
                            visit(parent as usize);
                        }
                        for &child in topology.children.of(node) {
                            let c = child as usize;
                            if conducts_below(c) && active(&level_of, c) {
                                visit(c);
                            }
                        }
                        for &other in &linked[node] {
                            visit(other as usize);
                        }
                    },
                    distance,
                )
            };
        }
        let mut has_child = vec![false; count];
        for node in 0..count {
            let parent = topology.parent[node];
            if parent != NO_PARENT && conducts_below(node) && active(&level_of, node) {
                has_child[parent as usize] = true;
            }
        }
        let mut tips: Vec<u32> = (0..count)
            .filter(|&n| {
                active(&level_of, n)
                    && topology.parent[n] != NO_PARENT
                    && !has_child[n]
                    && !in_loop[n]
                    && linked[n].is_empty()
            })
            .map(|n| n as u32)
            .collect();
        // Larger veins close their loops first; ties by node index.
        tips.sort_by(|&a, &b| {
            topology.flow[b as usize]
                .total_cmp(&topology.flow[a as usize])
                .then(a.cmp(&b))
        });
        for list in &mut failed {
            list.clear();
        }
        let mut pending = tips;
        loop {
            // With `nest`, the faces of the looped network so far that the pending tips hang in
            // (the face on both sides of a tip's downstream segment), and per pending tip its
            // face among them.
            let faces = rotation.as_mut().map(|rotation| {
                // The flow each segment is drawn with: tree segments their tree flow raised to
                // their wall flow, new segments their own.
                let flow = |index: usize| match index.checked_sub(tree_count) {
                    None => {
                        let from = segments[index].0 as usize;
                        topology.flow[from].max(out.wall_flow[from])
                    }
                    Some(link) => out.link_flow[link],
                };
                let downstream = pending.iter().map(|&tip| {
                    let t = tip as usize;
                    match tree_segment_of[t] {
                        u32::MAX => (tip, tip),
                        _ => (tip, topology.parent[t]),
                    }
                });
                let (figures, face_of) =
                    rotation.faces_along(&positions, &segments, flow, downstream);
                // Pending tips per face: a face with one alone takes its offer, whatever its
                // score.
                let mut tips_in = vec![0u32; figures.len()];
                for &face in face_of.iter().flatten() {
                    tips_in[face as usize] += 1;
                }
                (figures, face_of, tips_in)
            });
            let mut offers: Vec<Offer> = Vec::new();
            for (pending_index, &tip) in pending.iter().enumerate() {
                let t = tip as usize;
                if in_loop[t] || !linked[t].is_empty() {
                    continue;
                }
                // The bounded face the tip hangs in; `None` for the outside, where any number
                // of walls may close in a round.
                let face = faces.as_ref().and_then(|(figures, face_of, _)| {
                    let face = face_of[pending_index]? as usize;
                    (figures[face].signed_area > 0.0).then_some(face)
                });
                // Half the boundary of the closed face the tip hangs in (`nest`), the most a
                // way round scores; 0 when the tip is the face's only one, whose offer is
                // taken whatever it scores, so that no search goes beyond the join's bound.
                let half = match (face, faces.as_ref()) {
                    (Some(face), Some((figures, _, tips_in))) if tips_in[face] > 1 => {
                        figures[face].perimeter / 2.0
                    }
                    _ => 0.0,
                };
                // Candidates: veins u upstream of t within reach, and vein nodes v across a gap.
                candidates.clear();
                stack.clear();
                stack.push((tip, 0.0));
                while let Some((u, along)) = stack.pop() {
                    let u_index = u as usize;
                    for v in nodes_grid.near(point(u_index)) {
                        let v_index = v as usize;
                        if v == u
                            || topology.parent[u_index] == v
                            || topology.parent[v_index] == u
                            || linked[u_index].contains(&v)
                        {
                            continue;
                        }
                        let across = distance(u_index, v_index);
                        if across > gap {
                            continue;
                        }
                        // Down from v to this level's network; reaching t means v lies upstream
                        // of t (the same branch).
                        let (mut anchor, mut down) = (v_index, 0.0);
                        let mut ok = true;
                        while !active(&level_of, anchor) {
                            let parent = topology.parent[anchor];
                            if parent == NO_PARENT || down > reach {
                                ok = false;
                                break;
                            }
                            down += distance(anchor, parent as usize);
                            anchor = parent as usize;
                        }
                        if !ok || anchor == t {
                            continue;
                        }
                        candidates.push(Candidate {
                            wall: along + across + down,
                            u,
                            v,
                            anchor: anchor as u32,
                        });
                    }
                    for &child in topology.children.of(u_index) {
                        let c = child as usize;
                        if !conducts_below(c) {
                            continue;
                        }
                        let further = along + distance(u_index, c);
                        if further <= reach {
                            stack.push((child, further));
                        }
                    }
                }
                candidates.sort_by(|a, b| {
                    a.wall
                        .total_cmp(&b.wall)
                        .then(a.u.cmp(&b.u))
                        .then(a.v.cmp(&b.v))
                });
                let mut chosen = None;
                if rule.nest {
                    failed_before.clear();
                    failed_before.append(&mut failed[t]);
                }
                // The way round from t to the chosen join's anchor when shorter than `half`.
                let mut way_round_found = None;
                // With `arches`, joins that cannot close a loop long enough are passed over
                // without counting as tries (the margin keeps rounding on the safe side).
                let could_pass = |candidate: &&Candidate| {
                    tree_paths.as_ref().is_none_or(|paths| {
                        paths.between(topology, t, candidate.anchor as usize)
                            >= rule.ratio * candidate.wall * (1.0 - 1e-9)
                    })
                };
                for candidate in candidates.iter().filter(could_pass).take(TRIES_PER_TIP) {
                    let (u, v) = (candidate.u as usize, candidate.v as usize);
                    let key = candidate.key();
                    if failed_before.contains(&key) {
                        failed[t].push(key);
                        continue;
                    }
                    if !crosses!(u, v) {
                        // One search up to the larger of the bound and half the face's
                        // boundary: A* pops every node estimated below the smaller bound in
                        // the same order and with the same distances as a search up to it,
                        // so a way round below the bound is found as that search finds it,
                        // and past it the search goes on to the score's bound.
                        let bound = rule.ratio * candidate.wall;
                        let found = way_round!(t, candidate.anchor as usize, bound.max(half));
                        if found.is_none_or(|length| length >= bound) {
                            chosen = Some(*candidate);
                            way_round_found = found.filter(|&length| length < half);
                            break;
                        }
                    }
                    if rule.nest {
                        failed[t].push(key);
                    }
                }
                let Some(join) = chosen else {
                    continue;
                };
                if let (Some(face), Some((figures, _, _))) = (face, faces.as_ref()) {
                    // Inside a closed face: the way round (up to half the face's boundary)
                    // says how evenly this wall would halve it; the face takes its best offer
                    // after every tip of the round has made one.
                    let way_round = way_round_found.unwrap_or(half);
                    offers.push(Offer {
                        face,
                        tip,
                        join,
                        score: way_round,
                        links_before: out.links.len(),
                        flow: topology.flow[t].min(FINER_WALL_SHARE * figures[face].thinnest),
                    });
                    continue;
                }
                join_tip!(t, join, level, topology.flow[t]);
            }
            if offers.is_empty() {
                break;
            }
            // Each closed face takes its offer of the longest way round (ties: the larger
            // vein, as ordered); the other tips of those faces try again next round.
            let mut best: std::collections::BTreeMap<usize, usize> = Default::default();
            for (index, offer) in offers.iter().enumerate() {
                let entry = best.entry(offer.face).or_insert(index);
                if offer.score > offers[*entry].score {
                    *entry = index;
                }
            }
            let mut taken = vec![false; offers.len()];
            for &index in best.values() {
                taken[index] = true;
            }
            let mut deferred = Vec::new();
            for (index, offer) in offers.iter().enumerate() {
                let join = offer.join;
                // Joins made since the offer (in other faces) may block it: checked again
                // when any was made.
                if taken[index]
                    && (out.links.len() == offer.links_before
                        || !crosses!(join.u as usize, join.v as usize)
                            && way_round!(
                                offer.tip as usize,
                                join.anchor as usize,
                                rule.ratio * join.wall
                            )
                            .is_none())
                {
                    join_tip!(offer.tip as usize, join, level, offer.flow);
                } else {
                    deferred.push(offer.tip);
                }
            }
            if deferred.is_empty() {
                break;
            }
            pending = deferred;
        }
    }
    out
}

/// One possible join of a tip.
#[derive(Clone, Copy, Debug)]
struct Candidate {
    /// Length of the new wall: chain up to `u`, the new segment, chain from `v` to `anchor`.
    wall: f64,
    u: u32,
    v: u32,
    anchor: u32,
}

/// A candidate join by its ends, anchor and wall length (bits): equal keys, equal checks.
type CandidateKey = (u32, u32, u32, u64);

impl Candidate {
    fn key(&self) -> CandidateKey {
        (self.u, self.v, self.anchor, self.wall.to_bits())
    }
}

/// Path lengths along a forest (`arches`): per node its depth and its path length from its
/// root, so that the path between two nodes is found by walking both up to where they meet.
struct TreePaths {
    depth: Vec<u32>,
    from_root: Vec<f64>,
}

impl TreePaths {
    /// `length(child, parent)` is the length of a segment.
    fn new(topology: &Topology, length: impl Fn(usize, usize) -> f64) -> TreePaths {
        let count = topology.parent.len();
        let mut paths = TreePaths {
            depth: vec![0; count],
            from_root: vec![0.0; count],
        };
        for &node in &topology.order {
            let n = node as usize;
            let parent = topology.parent[n];
            if parent != NO_PARENT {
                let p = parent as usize;
                paths.depth[n] = paths.depth[p] + 1;
                paths.from_root[n] = paths.from_root[p] + length(n, p);
            }
        }
        paths
    }

    /// The length of the path along the forest between `a` and `b`; infinite when they lie in
    /// different trees.
    fn between(&self, topology: &Topology, a: usize, b: usize) -> f64 {
        let (mut x, mut y) = (a, b);
        while self.depth[x] > self.depth[y] {
            x = topology.parent[x] as usize;
        }
        while self.depth[y] > self.depth[x] {
            y = topology.parent[y] as usize;
        }
        while x != y {
            let (px, py) = (topology.parent[x], topology.parent[y]);
            if px == NO_PARENT || py == NO_PARENT {
                return f64::INFINITY;
            }
            x = px as usize;
            y = py as usize;
        }
        self.from_root[a] + self.from_root[b] - 2.0 * self.from_root[x]
    }
}

/// A tip's join offered to the closed face it hangs in (`nest`).
#[derive(Clone, Copy, Debug)]
struct Offer {
    /// The face (index into the traced faces).
    face: usize,
    tip: u32,
    join: Candidate,
    /// The way round from the tip to the join's anchor, up to half the face's boundary.
    score: f64,
    /// How many new segments there were when the offer was made.
    links_before: usize,
    /// The flow the new wall is drawn with: the tip's, at most `FINER_WALL_SHARE` of the
    /// thinnest wall of the face.
    flow: f64,
}

/// A uniform grid of items keyed by one point each; `near` gives the items of the 3 x 3 cells
/// around a point (every item within one cell size of it, and some farther).
struct Grid {
    size: f64,
    cells: std::collections::HashMap<(i64, i64), Vec<u32>>,
    empty: Vec<u32>,
    scratch: std::cell::RefCell<Vec<u32>>,
}

impl Grid {
    fn of_points(items: impl Iterator<Item = (u32, (f64, f64))>, size: f64) -> Grid {
        let mut grid = Grid {
            size,
            cells: std::collections::HashMap::new(),
            empty: Vec::new(),
            scratch: std::cell::RefCell::new(Vec::new()),
        };
        for (item, at) in items {
            grid.insert(item, at);
        }
        grid
    }

    fn key(&self, at: (f64, f64)) -> (i64, i64) {
        (
            libm::floor(at.0 / self.size) as i64,
            libm::floor(at.1 / self.size) as i64,
        )
    }

    fn insert(&mut self, item: u32, at: (f64, f64)) {
        let key = self.key(at);
        self.cells.entry(key).or_default().push(item);
    }

    /// Puts `item` in every cell the bounding box of `a` and `b` covers.
    fn insert_box(&mut self, item: u32, a: (f64, f64), b: (f64, f64)) {
        let low = self.key((a.0.min(b.0), a.1.min(b.1)));
        let high = self.key((a.0.max(b.0), a.1.max(b.1)));
        for gx in low.0..=high.0 {
            for gy in low.1..=high.1 {
                self.cells.entry((gx, gy)).or_default().push(item);
            }
        }
    }

    /// Items in the cells the bounding box of `a` and `b` covers.
    fn in_box(&self, a: (f64, f64), b: (f64, f64)) -> Vec<u32> {
        let low = self.key((a.0.min(b.0), a.1.min(b.1)));
        let high = self.key((a.0.max(b.0), a.1.max(b.1)));
        let mut found = self.scratch.borrow_mut();
        found.clear();
        for gx in low.0..=high.0 {
            for gy in low.1..=high.1 {
                found.extend_from_slice(self.cells.get(&(gx, gy)).unwrap_or(&self.empty));
            }
        }
        found.clone()
    }

    /// Items in the 3 x 3 cells around `at`.
    fn near(&self, at: (f64, f64)) -> Vec<u32> {
        self.near_box(at, at)
    }

    /// Items whose point lies in a cell within one cell of the box spanned by `a` and `b`.
    fn near_box(&self, a: (f64, f64), b: (f64, f64)) -> Vec<u32> {
        let low = self.key((a.0.min(b.0), a.1.min(b.1)));
        let high = self.key((a.0.max(b.0), a.1.max(b.1)));
        let mut found = self.scratch.borrow_mut();
        found.clear();
        for gx in low.0 - 1..=high.0 + 1 {
            for gy in low.1 - 1..=high.1 + 1 {
                found.extend_from_slice(self.cells.get(&(gx, gy)).unwrap_or(&self.empty));
            }
        }
        found.clone()
    }
}

/// Bounded shortest paths by A* search (Hart, Nilsson & Raphael 1968, IEEE Trans. Syst. Sci.
/// Cybern. 4) with the straight distance to the target as its lower bound, so only nodes that
/// could lie on a path shorter than the bound are visited; distances kept between searches.
struct PathSearch {
    distance: Vec<f64>,
    touched: Vec<u32>,
    heap: BinaryHeap<Reverse<(Ordered, u32)>>,
}

impl PathSearch {
    fn new(count: usize) -> PathSearch {
        PathSearch {
            distance: vec![f64::INFINITY; count],
            touched: Vec::new(),
            heap: BinaryHeap::new(),
        }
    }

    /// The length of the shortest path from `from` to `to` when it is shorter than `bound`.
    /// `length(a, b)` is an edge's length and never less than the straight distance.
    fn shortest(
        &mut self,
        from: usize,
        to: usize,
        bound: f64,
        neighbours: impl Fn(usize, &mut dyn FnMut(usize)),
        length: impl Fn(usize, usize) -> f64,
    ) -> Option<f64> {
        for &node in &self.touched {
            self.distance[node as usize] = f64::INFINITY;
        }
        self.touched.clear();
        self.heap.clear();
        let (distance, touched, heap) = (&mut self.distance, &mut self.touched, &mut self.heap);
        distance[from] = 0.0;
        touched.push(from as u32);
        heap.push(Reverse((Ordered(length(from, to)), from as u32)));
        while let Some(Reverse((Ordered(estimate), node))) = heap.pop() {
            let node = node as usize;
            let reached = distance[node];
            if node == to {
                return Some(reached);
            }
            if estimate > reached + length(node, to) {
                continue;
            }
            neighbours(node, &mut |other| {
                let through = reached + length(node, other);
                let estimate = through + length(other, to);
                if estimate < bound && through < distance[other] {
                    if distance[other].is_infinite() {
                        touched.push(other as u32);
                    }
                    distance[other] = through;
                    heap.push(Reverse((Ordered(estimate), other as u32)));
                }
            });
        }
        None
    }
}

/// A finite f64 ordered for the heap.
#[derive(Clone, Copy, PartialEq)]
struct Ordered(f64);

impl Eq for Ordered {}

impl PartialOrd for Ordered {
    fn partial_cmp(&self, other: &Self) -> Option<std::cmp::Ordering> {
        Some(self.cmp(other))
    }
}

impl Ord for Ordered {
    fn cmp(&self, other: &Self) -> std::cmp::Ordering {
        self.0.total_cmp(&other.0)
    }
}

#[cfg(test)]
mod tests {
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
