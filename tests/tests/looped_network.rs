//! Networks with loops: a hand-built square with a diagonal (and a second, separate piece)
//! measured through the whole pipeline, its loops and components checked against Euler's
//! polyhedron formula and against petgraph.

use petgraph::algo::connected_components;
use petgraph::graph::UnGraph;
use ramulus_core::digest::digest_hex;
use ramulus_core::metrics::{measure, Reading, METRIC_TABLE};
use ramulus_core::network::{CellSet, Network, NetworkKind, Node, Segment};
use ramulus_core::params::Params;
use ramulus_core::record::{make_record, read_record, write_record};
use ramulus_core::run::RunView;

fn network(points: &[(f64, f64)], ends: &[(u32, u32)]) -> Network {
    Network {
        nodes: points
            .iter()
            .map(|&(x, y)| Node { x, y, weight: 1.0 })
            .collect(),
        segments: ends
            .iter()
            .map(|&(from, to)| Segment { from, to })
            .collect(),
        area: 4.0,
        units: "mm".to_string(),
        cell_size: 0.0,
        cells: CellSet::default(),
    }
}

/// A unit square A(0,0) B(1,0) C(1,1) D(0,1) with the diagonal A-C.
fn square_with_diagonal() -> Network {
    network(
        &[(0.0, 0.0), (1.0, 0.0), (1.0, 1.0), (0.0, 1.0)],
        &[(1, 0), (2, 1), (3, 2), (0, 3), (2, 0)],
    )
}

/// Components by petgraph, the outside reference.
fn petgraph_components(network: &Network) -> usize {
    let mut graph = UnGraph::<(), ()>::new_undirected();
    let nodes: Vec<_> = network.nodes.iter().map(|_| graph.add_node(())).collect();
    for segment in &network.segments {
        graph.add_edge(nodes[segment.from as usize], nodes[segment.to as usize], ());
    }
    connected_components(&graph)
}

/// Euler's polyhedron formula for a connected plane graph, V - E + F = 2 (Euler 1758): the
/// square with its diagonal has V = 4, E = 5, so F = 3 faces, two of them bounded (the two
/// triangles); each bounded face is one independent loop, which is the cyclomatic number
/// E - V + C = 5 - 4 + 1 = 2 (Kirchhoff 1847).
#[test]
fn square_with_diagonal_has_two_loops() {
    let square = square_with_diagonal();
    let metrics = measure(&square, 0.5).expect("a valid network");
    let faces = 2 + square.segments.len() - square.nodes.len();
    assert_eq!(faces, 3);
    assert_eq!(metrics.loop_count, (faces - 1) as u64);
    assert_eq!(metrics.component_count, petgraph_components(&square) as u64);
    assert_eq!(metrics.component_count, 1);
    assert_eq!(metrics.kind, NetworkKind::Looped);
    // Lengths by Pythagoras: four sides of 1 and a diagonal of sqrt(2).
    let expected_length = 4.0 + 2f64.sqrt();
    assert!((metrics.total_length - expected_length).abs() < 1e-12);
    assert_eq!(metrics.vein_density, Some(expected_length / 4.0));
    // A and C meet three segments each; B and D two; no node ends a single segment.
    assert_eq!(metrics.junction_count, 2);
    assert_eq!(metrics.tip_count, 0);
    // Forest-only values are absent.
    assert_eq!(metrics.max_strahler_order, None);
    assert_eq!(metrics.hack_exponent, None);
    assert_eq!(metrics.tortuosity, None);
    assert_eq!(metrics.transport_cost, None);
    assert_eq!(metrics.branching_angle_mean, None);
    assert!(metrics.streams.is_empty());
    assert!(square.topology().is_err(), "no forest view");
}

/// A second piece (one segment far away) adds a component and no loop: E - V + C =
/// 6 - 6 + 2 = 2, petgraph agreeing on the components.
#[test]
fn a_separate_piece_adds_a_component_not_a_loop() {
    let mut two = square_with_diagonal();
    two.nodes.push(Node {
        x: 5.0,
        y: 5.0,
        weight: 1.0,
    });
    two.nodes.push(Node {
        x: 6.0,
        y: 5.0,
        weight: 1.0,
    });
    two.segments.push(Segment { from: 5, to: 4 });
    let metrics = measure(&two, 0.5).expect("a valid network");
    assert_eq!(petgraph_components(&two), 2);
    assert_eq!(metrics.component_count, 2);
    assert_eq!(metrics.loop_count, 2);
    assert_eq!(
        metrics.tip_count, 1,
        "node 5 ends one segment and drains on"
    );
}

/// The whole pipeline runs on a looped network: readings say `n/a` for the metrics the table
/// marks forest-only and for undefined values (no cells: no outline), never otherwise; the SVG draws every segment, and a version-2 record keeps it.
#[test]
fn the_pipeline_runs_on_a_looped_network() {
    let square = square_with_diagonal();
    let params = Params::default();
    let view = RunView::new(square.clone(), &params).expect("a valid network");
    assert!(view.forest.is_none());
    assert_eq!(view.table.len(), 5);
    assert!(view.table.width.iter().all(|&width| width > 0.0));
    let rows = ramulus_draw::texts::readings_rows(&view.metrics, "mm");
    for entry in METRIC_TABLE.iter().filter(|entry| entry.key != "streams") {
        let label = entry.label;
        let row = rows
            .iter()
            .find(|(row_label, _, _)| row_label.starts_with(label))
            .unwrap_or_else(|| panic!("a row for {label}"));
        let forest_only = !entry.applies_to.includes(NetworkKind::Looped);
        let defined = !matches!((entry.read)(&view.metrics), Reading::Number(None));
        assert_eq!(
            row.1 == "n/a",
            forest_only || !defined,
            "{label}: {}",
            row.1
        );
    }
    let svg = ramulus_draw::run_svg(&view, &params, ramulus_draw::Colouring::ByOrder);
    assert_eq!(svg.matches("class=\"segment\"").count(), 5);
    let text = write_record(&make_record(&view, &params, None));
    let (_, again) = read_record(&text).expect("a looped version-2 record reads");
    assert_eq!(again, square);
    assert_eq!(digest_hex(&again), view.digest);
    // The digest tells the loop apart from the same nodes without the diagonal.
    let mut without = square.clone();
    without.segments.pop();
    assert_ne!(digest_hex(&without), view.digest);
}
