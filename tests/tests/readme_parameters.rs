//! README's parameter table is generated from the parameter table in the core
//! (`params::table::readme_table`) and must equal it: this test fails when README.md differs.
//!
//! To regenerate after changing a parameter: `RAMULUS_BLESS=1 cargo test -p ramulus-tests
//! --test readme_parameters` rewrites the part between the marker comments (the file is written
//! to a temporary file beside it and renamed, so it is replaced whole or not at all).

use std::path::PathBuf;

use ramulus_core::params::table::{parameters, readme_table, README_TABLE_END, README_TABLE_START};

fn readme_path() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../README.md")
}

/// `(text before the table, the table, text after)`, split at the markers.
fn split_readme(text: &str) -> (String, String, String) {
    let start = text
        .find(README_TABLE_START)
        .expect("README.md holds the start marker of the parameter table")
        + README_TABLE_START.len();
    let end = text
        .find(README_TABLE_END)
        .expect("README.md holds the end marker of the parameter table");
    assert!(
        start <= end,
        "README's table markers are in the wrong order"
    );
    (
        text[..start].to_string(),
        text[start..end].trim_matches('\n').to_string(),
        text[end..].to_string(),
    )
}

#[test]
fn readme_parameter_table_equals_the_generated_one() {
    let path = readme_path();
    let text = std::fs::read_to_string(&path).expect("README.md is readable");
    let (before, found, after) = split_readme(&text);
    let expected = readme_table();
    if found == expected.trim_matches('\n') {
        return;
    }
    if std::env::var("RAMULUS_BLESS").as_deref() == Ok("1") {
        let fresh = format!("{before}\n{expected}{after}");
        let temporary = path.with_extension("md.tmp");
        std::fs::write(&temporary, fresh).expect("temporary README written");
        std::fs::rename(&temporary, &path).expect("README replaced");
        return;
    }
    panic!(
        "README.md's parameter table differs from the parameter table; regenerate it with\n\
         RAMULUS_BLESS=1 cargo test -p ramulus-tests --test readme_parameters\n\
         expected:\n{expected}\nfound:\n{found}"
    );
}

/// The generated table has one row per parameter, naming each key once, so no key is lost on
/// the way to README.
#[test]
fn generated_table_has_one_row_per_key() {
    let table = readme_table();
    let rows: Vec<&str> = table.lines().skip(2).collect();
    assert_eq!(rows.len(), parameters().len());
    for (row, spec) in rows.iter().zip(parameters()) {
        assert!(
            row.starts_with(&format!("| `{}` |", spec.key)),
            "row {row:?} is not `{}`",
            spec.key
        );
        assert_eq!(row.matches(" | ").count(), 7, "row {row:?} has 8 cells");
        // Every bounded key says why its bounds are what they are (the rule).
        let why = row.split(" | ").nth(6).unwrap_or("");
        assert_eq!(
            spec.bounds.is_some(),
            why != "-" && !why.is_empty(),
            "row {row:?}: bounds and their reason go together"
        );
    }
}
