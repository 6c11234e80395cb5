//! Repair of a calibrated trace into a planar graph (`repair_lines`) and its orientation toward
//! roots (`orient`), with the `RepairReport` that lists every change (`Repair`).
//!
//! In order: points at exactly the same place are one node (not a repair: that is how a
//! drawing joins lines); line ends closer than the snap tolerance are merged at their mean;
//! a line end within the tolerance of another line is moved onto it and splits it there (a
//! T-junction); two pieces that cross split into a junction at their crossing; pieces of zero
//! length and pieces drawn twice are dropped. Every step except the first is reported with
//! coordinates.

use std::collections::HashMap;

use petgraph::unionfind::UnionFind;

use super::Point;
use crate::network::Segment;

/// One change made while turning a trace into a network, in output units. In JSON each is an
/// object with its `kind` (`merged_ends`, `joined_to_line`, `split_crossing`,
/// `dropped_zero_length`, `dropped_duplicate`, `disconnected_part`, `root`) and its fields,
/// points as `[x, y]`.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Repair {
    /// Line ends closer than the snap tolerance were merged into one node at their mean.
    MergedEnds {
        /// Where the node now lies.
        at: Point,
        /// How many distinct end positions were merged.
        ends: usize,
        /// The largest distance of a merged end from `at`.
        moved: f64,
    },
    /// A line end within the snap tolerance of another line was moved onto it, splitting that
    /// line into a junction.
    JoinedToLine {
        /// Where the junction lies.
        at: Point,
        /// How far the end moved.
        moved: f64,
        /// The line that was split, as named in the file.
        line: String,
    },
    /// Two pieces crossed; both were split at the crossing, which is now a junction.
    SplitCrossing {
        /// The crossing.
        at: Point,
    },
    /// A piece of zero length (both ends at one place, after merging) was dropped.
    DroppedZeroLength {
        /// Where it was.
        at: Point,
        /// The line it belonged to.
        line: String,
    },
    /// A piece drawn twice between the same two nodes was kept once.
    DroppedDuplicate {
        /// One end.
        from: Point,
        /// The other end.
        to: Point,
    },
    /// A part not connected to the rest; it is measured with its own root.
    DisconnectedPart {
        /// Its number, counted from 1 (part 1 holds the main root).
        part: usize,
        /// Its nodes.
        nodes: usize,
        /// Its segments.
        segments: usize,
        /// Its total length, in output units.
        length: f64,
        /// Its root.
        root: Point,
    },
    /// The root (petiole base) of a part, and how it was chosen.
    Root {
        /// The part, counted from 1.
        part: usize,
        /// Where the root lies.
        at: Point,
        /// How it was chosen: `given` (the node nearest `--root`) or `lowest end` (the line end
        /// nearest the drawing's bottom edge).
        rule: &'static str,
        /// Distance from the given point to the node taken, 0 for `lowest end`.
        distance: f64,
    },
}

/// Every repair made to one trace, with the tolerance used.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct RepairReport {
    /// Snap tolerance in output units.
    pub snap_tolerance: f64,
    /// The repairs, in the order made.
    pub repairs: Vec<Repair>,
}

impl RepairReport {
    /// How many repairs of each kind: merged ends, joined to a line, crossings split, zero
    /// length dropped, duplicates dropped, disconnected parts.
    pub fn counts(&self) -> [usize; 6] {
        let mut counts = [0; 6];
        for repair in &self.repairs {
            let slot = match repair {
                Repair::MergedEnds { .. } => 0,
                Repair::JoinedToLine { .. } => 1,
                Repair::SplitCrossing { .. } => 2,
                Repair::DroppedZeroLength { .. } => 3,
                Repair::DroppedDuplicate { .. } => 4,
                Repair::DisconnectedPart { .. } => 5,
                Repair::Root { .. } => continue,
            };
            counts[slot] += 1;
        }
        counts
    }
}

