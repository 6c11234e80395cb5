//! Areole metrics (`Metrics::areoles` and friends) against outside references: Euler's
//! formula for plane graphs on hand-built graphs and on imported specimens, face areas by the
//! shoelace formula against areas computed by hand, and a drawing with crossing segments,
//! which has no faces to count.

use ramulus_core::metrics::{measure, Metrics};
use ramulus_core::network::{Network, Node, Segment};
use ramulus_core::specimen::{build_specimen, ScaleRule, SpecimenOptions};

fn network(points: &[(f64, f64)], edges: &[(u32, u32)], area: f64) -> Network {
    Network {
        nodes: points
            .iter()
            .map(|&(x, y)| Node { x, y, weight: 1.0 })
            .collect(),
        segments: edges
            .iter()
            .map(|&(from, to)| Segment { from, to })
            .collect(),
        area,
        units: "mm".to_string(),
        ..Network::default()
    }
}

fn metrics(network: &Network) -> Metrics {
    measure(network, 0.5).expect("a valid network")
}

/// Euler's formula for a plane graph with C components, V - E + F = 1 + C (Euler 1758; for
/// several components Bondy & Murty 2008, Graph Theory, GTM 244, corollary 10.2 and exercise
/// 10.2.1): the bounded faces number F - 1 = E - V + C.
fn euler_bounded_faces(metrics: &Metrics) -> u64 {
    metrics.segment_count + metrics.component_count - metrics.node_count
}

/// A grid of `columns x rows` squares of side `side`.
fn grid(columns: u32, rows: u32, side: f64) -> Network {
    let mut points = Vec::new();
    for row in 0..=rows {
        for column in 0..=columns {
            points.push((side * column as f64, side * row as f64));
        }
    }
    let mut edges = Vec::new();
    let width = columns + 1;
    for row in 0..=rows {
        for column in 0..=columns {
            let here = row * width + column;
            if column < columns {
                edges.push((here, here + 1));
            }
            if row < rows {
                edges.push((here, here + width));
            }
        }
    }
    let area = side * side * (columns * rows) as f64;
    network(&points, &edges, area)
}

/// A 4 x 3 grid of squares of side 2 mm: 20 nodes, 31 segments, one component, so
/// E - V + C = 12 bounded faces, each a square of 2 x 2 = 4 mm^2 (12 per 48 mm^2 = 0.25 per
/// mm^2, no spread). Loopiness is the cyclomatic number per area, 12 / 48.
#[test]
fn a_grid_of_squares_has_one_areole_per_square() {
    let grid = grid(4, 3, 2.0);
    let m = metrics(&grid);
    assert_eq!((m.node_count, m.segment_count), (20, 31));
    assert_eq!(m.areoles, Some(euler_bounded_faces(&m)));
    assert_eq!(m.areoles, Some(12));
    assert_eq!(m.mean_areole_area, Some(4.0));
    assert_eq!(m.areole_area_sd, Some(0.0));
    assert_eq!(m.areole_density, Some(0.25));
    assert_eq!(m.loopiness, Some(0.25));
    assert_eq!(m.veinlets_per_areole, Some(0.0));
}

/// Nested squares: an outer square of side 4 and an inner one of side 2 sharing the centre,
/// joined corner to corner. V = 8, E = 12, C = 1: 5 bounded faces. By hand: the inner square,
/// 2 x 2 = 4 mm^2, and four trapezoids with parallel sides 4 and 2 and height 1, each
/// (4 + 2) / 2 x 1 = 3 mm^2 (the area of a trapezoid). Mean 16 / 5 = 3.2; sample variance
/// (0.8^2 + 4 x 0.2^2) / 4 = 0.2.
#[test]
fn nested_squares_have_the_hand_computed_face_areas() {
    let points = [
        (0.0, 0.0),
        (4.0, 0.0),
        (4.0, 4.0),
        (0.0, 4.0),
        (1.0, 1.0),
        (3.0, 1.0),
        (3.0, 3.0),
        (1.0, 3.0),
    ];
    let edges = [
        (0, 1),
        (1, 2),
        (2, 3),
        (3, 0),
        (4, 5),
        (5, 6),
        (6, 7),
        (7, 4),
        (0, 4),
        (1, 5),
        (2, 6),
        (3, 7),
    ];
    let m = metrics(&network(&points, &edges, 16.0));
    assert_eq!(m.areoles, Some(euler_bounded_faces(&m)));
    assert_eq!(m.areoles, Some(5));
    let mean = m.mean_areole_area.expect("areoles");
    assert!((mean - 3.2).abs() < 1e-12, "mean {mean}");
    let sd = m.areole_area_sd.expect("several areoles");
    assert!((sd - 0.2f64.sqrt()).abs() < 1e-12, "sd {sd}");

    // Without the joining segments: two components, E - V + C = 8 - 8 + 2 = 2 faces, the
    // inner square (4 mm^2) and the ring around it, whose walk encloses the whole outer
    // square (16 mm^2; an island counts in the area of the face it lies in).
    let m = metrics(&network(&points, &edges[..8], 16.0));
    assert_eq!(m.component_count, 2);
    assert_eq!(m.areoles, Some(euler_bounded_faces(&m)));
    assert_eq!(m.areoles, Some(2));
    assert_eq!(m.mean_areole_area, Some(10.0));
}

