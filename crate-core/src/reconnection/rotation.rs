//! `RotationSystem`: the neighbours of every node of a plane drawing in angular order, kept
//! up to date as edges are added, so that the faces can be walked again after each round of
//! `nest_loops` without sorting every node's neighbours again.
//!
//! The order is the one `metrics::areoles::trace_faces_with_sides` sorts into (direction by
//! `atan2`, compared with `total_cmp`, edges of equal direction in the order they were added, as
//! a stable sort of the edge list leaves them), and the faces come from the same walk
//! (`metrics::areoles::walk_faces`), so the faces, their numbering and their traced areas are
//! those of tracing the whole edge list from scratch, bit for bit.

use std::cmp::Ordering;

use crate::metrics::areoles::{walk_faces, Face};

/// Per node, its neighbours by direction; scratch rows for the walk.
pub(crate) struct RotationSystem {
    /// Per node: `(direction, neighbour)` pairs by direction.
    around: Vec<Vec<(f64, u32)>>,
    /// Compressed rows of `around` for the walk: row starts.
    start: Vec<usize>,
    /// Compressed rows of `around` for the walk: neighbours.
    flat: Vec<u32>,
}

impl RotationSystem {
    /// The rotation system of `edges` between `points`, in that edge order.
    pub(crate) fn new(points: &[(f64, f64)], edges: &[(u32, u32)]) -> RotationSystem {
        let mut around: Vec<Vec<(f64, u32)>> = vec![Vec::new(); points.len()];
        for &(a, b) in edges {
            around[a as usize].push((direction(points, a, b), b));
            around[b as usize].push((direction(points, b, a), a));
        }
        // Stable: equal directions keep the edge order.
        for row in &mut around {
            row.sort_by(|p, q| p.0.total_cmp(&q.0));
        }
        RotationSystem {
            around,
            start: Vec::new(),
            flat: Vec::new(),
        }
    }

    /// Adds the edge `a b` after every edge already in: among equal directions it comes last.
    pub(crate) fn add(&mut self, points: &[(f64, f64)], a: u32, b: u32) {
        for (from, to) in [(a, b), (b, a)] {
            let key = direction(points, from, to);
            let row = &mut self.around[from as usize];
            let at = row.partition_point(|entry| entry.0.total_cmp(&key) != Ordering::Greater);
            row.insert(at, (key, to));
        }
    }

    /// Walks every face; per edge of `edges` (the edges added, in the order added), the face on
    /// each side (as `metrics::areoles::trace_faces_with_sides`).
    pub(crate) fn faces(
        &mut self,
        points: &[(f64, f64)],
        edges: &[(u32, u32)],
    ) -> (Vec<Face>, Vec<(u32, u32)>) {
        self.start.clear();
        self.flat.clear();
        self.start.push(0);
        for row in &self.around {
            self.flat.extend(row.iter().map(|entry| entry.1));
            self.start.push(self.flat.len());
        }
        walk_faces(points, &self.start, &self.flat, edges)
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
            rotation.add(&points, a, b);
            edges.push((a, b));
            assert_eq!(
                rotation.faces(&points, &edges),
                trace_faces_with_sides(&points, &edges)
            );
        }
        let (faces, _) = rotation.faces(&points, &edges);
        let bounded = faces.iter().filter(|face| face.signed_area > 0.0).count();
        assert_eq!((faces.len(), bounded), (5, 4));
        // Each bounded face is a unit square (shoelace area 1).
        assert!(faces
            .iter()
            .filter(|face| face.signed_area > 0.0)
            .all(|face| face.signed_area == 1.0));
    }
}
