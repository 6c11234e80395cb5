//! Channel energy optimisation (`energy_sweeps`): after growth, re-points where nodes drain so
//! the network's energy `E = sum Q^0.5 L` falls, as optimal channel networks are found.
//!
//! **Energy.** `E = sum over segments of Q_e^GAMMA_E * L_e`, `Q_e` the segment's upstream flow
//! (the forest view's `Topology::flow`: the node's own weight plus everything upstream) and
//! `L_e` its length. The exponent is fixed at `GAMMA_E = 0.5`, the value of the
//! optimal-channel-network papers (Rinaldo et al. 1992, Water Resour. Res. 28(9);
//! Rodriguez-Iturbe et al. 1992, Water Resour. Res. 28(4)), not the growth cost's `alpha`:
//! `alpha` shapes how a network grows, while this energy is the measure those papers minimise,
//! so its value stays theirs whatever the growth costs were (and a square root is cheap).
//!
//! **Moves.** For one node `n` (never a root) with downstream node `p`, every other node `t`
//! within the reach (`radius` cells from `n`) is a candidate new downstream node. Re-pointing
//! `n` to `t` changes the length of `n`'s own segment, takes `Q_n` off every segment from `p`
//! down to where the old and new paths meet, and adds it to every segment from `t` down to
//! that meeting node (or down to `t`'s outlet when `t` drains to another one). A candidate is
//! refused when `t` lies upstream of `n` (the walk down from `t` reaches `n`: a loop) or when the
//! new segment would cross, touch or run over another segment (Shewchuk's exact orientation
//! predicate, `robust::orient2d`, as in `junctions.rs`; segments in a bucket grid). Roots never
//! move, so every node still drains to an outlet and the roots stay the same; positions never
//! change, only the downstream end of segments. Of the candidates that lower `E` the largest
//! drop that keeps the network plane is taken (greedy steepest descent; no uphill acceptances,
//! so `E` never rises). A sweep visits every non-root node once, tips first.
//!
//! **Reach.** Candidates lie within the growth reach (`radius` cells), so a node may drain to
//! any node it could have joined while growing. Measured on an open lattice of 80,000 cells
//! (tests/tests/channel_energy.rs, `energy_figures`): with the drainage site's reach of 4
//! cells, 20 sweeps lower `E` by 21-22 % and move the exceedance exponent of drained areas
//! from 0.51 to 0.56, away from the optimal-channel-network value near 0.43; with a reach of
//! 1.5 cells (the 8 neighbours, the lattice papers' moves) `E` falls by 20 % and the exponent
//! moves to 0.47-0.49, toward it. Long re-pointings let tributaries join big channels directly,
//! which thins out the mid-sized basins.
//!
//! **Walks.** The old path from `p` is walked once per node, stamping each node with the energy
//! change of taking `Q_n` off the path down to it; each candidate then walks down from `t` until
//! it meets a stamped node, stopping early once even the whole old path's saving cannot pay for
//! what the walk has added.

use crate::junctions::segments_conflict;
use crate::network::{Network, Topology, NO_PARENT};

/// The energy exponent `gamma_e` of `E = sum Q^gamma_e L` (Rinaldo et al. 1992; Rodriguez-Iturbe
/// et al. 1992).
pub const GAMMA_E: f64 = 0.5;

/// A move must lower `E` by more than this fraction of it (rounding cannot pass for a drop).
const MIN_DROP: f64 = 1e-12;

/// One sweep's outcome.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct EnergySweep {
    /// `E` after the sweep (flows recomputed from scratch).
    pub energy: f64,
    /// Nodes re-pointed in the sweep.
    pub moves: usize,
    /// Nodes whose every energy-lowering candidate would have made a segment cross, touch or run
    /// over another.
    pub blocked: usize,
}

/// What the optimisation did, for reports and tests.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct ChannelEnergy {
    /// `E` before, in the network's flow and length units (`flow^0.5 * length`).
    pub energy_before: f64,
    /// `E` after the last sweep.
    pub energy_after: f64,
    /// One entry per sweep run (sweeps stop early when one moves nothing).
    pub sweeps: Vec<EnergySweep>,
}