/// A square with a free-ending veinlet inside (a spur from a corner toward the centre) and
/// one outside: one areole of area 1, one veinlet inside it, so 1 veinlet per areole; the
/// spur adds a node and a segment, so E - V + C stays 1.
#[test]
fn veinlets_inside_an_areole_are_counted_once() {
    let points = [
        (0.0, 0.0),
        (1.0, 0.0),
        (1.0, 1.0),
        (0.0, 1.0),
        (0.5, 0.5),
        (2.0, 2.0),
    ];
    let edges = [(0, 1), (1, 2), (2, 3), (3, 0), (4, 0), (5, 2)];
    let m = metrics(&network(&points, &edges, 4.0));
    assert_eq!(m.areoles, Some(1));
    assert_eq!(m.mean_areole_area, Some(1.0));
    assert_eq!(m.tip_count, 2, "one veinlet inside, one outside");
    assert_eq!(m.veinlets_per_areole, Some(1.0));
}

/// A tree has no loop and so no areole (E - V + C = 0), whatever its drawing.
#[test]
fn a_tree_has_no_areole() {
    let points = [
        (0.0, 0.0),
        (0.0, -1.0),
        (-1.0, -2.0),
        (1.0, -2.0),
        (1.0, -3.0),
    ];
    let edges = [(1, 0), (2, 1), (3, 1), (4, 3)];
    let m = metrics(&network(&points, &edges, 4.0));
    assert_eq!(euler_bounded_faces(&m), 0);
    assert_eq!(m.areoles, Some(0));
    assert_eq!(m.mean_areole_area, None);
    assert_eq!(m.veinlets_per_areole, None);
    assert_eq!(m.loopiness, Some(0.0));
}

/// A loop drawn with two segments crossing without a junction (a bow tie) is no plane
/// graph: Euler's formula does not hold for its drawing, so the areoles are absent rather
/// than wrong; loopiness, which needs no drawing, is still given.
#[test]
fn crossing_segments_leave_the_areoles_absent() {
    let points = [(0.0, 0.0), (2.0, 2.0), (2.0, 0.0), (0.0, 2.0)];
    let edges = [(0, 1), (1, 2), (2, 3), (3, 0)];
    let m = metrics(&network(&points, &edges, 4.0));
    assert_eq!(m.loop_count, 1);
    assert_eq!(m.areoles, None);
    assert_eq!(m.areole_density, None);
    assert_eq!(m.loopiness, Some(0.25));
}

/// Imported specimens are plane (crossings split, ends merged): their areoles follow Euler's
/// formula. The shipped hand-traced leaf and a CSV of two crossing squares, whose crossings
/// the importer splits: squares [0,4]^2 and [2,6]^2 overlap in [2,4]^2, giving 3 bounded
/// faces of 12, 4 and 12 mm^2 (hand computed: 16 - 4 each side, and the overlap).
#[test]
fn imported_specimens_follow_euler_formula() {
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("..");
    let leaf = std::fs::read(root.join("examples/specimens/hand-traced-leaf.svg")).unwrap();
    let specimen = build_specimen(&leaf, &SpecimenOptions::default()).expect("reads");
    let m = metrics(&specimen.network);
    assert!(m.loop_count > 0, "the traced leaf has loops");
    assert_eq!(m.areoles, Some(euler_bounded_faces(&m)));

    let csv =
        "x1,y1,x2,y2\n0,0,4,0\n4,0,4,4\n4,4,0,4\n0,4,0,0\n2,2,6,2\n6,2,6,6\n6,6,2,6\n2,6,2,2\n";
    let options = SpecimenOptions {
        units: Some("mm".into()),
        scale: ScaleRule::FromFile,
        snap_tolerance: Some(0.0),
        ..SpecimenOptions::default()
    };
    let specimen = build_specimen(csv.as_bytes(), &options).expect("reads");
    let m = metrics(&specimen.network);
    assert_eq!(m.areoles, Some(euler_bounded_faces(&m)));
    assert_eq!(m.areoles, Some(3));
    let mean = m.mean_areole_area.unwrap();
    let sd = m.areole_area_sd.unwrap();
    // 12, 4, 12: mean 28 / 3, sample variance ((8/3)^2 x 2 + (16/3)^2) / 2 = 64 / 3.
    assert!((mean - 28.0 / 3.0).abs() < 1e-9, "mean {mean}");
    assert!((sd - (64.0f64 / 3.0).sqrt()).abs() < 1e-9, "sd {sd}");
}
