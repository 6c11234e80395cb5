//! Run records keep loading: the version-1 compatibility pin (written before version 2 existed,
//! see tests/data/README-record-v1-pin.md) reads to the network it was written from, also when
//! its metrics lack keys, and a version-2 record reads back to the same network.

use ramulus_core::digest::digest_hex;
use ramulus_core::growth::Growth;
use ramulus_core::metrics::measure;
use ramulus_core::record::{make_record, read_record, write_record, RECORD_VERSION};
use ramulus_core::run::RunView;

/// Compatibility pin: the digest the version-1 build printed for this record.
const PINNED_DIGEST: &str = "a1d21f1b1a10ce41";

fn record_v1_text() -> String {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/data/record-v1-pin.json");
    std::fs::read_to_string(path).expect("the version-1 pin is readable")
}

#[test]
fn the_version_1_pin_reads_to_the_same_network() {
    let text = record_v1_text();
    let raw: serde_json::Value = serde_json::from_str(&text).unwrap();
    assert_eq!(raw["version"], 1, "the pin is a version-1 record");
    let (record, network) = read_record(&text).expect("version 1 still reads");
    assert_eq!(record.digest, PINNED_DIGEST);
    assert_eq!(digest_hex(&network), PINNED_DIGEST);
    // Every node of the pin but the root drains into its stored parent: one segment each.
    let nodes = raw["nodes"].as_array().unwrap();
    assert_eq!(network.nodes.len(), nodes.len());
    let roots = nodes.iter().filter(|node| node[2] == -1).count();
    assert_eq!(network.segments.len(), nodes.len() - roots);
    for segment in &network.segments {
        assert_eq!(nodes[segment.from as usize][2], segment.to as i64);
    }
    // Growing the stored parameters again gives the same network.
    let params = record.params.expect("the pin carries its parameters");
    let mut growth = Growth::new(&params).expect("valid parameters");
    growth.run();
    assert_eq!(digest_hex(&growth.network()), PINNED_DIGEST);
    // Measuring the read network gives the metrics the version-1 build stored, for every
    // value both versions define.
    let stored = &raw["metrics"];
    let metrics = measure(&network, params.costs.alpha).expect("a forest");
    assert_eq!(stored["segment_count"], metrics.segment_count);
    assert_eq!(stored["junction_count"], metrics.junction_count);
    assert_eq!(stored["tip_count"], metrics.tip_count);
    assert_eq!(
        stored["max_strahler_order"],
        metrics.max_strahler_order.unwrap()
    );
    assert_eq!(
        stored["total_length"].as_f64().unwrap(),
        metrics.total_length
    );
}

/// Metrics stored without some keys (a record written before those metrics existed) read as
/// absent, not as an error.
#[test]
fn a_version_1_record_whose_metrics_lack_keys_reads() {
    let mut raw: serde_json::Value = serde_json::from_str(&record_v1_text()).unwrap();
    let metrics = raw["metrics"].as_object_mut().unwrap();
    for key in [
        "hack_exponent",
        "streams",
        "max_strahler_order",
        "tip_count",
        "area",
    ] {
        assert!(metrics.remove(key).is_some(), "the pin holds {key}");
    }
    raw["segments"][0].as_object_mut().unwrap().remove("width");
    raw.as_object_mut().unwrap().remove("stopped");
    let (record, network) = read_record(&raw.to_string()).expect("missing keys are absent");
    let metrics = record.metrics.expect("the rest of the metrics read");
    assert_eq!(metrics.hack_exponent, None);
    assert_eq!(metrics.max_strahler_order, None);
    assert!(metrics.streams.is_empty());
    assert_eq!(metrics.tip_count, 0);
    assert_eq!(metrics.node_count, network.nodes.len() as u64);
    assert_eq!(digest_hex(&network), PINNED_DIGEST);
}

/// Today's writer: version 2, segments with their ends; read back, the same network.
#[test]
fn a_version_2_record_reads_back_to_the_same_network() {
    let (record_v1, network) = read_record(&record_v1_text()).unwrap();
    let params = record_v1.params.unwrap();
    let view = RunView::new(network.clone(), &params).unwrap();
    let text = write_record(&make_record(&view, &params, None));
    let raw: serde_json::Value = serde_json::from_str(&text).unwrap();
    assert_eq!(raw["version"], RECORD_VERSION);
    assert_eq!(RECORD_VERSION, 2);
    assert_eq!(
        raw["nodes"][0].as_array().unwrap().len(),
        3,
        "[x, y, weight]"
    );
    let (record, again) = read_record(&text).unwrap();
    assert_eq!(again, network);
    assert_eq!(record.digest, PINNED_DIGEST);
    assert_eq!(digest_hex(&again), PINNED_DIGEST);
}
