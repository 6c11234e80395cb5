//! Areoles (`find_areoles`): the bounded faces of a network drawn in the plane, traced around
//! every node in angular order, with their areas by the shoelace formula and the free-ending
//! veinlets that end inside them.
//!
//! A plane graph's faces are found by walking its half-edges: arriving at node `v` from `u`,
//! leave along the neighbour of `v` that follows `u` in clockwise order around `v` (the
//! rotation system of the drawing; e.g. Mohar & Thomassen 2001, Graphs on Surfaces, section
//! 3.2). Each walk bounds one face. Every component has one walk around its outside, with a
//! signed area of the opposite sign to the bounded faces (0 for a tree); the others are the
//! bounded faces, E - V + C of them in all (Euler's formula for plane graphs). A free-ending
//! veinlet (a node of degree 1) is passed by exactly one walk: it lies inside that face.
//!
//! The walk only means something when the drawing is a plane graph. A looped network is first
//! checked: no segment of zero length, no two segments that cross or overlap (besides
//! meeting at a shared end), no two nodes at one position with segments; otherwise the areole
//! values are absent. Imported specimens are plane by construction: the importer splits every
//! crossing into a junction and merges coincident ends. A forest has no areole at all,
//! whatever its drawing, so it is never walked.
//!
//! A component drawn inside another's face (an island) counts in that face's area: areole
//! areas are the areas inside each loop of veins, islands included.

use std::collections::HashMap;

use crate::network::Network;

/// The areoles of one network.
#[derive(Clone, Debug, PartialEq)]
pub(crate) struct Areoles {
    /// Bounded faces; `None` when the network has loops but its drawing is not a plane graph.
    pub(crate) count: Option<u64>,
    /// Area of each bounded face, in units^2 (empty when `count` is `None` or 0).
    pub(crate) areas: Vec<f64>,
    /// Free-ending veinlets (nodes of degree 1) inside a bounded face.
    pub(crate) veinlets_inside: u64,
}

/// Finds the areoles of a network whose graph has `loop_count` independent loops
/// (`segments - nodes + components`). Segments naming a missing node are left out, as in the
/// loop count.
pub(crate) fn find_areoles(network: &Network, loop_count: u64) -> Areoles {
    if loop_count == 0 {
        return Areoles {
            count: Some(0),
            areas: Vec::new(),
            veinlets_inside: 0,
        };
    }
    let absent = Areoles {
        count: None,
        areas: Vec::new(),
        veinlets_inside: 0,
    };
    let node_count = network.nodes.len();
    let edges: Vec<(u32, u32)> = network
        .segments
        .iter()
        .filter(|s| (s.from as usize) < node_count && (s.to as usize) < node_count)
        .map(|s| (s.from, s.to))
        .collect();
    let points: Vec<(f64, f64)> = network.nodes.iter().map(|n| (n.x, n.y)).collect();
    if !is_plane_drawing(&points, &edges) {
        return absent;
    }
    let faces = trace_faces(&points, &edges);
    let mut areas = Vec::new();
    let mut veinlets_inside = 0;
    for face in &faces {
        if face.signed_area > 0.0 {
            areas.push(face.signed_area);
            veinlets_inside += face.veinlets;
        }
    }
    // Euler's formula for plane graphs: the bounded faces number E - V + C. A walk that
    // disagrees means the drawing was not plane after all (e.g. a node lying on a segment).
    if areas.len() as u64 != loop_count {
        return absent;
    }
    Areoles {
        count: Some(areas.len() as u64),
        areas,
        veinlets_inside,
    }
}

/// One traced face.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct Face {
    /// Shoelace area of the walk, positive for a bounded face (the face on the walk's left in
    /// a y-down drawing), negative or zero for a component's outside.
    pub(crate) signed_area: f64,
    /// Degree-1 nodes the walk turns around.
    pub(crate) veinlets: u64,
}

/// Traces every face of a plane drawing (`edges` between `points`).
pub(crate) fn trace_faces(points: &[(f64, f64)], edges: &[(u32, u32)]) -> Vec<Face> {
    trace_faces_with_sides(points, edges).0
}

/// Traces every face of a plane drawing and gives, per edge `(a, b)`, the face on each side:
/// the face of the walk along `a -> b` and the face of the walk along `b -> a` (indices into the
/// faces).
pub(crate) fn trace_faces_with_sides(
    points: &[(f64, f64)],
    edges: &[(u32, u32)],
) -> (Vec<Face>, Vec<(u32, u32)>) {
    let count = points.len();
    // Neighbours of each node in compressed rows, sorted by direction.
    let mut start = vec![0usize; count + 1];
    for &(a, b) in edges {
        start[a as usize + 1] += 1;
        start[b as usize + 1] += 1;
    }
    for index in 0..count {
        start[index + 1] += start[index];
    }
    let mut fill = start.clone();
    let mut around = vec![0u32; start[count]];
    for &(a, b) in edges {
        around[fill[a as usize]] = b;
        fill[a as usize] += 1;
        around[fill[b as usize]] = a;
        fill[b as usize] += 1;
    }
    let direction = |from: u32, to: u32| {
        let (a, b) = (points[from as usize], points[to as usize]);
        libm::atan2(b.1 - a.1, b.0 - a.0)
    };
    for node in 0..count {
        around[start[node]..start[node + 1]]
            .sort_by(|&p, &q| direction(node as u32, p).total_cmp(&direction(node as u32, q)));
    }
    walk_faces(points, &start, &around, edges)
}

