//! Fuzzing the drainage-site reader as `ramulus drain --site` reads a file (`site::read_site`,
//! then `Site::to_params` with a cell size and the site's terrain) on the corpus in
//! `tests/fuzz-corpus/site/` (see `ramulus_tests::fuzz`; the long run and its figures are in
//! DEVELOPERS.md).
//!
//! Properties of every input: no panic, no input over a second; an accepted site has an outline
//! of positive area (shoelace formula, written here), finite positions, at least one outlet on
//! or inside the outline, and spot levels the site's own check accepts again; turning it into
//! run parameters either fails with an error or gives parameters that validate, on a lattice
//! the test bounds (the cell size is chosen from the outline's extent, so no case can ask for a
//! huge lattice); and at the command line's default cell size an outline too large for the
//! lattice is refused with a message before any cell is made.

use proptest::prelude::*;
use ramulus_core::site::{read_site, Site, SiteError, Terrain};
use ramulus_tests::fuzz::{fuzz, FuzzInput, Verdict};

/// Pieces of GeoJSON and site keys the edits insert.
const TOKENS: &[&[u8]] = &[
    b"{",
    b"}",
    b"[",
    b"]",
    b",",
    b":",
    b"\"",
    b"null",
    b"-",
    b"1e308",
    b"1e-320",
    b"0.0",
    b"\"role\":\"outline\"",
    b"\"role\":\"obstacle\"",
    b"\"role\":\"zone\"",
    b"\"role\":\"outlet\"",
    b"\"role\":\"level\"",
    b"\"units\":\"ft\"",
    b"\"units\":\"m\"",
    b"\"runoff_coefficient\":0.5",
    b"\"elevation\":",
    b"\"type\":\"Point\"",
    b"\"type\":\"Polygon\"",
    b"\"coordinates\":",
    b"[[[0,0],[9,0],[9,9],[0,0]]]",
    b"[5,5]",
    b"\\u0000",
    b"\xef\xbb\xbf",
];

/// Most cells a side of the lattices this test builds: with `MAX_SIDE` x `MAX_SIDE` cells a case
/// stays well under the hang limit.
const MAX_SIDE: f64 = 48.0;

/// Twice the signed area of a ring (shoelace formula), taken about its first position so large
/// coordinates keep their precision.
fn twice_area(ring: &[[f64; 2]]) -> f64 {
    let origin = ring[0];
    let mut sum = 0.0;
    for index in 0..ring.len() {
        let a = ring[index];
        let b = ring[(index + 1) % ring.len()];
        sum += (a[0] - origin[0]) * (b[1] - origin[1]) - (b[0] - origin[0]) * (a[1] - origin[1]);
    }
    sum
}

fn extent(ring: &[[f64; 2]]) -> [f64; 2] {
    let mut low = [f64::INFINITY; 2];
    let mut high = [f64::NEG_INFINITY; 2];
    for point in ring {
        for axis in 0..2 {
            low[axis] = low[axis].min(point[axis]);
            high[axis] = high[axis].max(point[axis]);
        }
    }
    [high[0] - low[0], high[1] - low[1]]
}

fn check(input: &FuzzInput) -> Result<Verdict, TestCaseError> {
    let Ok(site) = read_site(&input.bytes) else {
        return Ok(Verdict::Refused);
    };
    check_site(&site, input.choice)?;
    Ok(Verdict::Accepted)
}

fn check_site(site: &Site, choice: u8) -> Result<(), TestCaseError> {
    prop_assert!(
        site.units == "m" || site.units == "ft",
        "units {:?}",
        site.units
    );
    prop_assert!(
        site.outline.len() >= 3,
        "an outline of {} positions",
        site.outline.len()
    );
    let all_finite = site
        .outline
        .iter()
        .chain(site.obstacles.iter().flat_map(|obstacle| &obstacle.ring))
        .chain(site.zones.iter().flat_map(|zone| &zone.ring))
        .chain(site.outlets.iter().map(|outlet| &outlet.point))
        .flatten()
        .chain(
            site.levels
                .iter()
                .flat_map(|level| [&level.x, &level.y, &level.z]),
        )
        .all(|value| value.is_finite());
    prop_assert!(all_finite, "a position or elevation is not finite");
    let area = twice_area(&site.outline).abs();
    prop_assert!(area > 0.0, "an accepted outline of area {}", area / 2.0);
    prop_assert!(!site.outlets.is_empty(), "an accepted site without outlets");
    for zone in &site.zones {
        prop_assert!((0.0..=1.0).contains(&zone.runoff_coefficient));
    }
    // The levels pass the site's own check again.
    let mut again = site.clone();
    prop_assert!(
        again.set_levels(site.levels.clone()).is_ok(),
        "accepted spot levels refused by set_levels"
    );

    let terrain = if site.levels.len() >= 3 && choice & 1 == 0 {
        Terrain::SpotLevels
    } else {
        Terrain::Grade {
            east: 0.01,
            north: -0.02,
        }
    };
    // A cell size giving at most MAX_SIDE cells a side.
    let [dx, dy] = extent(&site.outline);
    let longest = dx.max(dy);
    let per_side = f64::from(1 + choice % 48).min(MAX_SIDE);
    let cell = longest / per_side;
    match site.to_params(cell, &terrain) {
        Ok(params) => {
            prop_assert!(
                params.validate().is_ok(),
                "to_params gave parameters that do not validate"
            );
            prop_assert!(
                f64::from(params.domain.width) <= MAX_SIDE + 1.0
                    && f64::from(params.domain.height) <= MAX_SIDE + 1.0,
                "a {} x {} lattice for cells of {cell}",
                params.domain.width,
                params.domain.height
            );
            prop_assert!(params.run.cells > 0);
            prop_assert_eq!(params.domain.roots.len(), site.outlets.len());
        }
        Err(error) => {
            // Every refusal has words.
            prop_assert!(!error.to_string().is_empty());
        }
    }
    // The command line's default cell: an outline far larger than the lattice allows is
    // refused before any cell is made (20,000 cells a side at most).
    let default_cell = if site.units == "ft" { 1.5 } else { 0.5 };
    if longest / default_cell > 20_001.0 {
        match site.to_params(default_cell, &terrain) {
            Err(SiteError::Params { problem }) => prop_assert!(
                problem.contains("choose larger cells"),
                "a huge site refused in other words: {}",
                problem
            ),
            other => prop_assert!(
                false,
                "a huge site is not refused for its size: {:?}",
                other.err()
            ),
        }
    }
    Ok(())
}

#[test]
fn fuzz_site_reader() {
    fuzz("site", TOKENS, check);
}
