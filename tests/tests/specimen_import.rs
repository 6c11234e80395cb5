//! Traced specimens (`ramulus_core::specimen`) against outside references: networks grown here
//! and drawn by `ramulus_draw::run_svg` read back to the same lengths and counts; Euler's
//! formula for the areoles of imported graphs (faces traced independently of the importer);
//! path commands, transforms and physical sizes against the SVG 1.1 specification; curve
//! flattening against the closed-form length of a circle; GeoJSON examples of RFC 7946; and
//! bad input named by element, feature, line or byte.

use ramulus_core::growth::Growth;
use ramulus_core::network::{CellSet, Network, Node, Segment};
use ramulus_core::params::Params;
use ramulus_core::presets::preset;
use ramulus_core::run::RunView;
use ramulus_core::specimen::{
    build_specimen, read_trace, Repair, ScaleRule, Specimen, SpecimenError, SpecimenOptions,
};
use ramulus_draw::{run_svg, Colouring};

const PI: f64 = core::f64::consts::PI;

fn options(scale: ScaleRule, units: Option<&str>, snap: Option<f64>) -> SpecimenOptions {
    SpecimenOptions {
        units: units.map(str::to_string),
        scale,
        snap_tolerance: snap,
        ..SpecimenOptions::default()
    }
}

fn build(bytes: &[u8], options: &SpecimenOptions) -> Specimen {
    build_specimen(bytes, options).unwrap_or_else(|error| panic!("not read: {error}"))
}

fn measure(specimen: &Specimen) -> RunView {
    RunView::new(specimen.network.clone(), &Params::default()).expect("a valid network")
}

/// Faces of a plane drawing of the network, traced around every node in angular order: each
/// half-edge u->v is followed by v->w, w the neighbour of v next clockwise after u. A graph
/// of C components with no lone node gives one outer boundary per component.
fn traced_faces(network: &Network) -> usize {
    let count = network.nodes.len();
    let mut around: Vec<Vec<u32>> = vec![Vec::new(); count];
    for segment in &network.segments {
        around[segment.from as usize].push(segment.to);
        around[segment.to as usize].push(segment.from);
    }
    let angle = |from: u32, to: u32| {
        let (a, b) = (network.nodes[from as usize], network.nodes[to as usize]);
        libm::atan2(b.y - a.y, b.x - a.x)
    };
    for (node, list) in around.iter_mut().enumerate() {
        list.sort_by(|&p, &q| {
            angle(node as u32, p)
                .partial_cmp(&angle(node as u32, q))
                .unwrap()
        });
    }
    let mut visited = std::collections::HashSet::new();
    let mut faces = 0;
    for segment in &network.segments {
        for (start_u, start_v) in [(segment.from, segment.to), (segment.to, segment.from)] {
            if visited.contains(&(start_u, start_v)) {
                continue;
            }
            faces += 1;
            let (mut u, mut v) = (start_u, start_v);
            while visited.insert((u, v)) {
                let list = &around[v as usize];
                let position = list.iter().position(|&w| w == u).unwrap();
                let w = list[(position + list.len() - 1) % list.len()];
                (u, v) = (v, w);
            }
        }
    }
    faces
}

/// Euler's formula for a plane graph with C components, V - E + F = 1 + C (Euler 1758; for
/// several components e.g. Bondy & Murty 2008, Graph Theory, GTM 244, corollary 10.2 and
/// exercise 10.2.1), F counting the one outer face. Tracing gives one outer boundary per
/// component, so F = traced - C + 1, and the areoles (bounded faces) number F - 1 = E - V + C,
/// the network's `loop_count`. A drawing with unsplit crossings is not a plane graph and fails.
fn check_euler(specimen: &Specimen, name: &str) {
    let view = measure(specimen);
    let metrics = &view.metrics;
    let (v, e, c) = (
        metrics.node_count as i64,
        metrics.segment_count as i64,
        metrics.component_count as i64,
    );
    let faces = traced_faces(&specimen.network) as i64 - c + 1;
    assert_eq!(
        v - e + faces,
        1 + c,
        "{name}: Euler's formula V - E + F = 1 + C"
    );
    assert_eq!(
        metrics.loop_count as i64,
        faces - 1,
        "{name}: areoles (bounded faces) equal the loop count"
    );
    assert_eq!(
        metrics.areoles,
        Some((faces - 1) as u64),
        "{name}: the metric table's areoles equal the faces traced here"
    );
}

