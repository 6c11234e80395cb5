//! Runs the real `ramulus` binary: JSON output, determinism, error messages that name the bad
//! parameter or file without a panic, masks, run records read back by `measure`, the preset
//! list and SVG export.

use std::path::PathBuf;
use std::process::Command;
use std::sync::atomic::{AtomicUsize, Ordering};

use serde_json::Value;

/// Exit status, stdout and stderr of one run of the binary.
struct Outcome {
    success: bool,
    code: Option<i32>,
    stdout: String,
    stderr: String,
}

fn ramulus(arguments: &[&str]) -> Outcome {
    let output = Command::new(env!("CARGO_BIN_EXE_ramulus"))
        .args(arguments)
        .env_remove("RUST_BACKTRACE")
        .output()
        .expect("the ramulus binary runs");
    Outcome {
        success: output.status.success(),
        code: output.status.code(),
        stdout: String::from_utf8_lossy(&output.stdout).into_owned(),
        stderr: String::from_utf8_lossy(&output.stderr).into_owned(),
    }
}

/// A path in the system temporary directory, unique to this process and call.
fn temp_path(stem: &str, extension: &str) -> PathBuf {
    static COUNTER: AtomicUsize = AtomicUsize::new(0);
    let serial = COUNTER.fetch_add(1, Ordering::SeqCst);
    std::env::temp_dir().join(format!(
        "ramulus-cli-test-{}-{serial}-{stem}.{extension}",
        std::process::id()
    ))
}

/// Removes a temporary file when dropped, also when the test fails.
struct TempFile(PathBuf);

impl TempFile {
    fn new(stem: &str, extension: &str) -> TempFile {
        TempFile(temp_path(stem, extension))
    }

    fn path(&self) -> &str {
        self.0.to_str().expect("temporary paths are UTF-8")
    }
}

impl Drop for TempFile {
    fn drop(&mut self) {
        let _ = std::fs::remove_file(&self.0);
    }
}

/// Parses stdout as exactly one JSON value (nothing else before or after it).
fn single_json(stdout: &str) -> Value {
    let values: Vec<Value> = serde_json::Deserializer::from_str(stdout)
        .into_iter::<Value>()
        .collect::<Result<_, _>>()
        .unwrap_or_else(|error| panic!("stdout is not JSON ({error}): {stdout}"));
    assert_eq!(values.len(), 1, "expected one JSON value, got: {stdout}");
    values.into_iter().next().expect("one value")
}

/// A failed run: non-zero exit, a message on stderr holding every one of `mentions`, and no
/// sign of a panic.
fn check_failure(outcome: &Outcome, mentions: &[&str]) {
    assert!(
        !outcome.success,
        "expected failure, got success: {}",
        outcome.stdout
    );
    assert_ne!(outcome.code, Some(0));
    // A Rust panic exits with 101; the command line turns every error into 1 or 2.
    assert_ne!(outcome.code, Some(101), "panicked: {}", outcome.stderr);
    for sign in ["panicked", "RUST_BACKTRACE", "stack backtrace"] {
        assert!(
            !outcome.stderr.contains(sign),
            "stderr shows a panic: {}",
            outcome.stderr
        );
    }
    for mention in mentions {
        assert!(
            outcome.stderr.contains(mention),
            "stderr does not mention {mention:?}: {}",
            outcome.stderr
        );
    }
}

fn grow_json(arguments: &[&str]) -> Value {
    let outcome = ramulus(arguments);
    assert!(outcome.success, "grow failed: {}", outcome.stderr);
    single_json(&outcome.stdout)
}

/// `--json` prints one object with the digest, counts, total length and metrics. The
/// spanning-tree preset fills an 80 x 80 lattice of unit cells (budget 6400) cheapest first by
/// pure length: Prim's algorithm (Prim 1957), whose tree on a full grid uses only unit steps, so
/// it has 6399 segments and total length 6399.
#[test]
fn grow_json_prints_one_object_with_the_summary() {
    let value = grow_json(&["grow", "--preset", "spanning-tree", "--json"]);
    let object = value.as_object().expect("a JSON object");
    let digest = object["digest"].as_str().expect("digest is text");
    assert_eq!(digest.len(), 16);
    assert!(digest.chars().all(|c| c.is_ascii_hexdigit()));
    assert_eq!(object["cells"].as_u64(), Some(6400));
    assert_eq!(object["segments"].as_u64(), Some(6399));
    let total = object["total_length"].as_f64().expect("total length");
    assert!(
        (total - 6399.0).abs() <= 1e-9 * 6399.0,
        "total length {total}"
    );
    let metrics = object["metrics"].as_object().expect("metrics object");
    assert_eq!(metrics["total_length"].as_f64(), Some(total));
    assert_eq!(metrics["segment_count"].as_u64(), Some(6399));
}

#[test]
fn growing_twice_gives_the_same_digest() {
    let first = grow_json(&["grow", "--preset", "spanning-tree", "--json"]);
    let second = grow_json(&["grow", "--preset", "spanning-tree", "--json"]);
    assert_eq!(first["digest"], second["digest"]);
    // A weighted-random preset is reproducible from its seed too, and another seed differs.
    let args = ["grow", "--preset", "drainage-site", "--json"];
    let a = grow_json(&args);
    let b = grow_json(&args);
    assert_eq!(a["digest"], b["digest"]);
    let c = grow_json(&[
        "grow",
        "--preset",
        "drainage-site",
        "--set",
        "seed=6",
        "--json",
    ]);
    assert_ne!(a["digest"], c["digest"]);
}

/// alpha lies in [0, 1] (branched transport, Xia 2003).
#[test]
fn an_invalid_value_is_named_without_a_panic() {
    let outcome = ramulus(&[
        "grow",
        "--preset",
        "spanning-tree",
        "--set",
        "alpha=2",
        "--json",
    ]);
    check_failure(&outcome, &["alpha", "2"]);
    assert!(
        outcome.stdout.trim().is_empty(),
        "stdout: {}",
        outcome.stdout
    );

    let outcome = ramulus(&["grow", "--preset", "spanning-tree", "--set", "jitter=0.5"]);
    check_failure(&outcome, &["jitter", "0.5"]);
}

#[test]
fn an_unknown_key_is_named() {
    let outcome = ramulus(&["grow", "--preset", "spanning-tree", "--set", "nosuchkey=1"]);
    check_failure(&outcome, &["nosuchkey"]);
    let outcome = ramulus(&["grow", "--preset", "no-such-preset"]);
    check_failure(&outcome, &["no-such-preset", "spanning-tree"]);
}

#[test]
fn a_missing_params_file_is_named() {
    let missing = temp_path("missing-params", "json");
    let path = missing.to_str().expect("UTF-8 path");
    let outcome = ramulus(&["grow", "--params", path]);
    check_failure(&outcome, &[path]);
    let outcome = ramulus(&["measure", path]);
    check_failure(&outcome, &[path]);
}

#[test]
fn a_params_file_with_a_bad_key_is_named() {
    let file = TempFile::new("bad-params", "json");
    std::fs::write(&file.0, r#"{"width": 30, "heigth": 30}"#).expect("write params");
    let outcome = ramulus(&["grow", "--params", file.path()]);
    check_failure(&outcome, &["heigth"]);
}

/// A plain PBM (Netpbm P1: `1` = black = allowed) of 5 x 3 sets the lattice to 5 x 3. Its 11
/// allowed cells (4 + 2 + 5 by row) are joined by unit steps, so the spanning tree (Prim 1957)
/// has 10 unit segments.
#[test]
fn a_mask_sets_the_lattice_size() {
    let mask = TempFile::new("mask", "pbm");
    std::fs::write(
        &mask.0,
        "P1\n# test mask\n5 3\n1 1 1 0 1\n0 1 0 0 1\n1 1 1 1 1\n",
    )
    .expect("write mask");
    let record = TempFile::new("mask-record", "json");
    let value = grow_json(&[
        "grow",
        "--preset",
        "spanning-tree",
        "--mask",
        mask.path(),
        "--set",
        r#"roots=[{"x": 0, "y": 0, "outflow": [0, 1]}]"#,
        "--record",
        record.path(),
        "--json",
    ]);
    assert_eq!(value["cells"].as_u64(), Some(11));
    assert_eq!(value["segments"].as_u64(), Some(10));
    let total = value["total_length"].as_f64().expect("total length");
    assert!((total - 10.0).abs() <= 1e-9 * 10.0, "total length {total}");
    let text = std::fs::read_to_string(&record.0).expect("record written");
    let stored: Value = serde_json::from_str(&text).expect("record is JSON");
    assert_eq!(stored["params"]["width"].as_u64(), Some(5));
    assert_eq!(stored["params"]["height"].as_u64(), Some(3));
    assert!(stored["params"]["mask"].is_object());

    // A root outside the 5 x 3 mask is an error naming it.
    let outcome = ramulus(&["grow", "--preset", "spanning-tree", "--mask", mask.path()]);
    check_failure(&outcome, &["roots[0]"]);
}

#[test]
fn a_record_measures_back_to_the_same_digest() {
    let record = TempFile::new("record", "json");
    let grown = grow_json(&[
        "grow",
        "--preset",
        "drainage-site",
        "--record",
        record.path(),
        "--json",
    ]);
    let measured = ramulus(&["measure", record.path(), "--json"]);
    assert!(measured.success, "measure failed: {}", measured.stderr);
    let measured = single_json(&measured.stdout);
    assert_eq!(measured["digest"], grown["digest"]);
    assert_eq!(measured["segments"], grown["segments"]);
    let (a, b) = (
        grown["total_length"].as_f64().expect("grown total"),
        measured["total_length"].as_f64().expect("measured total"),
    );
    assert!((a - b).abs() <= 1e-12 * a, "total length {a} vs {b}");
}

/// A version-1 record whose metrics lack keys (written before those metrics existed) still
/// measures, to the digest it was written with (the compatibility pin in tests/data).
#[test]
fn an_old_record_with_missing_metric_keys_measures() {
    let pin = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../tests/data/record-v1-pin.json"
    );
    let mut record: Value =
        serde_json::from_str(&std::fs::read_to_string(pin).expect("the pin is readable"))
            .expect("the pin is JSON");
    let metrics = record["metrics"].as_object_mut().expect("stored metrics");
    metrics.remove("aspect_ratio");
    metrics.remove("streams");
    let file = TempFile::new("old-record", "json");
    std::fs::write(file.path(), record.to_string()).expect("temporary file written");
    let measured = ramulus(&["measure", file.path(), "--json"]);
    assert!(measured.success, "measure failed: {}", measured.stderr);
    let measured = single_json(&measured.stdout);
    assert_eq!(measured["digest"], record["digest"]);
    assert_eq!(
        measured["metrics"]["loop_count"], 0,
        "a version-1 record is a forest"
    );
}

