//! Branching angles at every node with two or more children (`branching_angles`) and their
//! summary: count, mean, standard deviation and a 10-degree histogram (`AngleSummary`).

use super::{ANGLE_BIN_WIDTH_DEGREES, ANGLE_HISTOGRAM_BINS};
use crate::network::{Network, Topology};

/// Count, mean, sample standard deviation and histogram of a list of angles in degrees.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct AngleSummary {
    /// Number of angles.
    pub(crate) count: u64,
    /// Mean in degrees; `None` for no angles.
    pub(crate) mean: Option<f64>,
    /// Sample standard deviation (divisor `count - 1`) in degrees; `None` below two angles.
    pub(crate) standard_deviation: Option<f64>,
    /// Counts per 10-degree bin from 0 to 180 degrees.
    pub(crate) histogram: [u64; ANGLE_HISTOGRAM_BINS],
}

/// Branching angles in degrees, node by node in index order.
///
/// At a node with two or more children, the main child has the largest flow (the lowest index
/// among equal flows); every other child gives the angle between the vectors from the node to
/// the main child and from the node to that child. Zero-length vectors give no angle.
pub(crate) fn branching_angles(network: &Network, topology: &Topology) -> Vec<f64> {
    let mut angles = Vec::new();
    for (index, children) in topology.children.iter().enumerate() {
        if children.len() < 2 {
            continue;
        }
        let Some(node) = network.nodes.get(index) else {
            continue;
        };
        let Some(main_child) = main_upstream_child(children, &topology.flow) else {
            continue;
        };
        let Some(main_node) = network.nodes.get(main_child as usize) else {
            continue;
        };
        let main_vector = (main_node.x - node.x, main_node.y - node.y);
        if main_vector == (0.0, 0.0) {
            continue;
        }
        for &child in children {
            if child == main_child {
                continue;
            }
            let Some(child_node) = network.nodes.get(child as usize) else {
                continue;
            };
            let side_vector = (child_node.x - node.x, child_node.y - node.y);
            if side_vector == (0.0, 0.0) {
                continue;
            }
            angles.push(angle_between_degrees(main_vector, side_vector));
        }
    }
    angles
}

/// The child with the largest flow; the first (lowest index) among equal flows, since
/// `Topology::children` lists children in increasing index order.
fn main_upstream_child(children: &[u32], flows: &[f64]) -> Option<u32> {
    let mut best: Option<(u32, f64)> = None;
    for &child in children {
        let flow = flows.get(child as usize).copied().unwrap_or(0.0);
        match best {
            Some((_, best_flow)) if flow <= best_flow => {}
            _ => best = Some((child, flow)),
        }
    }
    best.map(|(child, _)| child)
}

/// Unsigned angle between two non-zero vectors, in degrees from 0 to 180.
///
/// `atan2(|cross|, dot)` keeps full precision near 0 and 180 degrees, where `acos` loses it.
pub(crate) fn angle_between_degrees(first: (f64, f64), second: (f64, f64)) -> f64 {
    let cross = first.0 * second.1 - first.1 * second.0;
    let dot = first.0 * second.0 + first.1 * second.1;
    libm::atan2(libm::fabs(cross), dot).to_degrees()
}

/// Count, mean, sample standard deviation and 10-degree histogram of angles in degrees.
pub(crate) fn summarise_angles(angles: &[f64]) -> AngleSummary {
    let mut histogram = [0u64; ANGLE_HISTOGRAM_BINS];
    for &angle in angles {
        let bin = libm::floor(angle / ANGLE_BIN_WIDTH_DEGREES);
        let bin = if bin >= 0.0 { bin as usize } else { 0 };
        histogram[bin.min(ANGLE_HISTOGRAM_BINS - 1)] += 1;
    }
    let count = angles.len();
    let mean = if count > 0 {
        Some(angles.iter().sum::<f64>() / count as f64)
    } else {
        None
    };
    let standard_deviation = match mean {
        Some(mean) if count >= 2 => {
            let squares: f64 = angles
                .iter()
                .map(|angle| (angle - mean) * (angle - mean))
                .sum();
            Some(libm::sqrt(squares / (count - 1) as f64))
        }
        _ => None,
    };
    AngleSummary {
        count: count as u64,
        mean,
        standard_deviation,
        histogram,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Perpendicular vectors meet at 90 degrees, opposite ones at 180 (Euclidean geometry).
    #[test]
    fn right_and_straight_angles() {
        assert_eq!(angle_between_degrees((1.0, 0.0), (0.0, 2.0)), 90.0);
        assert_eq!(angle_between_degrees((1.0, 0.0), (-3.0, 0.0)), 180.0);
        assert_eq!(angle_between_degrees((0.0, 1.0), (0.0, 5.0)), 0.0);
    }

    /// Angles 10, 20, 30: mean 20, sample sd sqrt((100 + 0 + 100) / 2) = 10; 180 falls in the
    /// last bin (arithmetic by hand).
    #[test]
    fn summary_of_three_angles() {
        let summary = summarise_angles(&[10.0, 20.0, 30.0, 180.0]);
        assert_eq!(summary.count, 4);
        let small = summarise_angles(&[10.0, 20.0, 30.0]);
        assert_eq!(small.mean, Some(20.0));
        assert_eq!(small.standard_deviation, Some(10.0));
        assert_eq!(summary.histogram[1], 1);
        assert_eq!(summary.histogram[2], 1);
        assert_eq!(summary.histogram[3], 1);
        assert_eq!(summary.histogram[17], 1);
    }

    /// Equal flows pick the first child; a larger flow wins wherever it sits (the rule above).
    #[test]
    fn main_child_rule() {
        let flows = [0.0, 2.0, 2.0, 5.0];
        assert_eq!(main_upstream_child(&[1, 2], &flows), Some(1));
        assert_eq!(main_upstream_child(&[1, 2, 3], &flows), Some(3));
        assert_eq!(main_upstream_child(&[], &flows), None);
    }
}
