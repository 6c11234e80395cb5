//! README's metrics table is generated from the core's metric table (`METRIC_TABLE`): this test
//! fails when the two differ. Regenerate with `RAMULUS_BLESS=1 cargo test -p ramulus-tests
//! --test readme_metrics`, which rewrites only the part between the markers.

use ramulus_core::metrics::metric_readme_table;

const BEGIN: &str =
    "<!-- metrics-table:begin (generated from METRIC_TABLE; see DEVELOPERS.md) -->\n";
const END: &str = "<!-- metrics-table:end -->";

fn readme_path() -> std::path::PathBuf {
    std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../README.md")
}

#[test]
fn readme_metrics_table_matches_the_metric_table() {
    let path = readme_path();
    let readme = std::fs::read_to_string(&path).expect("README.md is readable");
    let start = readme.find(BEGIN).expect("README holds the begin marker") + BEGIN.len();
    let end = start
        + readme[start..]
            .find(END)
            .expect("README holds the end marker");
    let generated = metric_readme_table();
    if readme[start..end] == generated {
        return;
    }
    if std::env::var("RAMULUS_BLESS").as_deref() == Ok("1") {
        let updated = format!("{}{}{}", &readme[..start], generated, &readme[end..]);
        // Written whole: a temporary file beside README, then a rename.
        let temporary = path.with_extension("md.tmp");
        std::fs::write(&temporary, updated).expect("write the temporary README");
        std::fs::rename(&temporary, &path).expect("replace README");
        return;
    }
    panic!(
        "README's metrics table differs from METRIC_TABLE; regenerate with \
         RAMULUS_BLESS=1 cargo test -p ramulus-tests --test readme_metrics\n\nexpected:\n{generated}"
    );
}
