//! Reference tests of `ramulus_core::metrics` on hand-built networks: every expected value is
//! derived by hand from a definition or a published result named beside the check.

use ramulus_core::metrics::{measure, measure_with, Metrics};
use ramulus_core::network::{CellSet, Network};
use ramulus_core::segments::strahler_orders;
use ramulus_tests::hand_built::{cells_where, network_of, node_at, symmetric_binary_tree};

const SQRT_2: f64 = std::f64::consts::SQRT_2;
const PI: f64 = std::f64::consts::PI;

/// Measures with the given alpha, failing the test when the network is not a forest.
fn measured(network: &Network, alpha: f64) -> Metrics {
    match measure(network, alpha) {
        Ok(metrics) => metrics,
        Err(error) => panic!("hand-built network rejected: {error}"),
    }
}

/// Asserts that `actual` is defined and within `tolerance` of `expected`.
fn check_close(what: &str, actual: Option<f64>, expected: f64, tolerance: f64) {
    match actual {
        Some(value) => assert!(
            (value - expected).abs() <= tolerance,
            "{what}: got {value}, expected {expected} within {tolerance}"
        ),
        None => panic!("{what}: undefined, expected {expected}"),
    }
}

/// A network that holds only an outline: no nodes, `cells` on a lattice of unit cells.
fn outline_only(cells: CellSet) -> Network {
    Network {
        cells,
        cell_size: 1.0,
        ..network_of(Vec::new(), 1.0)
    }
}

// ---------------------------------------------------------------------------------------------
// Strahler orders and Horton ratios
// ---------------------------------------------------------------------------------------------

/// A complete binary tree of depth k has 2^(k-1) tips of order 1 and each level down halves the
/// count and raises the order by one, so the trunk has order k and N_w = 2^(k-w) (Strahler 1957
/// ordering); the counts fall by 2 per order, so R_B = 2 (Horton 1945 bifurcation ratio). The
/// segments of order w all sit on level k - w with length trunk / 2^(k-w), so L_w doubles per
/// order and R_L = 2 (Horton 1945 length ratio).
#[test]
fn complete_binary_trees_have_ratio_two() {
    for depth in [3u32, 4, 5] {
        let trunk_length = 16.0;
        let metrics = measured(&symmetric_binary_tree(depth, trunk_length, 30.0), 0.5);
        assert_eq!(
            metrics.max_strahler_order,
            Some(depth),
            "depth {depth}: max order"
        );
        assert_eq!(
            metrics.streams.len(),
            depth as usize,
            "depth {depth}: orders present"
        );
        for stream in &metrics.streams {
            let steps_below_trunk = depth - stream.order;
            assert_eq!(
                stream.stream_count,
                1u64 << steps_below_trunk,
                "depth {depth}: N_{}",
                stream.order
            );
            check_close(
                &format!("depth {depth}: L_{}", stream.order),
                Some(stream.mean_stream_length),
                trunk_length / f64::from(1u32 << steps_below_trunk),
                1e-9,
            );
        }
        check_close("R_B", metrics.bifurcation_ratio, 2.0, 1e-9);
        check_close("R_L", metrics.length_ratio, 2.0, 1e-9);
        // Bifurcations: every node of levels 0 .. depth-2 splits, 2^(depth-1) - 1 of them;
        // tips: 2^(depth-1) (counting nodes of the complete tree).
        assert_eq!(metrics.junction_count, (1u64 << (depth - 1)) - 1);
        assert_eq!(metrics.tip_count, 1u64 << (depth - 1));
        // Children turned by +-30 degrees from their parent meet at 60 degrees (Euclidean
        // geometry).
        assert_eq!(metrics.branching_angle_count, (1u64 << (depth - 1)) - 1);
        check_close(
            "mean branching angle",
            metrics.branching_angle_mean,
            60.0,
            1e-9,
        );
    }
}