impl std::fmt::Display for Repair {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        let point = |(x, y): Point| format!("({x:.4}, {y:.4})");
        match self {
            Repair::MergedEnds { at, ends, moved } => write!(
                f,
                "merged {ends} line ends into one node at {}, moving each at most {moved:.4}",
                point(*at)
            ),
            Repair::JoinedToLine { at, moved, line } => write!(
                f,
                "joined a line end to {line} at {}, moving it {moved:.4}",
                point(*at)
            ),
            Repair::SplitCrossing { at } => {
                write!(
                    f,
                    "split two crossing pieces into a junction at {}",
                    point(*at)
                )
            }
            Repair::DroppedZeroLength { at, line } => {
                write!(f, "dropped a zero-length piece of {line} at {}", point(*at))
            }
            Repair::DroppedDuplicate { from, to } => write!(
                f,
                "dropped a piece drawn twice from {} to {}",
                point(*from),
                point(*to)
            ),
            Repair::DisconnectedPart {
                part,
                nodes,
                segments,
                length,
                root,
            } => write!(
                f,
                "part {part} is not connected to part 1: {nodes} nodes, {segments} segments, \
                 length {length:.4}, measured with its own root at {}",
                point(*root)
            ),
            Repair::Root {
                part,
                at,
                rule,
                distance,
            } => match *rule {
                "given" => write!(
                    f,
                    "root of part {part} at {}, the node nearest the given root ({distance:.4} \
                     away)",
                    point(*at)
                ),
                _ => write!(
                    f,
                    "root of part {part} at {}: no root given, so the line end nearest the \
                     drawing's bottom edge",
                    point(*at)
                ),
            },
        }
    }
}

/// A repaired, undirected planar graph: node positions and segments between them.
pub(crate) struct RepairedGraph {
    pub(crate) nodes: Vec<Point>,
    pub(crate) edges: Vec<(u32, u32)>,
}

fn distance(a: Point, b: Point) -> f64 {
    ((a.0 - b.0) * (a.0 - b.0) + (a.1 - b.1) * (a.1 - b.1)).sqrt()
}

/// Grid cell of a point for cells of side `size`.
fn cell_of(point: Point, size: f64) -> (i64, i64) {
    (
        (point.0 / size).floor() as i64,
        (point.1 / size).floor() as i64,
    )
}

/// Nearest point of segment `a`-`b` to `p`, as the parameter along it in [0, 1].
fn project(p: Point, a: Point, b: Point) -> f64 {
    let (dx, dy) = (b.0 - a.0, b.1 - a.1);
    let squared = dx * dx + dy * dy;
    if squared == 0.0 {
        return 0.0;
    }
    (((p.0 - a.0) * dx + (p.1 - a.1) * dy) / squared).clamp(0.0, 1.0)
}

fn along(a: Point, b: Point, t: f64) -> Point {
    (a.0 + (b.0 - a.0) * t, a.1 + (b.1 - a.1) * t)
}

/// Parameters (t on `a`-`b`, u on `c`-`d`) where two segments cross, both strictly inside
/// (Goldman 1990, "Intersection of two lines in three-space", Graphics Gems, p. 304, in two
/// dimensions).
fn crossing(a: Point, b: Point, c: Point, d: Point) -> Option<(f64, f64)> {
    /// Crossings this close to an end (as a fraction of the piece) are ends meeting, not
    /// crossings.
    const END_MARGIN: f64 = 1e-9;
    let r = (b.0 - a.0, b.1 - a.1);
    let s = (d.0 - c.0, d.1 - c.1);
    let denominator = r.0 * s.1 - r.1 * s.0;
    if denominator == 0.0 {
        return None;
    }
    let q = (c.0 - a.0, c.1 - a.1);
    let t = (q.0 * s.1 - q.1 * s.0) / denominator;
    let u = (q.0 * r.1 - q.1 * r.0) / denominator;
    let inside = |v: f64| v > END_MARGIN && v < 1.0 - END_MARGIN;
    (inside(t) && inside(u)).then_some((t, u))
}

/// Crossings closer than this fraction of the drawing's extent are one node (rounding of
/// three pieces through one point; far below anything drawn).
const CROSSING_MERGE_FRACTION: f64 = 1e-9;

/// The grid key holding pieces too long to list cell by cell.
const HUGE: (i64, i64) = (i64::MIN, i64::MIN);

