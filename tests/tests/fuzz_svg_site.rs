//! Fuzzing the SVG site-plan reader (`site_plan_svg::read_site_svg`, as `ramulus drain --site plan.svg
//! --svg-scale ...` reads a file) on the corpus in `tests/fuzz-corpus/svg-site/` (see
//! `ramulus_tests::fuzz`; the long run and its figures are in DEVELOPERS.md).
//!
//! Properties of every input: no panic, no input over a second; an accepted plan is a site the
//! GeoJSON site reader accepts too when written out (RFC 7946 rings closed and simple, every
//! outlet inside the outline and outside every obstacle, levels checked), with the same
//! outline, outlets and zones; every coordinate finite.

use proptest::prelude::*;
use ramulus_core::site::read_site;
use ramulus_core::site_plan_svg::{read_site_svg, SvgScale};
use ramulus_tests::fuzz::{fuzz, FuzzInput, Verdict};

/// Pieces of SVG syntax the edits insert.
const TOKENS: &[&[u8]] = &[
    b"<g id=\"obstacles\">",
    b"</g>",
    b"<rect data-role=\"zone\" data-surface=\"roof\" x=\"1\" y=\"1\" width=\"5\" height=\"5\"/>",
    b"<circle data-role=\"outlet\" cx=\"50\" cy=\"50\" r=\"1\"/>",
    b" transform=\"matrix(0 1 -1 0 5 5)\"",
    b" transform=\"scale(1e300)\"",
    b" d=\"M 0 0 A 5 5 0 1 1 10 0 Z\"",
    b" Z",
    b" C 1 2 3 4 5 6",
    b" data-role=\"ignore\"",
    b" data-runoff-coefficient=\"2\"",
    b"<!DOCTYPE svg>",
    b"&amp;",
    b"-",
    b"1e309",
    b"\"",
    b"<",
    b">",
];

fn check(input: &FuzzInput) -> Result<Verdict, TestCaseError> {
    let scale = if input.choice.is_multiple_of(2) {
        SvgScale::Ratio(200.0)
    } else {
        SvgScale::PerUnit {
            length: 0.05,
            units: "m",
        }
    };
    let Ok(site) = read_site_svg(&input.bytes, &scale) else {
        return Ok(Verdict::Refused);
    };
    let rings = std::iter::once(&site.outline)
        .chain(site.obstacles.iter().map(|o| &o.ring))
        .chain(site.zones.iter().map(|z| &z.ring));
    for ring in rings {
        prop_assert!(ring.len() >= 3);
        prop_assert!(ring.iter().flatten().all(|v| v.is_finite()));
    }
    let again = read_site(site.to_geojson().as_bytes());
    prop_assert!(
        again.is_ok(),
        "the GeoJSON reader refuses it: {:?}",
        again.err()
    );
    let again = again.expect("checked");
    prop_assert_eq!(&again.outline, &site.outline);
    prop_assert_eq!(again.outlets.len(), site.outlets.len());
    for (a, b) in again.outlets.iter().zip(&site.outlets) {
        prop_assert_eq!(a.point, b.point);
    }
    prop_assert_eq!(again.zones.len(), site.zones.len());
    Ok(Verdict::Accepted)
}

#[test]
fn fuzz_svg_site_reader() {
    fuzz("svg-site", TOKENS, check);
}
