//! `LoopClosing`: the loop pass held between calls, so that a caller (the page) closes loops a
//! bounded amount of work at a time (`advance`) and shows where it stands
//! (`LoopProgress`) in between. Any split into calls gives the same `Reconnection`, bit for
//! bit, as `close_loops`, which is `new`, `advance` to the end and `finish`.

use super::rotation::{FaceFigures, RotationSystem};
use super::search::{Grid, PathSearch, TreePaths};
use super::{LoopRule, Reconnection, FINER_WALL_SHARE, TRIES_PER_TIP};
use crate::metrics::areoles::segments_conflict;
use crate::network::{Network, Segment, Topology, NO_PARENT};

/// The grown forest the loop pass closes loops on: the network, its forest view and which of
/// its segments conduct (one per segment; missing entries conduct). The same for every call
/// of one pass.
#[derive(Clone, Copy)]
pub struct GrownVeins<'a> {
    /// The grown network.
    pub network: &'a Network,
    /// Its forest view.
    pub topology: &'a Topology,
    /// Whether segment `k` conducts.
    pub conducts: &'a [bool],
}

impl GrownVeins<'_> {
    /// Whether `node`'s downstream segment conducts (false for a root).
    fn conducts_below(&self, node: usize) -> bool {
        let segment = self.topology.segment_of[node];
        segment != NO_PARENT && self.conducts.get(segment as usize).copied().unwrap_or(true)
    }

    fn point(&self, node: usize) -> (f64, f64) {
        (self.network.nodes[node].x, self.network.nodes[node].y)
    }

    fn distance(&self, a: usize, b: usize) -> f64 {
        let (p, q) = (self.point(a), self.point(b));
        crate::fast_libm::hypot(p.0 - q.0, p.1 - q.1)
    }
}

/// Where a loop pass stands after a call.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct LoopProgress {
    /// The level being closed, 0 the coarsest (the last, `levels - 1`, once done).
    pub level: u32,
    /// How many levels the pass closes (`loop_levels + 1`).
    pub levels: u32,
    /// Free ends of this level settled so far (joined, or given up for this level).
    pub ends_done: usize,
    /// Free ends this level started with.
    pub ends: usize,
    /// Loops closed so far (new segments), all levels.
    pub loops: usize,
    /// Work so far, in the units `LoopClosing::advance` counts.
    pub work: u64,
    /// Whether the pass has ended.
    pub done: bool,
}

/// The work for a caller's next `advance`, from the last call's `work` and the milliseconds it
/// took: halved when the call took more than an eighth of `budget_ms`, doubled when it took
/// less than a thirty-second, between 64 and 2^22 units, so a caller looking at its clock
/// between calls ends within about an eighth of its budget past it (plus at most one piece)
/// and looks at its clock a few dozen times a budget (common practice for bounded work
/// slices, no source).
pub fn next_part_size(work: usize, took_ms: f64, budget_ms: f64) -> usize {
    if took_ms > budget_ms / 8.0 {
        (work / 2).max(64)
    } else if took_ms < budget_ms / 32.0 {
        (work * 2).min(1 << 22)
    } else {
        work.max(64)
    }
}

/// Grid items (vein nodes or segments) one piece of the set-up puts in: about a
/// millisecond's work in the browser.
const GRID_ITEMS_PER_PIECE: usize = 4096;

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

/// With `nest`, the faces of a round: their figures, per pending tip its face among them,
/// and per face how many pending tips hang in it.
type RoundFaces = (Vec<FaceFigures>, Vec<Option<u32>>, Vec<u32>);

/// The next piece of work.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Stage {
    /// Put the vein nodes and segments into the grids, from this item on.
    Grids(usize),
    /// Find the free ends of `level`.
    Level,
    /// Trace the faces the pending free ends hang in (with `nest`) and start a round.
    Round,
    /// Examine the pending free end at this index.
    Tips(usize),
    /// Check the offer at this index (with `nest`, after every pending end has offered).
    Offers(usize),
    Done,
}