/// Two order-1 tips meet to make order 2; an order-1 tributary joining that order-2 stream
/// further down leaves it order 2 (Strahler 1957), so the two order-2 segments form one stream
/// of length 4 + 4 = 8. Order 1: three streams of length 5 (3-4-5 triangles). With two orders
/// the fitted lines pass through both points: R_B = 3 / 1 = 3, R_L = 8 / 5 = 1.6 (Horton 1945
/// ratios, computed by hand).
#[test]
fn lower_order_join_keeps_the_order() {
    let network = network_of(
        vec![
            node_at(0.0, 0.0, None, 0.0),       // 0: root
            node_at(0.0, -4.0, Some(0), 1.0),   // 1: order 2, below the tributary
            node_at(0.0, -8.0, Some(1), 1.0),   // 2: order 2, where the tips meet
            node_at(-3.0, -12.0, Some(2), 1.0), // 3: tip
            node_at(3.0, -12.0, Some(2), 1.0),  // 4: tip
            node_at(3.0, -8.0, Some(1), 1.0),   // 5: order-1 tributary, length 5
        ],
        10.0,
    );
    let metrics = measured(&network, 0.5);
    assert_eq!(
        metrics.max_strahler_order,
        Some(2),
        "a lower-order join must not raise the order"
    );
    assert_eq!(metrics.streams.len(), 2);
    assert_eq!(metrics.streams[0].order, 1);
    assert_eq!(metrics.streams[0].stream_count, 3);
    check_close(
        "L_1",
        Some(metrics.streams[0].mean_stream_length),
        5.0,
        1e-12,
    );
    assert_eq!(metrics.streams[1].order, 2);
    assert_eq!(metrics.streams[1].stream_count, 1);
    check_close(
        "L_2",
        Some(metrics.streams[1].mean_stream_length),
        8.0,
        1e-12,
    );
    check_close("R_B", metrics.bifurcation_ratio, 3.0, 1e-12);
    check_close("R_L", metrics.length_ratio, 1.6, 1e-12);
}

/// One segment gives a single order: no line can be fitted, so no Horton ratio (definition).
#[test]
fn one_order_has_no_horton_ratio() {
    let network = network_of(
        vec![
            node_at(0.0, 0.0, None, 0.0),
            node_at(0.0, -2.0, Some(0), 1.0),
        ],
        1.0,
    );
    let metrics = measured(&network, 0.5);
    assert_eq!(metrics.max_strahler_order, Some(1));
    assert_eq!(metrics.bifurcation_ratio, None);
    assert_eq!(metrics.length_ratio, None);
}

// ---------------------------------------------------------------------------------------------
// Densities
// ---------------------------------------------------------------------------------------------

/// Two trees drawn on paper (hand computation). Tree one: root to A length 3, A to three
/// children of lengths 5, 5, 5 (3-4-5 triangles), and one of them, B, to E length 10
/// (6-8-10). Tree two: a root with three children of lengths 2, 5, 5. Total length
/// 3 + 15 + 10 + 12 = 40 mm over 16 mm^2: vein density 2.5 mm/mm^2. Degrees: A has parent plus
/// three children (4), the second root three children (3): 2 junctions, 0.125 per mm^2. Tips
/// (non-root, no children): C, D, E, F, G, H: 6, 0.375 per mm^2. B has degree 2: neither.
#[test]
fn densities_of_a_hand_drawn_forest() {
    let network = network_of(
        vec![
            node_at(0.0, 0.0, None, 0.0),      // 0: root one
            node_at(0.0, 3.0, Some(0), 1.0),   // 1: A, junction
            node_at(4.0, 6.0, Some(1), 1.0),   // 2: B, degree 2
            node_at(0.0, 8.0, Some(1), 1.0),   // 3: C, tip
            node_at(-3.0, 7.0, Some(1), 1.0),  // 4: D, tip
            node_at(10.0, 14.0, Some(2), 1.0), // 5: E, tip
            node_at(20.0, 0.0, None, 0.0),     // 6: root two, junction
            node_at(20.0, 2.0, Some(6), 1.0),  // 7: F, tip
            node_at(23.0, 4.0, Some(6), 1.0),  // 8: G, tip
            node_at(17.0, 4.0, Some(6), 1.0),  // 9: H, tip
        ],
        16.0,
    );
    let metrics = measured(&network, 0.5);
    assert_eq!(metrics.node_count, 10);
    assert_eq!(metrics.root_count, 2);
    assert_eq!(metrics.segment_count, 8);
    check_close("total length", Some(metrics.total_length), 40.0, 1e-12);
    check_close("vein density", metrics.vein_density, 2.5, 1e-12);
    assert_eq!(metrics.junction_count, 2);
    check_close("junction density", metrics.junction_density, 0.125, 1e-12);
    assert_eq!(metrics.tip_count, 6);
    check_close("tip density", metrics.tip_density, 0.375, 1e-12);
}

