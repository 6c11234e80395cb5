//! `RotationSystem`: the neighbours of every node of a plane drawing in angular order, kept
//! up to date as edges are added, so that faces can be walked again after each round of
//! `nest_loops` without sorting every node's neighbours again, and only the faces asked for
//! that changed: an edge added between `a` and `b` changes only the walks through the corners
//! of `a` and `b` (the faces it splits or joins), so a face walked before keeps its figures
//! until an edge is added at one of its nodes or an edge of it changes its flow.
//!
//! The order is the one `metrics::areoles::trace_faces_with_sides` sorts into (direction by
//! `atan2`, compared with `total_cmp`, edges of equal direction in the order they were added, as
//! a stable sort of the edge list leaves them). `faces_along` walks a face as that walk does and
//! sums its shoelace area from the face's first half-edge in node order, where that walk starts
//! it, and its boundary length in edge order, as `reconnection` sums it over the whole tracing:
//! the figures are those of tracing the whole edge list from scratch, bit for bit.

use std::cmp::Ordering;

#[cfg(test)]
use crate::metrics::areoles::{walk_faces, Face};

/// Per node, its neighbours by direction, each half-edge with the face last walked along it;
/// the faces walked; scratch rows for the walk.
pub(crate) struct RotationSystem {
    /// Per node: `(direction, neighbour, edge index, face walked)` by direction; the face is
    /// an index into `walked` (`u32::MAX` for none yet).
    around: Vec<Vec<(f64, u32, u32, u32)>>,
    /// Every face walked, with whether its figures still hold.
    walked: Vec<(FaceFigures, bool)>,
    /// The walk of one face: `(node, position in its row)` pairs.
    walk: Vec<(u32, usize)>,
    /// The edges along one face, by index.
    edges_along: Vec<u32>,
}

/// One face walked by `RotationSystem::faces_along`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct FaceFigures {
    /// Shoelace area of the walk (positive for a bounded face), summed from the face's first
    /// half-edge in node order.
    pub(crate) signed_area: f64,
    /// Length of the walk, summed in edge order (an edge with the face on both sides twice).
    pub(crate) perimeter: f64,
    /// The least `flow` of an edge with the face on one side only (infinite for none).
    pub(crate) thinnest: f64,
}

impl RotationSystem {
    /// The rotation system of `edges` between `points`, in that edge order.
    pub(crate) fn new(points: &[(f64, f64)], edges: &[(u32, u32)]) -> RotationSystem {
        let mut around: Vec<Vec<(f64, u32, u32, u32)>> = vec![Vec::new(); points.len()];
        for (index, &(a, b)) in edges.iter().enumerate() {
            around[a as usize].push((direction(points, a, b), b, index as u32, u32::MAX));
            around[b as usize].push((direction(points, b, a), a, index as u32, u32::MAX));
        }
        // Stable: equal directions keep the edge order.
        for row in &mut around {
            row.sort_by(|p, q| p.0.total_cmp(&q.0));
        }
        RotationSystem {
            around,
            walked: Vec::new(),
            walk: Vec::new(),
            edges_along: Vec::new(),
        }
    }

    /// Marks the faces at every corner of `node` as changed.
    fn forget_faces_at(&mut self, node: u32) {
        for entry in &self.around[node as usize] {
            if let Some(face) = self.walked.get_mut(entry.3 as usize) {
                face.1 = false;
            }
        }
    }

    /// Marks the faces on both sides of the edge `a b` as changed (its flow changes).
    pub(crate) fn forget_faces_beside(&mut self, a: u32, b: u32) {
        for (from, to) in [(a, b), (b, a)] {
            let face = self.around[from as usize]
                .iter()
                .find(|entry| entry.1 == to)
                .map(|entry| entry.3);
            if let Some(face) = face.and_then(|face| self.walked.get_mut(face as usize)) {
                face.1 = false;
            }
        }
    }