/// Pieces by grid cell: each piece (padded by `pad`) is listed in every cell of side `size`
/// its bounding box meets; a piece spanning more than a million cells goes under `HUGE`
/// instead, so a degenerate drawing cannot take quadratic memory.
fn segment_grid(spans: &[(Point, Point)], pad: f64, size: f64) -> HashMap<(i64, i64), Vec<u32>> {
    let mut grid: HashMap<(i64, i64), Vec<u32>> = HashMap::new();
    for (index, &(pa, pb)) in spans.iter().enumerate() {
        let low = cell_of((pa.0.min(pb.0) - pad, pa.1.min(pb.1) - pad), size);
        let high = cell_of((pa.0.max(pb.0) + pad, pa.1.max(pb.1) + pad), size);
        let cells = (high.0.saturating_sub(low.0).saturating_add(1))
            .saturating_mul(high.1.saturating_sub(low.1).saturating_add(1));
        if !(1..=1_000_000).contains(&cells) {
            grid.entry(HUGE).or_default().push(index as u32);
            continue;
        }
        for gx in low.0..=high.0 {
            for gy in low.1..=high.1 {
                grid.entry((gx, gy)).or_default().push(index as u32);
            }
        }
    }
    grid
}

/// Turns calibrated lines (each with the name of where it was drawn) into a planar graph,
/// reporting every change. `tolerance` is the snap tolerance in the lines' units (0: only
/// points at exactly the same place join).
pub(crate) fn repair_lines(
    lines: &[(Vec<Point>, String)],
    tolerance: f64,
    report: &mut RepairReport,
) -> RepairedGraph {
    // Vertices: every point of every line; pieces: consecutive points.
    let mut positions: Vec<Point> = Vec::new();
    let mut ends: Vec<u32> = Vec::new();
    let mut pieces: Vec<(u32, u32, u32)> = Vec::new();
    for (line_index, (points, _)) in lines.iter().enumerate() {
        let first = positions.len() as u32;
        for &(x, y) in points {
            // -0.0 and 0.0 are one place.
            positions.push((x + 0.0, y + 0.0));
        }
        let last = positions.len() as u32 - 1;
        ends.push(first);
        ends.push(last);
        for vertex in first..last {
            pieces.push((vertex, vertex + 1, line_index as u32));
        }
    }
    // Groups of points are union-find labels below `positions.len()`; crossing vertices get
    // labels from `positions.len()` up, each its own group.
    let mut sets: UnionFind<usize> = UnionFind::new(positions.len());
    // 1. Exactly coincident points are one node, silently.
    let mut seen: HashMap<(u64, u64), usize> = HashMap::new();
    for (index, &(x, y)) in positions.iter().enumerate() {
        let first = *seen.entry((x.to_bits(), y.to_bits())).or_insert(index);
        sets.union(first, index);
    }
    // 2. Ends within the tolerance merge at their mean.
    if tolerance > 0.0 {
        let mut grid: HashMap<(i64, i64), Vec<u32>> = HashMap::new();
        for &end in &ends {
            grid.entry(cell_of(positions[end as usize], tolerance))
                .or_default()
                .push(end);
        }
        for &end in &ends {
            let point = positions[end as usize];
            let (cx, cy) = cell_of(point, tolerance);
            for gx in cx.saturating_sub(1)..=cx.saturating_add(1) {
                for gy in cy.saturating_sub(1)..=cy.saturating_add(1) {
                    for &other in grid.get(&(gx, gy)).map_or(&[][..], |list| list.as_slice()) {
                        if distance(point, positions[other as usize]) <= tolerance {
                            sets.union(end as usize, other as usize);
                        }
                    }
                }
            }
        }
    }
    // Each group's position: the mean of its distinct member positions.
    let mut groups: HashMap<usize, Vec<Point>> = HashMap::new();
    for (index, &point) in positions.iter().enumerate() {
        let members = groups.entry(sets.find_mut(index)).or_default();
        if !members.contains(&point) {
            members.push(point);
        }
    }
    let mut place: HashMap<usize, Point> = HashMap::new();
    let mut merged: Vec<(usize, Point, usize, f64)> = Vec::new();
    for (&group, members) in &groups {
        let count = members.len() as f64;
        let mean = (
            members.iter().map(|point| point.0).sum::<f64>() / count,
            members.iter().map(|point| point.1).sum::<f64>() / count,
        );
        let mean = if members.len() == 1 { members[0] } else { mean };
        place.insert(group, mean);
        if members.len() > 1 {
            let moved = members
                .iter()
                .map(|&point| distance(point, mean))
                .fold(0.0, f64::max);
            merged.push((group, mean, members.len(), moved));
        }
    }
    // Reports in a fixed order (by position), whatever the hash order.
    merged.sort_by(|a, b| a.1.partial_cmp(&b.1).unwrap_or(std::cmp::Ordering::Equal));
    for (_, at, count, moved) in merged {
        report.repairs.push(Repair::MergedEnds {
            at,
            ends: count,
            moved,
        });
    }
    let mut next_vertex = positions.len();
    // Splits of each piece: (parameter, vertex).
    let mut splits: Vec<Vec<(f64, usize)>> = vec![Vec::new(); pieces.len()];
    // 3. Ends near another line join it (T-junctions).
    let extent = {
        let (mut low, mut high) = ((f64::MAX, f64::MAX), (f64::MIN, f64::MIN));
        for point in &positions {
            low = (low.0.min(point.0), low.1.min(point.1));
            high = (high.0.max(point.0), high.1.max(point.1));
        }
        (high.0 - low.0).max(high.1 - low.1).max(0.0)
    };
    let piece_grid_size = {
        let size = extent / (pieces.len().max(1) as f64).sqrt();
        size.max(tolerance)
            .max(extent * 1e-9)
            .max(f64::MIN_POSITIVE)
    };
    // With a tolerance of 0 only ends lying exactly on a line join it.
    {
        let spans: Vec<(Point, Point)> = pieces
            .iter()
            .map(|&(a, b, _)| {
                (
                    place[&sets.find_mut(a as usize)],
                    place[&sets.find_mut(b as usize)],
                )
            })
            .collect();
        let grid = segment_grid(&spans, tolerance, piece_grid_size);
        let huge: Vec<u32> = grid.get(&HUGE).cloned().unwrap_or_default();
        let mut done: std::collections::HashSet<usize> = std::collections::HashSet::new();
        for &end in &ends {
            let group = sets.find_mut(end as usize);
            if !done.insert(group) {
                continue;
            }
            let point = place[&group];
            let candidates = grid
                .get(&cell_of(point, piece_grid_size))
                .map_or(&[][..], |list| list.as_slice())
                .iter()
                .chain(huge.iter());
            let mut best: Option<(f64, usize, f64)> = None;
            for &piece in candidates {
                let (a, b, _) = pieces[piece as usize];
                let (ga, gb) = (sets.find_mut(a as usize), sets.find_mut(b as usize));
                if ga == group || gb == group {
                    continue;
                }
                let (pa, pb) = (place[&ga], place[&gb]);
                let t = project(point, pa, pb);
                let gap = distance(point, along(pa, pb, t));
                if gap <= tolerance && best.is_none_or(|(best_gap, _, _)| gap < best_gap) {
                    best = Some((gap, piece as usize, t));
                }
            }
            let Some((gap, piece, t)) = best else {
                continue;
            };
            let (a, b, line) = pieces[piece];
            let (ga, gb) = (sets.find_mut(a as usize), sets.find_mut(b as usize));
            let (pa, pb) = (place[&ga], place[&gb]);
            let target = along(pa, pb, t);
            let line_name = lines[line as usize].1.clone();
            // Onto a vertex of the line when one is within the tolerance: merge with it.
            let near_vertex = [(ga, pa), (gb, pb)]
                .into_iter()
                .filter(|(_, vertex)| distance(point, *vertex) <= tolerance)
                .min_by(|x, y| {
                    distance(point, x.1)
                        .partial_cmp(&distance(point, y.1))
                        .unwrap_or(std::cmp::Ordering::Equal)
                });
            if let Some((vertex_group, vertex_point)) = near_vertex {
                sets.union(group, vertex_group);
                let joined = sets.find_mut(group);
                place.insert(joined, vertex_point);
                report.repairs.push(Repair::JoinedToLine {
                    at: vertex_point,
                    moved: distance(point, vertex_point),
                    line: line_name,
                });
            } else {
                place.insert(group, target);
                splits[piece].push((t, group));
                report.repairs.push(Repair::JoinedToLine {
                    at: target,
                    moved: gap,
                    line: line_name,
                });
            }
        }
    }
    // Each piece as it now runs, through the junctions of step 3, and each line's whole chain.
    let mut piece_chains: Vec<(Vec<usize>, u32)> = Vec::with_capacity(pieces.len());
    let mut line_chains: Vec<Vec<usize>> = vec![Vec::new(); lines.len()];
    for (piece, &(a, b, line)) in pieces.iter().enumerate() {
        let mut chain: Vec<usize> = vec![sets.find_mut(a as usize)];
        let mut inner = std::mem::take(&mut splits[piece]);
        inner.sort_by(|x, y| x.0.total_cmp(&y.0));
        for (_, group) in inner {
            chain.push(sets.find_mut(group));
        }
        chain.push(sets.find_mut(b as usize));
        let whole = &mut line_chains[line as usize];
        for &group in &chain {
            if whole.last() != Some(&group) {
                whole.push(group);
            }
        }
        piece_chains.push((chain, line));
    }
    // Where each node lies along each line: (line, index in its chain).
    let mut on_lines: HashMap<usize, Vec<(u32, usize)>> = HashMap::new();
    for (line, chain) in line_chains.iter().enumerate() {
        for (index, &group) in chain.iter().enumerate() {
            on_lines
                .entry(group)
                .or_default()
                .push((line as u32, index));
        }
    }
    // A piece from a to b is drawn along another line when that line also passes a and b and
    // every node of it between them lies within the tolerance of the piece (a vein traced
    // twice, its ends snapped onto the first).
    let drawn_along = |from: usize, to: usize, line: u32| -> bool {
        if tolerance <= 0.0 {
            return false;
        }
        let (pf, pt) = (place[&from], place[&to]);
        let empty = Vec::new();
        let ends_on = on_lines.get(&to).unwrap_or(&empty);
        on_lines
            .get(&from)
            .unwrap_or(&empty)
            .iter()
            .any(|&(other, ia)| {
                other != line
                    && ends_on.iter().any(|&(other_b, ib)| {
                        let (low, high) = (ia.min(ib), ia.max(ib));
                        other_b == other
                            && high >= low + 2
                            && line_chains[other as usize][low + 1..high]
                                .iter()
                                .all(|group| {
                                    let point = place[group];
                                    distance(point, along(pf, pt, project(point, pf, pt)))
                                        <= tolerance
                                })
                    })
            })
    };
    // Pieces drawn twice between the same two nodes, or along another line, and pieces of
    // zero length, go now, so that no crossing is found twice.
    let mut runs: Vec<(usize, usize, u32)> = Vec::new();
    let mut run_seen: std::collections::HashSet<(usize, usize)> = std::collections::HashSet::new();
    for (chain, line) in &piece_chains {
        let line = *line;
        for pair in chain.windows(2) {
            let (from, to) = (pair[0], pair[1]);
            if from == to || place[&from] == place[&to] {
                report.repairs.push(Repair::DroppedZeroLength {
                    at: place[&from],
                    line: lines[line as usize].1.clone(),
                });
            } else if !run_seen.insert((from.min(to), from.max(to))) || drawn_along(from, to, line)
            {
                report.repairs.push(Repair::DroppedDuplicate {
                    from: place[&from],
                    to: place[&to],
                });
            } else {
                runs.push((from, to, line));
            }
        }
    }
    // 4. Crossing pieces split into a junction.
    let mut crossing_splits: Vec<Vec<(f64, usize)>> = vec![Vec::new(); runs.len()];
    {
        let spans: Vec<(Point, Point)> = runs
            .iter()
            .map(|&(from, to, _)| (place[&from], place[&to]))
            .collect();
        let grid = segment_grid(&spans, 0.0, piece_grid_size);
        let mut pairs: Vec<(u32, u32)> = Vec::new();
        let huge: Vec<u32> = grid.get(&HUGE).cloned().unwrap_or_default();
        for (key, list) in &grid {
            let others: &[u32] = if *key == HUGE { &[] } else { &huge };
            for (i, &first) in list.iter().enumerate() {
                for &second in list[i + 1..].iter().chain(others.iter()) {
                    if first != second {
                        pairs.push((first.min(second), first.max(second)));
                    }
                }
            }
        }
        for (i, &first) in huge.iter().enumerate() {
            for &second in &huge[i + 1..] {
                pairs.push((first.min(second), first.max(second)));
            }
        }
        pairs.sort_unstable();
        pairs.dedup();
        let mut crossings: Vec<(Point, u32, f64, u32, f64)> = Vec::new();
        for (first, second) in pairs {
            let (a, b, _) = runs[first as usize];
            let (c, d, _) = runs[second as usize];
            if a == c || a == d || b == c || b == d || a == b || c == d {
                continue;
            }
            let (pa, pb) = spans[first as usize];
            let (pc, pd) = spans[second as usize];
            if let Some((t, u)) = crossing(pa, pb, pc, pd) {
                crossings.push((along(pa, pb, t), first, t, second, u));
            }
        }
        // Crossings closer than a billionth of the drawing (three pieces through one point,
        // up to rounding) are one node.
        let near = (extent * CROSSING_MERGE_FRACTION).max(f64::MIN_POSITIVE);
        let mut crossing_at: HashMap<(i64, i64), Vec<usize>> = HashMap::new();
        for (at, first, t, second, u) in crossings {
            let (cx, cy) = cell_of(at, near);
            let mut found = None;
            'search: for gx in cx.saturating_sub(1)..=cx.saturating_add(1) {
                for gy in cy.saturating_sub(1)..=cy.saturating_add(1) {
                    for &group in crossing_at
                        .get(&(gx, gy))
                        .map_or(&[][..], |list| list.as_slice())
                    {
                        if distance(place[&group], at) <= near {
                            found = Some(group);
                            break 'search;
                        }
                    }
                }
            }
            let group = match found {
                Some(group) => group,
                None => {
                    let group = next_vertex;
                    next_vertex += 1;
                    crossing_at.entry((cx, cy)).or_default().push(group);
                    place.insert(group, at);
                    report.repairs.push(Repair::SplitCrossing { at });
                    group
                }
            };
            crossing_splits[first as usize].push((t, group));
            crossing_splits[second as usize].push((u, group));
        }
    }
    // 5. Segments along each run through its crossings; drop zero-length and repeated pieces.
    let mut node_of: HashMap<usize, u32> = HashMap::new();
    let mut nodes: Vec<Point> = Vec::new();
    let mut edges: Vec<(u32, u32)> = Vec::new();
    let mut edge_seen: HashMap<(u32, u32), ()> = HashMap::new();
    for (run, &(a, b, line)) in runs.iter().enumerate() {
        let mut chain: Vec<usize> = vec![a];
        let mut inner = std::mem::take(&mut crossing_splits[run]);
        inner.sort_by(|x, y| x.0.total_cmp(&y.0));
        chain.extend(inner.into_iter().map(|(_, group)| group));
        chain.push(b);
        // The same crossing met twice along one run (three pieces through one point).
        chain.dedup();
        for pair in chain.windows(2) {
            let (from, to) = (pair[0], pair[1]);
            let (pf, pt) = (place[&from], place[&to]);
            if from == to || pf == pt {
                report.repairs.push(Repair::DroppedZeroLength {
                    at: pf,
                    line: lines[line as usize].1.clone(),
                });
                continue;
            }
            let mut index = |group: usize| {
                *node_of.entry(group).or_insert_with(|| {
                    nodes.push(place[&group]);
                    nodes.len() as u32 - 1
                })
            };
            let (u, v) = (index(from), index(to));
            let key = (u.min(v), u.max(v));
            if edge_seen.insert(key, ()).is_some() {
                report
                    .repairs
                    .push(Repair::DroppedDuplicate { from: pf, to: pt });
                continue;
            }
            edges.push((u, v));
        }
    }
    RepairedGraph { nodes, edges }
}