/// A broad leaf grown here with a small budget.
fn grown(seed: u64, cells: u64) -> (RunView, Params) {
    let mut params = preset("broad-leaf").expect("preset");
    params.run.cells = cells;
    params.run.seed = seed;
    let mut growth = Growth::new(&params).expect("valid parameters");
    growth.run();
    let view = RunView::new(growth.network(), &params).expect("a forest");
    (view, params)
}

/// A grown network drawn by `run_svg` and read back measures the same: every segment is a
/// `<line>` whose ends are printed alike wherever nodes are shared, the drawn root circle
/// (labelled `root`) gives the root, the band's legend and background are skipped. Grown
/// networks may cross themselves; the importer splits each crossing into a junction, adding
/// one node, two segments and so one loop (the cyclomatic number E - V + C, Kirchhoff 1847).
/// Counts must match exactly after those; the total length within the rounding of the printed
/// coordinates (at most 1e-3 relative here). Where nothing was split, Strahler orders
/// (Strahler 1957), junctions and tips depend on topology only and must match too: seeds 2
/// and 3 at 80 cells grow no crossing (checked below, so the comparison always runs).
#[test]
fn a_grown_network_round_trips_through_its_svg() {
    let mut compared_orders = 0;
    for (seed, cells) in [(1, 700), (2, 80), (3, 80), (3, 150), (4, 300)] {
        let (view, params) = grown(seed, cells);
        let svg = run_svg(&view, &params, Colouring::ByOrder);
        let specimen = build(
            svg.as_bytes(),
            &options(ScaleRule::FromFile, Some("mm"), Some(0.0)),
        );
        let back = measure(&specimen);
        let crossings = specimen
            .report
            .repairs
            .iter()
            .filter(|repair| matches!(repair, Repair::SplitCrossing { .. }))
            .count() as u64;
        let case = format!("seed {seed}, {cells} cells, {crossings} crossings");
        let (grown_m, back_m) = (&view.metrics, &back.metrics);
        assert_eq!(back_m.node_count, grown_m.node_count + crossings, "{case}");
        assert_eq!(
            back_m.segment_count,
            grown_m.segment_count + 2 * crossings,
            "{case}"
        );
        assert_eq!(back_m.component_count, 1, "{case}");
        assert_eq!(back_m.loop_count, grown_m.loop_count + crossings, "{case}");
        let relative = (back_m.total_length - grown_m.total_length).abs() / grown_m.total_length;
        assert!(relative < 1e-3, "{case}: lengths differ by {relative}");
        if crossings == 0 {
            compared_orders += 1;
            assert_eq!(
                back_m.max_strahler_order, grown_m.max_strahler_order,
                "{case}"
            );
            assert_eq!(back_m.junction_count, grown_m.junction_count, "{case}");
            assert_eq!(back_m.tip_count, grown_m.tip_count, "{case}");
            assert_eq!(back_m.root_count, 1, "{case}");
            assert_eq!(back_m.streams.len(), grown_m.streams.len(), "{case}");
            for (a, b) in back_m.streams.iter().zip(&grown_m.streams) {
                assert_eq!(a.stream_count, b.stream_count, "{case}, order {}", a.order);
            }
        }
        check_euler(&specimen, &case);
    }
    assert!(compared_orders >= 2, "too few cases without crossings");
}

