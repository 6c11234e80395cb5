//! Networks written by `ramulus_core::network_export` (GeoJSON, CSV edge lists) and by
//! `ramulus_draw::run_svg`, read back by the specimen importer, measure the same: counts
//! exactly (after the crossings the importer splits, each adding one node, two segments and
//! so one loop by the cyclomatic number E - V + C, Kirchhoff 1847), lengths to rounding,
//! loops and areoles included, the outline's area by the shoelace formula (Braden 1986)
//! equal to the grown cells' area, and widths through the CSV width column.

use ramulus_core::growth::Growth;
use ramulus_core::metrics::Metrics;
use ramulus_core::network::{CellSet, Network, Node, Segment};
use ramulus_core::network_export::{cells_outline, network_edge_csv, network_geojson};
use ramulus_core::params::Params;
use ramulus_core::run::RunView;
use ramulus_core::specimen::{
    build_specimen, read_trace, ring_area, Repair, ScaleRule, Specimen, SpecimenOptions,
};
use ramulus_draw::{run_svg, Colouring};
use ramulus_tests::tree_presets::tree_preset;

fn options(units: &str) -> SpecimenOptions {
    SpecimenOptions {
        units: Some(units.to_string()),
        scale: ScaleRule::FromFile,
        snap_tolerance: Some(0.0),
        ..SpecimenOptions::default()
    }
}

fn grown(seed: u64, cells: u64) -> RunView {
    let mut params = tree_preset("broad-leaf").expect("preset");
    params.run.cells = cells;
    params.run.seed = seed;
    let mut growth = Growth::new(&params).expect("valid");
    growth.run();
    RunView::new(growth.network(), &params).expect("a forest")
}

/// The cell count of the largest 4-connected part of the occupied cells (breadth-first fill).
fn largest_four_connected(cells: &CellSet) -> usize {
    let width = cells.width as usize;
    let height = cells.height as usize;
    let mut occupied = vec![false; width * height];
    for &cell in &cells.occupied {
        occupied[cell as usize] = true;
    }
    let mut seen = vec![false; width * height];
    let mut largest = 0;
    for start in 0..occupied.len() {
        if !occupied[start] || seen[start] {
            continue;
        }
        seen[start] = true;
        let mut queue = std::collections::VecDeque::from([start]);
        let mut count = 0;
        while let Some(cell) = queue.pop_front() {
            count += 1;
            let (x, y) = (cell % width, cell / width);
            let mut next = Vec::with_capacity(4);
            if x > 0 {
                next.push(cell - 1);
            }
            if x + 1 < width {
                next.push(cell + 1);
            }
            if y > 0 {
                next.push(cell - width);
            }
            if y + 1 < height {
                next.push(cell + width);
            }
            for neighbour in next {
                if occupied[neighbour] && !seen[neighbour] {
                    seen[neighbour] = true;
                    queue.push_back(neighbour);
                }
            }
        }
        largest = largest.max(count);
    }
    largest
}

fn measured(specimen: &Specimen) -> Metrics {
    RunView::new(specimen.network.clone(), &Params::default())
        .expect("valid")
        .metrics
}

fn crossings(specimen: &Specimen) -> u64 {
    specimen
        .report
        .repairs
        .iter()
        .filter(|repair| matches!(repair, Repair::SplitCrossing { .. }))
        .count() as u64
}

/// Counts after the importer's crossing splits, and the total length.
fn check_same(grown: &Metrics, back: &Metrics, crossings: u64, tolerance: f64, case: &str) {
    assert_eq!(
        back.node_count,
        grown.node_count + crossings,
        "{case}: nodes"
    );
    assert_eq!(
        back.segment_count,
        grown.segment_count + 2 * crossings,
        "{case}: segments"
    );
    assert_eq!(back.component_count, grown.component_count, "{case}");
    assert_eq!(
        back.loop_count,
        grown.loop_count + crossings,
        "{case}: loops"
    );
    let relative = (back.total_length - grown.total_length).abs() / grown.total_length;
    assert!(
        relative <= tolerance,
        "{case}: lengths differ by {relative}"
    );
    if crossings == 0 {
        assert_eq!(back.junction_count, grown.junction_count, "{case}");
        assert_eq!(back.tip_count, grown.tip_count, "{case}");
        assert_eq!(back.max_strahler_order, grown.max_strahler_order, "{case}");
    }
}