/// Without an area there is nothing to divide by: densities are undefined (definition).
#[test]
fn densities_need_an_area() {
    let network = network_of(
        vec![
            node_at(0.0, 0.0, None, 0.0),
            node_at(1.0, 0.0, Some(0), 1.0),
        ],
        0.0,
    );
    let metrics = measured(&network, 0.5);
    assert_eq!(metrics.vein_density, None);
    assert_eq!(metrics.junction_density, None);
    assert_eq!(metrics.tip_density, None);
    check_close("total length", Some(metrics.total_length), 1.0, 0.0);
}

// ---------------------------------------------------------------------------------------------
// Branching angles
// ---------------------------------------------------------------------------------------------

/// A symmetric Y: two children at +-45 degrees from the trunk's axis make 45 + 45 = 90 degrees
/// between them (Euclidean geometry); one angle, in the 90..100 bin.
#[test]
fn symmetric_y_is_ninety_degrees() {
    let arm = 10.0 * (PI / 4.0).sin();
    let network = network_of(
        vec![
            node_at(0.0, 0.0, None, 0.0),
            node_at(0.0, -10.0, Some(0), 0.0),
            node_at(-arm, -10.0 - arm, Some(1), 1.0),
            node_at(arm, -10.0 - arm, Some(1), 1.0),
        ],
        1.0,
    );
    let metrics = measured(&network, 0.5);
    assert_eq!(metrics.branching_angle_count, 1);
    check_close("Y angle", metrics.branching_angle_mean, 90.0, 1e-12);
    assert_eq!(
        metrics.branching_angle_sd, None,
        "one angle has no sample deviation"
    );
    let mut expected_histogram = [0u64; 18];
    expected_histogram[9] = 1;
    assert_eq!(metrics.branching_angle_histogram, expected_histogram);
}

/// Three children: the main one is the one with the largest flow even though it has the highest
/// index; the others sit at 35 and 65 degrees from it (Euclidean geometry: directions at 35 and
/// -65 degrees from straight up). Mean 50, sample sd sqrt((15^2 + 15^2) / 1) = 15 sqrt(2)
/// (arithmetic by hand); bins 30..40 and 60..70.
#[test]
fn largest_flow_is_the_main_branch() {
    let direction = |degrees: f64| {
        let radians = degrees.to_radians();
        (10.0 * radians.sin(), -10.0 - 10.0 * radians.cos())
    };
    let (x35, y35) = direction(35.0);
    let (x65, y65) = direction(-65.0);
    let network = network_of(
        vec![
            node_at(0.0, 0.0, None, 0.0),
            node_at(0.0, -10.0, Some(0), 0.0),
            node_at(x35, y35, Some(1), 1.0),
            node_at(x65, y65, Some(1), 1.0),
            node_at(0.0, -20.0, Some(1), 5.0),
        ],
        1.0,
    );
    let metrics = measured(&network, 0.5);
    assert_eq!(metrics.branching_angle_count, 2);
    check_close("mean angle", metrics.branching_angle_mean, 50.0, 1e-9);
    check_close("angle sd", metrics.branching_angle_sd, 15.0 * SQRT_2, 1e-9);
    assert_eq!(metrics.branching_angle_histogram[3], 1);
    assert_eq!(metrics.branching_angle_histogram[6], 1);
}