/// A repaired graph with its segments directed toward roots, one root per connected part.
pub(crate) struct OrientedGraph {
    /// Segments, `from` upstream.
    pub(crate) segments: Vec<Segment>,
}

/// Directs every segment toward a root: the node nearest each of `given_roots` for the part
/// holding it (the first given root of a part wins), otherwise (and for every other part) the line end (degree 1) with the largest y, nearest the
/// drawing's bottom edge (any node when a part has no end). Segments of a spanning tree found
/// breadth first run from child to parent; each remaining segment (closing a loop) runs from
/// the end found later to the one found earlier. Parts and roots are reported.
pub(crate) fn orient(
    graph: &RepairedGraph,
    given_roots: &[Point],
    report: &mut RepairReport,
) -> OrientedGraph {
    let count = graph.nodes.len();
    let mut adjacency: Vec<Vec<(u32, u32)>> = vec![Vec::new(); count];
    for (index, &(u, v)) in graph.edges.iter().enumerate() {
        adjacency[u as usize].push((v, index as u32));
        adjacency[v as usize].push((u, index as u32));
    }
    let lowest_end = |members: &[u32]| -> u32 {
        let mut best: Option<u32> = None;
        let better = |a: u32, b: u32| {
            let (pa, pb) = (graph.nodes[a as usize], graph.nodes[b as usize]);
            pa.1 > pb.1 || (pa.1 == pb.1 && pa.0 < pb.0)
        };
        for &node in members {
            if adjacency[node as usize].len() == 1 && best.is_none_or(|b| better(node, b)) {
                best = Some(node);
            }
        }
        best.unwrap_or_else(|| {
            members
                .iter()
                .copied()
                .fold(members[0], |b, node| if better(node, b) { node } else { b })
        })
    };
    // Parts, found breadth first from the lowest index.
    let mut part_of = vec![u32::MAX; count];
    let mut parts: Vec<Vec<u32>> = Vec::new();
    for start in 0..count {
        if part_of[start] != u32::MAX {
            continue;
        }
        let part = parts.len() as u32;
        let mut members = vec![start as u32];
        part_of[start] = part;
        let mut head = 0;
        while head < members.len() {
            let node = members[head] as usize;
            head += 1;
            for &(next, _) in &adjacency[node] {
                if part_of[next as usize] == u32::MAX {
                    part_of[next as usize] = part;
                    members.push(next);
                }
            }
        }
        parts.push(members);
    }
    // Given roots: each takes the node nearest it, unless its part already has a given root.
    // The main part holds the first given root, else the lowest end of all.
    let mut roots: Vec<(u32, &'static str, f64)> = parts
        .iter()
        .map(|members| (lowest_end(members), "lowest end", 0.0))
        .collect();
    let mut main = None;
    for &point in given_roots {
        if count == 0 {
            break;
        }
        let nearest = (0..count as u32)
            .min_by(|&a, &b| {
                distance(graph.nodes[a as usize], point)
                    .partial_cmp(&distance(graph.nodes[b as usize], point))
                    .unwrap_or(std::cmp::Ordering::Equal)
            })
            .unwrap_or(0);
        let part = part_of[nearest as usize] as usize;
        if roots[part].1 != "given" {
            roots[part] = (
                nearest,
                "given",
                distance(graph.nodes[nearest as usize], point),
            );
            main.get_or_insert(part);
        }
    }
    let main = main.unwrap_or_else(|| {
        (0..parts.len())
            .max_by(|&a, &b| {
                let (pa, pb) = (
                    graph.nodes[roots[a].0 as usize],
                    graph.nodes[roots[b].0 as usize],
                );
                pa.1.partial_cmp(&pb.1)
                    .unwrap_or(std::cmp::Ordering::Equal)
                    .then(pb.0.partial_cmp(&pa.0).unwrap_or(std::cmp::Ordering::Equal))
                    .then(b.cmp(&a))
            })
            .unwrap_or(0)
    });
    let mut order: Vec<usize> = (0..parts.len()).collect();
    if !parts.is_empty() {
        order.retain(|&part| part != main);
        order.insert(0, main);
    }
    // Breadth first from each root: tree segments child to parent, the rest later to earlier.
    let mut rank = vec![u32::MAX; count];
    let mut segments: Vec<Option<Segment>> = vec![None; graph.edges.len()];
    let mut next_rank = 0u32;
    for (number, &part) in order.iter().enumerate() {
        let (root, rule, gap) = roots[part];
        let root_point = graph.nodes[root as usize];
        report.repairs.push(Repair::Root {
            part: number + 1,
            at: root_point,
            rule,
            distance: gap,
        });
        let mut queue = vec![root];
        rank[root as usize] = next_rank;
        next_rank += 1;
        let mut head = 0;
        let mut length = 0.0;
        let mut edge_count = 0;
        while head < queue.len() {
            let node = queue[head];
            head += 1;
            for &(next, edge) in &adjacency[node as usize] {
                if segments[edge as usize].is_some() {
                    continue;
                }
                edge_count += 1;
                length += distance(graph.nodes[node as usize], graph.nodes[next as usize]);
                if rank[next as usize] == u32::MAX {
                    rank[next as usize] = next_rank;
                    next_rank += 1;
                    queue.push(next);
                    segments[edge as usize] = Some(Segment {
                        from: next,
                        to: node,
                    });
                } else {
                    // Closes a loop: from the node found later to the one found earlier.
                    let (from, to) = if rank[next as usize] > rank[node as usize] {
                        (next, node)
                    } else {
                        (node, next)
                    };
                    segments[edge as usize] = Some(Segment { from, to });
                }
            }
        }
        if number > 0 {
            report.repairs.push(Repair::DisconnectedPart {
                part: number + 1,
                nodes: queue.len(),
                segments: edge_count,
                length,
                root: root_point,
            });
        }
    }
    OrientedGraph {
        segments: segments.into_iter().flatten().collect(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn lines(list: &[&[Point]]) -> Vec<(Vec<Point>, String)> {
        list.iter()
            .enumerate()
            .map(|(index, points)| (points.to_vec(), format!("line {index}")))
            .collect()
    }

    /// A plus sign drawn as two crossing lines becomes four segments meeting at the centre.
    #[test]
    fn crossing_lines_become_a_junction() {
        let mut report = RepairReport::default();
        let graph = repair_lines(
            &lines(&[&[(-1.0, 0.0), (1.0, 0.0)], &[(0.0, -1.0), (0.0, 1.0)]]),
            0.0,
            &mut report,
        );
        assert_eq!(graph.nodes.len(), 5);
        assert_eq!(graph.edges.len(), 4);
        assert_eq!(
            report.repairs,
            vec![Repair::SplitCrossing { at: (0.0, 0.0) }]
        );
    }

    /// A vein traced twice: the second line's ends lie within 0.2 of the first's ends and
    /// snap onto them; a third line joins the first at (5, 0). The retrace is dropped, leaving
    /// a tree of 4 nodes ((0, 0), (5, 0), (10, 0), (5, 5)) and 3 segments.
    #[test]
    fn a_line_traced_twice_is_dropped() {
        let drawing = lines(&[
            &[(0.0, 0.0), (10.0, 0.0)],
            &[(0.1, 0.05), (9.9, -0.05)],
            &[(5.0, 5.0), (5.0, 0.0)],
        ]);
        let mut report = RepairReport::default();
        let graph = repair_lines(&drawing, 0.2, &mut report);
        assert_eq!((graph.nodes.len(), graph.edges.len()), (4, 3));
        assert!(report
            .repairs
            .iter()
            .any(|repair| matches!(repair, Repair::DroppedDuplicate { .. })));
    }

    /// A line ending 0.05 short of another joins it within a tolerance of 0.1, not of 0.01.
    #[test]
    fn a_near_t_junction_joins_within_the_tolerance_only() {
        let drawing = lines(&[&[(0.0, 0.0), (2.0, 0.0)], &[(1.0, 1.0), (1.0, 0.05)]]);
        let mut report = RepairReport::default();
        let joined = repair_lines(&drawing, 0.1, &mut report);
        assert_eq!((joined.nodes.len(), joined.edges.len()), (4, 3));
        assert!(matches!(
            report.repairs[0],
            Repair::JoinedToLine { at: (1.0, 0.0), .. }
        ));
        let mut report = RepairReport::default();
        let apart = repair_lines(&drawing, 0.01, &mut report);
        assert_eq!((apart.nodes.len(), apart.edges.len()), (4, 2));
        assert!(report.repairs.is_empty());
    }
}