#[test]
fn presets_json_lists_every_preset() {
    let outcome = ramulus(&["presets", "--json"]);
    assert!(outcome.success, "presets failed: {}", outcome.stderr);
    let value = single_json(&outcome.stdout);
    let list = value.as_array().expect("a JSON array");
    let expected = ramulus_core::presets::presets();
    assert_eq!(list.len(), expected.len());
    for preset in &expected {
        let entry = list
            .iter()
            .find(|entry| entry["name"] == preset.name)
            .unwrap_or_else(|| panic!("preset {} not listed", preset.name));
        assert!(entry["description"].as_str().is_some_and(|d| !d.is_empty()));
        let params = ramulus_core::params::Params::from_json_value(entry["params"].clone())
            .unwrap_or_else(|error| panic!("{}: params do not read back: {error}", preset.name));
        assert_eq!(params, preset.params, "{}: params differ", preset.name);
    }
    for name in [
        "ovate-leaf",
        "elliptic-leaf",
        "lanceolate-leaf",
        "filled-outline",
        "drainage-site",
        "spanning-tree",
    ] {
        assert!(list.iter().any(|entry| entry["name"] == name), "{name}");
    }
}

#[test]
fn svg_export_writes_an_svg_file() {
    let svg = TempFile::new("network", "svg");
    let outcome = ramulus(&["grow", "--preset", "spanning-tree", "--svg", svg.path()]);
    assert!(outcome.success, "grow failed: {}", outcome.stderr);
    let text = std::fs::read_to_string(&svg.0).expect("svg written");
    let start = text.trim_start();
    assert!(
        start.starts_with("<svg") || start.starts_with("<?xml"),
        "starts with: {}",
        &start[..start.len().min(80)]
    );
    assert!(text.trim_end().ends_with("</svg>"));
}

#[test]
fn usage_errors_exit_non_zero_without_a_panic() {
    check_failure(&ramulus(&["frobnicate"]), &["frobnicate"]);
    check_failure(&ramulus(&["grow", "--set"]), &["--set"]);
    check_failure(&ramulus(&["grow", "--set", "alpha"]), &["alpha"]);
    check_failure(&ramulus(&["measure"]), &["measure"]);
}

/// The `link` printed by `--json` grows the same run when handed back through `--link`, as a
/// bare fragment or inside a whole URL; `--set` still overrides one key on top of a link.
#[test]
fn a_printed_link_grows_the_same_run() {
    let first = grow_json(&["grow", "--preset", "spanning-tree", "--json"]);
    let url = first["link"].as_str().expect("link is text");
    // The link is an address that opens: `./x serve`'s page, then the run's fragment.
    assert!(url.starts_with("http://127.0.0.1:8080/#v=1&"), "{url}");
    let link = first["fragment"].as_str().expect("fragment is text");
    assert!(link.starts_with("#v=1&"), "{link}");
    assert!(url.ends_with(link), "{url} ends with {link}");
    let again = grow_json(&["grow", "--link", link, "--json"]);
    assert_eq!(again["digest"], first["digest"]);
    let from_url = grow_json(&["grow", "--link", url, "--json"]);
    assert_eq!(from_url["digest"], first["digest"]);
    let other = grow_json(&["grow", "--link", link, "--set", "cells=100", "--json"]);
    assert_eq!(other["cells"].as_u64(), Some(100));
}

/// A damaged field warns on stderr, naming the field, and the run still grows; `--link`
/// together with `--preset` is a usage error.
#[test]
fn a_damaged_link_warns_and_a_link_with_a_preset_is_refused() {
    let first = grow_json(&["grow", "--preset", "spanning-tree", "--json"]);
    let link = first["link"].as_str().expect("link is text");
    let damaged = link.replace("&alpha=", "&alpha=oops");
    assert_ne!(damaged, link, "the link has an alpha field to damage");
    let outcome = ramulus(&["grow", "--link", &damaged, "--json"]);
    assert!(outcome.success, "{}", outcome.stderr);
    assert!(outcome.stderr.contains("`alpha`"), "{}", outcome.stderr);
    let outcome = ramulus(&["grow", "--link", link, "--preset", "broad-leaf"]);
    assert_eq!(outcome.code, Some(2));
    assert!(outcome.stderr.contains("--link"), "{}", outcome.stderr);
}

/// The flags each command takes; `COMMAND --help` must name every one of them.
const COMMAND_FLAGS: [(&str, &[&str]); 5] = [
    (
        "grow",
        &[
            "--preset",
            "--params",
            "--set",
            "--mask",
            "--link",
            "--record",
            "--svg",
            "--geojson",
            "--edge-list",
            "--colour",
            "--color",
            "--json",
        ],
    ),
    (
        "measure",
        &[
            "--json",
            "RECORD.json",
            "--units",
            "--scale",
            "--scale-bar",
            "--root",
            "--snap",
            "--flatten",
            "--leaf-light",
            "--veins-light",
            "--local-threshold",
            "--spur",
            "--write-leaf-mask",
            "--write-veins",
            "--write-skeleton",
        ],
    ),
    ("presets", &["--json"]),
    (
        "drain",
        &[
            "--site",
            "--svg-scale",
            "--cell-size",
            "--levels",
            "--terrain",
            "--intensity",
            "--idf",
            "--units",
            "--svg",
            "--csv",
            "--geojson",
            "--json",
        ],
    ),
    (
        "bench",
        &["--quick", "--json", "--image", "--refill", "--passes"],
    ),
];

/// `ramulus COMMAND --help` prints that command's usage and every flag on stdout and exits 0;
/// `ramulus help COMMAND` prints the same text.
#[test]
fn every_command_has_help() {
    for (command, flags) in COMMAND_FLAGS {
        let outcome = ramulus(&[command, "--help"]);
        assert_eq!(
            outcome.code,
            Some(0),
            "{command} --help: {}",
            outcome.stderr
        );
        assert!(
            outcome
                .stdout
                .contains(&format!("Usage: ramulus {command}")),
            "{command} --help: {}",
            outcome.stdout
        );
        for flag in flags {
            assert!(
                outcome.stdout.contains(flag),
                "{command} --help does not name {flag}: {}",
                outcome.stdout
            );
        }
        let short = ramulus(&[command, "-h"]);
        assert_eq!(short.code, Some(0), "{command} -h: {}", short.stderr);
        let via_help = ramulus(&["help", command]);
        assert_eq!(
            via_help.code,
            Some(0),
            "help {command}: {}",
            via_help.stderr
        );
        assert_eq!(via_help.stdout, outcome.stdout, "help {command}");
    }
}

/// `ramulus help` and `ramulus --help` list every command on stdout and exit 0; `ramulus`
/// alone prints the same list on stderr and exits 2 (nothing to do is a usage error).
#[test]
fn help_lists_every_command() {
    for arguments in [&["help"][..], &["--help"][..]] {
        let outcome = ramulus(arguments);
        assert_eq!(outcome.code, Some(0), "{arguments:?}: {}", outcome.stderr);
        for (command, _) in COMMAND_FLAGS {
            assert!(
                outcome.stdout.contains(&format!("\n  {command} ")),
                "{arguments:?} does not list {command}: {}",
                outcome.stdout
            );
        }
    }
    let bare = ramulus(&[]);
    assert_eq!(bare.code, Some(2));
    assert!(bare.stdout.is_empty(), "stdout: {}", bare.stdout);
    for (command, _) in COMMAND_FLAGS {
        assert!(bare.stderr.contains(command), "{}", bare.stderr);
    }
}

/// `--version` prints the Cargo package version.
#[test]
fn version_is_the_package_version() {
    let expected = format!("ramulus {}\n", env!("CARGO_PKG_VERSION"));
    for arguments in [&["--version"][..], &["-V"][..]] {
        let outcome = ramulus(arguments);
        assert_eq!(outcome.code, Some(0), "{arguments:?}: {}", outcome.stderr);
        assert_eq!(outcome.stdout, expected, "{arguments:?}");
    }
}