/// A looped network: a grid of 4 x 3 square cells of side 2 mm (20 nodes, 31 segments). By
/// Euler's formula it has E - V + 1 = 12 bounded faces, the 12 squares: drawn by `run_svg`
/// and read back, it must measure 12 loops, one component, the same length (31 x 2 mm).
#[test]
fn a_looped_grid_round_trips_with_its_areoles() {
    let (columns, rows) = (5u32, 4u32);
    let nodes: Vec<Node> = (0..rows)
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
    let grid = Network {
        nodes,
        segments,
        area: 48.0,
        units: "mm".to_string(),
        cell_size: 0.0,
        cells: CellSet::default(),
    };
    let params = Params::default();
    let view = RunView::new(grid, &params).expect("valid");
    assert_eq!(view.metrics.loop_count, 12);
    let svg = run_svg(&view, &params, Colouring::Plain);
    let specimen = build(
        svg.as_bytes(),
        &options(ScaleRule::FromFile, Some("mm"), Some(0.0)),
    );
    let back = measure(&specimen);
    assert_eq!(back.metrics.node_count, 20);
    assert_eq!(back.metrics.segment_count, 31);
    assert_eq!(back.metrics.loop_count, 12);
    assert_eq!(back.metrics.component_count, 1);
    assert!((back.metrics.total_length - 62.0).abs() < 1e-9);
    check_euler(&specimen, "grid");
}

fn svg(body: &str) -> String {
    format!(
        "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"100mm\" height=\"100mm\" \
         viewBox=\"0 0 100 100\">{body}</svg>"
    )
}

fn trace_lines(body: &str, tolerance: f64) -> Vec<Vec<(f64, f64)>> {
    read_trace(svg(body).as_bytes(), tolerance, None)
        .unwrap_or_else(|error| panic!("not read: {error}"))
        .lines
        .into_iter()
        .map(|line| line.points)
        .collect()
}

fn polyline_length(points: &[(f64, f64)]) -> f64 {
    points
        .windows(2)
        .map(|pair| ((pair[1].0 - pair[0].0).powi(2) + (pair[1].1 - pair[0].1).powi(2)).sqrt())
        .sum()
}

/// Straight commands, absolute and relative, and closing (SVG 1.1, sections 8.3.2-8.3.4:
/// lowercase commands are relative to the current point; `z` returns to the subpath's start;
/// numbers may pack as `10-5` and `.5.5`). Coordinates worked out by hand.
#[test]
fn straight_path_commands_give_hand_computed_points() {
    let lines = trace_lines(
        r#"<path d="M10 10h5v5H30V30l-5 0L20 20z m1-1 l.5.5"/>"#,
        0.01,
    );
    assert_eq!(
        lines[0],
        vec![
            (10.0, 10.0),
            (15.0, 10.0),
            (15.0, 15.0),
            (30.0, 15.0),
            (30.0, 30.0),
            (25.0, 30.0),
            (20.0, 20.0),
            (10.0, 10.0)
        ]
    );
    // After `z` the current point is the subpath's start (10, 10), so `m1-1` moves to (11, 9).
    assert_eq!(lines[1], vec![(11.0, 9.0), (11.5, 9.5)]);
}