/// Equal flows: the lowest-index child is the main one. Children at 0, 40 and 100 degrees from
/// straight up give angles 40 and 100 from the first (mean 70); taking the second or third as
/// main would give means 50 or 80 (Euclidean geometry, the tie rule of `measure_with`).
#[test]
fn equal_flows_pick_the_lowest_index() {
    let direction = |degrees: f64| {
        let radians = degrees.to_radians();
        (10.0 * radians.sin(), -10.0 - 10.0 * radians.cos())
    };
    let mut nodes = vec![
        node_at(0.0, 0.0, None, 0.0),
        node_at(0.0, -10.0, Some(0), 0.0),
    ];
    for degrees in [0.0, 40.0, 100.0] {
        let (x, y) = direction(degrees);
        nodes.push(node_at(x, y, Some(1), 1.0));
    }
    let metrics = measured(&network_of(nodes, 1.0), 0.5);
    assert_eq!(metrics.branching_angle_count, 2);
    check_close("mean angle", metrics.branching_angle_mean, 70.0, 1e-9);
}

/// A child at the junction's own position has no direction, so it gives no angle; the other
/// pair still gives its 90 degrees (Euclidean geometry).
#[test]
fn zero_length_child_gives_no_angle() {
    let network = network_of(
        vec![
            node_at(0.0, 0.0, None, 0.0),
            node_at(0.0, -10.0, Some(0), 0.0),
            node_at(0.0, -20.0, Some(1), 3.0),
            node_at(10.0, -10.0, Some(1), 1.0),
            node_at(0.0, -10.0, Some(1), 1.0),
        ],
        1.0,
    );
    let metrics = measured(&network, 0.5);
    assert_eq!(metrics.branching_angle_count, 1);
    check_close("angle", metrics.branching_angle_mean, 90.0, 1e-12);
}

// ---------------------------------------------------------------------------------------------
// Hack exponent
// ---------------------------------------------------------------------------------------------

/// A straight chain of 11 nodes 2 mm apart, each adding weight 1. Segment i (counted from the
/// root) drains the 11 - i nodes above it, area 11 - i, and its longest upstream length is
/// 2 (11 - i): length is proportional to area, so the log-log slope is exactly 1 (hand
/// derivation from the definition; Hack 1957 fits the same slope on basins).
#[test]
fn hack_exponent_of_a_chain_is_one() {
    let nodes = (0..11u32)
        .map(|index| {
            let parent = index.checked_sub(1);
            node_at(2.0 * f64::from(index), 0.0, parent, 1.0)
        })
        .collect();
    let metrics = measured(&network_of(nodes, 1.0), 0.5);
    check_close(
        "Hack exponent of a chain",
        metrics.hack_exponent,
        1.0,
        1e-12,
    );
}

/// A Y with tips at distances 1 and 4 from a stem of length 3, each tip weight 1. Points
/// (ln area, ln length): tips (0, 0) and (0, ln 4), stem (ln 2, ln 7). Least squares by hand:
/// Sxx = 2 (ln 2)^2 / 3, Sxy = (ln 2 / 3) ln(49 / 4), slope = ln(49 / 4) / (2 ln 2) (normal
/// equations of least squares).
#[test]
fn hack_exponent_of_an_uneven_y() {
    let network = network_of(
        vec![
            node_at(0.0, 0.0, None, 0.0),
            node_at(0.0, -3.0, Some(0), 0.0),
            node_at(1.0, -3.0, Some(1), 1.0),
            node_at(0.0, -7.0, Some(1), 1.0),
        ],
        1.0,
    );
    let metrics = measured(&network, 0.5);
    let expected = (49.0f64 / 4.0).ln() / (2.0 * 2.0f64.ln());
    check_close(
        "Hack exponent of a Y",
        metrics.hack_exponent,
        expected,
        1e-12,
    );
}

// ---------------------------------------------------------------------------------------------
// Transport cost
// ---------------------------------------------------------------------------------------------