/// An unknown flag is a usage error (exit 2) whose message names the flag, for every command.
#[test]
fn an_unknown_flag_is_named_with_exit_2() {
    for (command, _) in COMMAND_FLAGS {
        let outcome = ramulus(&[command, "--no-such-flag"]);
        check_failure(&outcome, &["--no-such-flag"]);
        assert_eq!(outcome.code, Some(2), "{command}: {}", outcome.stderr);
        assert!(outcome.stdout.is_empty(), "{command}: {}", outcome.stdout);
    }
    // A value outside a flag's choices names the flag and the value.
    let outcome = ramulus(&["grow", "--colour", "purple"]);
    check_failure(&outcome, &["--colour", "purple"]);
    assert_eq!(outcome.code, Some(2));
    // --set without KEY=VALUE is a usage error naming the flag.
    let outcome = ramulus(&["grow", "--set", "alpha"]);
    check_failure(&outcome, &["--set", "alpha"]);
    assert_eq!(outcome.code, Some(2));
    // A failed run (not a usage error) exits 1.
    let outcome = ramulus(&["grow", "--preset", "no-such-preset"]);
    assert_eq!(outcome.code, Some(1), "{}", outcome.stderr);
}

/// `--color` is the same flag as `--colour`: both write the same drawing, and colouring by
/// flow draws differently from the default colouring by Strahler order.
#[test]
fn color_and_colour_are_one_flag() {
    let drawings: Vec<String> = [
        &["--colour", "flow"][..],
        &["--color", "flow"][..],
        &["--colour", "order"][..],
    ]
    .iter()
    .map(|colour| {
        let svg = TempFile::new("colour", "svg");
        let mut arguments = vec!["grow", "--preset", "drainage-site", "--svg", svg.path()];
        arguments.extend_from_slice(colour);
        let outcome = ramulus(&arguments);
        assert!(outcome.success, "{colour:?}: {}", outcome.stderr);
        std::fs::read_to_string(&svg.0).expect("svg written")
    })
    .collect();
    assert_eq!(drawings[0], drawings[1]);
    assert_ne!(drawings[0], drawings[2]);
}

/// Grows one record per preset and returns the files with the digests printed by `grow`.
fn grow_records(presets: &[&str]) -> Vec<(TempFile, Value)> {
    presets
        .iter()
        .map(|preset| {
            let record = TempFile::new(preset, "json");
            let grown = grow_json(&[
                "grow",
                "--preset",
                preset,
                "--record",
                record.path(),
                "--json",
            ]);
            (record, grown)
        })
        .collect()
}

/// One record measured with `--json` keeps the shape it had before several files were
/// accepted: the keys digest, segments, total_length and metrics (compatibility pin of the key
/// names, not of values), plus the stored digest and whether it matches.
#[test]
fn measuring_one_record_keeps_its_json_shape() {
    let records = grow_records(&["spanning-tree"]);
    let (record, grown) = &records[0];
    let outcome = ramulus(&["measure", record.path(), "--json"]);
    assert!(outcome.success, "{}", outcome.stderr);
    let value = single_json(&outcome.stdout);
    let mut keys: Vec<&str> = value
        .as_object()
        .expect("one object")
        .keys()
        .map(String::as_str)
        .collect();
    keys.sort_unstable();
    assert_eq!(
        keys,
        [
            "digest",
            "digest_matches",
            "metrics",
            "segments",
            "stored_digest",
            "total_length"
        ]
    );
    assert_eq!(value["digest"], grown["digest"]);
    assert_eq!(value["stored_digest"], grown["digest"]);
    assert_eq!(value["digest_matches"], true);
}

/// A record whose stored digest no longer fits its network (edited by hand, damaged) is
/// flagged: `digest_matches` is false, and stderr names the file and both digests.
#[test]
fn a_record_with_a_wrong_stored_digest_is_flagged() {
    let records = grow_records(&["spanning-tree"]);
    let (record, grown) = &records[0];
    let real = grown["digest"].as_str().expect("a digest");
    let text = std::fs::read_to_string(record.path()).expect("the record");
    let edited = text.replacen(real, "0123456789abcdef", 1);
    assert_ne!(edited, text);
    std::fs::write(record.path(), edited).expect("writable");
    let outcome = ramulus(&["measure", record.path(), "--json"]);
    assert!(outcome.success, "{}", outcome.stderr);
    let value = single_json(&outcome.stdout);
    assert_eq!(value["digest"], real);
    assert_eq!(value["stored_digest"], "0123456789abcdef");
    assert_eq!(value["digest_matches"], false);
    for mention in [record.path(), real, "0123456789abcdef"] {
        assert!(outcome.stderr.contains(mention), "{}", outcome.stderr);
    }
}

/// Several records are all measured, in the order given: `--json` prints one object whose
/// `records` hold one entry per file with its name and the digest `grow` printed for it; the
/// table output names each file with its digest.
#[test]
fn several_records_are_all_measured() {
    let records = grow_records(&["drainage-site", "spanning-tree", "narrow-leaf"]);
    let paths: Vec<&str> = records.iter().map(|(record, _)| record.path()).collect();
    assert_ne!(records[0].1["digest"], records[1].1["digest"]);

    let mut arguments = vec!["measure", "--json"];
    arguments.extend(&paths);
    let outcome = ramulus(&arguments);
    assert!(outcome.success, "{}", outcome.stderr);
    let value = single_json(&outcome.stdout);
    let list = value["records"].as_array().expect("a records array");
    assert_eq!(list.len(), records.len());
    for (entry, (record, grown)) in list.iter().zip(&records) {
        assert_eq!(entry["file"].as_str(), Some(record.path()));
        assert_eq!(entry["digest"], grown["digest"], "{}", record.path());
        assert_eq!(entry["segments"], grown["segments"], "{}", record.path());
        assert!(entry["metrics"].is_object());
    }

    let mut arguments = vec!["measure"];
    arguments.extend(&paths);
    let outcome = ramulus(&arguments);
    assert!(outcome.success, "{}", outcome.stderr);
    let mut from = 0;
    for (record, grown) in &records {
        let digest = grown["digest"].as_str().expect("digest");
        let heading = outcome.stdout[from..]
            .find(&format!("{}:\n", record.path()))
            .unwrap_or_else(|| panic!("{} not named in order: {}", record.path(), outcome.stdout))
            + from;
        let line = outcome.stdout[heading..]
            .find(&format!("digest: {digest}"))
            .unwrap_or_else(|| panic!("{digest} not printed: {}", outcome.stdout))
            + heading;
        from = line;
    }
}

/// If any of several records cannot be read, every failing file is named on stderr, nothing
/// is printed on stdout, and the exit code is 1.
#[test]
fn several_records_with_a_bad_one_print_nothing() {
    let records = grow_records(&["spanning-tree"]);
    let missing = temp_path("missing-record", "json");
    let missing = missing.to_str().expect("UTF-8 path");
    let broken = TempFile::new("broken-record", "json");
    std::fs::write(&broken.0, "{ not a record").expect("write broken record");
    for json in [true, false] {
        let mut arguments = vec!["measure", records[0].0.path(), missing, broken.path()];
        if json {
            arguments.push("--json");
        }
        let outcome = ramulus(&arguments);
        check_failure(&outcome, &[missing, broken.path()]);
        assert_eq!(outcome.code, Some(1), "{}", outcome.stderr);
        assert!(
            !outcome.stderr.contains(records[0].0.path()),
            "the good file is named as failing: {}",
            outcome.stderr
        );
        assert!(outcome.stdout.is_empty(), "stdout: {}", outcome.stdout);
    }
}

/// Rule: files are written whole or not at all. A run whose second output cannot be written
/// fails (exit 1) and leaves the record it would have replaced byte for byte as it was.
#[test]
fn a_failed_output_leaves_every_existing_file_as_it_was() {
    let record = TempFile::new("kept", "json");
    let first = ramulus(&[
        "grow",
        "--preset",
        "spanning-tree",
        "--set",
        "cells=300",
        "--record",
        record.path(),
    ]);
    assert!(first.success, "{}", first.stderr);
    let before = std::fs::read(record.path()).expect("the first record exists");
    let missing_folder = temp_path("no-such-folder", "d");
    let svg = missing_folder.join("x.svg");
    let outcome = ramulus(&[
        "grow",
        "--preset",
        "spanning-tree",
        "--set",
        "cells=500",
        "--record",
        record.path(),
        "--svg",
        svg.to_str().expect("UTF-8"),
    ]);
    check_failure(&outcome, &["x.svg", "cannot write"]);
    assert_eq!(outcome.code, Some(1));
    assert_eq!(std::fs::read(record.path()).expect("still there"), before);
    assert!(!svg.exists());
}

