//! Junction relaxation (`relax_junctions`): moves each junction of a forest off the lattice to
//! the weighted Fermat point of its neighbours, lowering the branched-transport cost
//! `sum q^alpha L`, and never lets a segment cross or touch another.
//!
//! A junction is a non-root node with two or more upstream segments. With its neighbours held
//! still, the part of `sum q^alpha L` that depends on its position `p` is
//! `f(p) = sum_i w_i |p - p_i|` over its incident segments (`w_i = q_i^alpha`, `q_i` the
//! segment's upstream flow from the forest view): a weighted Fermat (Fermat-Weber) point
//! problem. At its minimum off the neighbours the weighted unit vectors balance,
//! `sum_i w_i u_i = 0`, which gives Xia's closed-form Y-junction angles (Xia 2003, Commun.
//! Contemp. Math. 5(2)).
//!
//! **Method.** Weiszfeld's iteration (Weiszfeld 1937, Tohoku Math. J. 43), with the two
//! standard repairs at the neighbours: Kuhn's test first (Kuhn 1973, Math. Programming 4: the
//! neighbour `p_k` is the minimum when `|sum_{i != k} w_i u_ki| <= w_k`), and Vardi and Zhang's
//! modified step should an iterate land on a neighbour (Vardi & Zhang 2000, PNAS 97(4)). `f` is
//! convex, so every point between the current position and the minimum costs no more than the
//! current position.
//!
//! **Moves.** A junction moves to the minimum, or, when that lies within `GAP_FRACTION` of a
//! cell of a neighbour (the optimum of a strongly unequal junction can be the neighbour itself,
//! where the junction would vanish into it; the topology stays fixed here), or when the move
//! would make one of its segments cross, touch or run over another segment, half as far, up to
//! `HALVINGS` times; otherwise it stays. A move is kept only when it lowers `f` (so the network's
//! `sum q^alpha L` never rises). Crossings are decided with Shewchuk's exact orientation
//! predicate (`robust::orient2d`; Shewchuk 1997, Discrete Comput. Geom. 18), so the relaxation
//! and any exact check agree.
//!
//! **Sweeps.** Junctions are visited root first (the forest view's order); moving one changes
//! its neighbours' optima, so the sweep repeats, up to the asked number of sweeps, and stops
//! early once a sweep lowers the total cost by less than `SETTLED` of it.

use crate::fast_libm::{hypot, pow};
use crate::network::{Network, Topology, NO_PARENT};
use robust::{orient2d, Coord};

/// What a relaxation did, for reports and tests.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct Relaxation {
    /// Junctions (non-root nodes with two or more upstream segments).
    pub junctions: usize,
    /// Sweeps run (at most the number asked; fewer once the cost settles).
    pub sweeps: u32,
    /// Moves kept, over every sweep.
    pub moves: usize,
    /// Moves refused: every shortened move came too near a neighbour or made a segment cross,
    /// touch or run over another (junctions already at their optimum are not counted).
    pub refused: usize,
    /// `sum q^alpha L` before, in the network's flow and length units.
    pub cost_before: f64,
    /// `sum q^alpha L` after.
    pub cost_after: f64,
}

/// Closest a junction may come to one of its neighbours, as a fraction of the cell size (of the
/// shortest incident segment when the network has no cell size): the junction keeps its own
/// segments. A choice of ours: a tenth of a cell is below what a drawing shows.
pub const GAP_FRACTION: f64 = 0.1;

/// How many times a refused move is halved before the junction stays where it is.
pub const HALVINGS: u32 = 8;

/// A sweep that lowers the total cost by less than this fraction of it ends the relaxation.
pub const SETTLED: f64 = 1e-9;

/// Weiszfeld iterations per junction and sweep at most (each lowers `f`; the next sweep goes
/// on from where this one stopped). 100 rather than more: on broad-leaf, 5 sweeps take 0.45 s
/// instead of 1.45 s at 2,000 with the same cost to 0.03 %.
const MAX_ITERATIONS: u32 = 100;

/// Weiszfeld stops once a step is shorter than this fraction of the neighbours' spread.
const STEP_TOLERANCE: f64 = 1e-10;