/// Smooth curves reflect the previous control point (SVG 1.1, sections 8.3.6 and 8.3.7). The
/// cubic from (10, 0) with reflected first control (10, -10), then (20, -10), to (20, 0) has
/// its lowest y at t = 1/2: (0 + 3 (-10) + 3 (-10) + 0) / 8 = -7.5; without the reflection it
/// would be -3.75. The quadratic `T` to (20, 0) after Q 5 10 reflects (5, 10) to (15, -10),
/// so its extreme is (0 + 2 (-10) + 0) / 4 = -5, where no reflection gives a straight line.
#[test]
fn smooth_curves_reflect_the_previous_control_point() {
    let tolerance = 0.001;
    let lowest = |points: &[(f64, f64)]| points.iter().map(|p| p.1).fold(f64::MAX, f64::min);
    let cubic = trace_lines(r#"<path d="M0 0C0 10 10 10 10 0S20-10 20 0"/>"#, tolerance);
    assert!(
        (lowest(&cubic[0]) + 7.5).abs() <= tolerance,
        "{}",
        lowest(&cubic[0])
    );
    let relative = trace_lines(r#"<path d="m0 0c0 10 10 10 10 0s10-10 10 0"/>"#, tolerance);
    assert!((lowest(&relative[0]) + 7.5).abs() <= tolerance);
    let quadratic = trace_lines(r#"<path d="M0 0Q5 10 10 0T20 0"/>"#, tolerance);
    assert!((lowest(&quadratic[0]) + 5.0).abs() <= tolerance);
    let relative = trace_lines(r#"<path d="M0 0q5 10 10 0t10 0"/>"#, tolerance);
    assert!((lowest(&relative[0]) + 5.0).abs() <= tolerance);
}

/// An arc `a 5 5 0 0 1 10 0` from (0, 0) is the half circle about (5, 0) through angles
/// increasing from 180 degrees (SVG 1.1, F.6.5: sweep flag 1 is the positive-angle
/// direction), so it passes (5, -5) in y-down coordinates; every point lies on the circle.
#[test]
fn a_relative_arc_is_the_half_circle_the_specification_gives() {
    let lines = trace_lines(r#"<path d="M0 0a5 5 0 0 1 10 0"/>"#, 0.001);
    let points = &lines[0];
    assert_eq!(points.last(), Some(&(10.0, 0.0)));
    for &(x, y) in points {
        assert!((((x - 5.0).powi(2) + y * y).sqrt() - 5.0).abs() < 1e-9);
        assert!(y <= 1e-12);
    }
    let top = points.iter().map(|p| p.1).fold(f64::MAX, f64::min);
    assert!((top + 5.0).abs() <= 0.001);
    // Radii too small to reach both ends are scaled up (F.6.6): the same half circle.
    let small = trace_lines(r#"<path d="M0 0A1 1 0 0 1 10 0"/>"#, 0.001);
    assert!((small[0].iter().map(|p| p.1).fold(f64::MAX, f64::min) + 5.0).abs() <= 0.001);
}

/// A circle of radius r drawn three ways has length 2 pi r within the flattening tolerance.
/// Pieces within `tol` of a circle enclose the circle of radius r - tol and lie inside the
/// circle, so their length is between 2 pi (r - tol) and 2 pi r (Archimedes, Measurement of a
/// Circle; a convex curve inside another is shorter). Four cubic Beziers with handle
/// 4/3 (sqrt 2 - 1) r stray up to 2.7e-4 r outside the circle (Goldapp 1991, "Approximation
/// of circular arcs by cubic polynomials", CAGD 8, 227-238), which widens the upper bound.
#[test]
fn flattened_circles_have_the_closed_form_length() {
    let r = 10.0;
    let k = 4.0 / 3.0 * (2.0f64.sqrt() - 1.0) * r;
    let bezier = format!(
        "<path d=\"M {r} 0 C {r} {k} {k} {r} 0 {r} C -{k} {r} -{r} {k} -{r} 0 \
         C -{r} -{k} -{k} -{r} 0 -{r} C {k} -{r} {r} -{k} {r} 0 Z\"/>"
    );
    for tolerance in [0.1, 0.01, 0.001] {
        let circumference = 2.0 * PI * r;
        let low = 2.0 * PI * (r - tolerance);
        let arcs = trace_lines(
            &format!("<path d=\"M {r} 0 A {r} {r} 0 0 1 -{r} 0 A {r} {r} 0 0 1 {r} 0\"/>"),
            tolerance,
        );
        let element = trace_lines(&format!("<circle cx=\"0\" cy=\"0\" r=\"{r}\"/>"), tolerance);
        for (name, points) in [("arcs", &arcs[0]), ("circle", &element[0])] {
            let length = polyline_length(points);
            assert!(
                length >= low && length <= circumference + 1e-9,
                "{name} at tolerance {tolerance}: {length}"
            );
        }
        let curves = trace_lines(&bezier, tolerance);
        let length = polyline_length(&curves[0]);
        assert!(
            length >= low && length <= circumference * (1.0 + 2.8e-4),
            "Beziers at tolerance {tolerance}: {length}"
        );
    }
}

/// Nested transforms (SVG 1.1, section 7.5, "Nested transformations": the inner transform
/// applies first). `translate(10,20) rotate(90)` takes (1, 0) to (0, 1), then to (10, 21);
/// `scale(2,3)` takes (1, 1) to (2, 3); `rotate(90 5 5)` is translate(5,5) rotate(90)
/// translate(-5,-5) (section 7.6) and takes (6, 5) to (5, 6); `skewX(45)` takes (0, 1) to
/// (tan 45 = 1, 1); `matrix(a b c d e f)` maps (x, y) to (a x + c y + e, b x + d y + f).
#[test]
fn nested_transforms_follow_the_specification() {
    let check = |body: &str, expected: (f64, f64)| {
        let lines = trace_lines(body, 0.01);
        let (x, y) = lines[0][1];
        assert!(
            (x - expected.0).abs() < 1e-12 && (y - expected.1).abs() < 1e-12,
            "{body}: ({x}, {y})"
        );
    };
    check(
        r#"<g transform="translate(10,20)"><g transform="rotate(90)"><line x1="0" y1="0" x2="1" y2="0"/></g></g>"#,
        (10.0, 21.0),
    );
    check(
        r#"<g transform="scale(2,3)"><path d="M0 0L1 1"/></g>"#,
        (2.0, 3.0),
    );
    check(
        r#"<polyline transform="rotate(90 5 5)" points="5 5 6 5"/>"#,
        (5.0, 6.0),
    );
    check(
        r#"<g transform="skewX(45)"><line x2="0" y2="1"/></g>"#,
        (1.0, 1.0),
    );
    check(
        r#"<g transform="matrix(1 2 3 4 5 6)"><line x2="1" y2="1"/></g>"#,
        (1.0 + 3.0 + 5.0, 2.0 + 4.0 + 6.0),
    );
}

/// Physical size: SVG 1.1 section 7.10 (units): 1in = 25.4 mm = 96 px, 1cm = 10 mm,
/// 1pt = 1/72 in; with a viewBox the user unit is width / viewBox width (uniform scale,
/// preserveAspectRatio's default). A 100-unit line measures accordingly.
#[test]
fn physical_sizes_set_the_scale() {
    for (width, expected_mm) in [
        ("200mm", 200.0),
        ("20cm", 200.0),
        ("2in", 50.8),
        ("192px", 50.8),
        ("192", 50.8),
        ("144pt", 50.8),
    ] {
        let text = format!(
            "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{width}\" viewBox=\"0 0 100 50\">\
             <line x1=\"0\" y1=\"0\" x2=\"100\" y2=\"0\"/></svg>"
        );
        let specimen = build(
            text.as_bytes(),
            &options(ScaleRule::FromFile, None, Some(0.0)),
        );
        let length = measure(&specimen).metrics.total_length;
        assert!((length - expected_mm).abs() < 1e-9, "{width}: {length} mm");
        assert_eq!(specimen.network.units, "mm");
    }
    // No size at all: 1 user unit = 1 px at 96 per inch, said in the notes.
    let bare = "<svg xmlns=\"http://www.w3.org/2000/svg\"><line x2=\"96\"/></svg>";
    let specimen = build(
        bare.as_bytes(),
        &options(ScaleRule::FromFile, None, Some(0.0)),
    );
    assert!((measure(&specimen).metrics.total_length - 25.4).abs() < 1e-9);
    assert!(specimen
        .notes
        .iter()
        .any(|note| note.contains("96 per inch")));
}

/// The hand-traced leaf (invented demo data, drawn by hand in a vector editor's manner:
/// layers as groups with transforms, cubic and quadratic curves, relative commands, a scale
/// bar, a script that must not run). Page 80 mm wide over a 320-unit viewBox: 0.25 mm per
/// unit. Counted by hand on the drawing: six secondaries and the loop vein end within 0.6
/// units (0.15 mm) of the midrib (7 joins); the cross vein crosses one secondary (1 split);
/// the loop vein closes one areole; the fragment `h 12 v 8` (20 units = 5 mm) stands apart.
/// Its scale bar spans 40 units, labelled 10 mm: two points 10 mm apart give 0.25 mm per unit
/// again.
#[test]
fn the_hand_traced_leaf_measures_as_counted_by_hand() {
    let bytes = std::fs::read(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../examples/specimens/hand-traced-leaf.svg"
    ))
    .expect("fixture");
    let specimen = build(&bytes, &options(ScaleRule::FromFile, None, Some(0.2)));
    assert_eq!(specimen.calibration.factor, 0.25);
    assert_eq!(specimen.scale_bars.len(), 1);
    let (from, to, _) = specimen.scale_bars[0];
    assert_eq!((from, to), ((230.0, 460.0), (270.0, 460.0)));
    let count =
        |kind: fn(&Repair) -> bool| specimen.report.repairs.iter().filter(|r| kind(r)).count();
    assert_eq!(count(|r| matches!(r, Repair::JoinedToLine { .. })), 7);
    assert_eq!(count(|r| matches!(r, Repair::SplitCrossing { .. })), 1);
    let parts: Vec<&Repair> = specimen
        .report
        .repairs
        .iter()
        .filter(|r| matches!(r, Repair::DisconnectedPart { .. }))
        .collect();
    assert_eq!(parts.len(), 1);
    if let Repair::DisconnectedPart {
        length, segments, ..
    } = parts[0]
    {
        assert!((length - 5.0).abs() < 1e-12);
        assert_eq!(*segments, 2);
    }
    let view = measure(&specimen);
    assert_eq!(view.metrics.loop_count, 1);
    assert_eq!(view.metrics.component_count, 2);
    assert!(specimen.notes.iter().any(|note| note.contains("script")));
    check_euler(&specimen, "hand-traced leaf");
    // The same leaf calibrated by its scale bar.
    let by_bar = build(
        &bytes,
        &options(
            ScaleRule::TwoPoints {
                from,
                to,
                distance: 10.0,
            },
            Some("mm"),
            Some(0.2),
        ),
    );
    assert_eq!(by_bar.calibration.factor, 0.25);
    assert!((measure(&by_bar).metrics.total_length - view.metrics.total_length).abs() < 1e-9);
    // Without a root, the lowest line end is taken and the report says so: the midrib's
    // start (150, 460) translated by (10, 10) is (160, 470), 40 mm by 117.5 mm.
    assert!(specimen.report.repairs.iter().any(|r| matches!(
        r,
        Repair::Root { part: 1, at, rule: "lowest end", .. } if *at == (40.0, 117.5)
    )));
}

/// RFC 7946 appendix A examples: A.2 LineString [[100,0],[101,1]] (length sqrt 2), A.6
/// MultiLineString [[[100,0],[101,1]],[[102,2],[103,3]]] (two pieces, sqrt 2 each), A.3
/// Polygon [[100,0],[101,0],[101,1],[100,1],[100,0]] as the outline (area 1).
#[test]
fn rfc_7946_examples_read_as_veins_and_outline() {
    let text = r#"{"type":"FeatureCollection","features":[
      {"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[100.0,0.0],[101.0,1.0]]}},
      {"type":"Feature","properties":{},"geometry":{"type":"MultiLineString","coordinates":[[[100.0,0.0],[101.0,1.0]],[[102.0,2.0],[103.0,3.0]]]}},
      {"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[100.0,0.0],[101.0,0.0],[101.0,1.0],[100.0,1.0],[100.0,0.0]]]}}
    ]}"#;
    let specimen = build(
        text.as_bytes(),
        &options(ScaleRule::FromFile, Some("m"), Some(0.0)),
    );
    let view = measure(&specimen);
    // The first two lines coincide: one is dropped as drawn twice.
    assert_eq!(
        specimen
            .report
            .repairs
            .iter()
            .filter(|r| matches!(r, Repair::DroppedDuplicate { .. }))
            .count(),
        1
    );
    assert!((view.metrics.total_length - 2.0 * 2.0f64.sqrt()).abs() < 1e-12);
    assert!((view.metrics.area - 1.0).abs() < 1e-12);
    assert_eq!(view.metrics.component_count, 2);
    assert_eq!(specimen.network.units, "m");
    // North is up in GeoJSON, down the page in a network: y is negated.
    assert!(specimen.network.nodes.iter().all(|node| node.y <= 0.0));
}

fn error_of(bytes: &[u8], options: &SpecimenOptions) -> String {
    match build_specimen(bytes, options) {
        Ok(_) => panic!("accepted: {}", String::from_utf8_lossy(bytes)),
        Err(error) => error.to_string(),
    }
}

fn assert_names(message: &str, parts: &[&str]) {
    for part in parts {
        assert!(message.contains(part), "{message:?} does not name {part:?}");
    }
}

/// RFC 7946 section 1.5's example collection holds a Point (feature 0), read as a root mark;
/// a MultiPoint (section 3.1.3) is neither vein, outline nor root, refused by index. Coordinates that are not numbers, and numbers beyond f64, are
/// refused with their place.
#[test]
fn bad_geojson_is_named_by_feature() {
    let geo = options(ScaleRule::FromFile, Some("m"), None);
    let point = r#"{"type":"FeatureCollection","features":[
      {"type":"Feature","geometry":{"type":"Point","coordinates":[102.0,0.5]},"properties":{"prop0":"value0"}},
      {"type":"Feature","geometry":{"type":"LineString","coordinates":[[102.0,0.0],[103.0,1.0]]},"properties":{}}]}"#;
    let rooted = build(point.as_bytes(), &geo);
    assert!(
        rooted.report.repairs.iter().any(|repair| matches!(
            repair,
            // y north in the file, so the mark lies at y = -0.5 once calibrated, 0.5 from the
            // nearest line end, (102, 0).
            Repair::Root { at, distance, .. } if *at == (102.0, 0.0) && *distance == 0.5
        )),
        "{:?}",
        rooted.report.repairs
    );
    let multi = point.replace(
        r#""type":"Point","coordinates":[102.0,0.5]"#,
        r#""type":"MultiPoint","coordinates":[[102.0,0.5]]"#,
    );
    assert_names(
        &error_of(multi.as_bytes(), &geo),
        &["feature 0", "MultiPoint"],
    );
    let nan = r#"{"type":"LineString","coordinates":[[0,0],[NaN,1]]}"#;
    assert_names(&error_of(nan.as_bytes(), &geo), &["line 1", "column"]);
    let huge = "{\"type\":\"LineString\",\n\"coordinates\":[[0,0],[1e999,1]]}";
    assert_names(&error_of(huge.as_bytes(), &geo), &["line 2"]);
    let short = r#"{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[0,0],[1]]}}]}"#;
    assert_names(
        &error_of(short.as_bytes(), &geo),
        &["feature 0", "position"],
    );
    let no_units = r#"{"type":"LineString","coordinates":[[0,0],[1,1]]}"#;
    assert_names(
        &error_of(
            no_units.as_bytes(),
            &options(ScaleRule::FromFile, None, None),
        ),
        &["--units"],
    );
}

/// CSV edge lists: a missing column is named; a value that is not a number names its line,
/// byte and column; a short line names its line.
#[test]
fn bad_csv_is_named_by_line() {
    let csv = options(ScaleRule::FromFile, Some("mm"), None);
    assert_names(&error_of(b"x1,y1,x2\n0,0,1\n", &csv), &["`y2`", "line 1"]);
    assert_names(
        &error_of(b"x1,y1,x2,y2\n0,0,1,1\n0,0,abc,1\n", &csv),
        &["line 3", "byte 20", "`x2`", "abc"],
    );
    assert_names(
        &error_of(b"x1,y1,x2,y2\n0,0,1,1\n0,0,1\n", &csv),
        &["line 3"],
    );
    assert_names(
        &error_of(b"x1,y1,x2,y2\n0,0,NaN,1\n", &csv),
        &["line 2", "NaN"],
    );
    // Finite but beyond any leaf or site: lengths and areas would overflow.
    assert_names(
        &error_of(b"x1,y1,x2,y2\n0,0,1e300,0\n", &csv),
        &["line 2", "1e300", "beyond"],
    );
    // Good lines read, with widths: a right angle from two pieces, 3 + 4 mm.
    let good = build(b"x1,y1,x2,y2,width\n0,0,3,0,0.2\n3,0,3,4,0.1\n", &csv);
    assert!((measure(&good).metrics.total_length - 7.0).abs() < 1e-12);
}

/// Hostile or broken SVG: a document type declaration (the route to entity expansion and
/// external entities) is refused outright; broken XML names line and column; bad path data
/// names its element and line; a script and an image are skipped, never run or fetched.
#[test]
fn bad_svg_is_named_by_element() {
    let any = options(ScaleRule::FromFile, None, None);
    let entity = br#"<?xml version="1.0"?><!DOCTYPE svg [<!ENTITY a "aaaaaaaa">]><svg xmlns="http://www.w3.org/2000/svg"><text>&a;</text></svg>"#;
    assert_names(&error_of(entity, &any), &["XML"]);
    let broken = b"<svg xmlns=\"http://www.w3.org/2000/svg\">\n<path d=\"M0 0L1 1\">\n</svg>";
    assert_names(&error_of(broken, &any), &["3:"]);
    let bad_path =
        b"<svg xmlns=\"http://www.w3.org/2000/svg\">\n\n<path id=\"midrib\" d=\"M0 0L1 x\"/></svg>";
    assert_names(
        &error_of(bad_path, &any),
        &["<path id=\"midrib\">", "line 3", "path data"],
    );
    let beyond = b"<svg xmlns=\"http://www.w3.org/2000/svg\"><path d=\"M0 0L1e999 1\"/></svg>";
    assert_names(&error_of(beyond, &any), &["<path>", "path data"]);
    let infinite = b"<svg xmlns=\"http://www.w3.org/2000/svg\"><g transform=\"scale(1e300)\"><line id=\"v\" x2=\"1e300\"/></g></svg>";
    assert_names(
        &error_of(infinite, &any),
        &["<line id=\"v\">", "not a finite number"],
    );
    let only_scripts = br#"<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink"><script>alert(1)</script><image xlink:href="http://example.invalid/a.png"/></svg>"#;
    assert_names(&error_of(only_scripts, &any), &["no vein"]);
    let with_vein =
        br#"<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script><line x2="5"/></svg>"#;
    let specimen = build(with_vein, &any);
    assert!(specimen
        .notes
        .iter()
        .any(|note| note.contains("<script>") && note.contains("never run")));
    assert_names(
        &error_of(b"\x89PNG\r\n", &any),
        &["not a specimen", "\\x89PNG"],
    );
}

/// Snapping is never silent: ends 0.05 apart merge at a tolerance of 0.1 and the report gives
/// where and how far; at 0.01 they stay apart as two parts, both reported.
#[test]
fn snapping_is_reported_with_coordinates() {
    let csv = b"x1,y1,x2,y2\n0,0,1,0\n1.05,0,2,0\n";
    let joined = build(csv, &options(ScaleRule::FromFile, Some("mm"), Some(0.1)));
    assert!(joined.report.repairs.iter().any(|repair| matches!(
        repair,
        Repair::MergedEnds { at, ends: 2, moved } if (at.0 - 1.025).abs() < 1e-12 && (moved - 0.025).abs() < 1e-12
    )));
    assert_eq!(measure(&joined).metrics.component_count, 1);
    let apart = build(csv, &options(ScaleRule::FromFile, Some("mm"), Some(0.01)));
    assert_eq!(measure(&apart).metrics.component_count, 2);
    assert!(apart
        .report
        .repairs
        .iter()
        .any(|repair| matches!(repair, Repair::DisconnectedPart { part: 2, .. })));
    // A given root takes the nearest node and says how far it was.
    let rooted = build(
        csv,
        &SpecimenOptions {
            root: Some((2.1, 0.0)),
            ..options(ScaleRule::FromFile, Some("mm"), Some(0.1))
        },
    );
    assert!(rooted.report.repairs.iter().any(|repair| matches!(
        repair,
        Repair::Root { part: 1, at: (2.0, 0.0), rule: "given", distance } if (distance - 0.1).abs() < 1e-12
    )));
    let error: SpecimenError =
        build_specimen(csv, &options(ScaleRule::Factor(-1.0), Some("mm"), None))
            .expect_err("a negative scale");
    assert_names(&error.to_string(), &["scale factor", "-1"]);
}
