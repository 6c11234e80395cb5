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