/// Moves each junction of `network` (a forest with forest view `topology`) toward its weighted
/// Fermat point, `sweeps` times at most; flows and topology stay as they are, only junction
/// positions change. `alpha` is the branched-transport exponent.
pub fn relax_junctions(
    network: &mut Network,
    topology: &Topology,
    alpha: f64,
    sweeps: u32,
) -> Relaxation {
    let mut relaxing = JunctionRelaxing::new(network, topology, alpha, sweeps);
    while !relaxing.done() {
        relaxing.sweep(network, topology);
    }
    relaxing.report()
}

/// The relaxation a sweep at a time (`relax_junctions` runs it in one go): the state one sweep
/// leaves for the next, so a caller can show progress between sweeps or stop after any whole
/// sweep; stopped after `k` sweeps, the network is the one `relax_junctions` gives with `k`. A
/// sweep may also run in parts (`advance`), and a part-run sweep can be taken back
/// (`take_back_part`), so a caller can stop within a sweep and keep the last whole one.
pub struct JunctionRelaxing {
    weight: Vec<f64>,
    junctions: Vec<u32>,
    /// The next junction the sweep in progress takes (0 between sweeps).
    cursor: usize,
    /// Moves kept and refused so far in the sweep in progress.
    part: (usize, usize),
    /// Every move of the sweep in progress, as (junction, its position before the move).
    undo: Vec<(u32, (f64, f64))>,
    index: Option<SegmentGrid>,
    neighbours: Vec<Neighbour>,
    cost: f64,
    sweeps: u32,
    done: bool,
    report: Relaxation,
}

impl JunctionRelaxing {
    /// Starts the relaxation of `network` (a forest with forest view `topology`); pass the same
    /// network and view to every `sweep`.
    pub fn new(
        network: &Network,
        topology: &Topology,
        alpha: f64,
        sweeps: u32,
    ) -> JunctionRelaxing {
        let count = network.nodes.len();
        let weight: Vec<f64> = (0..count)
            .map(|node| match topology.parent.get(node) {
                Some(&parent) if parent != NO_PARENT => segment_weight(topology.flow[node], alpha),
                _ => 0.0,
            })
            .collect();
        let junctions: Vec<u32> = topology
            .order
            .iter()
            .copied()
            .filter(|&node| {
                !topology.is_root(node as usize) && topology.children.of(node as usize).len() >= 2
            })
            .collect();
        let cost_before = total_cost(network, topology, &weight);
        let report = Relaxation {
            junctions: junctions.len(),
            cost_before,
            cost_after: cost_before,
            ..Relaxation::default()
        };
        let idle = junctions.is_empty() || sweeps == 0;
        JunctionRelaxing {
            index: (!idle).then(|| SegmentGrid::new(network, topology)),
            weight,
            junctions,
            cursor: 0,
            part: (0, 0),
            undo: Vec::new(),
            neighbours: Vec::new(),
            cost: cost_before,
            sweeps,
            done: idle,
            report,
        }
    }

    /// Whether no sweep is left: `sweeps` have run, or the last one settled the cost.
    pub fn done(&self) -> bool {
        self.done
    }

    /// The report so far (cost after the last whole sweep).
    pub fn report(&self) -> Relaxation {
        self.report
    }

    /// Runs one sweep, or the rest of a part-run one (nothing once `done`); returns the cost
    /// after it, `None` when none ran.
    pub fn sweep(&mut self, network: &mut Network, topology: &Topology) -> Option<f64> {
        self.advance(network, topology, usize::MAX)
    }

