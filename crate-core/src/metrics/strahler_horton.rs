//! Strahler streams per order (`streams_by_order`) and the Horton bifurcation and length ratios
//! fitted across orders (`HortonRatios`).

use std::collections::BTreeMap;

use super::regression::fit_line;
use super::StreamOrder;
use crate::network::{Network, Topology};

/// Horton ratios fitted over all orders.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct HortonRatios {
    /// `R_B = 10^(-slope of log10 N_w on w)`.
    pub(crate) bifurcation_ratio: Option<f64>,
    /// `R_L = 10^(slope of log10 L_w on w)`.
    pub(crate) length_ratio: Option<f64>,
}

/// Stream count and mean stream length of every order carried by a segment, lowest first.
///
/// A stream of order w is a maximal chain of consecutive segments of order w. Each segment of
/// order w has at most one child of order w (two would raise the order), so a segment whose
/// children all differ from its order is the upstream end of exactly one stream; counting those
/// ends counts streams, and every segment belongs to one stream, so the mean stream length is
/// the total length of the order's segments over its stream count.
pub(crate) fn streams_by_order(
    network: &Network,
    topology: &Topology,
    orders: &[u32],
) -> Vec<StreamOrder> {
    // Order -> (stream count, total length of segments): by index for the orders a network
    // can have (order w needs at least 2^(w - 1) tips), in a map for any others.
    let mut low_orders = [(0u64, 0.0f64); LOW_ORDERS];
    let mut per_order: BTreeMap<u32, (u64, f64)> = BTreeMap::new();
    for index in 0..network.nodes.len() {
        if topology.is_root(index) {
            continue;
        }
        let Some(&order) = orders.get(index) else {
            continue;
        };
        let continues_a_stream = topology.children.get(index).is_some_and(|children| {
            children
                .iter()
                .any(|&child| orders.get(child as usize) == Some(&order))
        });
        let entry = match low_orders.get_mut(order as usize) {
            Some(entry) => entry,
            None => per_order.entry(order).or_insert((0, 0.0)),
        };
        if !continues_a_stream {
            entry.0 += 1;
        }
        entry.1 += topology.length.get(index).copied().unwrap_or(0.0);
    }
    // Lowest first: the orders kept by index all lie below those in the map.
    (0u32..)
        .zip(low_orders)
        .chain(per_order)
        .filter(|&(_, (stream_count, _))| stream_count > 0)
        .map(|(order, (stream_count, total_length))| StreamOrder {
            order,
            stream_count,
            mean_stream_length: total_length / stream_count as f64,
        })
        .collect()
}

/// Orders counted by index in `streams_by_order` (0 to 63).
const LOW_ORDERS: usize = 64;

/// Fits `log10 N_w` and `log10 L_w` against `w` by least squares over the given orders.
pub(crate) fn horton_ratios(streams: &[StreamOrder]) -> HortonRatios {
    let count_points: Vec<(f64, f64)> = streams
        .iter()
        .map(|stream| {
            (
                f64::from(stream.order),
                libm::log10(stream.stream_count as f64),
            )
        })
        .collect();
    let length_points: Vec<(f64, f64)> = streams
        .iter()
        .filter(|stream| stream.mean_stream_length > 0.0)
        .map(|stream| {
            (
                f64::from(stream.order),
                libm::log10(stream.mean_stream_length),
            )
        })
        .collect();
    HortonRatios {
        bifurcation_ratio: fit_line(&count_points).map(|line| libm::pow(10.0, -line.slope)),
        length_ratio: fit_line(&length_points).map(|line| libm::pow(10.0, line.slope)),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Counts 16, 4, 1 over orders 1..3 fall by 4 each order: R_B = 4 (Horton 1945 ratio,
    /// arithmetic by hand); lengths 1, 3, 9 grow by 3: R_L = 3.
    #[test]
    fn geometric_counts_and_lengths() {
        let streams = [
            StreamOrder {
                order: 1,
                stream_count: 16,
                mean_stream_length: 1.0,
            },
            StreamOrder {
                order: 2,
                stream_count: 4,
                mean_stream_length: 3.0,
            },
            StreamOrder {
                order: 3,
                stream_count: 1,
                mean_stream_length: 9.0,
            },
        ];
        let ratios = horton_ratios(&streams);
        let bifurcation = ratios.bifurcation_ratio.unwrap_or(f64::NAN);
        let length = ratios.length_ratio.unwrap_or(f64::NAN);
        assert!((bifurcation - 4.0).abs() < 1e-12, "{bifurcation}");
        assert!((length - 3.0).abs() < 1e-12, "{length}");
    }

    /// One order gives no line, hence no ratio (definition of the fit).
    #[test]
    fn one_order_has_no_ratio() {
        let streams = [StreamOrder {
            order: 1,
            stream_count: 3,
            mean_stream_length: 2.0,
        }];
        let ratios = horton_ratios(&streams);
        assert_eq!(ratios.bifurcation_ratio, None);
        assert_eq!(ratios.length_ratio, None);
    }
}
