//! Channels go round blocked ground (`keep_clear`): on a hand-made site split by a thin wall
//! with one opening, no segment of several seeds passes over a wall cell, checked by sampling
//! points densely along every segment against the wall's rectangle (not through the lattice
//! code); with the parameter off, as version-1 links and runs saved before it grew, segments
//! jump the wall, so the check can fail. Sites read from files and the drainage presets turn it
//! on; every version-1 link reads with it off.

use ramulus_core::growth::Growth;
use ramulus_core::link::decode_link;
use ramulus_core::network::Network;
use ramulus_core::params::{CostWeights, Domain, Joining, Params, Root, RunControl};
use ramulus_core::presets::preset;
use ramulus_core::site::{read_site, Terrain};

/// Lattice of the hand-made site: 40 x 20 cells of 1 m.
const WIDTH: u32 = 40;
const HEIGHT: u32 = 20;

/// The wall: x from 19 to 21 m (2 m thick: two cells) and y from 0 to 15 m down the page, so
/// the two halves meet only through the opening of rows 15 to 19 (5 m).
const WALL: [[f64; 2]; 4] = [[19.0, 0.0], [21.0, 0.0], [21.0, 15.0], [19.0, 15.0]];

/// Whether the point (in metres, y down the page) lies inside the wall's rectangle. A cell is
/// blocked when its centre is inside the obstacle (README, "The model"), so with the wall on
/// cell edges the blocked cells fill the rectangle exactly.
fn in_wall(x: f64, y: f64) -> bool {
    (WALL[0][0]..WALL[1][0]).contains(&x) && (WALL[0][1]..WALL[2][1]).contains(&y)
}

fn walled_site(seed: u64, keep_clear: bool) -> Params {
    Params {
        domain: Domain {
            width: WIDTH,
            height: HEIGHT,
            cell_size: 1.0,
            units: "m".into(),
            jitter: 0.35,
            roots: vec![Root {
                x: 1,
                y: 5,
                outflow: [-1.0, 0.0],
            }],
            obstacles: vec![WALL.to_vec()],
            grade_x: 0.01,
            grade_y: 0.0,
            runoff: 0.6,
            ..Domain::default()
        },
        costs: CostWeights::drainage(),
        run: RunControl {
            seed,
            cells: u64::from(WIDTH * HEIGHT),
            radius: 4.0,
            joining: Joining::Weighted,
            temperature: 0.5,
            planar: true,
            keep_clear,
            ..RunControl::default()
        },
        ..Params::default()
    }
}

fn grown(params: &Params) -> Network {
    let mut growth = Growth::new(params).expect("valid parameters");
    growth.run();
    growth.network()
}

/// Segments with a point inside the wall, among 2,000 points evenly along each (a segment is
/// at most 4 cells long here, so points lie under 0.002 m apart; the wall is 2 m thick).
fn segments_over_the_wall(network: &Network) -> usize {
    network
        .segments
        .iter()
        .filter(|segment| {
            let (a, b) = (
                &network.nodes[segment.from as usize],
                &network.nodes[segment.to as usize],
            );
            (0..=2000).any(|k| {
                let t = k as f64 / 2000.0;
                in_wall(a.x + t * (b.x - a.x), a.y + t * (b.y - a.y))
            })
        })
        .count()
}

#[test]
fn no_segment_passes_over_a_thin_wall_and_without_the_rule_they_do() {
    // Cells off the wall: 40 x 20 less 2 x 15.
    let allowed = (WIDTH * HEIGHT - 2 * 15) as usize;
    let mut jumps_without = 0;
    for seed in 1..=5 {
        let network = grown(&walled_site(seed, true));
        assert_eq!(
            segments_over_the_wall(&network),
            0,
            "seed {seed}: a segment passes over the wall"
        );
        // Every cell of both halves is still reached, through the opening.
        assert_eq!(network.cells.occupied.len(), allowed, "seed {seed}");
        jumps_without += segments_over_the_wall(&grown(&walled_site(seed, false)));
    }
    assert!(
        jumps_without > 0,
        "without keep_clear some segment should jump the 2 m wall (reach 4 cells)"
    );
}

#[test]
fn sites_from_files_and_the_drainage_presets_keep_clear_and_old_links_do_not() {
    for name in ["drainage-site", "garden-site"] {
        assert!(preset(name).expect("a preset").run.keep_clear, "{name}");
    }
    let file =
        br#"{"type": "FeatureCollection", "properties": {"runoff_coefficient": 0.5}, "features": [
        {"type": "Feature", "properties": {"role": "outline"}, "geometry": {"type": "Polygon",
         "coordinates": [[[0, 0], [20, 0], [20, 10], [0, 10], [0, 0]]]}},
        {"type": "Feature", "properties": {"role": "outlet"}, "geometry": {"type": "Point",
         "coordinates": [1, 1]}}]}"#;
    let params = read_site(file)
        .expect("reads")
        .to_params(
            1.0,
            &Terrain::Grade {
                east: 0.01,
                north: 0.0,
            },
        )
        .expect("converts");
    assert!(params.run.keep_clear);
    // Version-1 links never had the key: they read with it off and grow as they always did
    // (tests/tests/link_v1_pins.rs holds their digests).
    let pins = include_str!("../data/link-v1-digests.txt");
    for line in pins.lines().filter(|line| !line.starts_with('#')) {
        let link = line.split_once(' ').expect("digest then link").1;
        assert!(!decode_link(link).params.run.keep_clear, "{link}");
    }
}