/// The loop pass in progress (see `close_loops` for the rule): the levels, the free ends still
/// to examine, the rounds and offers of `nest`, the search grids, the A* search and the
/// rotation system, kept between calls.
pub struct LoopClosing {
    rule: LoopRule,
    out: Reconnection,
    stage: Stage,
    /// The level being closed.
    level: u32,
    /// How far a tip's candidates reach up its veins at this level.
    reach: f64,
    /// The first level whose network holds each node (`levels + 1` for none).
    level_of: Vec<u32>,
    /// Longest new segment.
    gap: f64,
    /// Vein nodes, by position.
    nodes_grid: Grid,
    /// The vein nodes in node order, until they are in `nodes_grid`.
    vein_nodes: Vec<u32>,
    /// The conducting tree segments, then the new ones.
    segments: Vec<(u32, u32)>,
    tree_count: usize,
    /// Each segment in every cell its bounding box covers.
    segment_grid: Grid,
    /// With `nest`: every node's position, and the neighbours of each in angular order.
    positions: Vec<(f64, f64)>,
    rotation: Option<RotationSystem>,
    /// Per node: the index of its downstream segment in `segments` (for `nest`).
    tree_segment_of: Vec<u32>,
    /// With `arches`: paths along the tree.
    tree_paths: Option<TreePaths>,
    linked: Vec<Vec<u32>>,
    in_loop: Vec<bool>,
    search: PathSearch,
    candidates: Vec<Candidate>,
    /// With `nest`, per tip: the candidates that failed when it last offered a join within
    /// this level. Within a level segments and ways round are only ever added, so a join that
    /// crossed a segment still crosses it, and a way round shorter than the bound stays so;
    /// such candidates fail again without being checked.
    failed: Vec<Vec<CandidateKey>>,
    failed_before: Vec<CandidateKey>,
    stack: Vec<(u32, f64)>,
    /// The free ends this level started with.
    ends: usize,
    /// The free ends of this round.
    pending: Vec<u32>,
    faces: Option<RoundFaces>,
    offers: Vec<Offer>,
    /// Per offer, whether its face takes it.
    taken: Vec<bool>,
    /// The free ends whose offers were not taken: the next round's.
    deferred: Vec<u32>,
    /// Work so far other than the searches' (`PathSearch::visits`): one per piece, one per
    /// node a candidate walk takes or looks at, one per eight nodes a level's set-up scans.
    work: u64,
}

