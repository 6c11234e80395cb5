//! The leaf presets grow networks whose vein density, vein orders and branching angles fall in
//! loose, physically sensible ranges for real leaves, with the petiole at the base; the drainage
//! preset keeps its building footprint empty. The presets are grown at full size (20k-45k cells;
//! fast enough in the test profile).
//!
//! These are plausibility bands, deliberately wide: they catch a model or unit error (a density
//! off by a factor of ten, a network without hierarchy, a comb of right angles), not a shift of a
//! few percent.

use ramulus_core::growth::Growth;
use ramulus_core::params::Params;
use ramulus_core::presets::preset;
use ramulus_core::run::RunView;

const LEAF_PRESETS: [&str; 3] = ["broad-leaf", "narrow-leaf", "filled-outline"];

fn grow_preset(name: &str) -> (Params, RunView) {
    let params = preset(name).unwrap_or_else(|| panic!("no preset named {name}"));
    let mut growth =
        Growth::new(&params).unwrap_or_else(|error| panic!("preset {name} rejected: {error}"));
    growth.run();
    let view = RunView::new(growth.network(), &params)
        .unwrap_or_else(|error| panic!("preset {name}: not a forest: {error}"));
    (params, view)
}

/// Bounding box of the occupied cells: (min column, max column, min row, max row).
fn cell_box(view: &RunView) -> (u32, u32, u32, u32) {
    let width = view.network.cells.width;
    let mut bounds = (u32::MAX, 0, u32::MAX, 0);
    for &cell in &view.network.cells.occupied {
        let (column, row) = (cell % width, cell / width);
        bounds.0 = bounds.0.min(column);
        bounds.1 = bounds.1.max(column);
        bounds.2 = bounds.2.min(row);
        bounds.3 = bounds.3.max(row);
    }
    bounds
}

#[test]
fn leaf_presets_grow_a_sizeable_blade() {
    for name in LEAF_PRESETS {
        let (params, view) = grow_preset(name);
        let cells = view.network.cells.occupied.len();
        // A blade, not a stub: thousands of cells, and within the budget.
        assert!(
            (5_000..=params.run.cells as usize).contains(&cells),
            "{name}: {cells} cells"
        );
        assert_eq!(
            view.network.units, "mm",
            "{name}: leaves are measured in mm"
        );
    }
}

/// Vein density (vein length per area). Boyce et al. 2009, Proc. R. Soc. B 276:1771: angiosperm
/// leaves average about 8 mm/mm^2, most between about 2 and 25 mm/mm^2. LOOSE band [2, 25].
#[test]
fn leaf_vein_density_is_in_the_angiosperm_range() {
    for name in LEAF_PRESETS {
        let (_, view) = grow_preset(name);
        let density = view.metrics.vein_density.expect("leaf area is positive");
        assert!(
            (2.0..=25.0).contains(&density),
            "{name}: vein density {density} mm/mm^2 outside the loose range 2-25"
        );
        // Independently: the length of the conducting segments (the veins; below the
        // threshold the cells are tissue) over the occupied area (n cells of h^2).
        let h = view.network.cell_size;
        let area = view.network.cells.occupied.len() as f64 * h * h;
        let length: f64 = view
            .network
            .segments
            .iter()
            .enumerate()
            .filter(|&(index, _)| view.table.conducts.get(index).copied().unwrap_or(true))
            .map(|(_, segment)| {
                let node = &view.network.nodes[segment.from as usize];
                let parent = &view.network.nodes[segment.to as usize];
                ((node.x - parent.x).powi(2) + (node.y - parent.y).powi(2)).sqrt()
            })
            .sum();
        let own = length / area;
        assert!(
            (own - density).abs() <= 1e-9 * density,
            "{name}: vein density {density} vs length / area {own}"
        );
    }
}

/// Highest Strahler order (Strahler 1957 ordering). From memory, not from a table: leaves show
/// about 5 to 7 vein orders (midrib, secondaries, tertiaries, minor veins). LOOSE band [4, 10].
#[test]
fn leaf_vein_hierarchy_has_several_orders() {
    for name in LEAF_PRESETS {
        let (_, view) = grow_preset(name);
        let order = view.metrics.max_strahler_order.expect("a leaf is a forest");
        assert!(
            (4..=10).contains(&order),
            "{name}: highest Strahler order {order} outside the loose range 4-10"
        );
    }
}

/// Mean branching angle. From memory, not from a table: leaf veins branch mostly at acute to
/// right angles. LOOSE band [30, 90] degrees.
#[test]
fn leaf_branching_angles_are_acute_to_right() {
    for name in LEAF_PRESETS {
        let (_, view) = grow_preset(name);
        let count = view.metrics.branching_angle_count;
        assert!(count >= 100, "{name}: only {count} branching angles");
        let mean = view
            .metrics
            .branching_angle_mean
            .expect("a leaf has bifurcations");
        assert!(
            (30.0..=90.0).contains(&mean),
            "{name}: mean branching angle {mean} degrees outside the loose range 30-90"
        );
    }
}

