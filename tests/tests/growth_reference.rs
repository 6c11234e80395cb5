//! Reference tests of the growth engine against outside results: Prim's minimum spanning tree
//! (checked with petgraph's Kruskal), flows and branched-transport cost worked out by hand
//! (Gilbert 1967; Xia 2003), and Murray's law for widths at junctions (Murray 1926).

use petgraph::algo::min_spanning_tree;
use petgraph::data::Element;
use petgraph::graph::{NodeIndex, UnGraph};
use petgraph::visit::Bfs;
use ramulus_core::growth::Growth;
use ramulus_core::mask::MaskGrid;
use ramulus_core::network::{Network, NO_PARENT};
use ramulus_core::params::{CostWeights, Domain, RunControl, Widths};
use ramulus_core::params::{Joining, Params, Root};
use ramulus_core::region::allowed_cells;
use ramulus_core::run::RunView;

/// Grows a run to its end and derives its view, failing the test on any error.
fn grow(params: &Params) -> (Growth, RunView) {
    let mut growth = match Growth::new(params) {
        Ok(growth) => growth,
        Err(error) => panic!("parameters rejected: {error}"),
    };
    growth.run();
    let view = match RunView::new(growth.network(), params) {
        Ok(view) => view,
        Err(error) => panic!("grown network is not a forest: {error}"),
    };
    (growth, view)
}

/// Total segment length computed straight from the segment list (not through the metrics).
fn total_length(network: &Network) -> f64 {
    network
        .segments
        .iter()
        .map(|segment| {
            let (node, parent) = (
                &network.nodes[segment.from as usize],
                &network.nodes[segment.to as usize],
            );
            ((node.x - parent.x).powi(2) + (node.y - parent.y).powi(2)).sqrt()
        })
        .sum()
}

/// Each node's downstream neighbour (`NO_PARENT` for a root) and the index of its downstream
/// segment, read straight from the segment list.
fn parents_and_segments(network: &Network) -> (Vec<u32>, Vec<usize>) {
    let mut parents = vec![NO_PARENT; network.nodes.len()];
    let mut segment_of = vec![usize::MAX; network.nodes.len()];
    for (index, segment) in network.segments.iter().enumerate() {
        assert_eq!(
            parents[segment.from as usize], NO_PARENT,
            "one downstream segment"
        );
        parents[segment.from as usize] = segment.to;
        segment_of[segment.from as usize] = index;
    }
    (parents, segment_of)
}

/// Asserts `actual` equals `expected` within a relative tolerance.
fn check_relative(what: &str, actual: f64, expected: f64, tolerance: f64) {
    let scale = expected.abs().max(actual.abs()).max(1e-300);
    assert!(
        (actual - expected).abs() <= tolerance * scale,
        "{what}: got {actual}, expected {expected} (relative tolerance {tolerance})"
    );
}

/// A small deterministic generator for test masks (SplitMix64, Steele, Lea & Flood 2014).
struct SplitMix(u64);

impl SplitMix {
    fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9e37_79b9_7f4a_7c15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
        z ^ (z >> 31)
    }

    fn unit(&mut self) -> f64 {
        (self.next() >> 11) as f64 / (1u64 << 53) as f64
    }
}

/// Pure-length, cheapest-first parameters without jitter: the engine's Prim configuration.
fn prim_params(width: u32, height: u32, radius: f64, roots: Vec<Root>) -> Params {
    Params {
        domain: Domain {
            width,
            height,
            cell_size: 0.25,
            roots,
            jitter: 0.0,
            ..Domain::default()
        },
        costs: CostWeights {
            w_len: 1.0,
            w_turn: 0.0,
            w_flow: 0.0,
            w_path: 0.0,
            w_grade: 0.0,
            branch_angle: None,
            ..CostWeights::default()
        },
        run: RunControl {
            cells: width as u64 * height as u64,
            radius,
            joining: Joining::Cheapest,
            threshold: None,
            attach_to_segments: false,
            ..RunControl::default()
        },
        ..Params::default()
    }
}

fn root_at(x: u32, y: u32) -> Root {
    Root {
        x,
        y,
        outflow: [0.0, 1.0],
    }
}