/// Grown leaves through GeoJSON and through a CSV edge list: full-precision coordinates, so
/// lengths agree to a few units in the last place (1e-12 relative); the outline's shoelace
/// area is a whole number of cells, close to the grown cells' area.
#[test]
fn grown_leaves_round_trip_through_geojson_and_csv() {
    let mut without_crossings = 0;
    for (seed, cells) in [(1, 700), (2, 80), (3, 150), (4, 300)] {
        let view = grown(seed, cells);
        let network = &view.network;
        let outline = cells_outline(&network.cells, network.cell_size).expect("cells");
        let geojson = network_geojson(network, Some(&view.table.width), Some(&outline));
        let specimen = build_specimen(geojson.as_bytes(), &options("mm")).expect("reads");
        let split = crossings(&specimen);
        without_crossings += usize::from(split == 0);
        let case = format!("GeoJSON, seed {seed}, {cells} cells, {split} crossings");
        let back = measured(&specimen);
        check_same(&view.metrics, &back, split, 1e-12, &case);
        assert_eq!(back.areoles, Some(back.loop_count), "{case}: areoles");
        let area = ring_area(specimen.outline.as_deref().expect("outline"));
        // Traced along cell edges: a whole number of cells; cells joined to the blade only
        // at a corner fall outside its largest 4-connected part, holes fall inside.
        let cell_area = network.cell_size * network.cell_size;
        let in_cells = area / cell_area;
        assert!(
            (in_cells - in_cells.round()).abs() < 1e-6,
            "{case}: {in_cells} cells"
        );
        // At least the largest 4-connected part (counted here by a plain flood fill), at most
        // a few hole cells more than every grown cell.
        let cells_area = network.area;
        let part = largest_four_connected(&network.cells) as f64 * cell_area;
        assert!(
            area >= part - 1e-9 * part && area <= cells_area * 1.05,
            "{case}: outline {area}, largest part {part}, cells {cells_area}"
        );
        assert!((back.area - area).abs() <= 1e-9 * area, "{case}");

        // Widths ride along as the features' `width` property.
        let trace = read_trace(geojson.as_bytes(), 0.01, Some(1.0)).expect("reads");
        let widths: Vec<f64> = trace.lines.iter().filter_map(|line| line.width).collect();
        assert_eq!(widths, view.table.width, "GeoJSON widths, seed {seed}");
        assert_eq!(trace.root_marks.len(), 1, "the root as a Point");

        let csv = network_edge_csv(network, Some(&view.table.width));
        let trace = read_trace(csv.as_bytes(), 0.01, Some(1.0)).expect("reads");
        let widths: Vec<f64> = trace.lines.iter().filter_map(|line| line.width).collect();
        assert_eq!(widths, view.table.width, "CSV widths, seed {seed}");
        // A CSV edge list has no root mark: the root is stated, as --root would.
        let root = view.topology().expect("a forest").order[0] as usize;
        let stated = SpecimenOptions {
            root: Some((network.nodes[root].x, network.nodes[root].y)),
            ..options("mm")
        };
        let specimen = build_specimen(csv.as_bytes(), &stated).expect("reads");
        let case = format!("CSV, seed {seed}, {cells} cells");
        check_same(
            &view.metrics,
            &measured(&specimen),
            crossings(&specimen),
            1e-12,
            &case,
        );
    }
    assert!(
        without_crossings >= 1,
        "no case compared the topology exactly"
    );
}

/// A looped network (a 4 x 3 grid of 2 mm squares with a free-ending veinlet in one, 21
/// nodes, 32 segments) through GeoJSON, CSV and SVG: 12 loops and 12 areoles of 4 mm^2
/// (Euler's formula for plane graphs: E - V + C bounded faces), the veinlet counted in its
/// areole, the same length (31 x 2 mm + sqrt 2 mm for the veinlet).
#[test]
fn a_looped_network_round_trips_with_its_areoles() {
    let (columns, rows) = (5u32, 4u32);
    let mut nodes: Vec<Node> = (0..rows)
        .flat_map(|row| {
            (0..columns).map(move |column| Node {
                x: 2.0 * column as f64,
                y: 2.0 * row as f64,
                weight: 1.0,
            })
        })
        .collect();
    let mut segments = Vec::new();
    for row in 0..rows {
        for column in 0..columns {
            let here = row * columns + column;
            if column + 1 < columns {
                segments.push(Segment {
                    from: here + 1,
                    to: here,
                });
            }
            if row + 1 < rows {
                segments.push(Segment {
                    from: here + columns,
                    to: here,
                });
            }
        }
    }
    nodes.push(Node {
        x: 1.0,
        y: 1.0,
        weight: 1.0,
    });
    segments.push(Segment { from: 20, to: 0 });
    let grid = Network {
        nodes,
        segments,
        area: 48.0,
        units: "mm".to_string(),
        ..Network::default()
    };
    let params = Params::default();
    let view = RunView::new(grid, &params).expect("valid");
    let m = &view.metrics;
    assert_eq!((m.loop_count, m.areoles), (12, Some(12)));
    assert_eq!(m.veinlets_per_areole, Some(1.0 / 12.0));
    let outline = [(0.0, 0.0), (8.0, 0.0), (8.0, 6.0), (0.0, 6.0)];
    let files = [
        (
            "GeoJSON",
            network_geojson(&view.network, None, Some(&outline)),
            options("mm"),
        ),
        ("CSV", network_edge_csv(&view.network, None), options("mm")),
        (
            "SVG",
            run_svg(&view, &params, Colouring::Plain),
            options("mm"),
        ),
    ];
    for (name, text, options) in files {
        let specimen = build_specimen(text.as_bytes(), &options).expect("reads");
        let back = measured(&specimen);
        assert_eq!(back.node_count, 21, "{name}");
        assert_eq!(back.segment_count, 32, "{name}");
        assert_eq!(back.loop_count, 12, "{name}");
        assert_eq!(back.areoles, Some(12), "{name}");
        assert_eq!(back.mean_areole_area, Some(4.0), "{name}");
        assert_eq!(back.veinlets_per_areole, Some(1.0 / 12.0), "{name}");
        let length = 62.0 + 2f64.sqrt();
        assert!(
            (back.total_length - length).abs() < 1e-9,
            "{name}: {}",
            back.total_length
        );
        if name == "GeoJSON" {
            assert_eq!(back.area, 48.0, "{name}: the outline's shoelace area");
        }
    }
}
