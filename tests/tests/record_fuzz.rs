//! Fuzzing the run-record reader: random text and random edits of real records (version 2 as
//! written today, and the version-1 compatibility pin) never panic, and whatever is accepted is
//! measured, with counts that match the network read.

use proptest::prelude::*;
use ramulus_core::growth::Growth;
use ramulus_core::metrics::measure;
use ramulus_core::network::NetworkKind;
use ramulus_core::params::{Domain, RunControl};
use ramulus_core::params::{Joining, Params, Root};
use ramulus_core::record::{make_record, read_record, write_record, RecordError};
use ramulus_core::run::RunView;

fn small_record_text() -> String {
    let params = Params {
        domain: Domain {
            width: 12,
            height: 10,
            roots: vec![Root {
                x: 6,
                y: 9,
                outflow: [0.0, 1.0],
            }],
            ..Domain::default()
        },
        run: RunControl {
            cells: 60,
            joining: Joining::Weighted,
            attach_to_segments: true,
            ..RunControl::default()
        },
        ..Params::default()
    };
    let mut growth = Growth::new(&params).expect("valid parameters");
    growth.run();
    let view = RunView::new(growth.network(), &params).expect("a forest");
    write_record(&make_record(&view, &params, None))
}

/// The version-1 compatibility pin (see tests/data/README-record-v1-pin.md).
fn record_v1_text() -> String {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/data/record-v1-pin.json");
    std::fs::read_to_string(path).expect("the version-1 pin is readable")
}

/// Accepted records must be measurable, with counts that match the network read; the reader
/// itself must never panic.
fn read_and_measure(text: &str) -> Result<(), TestCaseError> {
    if let Ok((_, network)) = read_record(text) {
        let metrics = measure(&network, 0.5);
        prop_assert!(
            metrics.is_ok(),
            "an accepted record measures: {:?}",
            metrics.err()
        );
        let metrics = metrics.expect("checked");
        prop_assert_eq!(metrics.node_count, network.nodes.len() as u64);
        prop_assert_eq!(metrics.segment_count, network.segments.len() as u64);
        // Cyclomatic number (Kirchhoff 1847): E - V + C, never negative.
        prop_assert_eq!(
            metrics.loop_count + network.nodes.len() as u64,
            network.segments.len() as u64 + metrics.component_count
        );
        prop_assert!(metrics.component_count <= network.nodes.len() as u64);
        prop_assert_eq!(
            metrics.kind == NetworkKind::Forest,
            network.topology().is_ok()
        );
        let digest = ramulus_core::digest::digest_hex(&network);
        prop_assert_eq!(digest.len(), 16);
        prop_assert!(digest.bytes().all(|byte| byte.is_ascii_hexdigit()));
    }
    Ok(())
}

/// Applies byte edits to `text`.
fn edited(text: String, edits: Vec<(prop::sample::Index, u8, u8)>) -> String {
    let mut bytes = text.into_bytes();
    for (position, kind, byte) in edits {
        let at = position.index(bytes.len().max(1));
        match kind {
            0 => {
                if !bytes.is_empty() {
                    bytes.remove(at);
                }
            }
            1 => bytes.insert(at, byte),
            2 => {
                if at < bytes.len() {
                    bytes[at] = b"0123456789-.e,[]{}\"nul"[byte as usize % 22];
                }
            }
            3 => bytes.truncate(at),
            4 => {
                if at < bytes.len() {
                    bytes[at] = byte;
                }
            }
            _ => {
                let copy = bytes[at..].to_vec();
                bytes.extend_from_slice(&copy[..copy.len().min(40)]);
            }
        }
    }
    String::from_utf8_lossy(&bytes).into_owned()
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 256, ..ProptestConfig::default() })]

    #[test]
    fn random_text_never_panics(text in "\\PC{0,200}") {
        read_and_measure(&text)?;
    }

    #[test]
    fn edited_records_never_panic(edits in proptest::collection::vec((any::<prop::sample::Index>(), 0u8..6, any::<u8>()), 1..8)) {
        read_and_measure(&edited(small_record_text(), edits))?;
    }

    #[test]
    fn edited_version_1_records_never_panic(edits in proptest::collection::vec((any::<prop::sample::Index>(), 0u8..6, any::<u8>()), 1..8)) {
        read_and_measure(&edited(record_v1_text(), edits))?;
    }
}

#[test]
fn a_cycle_in_a_version_1_record_is_refused_naming_a_node() {
    let text = record_v1_text();
    let mut record: serde_json::Value = serde_json::from_str(&text).unwrap();
    // Make node 0 (a root) drain into node 1, whose path leads back to node 0: a cycle.
    record["nodes"][0][2] = serde_json::json!(1);
    let error = read_record(&record.to_string()).unwrap_err();
    assert!(matches!(error, RecordError::Topology(_)), "{error}");
    assert!(error.to_string().contains("node"), "{error}");
}

#[test]
fn a_parent_out_of_range_is_named() {
    let text = record_v1_text();
    let mut record: serde_json::Value = serde_json::from_str(&text).unwrap();
    record["nodes"][3][2] = serde_json::json!(100000);
    let error = read_record(&record.to_string()).unwrap_err();
    assert_eq!(
        error,
        RecordError::Parent {
            node: 3,
            parent: 100000
        }
    );
    assert!(error.to_string().contains("nodes[3]"));
}

#[test]
fn a_newer_version_is_refused() {
    let text = small_record_text();
    let mut record: serde_json::Value = serde_json::from_str(&text).unwrap();
    record["version"] = serde_json::json!(99);
    assert_eq!(
        read_record(&record.to_string()).unwrap_err(),
        RecordError::Version(99)
    );
}

#[test]
fn a_segment_naming_a_missing_node_is_refused() {
    let text = small_record_text();
    let mut record: serde_json::Value = serde_json::from_str(&text).unwrap();
    record["segments"][2]["to"] = serde_json::json!(100000);
    let error = read_record(&record.to_string()).unwrap_err();
    assert!(matches!(error, RecordError::Topology(_)), "{error}");
    assert!(error.to_string().contains("segment 2"), "{error}");
}

/// A version-2 record may close a loop: an extra segment between two nodes already joined by
/// a path adds exactly one independent loop (cyclomatic number E - V + C, Kirchhoff 1847), and
/// the forest-only metrics become absent.
#[test]
fn a_version_2_record_with_a_loop_reads_and_measures() {
    let text = small_record_text();
    let mut record: serde_json::Value = serde_json::from_str(&text).unwrap();
    let first = record["segments"][0].clone();
    let (from, to) = (
        first["from"].as_u64().unwrap(),
        first["to"].as_u64().unwrap(),
    );
    // A segment from the downstream end back to a sibling path's node: node `to` gains a
    // second downstream segment, closing a loop through the root.
    let other = (0..record["nodes"].as_array().unwrap().len() as u64)
        .find(|&node| node != from && node != to)
        .unwrap();
    record["segments"]
        .as_array_mut()
        .unwrap()
        .push(serde_json::json!({ "from": to, "to": other }));
    let (_, network) = read_record(&record.to_string()).expect("a loop is allowed in version 2");
    let metrics = measure(&network, 0.5).expect("a looped network is measured");
    assert_eq!(metrics.kind, NetworkKind::Looped);
    assert_eq!(metrics.loop_count, 1);
    assert_eq!(metrics.component_count, 1);
    assert_eq!(metrics.max_strahler_order, None);
    assert_eq!(metrics.hack_exponent, None);
    assert_eq!(metrics.transport_cost, None);
    assert!(metrics.streams.is_empty());
}