impl ChannelEnergy {
    /// Nodes re-pointed over every sweep.
    pub fn moves(&self) -> usize {
        self.sweeps.iter().map(|sweep| sweep.moves).sum()
    }
}

/// `E = sum Q^0.5 L` of a forest (`topology` its forest view).
pub fn network_energy(network: &Network, topology: &Topology) -> f64 {
    energy_of(network, &topology.parent, &topology.flow)
}

/// Re-points the downstream segments of `network` (a forest with forest view `topology`) to
/// lower `E`, at most `sweeps` sweeps, candidates within `reach` (length units) of each node.
/// Returns the new downstream node of every node (`NO_PARENT` for roots, as before) and the
/// report; `network` itself is not changed (`apply_parents` writes the result). The same as
/// `EnergyDescent::sweep` called until it reports the descent done.
pub fn lower_energy(
    network: &Network,
    topology: &Topology,
    reach: f64,
    sweeps: u32,
) -> (Vec<u32>, ChannelEnergy) {
    let mut descent = EnergyDescent::new(network, topology, reach, sweeps);
    while !descent.done() {
        descent.sweep(network);
    }
    descent.into_result()
}

/// The optimisation a sweep at a time (`lower_energy` runs it in one go): the state one sweep
/// leaves for the next, so a caller can show progress between sweeps or stop after any whole
/// sweep; stopped after `k` sweeps, the result is that of `lower_energy` with `k` sweeps. A
/// sweep may also run in parts (`advance`), and a part-run sweep can be taken back
/// (`take_back_part`), so a caller can stop within a sweep and keep the last whole one.
pub struct EnergyDescent {
    parent: Vec<u32>,
    /// The next node of `visit` the sweep in progress takes (0 between sweeps).
    cursor: usize,
    /// The sweep in progress so far.
    part: EnergySweep,
    /// Every move of the sweep in progress, as (node, its downstream node before the move).
    undo: Vec<(u32, u32)>,
    flow: Vec<f64>,
    weight: Vec<f64>,
    nodes: Option<NodeGrid>,
    grid: Option<SegmentGrid>,
    visit: Vec<u32>,
    walk: Walk,
    candidates: Vec<(f64, u32)>,
    reach: f64,
    sweeps: u32,
    done: bool,
    report: ChannelEnergy,
}

impl EnergyDescent {
    /// Starts the descent on `network` (a forest with forest view `topology`); pass the same
    /// network to every `sweep`.
    pub fn new(network: &Network, topology: &Topology, reach: f64, sweeps: u32) -> EnergyDescent {
        let count = network.nodes.len();
        let parent = topology.parent.clone();
        let flow = topology.flow.clone();
        let energy_before = energy_of(network, &parent, &flow);
        let report = ChannelEnergy {
            energy_before,
            energy_after: energy_before,
            sweeps: Vec::new(),
        };
        let idle = count < 3 || sweeps == 0 || reach.is_nan() || reach <= 0.0;
        let (nodes, grid) = if idle {
            (None, None)
        } else {
            (
                Some(NodeGrid::new(network, reach)),
                Some(SegmentGrid::new(
                    network,
                    &parent,
                    network_side(network, reach),
                )),
            )
        };
        EnergyDescent {
            weight: network.nodes.iter().map(|node| node.weight).collect(),
            // Tips first: the reverse of the root-first order.
            visit: topology.order.iter().rev().copied().collect(),
            walk: Walk::new(count),
            candidates: Vec::new(),
            cursor: 0,
            part: EnergySweep::default(),
            undo: Vec::new(),
            parent,
            flow,
            nodes,
            grid,
            reach,
            sweeps,
            done: idle,
            report,
        }
    }

    /// Whether no sweep is left: `sweeps` have run, or the last one moved nothing.
    pub fn done(&self) -> bool {
        self.done
    }

    /// The sweeps asked for.
    pub fn sweeps_asked(&self) -> u32 {
        self.sweeps
    }

    /// The report so far (energy before, after the last whole sweep, one entry per sweep).
    pub fn report(&self) -> &ChannelEnergy {
        &self.report
    }

    /// Runs one sweep, or the rest of a part-run one (nothing once `done`); returns its
    /// outcome, `None` when none ran.
    pub fn sweep(&mut self, network: &Network) -> Option<EnergySweep> {
        self.advance(network, usize::MAX)
    }