/// Root, A at 2 mm (weight 1), B 5 mm beyond A (weight 2), C 3 mm beyond A (weight 1). Flows:
/// A 4, B 2, C 1. Cost sum q^alpha len by hand: alpha 1/2: 2 * 2 + sqrt(2) * 5 + 1 * 3 =
/// 7 + 5 sqrt(2); alpha 1: 8 + 10 + 3 = 21; alpha 0: 2 + 5 + 3 = 10 (Gilbert 1967 / Xia 2003
/// cost, evaluated by hand).
#[test]
fn transport_cost_by_hand() {
    let network = network_of(
        vec![
            node_at(0.0, 0.0, None, 0.0),
            node_at(0.0, 2.0, Some(0), 1.0),
            node_at(3.0, 6.0, Some(1), 2.0),
            node_at(0.0, 5.0, Some(1), 1.0),
        ],
        1.0,
    );
    check_close(
        "alpha 0.5",
        measured(&network, 0.5).transport_cost,
        7.0 + 5.0 * SQRT_2,
        1e-12,
    );
    check_close(
        "alpha 1",
        measured(&network, 1.0).transport_cost,
        21.0,
        1e-12,
    );
    check_close(
        "alpha 0",
        measured(&network, 0.0).transport_cost,
        10.0,
        1e-12,
    );
    // With alpha 1 sharing brings no saving (Xia 2003): the cost equals each weight carried
    // alone along its path: A 1 * 2, B 2 * (2 + 5), C 1 * (2 + 3) = 21.
    check_close(
        "alpha 1 as separate paths",
        measured(&network, 1.0).transport_cost,
        21.0,
        1e-12,
    );
    assert_eq!(measured(&network, f64::NAN).transport_cost, None);
}

/// With alpha 1, the cost of any tree equals the sum over weighted nodes of weight times path
/// length to the root (Xia 2003: at alpha 1 shared paths cost the same as separate ones). The
/// right side is computed here by walking each node's parents, independently of the module.
#[test]
fn alpha_one_cost_is_weighted_path_length() {
    let network = symmetric_binary_tree(5, 16.0, 35.0);
    let mut parents = vec![None; network.nodes.len()];
    for segment in &network.segments {
        parents[segment.from as usize] = Some(segment.to as usize);
    }
    let mut weighted_path_length = 0.0;
    for (index, node) in network.nodes.iter().enumerate() {
        let mut current = index;
        let mut path_length = 0.0;
        while let Some(parent) = parents[current] {
            let (here, there) = (network.nodes[current], network.nodes[parent]);
            path_length += (here.x - there.x).hypot(here.y - there.y);
            current = parent;
        }
        weighted_path_length += node.weight * path_length;
    }
    check_close(
        "alpha 1 cost",
        measured(&network, 1.0).transport_cost,
        weighted_path_length,
        1e-9,
    );
}

// ---------------------------------------------------------------------------------------------
// Tortuosity
// ---------------------------------------------------------------------------------------------

/// Along a straight chain the path to the root is the straight line: tortuosity 1 (definition).
#[test]
fn straight_chain_has_tortuosity_one() {
    let nodes = (0..8u32)
        .map(|index| {
            let step = f64::from(index);
            node_at(3.0 * step, 4.0 * step, index.checked_sub(1), 1.0)
        })
        .collect();
    let metrics = measured(&network_of(nodes, 1.0), 0.5);
    check_close("straight tortuosity", metrics.tortuosity, 1.0, 1e-12);
}

/// An L: 3 mm along x then 4 mm along y. Only the end node is weighted: path 3 + 4 = 7 over the
/// straight 5 (Pythagoras): 1.4. Weighting the corner too adds a ratio of 1: mean 1.2.
#[test]
fn l_shaped_path() {
    let end_only = network_of(
        vec![
            node_at(0.0, 0.0, None, 0.0),
            node_at(3.0, 0.0, Some(0), 0.0),
            node_at(3.0, 4.0, Some(1), 1.0),
        ],
        1.0,
    );
    check_close(
        "L end",
        measured(&end_only, 0.5).tortuosity,
        7.0 / 5.0,
        1e-12,
    );
    let with_corner = network_of(
        vec![
            node_at(0.0, 0.0, None, 0.0),
            node_at(3.0, 0.0, Some(0), 1.0),
            node_at(3.0, 4.0, Some(1), 1.0),
        ],
        1.0,
    );
    check_close("L mean", measured(&with_corner, 0.5).tortuosity, 1.2, 1e-12);
}

// ---------------------------------------------------------------------------------------------
// Outline
// ---------------------------------------------------------------------------------------------