/// Rule: an output may not name an input or another output (it would be overwritten, or two
/// outputs would overwrite each other); the run is refused as wrong usage before anything is
/// written, and the named file keeps its contents.
#[test]
fn an_output_naming_an_input_or_another_output_is_refused() {
    let params = TempFile::new("params", "json");
    std::fs::write(params.path(), r#"{"cells": 200}"#).expect("writable temp dir");
    let outcome = ramulus(&["grow", "--params", params.path(), "--record", params.path()]);
    check_failure(&outcome, &["--record", "--params"]);
    assert_eq!(outcome.code, Some(2));
    assert_eq!(
        std::fs::read_to_string(params.path()).expect("still there"),
        r#"{"cells": 200}"#
    );

    let both = TempFile::new("both", "out");
    // The same file through two spellings of its path.
    let folder = both.0.parent().expect("a folder").to_str().expect("UTF-8");
    let name = both.0.file_name().expect("a name").to_str().expect("UTF-8");
    let other_spelling = format!("{folder}/./{name}");
    let outcome = ramulus(&[
        "grow",
        "--preset",
        "spanning-tree",
        "--record",
        both.path(),
        "--svg",
        &other_spelling,
    ]);
    check_failure(&outcome, &["--svg", "--record"]);
    assert_eq!(outcome.code, Some(2));
    assert!(
        !both.0.exists(),
        "nothing is written when the outputs collide"
    );
}

/// Rule: output that cannot be written is an error. Printing to a full device (`/dev/full`
/// fails every write with ENOSPC on Linux) exits 1 and says so; it never reports success.
#[test]
fn a_full_standard_output_fails_the_run() {
    let Ok(full) = std::fs::OpenOptions::new().write(true).open("/dev/full") else {
        return; // not Linux: no device that is always full
    };
    let record = TempFile::new("for-full-stdout", "json");
    good_record(record.path());
    for arguments in [
        &[
            "grow",
            "--preset",
            "spanning-tree",
            "--set",
            "cells=200",
            "--json",
        ][..],
        &["presets"][..],
        &["measure", record.path(), "--json"][..],
        &["measure", record.path()][..],
    ] {
        let output = Command::new(env!("CARGO_BIN_EXE_ramulus"))
            .args(arguments)
            .stdout(full.try_clone().expect("a second handle"))
            .output()
            .expect("the ramulus binary runs");
        let stderr = String::from_utf8_lossy(&output.stderr);
        assert_eq!(output.status.code(), Some(1), "{arguments:?}: {stderr}");
        assert!(stderr.contains("standard output"), "{stderr}");
        assert!(!stderr.contains("panicked"), "{stderr}");
    }
}

/// Rule: two runs writing the same record at once leave one whole record, the one or the other,
/// never a mixture (each run renames a finished file into place).
#[test]
fn two_runs_writing_one_record_leave_a_whole_record() {
    let record = TempFile::new("raced", "json");
    for round in 0..6 {
        let start = |seed: u32| {
            Command::new(env!("CARGO_BIN_EXE_ramulus"))
                .args(["grow", "--preset", "spanning-tree", "--set", "cells=2000"])
                .args([
                    "--set",
                    &format!("seed={seed}"),
                    "--json",
                    "--record",
                    record.path(),
                ])
                .output()
        };
        let (one, two) = std::thread::scope(|scope| {
            let one = scope.spawn(|| start(2 * round + 1));
            let two = scope.spawn(|| start(2 * round + 2));
            (one.join(), two.join())
        });
        let digests: Vec<String> = [one, two]
            .into_iter()
            .map(|run| {
                let output = run.expect("no panic").expect("the binary runs");
                assert!(output.status.success());
                single_json(&String::from_utf8_lossy(&output.stdout))["digest"]
                    .as_str()
                    .expect("a digest")
                    .to_string()
            })
            .collect();
        let measured = ramulus(&["measure", record.path(), "--json"]);
        assert!(measured.success, "round {round}: {}", measured.stderr);
        let digest = single_json(&measured.stdout)["digest"]
            .as_str()
            .expect("a digest")
            .to_string();
        assert!(
            digests.contains(&digest),
            "round {round}: {digest} not in {digests:?}"
        );
    }
}

/// Rule (RFC 8259, section 4: names within an object should be unique, and readers differ on
/// repeated ones): a parameter file that repeats a key is read with the last value, as JSON
/// readers commonly do, and the repetition is named on stderr instead of passing silently. A
/// UTF-8 byte-order mark before the JSON is skipped.
#[test]
fn a_repeated_key_in_a_parameter_file_is_named_and_a_byte_order_mark_is_skipped() {
    let params = TempFile::new("repeated", "json");
    std::fs::write(
        params.path(),
        "\u{feff}{\"cells\": 300, \"seed\": 4, \"cells\": 200, \"cells\": 100}",
    )
    .expect("writable temp dir");
    let outcome = ramulus(&["grow", "--params", params.path(), "--json"]);
    assert!(outcome.success, "{}", outcome.stderr);
    assert!(
        outcome.stderr.contains("`cells` is given 3 times"),
        "{}",
        outcome.stderr
    );
    assert!(!outcome.stderr.contains("`seed`"), "{}", outcome.stderr);
    assert_eq!(single_json(&outcome.stdout)["cells"], 100);
}

/// Record versions start at 1: version 0 is named as not existing, not as "newer".
#[test]
fn record_version_zero_is_named_as_not_existing() {
    let record = TempFile::new("version-zero", "json");
    std::fs::write(
        record.path(),
        r#"{"format": "ramulus-run", "version": 0, "digest": "0", "units": "mm", "area": 1, "nodes": []}"#,
    )
    .expect("writable temp dir");
    let outcome = ramulus(&["measure", record.path()]);
    check_failure(&outcome, &[record.path(), "version 0 does not exist"]);
    assert!(!outcome.stderr.contains("newer"), "{}", outcome.stderr);
}

/// A plain PBM (Netpbm P1, Poskanzer's format: "1" is black) of `width` x `height` black
/// pixels, i.e. every cell allowed.
fn all_black_pbm(width: usize, height: usize) -> String {
    let row = vec!["1"; width].join(" ");
    format!("P1\n{width} {height}\n{}\n", vec![row; height].join("\n"))
}

/// Rule: the mask's pixels are the lattice's cells, so its size is the lattice size. Roots are
/// checked against that size (not the preset's), and a `--set width` or `height` that
/// disagrees with the image is refused as wrong usage, naming both, instead of being dropped.
#[test]
fn the_mask_sets_the_lattice_before_roots_are_checked_and_a_clashing_size_is_refused() {
    let mask = TempFile::new("wide", "pbm");
    std::fs::write(mask.path(), all_black_pbm(200, 20)).expect("writable temp dir");
    // x = 150 lies outside the spanning-tree preset's lattice but inside the 200-wide mask.
    let root = r#"roots=[{"x":150,"y":10,"outflow":[0,1]}]"#;
    let outcome = ramulus(&[
        "grow",
        "--preset",
        "spanning-tree",
        "--set",
        root,
        "--set",
        "cells=50",
        "--mask",
        mask.path(),
        "--json",
    ]);
    assert!(outcome.success, "{}", outcome.stderr);
    assert_eq!(single_json(&outcome.stdout)["cells"], 50);

    let outcome = ramulus(&[
        "grow",
        "--preset",
        "spanning-tree",
        "--set",
        "width=50",
        "--mask",
        mask.path(),
    ]);
    check_failure(&outcome, &["--set width=50", mask.path(), "200 x 20"]);
    assert_eq!(outcome.code, Some(2));
    // The size the image has may be given too.
    let outcome = ramulus(&[
        "grow",
        "--preset",
        "spanning-tree",
        "--set",
        "width=200",
        "--set",
        "cells=30",
        "--set",
        root,
        "--mask",
        mask.path(),
        "--json",
    ]);
    assert!(outcome.success, "{}", outcome.stderr);
}

/// README's example with the shipped example files runs as written: the oval mask sets a
/// 64 x 48 lattice and the run fills its budget inside it.
#[test]
fn the_readme_example_files_grow() {
    let examples = concat!(env!("CARGO_MANIFEST_DIR"), "/../examples");
    let outcome = ramulus(&[
        "grow",
        "--params",
        &format!("{examples}/oval-leaf.json"),
        "--mask",
        &format!("{examples}/oval.pbm"),
        "--json",
    ]);
    assert!(outcome.success, "{}", outcome.stderr);
    let value = single_json(&outcome.stdout);
    assert_eq!(value["cells"], 2000);
    assert!(value["link"]
        .as_str()
        .expect("a link")
        .contains("width=64&height=48"));
}

/// Input that is not UTF-8 text (RFC 3629: the byte 0xff never occurs in UTF-8) is refused
/// with the byte offset of the first invalid byte, for a parameter file, a run record and a
/// run link given on the command line.
#[cfg(unix)]
#[test]
fn non_utf8_input_names_the_byte_offset() {
    let params = TempFile::new("latin1", "json");
    // `{"units": "` is 11 bytes, so the Latin-1 "é" (0xe9) stands at byte offset 11 on line 1.
    std::fs::write(&params.0, b"{\"units\": \"\xe9\"}").expect("writable temp file");
    let outcome = ramulus(&["grow", "--params", params.path()]);
    check_failure(
        &outcome,
        &[
            params.path(),
            "not UTF-8",
            "byte offset 11 (line 1)",
            "0xe9",
        ],
    );
    assert_eq!(outcome.code, Some(1));

    let record = TempFile::new("latin1-record", "json");
    // `{`, LF, `"format": "` make 13 bytes: the 0xff stands at offset 13 on line 2.
    std::fs::write(&record.0, b"{\n\"format\": \"\xff\"}").expect("writable temp file");
    let outcome = ramulus(&["measure", record.path()]);
    check_failure(
        &outcome,
        &[
            record.path(),
            "not UTF-8",
            "byte offset 13 (line 2)",
            "0xff",
        ],
    );

    // A link is an argument: build it from raw bytes (Unix arguments are bytes).
    use std::os::unix::ffi::OsStrExt;
    let link = std::ffi::OsStr::from_bytes(b"#v=1&seed=\xff");
    let output = Command::new(env!("CARGO_BIN_EXE_ramulus"))
        .args(["grow".as_ref(), "--link".as_ref(), link])
        .output()
        .expect("the ramulus binary runs");
    let stderr = String::from_utf8_lossy(&output.stderr);
    assert_eq!(output.status.code(), Some(1), "{stderr}");
    // `#v=1&seed=` is 10 bytes.
    assert!(stderr.contains("--link: not UTF-8"), "{stderr}");
    assert!(stderr.contains("byte offset 10"), "{stderr}");
}

/// The hand-traced leaf shipped with the tests (invented demo data, see
/// examples/specimens/hand-traced-leaf.svg).
fn traced_leaf() -> String {
    concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../examples/specimens/hand-traced-leaf.svg"
    )
    .to_string()
}