/// Walks every face of a plane drawing given its rotation system: the neighbours of node `n`
/// are `around[start[n]..start[n + 1]]`, in angular order. Faces are numbered in the order
/// their first half-edge comes (node by node, each node's neighbours in order); per edge
/// `(a, b)` of `edges`, the face along `a -> b` and the face along `b -> a`.
pub(crate) fn walk_faces(
    points: &[(f64, f64)],
    start: &[usize],
    around: &[u32],
    edges: &[(u32, u32)],
) -> (Vec<Face>, Vec<(u32, u32)>) {
    let count = start.len().saturating_sub(1);
    // Half-edge k is (node, around[k]); visited per half-edge.
    let mut visited = vec![false; around.len()];
    let position_of = |node: u32, neighbour: u32| -> usize {
        let range = start[node as usize]..start[node as usize + 1];
        range
            .clone()
            .find(|&k| around[k] == neighbour)
            .unwrap_or(range.start)
    };
    let mut faces = Vec::new();
    let mut face_of = vec![u32::MAX; around.len()];
    for first in 0..count {
        for half_edge in start[first]..start[first + 1] {
            if visited[half_edge] {
                continue;
            }
            let mut twice_area = 0.0;
            let mut veinlets = 0;
            let (mut u, mut k) = (first as u32, half_edge);
            while !visited[k] {
                visited[k] = true;
                face_of[k] = faces.len() as u32;
                let v = around[k];
                let (a, b) = (points[u as usize], points[v as usize]);
                twice_area += a.0 * b.1 - b.0 * a.1;
                let (low, high) = (start[v as usize], start[v as usize + 1]);
                if high - low == 1 {
                    veinlets += 1;
                }
                // The neighbour of v just before u in angular order.
                let back = position_of(v, u);
                let next = if back == low { high - 1 } else { back - 1 };
                (u, k) = (v, next);
            }
            faces.push(Face {
                signed_area: twice_area / 2.0,
                veinlets,
            });
        }
    }
    let sides = edges
        .iter()
        .map(|&(a, b)| (face_of[position_of(a, b)], face_of[position_of(b, a)]))
        .collect();
    (faces, sides)
}

/// Whether straight segments between the points form a plane drawing: every segment has
/// positive length, and two segments meet only at a shared end node, never at a point inside
/// either, never along a stretch. Pairs are found through a uniform grid of cells about the
/// mean segment length (segments spanning over `MAX_CELLS_PER_SEGMENT` cells are checked
/// against all).
pub(crate) fn is_plane_drawing(points: &[(f64, f64)], edges: &[(u32, u32)]) -> bool {
    const MAX_CELLS_PER_SEGMENT: i64 = 64;
    let spans: Vec<((f64, f64), (f64, f64))> = edges
        .iter()
        .map(|&(a, b)| (points[a as usize], points[b as usize]))
        .collect();
    if spans
        .iter()
        .any(|&(a, b)| a == b || !finite(a) || !finite(b))
    {
        return false;
    }
    let total: f64 = spans.iter().map(|&(a, b)| length(a, b)).sum();
    let size = total / spans.len().max(1) as f64;
    if !(size > 0.0 && size.is_finite()) {
        return false;
    }
    let cell = |value: f64| libm::floor(value / size) as i64;
    let mut grid: HashMap<(i64, i64), Vec<u32>> = HashMap::new();
    let mut huge: Vec<u32> = Vec::new();
    for (index, &(a, b)) in spans.iter().enumerate() {
        let (x0, x1) = (cell(a.0.min(b.0)), cell(a.0.max(b.0)));
        let (y0, y1) = (cell(a.1.min(b.1)), cell(a.1.max(b.1)));
        if (x1 - x0 + 1) * (y1 - y0 + 1) > MAX_CELLS_PER_SEGMENT {
            huge.push(index as u32);
            continue;
        }
        for gx in x0..=x1 {
            for gy in y0..=y1 {
                grid.entry((gx, gy)).or_default().push(index as u32);
            }
        }
    }
    let conflict = |i: u32, j: u32| -> bool {
        if i == j {
            return false;
        }
        let (ei, ej) = (edges[i as usize], edges[j as usize]);
        segments_conflict(spans[i as usize], spans[j as usize], ei, ej)
    };
    for list in grid.values() {
        for (position, &i) in list.iter().enumerate() {
            for &j in &list[position + 1..] {
                if conflict(i, j) {
                    return false;
                }
            }
        }
    }
    for &i in &huge {
        for j in 0..spans.len() as u32 {
            if conflict(i, j) {
                return false;
            }
        }
    }
    true
}

