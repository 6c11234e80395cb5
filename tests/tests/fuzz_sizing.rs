//! Fuzzing the design-form reader (`site_sizing::read_sizing_form`, the JSON form of the page's
//! sizing panel; `ramulus drain` fills the same form from its flags) on the corpus in
//! `tests/fuzz-corpus/sizing/` (see `ramulus_tests::fuzz`; the long run and its figures are in
//! DEVELOPERS.md).
//!
//! Properties of every input: no panic, no input over a second; an accepted form gives a
//! finite, positive design intensity (mm/h) at every whole minute of duration from 5 to 120
//! (the rational method's usual range of times of concentration), finite positive sizing rules
//! (Manning's n, least grade not negative, velocities ordered) and finite positive pipe
//! diameters.

use proptest::prelude::*;
use ramulus_core::drainage::Conveyance;
use ramulus_core::site_sizing::read_sizing_form;
use ramulus_tests::fuzz::{fuzz, FuzzInput, Verdict};

/// Pieces of the form the edits insert.
const TOKENS: &[&[u8]] = &[
    b"{",
    b"}",
    b"\"",
    b",",
    b":",
    b"null",
    b"-",
    b"0",
    b"1e308",
    b"1e-320",
    b"-1e308",
    b"NaN",
    b"inf",
    b"\"kind\":\"idf\"",
    b"\"kind\":\"constant\"",
    b"\"system\":\"us\"",
    b"\"conveyance\":\"swale\"",
    b"\"a\":\"",
    b"\"b\":\"",
    b"\"c\":\"",
    b"\"intensity\":\"",
    b"\"pipe_sizes\":\"",
    b"\"inlet_time\":\"",
    b"\"manning_n\":\"",
    b"\"velocity_min\":\"",
    b"\"velocity_max\":\"",
    b"\"min_grade_percent\":\"",
];

fn check(input: &FuzzInput) -> Result<Verdict, TestCaseError> {
    let Ok(text) = std::str::from_utf8(&input.bytes) else {
        return Ok(Verdict::Refused);
    };
    let Ok(design) = read_sizing_form(text) else {
        return Ok(Verdict::Refused);
    };
    for minutes in 5..=120 {
        let intensity = design.storm.intensity_mm_per_hour(f64::from(minutes));
        prop_assert!(
            matches!(intensity, Ok(value) if value.is_finite() && value > 0.0),
            "an accepted form gives intensity {:?} at {} min: {:?}",
            intensity,
            minutes,
            design.storm
        );
    }
    let rules = &design.rules;
    prop_assert!(
        rules.manning_n.is_finite() && rules.manning_n > 0.0,
        "Manning's n {}",
        rules.manning_n
    );
    prop_assert!(
        rules.min_grade.is_finite() && rules.min_grade >= 0.0,
        "least grade {}",
        rules.min_grade
    );
    prop_assert!(
        rules.inlet_time_minutes.is_finite() && rules.inlet_time_minutes >= 0.0,
        "inlet time {}",
        rules.inlet_time_minutes
    );
    prop_assert!(
        rules.min_velocity.is_finite()
            && rules.max_velocity.is_finite()
            && rules.min_velocity >= 0.0
            && rules.min_velocity < rules.max_velocity,
        "velocities {} to {}",
        rules.min_velocity,
        rules.max_velocity
    );
    if let Conveyance::Pipes { diameters } = &rules.conveyance {
        prop_assert!(!diameters.is_empty(), "no pipe sizes");
        for diameter in diameters {
            prop_assert!(
                diameter.is_finite() && *diameter > 0.0,
                "pipe diameter {} m",
                diameter
            );
        }
    }
    Ok(Verdict::Accepted)
}

#[test]
fn fuzz_sizing_reader() {
    fuzz("sizing", TOKENS, check);
}
