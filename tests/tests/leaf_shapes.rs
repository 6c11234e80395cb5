//! The leaf presets have the shapes their names say: the laminar length to width ratio of the
//! grown blade (`blade_length_width`) lies in its class's range over 5 seeds, the widest part
//! sits where the class puts it, nothing grows behind the petiole, and the main vein runs from
//! the petiole toward the apex.
//!
//! Class ranges (the Manual of Leaf Architecture, Ellis et al. 2009, was not at hand; these
//! floras give the same classes):
//! - ovate: widest below the middle, about 1.5 to 2 times as long as wide (Northern Ontario
//!   Plant Database, "Leaf shapes"; "not more than twice as long as broad", British Flowering
//!   Plants, introduction p. 5);
//! - elliptic: widest at the middle, twice or thrice as long as broad (Parsons 1897, The Wild
//!   Flowers of California, "Form"; "twice as long as broad", British Flowering Plants);
//! - lanceolate: widest below the middle, 3 to 6 times as long as wide (Northern Ontario Plant
//!   Database; "three or four times", British Flowering Plants).

use ramulus_core::growth::Growth;
use ramulus_core::metrics::blade_length_width;
use ramulus_core::params::Params;
use ramulus_core::presets::preset;
use ramulus_core::run::RunView;

/// Preset, smallest and largest length to width ratio of its class, and where its widest part
/// lies as a fraction of the length from the base.
const CLASSES: [(&str, f64, f64, (f64, f64)); 3] = [
    ("ovate-leaf", 1.5, 2.0, (0.2, 0.5)),
    ("elliptic-leaf", 2.0, 3.0, (0.4, 0.6)),
    ("lanceolate-leaf", 3.0, 6.0, (0.15, 0.5)),
];

fn grow(name: &str, seed: u64) -> (Params, RunView) {
    let mut params = preset(name).expect("a preset");
    params.run.seed = seed;
    let mut growth = Growth::new(&params).expect("the preset grows");
    growth.run();
    let view = RunView::new(growth.network(), &params).expect("a forest");
    (params, view)
}

/// Where the blade is widest, as a fraction of its length from the base, for a blade grown
/// upward (outflow +y): rows counted from the petiole's row.
fn widest_fraction(view: &RunView, root_row: u32) -> f64 {
    let width = view.network.cells.width;
    let mut rows: std::collections::BTreeMap<u32, (u32, u32)> = Default::default();
    for &cell in &view.network.cells.occupied {
        let (column, row) = (cell % width, cell / width);
        let entry = rows.entry(row).or_insert((column, column));
        entry.0 = entry.0.min(column);
        entry.1 = entry.1.max(column);
    }
    let top = *rows.keys().next().expect("cells");
    let length = f64::from(root_row - top + 1);
    // The middle of the rows whose width is within 2 % of the largest (a flat widest part).
    let largest = rows.values().map(|(l, r)| r - l + 1).max().unwrap_or(0);
    let wide: Vec<u32> = rows
        .iter()
        .filter(|(_, (l, r))| f64::from(r - l + 1) >= 0.98 * f64::from(largest))
        .map(|(&row, _)| row)
        .collect();
    let middle = f64::from(wide[0] + wide[wide.len() - 1]) / 2.0;
    (f64::from(root_row) - middle + 0.5) / length
}

#[test]
fn each_leaf_preset_has_the_length_to_width_ratio_of_its_class() {
    for (name, low, high, (widest_low, widest_high)) in CLASSES {
        for seed in 1..=5 {
            let (params, view) = grow(name, seed);
            let root = &params.domain.roots[0];
            let ratio = blade_length_width(&view.network.cells, root.outflow).expect("cells");
            assert!(
                (low..=high).contains(&ratio),
                "{name} seed {seed}: length / width {ratio:.2} outside {low}-{high}"
            );
            let widest = widest_fraction(&view, root.y);
            assert!(
                (widest_low..=widest_high).contains(&widest),
                "{name} seed {seed}: widest at {widest:.2} of the length"
            );
        }
    }
}

/// `front_only`: no cell lies behind the line through the petiole across its outflow (rows
/// below the petiole's row, the outflow pointing down the page); without it, the same
/// parameters grow some there (the rule is what keeps them out).
#[test]
fn nothing_grows_behind_the_petiole() {
    for (name, ..) in CLASSES {
        let (params, view) = grow(name, 1);
        let root = &params.domain.roots[0];
        assert_eq!(root.outflow, [0.0, 1.0]);
        let width = view.network.cells.width;
        let behind = view
            .network
            .cells
            .occupied
            .iter()
            .filter(|&&cell| cell / width > root.y)
            .count();
        assert_eq!(behind, 0, "{name}: {behind} cells behind the petiole");
    }
    let mut params = preset("ovate-leaf").expect("a preset");
    params.domain.front_only = false;
    let mut growth = Growth::new(&params).expect("grows");
    growth.run();
    let network = growth.network();
    let root_row = params.domain.roots[0].y;
    let width = network.cells.width;
    assert!(network
        .cells
        .occupied
        .iter()
        .any(|&cell| cell / width > root_row));
}

