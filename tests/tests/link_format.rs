//! Run links: every valid parameter set survives `encode_link` / `decode_link` to the bit, a
//! hand-written version 1 link reads as its format description says, damaged fields fall back
//! to their defaults one by one, arbitrary text never panics, and the parameter schema's bounds
//! agree with `Params::validate`.

use proptest::prelude::*;
use ramulus_core::link::{decode_link, encode_link, field_text, version_1_defaults};
use ramulus_core::mask::MaskGrid;
use ramulus_core::params::{CostWeights, Domain, RunControl};
use ramulus_core::params::{Joining, Params, Root};
use ramulus_core::presets::presets;
use ramulus_core::schema::{fields, FieldKind};

/// Random valid parameters, floats drawn over their whole allowed range (arbitrary bits, not
/// round decimals), with optional outline, obstacles and mask.
fn any_params() -> impl Strategy<Value = Params> {
    let numbers = (
        0.0..=1.0f64,
        0.0..=0.49f64,
        1.0..=12.0f64,
        1.0e-6..1.0e3f64,
        (0.0..1.0e6f64, 0.0..1.0e6f64, 0.0..1.0e6f64),
        proptest::option::of(-1.0e12..1.0e12f64),
        proptest::option::of(0.0..=150.0f64),
        (-1.0..=1.0f64, -1.0..=1.0f64),
    );
    let others = (
        any::<u64>(),
        prop_oneof![
            Just(Joining::Cheapest),
            Just(Joining::Weighted),
            Just(Joining::Uniform)
        ],
        any::<bool>(),
        proptest::option::of(proptest::collection::vec(
            (-5.0..50.0f64, -5.0..50.0f64),
            3..7,
        )),
        proptest::collection::vec(
            proptest::collection::vec((0.0..40.0f64, 0.0..40.0f64), 3..5),
            0..3,
        ),
        proptest::collection::vec((0u32..40, 0u32..30, -1.0..1.0f64, 0.1..1.0f64), 1..4),
        any::<bool>(),
        prop_oneof![Just("mm"), Just("m"), Just("um"), Just("ft"), Just("cm")],
    );
    (numbers, others).prop_map(|(numbers, others)| {
        let (alpha, jitter, radius, cell_size, weights, threshold, branch_angle, grades) = numbers;
        let (seed, joining, attach, outline, obstacles, roots, with_mask, units) = others;
        let (width, height) = (40u32, 30u32);
        let mut unique: Vec<Root> = Vec::new();
        for (x, y, dx, dy) in roots {
            if !unique.iter().any(|root| root.x == x && root.y == y) {
                unique.push(Root {
                    x,
                    y,
                    outflow: [dx, dy],
                });
            }
        }
        let to_points = |points: Vec<(f64, f64)>| points.into_iter().map(|(x, y)| [x, y]).collect();
        Params {
            domain: Domain {
                width,
                height,
                cell_size,
                units: units.to_string(),
                roots: unique,
                jitter,
                grade_x: grades.0,
                grade_y: grades.1,
                outline: outline.map(to_points),
                obstacles: obstacles.into_iter().map(to_points).collect(),
                mask: with_mask.then(|| MaskGrid {
                    width,
                    height,
                    runs: vec![3, 1000, 197],
                }),
                ..Domain::default()
            },
            costs: CostWeights {
                w_len: weights.0,
                w_turn: weights.1,
                w_flow: weights.2,
                alpha,
                branch_angle,
                ..CostWeights::default()
            },
            run: RunControl {
                seed,
                cells: 500,
                radius,
                threshold,
                joining,
                attach_to_segments: attach,
                ..RunControl::default()
            },
            ..Params::default()
        }
    })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    /// Round trip to the bit: `PartialEq` on `f64` fields compares values, and the `to_bits`
    /// check below also tells -0.0 from 0.0 (rapier's determinism habit).
    #[test]
    fn every_valid_parameter_set_round_trips_through_a_link(params in any_params()) {
        prop_assume!(params.validate().is_ok());
        let read = decode_link(&encode_link(&params));
        prop_assert_eq!(&read.problems, &Vec::new());
        prop_assert_eq!(&read.params, &params);
        prop_assert_eq!(read.params.costs.alpha.to_bits(), params.costs.alpha.to_bits());
        prop_assert_eq!(read.params.domain.cell_size.to_bits(), params.domain.cell_size.to_bits());
    }

    /// Fuzzing: any text, and any valid link with bytes overwritten, reads without panicking
    /// into parameters that validate.
    #[test]
    fn arbitrary_text_reads_into_valid_parameters(text in ".{0,300}") {
        let read = decode_link(&text);
        prop_assert!(read.params.validate().is_ok());
    }

    #[test]
    fn damaged_links_read_into_valid_parameters(
        params in any_params(),
        edits in proptest::collection::vec((any::<prop::sample::Index>(), any::<u8>()), 1..6),
    ) {
        let mut bytes = encode_link(&params).into_bytes();
        for (index, byte) in edits {
            let at = index.index(bytes.len());
            bytes[at] = byte;
        }
        let text = String::from_utf8_lossy(&bytes);
        let read = decode_link(&text);
        prop_assert!(read.params.validate().is_ok());
    }
}