/// A random mask with about `density` of the cells allowed, the root cells always allowed.
fn scattered_mask(width: u32, height: u32, density: f64, seed: u64, roots: &[Root]) -> MaskGrid {
    let mut random = SplitMix(seed);
    let mut bits: Vec<bool> = (0..width * height)
        .map(|_| random.unit() < density)
        .collect();
    for root in roots {
        bits[(root.y * width + root.x) as usize] = true;
    }
    MaskGrid::from_bits(width, height, &bits)
}

/// The reference: the lattice graph of the allowed cells (edge between two cells when their
/// centre offset satisfies dx^2 + dy^2 <= radius^2, weight = centre distance), with the roots
/// joined to each other by zero-cost edges. Returns the total weight of petgraph's minimum
/// spanning forest restricted to the roots' connected component, that component's size, and the
/// number of allowed cells.
///
/// Prim (1957) grown from one root gives the minimum spanning tree of the root's component;
/// several roots grown at once are Prim from a super-source, i.e. the MST of the graph with the
/// roots contracted, which is what the zero-cost edges give (a standard reduction, e.g. Cormen
/// et al., Introduction to Algorithms, 3rd ed., ch. 23).
fn reference_spanning_forest(params: &Params) -> (f64, usize, usize) {
    let allowed = allowed_cells(params);
    let width = params.domain.width as i64;
    let height = params.domain.height as i64;
    let mut graph = UnGraph::<(), f64>::new_undirected();
    let mut index_of = vec![None; allowed.len()];
    for (cell, &ok) in allowed.iter().enumerate() {
        if ok {
            index_of[cell] = Some(graph.add_node(()));
        }
    }
    let reach = params.run.radius.floor() as i64;
    let squared = params.run.radius * params.run.radius;
    for row in 0..height {
        for column in 0..width {
            let Some(from) = index_of[(row * width + column) as usize] else {
                continue;
            };
            // Each unordered pair once: offsets with dy > 0, or dy == 0 and dx > 0.
            for dy in 0..=reach {
                for dx in -reach..=reach {
                    if dy == 0 && dx <= 0 {
                        continue;
                    }
                    if ((dx * dx + dy * dy) as f64) > squared {
                        continue;
                    }
                    let (x, y) = (column + dx, row + dy);
                    if x < 0 || y < 0 || x >= width || y >= height {
                        continue;
                    }
                    if let Some(to) = index_of[(y * width + x) as usize] {
                        let distance =
                            ((dx * dx + dy * dy) as f64).sqrt() * params.domain.cell_size;
                        graph.add_edge(from, to, distance);
                    }
                }
            }
        }
    }
    let root_nodes: Vec<NodeIndex> = params
        .domain
        .roots
        .iter()
        .map(|root| {
            index_of[(root.y as i64 * width + root.x as i64) as usize]
                .expect("roots lie on allowed cells")
        })
        .collect();
    for &other in &root_nodes[1..] {
        graph.add_edge(root_nodes[0], other, 0.0);
    }
    let mut in_component = vec![false; graph.node_count()];
    let mut size = 0;
    let mut bfs = Bfs::new(&graph, root_nodes[0]);
    while let Some(node) = bfs.next(&graph) {
        in_component[node.index()] = true;
        size += 1;
    }
    let mut total = 0.0;
    for element in min_spanning_tree(&graph) {
        if let Element::Edge { source, weight, .. } = element {
            if in_component[source] {
                total += weight;
            }
        }
    }
    (total, size, graph.node_count())
}

/// Grows the Prim configuration and compares it with the reference spanning forest; returns
/// whether some allowed cells lay outside the roots' component.
fn check_prim(label: &str, params: &Params) -> bool {
    let (expected_total, expected_cells, allowed) = reference_spanning_forest(params);
    let (growth, view) = grow(params);
    // Prim 1957 / petgraph Kruskal: equal minimum totals (trees may differ on ties).
    check_relative(
        &format!("{label}: total length"),
        total_length(&view.network),
        expected_total,
        1e-9,
    );
    check_relative(
        &format!("{label}: metrics total_length"),
        view.metrics.total_length,
        expected_total,
        1e-9,
    );
    // A spanning tree of the component reaches every one of its cells.
    assert_eq!(
        growth.cell_count() as usize,
        expected_cells,
        "{label}: grown cells vs component size"
    );
    // A tree on n vertices has n - 1 edges; a forest of k roots has n - k.
    assert_eq!(
        view.network.segment_count(),
        expected_cells - params.domain.roots.len(),
        "{label}: segment count"
    );
    expected_cells < allowed
}

