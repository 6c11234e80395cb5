//! Run links: every valid parameter set survives `encode_link` / `decode_link` to the bit, a
//! hand-written version 1 link reads as its format description says, damaged fields fall back
//! to their defaults one by one, and arbitrary text never panics. (Bounds: `parameter_bounds.rs`.)

use proptest::prelude::*;
use ramulus_core::link::{decode_link, encode_link, field_text, version_1_defaults};
use ramulus_core::mask::MaskGrid;
use ramulus_core::params::{CostWeights, Domain, RunControl};
use ramulus_core::params::{Joining, Params, Root};
use ramulus_core::presets::presets;
use ramulus_core::schema::fields;
use ramulus_tests::param_strategy::any_valid_params;

/// Every field of both parameter sets, bit for bit: the serialized JSON writes each float in
/// its shortest round-trip form (so equal text means equal bits, -0.0 included) and holds every
/// field; this comparison does not go through the link codec under test.
fn same_bits(left: &Params, right: &Params) -> bool {
    serde_json::to_string(left).ok() == serde_json::to_string(right).ok()
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    /// Round trip to the bit, every field drawn from the parameter table: `PartialEq` on the
    /// whole `Params`, and `same_bits` also tells -0.0 from 0.0 (rapier's determinism habit).
    /// Parameters that validate but cannot start a run (a root in an obstacle, no allowed
    /// cell) are repaired instead, and the repair is reported.
    #[test]
    fn every_valid_parameter_set_round_trips_through_a_link(params in any_valid_params()) {
        let read = decode_link(&encode_link(&params));
        if ramulus_core::growth::Growth::new(&params).is_err() {
            prop_assert!(!read.problems.is_empty());
            prop_assert!(ramulus_core::growth::Growth::new(&read.params).is_ok());
            return Ok(());
        }
        prop_assert_eq!(&read.problems, &Vec::new());
        prop_assert_eq!(&read.params, &params);
        prop_assert!(same_bits(&read.params, &params), "{:?}", read.params);
    }

    /// Fuzzing: any text, and any valid link with bytes overwritten, reads without panicking
    /// into parameters that validate.
    #[test]
    fn arbitrary_text_reads_into_valid_parameters(text in ".{0,300}") {
        let read = decode_link(&text);
        prop_assert!(read.params.validate().is_ok());
        prop_assert!(ramulus_core::growth::Growth::new(&read.params).is_ok());
    }

    #[test]
    fn damaged_links_read_into_valid_parameters(
        params in any_valid_params(),
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
    // A 220 x 300 lattice with its root at (110, 270), as the open-growth broad leaf of
    // earlier releases had.
    let mut base = presets()[0].params.clone();
    base.domain.width = 220;
    base.domain.height = 300;
    base.domain.roots[0].x = 110;
    base.domain.roots[0].y = 270;
    base.domain.outline = None;
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