    /// Takes up to `junctions` more junctions of the sweep in progress (starting one when none
    /// is); returns the cost after the sweep when it ended in this call, else `None`. The
    /// junctions are taken in the same order and state as a whole `sweep` takes them, so any
    /// split of a sweep into parts moves them the same, bit for bit.
    pub fn advance(
        &mut self,
        network: &mut Network,
        topology: &Topology,
        junctions: usize,
    ) -> Option<f64> {
        if self.done {
            return None;
        }
        let Some(index) = &mut self.index else {
            self.done = true;
            return None;
        };
        let end = self
            .cursor
            .saturating_add(junctions)
            .min(self.junctions.len());
        for &junction in &self.junctions[self.cursor..end] {
            let node = &network.nodes[junction as usize];
            let before = (node.x, node.y);
            match relax_one(
                network,
                topology,
                &self.weight,
                index,
                junction,
                &mut self.neighbours,
            ) {
                Move::Kept => {
                    self.part.0 += 1;
                    self.undo.push((junction, before));
                }
                Move::Refused => self.part.1 += 1,
                Move::None => {}
            }
        }
        self.cursor = end;
        if self.cursor < self.junctions.len() {
            return None;
        }
        self.report.sweeps += 1;
        self.report.moves += self.part.0;
        self.report.refused += self.part.1;
        self.part = (0, 0);
        self.cursor = 0;
        self.undo.clear();
        let after = total_cost(network, topology, &self.weight);
        let settled = self.cost - after <= SETTLED * self.cost;
        self.cost = after;
        self.report.cost_after = after;
        self.done = settled || self.report.sweeps >= self.sweeps;
        Some(after)
    }

    /// How far the sweep in progress has gone: (junctions taken, junctions a sweep takes,
    /// junctions moved so far); (0, n, 0) between sweeps.
    pub fn part_done(&self) -> (usize, usize, usize) {
        (self.cursor, self.junctions.len(), self.part.0)
    }

    /// Takes back the part-run sweep (nothing when none is part-run): every junction it moved
    /// goes back to where the last whole sweep left it. The relaxation ends here (its search
    /// grid still holds the taken-back moves), so the network and `report` are those of
    /// `relax_junctions` with the whole sweeps run.
    pub fn take_back_part(&mut self, network: &mut Network) {
        if self.cursor == 0 {
            return;
        }
        for &(junction, (x, y)) in self.undo.iter().rev() {
            let node = &mut network.nodes[junction as usize];
            (node.x, node.y) = (x, y);
        }
        self.undo.clear();
        self.part = (0, 0);
        self.cursor = 0;
        self.done = true;
    }
}

/// `q^alpha` of a segment carrying `flow`; a segment carrying nothing costs nothing (as in
/// `metrics::transport`).
fn segment_weight(flow: f64, alpha: f64) -> f64 {
    if flow > 0.0 {
        pow(flow, alpha)
    } else {
        0.0
    }
}

/// `sum q^alpha L` over the forest's segments.
fn total_cost(network: &Network, topology: &Topology, weight: &[f64]) -> f64 {
    (0..network.nodes.len())
        .filter(|&node| !topology.is_root(node))
        .map(|node| weight[node] * network.segment_length(node as u32, topology.parent[node]))
        .sum()
}

/// What happened to one junction.
enum Move {
    /// It moved.
    Kept,
    /// It would have moved, but no shortened move was both plane and cheaper.
    Refused,
    /// It is where it should be.
    None,
}

/// One neighbour of a junction: its position and the weight `q^alpha` of the segment to it.
#[derive(Clone, Copy)]
struct Neighbour {
    at: (f64, f64),
    weight: f64,
}