#[test]
fn every_preset_round_trips_and_a_full_url_reads_like_its_fragment() {
    for preset in presets() {
        let fragment = encode_link(&preset.params);
        let read = decode_link(&fragment);
        assert!(
            read.problems.is_empty(),
            "{}: {:?}",
            preset.name,
            read.problems
        );
        assert_eq!(read.params, preset.params, "{}", preset.name);
        let url = format!("http://127.0.0.1:8080/index.html#{fragment}");
        assert_eq!(decode_link(&url).params, preset.params, "{}", preset.name);
    }
}

/// A version 1 link written by hand from the format description in `link.rs` and README
/// (keys as in the parameter JSON, `;` between roots and points, `~` between polygons,
/// `WxH:runs` for a mask, missing keys at their version 1 defaults). It must keep loading
/// the same way in every later build.
#[test]
fn a_hand_written_version_1_link_reads_as_the_format_says() {
    let read = decode_link(
        "#v=1&seed=42&width=30&height=20&cell_size=0.25&units=m&roots=3,19,0,1;25,0,1,-1\
         &alpha=0.75&joining=cheapest&threshold=none&branch_angle=60\
         &outline=0,0;30,0;30,20;0,20&obstacles=10,5;14,5;14,9~20,10;22,10;22,12\
         &attach_to_segments=true&mask=30x20:0.590.10",
    );
    assert!(read.problems.is_empty(), "{:?}", read.problems);
    assert_eq!(read.version, 1);
    let expected = {
        let base = version_1_defaults();
        Params {
            domain: Domain {
                width: 30,
                height: 20,
                cell_size: 0.25,
                units: "m".into(),
                roots: vec![
                    Root {
                        x: 3,
                        y: 19,
                        outflow: [0.0, 1.0],
                    },
                    Root {
                        x: 25,
                        y: 0,
                        outflow: [1.0, -1.0],
                    },
                ],
                outline: Some(vec![[0.0, 0.0], [30.0, 0.0], [30.0, 20.0], [0.0, 20.0]]),
                obstacles: vec![
                    vec![[10.0, 5.0], [14.0, 5.0], [14.0, 9.0]],
                    vec![[20.0, 10.0], [22.0, 10.0], [22.0, 12.0]],
                ],
                mask: Some(MaskGrid {
                    width: 30,
                    height: 20,
                    runs: vec![0, 590, 10],
                }),
                ..base.domain
            },
            costs: CostWeights {
                alpha: 0.75,
                branch_angle: Some(60.0),
                ..base.costs
            },
            run: RunControl {
                seed: 42,
                joining: Joining::Cheapest,
                threshold: None,
                attach_to_segments: true,
                ..base.run
            },
            ..base
        }
    };
    assert_eq!(read.params, expected);
}

/// Each damaged field is named, takes its default, and leaves every other field alone.
#[test]
fn a_damaged_field_is_named_and_only_it_falls_back() {
    let base = presets()[0].params.clone();
    let defaults = version_1_defaults();
    let cases: [(&str, &str); 9] = [
        ("alpha", "abc"),
        ("alpha", "7"),
        ("seed", "-3"),
        ("joining", "greedy"),
        ("roots", "1,2,3"),
        ("gamma", "NaN"),
        ("threshold", "inf"),
        ("attach_to_segments", "yes"),
        ("units", "furlong"),
    ];
    for (key, bad) in cases {
        let fragment = encode_link(&base);
        let damaged = replace_field(&fragment, key, bad);
        let read = decode_link(&damaged);
        assert!(
            read.problems.iter().any(|problem| problem.key == key),
            "{key}={bad}: {:?}",
            read.problems
        );
        for spec in fields() {
            let expected = if spec.key == key { &defaults } else { &base };
            assert_eq!(
                field_text(&read.params, spec.key),
                field_text(expected, spec.key),
                "{key}={bad}: field {}",
                spec.key
            );
        }
    }
}

