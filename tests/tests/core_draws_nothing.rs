//! The boundary between computing and drawing: `ramulus-core` depends on no drawing or browser
//! crate (read from `cargo metadata`, the dependency graph cargo itself resolves), and its
//! sources hold no SVG, raster, palette or colour code, all of which lives in `ramulus-draw`.

use std::collections::{BTreeSet, VecDeque};
use std::path::{Path, PathBuf};
use std::process::Command;

fn workspace_root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .parent()
        .expect("tests/ sits in the workspace")
        .to_path_buf()
}

/// Names of every package `package` depends on, directly or not (normal dependencies of the
/// resolved graph, as `cargo metadata --format-version 1` documents it).
fn dependencies_of(package: &str) -> BTreeSet<String> {
    let cargo = std::env::var("CARGO").unwrap_or_else(|_| "cargo".to_string());
    let metadata_run = |offline: bool| {
        let mut command = Command::new(&cargo);
        command.args(["metadata", "--format-version", "1"]);
        if offline {
            command.arg("--offline");
        }
        command
            .current_dir(workspace_root())
            .output()
            .expect("cargo metadata runs")
    };
    // Offline first; a fresh machine may lack the sources of other platforms' dependencies
    // (which `cargo metadata` reads but a build never fetches), so then it may fetch them.
    let mut output = metadata_run(true);
    if !output.status.success() {
        output = metadata_run(false);
    }
    assert!(
        output.status.success(),
        "cargo metadata failed: {}",
        String::from_utf8_lossy(&output.stderr)
    );
    let metadata: serde_json::Value = serde_json::from_slice(&output.stdout).unwrap();
    let name_of = |id: &str| {
        metadata["packages"]
            .as_array()
            .unwrap()
            .iter()
            .find(|entry| entry["id"] == id)
            .and_then(|entry| entry["name"].as_str())
            .unwrap_or_default()
            .to_string()
    };
    let nodes = metadata["resolve"]["nodes"].as_array().unwrap();
    let start = nodes
        .iter()
        .find(|node| name_of(node["id"].as_str().unwrap()) == package)
        .expect("the package is in the workspace");
    let mut seen = BTreeSet::new();
    let mut queue = VecDeque::from([start]);
    while let Some(node) = queue.pop_front() {
        for dependency in node["deps"].as_array().unwrap() {
            let normal = dependency["dep_kinds"]
                .as_array()
                .unwrap()
                .iter()
                .any(|kind| kind["kind"].is_null());
            let id = dependency["pkg"].as_str().unwrap();
            if normal && seen.insert(name_of(id)) {
                queue.extend(nodes.iter().filter(|candidate| candidate["id"] == id));
            }
        }
    }
    seen
}

#[test]
fn the_core_depends_on_no_drawing_or_browser_crate() {
    let core = dependencies_of("ramulus-core");
    for crate_name in [
        "ramulus-draw",
        "ramulus-web",
        "wasm-bindgen",
        "js-sys",
        "web-sys",
    ] {
        assert!(
            !core.contains(crate_name),
            "ramulus-core depends on {crate_name}"
        );
    }
    // The check can fail: the drawing crate does depend on the core, the web layer on both.
    assert!(dependencies_of("ramulus-draw").contains("ramulus-core"));
    let web = dependencies_of("ramulus-web");
    assert!(web.contains("ramulus-draw") && web.contains("web-sys"));
}

/// Marks of drawing code: SVG elements and attributes, raster and colour routines, colour
/// literals `#rrggbb`.
const DRAWING_MARKS: [&str; 10] = [
    "<svg",
    "<line",
    "stroke",
    "viewbox",
    "okabe",
    "oklab",
    "draw_lines",
    "rasterview",
    "colour_scheme",
    "colouring",
];

fn rust_sources(folder: &Path, found: &mut Vec<PathBuf>) {
    for entry in std::fs::read_dir(folder).unwrap() {
        let path = entry.unwrap().path();
        if path.is_dir() {
            rust_sources(&path, found);
        } else if path.extension().is_some_and(|extension| extension == "rs") {
            found.push(path);
        }
    }
}

/// `(file, mark)` for every drawing mark found in the Rust sources under `folder`.
fn drawing_marks_in(folder: &Path) -> Vec<(String, String)> {
    let mut files = Vec::new();
    rust_sources(folder, &mut files);
    let mut hits = Vec::new();
    for file in files {
        let text = std::fs::read_to_string(&file).unwrap().to_lowercase();
        let name = file.display().to_string();
        for mark in DRAWING_MARKS {
            if text.contains(mark) {
                hits.push((name.clone(), mark.to_string()));
            }
        }
        let bytes = text.as_bytes();
        let colour_literal = bytes.windows(8).any(|window| {
            window[0] == b'#'
                && window[1..7].iter().all(u8::is_ascii_hexdigit)
                && !window[7].is_ascii_alphanumeric()
        });
        if colour_literal {
            hits.push((name, "#rrggbb".to_string()));
        }
    }
    hits
}

/// The specimen readers (`crate-core/src/specimen/`) read traced SVG drawings, so they name
/// SVG's elements and attributes; they write and draw nothing, and are the one exception.
const READERS_OF_DRAWINGS: &str = "specimen";

/// The site-plan reader (`crate-core/src/site_plan_svg/`) reads site plans drawn as SVG: the
/// same exception.
const SITE_PLAN_READER: &str = "site_plan_svg";

#[test]
fn the_core_sources_hold_no_drawing_code() {
    let hits: Vec<(String, String)> = drawing_marks_in(&workspace_root().join("crate-core/src"))
        .into_iter()
        .filter(|(file, _)| {
            !Path::new(file)
                .components()
                .any(|part| part.as_os_str() == READERS_OF_DRAWINGS)
                && !Path::new(file)
                    .components()
                    .any(|part| part.as_os_str() == SITE_PLAN_READER)
        })
        .collect();
    assert!(hits.is_empty(), "drawing code in the core: {hits:?}");
    // The same scan finds every kind of mark in the drawing crate, so it would see them.
    let drawing = drawing_marks_in(&workspace_root().join("crate-draw/src"));
    for mark in DRAWING_MARKS
        .iter()
        .map(|mark| mark.to_string())
        .chain(["#rrggbb".to_string()])
    {
        assert!(
            drawing.iter().any(|(_, found)| *found == mark),
            "the scan does not find {mark} in crate-draw"
        );
    }
}