/// Moves one junction as the module comment says.
fn relax_one(
    network: &mut Network,
    topology: &Topology,
    weight: &[f64],
    index: &mut SegmentGrid,
    junction: u32,
    neighbours: &mut Vec<Neighbour>,
) -> Move {
    let j = junction as usize;
    let parent = topology.parent[j];
    neighbours.clear();
    let at = |node: u32| {
        let node = &network.nodes[node as usize];
        (node.x, node.y)
    };
    neighbours.push(Neighbour {
        at: at(parent),
        weight: weight[j],
    });
    for &child in topology.children.of(j) {
        neighbours.push(Neighbour {
            at: at(child),
            weight: weight[child as usize],
        });
    }
    let start = at(junction);
    let target = fermat_point(neighbours, start);
    let local = |p: (f64, f64)| -> f64 {
        neighbours
            .iter()
            .map(|n| n.weight * hypot(p.0 - n.at.0, p.1 - n.at.1))
            .sum()
    };
    let spread = neighbours
        .iter()
        .map(|n| hypot(n.at.0 - start.0, n.at.1 - start.1))
        .fold(0.0_f64, f64::max);
    let (dx, dy) = (target.0 - start.0, target.1 - start.1);
    if hypot(dx, dy) <= 1e-12 * spread {
        return Move::None;
    }
    let gap = if network.cell_size > 0.0 {
        GAP_FRACTION * network.cell_size
    } else {
        GAP_FRACTION
            * neighbours
                .iter()
                .map(|n| hypot(n.at.0 - start.0, n.at.1 - start.1))
                .fold(f64::INFINITY, f64::min)
    };
    let before = local(start);
    let mut step = 1.0;
    // Whether a move was stopped by a neighbour or a crossing (rather than too small to pay).
    let mut blocked = false;
    for _ in 0..=HALVINGS {
        let candidate = (start.0 + step * dx, start.1 + step * dy);
        step *= 0.5;
        let clear = neighbours
            .iter()
            .all(|n| hypot(candidate.0 - n.at.0, candidate.1 - n.at.1) >= gap);
        if !clear {
            blocked = true;
            continue;
        }
        // A move must lower the cost by more than rounding could: the total then never rises.
        if local(candidate) >= before * (1.0 - 1e-12) {
            continue;
        }
        if index.move_is_plane(network, topology, junction, candidate) {
            let node = &mut network.nodes[j];
            (node.x, node.y) = candidate;
            index.moved(network, topology, junction, start);
            return Move::Kept;
        }
        blocked = true;
    }
    if blocked {
        Move::Refused
    } else {
        Move::None
    }
}

/// The point minimising `sum_i w_i |p - p_i|` over `neighbours` (weights >= 0), by Weiszfeld's
/// iteration from `start` with Kuhn's test at the neighbours and Vardi and Zhang's step (see the
/// module comment).
fn fermat_point(neighbours: &[Neighbour], start: (f64, f64)) -> (f64, f64) {
    // Kuhn's test: a neighbour is the minimum when the pull of the others is at most its weight.
    for (k, own) in neighbours.iter().enumerate() {
        let (pull, weight) = pull_at(neighbours, k, own.at);
        if hypot(pull.0, pull.1) <= weight {
            return own.at;
        }
    }
    let spread = neighbours
        .iter()
        .map(|n| hypot(n.at.0 - start.0, n.at.1 - start.1))
        .fold(0.0_f64, f64::max);
    let mut x = start;
    for _ in 0..MAX_ITERATIONS {
        let (mut sx, mut sy, mut sw) = (0.0, 0.0, 0.0);
        let mut at_vertex = None;
        for (i, n) in neighbours.iter().enumerate() {
            let d = hypot(x.0 - n.at.0, x.1 - n.at.1);
            if d == 0.0 {
                at_vertex = Some(i);
                continue;
            }
            sx += n.weight * n.at.0 / d;
            sy += n.weight * n.at.1 / d;
            sw += n.weight / d;
        }
        if sw == 0.0 {
            return x;
        }
        let weiszfeld = (sx / sw, sy / sw);
        let next = match at_vertex {
            None => weiszfeld,
            Some(k) => {
                // Vardi & Zhang 2000: blend the Weiszfeld point with the vertex by the ratio of
                // the vertex's weight to the others' pull (Kuhn's test found the pull larger).
                let (pull, weight) = pull_at(neighbours, k, x);
                let r = hypot(pull.0, pull.1);
                let keep = (weight / r).min(1.0);
                (
                    (1.0 - keep) * weiszfeld.0 + keep * x.0,
                    (1.0 - keep) * weiszfeld.1 + keep * x.1,
                )
            }
        };
        let step = hypot(next.0 - x.0, next.1 - x.1);
        x = next;
        if step <= STEP_TOLERANCE * spread {
            break;
        }
    }
    x
}

/// At `at`, the position of neighbour `k`: the sum of the other neighbours' weighted unit
/// vectors toward them, and the weight sitting at `at` (neighbour `k`'s and any other
/// neighbour's at the same point).
fn pull_at(neighbours: &[Neighbour], k: usize, at: (f64, f64)) -> ((f64, f64), f64) {
    let (mut px, mut py, mut weight) = (0.0, 0.0, neighbours[k].weight);
    for (i, n) in neighbours.iter().enumerate() {
        if i == k {
            continue;
        }
        let d = hypot(n.at.0 - at.0, n.at.1 - at.1);
        if d == 0.0 {
            weight += n.weight;
            continue;
        }
        px += n.weight * (n.at.0 - at.0) / d;
        py += n.weight * (n.at.1 - at.1) / d;
    }
    ((px, py), weight)
}

