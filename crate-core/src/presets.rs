//! Named parameter presets (`Preset`, `presets`, `preset`): three leaves named for their
//! botanical shape class (ovate, elliptic, lanceolate), each growing from its petiole to fill
//! a blade outline of its class; a leaf that fills a heart-shaped outline (every leaf with
//! veins apart from tissue and nested loops, `cleared_leaf_veins`); two drainage sites
//! (one drawn by hand in cells, one read from the demo site file
//! `examples/sites/community-garden.geojson`); and the spanning-tree reference. Earlier names
//! stay accepted (`PRESET_ALIASES`).

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
            name: "ovate-leaf",
            title: "Ovate leaf (egg-shaped blade)",
            description: "an egg-shaped blade, widest below the middle, about 1.7 times as long as wide, grown from the petiole with the midrib to the apex; veins drain at least 0.1 mm² and close nested loops around areoles",
            params: ovate_leaf(),
        },
        Preset {
            name: "elliptic-leaf",
            title: "Elliptic leaf (oval blade)",
            description: "an oval blade, widest at the middle, about 2.4 times as long as wide, grown from the petiole with the midrib to the apex; veins drain at least 0.1 mm² and close nested loops around areoles",
            params: elliptic_leaf(),
        },
        Preset {
            name: "lanceolate-leaf",
            title: "Lanceolate leaf (long, tapering blade)",
            description: "a lance-shaped blade, widest below the middle, about 3.5 times as long as wide, tapering to the apex, grown from the petiole; veins drain at least 0.1 mm² and close nested loops around areoles",
            params: lanceolate_leaf(),
        },
        Preset {
            name: "filled-outline",
            title: "Heart-shaped leaf, outline given",
            description: "fills a given heart-shaped leaf outline from its base; veins drain at least 0.15 mm² and close nested loops around areoles",
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

/// Names of earlier releases that still pick a preset: `(old name, preset name)`.
pub const PRESET_ALIASES: [(&str, &str); 3] = [
    ("broad-leaf", "ovate-leaf"),
    ("narrow-leaf", "elliptic-leaf"),
    ("looped-leaf", "ovate-leaf"),
];

/// The parameters of a preset by name (or by an earlier name, `PRESET_ALIASES`).
pub fn preset(name: &str) -> Option<Params> {
    let name = PRESET_ALIASES
        .iter()
        .find(|(old, _)| *old == name)
        .map_or(name, |(_, new)| *new);
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

/// A leaf blade of one shape class grown from its petiole: the blade's outline is given
/// (`blade_outline`), growth starts at the petiole at the outline's base, keeps off everything
/// behind it (`front_only`) and fills the outline from a midrib laid first from the petiole
/// toward the apex (`midrib`); elongation along the petiole's axis stretches the veins toward
/// the apex.
struct LeafShape {
    /// Blade length, base to apex, in cells.
    length: f64,
    /// Largest blade width in cells.
    width: f64,
    /// Exponents of the width profile near the base and near the apex (`blade_outline`).
    base_exponent: f64,
    apex_exponent: f64,
    elongation: f64,
    branch_angle: f64,
    seed: u64,
}

/// Cells left free around the blade on every side of the lattice.
const LEAF_MARGIN: u32 = 6;

/// Share of the way from the petiole to the apex laid as the midrib before growth: pinnate
/// blades grow their secondaries from a primary vein reaching toward the apex (`midrib`); the
/// last tenth is left to growth, so the apex's fine veins are grown, not laid.
const LEAF_MIDRIB: f64 = 0.9;

fn shaped_leaf(shape: LeafShape) -> Params {
    let width = shape.width.ceil() as u32 + 2 * LEAF_MARGIN;
    let height = shape.length.ceil() as u32 + 2 * LEAF_MARGIN;
    let centre_x = f64::from(width) / 2.0;
    // The outline's base lies two cells below the petiole's cell, so the petiole is inside.
    let root_y = height - LEAF_MARGIN - 2;
    let base_y = f64::from(root_y) + 2.5;
    let outline = blade_outline(
        centre_x,
        base_y,
        shape.length,
        shape.width,
        shape.base_exponent,
        shape.apex_exponent,
        96,
    );
    let cells = (shape.length * shape.width) as u64;
    cleared_leaf_veins(
        Params {
            domain: Domain {
                width,
                height,
                roots: vec![Root {
                    x: width / 2,
                    y: root_y,
                    outflow: [0.0, 1.0],
                }],
                outline: Some(outline),
                front_only: true,
                midrib: LEAF_MIDRIB,
                ..leaf_base().domain
            },
            costs: CostWeights {
                elongation: shape.elongation,
                rear_cost: 3.0,
                branch_angle: Some(shape.branch_angle),
                ..leaf_base().costs
            },
            run: RunControl {
                seed: shape.seed,
                cells,
                ..leaf_base().run
            },
            ..leaf_base()
        },
        LEAF_VEIN_AREA,
        LEAF_RECONNECT,
    )
}

/// A blade outline, base at `(centre_x, base_y)`, apex `length` cells up the page, as `points`
/// polygon vertices in cell coordinates. The half-width at the fraction `t` of the length from
/// the base is `width / 2 * (t^a (1 - t)^b) / (p^a (1 - p)^b)`, widest (`width`) at
/// `p = a / (a + b)`: `a = b = 1/2` is an ellipse (elliptic), `b > a` puts the widest part below
/// the middle (ovate, lanceolate when long), `a > b` above it (obovate).
fn blade_outline(
    centre_x: f64,
    base_y: f64,
    length: f64,
    width: f64,
    a: f64,
    b: f64,
    points: usize,
) -> Vec<[f64; 2]> {
    let p = a / (a + b);
    let peak = libm::pow(p, a) * libm::pow(1.0 - p, b);
    let half = |t: f64| width / 2.0 * libm::pow(t, a) * libm::pow(1.0 - t, b) / peak;
    let side = points / 2;
    // Points bunched toward base and apex (t = (1 - cos s) / 2), where the outline turns.
    let along =
        |index: usize| (1.0 - libm::cos(std::f64::consts::PI * index as f64 / side as f64)) / 2.0;
    let mut outline = Vec::with_capacity(2 * side);
    for index in 0..=side {
        let t = along(index);
        outline.push([centre_x + half(t), base_y - t * length]);
    }
    for index in (1..side).rev() {
        let t = along(index);
        outline.push([centre_x - half(t), base_y - t * length]);
    }
    outline
}

/// Veins apart from tissue and nested loops, as a cleared leaf shows them: every leaf preset
/// has them. The shaped leaves' veins drain at least 0.1 mm² (`LEAF_VEIN_AREA`, about 4.4
/// cells of 0.15 mm): the smallest threshold at which vein density, areole density, branching
/// angle and free-ending veinlet density change by under 15 % when the lattice is refined
/// (0.05 mm² moved areole density by 39 %; below 0.0225 mm², one cell, every cell is a vein
/// and vein density measures the lattice). The veins measure about 3 mm/mm², at the low end of
/// angiosperm leaves (most between about 2 and 25 mm/mm², Boyce et al. 2009, Proc. R. Soc. B
/// 276), with areoles of about 0.6 mm². Loops close where the way round is `reconnect` times
/// the gap, at five coarser scales with `arches`, so that ends of secondary veins close loops
/// with the next secondary.
fn cleared_leaf_veins(mut params: Params, vein_area: f64, reconnect: f64) -> Params {
    params.widths.vein_area = vein_area;
    params.widths.reconnect = Some(reconnect);
    params.widths.loop_levels = 5;
    params.widths.arches = true;
    params
}

/// Conducting threshold of the shaped leaves, mm² (`cleared_leaf_veins`).
const LEAF_VEIN_AREA: f64 = 0.1;

/// Loop ratio of the shaped leaves (`cleared_leaf_veins`).
const LEAF_RECONNECT: f64 = 6.0;

fn ovate_leaf() -> Params {
    shaped_leaf(LeafShape {
        length: 310.0,
        width: 180.0,
        base_exponent: 0.5,
        apex_exponent: 0.85,
        elongation: 3.0,
        branch_angle: 50.0,
        seed: 7,
    })
}

fn elliptic_leaf() -> Params {
    shaped_leaf(LeafShape {
        length: 360.0,
        width: 150.0,
        base_exponent: 0.5,
        apex_exponent: 0.5,
        elongation: 4.0,
        branch_angle: 45.0,
        seed: 11,
    })
}

fn lanceolate_leaf() -> Params {
    shaped_leaf(LeafShape {
        length: 400.0,
        width: 112.0,
        base_exponent: 0.55,
        apex_exponent: 1.1,
        elongation: 6.0,
        branch_angle: 40.0,
        seed: 13,
    })
}

/// The heart-shaped outline filled from its base. Veins drain at least 0.15 mm²: at 0.1 mm²
/// its areole density moved by 15.3 % and its mean branching angle by 13.5 % when the lattice
/// was refined (`refine` 1 to 2, seeds 1-5). Loops close at a path 4 times the gap (not 6), so
/// its areoles stay in the range of dicot leaves at that threshold (about 1.2 per mm² against
/// 0.8 at 6).
fn filled_outline() -> Params {
    cleared_leaf_veins(
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
        },
        0.15,
        4.0,
    )
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
        costs: CostWeights::drainage(),
        run: RunControl {
            seed: 5,
            cells: 15_000,
            radius: 4.0,
            joining: Joining::Weighted,
            temperature: 0.5,
            keep_clear: true,
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