/// Cheapest-first pure-length growth is Prim's algorithm: its total length equals the minimum
/// spanning tree of the allowed cells reachable from the root (Prim 1957; reference computed with
/// petgraph's `min_spanning_tree`, Kruskal 1956).
#[test]
fn prim_on_scattered_masks_matches_minimum_spanning_tree() {
    let sizes = [(7u32, 5u32), (30, 20), (64, 64)];
    let radii = [1.0, 1.5, 2.5];
    let mut checked = 0;
    let mut cut_off = 0;
    for &(width, height) in &sizes {
        for &radius in &radii {
            for mask_seed in [11u64, 29, 47] {
                let roots = vec![root_at(width / 3, height / 2)];
                let density = 0.55 + 0.1 * (mask_seed % 3) as f64;
                let mask = scattered_mask(width, height, density, mask_seed, &roots);
                let mut params = prim_params(width, height, radius, roots);
                params.domain.mask = Some(mask);
                if check_prim(
                    &format!("{width}x{height} radius {radius} mask seed {mask_seed}"),
                    &params,
                ) {
                    cut_off += 1;
                }
                checked += 1;
            }
        }
    }
    assert_eq!(checked, 27);
    // The component restriction must be exercised: some masks leave cells out of reach.
    assert!(
        cut_off > 0,
        "no mask left a cell outside the root's component"
    );
}

/// The same equivalence with obstacle polygons and an outline cutting a scattered mask (Prim
/// 1957; petgraph `min_spanning_tree`). The scattering matters: on a full lattice every spanning
/// tree of unit steps is minimal, so only gaps make the check discriminating.
#[test]
fn prim_around_obstacles_matches_minimum_spanning_tree() {
    for &radius in &[1.0, 1.5, 2.5] {
        let roots = vec![root_at(2, 17)];
        let params = {
            let base = prim_params(30, 20, radius, roots.clone());
            Params {
                domain: Domain {
                    mask: Some(scattered_mask(30, 20, 0.6, 71, &roots)),
                    obstacles: vec![
                        vec![[5.0, 2.0], [12.0, 2.0], [12.0, 15.0], [5.0, 15.0]],
                        vec![[16.0, 8.0], [26.0, 4.0], [22.0, 19.5]],
                    ],
                    outline: Some(vec![[0.0, 0.0], [30.0, 0.0], [30.0, 20.0], [0.0, 20.0]]),
                    ..base.domain
                },
                ..base
            }
        };
        check_prim(&format!("obstacles radius {radius}"), &params);
        // A diagonal outline and a sliver obstacle that the radius-1 rule cannot cross.
        let roots = vec![root_at(20, 30)];
        let mut params = prim_params(40, 40, radius, roots.clone());
        params.domain.mask = Some(scattered_mask(40, 40, 0.7, 93, &roots));
        params.domain.outline = Some(vec![[1.0, 40.0], [20.0, 0.5], [39.0, 40.0]]);
        params.domain.obstacles = vec![vec![[8.0, 20.2], [32.0, 20.2], [32.0, 20.8], [8.0, 20.8]]];
        let cut_off = check_prim(&format!("triangle radius {radius}"), &params);
        // The sliver blocks row 20 across the whole triangle: only a reach of 2 cells jumps it.
        assert_eq!(
            cut_off,
            radius < 2.0,
            "triangle radius {radius}: sliver cut-off"
        );
    }
}

/// Several roots grow a forest whose total equals the minimum spanning tree of the lattice graph
/// with the roots joined by zero-cost edges (Prim from a super-source; petgraph Kruskal).
#[test]
fn prim_with_several_roots_matches_contracted_minimum_spanning_tree() {
    for &(width, height, radius) in &[(30u32, 20u32, 1.5), (64, 64, 1.0), (20, 30, 2.5)] {
        for mask_seed in [5u64, 8] {
            let roots = vec![
                root_at(1, 1),
                root_at(width - 2, height / 2),
                root_at(width / 2, height - 1),
            ];
            let mask = scattered_mask(width, height, 0.62, mask_seed, &roots);
            let mut params = prim_params(width, height, radius, roots);
            params.domain.mask = Some(mask);
            check_prim(
                &format!("{width}x{height} radius {radius} three roots, mask {mask_seed}"),
                &params,
            );
        }
    }
}