/// The segments of a forest in buckets of a square grid, each segment (named by its upstream
/// node) in every bucket its bounding box overlaps, kept up to date as junctions move.
struct SegmentGrid {
    origin: (f64, f64),
    side: f64,
    columns: usize,
    rows: usize,
    buckets: Vec<Vec<u32>>,
}

/// Buckets per node at most (the bucket side grows until the grid fits).
const BUCKETS_PER_NODE: f64 = 4.0;

impl SegmentGrid {
    fn new(network: &Network, topology: &Topology) -> SegmentGrid {
        let (mut low, mut high) = (
            (f64::INFINITY, f64::INFINITY),
            (f64::NEG_INFINITY, f64::NEG_INFINITY),
        );
        for node in &network.nodes {
            low = (low.0.min(node.x), low.1.min(node.y));
            high = (high.0.max(node.x), high.1.max(node.y));
        }
        let extent = ((high.0 - low.0).max(0.0), (high.1 - low.1).max(0.0));
        let mut side = if network.cell_size > 0.0 {
            network.cell_size
        } else {
            (extent.0.max(extent.1) / 64.0).max(1e-9)
        };
        let limit = BUCKETS_PER_NODE * network.nodes.len().max(1) as f64;
        while (extent.0 / side + 1.0) * (extent.1 / side + 1.0) > limit {
            side *= 2.0;
        }
        let columns = (extent.0 / side) as usize + 1;
        let rows = (extent.1 / side) as usize + 1;
        let mut grid = SegmentGrid {
            origin: low,
            side,
            columns,
            rows,
            buckets: vec![Vec::new(); columns * rows],
        };
        for node in 0..network.nodes.len() {
            if !topology.is_root(node) {
                let (a, b) = ends(network, topology, node as u32);
                grid.each_bucket(a, b, |bucket| bucket.push(node as u32));
            }
        }
        grid
    }

    /// Calls `visit` on every bucket the box of `a b` overlaps (clamped to the grid: junctions
    /// only move inside the hull of their neighbours, so nothing leaves it).
    fn each_bucket(&mut self, a: (f64, f64), b: (f64, f64), mut visit: impl FnMut(&mut Vec<u32>)) {
        let (c0, r0) = self.cell_of((a.0.min(b.0), a.1.min(b.1)));
        let (c1, r1) = self.cell_of((a.0.max(b.0), a.1.max(b.1)));
        for row in r0..=r1 {
            for column in c0..=c1 {
                visit(&mut self.buckets[row * self.columns + column]);
            }
        }
    }

    fn cell_of(&self, p: (f64, f64)) -> (usize, usize) {
        let column = ((p.0 - self.origin.0) / self.side).floor().max(0.0) as usize;
        let row = ((p.1 - self.origin.1) / self.side).floor().max(0.0) as usize;
        (column.min(self.columns - 1), row.min(self.rows - 1))
    }

    /// Whether moving `junction` to `to` keeps every one of its segments clear of every other
    /// segment (meeting only at shared nodes, never running along one another).
    fn move_is_plane(
        &mut self,
        network: &Network,
        topology: &Topology,
        junction: u32,
        to: (f64, f64),
    ) -> bool {
        let j = junction as usize;
        let incident: Vec<u32> = std::iter::once(junction)
            .chain(topology.children.of(j).iter().copied())
            .collect();
        let position = |node: u32| {
            if node == junction {
                to
            } else {
                let n = &network.nodes[node as usize];
                (n.x, n.y)
            }
        };
        let ends_now = |segment: u32| (segment, topology.parent[segment as usize]);
        // Two of the junction's own segments share the junction: they must not run along each
        // other.
        for (first, &a) in incident.iter().enumerate() {
            for &b in &incident[first + 1..] {
                if segments_conflict(ends_now(a), ends_now(b), &position) {
                    return false;
                }
            }
        }
        let mut clear = true;
        for &segment in &incident {
            let (from, to_node) = ends_now(segment);
            let (a, b) = (position(from), position(to_node));
            self.each_bucket(a, b, |bucket| {
                if !clear {
                    return;
                }
                for &other in bucket.iter() {
                    if incident.contains(&other) {
                        continue;
                    }
                    if segments_conflict((from, to_node), ends_now(other), &position) {
                        clear = false;
                        return;
                    }
                }
            });
            if !clear {
                return false;
            }
        }
        true
    }