impl LoopClosing {
    /// Sets up the pass on `veins` (levels, rotation system, tree paths; the grids are filled
    /// by the first calls of `advance`); nothing is closed yet.
    pub fn new(veins: GrownVeins, rule: &LoopRule) -> LoopClosing {
        let (network, topology) = (veins.network, veins.topology);
        let count = network.nodes.len();
        let mut closing = LoopClosing {
            rule: *rule,
            out: Reconnection {
                wall_flow: vec![0.0; count],
                ..Reconnection::default()
            },
            stage: Stage::Done,
            level: rule.levels,
            reach: 0.0,
            level_of: Vec::new(),
            gap: 0.0,
            nodes_grid: Grid::of_points(std::iter::empty(), 1.0),
            vein_nodes: Vec::new(),
            segments: Vec::new(),
            tree_count: 0,
            segment_grid: Grid::of_points(std::iter::empty(), 1.0),
            positions: Vec::new(),
            rotation: None,
            tree_segment_of: Vec::new(),
            tree_paths: None,
            linked: Vec::new(),
            in_loop: Vec::new(),
            search: PathSearch::new(0),
            candidates: Vec::new(),
            failed: Vec::new(),
            failed_before: Vec::new(),
            stack: Vec::new(),
            ends: 0,
            pending: Vec::new(),
            faces: None,
            offers: Vec::new(),
            taken: Vec::new(),
            deferred: Vec::new(),
            work: 0,
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
            return closing;
        }
        // Vein nodes: roots and both ends of conducting segments.
        let mut vein = vec![false; count];
        for node in 0..count {
            if topology.parent[node] == NO_PARENT {
                vein[node] = true;
            } else if veins.conducts_below(node) {
                vein[node] = true;
                vein[topology.parent[node] as usize] = true;
            }
        }
        let levels = rule.levels;
        closing.level_of = (0..count)
            .map(|node| {
                if !vein[node] {
                    return levels + 1;
                }
                let drained = topology.flow[node] / rule.runoff;
                let mut level = levels;
                while level > 0 && drained >= closing.threshold(level - 1) {
                    level -= 1;
                }
                level
            })
            .collect();
        let gap = 1.5 * rule.cell_size.max(rule.finest_area.sqrt());
        closing.gap = gap;
        // The grids are filled by the first pieces of work (`Stage::Grids`).
        closing.vein_nodes = (0..count).filter(|&n| vein[n]).map(|n| n as u32).collect();
        closing.nodes_grid = Grid::of_points(std::iter::empty(), gap);
        closing.segment_grid = Grid::of_points(std::iter::empty(), gap);
        closing.segments = (0..count)
            .filter(|&n| veins.conducts_below(n))
            .map(|n| (n as u32, topology.parent[n]))
            .collect();
        closing.tree_count = closing.segments.len();
        if rule.nest {
            closing.positions = network.nodes.iter().map(|node| (node.x, node.y)).collect();
            closing.rotation = Some(RotationSystem::new(&closing.positions, &closing.segments));
            closing.tree_segment_of = vec![u32::MAX; count];
            for (index, &(from, _)) in closing.segments.iter().enumerate() {
                closing.tree_segment_of[from as usize] = index as u32;
            }
        }
        closing.tree_paths = rule
            .arches
            .then(|| TreePaths::new(topology, |a, b| veins.distance(a, b)));
        closing.linked = vec![Vec::new(); count];
        closing.in_loop = vec![false; count];
        closing.search = PathSearch::new(count);
        closing.failed = vec![Vec::new(); if rule.nest { count } else { 0 }];
        closing.level = 0;
        closing.stage = Stage::Grids(0);
        closing
    }

    /// Puts up to `GRID_ITEMS_PER_PIECE` items into the grids, from item `next` on: the vein
    /// nodes in node order, then the segments in order, each segment in every cell its
    /// bounding box covers (a segment that meets a new one shares a cell with the new one's
    /// bounding box); then the first level starts.
    fn fill_grids(&mut self, veins: GrownVeins, next: usize) {
        let nodes = self.vein_nodes.len();
        let end = (next + GRID_ITEMS_PER_PIECE).min(nodes + self.segments.len());
        for item in next..end {
            match item.checked_sub(nodes) {
                None => {
                    let node = self.vein_nodes[item];
                    self.nodes_grid.insert(node, veins.point(node as usize));
                }
                Some(index) => {
                    let (a, b) = self.segments[index];
                    self.segment_grid.insert_box(
                        index as u32,
                        veins.point(a as usize),
                        veins.point(b as usize),
                    );
                }
            }
        }
        self.work += (end - next) as u64;
        self.stage = if end == nodes + self.segments.len() {
            self.vein_nodes = Vec::new();
            Stage::Level
        } else {
            Stage::Grids(end)
        };
    }

    /// The conducting threshold of `level`: `finest_area * 4^(levels - level)`.
    fn threshold(&self, level: u32) -> f64 {
        self.rule.finest_area * libm::pow(4.0, f64::from(self.rule.levels - level))
    }

    /// Whether the pass has ended.
    pub fn done(&self) -> bool {
        self.stage == Stage::Done
    }