/// One row of `cells` cells with the root at column `root_column`, cheapest-first pure length
/// with radius 1: every cell can only attach to its row neighbour.
fn row_params(cells: u32, root_column: u32) -> Params {
    Params {
        domain: Domain {
            width: cells,
            height: 1,
            cell_size: 0.5,
            runoff: 0.8,
            roots: vec![Root {
                x: root_column,
                y: 0,
                outflow: [-1.0, 0.0],
            }],
            ..prim_params(cells, 1, 1.0, Vec::new()).domain
        },
        costs: CostWeights {
            alpha: 0.5,
            ..prim_params(cells, 1, 1.0, Vec::new()).costs
        },
        ..prim_params(cells, 1, 1.0, Vec::new())
    }
}

/// Flows on a row of cells, by hand: the segment leaving the cell k steps from the root carries
/// the weight of every cell at k steps or more on its side, so on a row of n cells with the root
/// at one end it carries (n - k) cell weights (flow is conserved at every node: a segment
/// carries its upstream end's own weight plus the flows entering that end, Kirchhoff's current
/// law, Kirchhoff 1845; cell weight = runoff * h^2, the rational method's runoff coefficient
/// times area). Its branched-transport cost is then
/// sum_k ((n - k) w)^alpha * h (Gilbert 1967, Xia 2003: a segment carrying q costs q^alpha len).
#[test]
fn flows_on_a_row_match_hand_computation() {
    for &(n, root_column) in &[(9u32, 0u32), (9, 4), (12, 11)] {
        let params = row_params(n, root_column);
        let (growth, view) = grow(&params);
        assert_eq!(growth.cell_count(), n as u64);
        let h = params.domain.cell_size;
        let w = params.domain.runoff * h * h;
        let mut expected_cost = 0.0;
        let (parents, segment_of) = parents_and_segments(&view.network);
        let topology = view.topology().expect("a grown network is a forest");
        for (index, node) in view.network.nodes.iter().enumerate() {
            let column = (node.x / h).floor() as i64;
            let steps = (column - root_column as i64).unsigned_abs();
            // Cells on the same side as this one, at least `steps` away from the root.
            let side_cells = if column >= root_column as i64 {
                n as u64 - root_column as u64 - steps
            } else {
                root_column as u64 + 1 - steps
            };
            if parents[index] == NO_PARENT {
                assert_eq!(column, root_column as i64, "the root sits on its cell");
                check_relative("root total flow", topology.flow[index], n as f64 * w, 1e-12);
                continue;
            }
            let expected_flow = side_cells as f64 * w;
            check_relative(
                &format!("flow of the segment {steps} steps from the root"),
                topology.flow[index],
                expected_flow,
                1e-12,
            );
            let segment = segment_of[index];
            check_relative("table flow", view.table.flow[segment], expected_flow, 1e-12);
            check_relative("segment length", topology.length[index], h, 1e-12);
            check_relative("table length", view.table.length[segment], h, 1e-12);
            let parent = &view.network.nodes[parents[index] as usize];
            let parent_column = (parent.x / h).floor() as i64;
            assert_eq!(
                (parent_column - root_column as i64).unsigned_abs(),
                steps - 1,
                "each cell drains to its neighbour towards the root"
            );
            expected_cost += expected_flow.powf(params.costs.alpha) * h;
        }
        let cost = view.metrics.transport_cost.expect("transport cost defined");
        check_relative("row transport cost, alpha 1/2", cost, expected_cost, 1e-12);
    }
}