    /// Takes up to `nodes` more nodes of the sweep in progress (starting one when none is);
    /// returns the sweep's outcome when it ended in this call, else `None`. The nodes are taken
    /// in the same order and with the same state as a whole `sweep` takes them, so any split
    /// of a sweep into parts gives the same result, bit for bit.
    pub fn advance(&mut self, network: &Network, nodes: usize) -> Option<EnergySweep> {
        if self.done {
            return None;
        }
        let (Some(grid_nodes), Some(grid)) = (&self.nodes, &mut self.grid) else {
            self.done = true;
            return None;
        };
        let end = self.cursor.saturating_add(nodes).min(self.visit.len());
        for &n in &self.visit[self.cursor..end] {
            let before = self.parent[n as usize];
            if before == NO_PARENT {
                continue;
            }
            let energy = self.report.energy_after.max(f64::MIN_POSITIVE);
            match move_one(
                network,
                grid_nodes,
                grid,
                &mut self.parent,
                &mut self.flow,
                &mut self.walk,
                &mut self.candidates,
                n,
                self.reach,
                MIN_DROP * energy,
            ) {
                Outcome::Moved(drop) => {
                    self.part.moves += 1;
                    self.report.energy_after -= drop;
                    self.undo.push((n, before));
                }
                Outcome::Blocked => self.part.blocked += 1,
                Outcome::Stays => {}
            }
        }
        self.cursor = end;
        if self.cursor < self.visit.len() {
            return None;
        }
        let mut sweep = std::mem::take(&mut self.part);
        self.cursor = 0;
        self.undo.clear();
        // Incremental flows drift by rounding: recompute them, and `E`, from scratch.
        self.flow = flows(&self.parent, &self.weight);
        sweep.energy = energy_of(network, &self.parent, &self.flow);
        self.report.energy_after = sweep.energy;
        self.report.sweeps.push(sweep);
        self.done = sweep.moves == 0 || self.report.sweeps.len() >= self.sweeps as usize;
        Some(sweep)
    }

    /// How far the sweep in progress has gone: (nodes taken, nodes a sweep takes, nodes
    /// re-pointed so far); (0, n, 0) between sweeps.
    pub fn part_done(&self) -> (usize, usize, usize) {
        (self.cursor, self.visit.len(), self.part.moves)
    }

    /// Takes back the part-run sweep (nothing when none is part-run): every node it re-pointed
    /// drains where it did after the last whole sweep, and the report is that sweep's. The
    /// descent ends here (its search grid still holds the taken-back moves), so `into_result`
    /// gives the result of `lower_energy` with the whole sweeps run.
    pub fn take_back_part(&mut self) {
        if self.cursor == 0 {
            return;
        }
        for &(node, before) in self.undo.iter().rev() {
            self.parent[node as usize] = before;
        }
        self.undo.clear();
        self.cursor = 0;
        self.part = EnergySweep::default();
        self.report.energy_after = self
            .report
            .sweeps
            .last()
            .map_or(self.report.energy_before, |sweep| sweep.energy);
        self.done = true;
    }

    /// The new downstream node of every node and the report, as `lower_energy` returns them.
    pub fn into_result(self) -> (Vec<u32>, ChannelEnergy) {
        (self.parent, self.report)
    }
}

/// Writes `parent` into `network`'s segments: every segment keeps its upstream node and gets
/// that node's downstream node (`parent` from `lower_energy`, which keeps every non-root a
/// non-root).
pub fn apply_parents(network: &mut Network, parent: &[u32]) {
    for segment in &mut network.segments {
        let to = parent[segment.from as usize];
        if to != NO_PARENT {
            segment.to = to;
        }
    }
}

/// What happened at one node.
enum Outcome {
    /// Re-pointed, lowering `E` by this much.
    Moved(f64),
    /// Some candidate lowered `E` but every such one would break planarity.
    Blocked,
    /// No candidate lowers `E`.
    Stays,
}

/// Per-node scratch of the path walks: a stamp marking the old path of the node being moved
/// and, on it, the energy change of taking the moved flow off every segment above.
struct Walk {
    stamp: Vec<u32>,
    loss_above: Vec<f64>,
    current: u32,
}

