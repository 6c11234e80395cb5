//! `at_least_as_wide`: the part of a measured network whose segments are drawn at least a
//! given width, as a cleared leaf looks when only its thicker veins are followed.

use ramulus_core::network::Network;

/// `network` keeping only the segments whose `widths` entry (one per segment) is at least `cut`;
/// nodes are kept, so unused ones stand alone.
pub fn at_least_as_wide(network: &Network, widths: &[f64], cut: f64) -> Network {
    let mut kept = network.clone();
    kept.segments = network
        .segments
        .iter()
        .zip(widths)
        .filter(|(_, &width)| width >= cut)
        .map(|(segment, _)| *segment)
        .collect();
    kept
}
