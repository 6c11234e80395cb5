//! The conducting threshold (`vein_area`): a segment is a vein when the area it drains is at
//! least the threshold (channel initiation at a drained-area threshold, Montgomery & Dietrich
//! 1988, Nature 336). Drained areas are recomputed here with petgraph (a depth-first search up
//! each segment), independently of the core's flows, and the measurements of the vein network
//! are checked against them; Strahler orders of the vein network against Strahler's rule
//! (Strahler 1957) computed by petgraph's topological order.

use petgraph::algo::toposort;
use petgraph::graph::{DiGraph, NodeIndex};
use petgraph::visit::{Dfs, Reversed};
use ramulus_core::growth::Growth;
use ramulus_core::run::RunView;
use ramulus_tests::tree_presets::tree_preset;

/// A grown broad-leaf run of a few thousand cells with a conducting threshold.
fn grown_view(vein_area: f64) -> RunView {
    let mut params = tree_preset("broad-leaf").expect("preset");
    params.run.cells = 4000;
    params.widths.vein_area = vein_area;
    let mut growth = Growth::new(&params).expect("valid");
    growth.run();
    RunView::new(growth.network(), &params).expect("a valid network")
}

/// The graph with edges from each segment's upstream end to its downstream end.
fn downstream_graph(view: &RunView) -> (DiGraph<f64, f64>, Vec<NodeIndex>) {
    let mut graph = DiGraph::new();
    let nodes: Vec<NodeIndex> = view
        .network
        .nodes
        .iter()
        .map(|node| graph.add_node(node.weight))
        .collect();
    for segment in &view.network.segments {
        let length = view.network.segment_length(segment.from, segment.to);
        graph.add_edge(
            nodes[segment.from as usize],
            nodes[segment.to as usize],
            length,
        );
    }
    (graph, nodes)
}

/// Area drained through each node: the weights of every node upstream of it (itself
/// included), by a depth-first search on the reversed graph; runoff 1, so weight is area.
fn drained_areas(graph: &DiGraph<f64, f64>, nodes: &[NodeIndex]) -> Vec<f64> {
    let reversed = Reversed(graph);
    nodes
        .iter()
        .map(|&start| {
            let mut search = Dfs::new(&reversed, start);
            let mut area = 0.0;
            while let Some(node) = search.next(&reversed) {
                area += graph[node];
            }
            area
        })
        .collect()
}

#[test]
fn veins_are_the_segments_draining_the_threshold() {
    let cell_area = {
        let params = tree_preset("broad-leaf").expect("preset");
        params.domain.cell_size * params.domain.cell_size
    };
    let threshold = 12.0 * cell_area;
    let view = grown_view(threshold);
    let (graph, nodes) = downstream_graph(&view);
    let areas = drained_areas(&graph, &nodes);
    let mut vein_length = 0.0;
    let mut tissue = 0;
    for (index, segment) in view.network.segments.iter().enumerate() {
        let area = areas[segment.from as usize];
        let expected = area >= threshold * (1.0 - 1e-12);
        // Areas equal to the threshold up to rounding are left out of the comparison.
        if (area - threshold).abs() > 1e-9 * threshold {
            assert_eq!(
                view.table.conducts[index], expected,
                "segment {index}, area {area}"
            );
        }
        if view.table.conducts[index] {
            vein_length += view.network.segment_length(segment.from, segment.to);
        } else {
            tissue += 1;
            assert_eq!(
                view.table.width[index], 0.0,
                "tissue is not drawn as a vein"
            );
        }
    }
    assert!(
        tissue > view.network.segments.len() / 3,
        "a threshold of 12 cells leaves tissue"
    );
    let density = view.metrics.vein_density.expect("an area");
    let expected = vein_length / view.network.area;
    assert!(
        (density - expected).abs() <= 1e-9 * expected,
        "vein density {density} against {expected}"
    );
}

#[test]
fn vein_orders_follow_strahlers_rule_on_the_veins_alone() {
    let cell_area = {
        let params = tree_preset("broad-leaf").expect("preset");
        params.domain.cell_size * params.domain.cell_size
    };
    let view = grown_view(6.0 * cell_area);
    let forest = view.forest.as_ref().expect("a forest");
    // Strahler's rule on the conducting segments: a tip vein is order 1; where two or more
    // upstream veins of the highest order meet, the order rises by one.
    let mut graph = DiGraph::<(), ()>::new();
    let nodes: Vec<NodeIndex> = view
        .network
        .nodes
        .iter()
        .map(|_| graph.add_node(()))
        .collect();
    for (index, segment) in view.network.segments.iter().enumerate() {
        if view.table.conducts[index] {
            graph.add_edge(nodes[segment.from as usize], nodes[segment.to as usize], ());
        }
    }
    let order_of_topo = toposort(&graph, None).expect("no cycles");
    let mut order = vec![0u32; nodes.len()];
    for node in order_of_topo {
        let upstream: Vec<u32> = graph
            .neighbors_directed(node, petgraph::Direction::Incoming)
            .map(|child| order[child.index()])
            .collect();
        let highest = upstream.iter().copied().max().unwrap_or(0);
        let count = upstream.iter().filter(|&&o| o == highest).count();
        order[node.index()] = match highest {
            0 => 1,
            _ if count >= 2 => highest + 1,
            _ => highest,
        };
    }
    let mut checked = 0;
    for (index, segment) in view.network.segments.iter().enumerate() {
        let from = segment.from as usize;
        if view.table.conducts[index] {
            assert_eq!(view.table.order[index], order[from], "segment {index}");
            assert_eq!(forest.orders[from], order[from]);
            checked += 1;
        } else {
            assert_eq!(view.table.order[index], 0, "tissue has no order");
        }
    }
    assert!(checked > 100);
    // The highest order of a segment: a root has no downstream segment, so the order its
    // upstream streams would give it (two top-order streams meeting at the petiole) is no
    // stream's.
    let highest = view
        .network
        .segments
        .iter()
        .enumerate()
        .filter(|&(index, _)| view.table.conducts[index])
        .map(|(_, segment)| order[segment.from as usize])
        .max()
        .unwrap_or(0);
    assert_eq!(view.metrics.max_strahler_order, Some(highest));
}

#[test]
fn no_threshold_keeps_every_segment_a_vein() {
    let view = grown_view(0.0);
    assert!(view.table.conducts.iter().all(|&conducts| conducts));
    assert!(view.conducting.veins.is_none());
}