impl Walk {
    fn new(count: usize) -> Walk {
        Walk {
            stamp: vec![0; count],
            loss_above: vec![0.0; count],
            current: 0,
        }
    }
}

/// Tries every candidate for node `n` and keeps the best plane one (see the module comment).
#[allow(clippy::too_many_arguments)]
fn move_one(
    network: &Network,
    nodes: &NodeGrid,
    grid: &mut SegmentGrid,
    parent: &mut [u32],
    flow: &mut [f64],
    walk: &mut Walk,
    candidates: &mut Vec<(f64, u32)>,
    n: u32,
    reach: f64,
    min_drop: f64,
) -> Outcome {
    let ni = n as usize;
    let p = parent[ni];
    let q = flow[ni];
    if q <= 0.0 {
        return Outcome::Stays;
    }
    let at = position(network, n);
    let old_length = distance(network, n, p);
    let sq = q.sqrt();
    // Stamp the old path: `loss_above[u]` is the change from the segments of the path above u.
    walk.current = walk.current.wrapping_add(1);
    if walk.current == 0 {
        walk.stamp.iter_mut().for_each(|s| *s = 0);
        walk.current = 1;
    }
    let stamp = walk.current;
    let mut loss = 0.0;
    let mut u = p;
    loop {
        walk.stamp[u as usize] = stamp;
        walk.loss_above[u as usize] = loss;
        let down = parent[u as usize];
        if down == NO_PARENT {
            break;
        }
        let fu = flow[u as usize];
        loss += distance(network, u, down) * ((fu - q).max(0.0).sqrt() - fu.sqrt());
        u = down;
    }
    // `loss` is now the whole old path's change (<= 0): the most any candidate can save there.
    let full_loss = loss;
    candidates.clear();
    nodes.each_near(at, reach, |t| {
        if t == n || t == p {
            return;
        }
        let new_length = distance(network, n, t);
        if new_length > reach {
            return;
        }
        let mut change = sq * (new_length - old_length);
        if change + full_loss >= -min_drop {
            return;
        }
        let mut v = t;
        loop {
            if v == n {
                return; // `t` is upstream of `n`.
            }
            if walk.stamp[v as usize] == stamp {
                change += walk.loss_above[v as usize];
                break;
            }
            let down = parent[v as usize];
            if down == NO_PARENT {
                // Another outlet: the whole old path loses the flow.
                change += full_loss;
                break;
            }
            let fv = flow[v as usize];
            change += distance(network, v, down) * ((fv + q).sqrt() - fv.sqrt());
            if change + full_loss >= -min_drop {
                return;
            }
            v = down;
        }
        if change < -min_drop {
            candidates.push((change, t));
        }
    });
    if candidates.is_empty() {
        return Outcome::Stays;
    }
    candidates.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
    for &(change, t) in candidates.iter() {
        if !grid.is_plane(network, parent, n, t) {
            continue;
        }
        grid.remove(network, parent, n);
        // Take the flow off the old path down to where the paths meet, add it on the new one.
        let meet = meeting_node(parent, walk, stamp, t);
        let mut u = p;
        while Some(u) != meet {
            flow[u as usize] -= q;
            match parent[u as usize] {
                NO_PARENT => break,
                down => u = down,
            }
        }
        let mut v = t;
        while Some(v) != meet {
            flow[v as usize] += q;
            match parent[v as usize] {
                NO_PARENT => break,
                down => v = down,
            }
        }
        parent[ni] = t;
        grid.insert(network, parent, n);
        return Outcome::Moved(-change);
    }
    Outcome::Blocked
}

/// The first node of the stamped old path on the way down from `t`, `None` when `t` drains to
/// another outlet.
fn meeting_node(parent: &[u32], walk: &Walk, stamp: u32, t: u32) -> Option<u32> {
    let mut v = t;
    loop {
        if walk.stamp[v as usize] == stamp {
            return Some(v);
        }
        match parent[v as usize] {
            NO_PARENT => return None,
            down => v = down,
        }
    }
}

fn position(network: &Network, node: u32) -> (f64, f64) {
    let n = &network.nodes[node as usize];
    (n.x, n.y)
}

