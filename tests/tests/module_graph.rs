//! The core's top-level modules form no cycle: reading every `crate::NAME` path in
//! `crate-core/src`, the graph "module uses module" must be acyclic, so that the parameters,
//! the mask and the allowed region (and every other module) can be read bottom-up.
//!
//! Cycles are found with petgraph's `tarjan_scc` (strongly connected components, Tarjan 1972,
//! SIAM J. Comput. 1(2)): any component with more than one module is a cycle.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use petgraph::algo::tarjan_scc;
use petgraph::graph::DiGraph;

/// Every `.rs` file under `folder`, recursively.
fn rust_files(folder: &Path, out: &mut Vec<PathBuf>) {
    for entry in std::fs::read_dir(folder).expect("core source folder is readable") {
        let path = entry.expect("folder entry").path();
        if path.is_dir() {
            rust_files(&path, out);
        } else if path.extension().is_some_and(|ext| ext == "rs") {
            out.push(path);
        }
    }
}

/// The names following each `crate::` in `text`.
fn crate_paths(text: &str) -> Vec<String> {
    text.match_indices("crate::")
        .map(|(index, found)| {
            text[index + found.len()..]
                .chars()
                .take_while(|c| c.is_ascii_alphanumeric() || *c == '_')
                .collect()
        })
        .filter(|name: &String| !name.is_empty())
        .collect()
}

/// `module -> modules it names`, for the core's top-level modules (`lib.rs` left out).
fn core_module_uses() -> BTreeMap<String, Vec<String>> {
    let source = Path::new(env!("CARGO_MANIFEST_DIR")).join("../crate-core/src");
    let mut files = Vec::new();
    rust_files(&source, &mut files);
    let mut uses: BTreeMap<String, Vec<String>> = BTreeMap::new();
    for file in files {
        let relative = file
            .strip_prefix(&source)
            .expect("file under the source folder");
        if relative == Path::new("lib.rs") {
            continue;
        }
        let first = relative.components().next().expect("a first component");
        let module = first
            .as_os_str()
            .to_string_lossy()
            .trim_end_matches(".rs")
            .to_string();
        let text = std::fs::read_to_string(&file).expect("source file is readable");
        let entry = uses.entry(module.clone()).or_default();
        for used in crate_paths(&text) {
            if used != module && !entry.contains(&used) {
                entry.push(used);
            }
        }
    }
    uses
}

#[test]
fn core_modules_form_no_cycle() {
    let uses = core_module_uses();
    // The check must see the modules it is about, or it proves nothing.
    for module in ["params", "mask", "region", "link", "schema", "growth"] {
        assert!(uses.contains_key(module), "module `{module}` not found");
    }
    assert!(uses["region"].contains(&"params".to_string()));
    assert!(uses["params"].contains(&"mask".to_string()));

    let mut graph = DiGraph::<String, ()>::new();
    let mut index = BTreeMap::new();
    for module in uses.keys().chain(uses.values().flatten()) {
        if !index.contains_key(module) {
            index.insert(module.clone(), graph.add_node(module.clone()));
        }
    }
    for (module, used) in &uses {
        for other in used {
            graph.add_edge(index[module], index[other], ());
        }
    }
    let cycles: Vec<Vec<String>> = tarjan_scc(&graph)
        .into_iter()
        .filter(|component| component.len() > 1)
        .map(|component| component.iter().map(|&node| graph[node].clone()).collect())
        .collect();
    assert!(cycles.is_empty(), "modules that use each other: {cycles:?}");
}

#[test]
fn a_cycle_is_found_when_present() {
    // The detector itself on a hand-made graph: a -> b -> a is one component of two.
    let mut graph = DiGraph::<&str, ()>::new();
    let a = graph.add_node("a");
    let b = graph.add_node("b");
    let c = graph.add_node("c");
    graph.add_edge(a, b, ());
    graph.add_edge(b, a, ());
    graph.add_edge(b, c, ());
    let sizes: Vec<usize> = tarjan_scc(&graph).iter().map(Vec::len).collect();
    assert_eq!(sizes.iter().filter(|&&size| size > 1).count(), 1);
    assert_eq!(
        crate_paths("use crate::params::Params; crate::mask::X"),
        ["params", "mask"]
    );
}