fn finite(point: (f64, f64)) -> bool {
    point.0.is_finite() && point.1.is_finite()
}

fn length(a: (f64, f64), b: (f64, f64)) -> f64 {
    ((a.0 - b.0) * (a.0 - b.0) + (a.1 - b.1) * (a.1 - b.1)).sqrt()
}

/// Twice the signed area of the triangle a, b, c (the orientation test).
fn cross(a: (f64, f64), b: (f64, f64), c: (f64, f64)) -> f64 {
    (b.0 - a.0) * (c.1 - a.1) - (b.1 - a.1) * (c.0 - a.0)
}

/// Whether c, known to be on the line through a and b, lies within their bounding box.
fn within(a: (f64, f64), b: (f64, f64), c: (f64, f64)) -> bool {
    c.0 >= a.0.min(b.0) && c.0 <= a.0.max(b.0) && c.1 >= a.1.min(b.1) && c.1 <= a.1.max(b.1)
}

/// Whether two segments meet anywhere but at one shared end node: the classic orientation
/// test for segment intersection (Cormen et al. 2009, Introduction to Algorithms, 3rd ed.,
/// section 33.1), with shared ends allowed unless the two segments run along each other.
pub(crate) fn segments_conflict(
    (a, b): ((f64, f64), (f64, f64)),
    (c, d): ((f64, f64), (f64, f64)),
    (ea, eb): (u32, u32),
    (ec, ed): (u32, u32),
) -> bool {
    let shared = [ea, eb].iter().filter(|n| **n == ec || **n == ed).count();
    if shared == 2 {
        // Two segments between the same two nodes overlap along their whole length.
        return true;
    }
    if shared == 1 {
        // Meeting at the shared node is allowed; overlapping from it is not: the far end of
        // one on the other (same direction, collinear).
        let (common, far_one, far_other) = if ea == ec {
            (a, b, d)
        } else if ea == ed {
            (a, b, c)
        } else if eb == ec {
            (b, a, d)
        } else {
            (b, a, c)
        };
        let collinear = cross(common, far_one, far_other) == 0.0;
        let same_way = (far_one.0 - common.0) * (far_other.0 - common.0)
            + (far_one.1 - common.1) * (far_other.1 - common.1)
            > 0.0;
        return collinear && same_way;
    }
    // Distinct nodes at one position also break the drawing.
    if a == c || a == d || b == c || b == d {
        return true;
    }
    let d1 = cross(c, d, a);
    let d2 = cross(c, d, b);
    let d3 = cross(a, b, c);
    let d4 = cross(a, b, d);
    if ((d1 > 0.0 && d2 < 0.0) || (d1 < 0.0 && d2 > 0.0))
        && ((d3 > 0.0 && d4 < 0.0) || (d3 < 0.0 && d4 > 0.0))
    {
        return true;
    }
    (d1 == 0.0 && within(c, d, a))
        || (d2 == 0.0 && within(c, d, b))
        || (d3 == 0.0 && within(a, b, c))
        || (d4 == 0.0 && within(a, b, d))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::network::{Network, Node, Segment};

    fn network(points: &[(f64, f64)], edges: &[(u32, u32)]) -> Network {
        Network {
            nodes: points
                .iter()
                .map(|&(x, y)| Node { x, y, weight: 0.0 })
                .collect(),
            segments: edges
                .iter()
                .map(|&(from, to)| Segment { from, to })
                .collect(),
            area: 1.0,
            units: "mm".into(),
            ..Network::default()
        }
    }

    /// A unit square: one areole of area 1 (shoelace), and its outside.
    #[test]
    fn a_square_has_one_areole_of_its_area() {
        let square = network(
            &[(0.0, 0.0), (1.0, 0.0), (1.0, 1.0), (0.0, 1.0)],
            &[(0, 1), (1, 2), (2, 3), (3, 0)],
        );
        let areoles = find_areoles(&square, 1);
        assert_eq!(areoles.count, Some(1));
        assert_eq!(areoles.areas, vec![1.0]);
    }

    /// Two segments crossing without a junction: not a plane drawing.
    #[test]
    fn crossing_segments_are_not_plane() {
        let points = [(0.0, 0.0), (2.0, 2.0), (0.0, 2.0), (2.0, 0.0)];
        assert!(!is_plane_drawing(&points, &[(0, 1), (2, 3)]));
        assert!(is_plane_drawing(&points, &[(0, 2), (1, 3)]));
        // A T: one segment's end on the other's inside.
        let points = [(0.0, 0.0), (2.0, 0.0), (1.0, 0.0), (1.0, 1.0)];
        assert!(!is_plane_drawing(&points, &[(0, 1), (2, 3)]));
        // Collinear overlap from a shared end.
        let points = [(0.0, 0.0), (2.0, 0.0), (1.0, 0.0)];
        assert!(!is_plane_drawing(&points, &[(0, 1), (0, 2)]));
    }
}