    /// Adds edge number `index`, `a b`, after every edge already in: among equal directions it
    /// comes last.
    pub(crate) fn add(&mut self, points: &[(f64, f64)], a: u32, b: u32, index: u32) {
        self.forget_faces_at(a);
        self.forget_faces_at(b);
        for (from, to) in [(a, b), (b, a)] {
            let key = direction(points, from, to);
            let row = &mut self.around[from as usize];
            let at = row.partition_point(|entry| entry.0.total_cmp(&key) != Ordering::Greater);
            row.insert(at, (key, to, index, u32::MAX));
        }
    }

    /// The face along each half-edge `(node, neighbour)` of `along`, walked again only when
    /// it changed since it was last walked: the faces, and per half-edge the index of its face
    /// among them (`None` when the edge is not in). `edges` are the edges added, in order;
    /// `flow` gives an edge's flow by its index.
    pub(crate) fn faces_along(
        &mut self,
        points: &[(f64, f64)],
        edges: &[(u32, u32)],
        flow: impl Fn(usize) -> f64,
        along: impl Iterator<Item = (u32, u32)>,
    ) -> (Vec<FaceFigures>, Vec<Option<u32>>) {
        let mut faces = Vec::new();
        let mut index_of: std::collections::HashMap<u32, u32> = Default::default();
        let mut face_of_each = Vec::new();
        for (node, neighbour) in along {
            let position = self
                .around
                .get(node as usize)
                .and_then(|row| row.iter().position(|entry| entry.1 == neighbour));
            let Some(position) = position else {
                face_of_each.push(None);
                continue;
            };
            let mut face = self.around[node as usize][position].3;
            if !self
                .walked
                .get(face as usize)
                .is_some_and(|walked| walked.1)
            {
                face = self.walked.len() as u32;
                let figures = self.walk_face(points, edges, &flow, node, position, face);
                self.walked.push((figures, true));
            }
            let local = *index_of.entry(face).or_insert_with(|| {
                faces.push(self.walked[face as usize].0);
                faces.len() as u32 - 1
            });
            face_of_each.push(Some(local));
        }
        (faces, face_of_each)
    }

    /// Walks the face along the half-edge at `position` in `node`'s row, marking its
    /// half-edges as face `index`, and sums its figures as the whole tracing does.
    fn walk_face(
        &mut self,
        points: &[(f64, f64)],
        edges: &[(u32, u32)],
        flow: &impl Fn(usize) -> f64,
        node: u32,
        position: usize,
        index: u32,
    ) -> FaceFigures {
        self.walk.clear();
        self.edges_along.clear();
        let (mut u, mut at) = (node, position);
        while self.around[u as usize][at].3 != index {
            let entry = &mut self.around[u as usize][at];
            entry.3 = index;
            let (v, edge) = (entry.1, entry.2);
            self.walk.push((u, at));
            self.edges_along.push(edge);
            // The neighbour of v just before u in angular order.
            let row = &self.around[v as usize];
            let back = row.iter().position(|entry| entry.1 == u).unwrap_or(0);
            let next = if back == 0 { row.len() - 1 } else { back - 1 };
            (u, at) = (v, next);
        }
        // The whole tracing starts each walk at the face's first half-edge in node order.
        let start = self
            .walk
            .iter()
            .enumerate()
            .min_by_key(|(_, &corner)| corner)
            .map_or(0, |(at, _)| at);
        let mut twice_area = 0.0;
        for &(u, at) in self.walk[start..].iter().chain(&self.walk[..start]) {
            let v = self.around[u as usize][at].1;
            let (a, b) = (points[u as usize], points[v as usize]);
            twice_area += a.0 * b.1 - b.0 * a.1;
        }
        // Boundary length in edge order; the least flow of an edge seen once.
        self.edges_along.sort_unstable();
        let mut perimeter = 0.0;
        let mut thinnest = f64::INFINITY;
        for (at, &edge) in self.edges_along.iter().enumerate() {
            let (a, b) = edges[edge as usize];
            let (p, q) = (points[a as usize], points[b as usize]);
            perimeter += crate::fast_libm::hypot(p.0 - q.0, p.1 - q.1);
            let twice = (at > 0 && self.edges_along[at - 1] == edge)
                || self.edges_along.get(at + 1) == Some(&edge);
            if !twice {
                thinnest = thinnest.min(flow(edge as usize));
            }
        }
        FaceFigures {
            signed_area: twice_area / 2.0,
            perimeter,
            thinnest,
        }
    }

