//! Named parameter presets (`Preset`, `presets`, `preset`): two leaves whose outline emerges
//! from the costs, a leaf that fills a given outline, two drainage sites (one drawn by hand in
//! cells, one read from the demo site file `examples/sites/community-garden.geojson`), and the
//! spanning-tree reference.

use crate::params::{CostWeights, Domain, RunControl, Widths};
use serde::Serialize;

use crate::params::{Joining, Params, Root};
use crate::site::{read_site, Terrain};

/// A named set of parameters with a one-line description.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Preset {
    /// Short name used on the command line and in links.
    pub name: &'static str,
    /// The name people pick it by on the page, in the words of its kind.
    pub title: &'static str,
    /// What it shows.
    pub description: &'static str,
    /// The parameters.
    pub params: Params,
}

/// Every preset, in display order.
pub fn presets() -> Vec<Preset> {
    vec![
        Preset {
            name: "broad-leaf",
            title: "Broad leaf (egg-shaped blade)",
            description: "open growth: an egg-shaped blade around a midrib, petiole at the base",
            params: broad_leaf(),
        },
        Preset {
            name: "narrow-leaf",
            title: "Narrow leaf (long, tapering blade)",
            description: "open growth: a long, tapering blade, petiole at the base",
            params: narrow_leaf(),
        },
        Preset {
            name: "filled-outline",
            title: "Heart-shaped leaf, outline given",
            description: "fills a given heart-shaped leaf outline from its base",
            params: filled_outline(),
        },
        Preset {
            name: "drainage-site",
            title: "Drainage site (300 m × 200 m)",
            description: "a 300 m x 200 m site sloping to one outlet, around a building",
            params: drainage_site(),
        },
        Preset {
            name: "garden-site",
            title: "Community garden drainage (60 m × 40 m)",
            description: "the demo site file: a garden's roof, gravel paths, lawns and planting beds with their own runoff coefficients, ground from 10 spot levels falling to one street drain",
            params: garden_site(),
        },
        Preset {
            name: "spanning-tree",
            title: "Shortest tree (reference)",
            description: "cheapest-first pure length without jitter: Prim's minimum spanning tree",
            params: spanning_tree(),
        },
    ]
}

/// The parameters of a preset by name.
pub fn preset(name: &str) -> Option<Params> {
    presets()
        .into_iter()
        .find(|preset| preset.name == name)
        .map(|preset| preset.params)
}

fn leaf_base() -> Params {
    Params {
        domain: Domain {
            cell_size: 0.15,
            units: "mm".into(),
            jitter: 0.4,
            ..Domain::default()
        },
        costs: CostWeights {
            w_len: 1.0,
            w_turn: 1.5,
            w_flow: 0.1,
            alpha: 0.5,
            w_path: 0.1,
            ..CostWeights::default()
        },
        run: RunControl {
            cells: 80_000,
            radius: 4.0,
            joining: Joining::Weighted,
            temperature: 0.5,
            ..RunControl::default()
        },
        ..Params::default()
    }
}

fn broad_leaf() -> Params {
    Params {
        domain: Domain {
            width: 220,
            height: 300,
            roots: vec![Root {
                x: 110,
                y: 270,
                outflow: [0.0, 1.0],
            }],
            ..leaf_base().domain
        },
        costs: CostWeights {
            elongation: 3.0,
            rear_cost: 3.0,
            branch_angle: Some(50.0),
            ..leaf_base().costs
        },
        run: RunControl {
            seed: 7,
            threshold: Some(10.0),
            ..leaf_base().run
        },
        ..leaf_base()
    }
}

fn narrow_leaf() -> Params {
    Params {
        domain: Domain {
            width: 160,
            height: 340,
            roots: vec![Root {
                x: 80,
                y: 315,
                outflow: [0.0, 1.0],
            }],
            ..leaf_base().domain
        },
        costs: CostWeights {
            elongation: 5.0,
            rear_cost: 5.0,
            branch_angle: Some(45.0),
            ..leaf_base().costs
        },
        run: RunControl {
            seed: 11,
            threshold: Some(9.0),
            ..leaf_base().run
        },
        ..leaf_base()
    }
}

fn filled_outline() -> Params {
    Params {
        domain: Domain {
            width: 200,
            height: 220,
            roots: vec![Root {
                x: 100,
                y: 162,
                outflow: [0.0, 1.0],
            }],
            outline: Some(heart_outline(100.0, 168.0, 92.0, 150.0, 64)),
            ..leaf_base().domain
        },
        costs: CostWeights {
            w_path: 0.0,
            w_flow: 0.5,
            branch_angle: Some(50.0),
            ..leaf_base().costs
        },
        run: RunControl {
            seed: 3,
            cells: 200 * 220,
            ..leaf_base().run
        },
        ..leaf_base()
    }
}

