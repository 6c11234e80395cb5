//! Widths whose exponent changes with Strahler order (`gamma_major`, `major_order`): hand-computed
//! widths of a small tree, and the single exponent reproducing the flow rule (Murray 1926:
//! `r^3` adds up at every junction like flow).

use ramulus_core::network::{CellSet, Network, Node, Segment};
use ramulus_core::params::Params;
use ramulus_core::run::width_rule;
use ramulus_core::segments::{strahler_orders, SegmentTable, WidthRule};

/// Root 0; junction 1 (order 3) takes 2 and 3 (order 2); 2 takes tips 4 and 5, 3 takes tips 6
/// and 7 (order 1). Weights: tips 1, 1, 1 and 8; node 2 adds 1 itself; 1 and 3 add nothing.
fn small_tree() -> Network {
    let node = |x: f64, y: f64, weight: f64| Node { x, y, weight };
    let segment = |from: u32, to: u32| Segment { from, to };
    Network {
        nodes: vec![
            node(0.0, 0.0, 0.0),
            node(0.0, 1.0, 0.0),
            node(-1.0, 2.0, 1.0),
            node(1.0, 2.0, 0.0),
            node(-1.5, 3.0, 1.0),
            node(-0.5, 3.0, 1.0),
            node(0.5, 3.0, 1.0),
            node(1.5, 3.0, 8.0),
        ],
        segments: vec![
            segment(1, 0),
            segment(2, 1),
            segment(3, 1),
            segment(4, 2),
            segment(5, 2),
            segment(6, 3),
            segment(7, 3),
        ],
        area: 1.0,
        units: "mm".into(),
        cell_size: 1.0,
        cells: CellSet::default(),
    }
}

fn widths(rule: WidthRule) -> Vec<f64> {
    let network = small_tree();
    let topology = network.topology().expect("a forest");
    let orders = strahler_orders(&network, &topology);
    assert_eq!(orders[1..], [3, 2, 2, 1, 1, 1, 1]);
    SegmentTable::compute(&network, Some((&topology, &orders)), &[], rule).width
}

/// Exponent 3 at order 1, 2 (area preserving) from order 3, 2.5 at order 2; base width 1 at
/// flow 1. By hand (each junction `r^g = r_own^g + sum of the children's r^g`):
/// - tips: `1^(1/3) = 1` three times, `8^(1/3) = 2`;
/// - segment 2 -> 1 (order 2, g = 2.5): `(1 + 1 + 1)^(1/2.5) = 3^0.4 = 1.5518456`;
/// - segment 3 -> 1 (order 2, g = 2.5): `(1 + 2^2.5)^0.4 = 6.6568542^0.4 = 2.1345563`;
/// - segment 1 -> 0 (order 3, g = 2): `(1.5518456^2 + 2.1345563^2)^(1/2) = 2.6390444`.
#[test]
fn widths_by_order_match_the_hand_computed_tree() {
    let rule = WidthRule {
        gamma: 3.0,
        gamma_major: 2.0,
        major_order: 3,
        base_width: 1.0,
        reference_flow: 1.0,
    };
    assert_eq!(rule.exponent(1), 3.0);
    assert_eq!(rule.exponent(2), 2.5);
    assert_eq!(rule.exponent(3), 2.0);
    assert_eq!(rule.exponent(7), 2.0);
    let got = widths(rule);
    let want = [2.6390444, 1.5518456, 2.1345563, 1.0, 1.0, 1.0, 2.0];
    for (k, (got, want)) in got.iter().zip(want).enumerate() {
        assert!((got - want).abs() < 1e-6, "segment {k}: {got} vs {want}");
    }
}

/// With `gamma_major == gamma` the table keeps the flow rule `(q / q0)^(1/gamma)`, bit for bit
/// (the old code path); the branching rule with one exponent gives the same widths to rounding
/// (Murray 1926: `r^3` is conserved at each junction exactly as flow is).
#[test]
fn one_exponent_is_the_flow_rule() {
    let flows = [12.0, 3.0, 9.0, 1.0, 1.0, 1.0, 8.0];
    let single = WidthRule::single(3.0, 1.0, 1.0);
    assert!(!single.by_order());
    for (got, flow) in widths(single).iter().zip(flows) {
        assert_eq!(got.to_bits(), single.width(flow).to_bits());
    }
    // A rule that only looks ordered (the same exponent at every order) still holds r^3 sums.
    let ordered = WidthRule {
        gamma: 3.0,
        gamma_major: 3.0 + 1e-15,
        major_order: 2,
        base_width: 1.0,
        reference_flow: 1.0,
    };
    assert!(ordered.by_order());
    for (got, flow) in widths(ordered).iter().zip(flows) {
        let want = f64::cbrt(flow);
        assert!((got - want).abs() < 1e-9, "{got} vs {want}");
    }
}

/// Parameters without `gamma_major` (every version-1 link, every record saved before the key)
/// keep one exponent.
#[test]
fn parameters_without_a_major_exponent_keep_one_exponent() {
    let params = Params::default();
    assert_eq!(params.widths.gamma_major, None);
    assert!(!width_rule(&params).by_order());
    let mut params = Params::default();
    params.widths.gamma_major = Some(2.0);
    params.widths.major_order = 4;
    let rule = width_rule(&params);
    assert!(rule.by_order());
    // Orders 1 to 4 move evenly from gamma = 3 to 2.
    let exponents: Vec<f64> = (1..=5).map(|order| rule.exponent(order)).collect();
    let want = [3.0, 3.0 - 1.0 / 3.0, 3.0 - 2.0 / 3.0, 2.0, 2.0];
    for (got, want) in exponents.iter().zip(want) {
        assert!((got - want).abs() < 1e-12, "{exponents:?}");
    }
}
