//! Property tests of the growth engine over random valid parameters: the result is a forest
//! with one parent per non-root node, cells stay inside the allowed region and the budget, flows
//! are conserved, and growth is deterministic across slicing, rebuilding and a record round trip.
//! The cost weights, run control and width rule are also drawn from the parameter table.

use proptest::prelude::*;
use ramulus_core::digest::digest_hex;
use ramulus_core::growth::Growth;
use ramulus_core::mask::MaskGrid;
use ramulus_core::network::{Network, NO_PARENT};
use ramulus_core::params::table::parameters;
use ramulus_core::params::{CostWeights, Domain, RunControl};
use ramulus_core::params::{Joining, Params, Root};
use ramulus_core::record::{make_record, read_record, write_record};
use ramulus_core::region::allowed_cells;
use ramulus_core::run::RunView;
use ramulus_tests::param_strategy::field_texts;

/// Random valid parameters on small lattices: every joining rule, 1 to 3 roots, optional
/// threshold, preferred angle, segment attachment and scattered mask.
fn valid_params() -> impl Strategy<Value = Params> {
    let lattice = (3u32..24, 3u32..24);
    let weights = (
        0.0..3.0f64,
        0.0..3.0f64,
        0.0..3.0f64,
        0.0..1.0f64,
        0.0..2.0f64,
    );
    let shape = (
        1.0..4.0f64,
        0.0..0.49f64,
        0.0..=1.0f64,
        prop_oneof![
            Just(Joining::Cheapest),
            Just(Joining::Weighted),
            Just(Joining::Uniform)
        ],
        0.05..2.0f64,
    );
    let options = (
        any::<bool>(),
        proptest::option::of(0.5..12.0f64),
        proptest::option::of(0.0..150.0f64),
        (1.0..5.0f64, 1.0..5.0f64),
        (-0.05..0.05f64, -0.05..0.05f64, 0.1..=1.0f64, 0.001..=1.0f64),
    );
    let seeds = (any::<u64>(), any::<u64>(), 0.0..1.0f64);
    (lattice, weights, shape, options, seeds)
        .prop_flat_map(|(lattice, weights, shape, options, seeds)| {
            let (width, height) = lattice;
            let root = (0..width, 0..height, -1.0..1.0f64, -1.0..1.0f64);
            (
                Just((lattice, weights, shape, options, seeds)),
                proptest::collection::vec(root, 1..=3),
                1..=(width as u64 * height as u64 + 3),
            )
        })
        .prop_map(|(fixed, roots, cells)| {
            let ((width, height), weights, shape, options, seeds) = fixed;
            let (w_len, w_turn, w_flow, w_path, w_grade) = weights;
            let (radius, jitter, alpha, joining, temperature) = shape;
            let (attach, threshold, branch_angle, (elongation, rear_cost), rest) = options;
            let (grade_x, grade_y, runoff, refresh) = rest;
            let (seed, mask_seed, mask_gaps) = seeds;
            let mut unique: Vec<Root> = Vec::new();
            for (x, y, dx, dy) in roots {
                let outflow = if dx == 0.0 && dy == 0.0 {
                    [0.0, 1.0]
                } else {
                    [dx, dy]
                };
                if !unique.iter().any(|root| root.x == x && root.y == y) {
                    unique.push(Root { x, y, outflow });
                }
            }
            // A scattered mask on half of the cases: gaps with probability up to 0.4.
            let mask = (mask_gaps < 0.5).then(|| {
                let mut state = mask_seed;
                let mut bits: Vec<bool> = (0..width * height)
                    .map(|_| {
                        state = state
                            .wrapping_mul(6_364_136_223_846_793_005)
                            .wrapping_add(1_442_695_040_888_963_407);
                        ((state >> 33) as f64 / (1u64 << 31) as f64) >= mask_gaps * 0.8
                    })
                    .collect();
                for root in &unique {
                    bits[(root.y * width + root.x) as usize] = true;
                }
                MaskGrid::from_bits(width, height, &bits)
            });
            // The budget counts the roots, so it must hold them (fewer is a parameter error).
            let cells = cells.max(unique.len() as u64);
            Params {
                domain: Domain {
                    width,
                    height,
                    cell_size: 0.2,
                    roots: unique,
                    jitter,
                    grade_x,
                    grade_y,
                    runoff,
                    mask,
                    ..Domain::default()
                },
                costs: CostWeights {
                    w_len,
                    w_turn,
                    w_flow,
                    alpha,
                    w_path,
                    w_grade,
                    branch_angle,
                    elongation,
                    rear_cost,
                },
                run: RunControl {
                    seed,
                    cells,
                    radius,
                    joining,
                    temperature,
                    threshold,
                    attach_to_segments: attach,
                    // Plane and crossing growth, half of the cases each (by the drawn seed).
                    planar: seed % 2 == 0,
                    // Segments kept off blocked cells in a third of the cases.
                    keep_clear: seed % 3 == 0,
                    refresh,
                    relax_junctions: 0,
                    energy_sweeps: 0,
                    energy_reach: None,
                },
                ..Params::default()
            }
        })
}