/// A heart-shaped (cordate) outline with its notch at `(centre_x, notch_y)`, `half_width` wide
/// on each side and `length` from notch to tip, as `points` polygon vertices in cell coordinates.
fn heart_outline(
    centre_x: f64,
    notch_y: f64,
    half_width: f64,
    length: f64,
    points: usize,
) -> Vec<[f64; 2]> {
    // The heart curve x = sin^3 t, y = (13 cos t - 5 cos 2t - 2 cos 3t - cos 4t) / 17 has its
    // tip at y = -1 (t = pi) and its notch at y = 5/17 (t = 0); it is drawn tip up, lobes down.
    let notch = 5.0 / 17.0;
    let scale = length / (1.0 + notch);
    (0..points)
        .map(|index| {
            let t = index as f64 / points as f64 * std::f64::consts::TAU;
            let sine = libm::sin(t);
            let x = sine * sine * sine;
            let y = (13.0 * libm::cos(t)
                - 5.0 * libm::cos(2.0 * t)
                - 2.0 * libm::cos(3.0 * t)
                - libm::cos(4.0 * t))
                / 17.0;
            [centre_x + half_width * x, notch_y + (y - notch) * scale]
        })
        .collect()
}

fn drainage_site() -> Params {
    Params {
        domain: Domain {
            width: 150,
            height: 100,
            cell_size: 2.0,
            units: "m".into(),
            roots: vec![Root {
                x: 0,
                y: 80,
                outflow: [-1.0, 0.0],
            }],
            jitter: 0.35,
            grade_x: 0.01,
            grade_y: -0.004,
            runoff: 0.6,
            obstacles: vec![vec![[60.0, 30.0], [95.0, 30.0], [95.0, 55.0], [60.0, 55.0]]],
            ..Domain::default()
        },
        costs: CostWeights {
            w_len: 1.0,
            w_turn: 0.5,
            w_flow: 0.5,
            alpha: 0.6,
            w_path: 0.0,
            w_grade: 1.0,
            ..CostWeights::default()
        },
        run: RunControl {
            seed: 5,
            cells: 15_000,
            radius: 4.0,
            joining: Joining::Weighted,
            temperature: 0.5,
            ..RunControl::default()
        },
        widths: Widths {
            tip_width: 0.05,
            ..Widths::default()
        },
    }
}

/// The demo site file, compiled in: the source of the `garden-site` preset.
pub const GARDEN_SITE_GEOJSON: &str = include_str!("../../examples/sites/community-garden.geojson");

/// Cell size of the `garden-site` preset, in metres: 120 x 80 cells over the garden.
pub const GARDEN_SITE_CELL: f64 = 0.5;

/// The community garden on 0.5 m cells, its ground from its spot levels.
fn garden_site() -> Params {
    // The file is compiled in and `the_garden_site_reads` checks that it reads and converts.
    let site = read_site(GARDEN_SITE_GEOJSON.as_bytes()).expect("the demo site file reads");
    let mut params = site
        .to_params(GARDEN_SITE_CELL, &Terrain::SpotLevels)
        .expect("the demo site makes valid parameters");
    params.run.seed = 3;
    params
}

fn spanning_tree() -> Params {
    Params {
        domain: Domain {
            width: 80,
            height: 80,
            cell_size: 1.0,
            units: "mm".into(),
            roots: vec![Root {
                x: 40,
                y: 40,
                outflow: [0.0, 1.0],
            }],
            jitter: 0.0,
            ..Domain::default()
        },
        costs: CostWeights {
            w_len: 1.0,
            w_turn: 0.0,
            w_flow: 0.0,
            w_path: 0.0,
            ..CostWeights::default()
        },
        run: RunControl {
            seed: 1,
            cells: 6400,
            radius: 1.5,
            joining: Joining::Cheapest,
            ..RunControl::default()
        },
        ..Params::default()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_garden_site_reads() {
        let site = read_site(GARDEN_SITE_GEOJSON.as_bytes()).expect("reads");
        assert_eq!(site.outlets.len(), 1);
        assert!((6..=12).contains(&site.levels.len()));
        assert!(site
            .to_params(GARDEN_SITE_CELL, &Terrain::SpotLevels)
            .is_ok());
    }

    #[test]
    fn every_preset_validates() {
        for preset in presets() {
            assert_eq!(preset.params.validate(), Ok(()), "preset {}", preset.name);
        }
    }
}
