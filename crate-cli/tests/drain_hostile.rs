//! `ramulus drain` attacked as a hostile user would: broken site outlines, outlets outside the
//! site, a site cut in two, impossible rainfall, stray spot levels, a GeoTIFF that cannot be
//! placed, mixed units, huge and empty files, outputs onto inputs or onto a device, and Ctrl-C
//! while the outputs are written. Each check runs the real binary and asserts that the message
//! names what is wrong and where (the file, feature, line or value), that nothing panics, and
//! that files are written whole or not at all. The sites are invented.

use std::path::{Path, PathBuf};
use std::process::Command;
use std::sync::atomic::{AtomicUsize, Ordering};

/// Exit code, stdout and stderr of one run of the binary.
struct Outcome {
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
    let outcome = Outcome {
        code: output.status.code(),
        stdout: String::from_utf8_lossy(&output.stdout).into_owned(),
        stderr: String::from_utf8_lossy(&output.stderr).into_owned(),
    };
    assert!(
        !outcome.stderr.contains("panicked"),
        "{arguments:?} panicked: {}",
        outcome.stderr
    );
    outcome
}

/// A fresh folder of its own for one test, removed when dropped.
struct Folder(PathBuf);

impl Folder {
    fn new(stem: &str) -> Folder {
        static COUNTER: AtomicUsize = AtomicUsize::new(0);
        let serial = COUNTER.fetch_add(1, Ordering::SeqCst);
        let path = std::env::temp_dir().join(format!(
            "ramulus-drain-hostile-{}-{serial}-{stem}",
            std::process::id()
        ));
        std::fs::create_dir_all(&path).expect("a writable temporary folder");
        Folder(path)
    }

    /// Writes `bytes` to `name` in the folder; returns its path.
    fn file(&self, name: &str, bytes: &[u8]) -> String {
        let path = self.0.join(name);
        std::fs::write(&path, bytes).expect("a writable temporary folder");
        path.to_str().expect("UTF-8 temporary paths").to_string()
    }

    fn path(&self, name: &str) -> String {
        self.0.join(name).to_str().expect("UTF-8").to_string()
    }

    /// The names of the files in the folder, sorted.
    fn names(&self) -> Vec<String> {
        let mut names: Vec<String> = std::fs::read_dir(&self.0)
            .expect("the folder")
            .map(|entry| {
                entry
                    .expect("an entry")
                    .file_name()
                    .to_string_lossy()
                    .into_owned()
            })
            .collect();
        names.sort();
        names
    }
}

impl Drop for Folder {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

/// A 20 m square yard (x east, y north, metres) with an outlet at its south-west corner and
/// the given extra features, as a GeoJSON site file.
fn yard(outline: &str, extra: &str) -> String {
    format!(
        r#"{{"type":"FeatureCollection","properties":{{"units":"m","runoff_coefficient":0.5}},
"features":[
{{"type":"Feature","properties":{{"role":"outline","name":"yard"}},"geometry":{{"type":"Polygon","coordinates":[{outline}]}}}},
{{"type":"Feature","properties":{{"role":"outlet","name":"drain"}},"geometry":{{"type":"Point","coordinates":[0.5,0.5]}}}}{extra}]}}"#
    )
}

const SQUARE: &str = "[[0,0],[20,0],[20,20],[0,20],[0,0]]";

/// Runs `drain` on `site` (written to the folder) with 1 m cells and 50 mm/h, plus `more`.
fn drain_site(folder: &Folder, site: &str, more: &[&str]) -> Outcome {
    let site = folder.file("site.geojson", site.as_bytes());
    let mut arguments = vec![
        "drain",
        "--site",
        &site,
        "--cell-size",
        "1",
        "--intensity",
        "50",
    ];
    arguments.extend_from_slice(more);
    ramulus(&arguments)
}

fn assert_failed(outcome: &Outcome, code: i32, needles: &[&str]) {
    assert_eq!(outcome.code, Some(code), "{}", outcome.stderr);
    for needle in needles {
        assert!(
            outcome.stderr.contains(needle),
            "the message lacks {needle:?}: {}",
            outcome.stderr
        );
    }
}