    /// Works on `veins` (the same as given to `new`) piece by piece until at least `work`
    /// units of work are done or the pass ends: a piece is one free end examined, one offer
    /// checked, or the set-up of a level or a round, and it counts one unit plus one per node
    /// its walks and searches visit (a level's set-up: one per eight nodes scanned), so that
    /// units take about the same time whatever the level (a free end of a coarse level walks
    /// and searches a thousand times farther than one of the finest). A piece is never split:
    /// a call ends at most one piece past `work`. Returns where the pass stands.
    pub fn advance(&mut self, veins: GrownVeins, work: usize) -> LoopProgress {
        let until = self.work_done().saturating_add(work.max(1) as u64);
        while self.work_done() < until {
            self.work += 1;
            match self.stage {
                Stage::Done => break,
                Stage::Grids(next) => self.fill_grids(veins, next),
                Stage::Level => self.start_level(veins),
                Stage::Round => self.start_round(veins),
                Stage::Tips(index) => match self.pending.get(index) {
                    Some(&tip) => {
                        self.examine(veins, index, tip);
                        self.stage = Stage::Tips(index + 1);
                    }
                    None => self.stage = Stage::Offers(0),
                },
                Stage::Offers(index) => self.check_offer(veins, index),
            }
        }
        self.progress()
    }

    /// Work so far, in the units `advance` counts.
    fn work_done(&self) -> u64 {
        self.work + self.search.visits
    }

    /// Where the pass stands.
    pub fn progress(&self) -> LoopProgress {
        let open = match self.stage {
            Stage::Grids(_) | Stage::Level | Stage::Done => 0,
            Stage::Round => self.pending.len(),
            Stage::Tips(index) => self.pending.len().saturating_sub(index) + self.offers.len(),
            Stage::Offers(index) => self.offers.len().saturating_sub(index) + self.deferred.len(),
        };
        let ends = if matches!(self.stage, Stage::Level | Stage::Grids(_)) {
            0
        } else {
            self.ends
        };
        LoopProgress {
            level: self.level,
            levels: self.rule.levels + 1,
            ends_done: ends - open.min(ends),
            ends,
            loops: self.out.links.len(),
            work: self.work_done(),
            done: self.done(),
        }
    }

    /// The new segments closed so far, in the order they closed (each joins a free end `from`
    /// to a vein node `to`); a caller may draw them as they form.
    pub fn links(&self) -> &[Segment] {
        &self.out.links
    }

    /// The loops closed: the pass run to its end on `veins` first.
    pub fn finish(mut self, veins: GrownVeins) -> Reconnection {
        while !self.done() {
            self.advance(veins, usize::MAX);
        }
        self.out
    }

    /// Finds the free-ending tips of this level's network: active, not a root, no active vein
    /// child, not on a loop wall; larger veins first, ties by node index.
    fn start_level(&mut self, veins: GrownVeins) {
        let topology = veins.topology;
        let count = self.level_of.len();
        let level = self.level;
        if level > self.rule.levels {
            self.level = self.rule.levels;
            self.stage = Stage::Done;
            return;
        }
        self.reach = 2.0 * self.threshold(level).sqrt();
        self.work += count as u64 / 8;
        let level_of = &self.level_of;
        let mut has_child = vec![false; count];
        for (node, &first_level) in level_of.iter().enumerate() {
            let parent = topology.parent[node];
            if parent != NO_PARENT && veins.conducts_below(node) && first_level <= level {
                has_child[parent as usize] = true;
            }
        }
        let mut tips: Vec<u32> = (0..count)
            .filter(|&n| {
                level_of[n] <= level
                    && topology.parent[n] != NO_PARENT
                    && !has_child[n]
                    && !self.in_loop[n]
                    && self.linked[n].is_empty()
            })
            .map(|n| n as u32)
            .collect();
        tips.sort_by(|&a, &b| {
            topology.flow[b as usize]
                .total_cmp(&topology.flow[a as usize])
                .then(a.cmp(&b))
        });
        for list in &mut self.failed {
            list.clear();
        }
        self.ends = tips.len();
        self.pending = tips;
        self.stage = Stage::Round;
    }