/// The petiole is at the base: for the open-growth leaves the root lies in the lowest fifth
/// (rows grow down the page) of the grown cells' bounding box. A cordate (heart-shaped) blade,
/// the filled outline, has its petiole in the sinus between two basal lobes that hang below it,
/// so for every leaf the check is also made along the midline: the root lies in the lowest fifth
/// of the occupied cells of its own column.
#[test]
fn leaf_root_sits_at_the_base() {
    for name in LEAF_PRESETS {
        let (params, view) = grow_preset(name);
        let root = &params.domain.roots[0];
        let width = view.network.cells.width;
        let midline_rows: Vec<u32> = view
            .network
            .cells
            .occupied
            .iter()
            .filter(|&&cell| cell % width == root.x)
            .map(|&cell| cell / width)
            .collect();
        let top = *midline_rows
            .iter()
            .min()
            .expect("the root column is occupied");
        let bottom = *midline_rows
            .iter()
            .max()
            .expect("the root column is occupied");
        let along_midline = (root.y - top) as f64 / (bottom - top) as f64;
        assert!(
            along_midline >= 0.8,
            "{name}: root row {} at {along_midline:.2} of the midline (rows {top}..{bottom})",
            root.y
        );
        if name == "filled-outline" {
            continue;
        }
        let (_, _, top, bottom) = cell_box(&view);
        let from_top = (root.y - top) as f64 / (bottom - top) as f64;
        assert!(
            from_top >= 0.8,
            "{name}: root row {} at {from_top:.2} of the blade height (rows {top}..{bottom})",
            root.y
        );
    }
}

/// A narrow leaf is longer than wide: the grown cells' bounding box is taller than 1.2 times its
/// width, and so is the covariance aspect ratio.
#[test]
fn narrow_leaf_is_longer_than_wide() {
    let (_, view) = grow_preset("narrow-leaf");
    let (left, right, top, bottom) = cell_box(&view);
    let ratio = (bottom - top + 1) as f64 / (right - left + 1) as f64;
    assert!(ratio > 1.2, "narrow-leaf: length / width = {ratio}");
    let aspect = view
        .metrics
        .aspect_ratio
        .expect("cells are not on one line");
    assert!(
        aspect > 1.2,
        "narrow-leaf: covariance aspect ratio {aspect}"
    );
}

/// The drainage site grows around its building: no node lies in an obstacle cell (a cell whose
/// centre is inside the obstacle polygon, here an axis-aligned rectangle).
#[test]
fn drainage_site_keeps_obstacles_empty() {
    let (params, view) = grow_preset("drainage-site");
    assert!(!params.domain.obstacles.is_empty());
    let h = params.domain.cell_size;
    let mut blocked_cells = 0;
    for obstacle in &params.domain.obstacles {
        let xs = obstacle.iter().map(|point| point[0]);
        let ys = obstacle.iter().map(|point| point[1]);
        let (x0, x1) = (
            xs.clone().fold(f64::MAX, f64::min),
            xs.fold(f64::MIN, f64::max),
        );
        let (y0, y1) = (
            ys.clone().fold(f64::MAX, f64::min),
            ys.fold(f64::MIN, f64::max),
        );
        assert_eq!(obstacle.len(), 4, "the preset's obstacle is a rectangle");
        let inside = |column: f64, row: f64| {
            let (cx, cy) = (column + 0.5, row + 0.5);
            cx > x0 && cx < x1 && cy > y0 && cy < y1
        };
        for row in 0..params.domain.height {
            for column in 0..params.domain.width {
                if inside(column as f64, row as f64) {
                    blocked_cells += 1;
                }
            }
        }
        for (index, node) in view.network.nodes.iter().enumerate() {
            let (column, row) = ((node.x / h).floor(), (node.y / h).floor());
            assert!(
                !inside(column, row),
                "node {index} at ({}, {}) lies in obstacle cell ({column}, {row})",
                node.x,
                node.y
            );
        }
        for &cell in &view.network.cells.occupied {
            let (column, row) = (cell % params.domain.width, cell / params.domain.width);
            assert!(
                !inside(column as f64, row as f64),
                "obstacle cell ({column}, {row}) is occupied"
            );
        }
    }
    assert!(blocked_cells > 100, "the obstacle covers cells");
    // The network does surround the building: cells on both sides of it are occupied.
    let occupied_columns: Vec<u32> = view
        .network
        .cells
        .occupied
        .iter()
        .map(|cell| cell % params.domain.width)
        .collect();
    assert!(occupied_columns.iter().any(|&column| column < 60));
    assert!(occupied_columns.iter().any(|&column| column >= 95));
}
