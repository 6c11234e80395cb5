//! Invalid parameters are rejected before growth starts, with an error naming the parameter, the
//! offending value and what is allowed. The allowed ranges checked here are the ones documented
//! on each `Params` field (the specification), not values read back from the program.

use ramulus_core::growth::Growth;
use ramulus_core::mask::MaskGrid;
use ramulus_core::params::{Domain, RunControl, Widths};
use ramulus_core::params::{ParamError, Params, Root};

/// The error `Growth::new` gives, failing the test when the parameters are accepted.
fn rejected(params: &Params) -> ParamError {
    match Growth::new(params) {
        Ok(_) => panic!("parameters were accepted: {params:?}"),
        Err(error) => error,
    }
}

/// Checks that the error names `key` (as its key and in its message) and that the message holds
/// every one of `mentions` (the value and the documented bounds).
fn check_error(error: &ParamError, key: &str, mentions: &[&str]) {
    let message = error.to_string();
    assert_eq!(error.key, key, "wrong key in: {message}");
    assert!(
        message.contains(key),
        "message does not name `{key}`: {message}"
    );
    for mention in mentions {
        assert!(
            message.contains(mention),
            "message for `{key}` does not mention {mention:?}: {message}"
        );
    }
}

/// Text of a non-finite value as a reader would expect it.
fn value_text(value: f64) -> &'static str {
    if value.is_nan() {
        "NaN"
    } else if value > 0.0 {
        "inf"
    } else {
        "-inf"
    }
}

type Setter = fn(&mut Params, f64);

