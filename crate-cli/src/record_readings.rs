//! `regrown_metrics`: the readings of a run record as its run gave them. A run that conducted
//! from a threshold (`vein_area`) or closed loops after growth (`reconnect`) measured its veins
//! apart from tissue and read its tree readings (branching angles, Strahler orders, transport
//! cost) on the grown tree before its loops closed; the record holds the finished network, in
//! which neither shows. Such a record is grown again from its parameters, as the page does when
//! it opens one, and the run's readings are used when the network grown equals the record's.

use ramulus_core::digest::digest_hex;
use ramulus_core::growth::Growth;
use ramulus_core::metrics::Metrics;
use ramulus_core::network::Network;
use ramulus_core::record::RunRecord;
use ramulus_core::run::RunView;

/// The readings of the run `record` holds, grown again from its parameters, when its run had a
/// conducting threshold or a loop pass and the network grown again has the digest of
/// `network` (the record's); `None` otherwise (no parameters, a tree of veins alone, a record
/// of a paused or edited run), where measuring `network` as it stands gives the run's readings
/// or the only ones there are.
pub fn regrown_metrics(record: &RunRecord, network: &Network) -> Option<Metrics> {
    let params = record.params.as_ref()?;
    if params.widths.vein_area <= 0.0 && params.widths.reconnect.is_none() {
        return None;
    }
    let mut growth = Growth::new(params).ok()?;
    growth.run();
    let view = RunView::new(growth.into_network(), params).ok()?;
    (view.digest == digest_hex(network)).then_some(view.metrics)
}