/// A traced SVG is recognised by content and measured: the table on stdout, and on stderr the
/// scale found in the file (80 mm over 320 user units: 0.25 mm per unit), every repair with
/// coordinates and the root rule. Counted by hand on the drawing: 7 line ends joined to the
/// midrib, 1 crossing, 1 loop, 2 parts.
#[test]
fn a_traced_svg_is_measured_with_its_repair_report() {
    let leaf = traced_leaf();
    let outcome = ramulus(&["measure", &leaf, "--snap", "0.2"]);
    assert!(outcome.success, "{}", outcome.stderr);
    assert!(outcome.stdout.contains("loops"), "{}", outcome.stdout);
    assert!(
        outcome.stderr.contains("0.25 mm per user unit"),
        "{}",
        outcome.stderr
    );
    assert_eq!(outcome.stderr.matches("joined a line end to").count(), 7);
    assert_eq!(
        outcome.stderr.matches("split two crossing pieces").count(),
        1
    );
    assert!(outcome.stderr.contains("nearest the drawing's bottom edge"));
    assert!(outcome.stderr.contains("part 2 is not connected"));
    // Each repair names the element as found in the file: the midrib is on line 17.
    assert!(
        outcome.stderr.contains("<path id=\"midrib\"> (line 17)"),
        "{}",
        outcome.stderr
    );

    let json = ramulus(&[
        "measure", &leaf, "--snap", "0.2", "--root", "160,470", "--json",
    ]);
    assert!(json.success, "{}", json.stderr);
    let value = single_json(&json.stdout);
    assert_eq!(value["format"], "SVG");
    assert_eq!(value["units"], "mm");
    assert_eq!(value["metrics"]["loop_count"], 1);
    assert_eq!(value["metrics"]["component_count"], 2);
    assert_eq!(value["total_length"], value["metrics"]["total_length"]);
    let repairs = value["repairs"].as_array().expect("repairs");
    let root = repairs
        .iter()
        .find(|repair| repair["kind"] == "root" && repair["part"] == 1)
        .expect("the root is reported");
    // (160, 470) in user units is (40, 117.5) mm, the midrib's start.
    assert_eq!(root["at"], serde_json::json!([40.0, 117.5]));
    assert_eq!(root["rule"], "given");
    assert!(repairs
        .iter()
        .all(|repair| repair["message"].as_str().is_some_and(|m| !m.is_empty())));
}

/// A folder of specimens gives one CSV row per file (header first), for a spreadsheet.
#[test]
fn a_folder_of_specimens_gives_one_csv_row_each() {
    let folder = temp_path("specimens", "d");
    std::fs::create_dir_all(&folder).expect("folder");
    std::fs::copy(traced_leaf(), folder.join("a-leaf.svg")).expect("copy");
    std::fs::write(
        folder.join("b-edges.csv"),
        "x1,y1,x2,y2\n0,0,3,0\n3,0,3,4\n",
    )
    .expect("csv");
    std::fs::write(
        folder.join("c-veins.geojson"),
        r#"{"type":"LineString","coordinates":[[0,0],[0,2]]}"#,
    )
    .expect("geojson");
    std::fs::write(folder.join("notes.txt"), "not a specimen").expect("txt");
    let outcome = ramulus(&["measure", folder.to_str().expect("UTF-8"), "--units", "mm"]);
    let _ = std::fs::remove_dir_all(&folder);
    assert!(outcome.success, "{}", outcome.stderr);
    let lines: Vec<&str> = outcome.stdout.lines().collect();
    assert_eq!(lines.len(), 4, "{}", outcome.stdout);
    let header: Vec<&str> = lines[0].trim_end().split(',').collect();
    assert_eq!(&header[..3], &["file", "format", "units"]);
    let length_column = header
        .iter()
        .position(|name| *name == "total_length")
        .expect("a total_length column");
    let expected = [
        ("a-leaf.svg", "SVG", None),
        ("b-edges.csv", "CSV", Some(7.0)),
        ("c-veins.geojson", "GeoJSON", Some(2.0)),
    ];
    for (line, (file, format, length)) in lines[1..].iter().zip(expected) {
        let fields: Vec<&str> = line.trim_end().split(',').collect();
        assert_eq!(fields.len(), header.len(), "{line}");
        assert!(fields[0].ends_with(file), "{line}");
        assert_eq!(fields[1], format);
        if let Some(length) = length {
            assert_eq!(
                fields[length_column].parse::<f64>().ok(),
                Some(length),
                "{line}"
            );
        }
    }
}

/// Bad specimens and bad specimen options: the file and what is wrong are named, nothing is
/// printed on stdout; malformed numbers in options are usage errors (exit 2).
#[test]
fn bad_specimens_are_named() {
    let edges = TempFile::new("edges", "csv");
    std::fs::write(&edges.0, "x1,y1,x2\n0,0,1\n").expect("csv");
    let outcome = ramulus(&["measure", edges.path(), "--units", "mm"]);
    check_failure(&outcome, &[edges.path(), "`y2`"]);
    assert_eq!(outcome.code, Some(1));
    assert!(outcome.stdout.is_empty());
    let no_units = TempFile::new("veins", "geojson");
    std::fs::write(
        &no_units.0,
        r#"{"type":"LineString","coordinates":[[0,0],[0,2]]}"#,
    )
    .expect("geojson");
    check_failure(
        &ramulus(&["measure", no_units.path()]),
        &[no_units.path(), "--units"],
    );
    let usage = ramulus(&["measure", &traced_leaf(), "--root", "1"]);
    check_failure(&usage, &["--root", "X,Y"]);
    assert_eq!(usage.code, Some(2));
    let bar = ramulus(&["measure", &traced_leaf(), "--scale-bar", "0,0,0,0,10"]);
    check_failure(&bar, &["scale bar", "must differ"]);
}

/// README's specimen examples run as written: the shipped folder of invented specimens gives
/// a header and one row for each of its four files (three traced, one cleared-leaf image).
#[test]
fn the_readme_specimen_examples_run() {
    let examples = concat!(env!("CARGO_MANIFEST_DIR"), "/../examples/specimens");
    let one = ramulus(&[
        "measure",
        &format!("{examples}/hand-traced-leaf.svg"),
        "--snap",
        "0.2",
    ]);
    assert!(one.success, "{}", one.stderr);
    let folder = ramulus(&["measure", examples, "--units", "mm"]);
    assert!(folder.success, "{}", folder.stderr);
    assert_eq!(folder.stdout.lines().count(), 5, "{}", folder.stdout);
}

/// `--page` sets the address the printed link opens (a page served elsewhere); an address
/// that is not http, https or file, or that holds its own `#`, is a usage error naming --page.
#[test]
fn the_page_address_of_the_printed_link_can_be_set_and_is_checked() {
    let value = grow_json(&[
        "grow",
        "--preset",
        "spanning-tree",
        "--page",
        "https://example.invalid/ramulus/",
        "--json",
    ]);
    let url = value["link"].as_str().expect("link is text");
    assert!(
        url.starts_with("https://example.invalid/ramulus/#v=1&"),
        "{url}"
    );
    for bad in ["example.invalid/page", "http://host/page#old", ""] {
        let outcome = ramulus(&["grow", "--page", bad, "--json"]);
        assert_eq!(outcome.code, Some(2), "--page {bad:?}: {}", outcome.stderr);
        assert!(outcome.stderr.contains("--page"), "{}", outcome.stderr);
        assert!(
            outcome.stdout.is_empty(),
            "nothing on stdout: {}",
            outcome.stdout
        );
    }
}

/// A fresh, empty folder for one test (so leftover temporary files can be counted).
fn temp_folder(stem: &str) -> PathBuf {
    let folder = temp_path(stem, "d");
    std::fs::create_dir_all(&folder).expect("writable temp dir");
    folder
}

/// The names of the files in `folder`, sorted.
fn files_in(folder: &std::path::Path) -> Vec<String> {
    let mut names: Vec<String> = std::fs::read_dir(folder)
        .expect("the folder exists")
        .map(|entry| {
            entry
                .expect("readable")
                .file_name()
                .to_string_lossy()
                .into_owned()
        })
        .collect();
    names.sort();
    names
}

/// A good record of a small run at `path`, returned as bytes.
fn good_record(path: &str) -> Vec<u8> {
    let outcome = ramulus(&[
        "grow",
        "--preset",
        "spanning-tree",
        "--set",
        "cells=200",
        "--record",
        path,
    ]);
    assert!(outcome.success, "{}", outcome.stderr);
    std::fs::read(path).expect("the record was written")
}

/// The attack "disk full while writing --record over an existing good record": a file-size
/// limit (POSIX `ulimit -f`; the limit signal SIGXFSZ ignored, so the write fails with EFBIG as
/// a full disk fails with ENOSPC) stops the new record part way. The run fails (exit 1) naming
/// the record, the old record is intact byte for byte, and no temporary file is left behind.
#[cfg(unix)]
#[test]
fn a_record_that_cannot_be_written_whole_leaves_the_old_one() {
    let folder = temp_folder("full-disk");
    let record = folder.join("run.json");
    let record = record.to_str().expect("UTF-8");
    let before = good_record(record);
    let output = Command::new("sh")
        .arg("-c")
        // 64 blocks of 512 bytes: far less than the new record (over 1 MB).
        .arg("trap '' XFSZ; ulimit -f 64; exec \"$0\" \"$@\"")
        .arg(env!("CARGO_BIN_EXE_ramulus"))
        .args([
            "grow",
            "--preset",
            "broad-leaf",
            "--set",
            "cells=6000",
            "--record",
            record,
        ])
        .output()
        .expect("sh runs");
    let stderr = String::from_utf8_lossy(&output.stderr);
    assert_eq!(output.status.code(), Some(1), "{stderr}");
    assert!(
        stderr.contains("run.json") && stderr.contains("cannot write"),
        "{stderr}"
    );
    assert!(!stderr.contains("panicked"), "{stderr}");
    assert_eq!(std::fs::read(record).expect("still there"), before);
    assert_eq!(files_in(&folder), ["run.json"]);
    let _ = std::fs::remove_dir_all(&folder);
}