#[test]
fn a_self_intersecting_outline_names_its_feature_and_edges() {
    let folder = Folder::new("bow-tie");
    let outcome = drain_site(
        &folder,
        &yard("[[0,0],[20,20],[20,0],[0,20],[0,0]]", ""),
        &[],
    );
    // Edges 0 ((0,0)-(20,20)) and 2 ((20,0)-(0,20)) of the bow tie cross at (10, 10).
    assert_failed(
        &outcome,
        1,
        &[
            "site.geojson",
            "feature 0 (\"yard\")",
            "crosses or touches itself",
            "edges 0 and 2",
            "(10, 10)",
        ],
    );
}

#[test]
fn an_open_outline_names_its_ends() {
    let folder = Folder::new("open");
    let outcome = drain_site(&folder, &yard("[[0,0],[20,0],[20,20],[0,20]]", ""), &[]);
    assert_failed(
        &outcome,
        1,
        &[
            "site.geojson",
            "feature 0 (\"yard\")",
            "open",
            "ends at (0, 20) but starts at (0, 0)",
        ],
    );
}

#[test]
fn an_outlet_outside_the_site_is_named_with_its_place() {
    let folder = Folder::new("outlet-outside");
    let extra = r#",{"type":"Feature","properties":{"role":"outlet","name":"ditch"},"geometry":{"type":"Point","coordinates":[30,5]}}"#;
    let outcome = drain_site(&folder, &yard(SQUARE, extra), &[]);
    assert_failed(
        &outcome,
        1,
        &[
            "site.geojson",
            "feature 2 (\"ditch\")",
            "(30, 5)",
            "outside",
        ],
    );
}

/// An obstacle 6 m wide across the whole yard: the 20 m x 6 m strip north of it (y 14 to 20)
/// cannot reach the outlet. By hand: 20 x 6 = 120 cells of 1 m², their box centred at
/// (10, 17). The layout grows on the rest and the part is drawn and listed, never dropped: in
/// the summary, in `--json` (120 m² = 0.012 ha) and hatched on the plan.
#[test]
fn a_site_cut_in_two_draws_and_lists_the_part_no_outlet_reaches() {
    let folder = Folder::new("cut");
    let extra = r#",{"type":"Feature","properties":{"role":"obstacle","name":"wall"},"geometry":{"type":"Polygon","coordinates":[[[-1,8],[21,8],[21,14],[-1,14],[-1,8]]]}}"#;
    let svg = folder.path("plan.svg");
    let outcome = drain_site(&folder, &yard(SQUARE, extra), &["--svg", &svg]);
    assert_eq!(outcome.code, Some(0), "{}", outcome.stderr);
    for needle in [
        "No outlet reaches 120 m² of the site, in 1 part",
        "around (10, 17) m",
    ] {
        assert!(
            outcome.stdout.contains(needle),
            "{needle}: {}",
            outcome.stdout
        );
    }
    let plan = std::fs::read_to_string(&svg).expect("the plan is written");
    assert!(
        plan.contains("class=\"unreached\""),
        "the plan hatches the part"
    );
    assert!(
        plan.contains("no outlet reaches: 120 m²"),
        "the plan labels its area"
    );
    let outcome = drain_site(&folder, &yard(SQUARE, extra), &["--json"]);
    assert_eq!(outcome.code, Some(0), "{}", outcome.stderr);
    let json: serde_json::Value = serde_json::from_str(&outcome.stdout).expect("one JSON object");
    let parts = json["unreached"].as_array().expect("unreached parts");
    assert_eq!(parts.len(), 1);
    assert_eq!(parts[0]["cells"], 120);
    assert!((parts[0]["area"].as_f64().unwrap_or(0.0) - 0.012).abs() < 1e-12);
    assert_eq!(
        (parts[0]["x"].as_f64(), parts[0]["y"].as_f64()),
        (Some(10.0), Some(17.0))
    );
}