    /// With `nest`, traces the faces of the looped network so far that the pending tips hang
    /// in (the face on both sides of a tip's downstream segment), and per pending tip its face
    /// among them; then starts examining the pending tips.
    fn start_round(&mut self, veins: GrownVeins) {
        let topology = veins.topology;
        let LoopClosing {
            rotation,
            segments,
            tree_count,
            out,
            pending,
            tree_segment_of,
            positions,
            faces,
            ..
        } = &mut *self;
        *faces = rotation.as_mut().map(|rotation| {
            // The flow each segment is drawn with: tree segments their tree flow raised to
            // their wall flow, new segments their own.
            let flow = |index: usize| match index.checked_sub(*tree_count) {
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
            let (figures, face_of) = rotation.faces_along(positions, segments, flow, downstream);
            // Pending tips per face: a face with one alone takes its offer, whatever its
            // score.
            let mut tips_in = vec![0u32; figures.len()];
            for &face in face_of.iter().flatten() {
                tips_in[face as usize] += 1;
            }
            (figures, face_of, tips_in)
        });
        self.work += self.pending.len() as u64;
        self.offers.clear();
        self.stage = Stage::Tips(0);
    }

    /// Examines the pending tip at `pending_index`: joins it at once, offers its join to the
    /// closed face it hangs in (`nest`), or leaves it when no join passes.
    fn examine(&mut self, veins: GrownVeins, pending_index: usize, tip: u32) {
        let topology = veins.topology;
        let t = tip as usize;
        if self.in_loop[t] || !self.linked[t].is_empty() {
            return;
        }
        // The bounded face the tip hangs in; `None` for the outside, where any number of
        // walls may close in a round.
        let face = self.faces.as_ref().and_then(|(figures, face_of, _)| {
            let face = face_of[pending_index]? as usize;
            (figures[face].signed_area > 0.0).then_some(face)
        });
        // Half the boundary of the closed face the tip hangs in (`nest`), the most a way
        // round scores; 0 when the tip is the face's only one, whose offer is taken whatever
        // it scores, so that no search goes beyond the join's bound.
        let half = match (face, self.faces.as_ref()) {
            (Some(face), Some((figures, _, tips_in))) if tips_in[face] > 1 => {
                figures[face].perimeter / 2.0
            }
            _ => 0.0,
        };
        let mut candidates = std::mem::take(&mut self.candidates);
        self.find_candidates(veins, tip, &mut candidates);
        let mut failed_before = std::mem::take(&mut self.failed_before);
        if self.rule.nest {
            failed_before.clear();
            failed_before.append(&mut self.failed[t]);
        }
        let mut chosen = None;
        // The way round from t to the chosen join's anchor when shorter than `half`.
        let mut way_round_found = None;
        // With `arches`, joins that cannot close a loop long enough are passed over without
        // counting as tries (the margin keeps rounding on the safe side).
        let tree_paths = self.tree_paths.take();
        let ratio = self.rule.ratio;
        let could_pass = |candidate: &&Candidate| {
            tree_paths.as_ref().is_none_or(|paths| {
                paths.between(topology, t, candidate.anchor as usize)
                    >= ratio * candidate.wall * (1.0 - 1e-9)
            })
        };
        for candidate in candidates.iter().filter(could_pass).take(TRIES_PER_TIP) {
            let (u, v) = (candidate.u as usize, candidate.v as usize);
            let key = candidate.key();
            if failed_before.contains(&key) {
                self.failed[t].push(key);
                continue;
            }
            if !self.crosses(veins, u, v) {
                // One search up to the larger of the bound and half the face's boundary: A*
                // pops every node estimated below the smaller bound in the same order and
                // with the same distances as a search up to it, so a way round below the
                // bound is found as that search finds it, and past it the search goes on to
                // the score's bound.
                let bound = ratio * candidate.wall;
                let found = self.way_round(veins, t, candidate.anchor as usize, bound.max(half));
                if found.is_none_or(|length| length >= bound) {
                    chosen = Some(*candidate);
                    way_round_found = found.filter(|&length| length < half);
                    break;
                }
            }
            if self.rule.nest {
                self.failed[t].push(key);
            }
        }
        self.tree_paths = tree_paths;
        self.candidates = candidates;
        self.failed_before = failed_before;
        let Some(join) = chosen else {
            return;
        };
        if let (Some(face), Some((figures, _, _))) = (face, self.faces.as_ref()) {
            // Inside a closed face: the way round (up to half the face's boundary) says how
            // evenly this wall would halve it; the face takes its best offer after every tip
            // of the round has made one.
            let way_round = way_round_found.unwrap_or(half);
            self.offers.push(Offer {
                face,
                tip,
                join,
                score: way_round,
                links_before: self.out.links.len(),
                flow: topology.flow[t].min(FINER_WALL_SHARE * figures[face].thinnest),
            });
            return;
        }
        self.join_tip(veins, t, join, topology.flow[t]);
    }

    /// A tip's candidates, shortest wall first: veins `u` upstream of it within reach, and
    /// vein nodes `v` across a gap.
    fn find_candidates(&mut self, veins: GrownVeins, tip: u32, candidates: &mut Vec<Candidate>) {
        let topology = veins.topology;
        let t = tip as usize;
        let level = self.level;
        candidates.clear();
        self.stack.clear();
        self.stack.push((tip, 0.0));
        while let Some((u, along)) = self.stack.pop() {
            let u_index = u as usize;
            self.work += 1;
            for v in self.nodes_grid.near(veins.point(u_index)) {
                self.work += 1;
                let v_index = v as usize;
                if v == u
                    || topology.parent[u_index] == v
                    || topology.parent[v_index] == u
                    || self.linked[u_index].contains(&v)
                {
                    continue;
                }
                let across = veins.distance(u_index, v_index);
                if across > self.gap {
                    continue;
                }
                // Down from v to this level's network; reaching t means v lies upstream of t
                // (the same branch).
                let (mut anchor, mut down) = (v_index, 0.0);
                let mut ok = true;
                while self.level_of[anchor] > level {
                    let parent = topology.parent[anchor];
                    if parent == NO_PARENT || down > self.reach {
                        ok = false;
                        break;
                    }
                    down += veins.distance(anchor, parent as usize);
                    self.work += 1;
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
                if !veins.conducts_below(c) {
                    continue;
                }
                let further = along + veins.distance(u_index, c);
                if further <= self.reach {
                    self.stack.push((child, further));
                }
            }
        }
        candidates.sort_by(|a, b| {
            a.wall
                .total_cmp(&b.wall)
                .then(a.u.cmp(&b.u))
                .then(a.v.cmp(&b.v))
        });
    }

    /// Checks the offer at `index` once every pending tip has offered: each closed face takes
    /// its offer of the longest way round (ties: the larger vein, as ordered); the other tips
    /// of those faces try again next round.
    fn check_offer(&mut self, veins: GrownVeins, index: usize) {
        if index == 0 {
            if self.offers.is_empty() {
                self.next_level(veins);
                return;
            }
            let mut best: std::collections::BTreeMap<usize, usize> = Default::default();
            for (index, offer) in self.offers.iter().enumerate() {
                let entry = best.entry(offer.face).or_insert(index);
                if offer.score > self.offers[*entry].score {
                    *entry = index;
                }
            }
            self.taken = vec![false; self.offers.len()];
            for &index in best.values() {
                self.taken[index] = true;
            }
            self.deferred.clear();
        }
        let Some(&offer) = self.offers.get(index) else {
            if self.deferred.is_empty() {
                self.next_level(veins);
            } else {
                self.pending = std::mem::take(&mut self.deferred);
                self.stage = Stage::Round;
            }
            return;
        };
        let join = offer.join;
        // Joins made since the offer (in other faces) may block it: checked again when any
        // was made.
        if self.taken[index]
            && (self.out.links.len() == offer.links_before
                || !self.crosses(veins, join.u as usize, join.v as usize)
                    && self
                        .way_round(
                            veins,
                            offer.tip as usize,
                            join.anchor as usize,
                            self.rule.ratio * join.wall,
                        )
                        .is_none())
        {
            self.join_tip(veins, offer.tip as usize, join, offer.flow);
        } else {
            self.deferred.push(offer.tip);
        }
        self.stage = Stage::Offers(index + 1);
    }

    /// Ends this level and finds the next level's free ends (or ends the pass).
    fn next_level(&mut self, veins: GrownVeins) {
        self.offers.clear();
        self.pending.clear();
        self.deferred.clear();
        self.level += 1;
        self.start_level(veins);
    }

    /// Whether a new segment u v would cross, touch or run over a vein or a new segment.
    fn crosses(&self, veins: GrownVeins, u: usize, v: usize) -> bool {
        let new = (veins.point(u), veins.point(v));
        self.segment_grid.in_box(new.0, new.1).iter().any(|&index| {
            let (a, b) = self.segments[index as usize];
            segments_conflict(
                new,
                (veins.point(a as usize), veins.point(b as usize)),
                (u as u32, v as u32),
                (a, b),
            )
        })
    }

    /// The way round from `from` to `to` through this level's network and the new segments,
    /// when shorter than `bound`.
    fn way_round(&mut self, veins: GrownVeins, from: usize, to: usize, bound: f64) -> Option<f64> {
        let topology = veins.topology;
        let (level, level_of, linked) = (self.level, &self.level_of, &self.linked);
        self.search.shortest(
            from,
            to,
            bound,
            |node, visit| {
                let parent = topology.parent[node];
                if parent != NO_PARENT && veins.conducts_below(node) {
                    visit(parent as usize);
                }
                for &child in topology.children.of(node) {
                    let c = child as usize;
                    if veins.conducts_below(c) && level_of[c] <= level {
                        visit(c);
                    }
                }
                for &other in &linked[node] {
                    visit(other as usize);
                }
            },
            |a, b| veins.distance(a, b),
        )
    }

    /// Makes tip `t`'s join: the walls t .. u and v .. anchor, and the new segment u v.
    fn join_tip(&mut self, veins: GrownVeins, t: usize, join: Candidate, flow: f64) {
        let topology = veins.topology;
        let level = self.level;
        let (u, v, anchor) = (join.u as usize, join.v as usize, join.anchor as usize);
        for (start, end) in [(u, t), (v, anchor)] {
            let mut node = start;
            while node != end {
                // The wall's flow may change: the faces beside it are walked again.
                if let Some(rotation) = self.rotation.as_mut() {
                    rotation.forget_faces_beside(node as u32, topology.parent[node]);
                }
                self.level_of[node] = self.level_of[node].min(level);
                self.in_loop[node] = true;
                self.out.wall_flow[node] = self.out.wall_flow[node].max(flow);
                node = topology.parent[node] as usize;
            }
        }
        self.in_loop[t] = true;
        if let Some(rotation) = self.rotation.as_mut() {
            rotation.add(
                &self.positions,
                u as u32,
                v as u32,
                self.segments.len() as u32,
            );
        }
        self.linked[u].push(v as u32);
        self.linked[v].push(u as u32);
        self.segment_grid
            .insert_box(self.segments.len() as u32, veins.point(u), veins.point(v));
        self.segments.push((u as u32, v as u32));
        self.out.links.push(Segment {
            from: u as u32,
            to: v as u32,
        });
        self.out.link_flow.push(flow);
        self.out.link_level.push(level);
    }
}