/// The attack "Ctrl-C while the record is written": SIGINT at several moments of a run that
/// replaces a good record. Whenever it lands, the record afterwards is either the old one byte
/// for byte or a whole new record that `measure` reads, and no temporary file is left behind.
#[cfg(unix)]
#[test]
fn ctrl_c_at_any_moment_leaves_a_whole_record_and_no_temporary_file() {
    let folder = temp_folder("interrupted");
    let record = folder.join("run.json");
    let record = record.to_str().expect("UTF-8");
    let before = good_record(record);
    // How long a whole run takes here, so the signals can be spread over all of it (growth,
    // measuring, writing the temporary file, renaming).
    let started = std::time::Instant::now();
    let probe = temp_folder("interrupted-probe");
    let probe_record = probe.join("run.json");
    good_record(probe_record.to_str().expect("UTF-8"));
    let whole = ramulus(&[
        "grow",
        "--preset",
        "broad-leaf",
        "--record",
        probe_record.to_str().expect("UTF-8"),
    ]);
    assert!(whole.success, "{}", whole.stderr);
    let run_ms = started.elapsed().as_millis() as u64;
    let _ = std::fs::remove_dir_all(&probe);
    let mut interrupted = 0;
    for step in 1..=12u64 {
        let delay_ms = run_ms * step / 12;
        let child = Command::new(env!("CARGO_BIN_EXE_ramulus"))
            .args(["grow", "--preset", "broad-leaf", "--record", record])
            .stdout(std::process::Stdio::null())
            .stderr(std::process::Stdio::piped())
            .spawn()
            .expect("the ramulus binary runs");
        std::thread::sleep(std::time::Duration::from_millis(delay_ms));
        let _ = Command::new("kill")
            .args(["-INT", &child.id().to_string()])
            .status();
        let output = child.wait_with_output().expect("the run ends");
        let stderr = String::from_utf8_lossy(&output.stderr);
        assert!(!stderr.contains("panicked"), "{stderr}");
        if !output.status.success() {
            interrupted += 1;
        }
        let after = std::fs::read(record).expect("a record is there");
        if after != before {
            let measured = ramulus(&["measure", record, "--json"]);
            assert!(
                measured.success,
                "after SIGINT at {delay_ms} ms the record does not read: {}",
                measured.stderr
            );
        }
        assert_eq!(
            files_in(&folder),
            ["run.json"],
            "after SIGINT at {delay_ms} ms"
        );
    }
    // The early signals land mid-run (the preset takes far longer than 30 ms).
    assert!(interrupted >= 1, "no run was interrupted");
    let _ = std::fs::remove_dir_all(&folder);
}

/// The attack "`--svg` onto the input mask": an output naming the mask it reads is refused as
/// wrong usage before anything is written, and the mask keeps its bytes.
#[test]
fn an_svg_naming_the_input_mask_is_refused_and_the_mask_kept() {
    let mask = TempFile::new("mask", "pbm");
    std::fs::write(mask.path(), all_black_pbm(20, 16)).expect("writable temp dir");
    let before = std::fs::read(mask.path()).expect("the mask exists");
    let outcome = ramulus(&[
        "grow",
        "--preset",
        "spanning-tree",
        "--set",
        "roots=[{\"x\":10,\"y\":15,\"outflow\":[0,1]}]",
        "--mask",
        mask.path(),
        "--svg",
        mask.path(),
    ]);
    check_failure(&outcome, &["--svg", "--mask"]);
    assert_eq!(outcome.code, Some(2));
    assert_eq!(std::fs::read(mask.path()).expect("still there"), before);
}

/// A small specimen for fit tests: a 600-cell broad-leaf run with alpha 0.6, as a record.
fn fit_specimen(path: &str) {
    let outcome = ramulus(&[
        "grow",
        "--preset",
        "broad-leaf",
        "--set",
        "cells=600",
        "--set",
        "alpha=0.6",
        "--set",
        "seed=3",
        "--record",
        path,
    ]);
    assert!(outcome.success, "{}", outcome.stderr);
}

/// The arguments of a small quick fit of alpha and w_turn to `specimen`.
fn quick_fit_arguments(specimen: &str) -> Vec<String> {
    [
        "fit",
        "--specimen",
        specimen,
        "--preset",
        "broad-leaf",
        "--set",
        "cells=600",
        "--fit",
        "alpha=0.3:0.9",
        "--fit",
        "w_turn=0.5:3",
        "--match",
        "transport_cost",
        "--match",
        "branching_angle_mean=2",
        "--replicates",
        "1",
        "--method",
        "quick",
        "--simulations",
        "60",
        "--accept",
        "12",
        "--predictive",
        "4",
        "--seed",
        "5",
        "--jobs",
        "2",
        "--json",
    ]
    .iter()
    .map(|text| text.to_string())
    .collect()
}

fn run_owned(arguments: &[String]) -> Outcome {
    let borrowed: Vec<&str> = arguments.iter().map(String::as_str).collect();
    ramulus(&borrowed)
}

/// `fit --json` prints one object: every fitted key's median inside its 90 % interval inside
/// the bounds given, the counts asked for, a best run whose link grows, and a sensitivity row
/// per key and metric. The same seed prints the same object again, byte for byte.
#[test]
fn a_quick_fit_prints_intervals_and_repeats_exactly() {
    let specimen = TempFile::new("specimen", "json");
    fit_specimen(specimen.path());
    let arguments = quick_fit_arguments(specimen.path());
    let plots = TempFile::new("posterior", "svg");
    let outcome = run_owned(
        &[
            arguments.clone(),
            vec!["--plots".into(), plots.path().into()],
        ]
        .concat(),
    );
    assert!(outcome.success, "{}", outcome.stderr);
    let svg = std::fs::read_to_string(plots.path()).expect("the plots were written");
    assert!(svg.starts_with("<svg") && svg.trim_end().ends_with("</svg>"));
    // 12 accepted particles, one dot each in the one lower panel of two keys.
    assert_eq!(svg.matches("class=\"particle\"").count(), 12);
    let value = single_json(&outcome.stdout);
    for (key, low, high) in [("alpha", 0.3, 0.9), ("w_turn", 0.5, 3.0)] {
        let interval = &value["posterior"][key];
        let (l, m, h) = (
            interval["low"].as_f64().expect("low"),
            interval["median"].as_f64().expect("median"),
            interval["high"].as_f64().expect("high"),
        );
        assert!(
            low <= l && l <= m && m <= h && h <= high,
            "{key}: {interval}"
        );
    }
    assert_eq!(value["simulations"], 60);
    assert_eq!(value["accepted"], 12);
    assert_eq!(
        value["sensitivity"]["rows"].as_array().map(Vec::len),
        Some(4)
    );
    assert_eq!(value["predictive"].as_array().map(Vec::len), Some(2));
    let link = value["best_link"].as_str().expect("a link");
    let best = grow_json(&["grow", "--link", link, "--json"]);
    assert_eq!(best["cells"], 600, "the best run grows from its link");
    let again = run_owned(&arguments);
    assert_eq!(
        again.stdout, outcome.stdout,
        "the same seed gives the same fit"
    );
}

/// A fit split into three shards (a job array's tasks) and merged prints exactly what the
/// unsharded fit prints; merging shards of different fits, or with one missing, is refused.
#[test]
fn shards_merged_print_what_the_whole_fit_prints() {
    let specimen = TempFile::new("specimen", "json");
    fit_specimen(specimen.path());
    let arguments = quick_fit_arguments(specimen.path());
    let whole = run_owned(&arguments);
    assert!(whole.success, "{}", whole.stderr);
    let shards: Vec<TempFile> = (1..=3).map(|_| TempFile::new("shard", "json")).collect();
    for (index, shard) in shards.iter().enumerate() {
        let mut shard_arguments = arguments.clone();
        shard_arguments.retain(|argument| argument != "--json");
        shard_arguments.extend([
            "--shard".to_string(),
            format!("{}/3", index + 1),
            "--out".to_string(),
            shard.path().to_string(),
        ]);
        let outcome = run_owned(&shard_arguments);
        assert!(outcome.success, "{}", outcome.stderr);
    }
    let paths: Vec<&str> = shards.iter().map(TempFile::path).collect();
    let merged = ramulus(&[&["merge"][..], &paths[..], &["--jobs", "2", "--json"][..]].concat());
    assert!(merged.success, "{}", merged.stderr);
    assert_eq!(merged.stdout, whole.stdout);
    let missing = ramulus(&["merge", paths[0], paths[2]]);
    check_failure(&missing, &["shards 2 of 3 are missing"]);
    let twice = ramulus(&["merge", paths[0], paths[0], paths[1]]);
    check_failure(&twice, &["both shard 1"]);
    // A shard of another fit (another seed).
    let other = TempFile::new("other-shard", "json");
    let mut other_arguments = arguments.clone();
    other_arguments.retain(|argument| argument != "--json");
    let seed_at = other_arguments
        .iter()
        .position(|a| a == "--seed")
        .expect("a seed")
        + 1;
    other_arguments[seed_at] = "6".into();
    other_arguments.extend(["--shard", "2/3", "--out", other.path()].map(String::from));
    assert!(run_owned(&other_arguments).success);
    let mixed = ramulus(&["merge", paths[0], other.path(), paths[2]]);
    check_failure(&mixed, &["different fits"]);
}