/// The cost weights, the run control (seed and budget aside) and the width rule, drawn over
/// their whole ranges from the parameter table, on top of `valid_params`' small lattices.
fn valid_params_any_costs() -> impl Strategy<Value = Params> {
    let keys: Vec<&str> = parameters()
        .iter()
        .map(|spec| spec.key)
        .filter(|key| TABLE_DRAWN.contains(key))
        .collect();
    (valid_params(), field_texts(&keys, 1, 1)).prop_map(|(mut params, texts)| {
        for (key, text) in texts {
            ramulus_core::link::set_field(&mut params, key, &text).expect("table text reads");
        }
        params
    })
}

/// Keys `valid_params_any_costs` draws from the table.
const TABLE_DRAWN: [&str; 16] = [
    "w_len",
    "w_turn",
    "w_flow",
    "alpha",
    "w_path",
    "w_grade",
    "branch_angle",
    "elongation",
    "rear_cost",
    "joining",
    "temperature",
    "threshold",
    "radius",
    "attach_to_segments",
    "gamma",
    "tip_width",
];

/// Bit patterns of every node (x, y, weight) and every segment's ends.
type NetworkBits = (Vec<(u64, u64, u64)>, Vec<(u32, u32)>);

/// Bit patterns of every node and every segment's ends, for exact comparisons.
fn node_bits(network: &Network) -> NetworkBits {
    let nodes = network
        .nodes
        .iter()
        .map(|node| (node.x.to_bits(), node.y.to_bits(), node.weight.to_bits()))
        .collect();
    let segments = network
        .segments
        .iter()
        .map(|segment| (segment.from, segment.to))
        .collect();
    (nodes, segments)
}

/// Each node's downstream neighbour read from the segment list (`NO_PARENT` for a root);
/// `None` when a node has two downstream segments.
fn parents_of(network: &Network) -> Option<Vec<u32>> {
    let mut parents = vec![NO_PARENT; network.nodes.len()];
    for segment in &network.segments {
        let slot = parents.get_mut(segment.from as usize)?;
        if *slot != NO_PARENT {
            return None;
        }
        *slot = segment.to;
    }
    Some(parents)
}

fn close(actual: f64, expected: f64, tolerance: f64) -> bool {
    (actual - expected).abs() <= tolerance * expected.abs().max(actual.abs()).max(1e-300)
}