/// Every float parameter with its documented bounds (doc comments of `Params`).
fn float_fields() -> Vec<(&'static str, Setter, &'static [&'static str])> {
    vec![
        ("cell_size", |p, v| p.domain.cell_size = v, &["0"]),
        ("radius", |p, v| p.run.radius = v, &["1", "12"]),
        ("jitter", |p, v| p.domain.jitter = v, &["0", "0.49"]),
        ("w_len", |p, v| p.costs.w_len = v, &["0"]),
        ("w_turn", |p, v| p.costs.w_turn = v, &["0"]),
        ("w_flow", |p, v| p.costs.w_flow = v, &["0"]),
        ("alpha", |p, v| p.costs.alpha = v, &["0", "1"]),
        ("w_path", |p, v| p.costs.w_path = v, &["0"]),
        ("w_grade", |p, v| p.costs.w_grade = v, &["0"]),
        ("temperature", |p, v| p.run.temperature = v, &["0"]),
        ("threshold", |p, v| p.run.threshold = Some(v), &[]),
        ("gamma", |p, v| p.widths.gamma = v, &["1", "10"]),
        ("tip_width", |p, v| p.widths.tip_width = v, &["0"]),
        (
            "branch_angle",
            |p, v| p.costs.branch_angle = Some(v),
            &["0", "150"],
        ),
        ("elongation", |p, v| p.costs.elongation = v, &["1", "10"]),
        ("rear_cost", |p, v| p.costs.rear_cost = v, &["1", "10"]),
        ("grade_x", |p, v| p.domain.grade_x = v, &["-1", "1"]),
        ("grade_y", |p, v| p.domain.grade_y = v, &["-1", "1"]),
        ("runoff", |p, v| p.domain.runoff = v, &["0"]),
        ("refresh", |p, v| p.run.refresh = v, &["0.001", "1"]),
    ]
}

/// A small valid run to break one field at a time.
fn small() -> Params {
    Params {
        domain: Domain {
            width: 20,
            height: 20,
            roots: vec![Root {
                x: 10,
                y: 15,
                outflow: [0.0, 1.0],
            }],
            ..Domain::default()
        },
        run: RunControl {
            cells: 50,
            ..RunControl::default()
        },
        ..Params::default()
    }
}

#[test]
fn the_base_parameters_are_valid() {
    assert_eq!(small().validate(), Ok(()));
    assert!(Growth::new(&small()).is_ok());
}

/// Non-finite values never reach the simulation (rapier habit: catch them at the edge).
#[test]
fn nan_and_infinities_are_rejected_in_every_float_field() {
    for (key, set, bounds) in float_fields() {
        for value in [f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
            let mut params = small();
            set(&mut params, value);
            let error = rejected(&params);
            let mut mentions = vec![value_text(value)];
            mentions.extend_from_slice(bounds);
            check_error(&error, key, &mentions);
            // `validate` alone catches it too: the check is up front, not during growth.
            assert_eq!(params.validate(), Err(error));
        }
    }
}

#[test]
fn non_finite_points_and_directions_are_rejected() {
    for value in [f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
        let text = value_text(value);
        let mut params = small();
        params.domain.outline = Some(vec![[0.0, 0.0], [20.0, value], [20.0, 20.0]]);
        check_error(&rejected(&params), "outline[1]", &[text]);

        let mut params = small();
        params.domain.obstacles = vec![
            vec![[1.0, 1.0], [2.0, 1.0], [2.0, 2.0]],
            vec![[value, 1.0], [2.0, 1.0], [2.0, 2.0]],
        ];
        check_error(&rejected(&params), "obstacles[1][0]", &[text]);

        let mut params = small();
        params.domain.roots[0].outflow = [value, 1.0];
        check_error(&rejected(&params), "roots[0].outflow", &[text]);
    }
    let mut params = small();
    params.domain.roots[0].outflow = [0.0, 0.0];
    check_error(&rejected(&params), "roots[0].outflow", &["0"]);
}

/// Weights are >= 0. The rule, stated here: the cost is a weighted sum of length, turning,
/// transport, supply distance and uphill run, each term >= 0, and a negative weight would reward
/// a term, so growth would seek long, winding paths instead of cheap ones (common practice for
/// weighted-sum costs, no source).
#[test]
fn negative_weights_are_rejected() {
    let weights: [(&str, Setter); 5] = [
        ("w_len", |p, v| p.costs.w_len = v),
        ("w_turn", |p, v| p.costs.w_turn = v),
        ("w_flow", |p, v| p.costs.w_flow = v),
        ("w_path", |p, v| p.costs.w_path = v),
        ("w_grade", |p, v| p.costs.w_grade = v),
    ];
    for (key, set) in weights {
        let mut params = small();
        set(&mut params, -0.25);
        check_error(&rejected(&params), key, &["-0.25", "0"]);
        // Zero is allowed.
        let mut params = small();
        set(&mut params, 0.0);
        assert_eq!(params.validate(), Ok(()), "{key} = 0 should be valid");
    }
}

/// Branched transport needs alpha in [0, 1]: a segment carrying q costs q^alpha * length, which
/// is subadditive (shared trunks no dearer than parallel paths) only for alpha <= 1, with
/// alpha = 1 plain transport and alpha = 0 length alone (Xia 2003, Commun. Contemp. Math. 5(2),
/// "Optimal paths related to transport problems"; Gilbert 1967, SIAM J. Appl. Math. 15(1)).
#[test]
fn alpha_outside_zero_one_is_rejected() {
    for value in [-0.1, 1.5, 2.0] {
        let mut params = small();
        params.costs.alpha = value;
        check_error(&rejected(&params), "alpha", &[&value.to_string(), "0", "1"]);
    }
    for value in [0.0, 1.0] {
        let mut params = small();
        params.costs.alpha = value;
        assert_eq!(params.validate(), Ok(()), "alpha = {value} should be valid");
    }
}

#[test]
fn out_of_range_numbers_are_rejected() {
    let cases: [(&str, Params, &[&str]); 6] = [
        (
            "radius",
            {
                let base = small();
                Params {
                    run: RunControl {
                        radius: 0.0,
                        ..base.run
                    },
                    ..base
                }
            },
            &["0", "1", "12"],
        ),
        (
            "radius",
            {
                let base = small();
                Params {
                    run: RunControl {
                        radius: 12.5,
                        ..base.run
                    },
                    ..base
                }
            },
            &["12.5", "12"],
        ),
        (
            "jitter",
            {
                let base = small();
                Params {
                    domain: Domain {
                        jitter: 0.5,
                        ..base.domain
                    },
                    ..base
                }
            },
            &["0.5", "0.49"],
        ),
        (
            "gamma",
            {
                let base = small();
                Params {
                    widths: Widths {
                        gamma: 0.5,
                        ..base.widths
                    },
                    ..base
                }
            },
            &["0.5", "1", "10"],
        ),
        (
            "temperature",
            {
                let base = small();
                Params {
                    run: RunControl {
                        temperature: 0.0,
                        ..base.run
                    },
                    ..base
                }
            },
            &["0"],
        ),
        (
            "cells",
            {
                let base = small();
                Params {
                    run: RunControl {
                        cells: 0,
                        ..base.run
                    },
                    ..base
                }
            },
            &["0", "1"],
        ),
    ];
    for (key, params, mentions) in cases {
        check_error(&rejected(&params), key, mentions);
    }
}

#[test]
fn roots_must_exist_and_lie_on_allowed_cells() {
    let mut params = small();
    params.domain.roots = Vec::new();
    check_error(&rejected(&params), "roots", &[]);

    let mut params = small();
    params.domain.roots[0].x = 20;
    check_error(&rejected(&params), "roots[0].x", &["20", "19"]);
    let mut params = small();
    params.domain.roots[0].y = 400;
    check_error(&rejected(&params), "roots[0].y", &["400", "19"]);

    // A root inside an obstacle (cell (10, 15) has its centre at (10.5, 15.5)).
    let mut params = small();
    params.domain.obstacles = vec![vec![[8.0, 13.0], [13.0, 13.0], [13.0, 18.0], [8.0, 18.0]]];
    check_error(&rejected(&params), "roots[0]", &["10", "15"]);

    // A root outside the outline.
    let mut params = small();
    params.domain.outline = Some(vec![[0.0, 0.0], [20.0, 0.0], [20.0, 10.0], [0.0, 10.0]]);
    check_error(&rejected(&params), "roots[0]", &["10", "15"]);

    // A root on a cell the mask forbids.
    let mut bits = vec![true; 400];
    bits[15 * 20 + 10] = false;
    let mut params = small();
    params.domain.mask = Some(MaskGrid::from_bits(20, 20, &bits));
    check_error(&rejected(&params), "roots[0]", &["10", "15"]);

    // The second of two roots on the same cell.
    let mut params = small();
    params.domain.roots.push(params.domain.roots[0].clone());
    check_error(&rejected(&params), "roots[1]", &["10", "15"]);

    // The budget counts the roots, so it must hold them all.
    let mut params = small();
    params.domain.roots.push(Root {
        x: 2,
        y: 2,
        outflow: [1.0, 0.0],
    });
    params.run.cells = 1;
    check_error(&rejected(&params), "cells", &["1", "2"]);
}

#[test]
fn a_region_without_allowed_cells_is_rejected() {
    // An outline between cell centres: no centre lies inside it.
    let mut params = small();
    params.domain.outline = Some(vec![[10.6, 15.6], [10.9, 15.6], [10.9, 15.9]]);
    let error = rejected(&params);
    assert!(
        error.to_string().contains("outline"),
        "message does not name the outline: {error}"
    );
    // A mask with no allowed cell.
    let mut params = small();
    params.domain.mask = Some(MaskGrid::from_bits(20, 20, &[false; 400]));
    let error = rejected(&params);
    assert!(
        error.to_string().contains("mask"),
        "message does not name the mask: {error}"
    );
    // A mask of the wrong size.
    let mut params = small();
    params.domain.mask = Some(MaskGrid::from_bits(10, 40, &[true; 400]));
    check_error(&rejected(&params), "mask", &["10", "40", "20"]);
}

/// Each side is documented as at most 20000, and the whole lattice as at most 25,000,000 cells.
#[test]
fn too_large_a_lattice_is_rejected_before_allocating() {
    let mut params = small();
    params.domain.width = 20_000;
    params.domain.height = 20_000;
    let error = rejected(&params);
    let message = error.to_string();
    assert!(
        message.contains("width") && message.contains("height"),
        "{message}"
    );
    assert!(message.contains("20000"), "{message}");
    assert!(message.contains("25000000"), "{message}");

    let mut params = small();
    params.domain.width = 20_001;
    check_error(&rejected(&params), "width", &["20001", "20000"]);
    let mut params = small();
    params.domain.height = 0;
    check_error(&rejected(&params), "height", &["0", "1"]);
}

#[test]
fn unknown_units_are_rejected() {
    let mut params = small();
    params.domain.units = "furlong".into();
    check_error(&rejected(&params), "units", &["furlong", "mm", "m"]);
}

/// JSON: a typo or a wrong type names the key; values out of range fail validation by name.
#[test]
fn json_errors_name_the_key() {
    let error = Params::from_json(r#"{"alpha": 0.4, "alpah": 0.5}"#).unwrap_err();
    check_error(&error, "alpah", &["0.5"]);

    let error = Params::from_json(r#"{"alpha": "high"}"#).unwrap_err();
    check_error(&error, "alpha", &["high"]);

    let error = Params::from_json(r#"{"width": 40, "roots": 3}"#).unwrap_err();
    check_error(&error, "roots", &["3"]);

    let error = Params::from_json(r#"{"joining": "fastest"}"#).unwrap_err();
    check_error(&error, "joining", &["fastest"]);

    let error = Params::from_json(r#"{"cells": -5}"#).unwrap_err();
    check_error(&error, "cells", &["-5"]);

    let error = Params::from_json(r#"{"roots": [{"x": 1, "y": 2, "outflow": [0, 1], "z": 0}]}"#)
        .unwrap_err();
    assert_eq!(error.key, "roots");
    assert!(error.to_string().contains('z'), "{error}");

    // JSON cannot carry NaN: the text is refused, never read as a number.
    assert!(Params::from_json(r#"{"alpha": NaN}"#).is_err());

    // Well-formed JSON with a value out of range parses, then fails validation by name.
    let params = Params::from_json(r#"{"alpha": 2}"#).expect("well-formed parameters");
    check_error(&params.validate().unwrap_err(), "alpha", &["2", "0", "1"]);

    // Broken JSON names the line and column.
    let error = Params::from_json("{").unwrap_err();
    assert!(error.to_string().contains("line 1"), "{error}");
}

/// Parameters are a JSON object whose keys are the field names (`Params` docs): an array must
/// not be read positionally as width, height, cell size, ... in field order.
#[test]
fn json_that_is_not_an_object_is_rejected() {
    for text in ["[1, 2]", "[]", "3", "\"broad-leaf\"", "null"] {
        match Params::from_json(text) {
            Ok(params) => panic!(
                "{text} was read as parameters: {}x{}",
                params.domain.width, params.domain.height
            ),
            Err(error) => assert!(
                error.to_string().contains("object"),
                "{text}: message does not ask for an object: {error}"
            ),
        }
    }
}