    /// Moves the junction's segments to their new buckets (the junction was at `from`).
    fn moved(&mut self, network: &Network, topology: &Topology, junction: u32, from: (f64, f64)) {
        let j = junction as usize;
        let incident: Vec<u32> = std::iter::once(junction)
            .chain(topology.children.of(j).iter().copied())
            .collect();
        for &segment in &incident {
            let (a, b) = ends(network, topology, segment);
            let old = |p: (f64, f64), node: u32| if node == junction { from } else { p };
            let (na, nb) = (segment, topology.parent[segment as usize]);
            self.each_bucket(old(a, na), old(b, nb), |bucket| {
                if let Some(at) = bucket.iter().position(|&s| s == segment) {
                    bucket.swap_remove(at);
                }
            });
            self.each_bucket(a, b, |bucket| bucket.push(segment));
        }
    }
}

/// The two end positions of the segment from `node` to its parent.
fn ends(network: &Network, topology: &Topology, node: u32) -> ((f64, f64), (f64, f64)) {
    let a = &network.nodes[node as usize];
    let b = &network.nodes[topology.parent[node as usize] as usize];
    ((a.x, a.y), (b.x, b.y))
}

fn coord(p: (f64, f64)) -> Coord<f64> {
    Coord { x: p.0, y: p.1 }
}

/// Whether segments `first` and `second` (node pairs) meet anywhere but at a shared end node,
/// by the orientation test (Cormen et al. 2009, Introduction to Algorithms, 3rd ed., section
/// 33.1) on exact predicates. Segments sharing a node conflict only when they are collinear and
/// overlap.
pub(crate) fn segments_conflict(
    first: (u32, u32),
    second: (u32, u32),
    position: &impl Fn(u32) -> (f64, f64),
) -> bool {
    let shared = [first.0, first.1]
        .into_iter()
        .find(|&node| node == second.0 || node == second.1);
    let (a, b) = (coord(position(first.0)), coord(position(first.1)));
    let (c, d) = (coord(position(second.0)), coord(position(second.1)));
    if let Some(shared) = shared {
        let s = coord(position(shared));
        let p = if first.0 == shared { b } else { a };
        let q = if second.0 == shared { d } else { c };
        return orient2d(s, p, q) == 0.0
            && (p.x - s.x) * (q.x - s.x) + (p.y - s.y) * (q.y - s.y) > 0.0;
    }
    if a.x.max(b.x) < c.x.min(d.x)
        || c.x.max(d.x) < a.x.min(b.x)
        || a.y.max(b.y) < c.y.min(d.y)
        || c.y.max(d.y) < a.y.min(b.y)
    {
        return false;
    }
    let d1 = orient2d(c, d, a);
    let d2 = orient2d(c, d, b);
    let d3 = orient2d(a, b, c);
    let d4 = orient2d(a, b, d);
    if ((d1 > 0.0 && d2 < 0.0) || (d1 < 0.0 && d2 > 0.0))
        && ((d3 > 0.0 && d4 < 0.0) || (d3 < 0.0 && d4 > 0.0))
    {
        return true;
    }
    let within = |p: Coord<f64>, q: Coord<f64>, r: Coord<f64>| {
        r.x >= p.x.min(q.x) && r.x <= p.x.max(q.x) && r.y >= p.y.min(q.y) && r.y <= p.y.max(q.y)
    };
    (d1 == 0.0 && within(c, d, a))
        || (d2 == 0.0 && within(c, d, b))
        || (d3 == 0.0 && within(a, b, c))
        || (d4 == 0.0 && within(a, b, d))
}