/// One petiole and a midrib toward the apex: following the larger upstream flow from the root
/// (the main vein) ends in the top fifth of the blade (common practice, no source: a midrib
/// runs "from the base to the apex", Northern Ontario Plant Database's pinnate leaves).
#[test]
fn the_main_vein_reaches_toward_the_apex() {
    for (name, ..) in CLASSES {
        let (_, view) = grow(name, 2);
        let topology = view.topology().expect("a forest");
        let roots: Vec<usize> = (0..topology.parent.len())
            .filter(|&node| topology.parent[node] == u32::MAX)
            .collect();
        assert_eq!(roots.len(), 1, "{name}: one petiole");
        let mut node = roots[0];
        while let Some(&next) = topology
            .children
            .of(node)
            .iter()
            .max_by(|&&a, &&b| topology.flow[a as usize].total_cmp(&topology.flow[b as usize]))
        {
            node = next as usize;
        }
        let h = view.network.cell_size;
        let base = view.network.nodes[roots[0]].y;
        let top = view
            .network
            .nodes
            .iter()
            .map(|n| n.y)
            .fold(f64::INFINITY, f64::min);
        let reached = (base - view.network.nodes[node].y) / (base - top);
        assert!(
            reached >= 0.8,
            "{name}: the main vein ends at {reached:.2} of the blade length ({} cells)",
            (base - view.network.nodes[node].y) / h
        );
    }
}

/// The elliptic blade's smooth margin reads the circularity of an ellipse of its length to
/// width ratio: `4 pi (pi a b) / P^2` with Ramanujan's perimeter `P = pi (3 (a + b) -
/// sqrt((3a + b)(a + 3b)))` (Ramanujan 1914, Q. J. Pure Appl. Math. 45, from memory) within 3 %;
/// the growth front's own ragged edge would read far less (0.17 for the egg-shaped blade of
/// earlier releases).
#[test]
fn the_elliptic_margin_reads_an_ellipse() {
    let (params, view) = grow("elliptic-leaf", 1);
    let ratio =
        blade_length_width(&view.network.cells, params.domain.roots[0].outflow).expect("cells");
    let (a, b) = (ratio, 1.0);
    let perimeter = std::f64::consts::PI * (3.0 * (a + b) - ((3.0 * a + b) * (a + 3.0 * b)).sqrt());
    let expected =
        4.0 * std::f64::consts::PI * (std::f64::consts::PI * a * b) / (perimeter * perimeter);
    let circularity = view.metrics.circularity.expect("a margin");
    assert!(
        (circularity - expected).abs() < 0.03 * expected,
        "circularity {circularity}, ellipse {expected}"
    );
}

/// Prints the circularity of the smooth margin of every leaf preset over seeds 1-5 (README,
/// "Metrics"): `cargo test --release -p ramulus-tests --test leaf_shapes -- --ignored --nocapture`.
#[test]
#[ignore]
fn margin_circularity_table() {
    for (name, ..) in CLASSES {
        let values: Vec<String> = (1..=5)
            .map(|seed| {
                let (_, view) = grow(name, seed);
                format!("{:.3}", view.metrics.circularity.unwrap_or(0.0))
            })
            .collect();
        println!("{name}: circularity {}", values.join(", "));
    }
}

/// Draws each leaf preset's veins (drained area at least 0.5 mm^2, stroke width growing with
/// the flow) inside its smooth margin into `artifacts/shapes/NAME.png`, to look at:
/// `cargo test --release -p ramulus-tests --test leaf_shapes -- --ignored --nocapture`.
#[test]
#[ignore]
fn draw_leaf_presets() {
    use ramulus_core::metrics::margin::blade_margin;
    use ramulus_tests::cleared_drawing::{encode_grey_png, Canvas};
    let folder = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../artifacts/shapes");
    std::fs::create_dir_all(&folder).expect("artifacts folder");
    for (name, ..) in CLASSES {
        let (params, view) = grow(name, 1);
        let scale = 2.0; // pixels per cell
        let h = view.network.cell_size;
        let (width, height) = (
            (f64::from(params.domain.width) * scale) as usize,
            (f64::from(params.domain.height) * scale) as usize,
        );
        let mut canvas = Canvas::new(width, height, 255.0);
        for polygon in blade_margin(&view.network.cells) {
            for (index, &[x0, y0]) in polygon.iter().enumerate() {
                let [x1, y1] = polygon[(index + 1) % polygon.len()];
                canvas.stroke(
                    (x0 * scale, y0 * scale),
                    (x1 * scale, y1 * scale),
                    1.0,
                    120.0,
                );
            }
        }
        let minimum = 0.5;
        for (index, segment) in view.network.segments.iter().enumerate() {
            let flow = view.table.flow[index];
            if flow < minimum {
                continue;
            }
            let a = &view.network.nodes[segment.from as usize];
            let b = &view.network.nodes[segment.to as usize];
            let radius = 0.6 * (flow / minimum).powf(1.0 / 3.0);
            canvas.stroke(
                (a.x / h * scale, a.y / h * scale),
                (b.x / h * scale, b.y / h * scale),
                radius,
                0.0,
            );
        }
        let grey: Vec<u8> = canvas.grey();
        let png = encode_grey_png(width, height, &grey, None);
        std::fs::write(folder.join(format!("{name}.png")), png).expect("written");
    }
}
