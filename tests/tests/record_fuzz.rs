//! Fuzzing the run-record reader: random text and random edits of a real record never panic,
//! and whatever is accepted can be measured and re-digested without panicking.

use proptest::prelude::*;
use ramulus_core::growth::Growth;
use ramulus_core::metrics::measure;
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

/// Accepted records must be measurable; the reader itself must never panic.
fn read_and_measure(text: &str) {
    if let Ok((_, network)) = read_record(text) {
        let _ = measure(&network, 0.5);
        let _ = ramulus_core::digest::digest_hex(&network);
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 256, ..ProptestConfig::default() })]

    #[test]
    fn random_text_never_panics(text in "\\PC{0,200}") {
        read_and_measure(&text);
    }

    #[test]
    fn edited_records_never_panic(edits in proptest::collection::vec((any::<prop::sample::Index>(), 0u8..6, any::<u8>()), 1..8)) {
        let mut bytes = small_record_text().into_bytes();
        for (position, kind, byte) in edits {
            let at = position.index(bytes.len().max(1));
            match kind {
                0 => { if !bytes.is_empty() { bytes.remove(at); } }
                1 => bytes.insert(at, byte),
                2 => { if at < bytes.len() { bytes[at] = b"0123456789-.e,[]{}\"nul"[byte as usize % 22]; } }
                3 => bytes.truncate(at),
                4 => { if at < bytes.len() { bytes[at] = byte; } }
                _ => { let copy = bytes[at..].to_vec(); bytes.extend_from_slice(&copy[..copy.len().min(40)]); }
            }
        }
        read_and_measure(&String::from_utf8_lossy(&bytes));
    }
}

#[test]
fn a_cycle_is_refused_naming_a_node() {
    let text = small_record_text();
    let mut record: serde_json::Value = serde_json::from_str(&text).unwrap();
    // Make node 0 (a root) drain into node 1, whose path leads back to node 0: a cycle.
    record["nodes"][0][2] = serde_json::json!(1);
    let error = read_record(&record.to_string()).unwrap_err();
    assert!(matches!(error, RecordError::Topology(_)), "{error}");
    assert!(error.to_string().contains("node"), "{error}");
}

#[test]
fn a_parent_out_of_range_is_named() {
    let text = small_record_text();
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
