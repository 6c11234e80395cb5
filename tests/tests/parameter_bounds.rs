//! Every numeric parameter's bounds agree in validation, the page's schema, the run link and
//! README: the values are taken from the schema (what the form tells the user) and each key is
//! tried at and just beyond each bound; `Params::validate` and `decode_link` must accept the
//! bound and reject the value beyond it, naming the key, and README's row must show the bound.
//!
//! "Just beyond" is the next representable value: `f64::next_down` / `next_up` for reals
//! (IEEE 754-2008, section 5.3.1, nextDown and nextUp), one less or one more for whole numbers.

use ramulus_core::link::{decode_link, encode_link, set_field, version_1_defaults};
use ramulus_core::params::table::{parameters, readme_table};
use ramulus_core::params::{Params, Root, MAX_CELLS};
use ramulus_core::schema::{fields, FieldKind};

/// Valid parameters in which every bound of every key can be tried: a 1000 x 1000 lattice
/// (so width and height may each reach 20,000 alone), one root at the corner.
fn base() -> Params {
    let mut params = Params::default();
    params.domain.width = 1000;
    params.domain.height = 1000;
    params.domain.roots = vec![Root {
        x: 0,
        y: 0,
        outflow: [0.0, 1.0],
    }];
    assert_eq!(params.validate(), Ok(()));
    params
}

/// The cases of one key as `(text, should be accepted)`: at each bound and just beyond it.
/// Whole numbers are counted exactly (in `u128`): the largest whole number not above `max`, and
/// one more; one less than `min`, written with its sign.
fn cases(kind: FieldKind, min: f64, min_excluded: bool, max: f64) -> Vec<(String, bool)> {
    if kind == FieldKind::Integer {
        let low = min as i128;
        let high = (max as u128).min(u64::MAX as u128) as i128;
        return vec![
            (low.to_string(), true),
            ((low - 1).to_string(), false),
            (high.to_string(), true),
            ((high + 1).to_string(), false),
        ];
    }
    let mut out = vec![
        (format!("{max}"), true),
        (format!("{}", max.next_up()), false),
    ];
    if min_excluded {
        out.push((format!("{min}"), false));
        out.push((format!("{}", min.next_up()), true));
    } else {
        out.push((format!("{min}"), true));
        out.push((format!("{}", min.next_down()), false));
    }
    out
}

/// What each side says about `key = text`: (accepted by `validate`, accepted by the link).
fn verdicts(key: &str, text: &str) -> (bool, bool, Params) {
    let mut params = base();
    set_field(&mut params, key, text).expect("the text has the field's syntax");
    let by_validation = match params.validate() {
        Ok(()) => true,
        Err(error) => {
            assert_eq!(error.key, key, "{key} = {text}: error names {}", error.key);
            assert!(error.to_string().contains(key));
            false
        }
    };
    let read = decode_link(&encode_link(&params));
    let by_link = read.problems.is_empty();
    if !by_link {
        assert!(
            read.problems.iter().any(|problem| problem.key == key),
            "{key} = {text}: link problems {:?} do not name the key",
            read.problems
        );
        // The rejected field falls back to its version 1 default, the rest is kept; a cell
        // budget above the cap is capped instead (no lattice holds more cells, so the capped
        // budget grows the same network the larger one grew in version 1).
        let expected = if key == "cells" && params.run.cells > MAX_CELLS {
            MAX_CELLS.to_string()
        } else {
            ramulus_core::link::field_text(&version_1_defaults(), key).expect("a key")
        };
        assert_eq!(
            ramulus_core::link::field_text(&read.params, key),
            Some(expected)
        );
    } else {
        assert_eq!(read.params, params, "{key} = {text} changed in the link");
    }
    (by_validation, by_link, params)
}

#[test]
fn every_numeric_key_is_accepted_at_its_bounds_and_rejected_beyond() {
    let mut checked = Vec::new();
    for spec in fields() {
        if !matches!(
            spec.kind,
            FieldKind::Number | FieldKind::OptionalNumber | FieldKind::Integer
        ) {
            continue;
        }
        let (Some(min), Some(max)) = (spec.min, spec.max) else {
            panic!("numeric key `{}` has no bounds in the schema", spec.key);
        };
        for (text, accepted) in cases(spec.kind, min, spec.min_excluded, max) {
            let mut params = base();
            if set_field(&mut params, spec.key, &text).is_err() {
                // Beyond what the field's type can hold (a whole number below 0 or above
                // u64::MAX, a real beyond f64::MAX): the reader refuses the text itself.
                assert!(!accepted, "`{}` = {text} should be accepted", spec.key);
                let read = decode_link(&format!("v=1&{}={text}", spec.key));
                assert!(read.problems.iter().any(|problem| problem.key == spec.key));
                continue;
            }
            let (by_validation, by_link, _) = verdicts(spec.key, &text);
            assert_eq!(
                by_validation, accepted,
                "validate on `{}` = {text} (schema bounds {min} .. {max})",
                spec.key
            );
            assert_eq!(by_link, accepted, "link on `{}` = {text}", spec.key);
        }
        checked.push(spec.key);
    }
    // Every numeric key of the table took part, `cells` included.
    let numeric: Vec<&str> = parameters()
        .iter()
        .filter(|spec| spec.bounds.is_some())
        .map(|spec| spec.key)
        .collect();
    assert_eq!(checked, numeric);
    assert!(checked.contains(&"cells"));
    assert_eq!(checked.len(), 34);
}

/// The cell budget shares the lattice's limit of 25,000,000 cells: the form, validation and
/// links agree (the form used to say 25,000,000 while validation took more).
#[test]
fn the_cell_budget_is_at_most_25_million_everywhere() {
    let spec = fields()
        .into_iter()
        .find(|spec| spec.key == "cells")
        .unwrap();
    assert_eq!(spec.max, Some(25_000_000.0));
    assert!(verdicts("cells", "25000000").0);
    assert!(!verdicts("cells", "25000001").0);
    assert!(!verdicts("cells", "30000000").1);
}

/// README's row of each numeric key shows both bounds as validation uses them.
#[test]
fn readme_rows_show_the_bounds() {
    let table = readme_table();
    for spec in parameters() {
        let Some(bounds) = spec.bounds else { continue };
        let row = table
            .lines()
            .find(|line| line.starts_with(&format!("| `{}` |", spec.key)))
            .expect("a README row per key");
        let allowed = row.split(" | ").nth(5).expect("an allowed column");
        if bounds.max == u64::MAX as f64 {
            assert_eq!(allowed, "any whole number", "{}", spec.key);
            continue;
        }
        // A bound reads as written (`0.001`, `25000000`) or in exponent form (`1e6`).
        let shows = |value: f64| {
            allowed.contains(&format!("{value}")) || allowed.contains(&format!("{value:e}"))
        };
        assert!(shows(bounds.min), "{row}");
        if bounds.max != f64::MAX {
            assert!(shows(bounds.max), "{row}");
        }
        assert_eq!(
            allowed.starts_with('(') || allowed.starts_with('>') && !allowed.starts_with(">="),
            bounds.min_excluded,
            "{row}"
        );
    }
}