#[test]
fn unknown_fields_versions_and_escapes_are_reported_not_fatal() {
    let base = presets()[1].params.clone();
    let fragment = encode_link(&base);
    for (text, key) in [
        (format!("{fragment}&colour=red"), "colour"),
        (fragment.replacen("v=1", "v=9", 1), "v"),
        (fragment.replacen("v=1", "v=one", 1), "v"),
        (replace_field(&fragment, "units", "%ZZ"), "units"),
        (format!("{fragment}&seed=5"), "seed"),
    ] {
        let read = decode_link(&text);
        assert!(
            read.problems.iter().any(|problem| problem.key == key),
            "{text}: {:?}",
            read.problems
        );
        assert!(read.params.validate().is_ok());
    }
}

/// A lattice narrowed by hand leaves the root outside: the root takes its default (60, 100),
/// which fits, and the narrower lattice is kept. Narrowed further, even the default root
/// does not fit, and the lattice size is reset too.
#[test]
fn fields_that_do_not_fit_together_are_reset_in_turn() {
    let base = presets()[0].params.clone();
    assert_eq!((base.domain.roots[0].x, base.domain.height), (110, 300));
    let read = decode_link(&replace_field(&encode_link(&base), "width", "100"));
    assert_eq!(
        (read.params.domain.width, read.params.domain.height),
        (100, 300)
    );
    assert_eq!(
        (read.params.domain.roots[0].x, read.params.domain.roots[0].y),
        (60, 100)
    );
    assert!(read.problems.iter().any(|problem| problem.key == "roots"));

    let read = decode_link(&replace_field(&encode_link(&base), "width", "5"));
    assert_eq!(
        (read.params.domain.width, read.params.domain.height),
        (120, 120)
    );
    assert!(read.problems.iter().any(|problem| problem.key == "width"));
    assert!(read.params.validate().is_ok());
}

/// Each numeric field of the schema is accepted at its bounds and rejected just beyond them
/// by `Params::validate`, so the page's form and the core agree.
#[test]
fn schema_bounds_agree_with_validation() {
    let base = Params {
        domain: Domain {
            width: 200,
            height: 200,
            roots: vec![Root {
                x: 0,
                y: 0,
                outflow: [0.0, 1.0],
            }],
            ..Domain::default()
        },
        run: RunControl {
            cells: 100,
            ..RunControl::default()
        },
        ..Params::default()
    };
    let checked = [
        "radius",
        "jitter",
        "alpha",
        "gamma",
        "tip_width",
        "elongation",
        "rear_cost",
        "grade_x",
        "grade_y",
        "runoff",
        "refresh",
        "w_len",
        "w_turn",
        "w_flow",
        "w_path",
        "w_grade",
        "branch_angle",
        "threshold",
        "temperature",
        "cell_size",
        "width",
        "height",
    ];
    for spec in fields() {
        if !matches!(
            spec.kind,
            FieldKind::Number | FieldKind::OptionalNumber | FieldKind::Integer
        ) || !checked.contains(&spec.key)
        {
            continue;
        }
        let (min, max) = (spec.min.unwrap(), spec.max.unwrap());
        let integer = spec.kind == FieldKind::Integer;
        let set = |value: f64| {
            let mut params = base.clone();
            let text = if integer {
                format!("{}", value as i64)
            } else {
                format!("{value}")
            };
            // Text the field cannot hold at all (a negative whole number) counts as rejected.
            ramulus_core::link::set_field(&mut params, spec.key, &text).is_ok()
                && params.validate().is_ok()
        };
        let step = |value: f64| {
            if integer {
                1.0
            } else {
                value.abs() * 1e-9 + 1e-12
            }
        };
        let below = if min == 0.0 && !integer {
            -1.0e-9
        } else {
            min - step(min)
        };
        assert!(!set(below), "{} below {min}", spec.key);
        assert_eq!(set(min), !spec.min_excluded, "{} at {min}", spec.key);
        if max < 1.0e300 {
            let above = max + step(max);
            assert!(set(max), "{} at {max}", spec.key);
            assert!(!set(above), "{} above {max}", spec.key);
        }
    }
}

fn replace_field(fragment: &str, key: &str, value: &str) -> String {
    fragment
        .split('&')
        .map(|pair| {
            if pair.split('=').next() == Some(key) {
                format!("{key}={value}")
            } else {
                pair.to_string()
            }
        })
        .collect::<Vec<_>>()
        .join("&")
}
