//! Plane growth: no two segments of a grown network cross or overlap (veins and channels never
//! cross), checked with Shewchuk's exact orientation predicate (`robust::orient2d`; Shewchuk
//! 1997, Discrete Comput. Geom. 18) over every preset and several seeds; version-1 links, whose
//! runs could cross, still do.

use ramulus_core::growth::Growth;
use ramulus_core::link::decode_link;
use ramulus_core::network::Network;
use ramulus_core::presets::{preset, presets};
use ramulus_tests::plane_check::conflicting_pairs;

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