/// A disc of radius R cells: the cell count approximates pi R^2 (Gauss circle problem: the
/// error grows like R, under 1% from R = 30). The midpoint contour moves only along the axes
/// and diagonals, so on each eighth of the circle it covers the arc's extents dx >= dy with
/// (dx - dy) + sqrt(2) dy; with dx = R / sqrt(2), dy = R (1 - 1 / sqrt(2)) that is
/// 2 (sqrt(2) - 1) R, so the perimeter tends to 16 (sqrt(2) - 1) R (about 5.5% above 2 pi R),
/// and circularity to pi^2 / (64 (sqrt(2) - 1)^2) = 0.899, not 1 (hand derivation). The contour
/// follows the digitised circle, whose extents on each eighth are off by up to about a cell,
/// so we allow 2% on the perimeter (4 cells at R = 30); circularity, 4 pi A / P^2, then
/// inherits 1% + 2 * 2% = 5%.
#[test]
fn disc_outline() {
    for radius in [30u32, 60] {
        let size = 2 * radius + 5;
        let centre = f64::from(radius + 2);
        let r = f64::from(radius);
        let cells = cells_where(size, size, |column, row| {
            let dx = f64::from(column) - centre;
            let dy = f64::from(row) - centre;
            dx * dx + dy * dy <= r * r
        });
        let metrics = measured(&outline_only(cells), 0.5);
        let disc_area = PI * r * r;
        check_close(
            "disc area",
            metrics.outline_area,
            disc_area,
            0.01 * disc_area,
        );
        let contour_length = 16.0 * (SQRT_2 - 1.0) * r;
        check_close(
            "disc perimeter",
            metrics.outline_perimeter,
            contour_length,
            0.02 * contour_length,
        );
        // Circularity reads the smooth margin (closed, traced, smoothed), whose stair steps
        // are averaged away: a disc's is 1 (definition of 4 pi A / P^2), where the stepped
        // contour above would give 0.899. The smoothing leaves a little of the steps: 3 %.
        check_close("disc circularity", metrics.circularity, 1.0, 0.03);
        // A round shape: the second moments agree in x and y (symmetry), aspect ratio 1.
        check_close("disc aspect ratio", metrics.aspect_ratio, 1.0, 1e-9);
    }
}

/// An axis-aligned filled ellipse of semi-axes a and b has second moments a^2 / 4 and b^2 / 4
/// (uniform ellipse), so sqrt(lambda_1 / lambda_2) = a / b; sampling on cell centres shifts
/// each moment by about 1/12 cell^2 and the boundary by under a cell, so we allow 2%.
#[test]
fn ellipse_aspect_ratio() {
    for (semi_major, semi_minor) in [(60.0f64, 30.0f64), (45.0, 15.0)] {
        let width = (2.0 * semi_major) as u32 + 5;
        let height = (2.0 * semi_minor) as u32 + 5;
        let centre_x = f64::from(width / 2);
        let centre_y = f64::from(height / 2);
        let cells = cells_where(width, height, |column, row| {
            let dx = (f64::from(column) - centre_x) / semi_major;
            let dy = (f64::from(row) - centre_y) / semi_minor;
            dx * dx + dy * dy <= 1.0
        });
        let metrics = measured(&outline_only(cells), 0.5);
        let expected = semi_major / semi_minor;
        check_close(
            "ellipse aspect ratio",
            metrics.aspect_ratio,
            expected,
            0.02 * expected,
        );
    }
}

