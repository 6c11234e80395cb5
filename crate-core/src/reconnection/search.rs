//! The search structures of the loop pass: `Grid` (points and bounding boxes in uniform cells),
//! `PathSearch` (bounded A* shortest paths) and `TreePaths` (path lengths along a forest).

use std::cmp::Reverse;
use std::collections::BinaryHeap;

use crate::network::{Topology, NO_PARENT};

/// Path lengths along a forest (`arches`): per node its depth and its path length from its
/// root, so that the path between two nodes is found by walking both up to where they meet.
pub(super) struct TreePaths {
    depth: Vec<u32>,
    from_root: Vec<f64>,
}

impl TreePaths {
    /// `length(child, parent)` is the length of a segment.
    pub(super) fn new(topology: &Topology, length: impl Fn(usize, usize) -> f64) -> TreePaths {
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
    pub(super) fn between(&self, topology: &Topology, a: usize, b: usize) -> f64 {
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
/// A uniform grid of items keyed by one point each; `near` gives the items of the 3 x 3 cells
/// around a point (every item within one cell size of it, and some farther).
pub(super) struct Grid {
    size: f64,
    cells: std::collections::HashMap<(i64, i64), Vec<u32>>,
    empty: Vec<u32>,
    scratch: std::cell::RefCell<Vec<u32>>,
}

impl Grid {
    pub(super) fn of_points(items: impl Iterator<Item = (u32, (f64, f64))>, size: f64) -> Grid {
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

    pub(super) fn insert(&mut self, item: u32, at: (f64, f64)) {
        let key = self.key(at);
        self.cells.entry(key).or_default().push(item);
    }

    /// Puts `item` in every cell the bounding box of `a` and `b` covers.
    pub(super) fn insert_box(&mut self, item: u32, a: (f64, f64), b: (f64, f64)) {
        let low = self.key((a.0.min(b.0), a.1.min(b.1)));
        let high = self.key((a.0.max(b.0), a.1.max(b.1)));
        for gx in low.0..=high.0 {
            for gy in low.1..=high.1 {
                self.cells.entry((gx, gy)).or_default().push(item);
            }
        }
    }

    /// Items in the cells the bounding box of `a` and `b` covers.
    pub(super) fn in_box(&self, a: (f64, f64), b: (f64, f64)) -> Vec<u32> {
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
    pub(super) fn near(&self, at: (f64, f64)) -> Vec<u32> {
        self.near_box(at, at)
    }

    /// Items whose point lies in a cell within one cell of the box spanned by `a` and `b`.
    pub(super) fn near_box(&self, a: (f64, f64), b: (f64, f64)) -> Vec<u32> {
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
pub(super) struct PathSearch {
    distance: Vec<f64>,
    touched: Vec<u32>,
    heap: BinaryHeap<Reverse<(Ordered, u32)>>,
    /// Nodes popped and neighbours looked at, over every search so far (a measure of work).
    pub(super) visits: u64,
}

impl PathSearch {
    pub(super) fn new(count: usize) -> PathSearch {
        PathSearch {
            distance: vec![f64::INFINITY; count],
            touched: Vec::new(),
            heap: BinaryHeap::new(),
            visits: 0,
        }
    }

    /// The length of the shortest path from `from` to `to` when it is shorter than `bound`.
    /// `length(a, b)` is an edge's length and never less than the straight distance.
    pub(super) fn shortest(
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
        let visits = &mut self.visits;
        distance[from] = 0.0;
        touched.push(from as u32);
        heap.push(Reverse((Ordered(length(from, to)), from as u32)));
        while let Some(Reverse((Ordered(estimate), node))) = heap.pop() {
            *visits += 1;
            let node = node as usize;
            let reached = distance[node];
            if node == to {
                return Some(reached);
            }
            if estimate > reached + length(node, to) {
                continue;
            }
            neighbours(node, &mut |other| {
                *visits += 1;
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