fn distance(network: &Network, a: u32, b: u32) -> f64 {
    network.segment_length(a, b)
}

/// `E` for the downstream nodes `parent` and flows `flow`.
fn energy_of(network: &Network, parent: &[u32], flow: &[f64]) -> f64 {
    parent
        .iter()
        .enumerate()
        .filter(|&(_, &down)| down != NO_PARENT)
        .map(|(node, &down)| flow[node].max(0.0).sqrt() * distance(network, node as u32, down))
        .sum()
}

/// Flows from scratch: each node's weight plus everything upstream (`parent` a forest).
fn flows(parent: &[u32], weight: &[f64]) -> Vec<f64> {
    let count = parent.len();
    let mut pending = vec![0u32; count];
    for &down in parent {
        if down != NO_PARENT {
            pending[down as usize] += 1;
        }
    }
    let mut flow = weight.to_vec();
    let mut ready: Vec<u32> = (0..count as u32)
        .filter(|&n| pending[n as usize] == 0)
        .collect();
    while let Some(n) = ready.pop() {
        let down = parent[n as usize];
        if down != NO_PARENT {
            flow[down as usize] += flow[n as usize];
            pending[down as usize] -= 1;
            if pending[down as usize] == 0 {
                ready.push(down);
            }
        }
    }
    flow
}

/// The bucket side of the segment grid: a cell, or a reach when the network has no cell size.
fn network_side(network: &Network, reach: f64) -> f64 {
    if network.cell_size > 0.0 {
        network.cell_size
    } else {
        reach
    }
}

/// Bounding box of a network's nodes.
fn bounds(network: &Network) -> ((f64, f64), (f64, f64)) {
    let mut low = (f64::INFINITY, f64::INFINITY);
    let mut high = (f64::NEG_INFINITY, f64::NEG_INFINITY);
    for node in &network.nodes {
        low = (low.0.min(node.x), low.1.min(node.y));
        high = (high.0.max(node.x), high.1.max(node.y));
    }
    (low, high)
}

/// Square buckets over the network's box: which bucket a point is in.
#[derive(Clone, Copy)]
struct Buckets {
    origin: (f64, f64),
    side: f64,
    columns: usize,
    rows: usize,
}

/// Buckets per node at most (the side grows until the grid fits).
const BUCKETS_PER_NODE: f64 = 4.0;

impl Buckets {
    fn new(network: &Network, side: f64) -> Buckets {
        let (low, high) = bounds(network);
        let extent = ((high.0 - low.0).max(0.0), (high.1 - low.1).max(0.0));
        let mut side = side
            .max(1e-12 * extent.0.max(extent.1))
            .max(f64::MIN_POSITIVE);
        let limit = BUCKETS_PER_NODE * network.nodes.len().max(1) as f64;
        while (extent.0 / side + 1.0) * (extent.1 / side + 1.0) > limit {
            side *= 2.0;
        }
        Buckets {
            origin: low,
            side,
            columns: (extent.0 / side) as usize + 1,
            rows: (extent.1 / side) as usize + 1,
        }
    }

    fn cell_of(&self, p: (f64, f64)) -> (usize, usize) {
        let column = ((p.0 - self.origin.0) / self.side).floor().max(0.0) as usize;
        let row = ((p.1 - self.origin.1) / self.side).floor().max(0.0) as usize;
        (column.min(self.columns - 1), row.min(self.rows - 1))
    }

    /// Every bucket index the box of `a b` overlaps.
    fn each(&self, a: (f64, f64), b: (f64, f64), mut visit: impl FnMut(usize)) {
        let (c0, r0) = self.cell_of((a.0.min(b.0), a.1.min(b.1)));
        let (c1, r1) = self.cell_of((a.0.max(b.0), a.1.max(b.1)));
        for row in r0..=r1 {
            for column in c0..=c1 {
                visit(row * self.columns + column);
            }
        }
    }
}

/// The nodes in buckets (compressed rows), for the candidates within reach.
struct NodeGrid {
    buckets: Buckets,
    start: Vec<u32>,
    list: Vec<u32>,
}