    /// Walks every face; per edge of `edges` (the edges added, in the order added), the face on
    /// each side (as `metrics::areoles::trace_faces_with_sides`).
    #[cfg(test)]
    fn faces(&self, points: &[(f64, f64)], edges: &[(u32, u32)]) -> (Vec<Face>, Vec<(u32, u32)>) {
        let mut start = vec![0];
        let mut flat = Vec::new();
        for row in &self.around {
            flat.extend(row.iter().map(|entry| entry.1));
            start.push(flat.len());
        }
        walk_faces(points, &start, &flat, edges)
    }
}

/// The direction from node `from` to node `to`, as the face tracing sorts by.
fn direction(points: &[(f64, f64)], from: u32, to: u32) -> f64 {
    let (a, b) = (points[from as usize], points[to as usize]);
    libm::atan2(b.1 - a.1, b.0 - a.0)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::metrics::areoles::trace_faces_with_sides;

    /// A 3 x 3 lattice of points one unit apart with all 12 lattice edges, added one by one
    /// after a spanning tree: V = 9, E = 12, one component, so E - V + C = 4 bounded faces and
    /// one outside (Euler's formula for plane graphs). After every edge the faces and sides
    /// equal those of tracing the whole edge list at once.
    #[test]
    fn adding_edges_gives_the_faces_of_tracing_from_scratch() {
        let points: Vec<(f64, f64)> = (0..9)
            .map(|index| (f64::from(index % 3), f64::from(index / 3)))
            .collect();
        // A spanning tree (a comb), then the edges closing the four unit squares.
        let tree = [
            (0, 1),
            (1, 2),
            (0, 3),
            (1, 4),
            (2, 5),
            (3, 6),
            (4, 7),
            (5, 8),
        ];
        let closing = [(3, 4), (4, 5), (6, 7), (7, 8)];
        let mut edges: Vec<(u32, u32)> = tree.to_vec();
        let mut rotation = RotationSystem::new(&points, &edges);
        assert_eq!(
            rotation.faces(&points, &edges),
            trace_faces_with_sides(&points, &edges)
        );
        for &(a, b) in &closing {
            rotation.add(&points, a, b, edges.len() as u32);
            edges.push((a, b));
            assert_eq!(
                rotation.faces(&points, &edges),
                trace_faces_with_sides(&points, &edges)
            );
            // Each face walked alone has the area of the whole tracing, bit for bit.
            let (traced, sides) = trace_faces_with_sides(&points, &edges);
            let (walked, face_of) = rotation.faces_along(
                &points,
                &edges,
                |_| 1.0,
                edges
                    .iter()
                    .copied()
                    .chain(edges.iter().map(|&(a, b)| (b, a))),
            );
            for (index, side) in sides.iter().enumerate() {
                for (along, face) in [(index, side.0), (index + edges.len(), side.1)] {
                    let walked_face = walked[face_of[along].expect("an edge that is in") as usize];
                    assert_eq!(
                        walked_face.signed_area.to_bits(),
                        traced[face as usize].signed_area.to_bits()
                    );
                }
            }
        }
        let (faces, _) = rotation.faces(&points, &edges);
        let bounded = faces.iter().filter(|face| face.signed_area > 0.0).count();
        assert_eq!((faces.len(), bounded), (5, 4));
        // Each bounded face is a unit square (shoelace area 1, boundary 4); the outside's
        // boundary is the 3 x 3 square's, 8.
        assert!(faces
            .iter()
            .filter(|face| face.signed_area > 0.0)
            .all(|face| face.signed_area == 1.0));
        let (walked, _) =
            rotation.faces_along(&points, &edges, |_| 1.0, [(0, 1), (1, 0)].into_iter());
        let mut figures: Vec<(f64, f64)> = walked
            .iter()
            .map(|face| (face.signed_area, face.perimeter))
            .collect();
        figures.sort_by(|a, b| a.0.total_cmp(&b.0));
        assert_eq!(figures, vec![(-4.0, 8.0), (1.0, 4.0)]);
    }
}
