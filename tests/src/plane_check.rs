//! `conflicting_pairs`: the pairs of segments of a network that cross, touch or overlap
//! anywhere but at a shared end node (a plane graph has none), by the orientation test of
//! Cormen et al. 2009, Introduction to Algorithms, 3rd ed., section 33.1, on Shewchuk's exact
//! predicates (Shewchuk 1997, the `robust` crate): independent of the growth code's own tests.

use std::collections::HashMap;

use ramulus_core::network::Network;
use robust::{orient2d, Coord};

fn coord(network: &Network, node: u32) -> Coord<f64> {
    let node = &network.nodes[node as usize];
    Coord {
        x: node.x,
        y: node.y,
    }
}

fn on_segment(a: Coord<f64>, b: Coord<f64>, p: Coord<f64>) -> bool {
    p.x >= a.x.min(b.x) && p.x <= a.x.max(b.x) && p.y >= a.y.min(b.y) && p.y <= a.y.max(b.y)
}

/// Whether segments `first` and `second` (node pairs) meet anywhere except at a shared end
/// node. Segments sharing one node conflict only when collinear and overlapping; two segments
/// joining the same two nodes always conflict (a doubled segment).
pub fn segments_conflict(network: &Network, first: (u32, u32), second: (u32, u32)) -> bool {
    let (a, b) = (coord(network, first.0), coord(network, first.1));
    let (c, d) = (coord(network, second.0), coord(network, second.1));
    let shared: Vec<u32> = [first.0, first.1]
        .into_iter()
        .filter(|node| *node == second.0 || *node == second.1)
        .collect();
    if shared.len() == 2 {
        return true;
    }
    if let Some(&shared) = shared.first() {
        // The two other ends: overlap when collinear and on the same side of the shared node.
        let s = coord(network, shared);
        let p = if first.0 == shared { b } else { a };
        let q = if second.0 == shared { d } else { c };
        return orient2d(s, p, q) == 0.0
            && (p.x - s.x) * (q.x - s.x) + (p.y - s.y) * (q.y - s.y) > 0.0;
    }
    let d1 = orient2d(c, d, a);
    let d2 = orient2d(c, d, b);
    let d3 = orient2d(a, b, c);
    let d4 = orient2d(a, b, d);
    if d1 * d2 < 0.0 && d3 * d4 < 0.0 {
        return true;
    }
    (d1 == 0.0 && on_segment(c, d, a))
        || (d2 == 0.0 && on_segment(c, d, b))
        || (d3 == 0.0 && on_segment(a, b, c))
        || (d4 == 0.0 && on_segment(a, b, d))
}

/// How many pairs of segments conflict (`segments_conflict`). Segments sit in a grid of
/// buckets as wide as the longest segment, by their first end; each is compared with the
/// segments starting in the 5 x 5 buckets around its own, which holds every segment it can
/// meet.
pub fn conflicting_pairs(network: &Network) -> usize {
    let ends: Vec<(u32, u32)> = network.segments.iter().map(|s| (s.from, s.to)).collect();
    let longest = ends
        .iter()
        .map(|&(a, b)| network.segment_length(a, b))
        .fold(0.0_f64, f64::max)
        .max(1e-12);
    let key = |node: u32| {
        let n = &network.nodes[node as usize];
        (
            (n.x / longest).floor() as i64,
            (n.y / longest).floor() as i64,
        )
    };
    let mut buckets: HashMap<(i64, i64), Vec<usize>> = HashMap::new();
    for (index, &(a, _)) in ends.iter().enumerate() {
        buckets.entry(key(a)).or_default().push(index);
    }
    let mut count = 0;
    for (index, &(a, b)) in ends.iter().enumerate() {
        let (column, row) = key(a);
        for dx in -2..=2 {
            for dy in -2..=2 {
                for &other in buckets.get(&(column + dx, row + dy)).into_iter().flatten() {
                    if other > index && segments_conflict(network, (a, b), ends[other]) {
                        count += 1;
                    }
                }
            }
        }
    }
    count
}