/// A block of m by n cells: the contour runs along the block's cell edges, m - 1 and n - 1
/// unit pieces per side, plus four corner cuts of sqrt(2) / 2: P = 2 (m - 1) + 2 (n - 1) +
/// 2 sqrt(2) (marching-squares cases by hand). Centres are evenly spaced, variances
/// (m^2 - 1) / 12 and (n^2 - 1) / 12 (discrete uniform distribution), aspect ratio
/// sqrt((m^2 - 1) / (n^2 - 1)). Outside the lattice counts as empty, so the same block pressed
/// into a corner of the lattice measures the same.
#[test]
fn rectangular_block() {
    let (m, n) = (7u32, 3u32);
    for (width, height, left, top) in [(12u32, 9u32, 2u32, 3u32), (7, 3, 0, 0)] {
        let cells = cells_where(width, height, |column, row| {
            (left..left + m).contains(&column) && (top..top + n).contains(&row)
        });
        let network = Network {
            cell_size: 0.5,
            ..outline_only(cells)
        };
        let metrics = measured(&network, 0.5);
        let (m, n) = (f64::from(m), f64::from(n));
        let perimeter_cells = 2.0 * (m - 1.0) + 2.0 * (n - 1.0) + 2.0 * SQRT_2;
        check_close("block area", metrics.outline_area, m * n * 0.25, 1e-12);
        check_close(
            "block perimeter",
            metrics.outline_perimeter,
            perimeter_cells * 0.5,
            1e-12,
        );
        // Circularity reads the smooth margin through the boundary cells' centres, the
        // (m - 1) x (n - 1) rectangle with its corners rounded by the smoothing: at least the
        // rectangle's 4 pi (m - 1)(n - 1) / (2 (m + n - 2))^2 (rounding corners raises area
        // over squared perimeter) and below 1 (isoperimetric inequality).
        let centres = 4.0 * PI * (m - 1.0) * (n - 1.0) / (2.0 * (m + n - 2.0)).powi(2);
        let circularity = metrics.circularity.expect("a margin");
        assert!(
            centres <= circularity && circularity < 1.0,
            "block circularity {circularity}, rectangle of centres {centres}"
        );
        check_close(
            "block aspect ratio",
            metrics.aspect_ratio,
            ((m * m - 1.0) / (n * n - 1.0)).sqrt(),
            1e-12,
        );
    }
}

/// Cells on one line have a zero second moment across it: the aspect ratio is undefined
/// (definition); without cells there is no outline at all.
#[test]
fn degenerate_outlines() {
    let diagonal = cells_where(10, 10, |column, row| column == row);
    let metrics = measured(&outline_only(diagonal), 0.5);
    assert_eq!(metrics.aspect_ratio, None);
    assert!(metrics.circularity.is_some());
    let none = measured(&network_of(Vec::new(), 1.0), 0.5);
    assert_eq!(none.outline_area, None);
    assert_eq!(none.outline_perimeter, None);
    assert_eq!(none.circularity, None);
    assert_eq!(none.aspect_ratio, None);
}

// ---------------------------------------------------------------------------------------------
// Robustness, entry points and the table
// ---------------------------------------------------------------------------------------------

/// Networks with nothing to measure give zeros and undefined values, never a panic: no nodes,
/// a lone root, a zero-length segment, all weights zero.
#[test]
fn degenerate_networks_do_not_panic() {
    let empty = measured(&network_of(Vec::new(), 1.0), 0.5);
    assert_eq!(empty.segment_count, 0);
    assert_eq!(empty.max_strahler_order, Some(0));
    assert!(empty.streams.is_empty());
    assert_eq!(empty.branching_angle_mean, None);
    assert_eq!(empty.hack_exponent, None);
    assert_eq!(empty.tortuosity, None);
    assert_eq!(empty.transport_cost, Some(0.0));

    let lone_root = measured(&network_of(vec![node_at(1.0, 1.0, None, 1.0)], 1.0), 0.5);
    assert_eq!(lone_root.root_count, 1);
    assert_eq!(
        lone_root.tip_count, 0,
        "a root is never a free-ending veinlet"
    );
    assert_eq!(lone_root.junction_count, 0);

    let zero_length = network_of(
        vec![
            node_at(0.0, 0.0, None, 0.0),
            node_at(0.0, 0.0, Some(0), 1.0),
            node_at(0.0, 0.0, Some(1), 1.0),
            node_at(0.0, 0.0, Some(1), 1.0),
        ],
        1.0,
    );
    let metrics = measured(&zero_length, 0.5);
    assert_eq!(metrics.branching_angle_count, 0);
    assert_eq!(metrics.hack_exponent, None);
    assert_eq!(metrics.tortuosity, None);
    assert_eq!(
        metrics.length_ratio, None,
        "zero-length streams have no logarithm"
    );

    let mut weightless = symmetric_binary_tree(4, 8.0, 30.0);
    for node in &mut weightless.nodes {
        node.weight = 0.0;
    }
    let metrics = measured(&weightless, 0.5);
    assert_eq!(metrics.hack_exponent, None);
    assert_eq!(metrics.tortuosity, None);
    assert_eq!(metrics.transport_cost, Some(0.0));
    assert_eq!(
        metrics.max_strahler_order,
        Some(4),
        "orders do not depend on weights"
    );
}

