//! Compatibility pins: every run link in `tests/data/link-v1-digests.txt` must grow the network
//! whose digest was written beside it when the file was made.
//!
//! These expected values are the program's own earlier output, kept on purpose (a compatibility
//! pin, not a correctness check): a link shared today must grow the same network in every later
//! build. The file covers every preset, every joining rule, attachment to segments, open-growth
//! thresholds, outlines, obstacles, image masks and links with missing keys.

use ramulus_core::digest::digest_hex;
use ramulus_core::growth::Growth;
use ramulus_core::link::decode_link;

const PINS: &str = include_str!("../data/link-v1-digests.txt");

/// The pinned (label, digest, link) triples, in file order.
fn pins() -> Vec<(String, String, String)> {
    let mut out = Vec::new();
    let mut label = String::new();
    for line in PINS.lines() {
        if let Some(comment) = line.strip_prefix("# ") {
            label = comment.to_string();
        } else if let Some((digest, link)) = line.split_once(' ') {
            out.push((label.clone(), digest.to_string(), link.to_string()));
        }
    }
    out
}

#[test]
fn the_pin_file_covers_at_least_thirty_links() {
    let pins = pins();
    assert!(pins.len() >= 30, "only {} pins", pins.len());
    for (label, digest, _) in &pins {
        assert_eq!(
            digest.len(),
            16,
            "{label}: digest {digest:?} is not 16 hex digits"
        );
    }
}

#[test]
fn every_version_1_link_grows_its_pinned_network() {
    let mut failures = Vec::new();
    for (label, digest, link) in pins() {
        let read = decode_link(&link);
        if !read.problems.is_empty() {
            failures.push(format!(
                "{label}: link reads with problems {:?}",
                read.problems
            ));
            continue;
        }
        let mut growth = match Growth::new(&read.params) {
            Ok(growth) => growth,
            Err(error) => {
                failures.push(format!("{label}: {error}"));
                continue;
            }
        };
        growth.run();
        let grown = digest_hex(&growth.network());
        if grown != digest {
            failures.push(format!("{label}: grew {grown}, pinned {digest}"));
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

/// Version 1 links were accepted with any cell budget; the budget is now capped at the largest
/// lattice. A link whose budget lies above the cap must still grow the network it always grew:
/// on a lattice that fills before either budget runs out, the same network as a budget the
/// lattice can never reach, and never the network of the default budget.
#[test]
fn a_version_1_budget_above_the_cap_grows_the_same_network() {
    let grow = |link: &str| {
        let read = decode_link(link);
        let mut growth = Growth::new(&read.params).expect("the link reads to valid parameters");
        growth.run();
        (digest_hex(&growth.network()), read.problems)
    };
    let base = "v=1&width=120&height=100&roots=60,99,0,1&seed=9";
    let (above, problems) = grow(&format!("{base}&cells=30000000"));
    let (fills, none) = grow(&format!("{base}&cells=20000"));
    let (default_budget, _) = grow(base);
    assert!(none.is_empty(), "{none:?}");
    assert_eq!(above, fills);
    assert_ne!(above, default_budget);
    assert_eq!(problems.len(), 1, "{problems:?}");
    assert_eq!(problems[0].key, "cells");
}
