//! Plane growth: no two segments of a grown network cross or overlap (veins and channels never
//! cross), checked with Shewchuk's exact orientation predicate (`robust::orient2d`; Shewchuk
//! 1997, Discrete Comput. Geom. 18) over every preset and several seeds; version-1 links, whose
//! runs could cross, still do.

use ramulus_core::growth::Growth;
use ramulus_core::link::decode_link;
use ramulus_core::network::Network;
use ramulus_core::presets::{preset, presets};
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

/// Whether segments `a b` and `c d` meet anywhere except at a shared end node, by the textbook
/// orientation test (Cormen et al. 2009, Introduction to Algorithms, 3rd ed., section 33.1)
/// on exact predicates. Segments sharing a node conflict only when they are collinear and
/// overlap.
fn segments_conflict(network: &Network, first: (u32, u32), second: (u32, u32)) -> bool {
    let (a, b) = (coord(network, first.0), coord(network, first.1));
    let (c, d) = (coord(network, second.0), coord(network, second.1));
    let shared = [first.0, first.1]
        .iter()
        .find(|node| **node == second.0 || **node == second.1)
        .copied();
    if let Some(shared) = shared {
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

/// Pairs of segments that cross or overlap, found through a grid of buckets as wide as the
/// longest segment (two segments that meet share a bucket or touch neighbouring ones).
fn conflicting_pairs(network: &Network) -> usize {
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
    let mut buckets: std::collections::HashMap<(i64, i64), Vec<usize>> = Default::default();
    for (index, &(a, _)) in ends.iter().enumerate() {
        buckets.entry(key(a)).or_default().push(index);
    }
    let mut count = 0;
    for (index, &(a, b)) in ends.iter().enumerate() {
        let (column, row) = key(a);
        for dx in -2..=2 {
            for dy in -2..=2 {
                let Some(others) = buckets.get(&(column + dx, row + dy)) else {
                    continue;
                };
                for &other in others {
                    if other > index && segments_conflict(network, (a, b), ends[other]) {
                        count += 1;
                    }
                }
            }
        }
    }
    count
}

fn grown(params: &ramulus_core::params::Params) -> Network {
    let mut growth = Growth::new(params).expect("valid parameters");
    growth.run();
    growth.network()
}

#[test]
fn the_checker_sees_a_crossing_and_a_shared_end() {
    use ramulus_core::network::{CellSet, Node, Segment};
    let node = |x: f64, y: f64| Node { x, y, weight: 1.0 };
    let network = Network {
        nodes: vec![
            node(0.0, 0.0),
            node(2.0, 2.0),
            node(0.0, 2.0),
            node(2.0, 0.0),
            node(1.0, 0.0),
        ],
        segments: vec![
            Segment { from: 1, to: 0 },
            Segment { from: 3, to: 2 },
            Segment { from: 4, to: 0 },
        ],
        area: 4.0,
        units: "mm".into(),
        cell_size: 1.0,
        cells: CellSet::default(),
    };
    // 1-0 crosses 3-2 at (1, 1); 4-0 shares node 0 with 1-0 at 45 degrees and touches 3-2 nowhere.
    assert_eq!(conflicting_pairs(&network), 1);
}

#[test]
fn no_preset_grows_crossing_segments() {
    let mut checked = 0;
    for entry in presets() {
        for seed in 1..=3 {
            let mut params = preset(entry.name).expect("a preset");
            params.run.seed = seed;
            params.run.cells = params.run.cells.min(12_000);
            assert!(
                params.run.planar,
                "preset {} grows plane networks",
                entry.name
            );
            let network = grown(&params);
            assert_eq!(
                conflicting_pairs(&network),
                0,
                "preset {} seed {seed}: segments cross",
                entry.name
            );
            checked += 1;
        }
    }
    assert!(checked >= 9);
}

#[test]
fn version_1_links_still_cross_as_they_did() {
    // The broad-leaf link as shipped in format version 1 (its first pin in
    // tests/data/link-v1-digests.txt) grows as it always did, without the plane rule, so its
    // self-crossings remain; the first release's runs crossed themselves 165-244 times.
    let pins = include_str!("../data/link-v1-digests.txt");
    let line = pins
        .lines()
        .find(|line| !line.starts_with('#'))
        .expect("a pinned link");
    let link = line.split_once(' ').expect("digest then link").1;
    let decoded = decode_link(link);
    assert!(!decoded.params.run.planar);
    let mut params = decoded.params.clone();
    let crossing = conflicting_pairs(&grown(&params));
    params.run.planar = true;
    let plane = conflicting_pairs(&grown(&params));
    assert!(
        crossing > 100,
        "a version-1 run crosses itself ({crossing} pairs)"
    );
    assert_eq!(plane, 0);
}