impl NodeGrid {
    fn new(network: &Network, reach: f64) -> NodeGrid {
        let buckets = Buckets::new(network, reach);
        let cells = buckets.columns * buckets.rows;
        let bucket_of: Vec<usize> = network
            .nodes
            .iter()
            .map(|node| {
                let (c, r) = buckets.cell_of((node.x, node.y));
                r * buckets.columns + c
            })
            .collect();
        let mut start = vec![0u32; cells + 1];
        for &b in &bucket_of {
            start[b + 1] += 1;
        }
        for b in 0..cells {
            start[b + 1] += start[b];
        }
        let mut fill = start.clone();
        let mut list = vec![0u32; network.nodes.len()];
        for (node, &b) in bucket_of.iter().enumerate() {
            list[fill[b] as usize] = node as u32;
            fill[b] += 1;
        }
        NodeGrid {
            buckets,
            start,
            list,
        }
    }

    /// Calls `visit` on every node in a bucket within `reach` of `at` (a superset of the nodes
    /// within reach, in bucket and index order).
    fn each_near(&self, at: (f64, f64), reach: f64, mut visit: impl FnMut(u32)) {
        self.buckets.each(
            (at.0 - reach, at.1 - reach),
            (at.0 + reach, at.1 + reach),
            |b| {
                for &node in &self.list[self.start[b] as usize..self.start[b + 1] as usize] {
                    visit(node);
                }
            },
        );
    }
}

/// The segments (each named by its upstream node) in every bucket their box overlaps.
struct SegmentGrid {
    buckets: Buckets,
    lists: Vec<Vec<u32>>,
}

impl SegmentGrid {
    fn new(network: &Network, parent: &[u32], side: f64) -> SegmentGrid {
        let buckets = Buckets::new(network, side);
        let mut grid = SegmentGrid {
            buckets,
            lists: vec![Vec::new(); buckets.columns * buckets.rows],
        };
        for node in 0..parent.len() as u32 {
            grid.insert(network, parent, node);
        }
        grid
    }

    fn insert(&mut self, network: &Network, parent: &[u32], node: u32) {
        let down = parent[node as usize];
        if down == NO_PARENT {
            return;
        }
        let (a, b) = (position(network, node), position(network, down));
        let lists = &mut self.lists;
        self.buckets.each(a, b, |bucket| lists[bucket].push(node));
    }

    fn remove(&mut self, network: &Network, parent: &[u32], node: u32) {
        let down = parent[node as usize];
        if down == NO_PARENT {
            return;
        }
        let (a, b) = (position(network, node), position(network, down));
        let lists = &mut self.lists;
        self.buckets.each(a, b, |bucket| {
            if let Some(at) = lists[bucket].iter().position(|&s| s == node) {
                lists[bucket].swap_remove(at);
            }
        });
    }

    /// Whether the segment from `n` to `t` meets no other segment but at shared nodes (`n`'s
    /// current segment left out: it is the one replaced).
    fn is_plane(&self, network: &Network, parent: &[u32], n: u32, t: u32) -> bool {
        let at = |node: u32| position(network, node);
        let mut clear = true;
        self.buckets.each(at(n), at(t), |bucket| {
            if !clear {
                return;
            }
            for &other in &self.lists[bucket] {
                if other != n && segments_conflict((n, t), (other, parent[other as usize]), &at) {
                    clear = false;
                    return;
                }
            }
        });
        clear
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::network::{Node, Segment};

    fn network(points: &[(f64, f64)], ends: &[(u32, u32)]) -> Network {
        Network {
            nodes: points
                .iter()
                .map(|&(x, y)| Node { x, y, weight: 1.0 })
                .collect(),
            segments: ends
                .iter()
                .map(|&(from, to)| Segment { from, to })
                .collect(),
            cell_size: 1.0,
            ..Network::default()
        }
    }

    /// Flows from scratch equal the forest view's.
    #[test]
    fn flows_match_the_forest_view() {
        let net = network(
            &[(0.0, 0.0), (1.0, 0.0), (2.0, 0.0), (1.0, 1.0)],
            &[(1, 0), (2, 1), (3, 1)],
        );
        let topology = net.topology().unwrap();
        let weight: Vec<f64> = net.nodes.iter().map(|n| n.weight).collect();
        assert_eq!(flows(&topology.parent, &weight), topology.flow);
    }
}
