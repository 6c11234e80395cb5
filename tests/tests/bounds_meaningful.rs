//! Every real-valued parameter's allowed range keeps every derived quantity finite and
//! meaningful: at each bound (the smallest allowed value where the bound itself is excluded),
//! a small run grows, is a forest, measures every metric it measures at the defaults, gives
//! every conducting segment a positive finite width and flow, and draws an SVG of positive
//! finite size. Scale checks use similarity (Euclid, Elements VI: a similarity keeps angles
//! and multiplies lengths by its ratio and areas by its square): changing `cell_size` must
//! leave angles and the dimensionless vein density x cell size unchanged.

use ramulus_core::growth::Growth;
use ramulus_core::network::NetworkKind;
use ramulus_core::params::table::{parameters, Access};
use ramulus_core::params::{Params, Root};
use ramulus_core::run::RunView;
use ramulus_draw::{run_svg, Colouring};

/// A small leaf-like run: 50 x 60 lattice, 900 cells, root at the base.
fn base() -> Params {
    let mut params = Params::default();
    params.domain.width = 50;
    params.domain.height = 60;
    params.domain.roots = vec![Root {
        x: 25,
        y: 55,
        outflow: [0.0, 1.0],
    }];
    params.run.cells = 900;
    params.run.threshold = None;
    assert_eq!(params.validate(), Ok(()));
    params
}

fn try_view(params: &Params) -> Result<RunView, String> {
    let mut growth = Growth::new(params).map_err(|error| error.to_string())?;
    growth.run();
    RunView::new(growth.network(), params).map_err(|error| error.to_string())
}

fn view(params: &Params) -> RunView {
    try_view(params).expect("the run grows and measures")
}

/// The metrics as JSON, with the keys whose values are missing (JSON null).
fn missing_metrics(view: &RunView) -> Vec<String> {
    let value = serde_json::to_value(&view.metrics).expect("metrics serialise");
    let object = value.as_object().expect("metrics are an object");
    let mut missing: Vec<String> = object
        .iter()
        .filter(|(_, value)| value.is_null())
        .map(|(key, _)| key.clone())
        .collect();
    missing.sort();
    missing
}

/// The run measures what the defaults measure (serde_json writes a non-finite number as null,
/// so a metric that went infinite or NaN shows as missing), and every conducting segment has
/// a positive finite width and flow.
fn check_view(view: &RunView, label: &str, missing_at_defaults: &[String]) -> Vec<String> {
    let mut problems = Vec::new();
    if view.forest.is_none() {
        problems.push(format!("{label}: the grown network is not a forest"));
    }
    let missing = missing_metrics(view);
    if missing != missing_at_defaults {
        problems.push(format!(
            "{label}: missing metrics {missing:?}, at the defaults {missing_at_defaults:?}"
        ));
    }
    for (index, &width) in view.table.width.iter().enumerate() {
        let flow = view.table.flow[index];
        let good = width.is_finite() && width > 0.0 && flow.is_finite() && flow > 0.0;
        if view.table.conducts[index] && !good {
            problems.push(format!(
                "{label}: segment {index} has width {width} and flow {flow}"
            ));
            break;
        }
    }
    problems
}

/// The SVG's `width` and `height` attributes of the root element, in mm.
fn svg_size(svg: &str) -> (f64, f64) {
    let document = roxmltree::Document::parse(svg).expect("the SVG is well-formed XML");
    let root = document.root_element();
    let number = |name: &str| -> f64 {
        let text = root.attribute(name).expect("the root has a size");
        text.trim_end_matches("mm")
            .parse()
            .unwrap_or_else(|_| panic!("{name}={text} is a number of mm"))
    };
    (number("width"), number("height"))
}

/// The allowed value at each end of a key's range: the bound, or the next representable
/// value inside it when the bound itself is excluded (IEEE 754-2008, 5.3.1, nextUp).
fn ends(key: &str) -> Vec<f64> {
    let spec = parameters()
        .iter()
        .find(|spec| spec.key == key)
        .expect("the key is in the table");
    let bounds = spec.bounds.expect("a numeric key has bounds");
    let low = if bounds.min_excluded {
        bounds.min.next_up()
    } else {
        bounds.min
    };
    vec![low, bounds.max]
}

fn set(params: &mut Params, key: &str, value: f64) {
    let spec = parameters()
        .iter()
        .find(|spec| spec.key == key)
        .expect("the key is in the table");
    match spec.access {
        Access::Real(_, get) => *get(params) = value,
        Access::OptionalReal(_, get) => *get(params) = Some(value),
        _ => panic!("{key} is not a real number"),
    }
}

