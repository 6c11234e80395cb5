//! A one-pixel skeleton turned into a graph (`skeleton_graph`): end points, branch points
//! (touching branch pixels merged into one), the pixel chains between them as polylines,
//! spurs shorter than a set length pruned, and each chain simplified by Douglas-Peucker.

use std::collections::HashSet;

use super::thinning::neighbour_counts;

/// The 8-neighbourhood, 4-neighbours first (chains follow straight steps before diagonal).
const STEPS: [(i64, i64); 8] = [
    (1, 0),
    (0, 1),
    (-1, 0),
    (0, -1),
    (1, 1),
    (-1, 1),
    (-1, -1),
    (1, -1),
];

/// One chain of skeleton pixels between two graph nodes.
#[derive(Clone, Debug, PartialEq)]
pub struct Chain {
    /// Node at each end (index into `SkeletonGraph::nodes`).
    pub ends: (usize, usize),
    /// The pixels between the two nodes (row-major indices), in order.
    pub pixels: Vec<usize>,
    /// The polyline from the first node through the pixel centres to the second, in pixel
    /// units ((0, 0) the top-left corner of the image).
    pub points: Vec<(f64, f64)>,
    /// Length of `points`, in pixels.
    pub length: f64,
}

/// The graph of a skeleton.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct SkeletonGraph {
    /// Node positions (centroids of their pixels' centres), in pixel units.
    pub nodes: Vec<(f64, f64)>,
    /// The chains kept after pruning, simplified.
    pub chains: Vec<Chain>,
    /// End points (nodes of degree 1) before pruning.
    pub end_points_before_pruning: usize,
    /// Spurs pruned: chains from an end point to a branch point shorter than the spur length,
    /// plus isolated chains shorter than it.
    pub spurs_pruned: usize,
    /// Skeleton pixels with no neighbour, dropped.
    pub lone_pixels: usize,
}

/// Builds the graph of skeleton `on` (one pixel wide, 8-connected).
///
/// Nodes are end pixels (one neighbour) and branch pixels (three or more), touching branch
/// pixels forming one node at their centroid; a closed ring without either gets one node at
/// its first pixel. Chains run between nodes through pixels with two neighbours. One pruning
/// pass then removes every chain shorter than `spur_length` pixels that joins an end point to
/// a branch point, or two end points. Each kept chain is simplified by the Douglas-Peucker
/// algorithm (Douglas & Peucker 1973, Cartographica 10(2)) with `tolerance` pixels, its ends
/// kept.
pub fn skeleton_graph(
    on: &[bool],
    width: usize,
    height: usize,
    spur_length: f64,
    tolerance: f64,
) -> SkeletonGraph {
    let counts = neighbour_counts(on, width, height);
    let mut graph = SkeletonGraph {
        lone_pixels: (0..on.len()).filter(|&i| on[i] && counts[i] == 0).count(),
        ..SkeletonGraph::default()
    };
    let is_node_pixel = |i: usize| on[i] && (counts[i] == 1 || counts[i] >= 3);
    let neighbours_of = |index: usize| {
        let (x, y) = ((index % width) as i64, (index / width) as i64);
        STEPS.iter().filter_map(move |&(dx, dy)| {
            let (nx, ny) = (x + dx, y + dy);
            (nx >= 0 && ny >= 0 && (nx as usize) < width && (ny as usize) < height)
                .then(|| ny as usize * width + nx as usize)
                .filter(|&n| on[n])
        })
    };
    // Node of each node pixel: 8-connected clusters of node pixels.
    const NONE: u32 = u32::MAX;
    let mut node_of = vec![NONE; on.len()];
    let mut sums: Vec<(f64, f64, f64)> = Vec::new();
    let mut stack = Vec::new();
    for start in 0..on.len() {
        if !is_node_pixel(start) || node_of[start] != NONE {
            continue;
        }
        let id = sums.len() as u32;
        sums.push((0.0, 0.0, 0.0));
        node_of[start] = id;
        stack.push(start);
        while let Some(index) = stack.pop() {
            let sum = &mut sums[id as usize];
            sum.0 += (index % width) as f64 + 0.5;
            sum.1 += (index / width) as f64 + 0.5;
            sum.2 += 1.0;
            // Only branch pixels merge; an end pixel is a node alone.
            if counts[index] < 3 {
                continue;
            }
            for neighbour in neighbours_of(index) {
                if counts[neighbour] >= 3 && node_of[neighbour] == NONE {
                    node_of[neighbour] = id;
                    stack.push(neighbour);
                }
            }
        }
    }
    graph.nodes = sums.iter().map(|s| (s.0 / s.2, s.1 / s.2)).collect();
    let centre = |index: usize| ((index % width) as f64 + 0.5, (index / width) as f64 + 0.5);
    let mut visited = vec![false; on.len()];
    let mut raw: Vec<((usize, usize), Vec<usize>)> = Vec::new();
    let mut direct: HashSet<(u32, u32)> = HashSet::new();
    // Walks from node pixel `from` through chain pixel `first` to the next node.
    let walk = |from_node: u32,
                first: usize,
                visited: &mut Vec<bool>,
                node_of: &mut Vec<u32>,
                nodes: &mut Vec<(f64, f64)>|
     -> ((usize, usize), Vec<usize>) {
        let mut path = vec![first];
        visited[first] = true;
        let mut current = first;
        loop {
            // A node pixel next to the chain ends it (its own start node only after a
            // ring of at least three pixels).
            let end = neighbours_of(current)
                .find(|&n| node_of[n] != NONE && (node_of[n] != from_node || path.len() >= 3));
            if let Some(end) = end {
                return ((from_node as usize, node_of[end] as usize), path);
            }
            match neighbours_of(current).find(|&n| !visited[n] && node_of[n] == NONE) {
                Some(next) => {
                    visited[next] = true;
                    path.push(next);
                    current = next;
                }
                None => {
                    // A dead end without an end pixel (the chain ran into itself): the last
                    // pixel becomes an end node.
                    let id = nodes.len() as u32;
                    nodes.push(centre(current));
                    node_of[current] = id;
                    path.pop();
                    return ((from_node as usize, id as usize), path);
                }
            }
        }
    };
    for start in 0..on.len() {
        if node_of[start] == NONE || !on[start] {
            continue;
        }
        let from_node = node_of[start];
        let around: Vec<usize> = neighbours_of(start).collect();
        for neighbour in around {
            let other = node_of[neighbour];
            if other != NONE {
                if other != from_node {
                    let key = (from_node.min(other), from_node.max(other));
                    if direct.insert(key) {
                        raw.push(((key.0 as usize, key.1 as usize), Vec::new()));
                    }
                }
                continue;
            }
            if visited[neighbour] {
                continue;
            }
            let chain = walk(
                from_node,
                neighbour,
                &mut visited,
                &mut node_of,
                &mut graph.nodes,
            );
            raw.push(chain);
        }
    }
    // Rings with no end or branch pixel.
    for start in 0..on.len() {
        if !on[start] || visited[start] || node_of[start] != NONE || counts[start] == 0 {
            continue;
        }
        let id = graph.nodes.len() as u32;
        graph.nodes.push(centre(start));
        node_of[start] = id;
        visited[start] = true;
        if let Some(first) = neighbours_of(start).find(|&n| !visited[n]) {
            let chain = walk(id, first, &mut visited, &mut node_of, &mut graph.nodes);
            raw.push(chain);
        }
    }
    // Degrees before pruning.
    let mut degree = vec![0usize; graph.nodes.len()];
    for ((a, b), _) in &raw {
        degree[*a] += 1;
        degree[*b] += 1;
    }
    graph.end_points_before_pruning = degree.iter().filter(|&&d| d == 1).count();
    for ((a, b), pixels) in raw {
        let mut points = Vec::with_capacity(pixels.len() + 2);
        points.push(graph.nodes[a]);
        points.extend(pixels.iter().map(|&p| centre(p)));
        points.push(graph.nodes[b]);
        let length = polyline_length(&points);
        let (da, db) = (degree[a], degree[b]);
        let spur = (da == 1 && db >= 3) || (db == 1 && da >= 3) || (da == 1 && db == 1);
        if spur && length < spur_length {
            graph.spurs_pruned += 1;
            continue;
        }
        let points = douglas_peucker(&points, tolerance);
        graph.chains.push(Chain {
            ends: (a, b),
            pixels,
            points,
            length,
        });
    }
    graph
}