/// Bad fits are refused before any work, each message naming what is wrong.
#[test]
fn a_bad_fit_is_refused_naming_the_problem() {
    let specimen = TempFile::new("specimen", "json");
    fit_specimen(specimen.path());
    let base = quick_fit_arguments(specimen.path());
    let with = |from: &str, to: &str| -> Vec<String> {
        base.iter()
            .map(|argument| {
                if argument == from {
                    to.to_string()
                } else {
                    argument.clone()
                }
            })
            .collect()
    };
    let cases: [(Vec<String>, &[&str]); 9] = [
        (
            with("alpha=0.3:0.9", "beta=0.3:0.9"),
            &["`beta` is not a parameter"],
        ),
        (
            with("alpha=0.3:0.9", "units=1:2"),
            &["`units` cannot be fitted"],
        ),
        (
            with("alpha=0.3:0.9", "alpha=0.9:0.3"),
            &["alpha", "below the upper"],
        ),
        (
            with("alpha=0.3:0.9", "alpha=0.3:4"),
            &["alpha", "allowed range"],
        ),
        (
            with("transport_cost", "leafiness"),
            &["`leafiness` is not a metric"],
        ),
        (
            with("transport_cost", "streams"),
            &["`streams` is not one number"],
        ),
        (with("1", "0"), &["replicates is 0"]),
        (
            [
                base.clone(),
                ["--shard", "4/3", "--out", "x.json"]
                    .map(String::from)
                    .to_vec(),
            ]
            .concat(),
            &["--shard 4/3"],
        ),
        (
            [
                with("quick", "sequential"),
                ["--shard", "1/2", "--out", "x.json"]
                    .map(String::from)
                    .to_vec(),
            ]
            .concat(),
            &["--shard needs --method quick"],
        ),
    ];
    for (arguments, mentions) in cases {
        let outcome = run_owned(&arguments);
        check_failure(&outcome, mentions);
        assert!(
            outcome.stdout.is_empty(),
            "{arguments:?}: {}",
            outcome.stdout
        );
    }
    assert!(!std::path::Path::new("x.json").exists());
}

/// A traced specimen (the shipped hand-traced demo leaf, in mm from its physical size) is
/// matched like a record: the fit prints its posterior inside the bounds and says on stderr
/// that a traced specimen was read. A specimen in another length unit than the growth
/// parameters is refused, naming both units.
#[test]
fn a_traced_specimen_is_fitted_and_a_unit_mismatch_refused() {
    let leaf = traced_leaf();
    let arguments = [
        "fit",
        "--specimen",
        &leaf,
        "--preset",
        "broad-leaf",
        "--set",
        "cells=600",
        "--fit",
        "w_turn=0.5:3",
        "--match",
        "tip_density",
        "--replicates",
        "1",
        "--method",
        "quick",
        "--simulations",
        "30",
        "--accept",
        "8",
        "--predictive",
        "2",
        "--json",
    ];
    let outcome = ramulus(&arguments);
    assert!(outcome.success, "{}", outcome.stderr);
    assert!(
        outcome.stderr.contains("traced specimen"),
        "{}",
        outcome.stderr
    );
    let value = single_json(&outcome.stdout);
    let median = value["posterior"]["w_turn"]["median"]
        .as_f64()
        .expect("a median");
    assert!((0.5..=3.0).contains(&median), "{median}");
    let mut in_cm = arguments.to_vec();
    in_cm.extend(["--units", "cm"]);
    let outcome = ramulus(&in_cm);
    check_failure(&outcome, &["measured in cm", "growth parameters in mm"]);
}

/// The shipped cleared-leaf image measures as an image specimen: the scale from its pHYs chunk
/// (50,000 pixels per metre, so 0.02 mm per pixel), each step's numbers under `image`, the
/// metrics under the keys of `grow --json` (areoles included), and the intermediate images
/// written as PNG files of the image's size (its IHDR width and height, PNG specification
/// section 11.2.2).
#[test]
fn a_cleared_leaf_image_measures_and_writes_its_steps() {
    let image = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../examples/specimens/cleared-leaf.png"
    );
    let skeleton = TempFile::new("skeleton", "png");
    let veins = TempFile::new("veins", "png");
    let outcome = ramulus(&[
        "measure",
        image,
        "--json",
        "--write-skeleton",
        skeleton.path(),
        "--write-veins",
        veins.path(),
    ]);
    assert!(outcome.success, "{}", outcome.stderr);
    let value = single_json(&outcome.stdout);
    assert_eq!(value["format"], "image");
    assert_eq!(value["calibration"]["factor"], 0.02);
    assert_eq!(value["units"], "mm");
    let steps = &value["image"];
    assert!(steps["chains"].as_u64().unwrap() > 10, "{steps}");
    assert!(steps["vein_pixels"].as_u64() < steps["leaf_pixels"].as_u64());
    assert_eq!(value["metrics"]["areoles"], 0, "a grown leaf drawn: a tree");
    assert!(value["metrics"]["total_length"].as_f64().unwrap() > 50.0);
    // Each step's image has the input's size, read from the input's own PNG header (PNG
    // specification, ISO/IEC 15948:2003, 11.2.2: IHDR's width and height come first).
    let input = std::fs::read(image).expect("the demo image");
    let size_of = |bytes: &[u8]| {
        (
            u32::from_be_bytes(bytes[16..20].try_into().unwrap()),
            u32::from_be_bytes(bytes[20..24].try_into().unwrap()),
        )
    };
    for written in [&skeleton, &veins] {
        let bytes = std::fs::read(written.path()).expect("written");
        assert_eq!(&bytes[..8], b"\x89PNG\r\n\x1a\n");
        assert_eq!(&bytes[12..16], b"IHDR");
        assert_eq!(size_of(&bytes), size_of(&input));
    }
    let text = ramulus(&["measure", image, "--spur", "4"]);
    assert!(text.success, "{}", text.stderr);
    for step in [
        "Zhang-Suen",
        "Otsu",
        "spurs under 4.0 pixels pruned",
        "branch points",
    ] {
        assert!(text.stderr.contains(step), "{step}: {}", text.stderr);
    }
}

/// Bad images and image options are named: a PNG whose header claims 100,000 x 100,000
/// pixels is refused before decoding, writing steps of two files is a usage error, and a
/// local threshold window must be a whole number of pixels.
#[test]
fn bad_images_and_image_options_are_named() {
    let image = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../examples/specimens/cleared-leaf.png"
    );
    let mut bytes = std::fs::read(image).expect("demo image");
    bytes[16..20].copy_from_slice(&100_000u32.to_be_bytes());
    bytes[20..24].copy_from_slice(&100_000u32.to_be_bytes());
    // The IHDR CRC (PNG specification, annex D), so the size is what is refused.
    let mut crc = 0xffff_ffffu32;
    for &byte in &bytes[12..29] {
        crc ^= u32::from(byte);
        for _ in 0..8 {
            crc = if crc & 1 == 1 {
                (crc >> 1) ^ 0xedb8_8320
            } else {
                crc >> 1
            };
        }
    }
    bytes[29..33].copy_from_slice(&(!crc).to_be_bytes());
    let huge = TempFile::new("huge", "png");
    std::fs::write(huge.path(), &bytes).unwrap();
    check_failure(
        &ramulus(&["measure", huge.path()]),
        &["100000 x 100000", "limit"],
    );
    let out = TempFile::new("steps", "png");
    let two = ramulus(&["measure", image, image, "--write-skeleton", out.path()]);
    assert_eq!(two.code, Some(2), "{}", two.stderr);
    assert!(two.stderr.contains("--write-skeleton"), "{}", two.stderr);
    check_failure(
        &ramulus(&["measure", image, "--local-threshold", "2.5,10"]),
        &["--local-threshold", "WINDOW"],
    );
}

/// `grow --geojson` and `--edge-list` write the network as data that `measure` reads back to
/// the same total length (full-precision coordinates; the spanning-tree preset grows no
/// crossing, so nothing is split), and an output may not name another output.
#[test]
fn grown_networks_export_as_geojson_and_edge_lists_that_measure_back() {
    let geojson = TempFile::new("grown", "geojson");
    let edges = TempFile::new("grown", "csv");
    let grown = grow_json(&[
        "grow",
        "--preset",
        "spanning-tree",
        "--set",
        "cells=400",
        "--geojson",
        geojson.path(),
        "--edge-list",
        edges.path(),
        "--json",
    ]);
    let length = grown["total_length"].as_f64().expect("length");
    for file in [&geojson, &edges] {
        let outcome = ramulus(&["measure", file.path(), "--units", "mm", "--json"]);
        assert!(outcome.success, "{}", outcome.stderr);
        let value = single_json(&outcome.stdout);
        let back = value["total_length"].as_f64().expect("length");
        assert!(
            (back - length).abs() <= 1e-9 * length,
            "{back} against {length}"
        );
        assert_eq!(value["segments"], grown["segments"]);
    }
    let same = ramulus(&[
        "grow",
        "--preset",
        "spanning-tree",
        "--geojson",
        geojson.path(),
        "--edge-list",
        geojson.path(),
    ]);
    assert_eq!(same.code, Some(2), "{}", same.stderr);
    assert!(same.stderr.contains("--edge-list"), "{}", same.stderr);
}