#[test]
fn every_real_parameter_at_each_bound_gives_a_finite_meaningful_run() {
    let defaults = view(&base());
    let missing_at_defaults = missing_metrics(&defaults);
    let mut tried = 0;
    let mut problems = Vec::new();
    for spec in parameters() {
        let real = matches!(spec.access, Access::Real(..) | Access::OptionalReal(..));
        if !real || spec.bounds.is_none() {
            continue;
        }
        for value in ends(spec.key) {
            let mut params = base();
            set(&mut params, spec.key, value);
            if spec.key == "threshold" {
                // A stop threshold at its bound may end the run at its first cells; what is
                // checked here is that the run's figures stay finite.
                params.run.cells = 900;
            }
            assert_eq!(params.validate(), Ok(()), "{} = {value}", spec.key);
            let label = format!("{} = {value:e}", spec.key);
            let run = match try_view(&params) {
                Ok(run) => run,
                Err(error) => {
                    problems.push(format!("{label}: {error}"));
                    continue;
                }
            };
            if run.network.segment_count() == 0 {
                continue;
            }
            // At its top bound `vein_area` leaves no vein at all: the branching metrics have
            // nothing to measure, and must be absent rather than made up.
            let no_veins = spec.key == "vein_area" && run.table.conducts.iter().all(|&c| !c);
            // With `reconnect` set the network may close loops (at the top ratio none
            // qualifies on this small run, which stays a tree): the forest-only metrics are
            // read on the grown tree, and the areole metrics now have areoles to measure.
            let looped = spec.key == "reconnect" && run.loops.is_some();
            let missing = if spec.key == "threshold" || no_veins || looped {
                missing_metrics(&run)
            } else {
                missing_at_defaults.clone()
            };
            if looped {
                if run.metrics.kind != NetworkKind::LoopedOnTree {
                    problems.push(format!(
                        "{label}: loops closed, yet measured as {:?}",
                        run.metrics.kind
                    ));
                }
                // The forest-only readings come from the grown tree, so nothing the tree
                // run measures goes missing once loops close.
                for key in &missing {
                    if !missing_at_defaults.contains(key) {
                        problems.push(format!("{label}: {key} missing on a looped network"));
                    }
                }
            }
            problems.extend(check_view(&run, &label, &missing));
            let (width, height) = svg_size(&run_svg(&run, &params, Colouring::ByOrder));
            if !(width.is_finite() && width > 0.0 && height.is_finite() && height > 0.0) {
                problems.push(format!("{label}: SVG is {width} x {height} mm"));
            }
            tried += 1;
        }
    }
    assert!(tried >= 20, "only {tried} bound cases were tried");
    assert!(problems.is_empty(), "{}", problems.join("\n"));
}

#[test]
fn cell_size_at_its_bounds_keeps_angles_and_scaled_densities() {
    let reference = view(&base());
    let angle = reference
        .metrics
        .branching_angle_mean
        .expect("the run branches");
    let density = reference
        .metrics
        .vein_density
        .expect("the run has a density");
    let reference_size = base().domain.cell_size;
    for units in ["um", "mm", "m", "ft"] {
        for value in ends("cell_size") {
            let mut params = base();
            params.domain.units = units.to_string();
            params.domain.cell_size = value;
            let run = view(&params);
            let label = format!("cell_size = {value:e} {units}");
            let scaled_angle = run.metrics.branching_angle_mean.expect("the run branches");
            assert!(
                (scaled_angle - angle).abs() <= 1e-9 * angle,
                "{label}: mean branching angle {scaled_angle}, at {reference_size}: {angle}"
            );
            let scaled = run.metrics.vein_density.expect("a density") * value;
            let expected = density * reference_size;
            assert!(
                (scaled - expected).abs() <= 1e-9 * expected,
                "{label}: vein density x cell size {scaled}, expected {expected}"
            );
        }
    }
}

/// The digest of the base run with its root's outflow set to `outflow`, with the terms that
/// read the outflow axis on (elongation and rear cost), so a wrong axis changes the network.
fn digest_with_outflow(outflow: [f64; 2]) -> String {
    let mut params = base();
    params.domain.roots[0].outflow = outflow;
    params.costs.elongation = 3.0;
    params.costs.rear_cost = 3.0;
    params.costs.w_path = 0.1;
    view(&params).digest
}

/// A direction is its vector divided by its length (a unit vector is invariant under any
/// positive scaling), so outflows that differ only in length grow the same network, even
/// where the squared length underflows (1e-200) or overflows (1e200) in double precision.
#[test]
fn outflow_directions_of_any_length_grow_the_same_network() {
    let cases: [([f64; 2], [f64; 2]); 6] = [
        ([1e-200, 0.0], [1.0, 0.0]),
        ([5e-324, 0.0], [1.0, 0.0]),
        ([1e200, 1e200], [1.0, 1.0]),
        ([f64::MAX, f64::MAX], [1.0, 1.0]),
        ([-3e-170, 4e-170], [-3.0, 4.0]),
        ([0.0, -1e300], [0.0, -1.0]),
    ];
    for (scaled, plain) in cases {
        assert_eq!(
            digest_with_outflow(scaled),
            digest_with_outflow(plain),
            "outflow {scaled:?} grew a different network from {plain:?}"
        );
    }
    // And the direction does matter: the test would notice a lost axis.
    assert_ne!(
        digest_with_outflow([1.0, 0.0]),
        digest_with_outflow([0.0, 1.0])
    );
}