#[test]
fn zero_negative_and_nan_intensities_are_named() {
    let folder = Folder::new("intensity");
    let site = folder.file("site.geojson", yard(SQUARE, "").as_bytes());
    for value in ["0", "-5", "NaN", "inf", "ten"] {
        let flag = format!("--intensity={value}");
        let outcome = ramulus(&["drain", "--site", &site, "--cell-size", "1", &flag]);
        assert_failed(&outcome, 1, &["intensity", &format!("\"{value}\"")]);
    }
}

/// i = a / (t + b)^c with b = -10 has no real value at t = 5 min (t + b < 0); c = 400 gives
/// 0 at 120 min (125^200 overflows, 10^200 at 5 min does not); a = -1000 is a negative intensity. Each is refused before
/// the layout grows, naming the duration or the coefficient.
#[test]
fn idf_coefficients_without_a_positive_intensity_are_refused() {
    let folder = Folder::new("idf");
    let site = folder.file("site.geojson", yard(SQUARE, "").as_bytes());
    for (idf, needles) in [
        ("1000,-10,0.8", &["intensity-duration", "5 min"][..]),
        ("1000,5,200", &["intensity-duration", "120 min"][..]),
        ("-1000,10,0.8", &["a: \"-1000\" must be above 0"][..]),
    ] {
        let flag = format!("--idf={idf}");
        let outcome = ramulus(&["drain", "--site", &site, "--cell-size", "1", &flag]);
        assert_failed(&outcome, 1, needles);
        assert!(
            !outcome
                .stderr
                .contains("warning: the site has no spot levels"),
            "the site was read before the storm was checked: {}",
            outcome.stderr
        );
    }
    let outcome = ramulus(&["drain", "--site", &site, "--idf", "1000,10"]);
    assert_failed(&outcome, 2, &["--idf 1000,10", "A,B,C"]);
}

#[test]
fn spot_levels_outside_the_site_or_too_few_are_named() {
    let folder = Folder::new("levels");
    let outside = folder.file("outside.csv", b"x,y,z\n1,1,10\n19,1,9\n30,30,8\n");
    let outcome = drain_site(&folder, &yard(SQUARE, ""), &["--levels", &outside]);
    assert_failed(
        &outcome,
        1,
        &["outside.csv", "line 4", "(30, 30)", "outside"],
    );
    let two = folder.file("two.csv", b"1,1,10\n19,1,9\n");
    let outcome = drain_site(&folder, &yard(SQUARE, ""), &["--levels", &two]);
    assert_failed(&outcome, 1, &["two.csv", "2 spot level(s)", "at least 3"]);
    let empty = folder.file("empty.csv", b"");
    let outcome = drain_site(&folder, &yard(SQUARE, ""), &["--levels", &empty]);
    assert_failed(&outcome, 1, &["empty.csv", "no spot levels"]);
    let bad = folder.file("bad.csv", b"1,1,10\n19,1\n");
    let outcome = drain_site(&folder, &yard(SQUARE, ""), &["--levels", &bad]);
    assert_failed(&outcome, 1, &["bad.csv", "line 2", "2 field(s)"]);
    // Two levels in the site file itself.
    let levels = r#",{"type":"Feature","properties":{"role":"level","elevation":1},"geometry":{"type":"Point","coordinates":[2,2]}},{"type":"Feature","properties":{"role":"level","elevation":"high"},"geometry":{"type":"Point","coordinates":[3,3]}}"#;
    let outcome = drain_site(&folder, &yard(SQUARE, levels), &[]);
    assert_failed(&outcome, 1, &["site.geojson", "feature 3", "\"high\""]);
}

/// Seeds of the GeoTIFF fuzz test, written by tests/fuzz-corpus/make-site-seeds.py.
fn corpus_tiff(name: &str) -> String {
    format!(
        "{}/../tests/fuzz-corpus/geotiff/{name}",
        env!("CARGO_MANIFEST_DIR")
    )
}