/// With alpha = 1 sharing a segment saves nothing (Xia 2003, section 1: the cost is linear in
/// flow), so the transport cost equals sum over nodes of weight * network path length to the
/// root. The path lengths here come from walking parents, independently of the engine's flows.
#[test]
fn transport_cost_at_alpha_one_is_weighted_path_length() {
    let bases = [
        row_params(10, 3),
        Params {
            domain: Domain {
                width: 24,
                height: 18,
                roots: vec![root_at(12, 17), root_at(3, 2)],
                ..Domain::default()
            },
            costs: CostWeights {
                alpha: 1.0,
                ..CostWeights::default()
            },
            run: RunControl {
                seed: 17,
                cells: 300,
                attach_to_segments: true,
                joining: Joining::Weighted,
                ..RunControl::default()
            },
            ..Params::default()
        },
        Params {
            domain: Domain {
                width: 20,
                height: 20,
                roots: vec![root_at(10, 10)],
                runoff: 0.35,
                ..Domain::default()
            },
            costs: CostWeights {
                alpha: 1.0,
                w_path: 0.2,
                ..CostWeights::default()
            },
            run: RunControl {
                seed: 4,
                cells: 400,
                joining: Joining::Uniform,
                ..RunControl::default()
            },
            ..Params::default()
        },
    ];
    for base in bases {
        let params = Params {
            costs: CostWeights {
                alpha: 1.0,
                ..base.costs
            },
            ..base
        };
        let (_, view) = grow(&params);
        let nodes = &view.network.nodes;
        let (parents, _) = parents_and_segments(&view.network);
        let mut expected = 0.0;
        for (index, node) in nodes.iter().enumerate() {
            let mut path = 0.0;
            let mut current = index;
            let mut hops = 0;
            while parents[current] != NO_PARENT {
                let (here, parent) = (nodes[current], nodes[parents[current] as usize]);
                path += ((here.x - parent.x).powi(2) + (here.y - parent.y).powi(2)).sqrt();
                current = parents[current] as usize;
                hops += 1;
                assert!(hops <= nodes.len(), "walking parents never reaches a root");
            }
            expected += node.weight * path;
        }
        assert!(expected > 0.0);
        let cost = view.metrics.transport_cost.expect("transport cost defined");
        check_relative("transport cost at alpha 1", cost, expected, 1e-9);
    }
}

/// Murray's law (Murray 1926, PNAS 12:207): with width ~ flow^(1/3), the cube of a parent
/// vessel's width equals the sum of its daughters' cubes when no flow enters at the junction.
/// Derivation for a cell node: width = b (q / q_ref)^(1/gamma), so width^gamma = b^gamma q / q_ref
/// is linear in q; q = own weight + sum of children's q, hence
/// width^gamma = sum children width^gamma + b^gamma * weight / q_ref. A junction off the cell
/// centres has weight 0 and obeys Murray's equality exactly. The same holds for gamma = 2
/// (area-preserving branching).
#[test]
fn widths_obey_murrays_law_at_junctions() {
    for (gamma, seed) in [(3.0, 2u64), (3.0, 9), (2.0, 5)] {
        let params = Params {
            domain: Domain {
                width: 40,
                height: 40,
                roots: vec![root_at(20, 39)],
                runoff: 0.6,
                ..Domain::default()
            },
            run: RunControl {
                seed,
                cells: 900,
                attach_to_segments: true,
                joining: Joining::Weighted,
                ..RunControl::default()
            },
            widths: Widths {
                gamma,
                tip_width: 0.2,
                vein_area: 0.0,
                gamma_major: None,
                major_order: 4,
            },
            ..Params::default()
        };
        let (_, view) = grow(&params);
        let base = params.widths.tip_width * params.domain.cell_size;
        let reference = params.domain.runoff * params.domain.cell_size * params.domain.cell_size;
        let mut junctions = 0;
        let (parents, segment_of) = parents_and_segments(&view.network);
        let topology = view.topology().expect("a grown network is a forest");
        for (index, node) in view.network.nodes.iter().enumerate() {
            let children = &topology.children[index];
            // A root has no downstream segment, so no width of its own to compare.
            if children.is_empty() || parents[index] == NO_PARENT {
                continue;
            }
            let own = view.table.width[segment_of[index]].powf(gamma);
            let daughters: f64 = children
                .iter()
                .map(|&child| view.table.width[segment_of[child as usize]].powf(gamma))
                .sum();
            let source = base.powf(gamma) * node.weight / reference;
            if node.weight == 0.0 {
                junctions += 1;
                assert!(
                    children.len() >= 2,
                    "a junction joins at least two segments"
                );
            }
            check_relative(
                &format!("gamma {gamma}: width^gamma at node {index}"),
                own,
                daughters + source,
                1e-9,
            );
        }
        assert!(
            junctions > 0,
            "attaching to segments should create junctions off the cell centres"
        );
    }
}