/// `none` turns an optional value off on the command line as in a run link and as the
/// parameter's help says: `--set threshold=none` grows what the JSON `null` grows, and the
/// run link it prints says `threshold=none`.
#[test]
fn set_none_turns_an_optional_value_off() {
    let by_word = grow_json(&[
        "grow",
        "--preset",
        "broad-leaf",
        "--set",
        "cells=600",
        "--set",
        "threshold=none",
        "--json",
    ]);
    let by_null = grow_json(&[
        "grow",
        "--preset",
        "broad-leaf",
        "--set",
        "cells=600",
        "--set",
        "threshold=null",
        "--json",
    ]);
    assert_eq!(by_word["digest"], by_null["digest"]);
    let link = by_word["fragment"].as_str().expect("a fragment");
    assert!(link.contains("&threshold=none&"), "{link}");
    // A word that is not `none` is still refused, naming the key.
    let refused = ramulus(&[
        "grow",
        "--preset",
        "broad-leaf",
        "--set",
        "threshold=off",
        "--json",
    ]);
    assert_ne!(refused.code, Some(0));
    assert!(refused.stderr.contains("threshold"), "{}", refused.stderr);
}

/// With `energy_sweeps`, `grow --json` carries the channel energy report (energy before and
/// after, per sweep, moves; exponent 0.5 as in Rinaldo et al. 1992, Water Resour. Res. 28): the
/// energy never rises from sweep to sweep, the moves add up, and the network differs from the
/// one grown without the pass, whose output has no such report.
#[test]
fn grow_json_reports_the_channel_energy() {
    let base = ["grow", "--preset", "drainage-site", "--set", "cells=3000"];
    let plain = grow_json(&[&base[..], &["--json"]].concat());
    assert!(plain.get("channel_energy").is_none());
    let value = grow_json(&[&base[..], &["--set", "energy_sweeps=3", "--json"]].concat());
    let energy = value["channel_energy"].as_object().expect("a report");
    assert_eq!(energy["exponent"].as_f64(), Some(0.5));
    let before = energy["before"].as_f64().expect("before");
    let after = energy["after"].as_f64().expect("after");
    assert!(after < before, "{after} after {before}");
    let sweeps = energy["sweeps"].as_array().expect("sweeps");
    assert!(!sweeps.is_empty() && sweeps.len() <= 3);
    let mut previous = before;
    let mut moves = 0;
    for sweep in sweeps {
        let e = sweep["energy"].as_f64().expect("energy");
        assert!(
            e <= previous,
            "a sweep raised the energy: {e} after {previous}"
        );
        previous = e;
        moves += sweep["moves"].as_u64().expect("moves");
    }
    assert_eq!(previous, after);
    assert_eq!(energy["moves"].as_u64(), Some(moves));
    assert_ne!(value["digest"], plain["digest"]);
    assert_eq!(value["nodes"], plain["nodes"]);
    assert_eq!(value["segments"], plain["segments"]);
}

/// A 20 m x 10 m site plan drawn as SVG at 0.2 m per drawing unit (100 x 50 units), with four
/// corner spot levels at 10 m and a hollow at 9 m, drawn at cell centres of 0.5 m cells.
const HOLLOW_PLAN: &str = r#"<svg xmlns="http://www.w3.org/2000/svg" data-runoff-coefficient="0.3">
  <g id="outline"><rect width="100" height="50"/></g>
  <g id="levels">
    <circle cx="1.25" cy="1.25" r="0.5" data-elevation="10"/>
    <circle cx="98.75" cy="1.25" r="0.5" data-elevation="10"/>
    <circle cx="98.75" cy="48.75" r="0.5" data-elevation="10"/>
    <circle cx="1.25" cy="48.75" r="0.5" data-elevation="10"/>
    <circle data-name="hollow" cx="76.25" cy="26.25" r="0.5" data-elevation="9"/>
  </g>
  <circle data-role="outlet" cx="2" cy="48" r="1"/>
  <text x="0" y="0">plan, north up</text>
</svg>"#;

/// `drain --site plan.svg --svg-scale` reads the plan at its scale and reports the ground's
/// low spots; without a scale it is refused, naming the flag.
#[test]
fn drain_reads_an_svg_site_plan_and_reports_its_low_spots() {
    let plan = TempFile::new("plan", "svg");
    std::fs::write(&plan.0, HOLLOW_PLAN).expect("writes the plan");
    let outcome = ramulus(&["drain", "--site", plan.path(), "--intensity", "60"]);
    check_failure(&outcome, &["--svg-scale"]);
    let outcome = ramulus(&[
        "drain",
        "--site",
        plan.path(),
        "--svg-scale",
        "0.2 m per unit",
        "--intensity",
        "60",
        "--json",
    ]);
    assert!(outcome.success, "{}", outcome.stderr);
    let json = single_json(&outcome.stdout);
    let ground = &json["ground_flow"];
    // 100 x 50 units at 0.2 m is 20 m x 10 m = 200 m² = 0.02 ha.
    let site_area = ground["site_area"].as_f64().expect("site_area");
    assert!((site_area - 0.02).abs() < 1e-12, "{ground}");
    // The outlets', the edge's and the low spots' areas add up to the site.
    let outlets: f64 = ground["outlet_areas"]
        .as_array()
        .expect("outlet_areas")
        .iter()
        .filter_map(Value::as_f64)
        .sum();
    let total = outlets
        + ground["off_site_area"].as_f64().unwrap_or(f64::NAN)
        + ground["low_spot_area"].as_f64().unwrap_or(f64::NAN);
    assert!((total - site_area).abs() < 1e-12, "{ground}");
    // The hollow: drawing (76.25, 26.25) is site (15.25 m, -5.25 m) with north up the sheet;
    // inverse distance weighting is exact at a level (Shepard 1968), so its ground is 9 m and
    // everything around it, a weighted mean of 9 and 10, is higher: a low spot.
    let spots = json["low_spots"].as_array().expect("low_spots");
    let hollow = spots
        .iter()
        .find(|spot| {
            (spot["x"].as_f64().unwrap_or(f64::NAN) - 15.25).abs() < 1e-9
                && (spot["y"].as_f64().unwrap_or(f64::NAN) + 5.25).abs() < 1e-9
        })
        .unwrap_or_else(|| panic!("no low spot at the hollow: {spots:?}"));
    assert_eq!(hollow["elevation"].as_f64(), Some(9.0));
    assert!(hollow["area"].as_f64().unwrap_or(0.0) > 0.0);
    // A bad scale is named.
    let outcome = ramulus(&[
        "drain",
        "--site",
        plan.path(),
        "--svg-scale",
        "1:200",
        "--intensity",
        "60",
    ]);
    check_failure(&outcome, &["no width or height in mm"]);
}

/// A record of a run that conducted from a threshold and closed loops is measured as the run
/// measured itself: `measure` grows it again from its parameters, so vein density counts the
/// veins alone (not the tissue the record also holds) and the readings of the grown tree
/// (branching angles, transport cost) are there, equal to `grow --json`'s; a record whose
/// network was edited is measured as it stands. Then `fit` takes the record as its specimen
/// with those readings (README's fitting example asks for them).
#[test]
fn a_looped_leaf_record_keeps_its_run_readings() {
    let record = TempFile::new("looped", "json");
    let grown = grow_json(&[
        "grow",
        "--preset",
        "ovate-leaf",
        "--set",
        "cells=3000",
        "--record",
        record.path(),
        "--json",
    ]);
    let outcome = ramulus(&["measure", record.path(), "--json"]);
    assert!(outcome.success, "{}", outcome.stderr);
    let measured: Value = serde_json::from_str(&outcome.stdout).expect("JSON");
    assert_eq!(measured["digest_matches"], Value::Bool(true));
    for key in [
        "vein_density",
        "areoles",
        "branching_angle_mean",
        "transport_cost",
        "kind",
    ] {
        assert!(!grown["metrics"][key].is_null(), "grow gives {key}");
        assert_eq!(measured["metrics"][key], grown["metrics"][key], "{key}");
    }
    // An edited record (one node moved) is no longer the run's network: measured as it stands,
    // every segment counts and the tree readings are gone.
    let text = std::fs::read_to_string(record.path()).expect("the record");
    let mut edited: Value = serde_json::from_str(&text).expect("JSON");
    let x = edited["nodes"][5][0].as_f64().expect("a node");
    edited["nodes"][5][0] = serde_json::json!(x + 0.01);
    let moved = TempFile::new("looped-edited", "json");
    std::fs::write(moved.path(), edited.to_string()).expect("write");
    let outcome = ramulus(&["measure", moved.path(), "--json"]);
    assert!(outcome.success, "{}", outcome.stderr);
    let as_it_stands: Value = serde_json::from_str(&outcome.stdout).expect("JSON");
    assert!(as_it_stands["metrics"]["branching_angle_mean"].is_null());
    assert!(
        as_it_stands["metrics"]["vein_density"].as_f64()
            > grown["metrics"]["vein_density"].as_f64(),
        "the tissue counts once the record is not the run's"
    );
    let outcome = ramulus(&[
        "fit",
        "--specimen",
        record.path(),
        "--preset",
        "ovate-leaf",
        "--set",
        "cells=800",
        "--fit",
        "alpha=0.3:0.9",
        "--match",
        "transport_cost",
        "--match",
        "branching_angle_mean",
        "--method",
        "quick",
        "--simulations",
        "10",
        "--accept",
        "5",
        "--predictive",
        "2",
        "--replicates",
        "1",
        "--json",
    ]);
    assert!(outcome.success, "{}", outcome.stderr);
    let fitted: Value = serde_json::from_str(&outcome.stdout).expect("JSON");
    assert!(fitted.is_object(), "{}", outcome.stdout);
}