#[test]
fn a_geotiff_without_georeferencing_is_refused_by_name() {
    let folder = Folder::new("geotiff");
    let outcome = drain_site(
        &folder,
        &yard(SQUARE, ""),
        &["--terrain", &corpus_tiff("no-placement.tif")],
    );
    assert_failed(
        &outcome,
        1,
        &["no-placement.tif", "not georeferenced", "33550", "33922"],
    );
    let outcome = drain_site(
        &folder,
        &yard(SQUARE, ""),
        &["--terrain", &corpus_tiff("transform-only.tif")],
    );
    assert_failed(&outcome, 1, &["transform-only.tif", "34264"]);
    // Placed 1000 m east of the yard: no sample falls on it.
    let outcome = drain_site(
        &folder,
        &yard(SQUARE, ""),
        &["--terrain", &corpus_tiff("float32.tif")],
    );
    assert_failed(&outcome, 1, &["elevation raster", "cover the site"]);
    let empty = folder.file("empty.tif", b"");
    let outcome = drain_site(&folder, &yard(SQUARE, ""), &["--terrain", &empty]);
    assert_failed(&outcome, 1, &["empty.tif", "not a readable TIFF"]);
}

#[test]
fn mixed_units_are_named() {
    let folder = Folder::new("units");
    let site = yard(SQUARE, "").replace(
        r#""role":"outlet","name":"drain""#,
        r#""role":"outlet","name":"drain","units":"ft""#,
    );
    let outcome = drain_site(&folder, &site, &[]);
    assert_failed(
        &outcome,
        1,
        &["site.geojson", "feature 1 (\"drain\")", "\"ft\"", "\"m\""],
    );
    let site = yard(SQUARE, "").replace(r#""units":"m""#, r#""units":"yd""#);
    let outcome = drain_site(&folder, &site, &[]);
    assert_failed(
        &outcome,
        1,
        &["site.geojson", "the site", "\"yd\"", "\"m\" or \"ft\""],
    );
}

#[test]
fn empty_and_huge_inputs_are_refused_by_name() {
    let folder = Folder::new("sizes");
    let outcome = drain_site(&folder, "", &[]);
    assert_failed(
        &outcome,
        1,
        &["site.geojson", "line 1 column 0", "not readable JSON"],
    );
    // A sparse file of 300 MiB: refused from its size, before it is read.
    let huge = folder.path("huge.geojson");
    std::fs::File::create(&huge)
        .and_then(|file| file.set_len(300 << 20))
        .expect("a sparse file");
    let outcome = ramulus(&["drain", "--site", &huge, "--intensity", "50"]);
    assert_failed(
        &outcome,
        1,
        &["huge.geojson", "larger than 256 MiB", "site file"],
    );
    // A device that never ends is read only up to the limit.
    if Path::new("/dev/zero").exists() {
        let site = folder.file("site.geojson", yard(SQUARE, "").as_bytes());
        let outcome = ramulus(&[
            "drain",
            "--site",
            &site,
            "--levels",
            "/dev/zero",
            "--intensity",
            "50",
        ]);
        assert_failed(&outcome, 1, &["/dev/zero", "larger than 64 MiB"]);
    }
    // A site far larger than the lattice at the default 0.5 m cells.
    let wide = yard("[[0,0],[100000,0],[100000,20],[0,20],[0,0]]", "");
    let outcome = drain_site(&folder, &wide, &[]);
    assert_failed(&outcome, 1, &["100000 x 20 cells", "choose larger cells"]);
    let site = folder.path("site.geojson");
    let outcome = ramulus(&["drain", "--site", &site, "--intensity", "50"]);
    assert_failed(&outcome, 1, &["200000 x 40 cells", "choose larger cells"]);
}

#[test]
fn an_output_onto_an_input_is_refused_and_the_input_kept() {
    let folder = Folder::new("onto-input");
    let site_text = yard(SQUARE, "");
    let site = folder.file("site.geojson", site_text.as_bytes());
    let levels = folder.file("levels.csv", b"x,y,z\n1,1,10\n19,1,9.5\n10,19,9\n");
    let terrain = folder.file(
        "ground.tif",
        &std::fs::read(corpus_tiff("float32.tif")).expect("seed"),
    );
    for (flag, target, input_flag) in [
        ("--svg", &site, "--site"),
        ("--csv", &levels, "--levels"),
        ("--geojson", &terrain, "--terrain"),
    ] {
        let before = std::fs::read(target).expect("the input");
        let ground = if input_flag == "--terrain" {
            ["--terrain", terrain.as_str()]
        } else {
            ["--levels", levels.as_str()]
        };
        let outcome = ramulus(&[
            "drain",
            "--site",
            &site,
            ground[0],
            ground[1],
            "--intensity",
            "50",
            flag,
            target,
        ]);
        assert_failed(&outcome, 2, &[&format!("`{flag} {target}`"), input_flag]);
        assert_eq!(std::fs::read(target).expect("still there"), before);
    }
}

/// `/dev/full` as an output file: the finished file would be renamed onto the device and
/// replace it (as root), so it is refused up front and the device stays a device. As
/// standard output it fails every write (ENOSPC): the run exits 1 and says so.
#[cfg(unix)]
#[test]
fn dev_full_is_refused_as_an_output_and_fails_as_standard_output() {
    use std::os::unix::fs::FileTypeExt as _;
    let Ok(full) = std::fs::OpenOptions::new().write(true).open("/dev/full") else {
        return; // not Linux
    };
    let folder = Folder::new("dev-full");
    let site = folder.file("site.geojson", yard(SQUARE, "").as_bytes());
    let common = [
        "drain",
        "--site",
        &site,
        "--cell-size",
        "1",
        "--intensity",
        "50",
    ];
    for flag in ["--csv", "--svg", "--geojson"] {
        let mut arguments = common.to_vec();
        arguments.extend([flag, "/dev/full"]);
        let outcome = ramulus(&arguments);
        assert_failed(
            &outcome,
            2,
            &[&format!("`{flag} /dev/full`"), "not a plain file"],
        );
        let kind = std::fs::metadata("/dev/full")
            .expect("/dev/full")
            .file_type();
        assert!(kind.is_char_device(), "/dev/full was replaced");
    }
    let mut arguments = common.to_vec();
    arguments.extend(["--svg", folder.0.to_str().expect("UTF-8")]);
    assert_failed(&ramulus(&arguments), 2, &["not a plain file"]);
    let mut arguments = common.to_vec();
    arguments.push("--json");
    let output = Command::new(env!("CARGO_BIN_EXE_ramulus"))
        .args(&arguments)
        .stdout(full)
        .output()
        .expect("the ramulus binary runs");
    let stderr = String::from_utf8_lossy(&output.stderr);
    assert_eq!(output.status.code(), Some(1), "{stderr}");
    assert!(stderr.contains("standard output"), "{stderr}");
}

/// Ctrl-C at moments spread over a whole run replacing three outputs: afterwards each output is
/// its old bytes or a whole new file (the GeoJSON parses, the SVG and CSV end as finished
/// files do), and no temporary file is left in the folder.
#[cfg(unix)]
#[test]
fn ctrl_c_leaves_each_output_old_or_whole() {
    let folder = Folder::new("ctrl-c");
    let site = format!(
        "{}/../examples/sites/community-garden.geojson",
        env!("CARGO_MANIFEST_DIR")
    );
    let outputs = ["plan.svg", "channels.geojson", "schedule.csv"];
    let paths: Vec<String> = outputs.iter().map(|name| folder.path(name)).collect();
    let arguments = [
        "drain",
        "--site",
        &site,
        "--intensity",
        "50",
        "--svg",
        &paths[0],
        "--geojson",
        &paths[1],
        "--csv",
        &paths[2],
    ];
    let started = std::time::Instant::now();
    let whole = ramulus(&arguments);
    assert_eq!(whole.code, Some(0), "{}", whole.stderr);
    let run_ms = started.elapsed().as_millis() as u64;
    let mut interrupted = 0;
    for step in 1..=8u64 {
        for path in &paths {
            std::fs::write(path, b"old").expect("writable");
        }
        let child = Command::new(env!("CARGO_BIN_EXE_ramulus"))
            .args(arguments)
            .stdout(std::process::Stdio::null())
            .stderr(std::process::Stdio::piped())
            .spawn()
            .expect("the ramulus binary runs");
        std::thread::sleep(std::time::Duration::from_millis(run_ms * step / 8));
        let _ = Command::new("kill")
            .args(["-INT", &child.id().to_string()])
            .status();
        let output = child.wait_with_output().expect("the run ends");
        let stderr = String::from_utf8_lossy(&output.stderr);
        assert!(!stderr.contains("panicked"), "{stderr}");
        if output.status.code() == Some(130) {
            interrupted += 1;
        }
        for path in &paths {
            let bytes = std::fs::read(path).expect("the output is there");
            if bytes == b"old" {
                continue;
            }
            let text = String::from_utf8(bytes).expect("UTF-8 output");
            if path.ends_with(".geojson") {
                assert!(
                    serde_json::from_str::<serde_json::Value>(&text).is_ok(),
                    "{path} is not whole after SIGINT in step {step}"
                );
            } else if path.ends_with(".svg") {
                assert!(text.trim_end().ends_with("</svg>"), "{path} cut short");
            } else {
                assert!(
                    text.ends_with('\n') && text.lines().count() > 1,
                    "{path} cut short"
                );
            }
        }
        assert_eq!(
            folder.names(),
            ["channels.geojson", "plan.svg", "schedule.csv"]
        );
    }
    assert!(interrupted >= 1, "no run was interrupted");
}

#[test]
fn cell_sizes_that_are_not_positive_lengths_are_named() {
    let folder = Folder::new("cell-size");
    let site = folder.file("site.geojson", yard(SQUARE, "").as_bytes());
    for value in ["0", "-1", "NaN"] {
        let flag = format!("--cell-size={value}");
        let outcome = ramulus(&["drain", "--site", &site, &flag, "--intensity", "50"]);
        assert_failed(
            &outcome,
            1,
            &[
                &format!("cell size {value} m"),
                "a positive length is needed",
            ],
        );
    }
}

/// A small file of long rings: an outline of 6,000 positions and an obstacle of 8,001
/// (checking many rings of 10,000 positions for self-crossings took 0.75 s of CPU a ring, so a
/// 4.5 MB file of 11 of them took 8 s). Their edge pairs, 6,000² / 2 + 8,001² / 2 = 50,008,000,
/// are just over the site's budget of 10,000² / 2 = 50,000,000: refused at the obstacle, by
/// name, before its check runs.
#[test]
fn many_long_rings_are_refused_by_name() {
    let folder = Folder::new("long-rings");
    let circle = |cx: f64, cy: f64, r: f64, n: usize| -> String {
        let mut points: Vec<String> = (0..n)
            .map(|k| {
                let angle = std::f64::consts::TAU * k as f64 / n as f64;
                format!("[{:.4},{:.4}]", cx + r * angle.cos(), cy + r * angle.sin())
            })
            .collect();
        points.push(points[0].clone());
        format!("[[{}]]", points.join(","))
    };
    let site = format!(
        r#"{{"type":"FeatureCollection","properties":{{"runoff_coefficient":0.5}},"features":[
{{"type":"Feature","properties":{{"role":"outline"}},"geometry":{{"type":"Polygon","coordinates":{}}}}},
{{"type":"Feature","properties":{{"role":"obstacle","name":"pond"}},"geometry":{{"type":"Polygon","coordinates":{}}}}},
{{"type":"Feature","properties":{{"role":"outlet"}},"geometry":{{"type":"Point","coordinates":[0,0]}}}}]}}"#,
        circle(0.0, 0.0, 1000.0, 6_000),
        circle(100.0, 500.0, 50.0, 8_001)
    );
    let outcome = drain_site(&folder, &site, &[]);
    assert_failed(
        &outcome,
        1,
        &[
            "feature 1 (\"pond\")",
            "too many positions together",
            "simplify the rings",
        ],
    );
}