/// The structure checks of `grown_network_is_a_valid_forest` on one parameter set.
fn check_forest(params: &Params) -> Result<(), TestCaseError> {
    prop_assert_eq!(params.validate(), Ok(()));
    let mut growth = Growth::new(params).expect("valid parameters are accepted");
    let stopped = growth.run();
    let network = growth.network();
    let topology = network.topology().expect("grown network is a forest");
    let count = network.nodes.len();
    let h = params.domain.cell_size;
    let parents = parents_of(&network).expect("one downstream segment per node");

    // Budget: never more cells than `cells`; stopping for the budget means reaching it.
    prop_assert!(growth.cell_count() <= params.run.cells);
    if stopped == ramulus_core::StopReason::Budget {
        prop_assert_eq!(growth.cell_count(), params.run.cells);
    }

    // Roots: exactly the configured ones, in order, each on its cell.
    let roots: Vec<usize> = (0..count).filter(|&i| parents[i] == NO_PARENT).collect();
    prop_assert_eq!(roots.len(), params.domain.roots.len());
    for (node, root) in roots.iter().zip(&params.domain.roots) {
        let n = network.nodes[*node];
        prop_assert_eq!(
            ((n.x / h).floor() as u32, (n.y / h).floor() as u32),
            (root.x, root.y)
        );
    }

    // One parent per non-root node, never itself; following parents reaches a root.
    for (index, &parent) in parents.iter().enumerate() {
        if parent != NO_PARENT {
            prop_assert!((parent as usize) < count);
            prop_assert_ne!(parent as usize, index);
        }
    }
    prop_assert_eq!(network.segments.len(), count - roots.len());
    prop_assert_eq!(topology.order.len(), count);

    // Cells: weight > 0 marks a cell node; each inside an allowed cell, no two in one cell.
    let allowed = allowed_cells(params);
    let mut taken = vec![false; allowed.len()];
    let mut cell_nodes = 0u64;
    let cell_weight = params.domain.runoff * h * h;
    for node in &network.nodes {
        if node.weight == 0.0 {
            continue;
        }
        prop_assert!(close(node.weight, cell_weight, 1e-12));
        cell_nodes += 1;
        let column = (node.x / h).floor();
        let row = (node.y / h).floor();
        prop_assert!(column >= 0.0 && row >= 0.0);
        prop_assert!((column as u32) < params.domain.width && (row as u32) < params.domain.height);
        let cell = row as usize * params.domain.width as usize + column as usize;
        prop_assert!(
            allowed[cell],
            "cell node in a blocked cell ({}, {})",
            column,
            row
        );
        prop_assert!(!taken[cell], "two cell nodes in cell ({}, {})", column, row);
        taken[cell] = true;
    }
    prop_assert_eq!(cell_nodes, growth.cell_count());
    prop_assert_eq!(network.cells.occupied.len() as u64, growth.cell_count());
    for &cell in &network.cells.occupied {
        prop_assert!(
            taken[cell as usize],
            "occupied cell {} holds no cell node",
            cell
        );
    }
    if !params.run.attach_to_segments {
        prop_assert_eq!(count as u64, growth.cell_count());
    }

    // Flows by walking parents from every node (independent of the topology's own pass).
    let mut walked = vec![0.0f64; count];
    for (index, node) in network.nodes.iter().enumerate() {
        let mut current = index;
        let mut hops = 0;
        loop {
            walked[current] += node.weight;
            let parent = parents[current];
            if parent == NO_PARENT {
                break;
            }
            current = parent as usize;
            hops += 1;
            prop_assert!(hops <= count, "parents form a cycle");
        }
    }
    for (index, &walked_flow) in walked.iter().enumerate() {
        prop_assert!(close(topology.flow[index], walked_flow, 1e-9));
        let upstream: f64 = topology.children[index]
            .iter()
            .map(|&child| topology.flow[child as usize])
            .sum();
        prop_assert!(
            close(
                topology.flow[index],
                network.nodes[index].weight + upstream,
                1e-9
            ),
            "flow not conserved at node {}",
            index
        );
    }
    let total: f64 = roots.iter().map(|&root| topology.flow[root]).sum();
    prop_assert!(close(total, growth.cell_count() as f64 * cell_weight, 1e-9));

    Ok(())
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 48, ..ProptestConfig::default() })]

    /// Structure: a forest with one parent per non-root node, the roots on their cells, cells
    /// inside the allowed region, distinct, and within the budget; flows conserved (flow of a
    /// segment = own weight of its upstream end + sum of the flows entering that end: flow is
    /// conserved at every node, Kirchhoff's current law, Kirchhoff 1845).
    #[test]
    fn grown_network_is_a_valid_forest(params in valid_params()) {
        check_forest(&params)?;
    }

    /// The same structure with the cost weights, run control and width rule drawn over their
    /// whole ranges from the parameter table (weights up to 1e6, temperatures from the smallest
    /// positive double, every joining rule and threshold).
    #[test]
    fn grown_network_is_a_valid_forest_for_any_costs(params in valid_params_any_costs()) {
        check_forest(&params)?;
    }

    /// Determinism: growing in small slices of `step` gives bit-identical nodes to one `run`, and
    /// two growers built from the same parameters agree (same seed, same stream).
    #[test]
    fn growth_is_deterministic(
        params in valid_params(),
        slices in proptest::collection::vec(1u64..7, 1..8),
    ) {
        let mut whole = Growth::new(&params).expect("valid parameters are accepted");
        let reason = whole.run();
        let mut sliced = Growth::new(&params).expect("valid parameters are accepted");
        let mut turn = 0;
        let sliced_reason = loop {
            let report = sliced.step(slices[turn % slices.len()]);
            prop_assert!(report.added <= slices[turn % slices.len()]);
            turn += 1;
            if let Some(reason) = report.stopped {
                break reason;
            }
        };
        prop_assert_eq!(reason, sliced_reason);
        prop_assert_eq!(whole.cell_count(), sliced.cell_count());
        let (a, b) = (whole.network(), sliced.network());
        prop_assert_eq!(node_bits(&a), node_bits(&b));
        prop_assert_eq!(digest_hex(&a), digest_hex(&b));

        let mut again = Growth::new(&params).expect("valid parameters are accepted");
        again.run();
        prop_assert_eq!(digest_hex(&again.network()), digest_hex(&a));
        // Consuming the grower (it frees the lattice and the growth-only arrays first) gives
        // the very network `network()` gives.
        let consumed = again.into_network();
        prop_assert_eq!(node_bits(&consumed), node_bits(&a));
        prop_assert_eq!(&consumed.cells, &a.cells);
        prop_assert_eq!(consumed.area.to_bits(), a.area.to_bits());

        // A stopped grower stays stopped and adds nothing.
        let report = whole.step(5);
        prop_assert_eq!(report.added, 0);
        prop_assert_eq!(report.stopped, Some(reason));
    }

    /// The run record keeps the network and parameters exactly: writing it to JSON and reading
    /// it back gives the same digest, node bits and parameters.
    #[test]
    fn record_round_trip_keeps_the_digest(params in valid_params()) {
        let mut growth = Growth::new(&params).expect("valid parameters are accepted");
        growth.run();
        let view = RunView::new(growth.network(), &params).expect("grown network is a forest");
        let record = make_record(&view, &params, Some("budget".to_string()));
        let text = write_record(&record);
        let (read, network) = read_record(&text).expect("a written record reads back");
        prop_assert_eq!(digest_hex(&network), view.digest.clone());
        prop_assert_eq!(read.digest, view.digest.clone());
        prop_assert_eq!(node_bits(&network), node_bits(&view.network));
        prop_assert_eq!(read.params.as_ref(), Some(&params));
        // The parameters read back grow the very same network.
        let mut regrown = Growth::new(read.params.as_ref().expect("params stored"))
            .expect("stored parameters are valid");
        regrown.run();
        prop_assert_eq!(digest_hex(&regrown.network()), view.digest);
    }
}