/// `measure` and `measure_with` agree; JSON keeps every value (serde round trip).
#[test]
fn entry_points_agree_and_serialise() {
    let network = symmetric_binary_tree(4, 8.0, 30.0);
    let from_measure = measured(&network, 0.5);
    let topology = match network.topology() {
        Ok(topology) => topology,
        Err(error) => panic!("{error}"),
    };
    let orders = strahler_orders(&network, &topology);
    assert_eq!(
        measure_with(&network, Some((&topology, &orders)), 0.5),
        from_measure
    );
    let text = match serde_json::to_string(&from_measure) {
        Ok(text) => text,
        Err(error) => panic!("{error}"),
    };
    let back: Metrics = match serde_json::from_str(&text) {
        Ok(back) => back,
        Err(error) => panic!("{error}"),
    };
    assert_eq!(back, from_measure);
}

/// The table carries the hand-computed vein density of the forest above (2.5 mm/mm^2) with its
/// unit, one row pair per Strahler order, and `n/a` for undefined values.
#[test]
fn table_rows() {
    let network = network_of(
        vec![
            node_at(0.0, 0.0, None, 0.0),
            node_at(0.0, 3.0, Some(0), 1.0),
            node_at(4.0, 6.0, Some(1), 1.0),
            node_at(0.0, 8.0, Some(1), 1.0),
        ],
        5.0,
    );
    let rows = ramulus_draw::texts::readings_rows(&measured(&network, 0.5), "mm");
    let find = |label: &str| rows.iter().find(|row| row.0 == label).cloned();
    // Length 3 + 5 + 5 = 13 mm over 5 mm^2 = 2.6 mm/mm^2 (hand computation).
    assert_eq!(
        find("vein density"),
        Some((
            "vein density".to_string(),
            "2.6".to_string(),
            "mm/mm\u{b2}".to_string()
        ))
    );
    // The same reading for a site, in metres, speaks drainage words: drainage density is
    // channel length per area (Horton 1945), with the square written as SI does (SI Brochure,
    // 9th edition, 2019, 5.4.3: superscript exponent).
    let site_rows = ramulus_draw::texts::readings_rows(&measured(&network, 0.5), "m");
    assert!(site_rows.iter().all(|row| !row.0.contains("vein")));
    assert_eq!(
        site_rows.iter().find(|row| row.0 == "drainage density"),
        Some(&(
            "drainage density".to_string(),
            "2.6".to_string(),
            "m/m\u{b2}".to_string()
        ))
    );
    // Every reading people see carries an explanation, and the one of circularity says what
    // it measures of a grown shape.
    let explained = ramulus_draw::texts::readings_rows_explained(&measured(&network, 0.5), "mm");
    let about = |label: &str| {
        explained
            .iter()
            .find(|row| row.0 == label)
            .map(|row| row.3.clone())
            .unwrap_or_default()
    };
    assert!(about("circularity").contains("margin"));
    assert!(about("vein density").contains("area"));
    assert!(explained
        .iter()
        .filter(|row| !row.0.contains("of order"))
        .all(|row| !row.3.is_empty()));
    // B and C are order-1 tips meeting at A, so A's segment is order 2 (Strahler 1957).
    assert_eq!(
        find("streams of order 1").map(|row| row.1),
        Some("2".to_string())
    );
    assert_eq!(
        find("streams of order 2").map(|row| row.1),
        Some("1".to_string())
    );
    assert_eq!(find("streams of order 3"), None);
    assert_eq!(
        find("aspect ratio").map(|row| row.1),
        Some("n/a".to_string())
    );
}
