//! The streamed run record (`write_record_to`) is byte for byte the record built in memory
//! (`write_record(&make_record(..))`): on grown forests of every preset (a drainage site among
//! them, whose record carries the caution), with and without a stop reason, and on a looped
//! network. The in-memory writer is the reference: it is serde_json's pretty printer over the
//! derived `Serialize` of `RunRecord`.

use ramulus_core::growth::Growth;
use ramulus_core::network::{CellSet, Network, Node, Segment};
use ramulus_core::params::Params;
use ramulus_core::presets::presets;
use ramulus_core::record::{make_record, read_record, write_record, write_record_to};
use ramulus_core::run::RunView;

fn streamed(view: &RunView, params: &Params, stopped: Option<&str>) -> Vec<u8> {
    let mut bytes = Vec::new();
    write_record_to(&mut bytes, view, params, stopped).expect("writing to memory succeeds");
    bytes
}

fn check(view: &RunView, params: &Params, stopped: Option<&str>) {
    let built = write_record(&make_record(view, params, stopped.map(str::to_string)));
    let streamed = streamed(view, params, stopped);
    assert_eq!(
        String::from_utf8(streamed).expect("the record is UTF-8"),
        built,
        "streamed and built records differ"
    );
}

#[test]
fn streamed_records_equal_built_records_for_every_preset() {
    let mut sites = 0;
    for preset in presets() {
        let mut params = preset.params.clone();
        params.run.cells = params.run.cells.min(1500);
        let mut growth = Growth::new(&params).expect("presets validate");
        let stopped = growth.run();
        let view = RunView::new(growth.network(), &params).expect("a grown network is valid");
        assert!(view.network.segments.len() > 10, "{}", preset.name);
        check(&view, &params, Some(stopped.name()));
        check(&view, &params, None);
        sites += usize::from(params.is_site());
    }
    assert!(sites > 0, "a site preset checks the caution field");
}

#[test]
fn a_streamed_looped_record_equals_the_built_one_and_reads_back() {
    // A unit square with one diagonal: five segments, one independent loop.
    let node = |x: f64, y: f64| Node { x, y, weight: 0.25 };
    let segment = |from: u32, to: u32| Segment { from, to };
    let network = Network {
        nodes: vec![
            node(0.0, 0.0),
            node(1.0, 0.0),
            node(1.0, 1.0),
            node(0.0, 1.0),
        ],
        segments: vec![
            segment(1, 0),
            segment(2, 1),
            segment(3, 2),
            segment(0, 3),
            segment(2, 0),
        ],
        area: 1.0,
        units: "mm".into(),
        cell_size: 0.5,
        cells: CellSet {
            width: 2,
            height: 2,
            occupied: vec![0, 1, 2, 3],
        },
    };
    let params = Params::default();
    let view = RunView::new(network.clone(), &params).expect("a valid network");
    check(&view, &params, None);
    let text = String::from_utf8(streamed(&view, &params, Some("full"))).expect("UTF-8");
    let (record, again) = read_record(&text).expect("the streamed record reads");
    assert_eq!(again, network);
    assert_eq!(record.stopped.as_deref(), Some("full"));
}