/// Length of a polyline.
pub fn polyline_length(points: &[(f64, f64)]) -> f64 {
    points
        .windows(2)
        .map(|pair| {
            let (dx, dy) = (pair[1].0 - pair[0].0, pair[1].1 - pair[0].1);
            (dx * dx + dy * dy).sqrt()
        })
        .sum()
}

/// Douglas-Peucker simplification (Douglas & Peucker 1973): keeps the ends, and recursively
/// the point farthest from the chord while it lies farther than `tolerance`.
pub fn douglas_peucker(points: &[(f64, f64)], tolerance: f64) -> Vec<(f64, f64)> {
    if points.len() <= 2 {
        return points.to_vec();
    }
    let mut keep = vec![false; points.len()];
    keep[0] = true;
    keep[points.len() - 1] = true;
    let mut stack = vec![(0usize, points.len() - 1)];
    while let Some((first, last)) = stack.pop() {
        if last <= first + 1 {
            continue;
        }
        let (a, b) = (points[first], points[last]);
        let (dx, dy) = (b.0 - a.0, b.1 - a.1);
        let chord = (dx * dx + dy * dy).sqrt();
        let mut farthest = (first, -1.0);
        for (index, &p) in points.iter().enumerate().take(last).skip(first + 1) {
            let distance = if chord > 0.0 {
                ((p.0 - a.0) * dy - (p.1 - a.1) * dx).abs() / chord
            } else {
                ((p.0 - a.0) * (p.0 - a.0) + (p.1 - a.1) * (p.1 - a.1)).sqrt()
            };
            if distance > farthest.1 {
                farthest = (index, distance);
            }
        }
        if farthest.1 > tolerance {
            keep[farthest.0] = true;
            stack.push((first, farthest.0));
            stack.push((farthest.0, last));
        }
    }
    points
        .iter()
        .zip(&keep)
        .filter(|(_, &kept)| kept)
        .map(|(&p, _)| p)
        .collect()
}
