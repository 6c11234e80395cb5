//! Manning's equation `V = (k/n) R^(2/3) S^(1/2)` (k = 1 SI, 1.49 US; Chow 1959,
//! Open-Channel Hydraulics, ch. 5; HEC-22 uses the same form): full and part-full circular
//! pipes, choosing the smallest pipe of a list that carries a flow, and the normal depth of a
//! trapezoidal swale found by bracketing and bisection. All in SI (metres, m^3/s, m/s).

use serde::{Deserialize, Serialize};

/// k of Manning's equation in SI units (m, m/s).
pub const MANNING_K_SI: f64 = 1.0;
/// k of Manning's equation in US customary units (ft, ft/s): 1.49, which is 0.3048^(-1/3) =
/// 1.4859 rounded.
pub const MANNING_K_US: f64 = 1.49;

/// Mean velocity by Manning's equation with the given k (1 for SI, 1.49 for US units).
pub fn manning_velocity(k: f64, n: f64, hydraulic_radius: f64, slope: f64) -> f64 {
    k / n * hydraulic_radius.powf(2.0 / 3.0) * slope.sqrt()
}

/// Flow and mean velocity of a section.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SectionFlow {
    /// Flow depth, m (the diameter for a full pipe).
    pub depth: f64,
    /// Wetted area, m^2.
    pub area: f64,
    /// Mean velocity, m/s.
    pub velocity: f64,
    /// Flow, m^3/s.
    pub flow: f64,
}

/// A circular pipe flowing full at grade `slope` (R = D/4): its capacity and velocity.
pub fn full_pipe(diameter: f64, n: f64, slope: f64) -> SectionFlow {
    let area = std::f64::consts::PI * diameter * diameter / 4.0;
    let velocity = manning_velocity(MANNING_K_SI, n, diameter / 4.0, slope);
    SectionFlow {
        depth: diameter,
        area,
        velocity,
        flow: velocity * area,
    }
}

/// Area and wetted perimeter of a circular pipe of `diameter` with a water surface subtending
/// the central angle `theta` (0 empty, 2 pi full).
fn circle_segment(diameter: f64, theta: f64) -> (f64, f64) {
    let area = diameter * diameter / 8.0 * (theta - theta.sin());
    (area, diameter * theta / 2.0)
}

/// Normal flow of `flow` (m^3/s) in a circular pipe. Below its full capacity, the lowest depth
/// carrying it (bisection on the central angle: part-full flow first rises to about 1.08 times
/// the full flow near 94 % depth, then falls back, so "carries at least `flow`" switches once
/// along the angle). Above capacity the pipe runs full under pressure: depth = diameter and
/// velocity = flow / full area.
pub fn pipe_at_flow(diameter: f64, n: f64, slope: f64, flow: f64) -> SectionFlow {
    let full = full_pipe(diameter, n, slope);
    if flow >= full.flow {
        return SectionFlow {
            velocity: flow / full.area,
            flow,
            ..full
        };
    }
    if flow <= 0.0 {
        return SectionFlow {
            depth: 0.0,
            area: 0.0,
            velocity: 0.0,
            flow: 0.0,
        };
    }
    let carried = |theta: f64| {
        let (area, perimeter) = circle_segment(diameter, theta);
        area * manning_velocity(MANNING_K_SI, n, area / perimeter, slope)
    };
    let (mut low, mut high) = (0.0, 2.0 * std::f64::consts::PI);
    for _ in 0..100 {
        let middle = 0.5 * (low + high);
        if carried(middle) >= flow {
            high = middle;
        } else {
            low = middle;
        }
    }
    let (area, _) = circle_segment(diameter, high);
    SectionFlow {
        depth: diameter / 2.0 * (1.0 - (high / 2.0).cos()),
        area,
        velocity: flow / area,
        flow,
    }
}

/// The pipe chosen from a list of diameters for a flow.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PipeChoice {
    /// Index of the diameter in the list.
    pub index: usize,
    /// Diameter, m.
    pub diameter: f64,
    /// Its full-flow capacity at the grade, m^3/s.
    pub capacity: f64,
    /// Whether its capacity carries the flow; false when even the largest is too small (the
    /// largest is then given, flagged, never hidden).
    pub large_enough: bool,
}

/// The smallest diameter of `diameters` (m, any order, none empty) whose full-flow capacity
/// at `slope` carries `flow`; the largest, marked not large enough, when none does. `None`
/// for an empty list.
pub fn smallest_pipe(diameters: &[f64], n: f64, slope: f64, flow: f64) -> Option<PipeChoice> {
    let choice = |index: usize| {
        let diameter = diameters[index];
        let capacity = full_pipe(diameter, n, slope).flow;
        PipeChoice {
            index,
            diameter,
            capacity,
            large_enough: capacity >= flow,
        }
    };
    let fitting = (0..diameters.len())
        .map(choice)
        .filter(|pipe| pipe.large_enough)
        .min_by(|a, b| a.diameter.total_cmp(&b.diameter));
    fitting.or_else(|| {
        (0..diameters.len())
            .max_by(|&a, &b| diameters[a].total_cmp(&diameters[b]))
            .map(choice)
    })
}

/// A trapezoidal swale (grassed open channel), in metres.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct SwaleShape {
    /// Bottom width, m (0 for a V-shaped swale).
    pub bottom_width: f64,
    /// Side slope z: z horizontal to 1 vertical.
    pub side_slope: f64,
    /// Deepest flow allowed, m; deeper normal flow is flagged.
    pub max_depth: f64,
}

impl SwaleShape {
    /// Wetted area and perimeter at `depth`.
    pub fn section(&self, depth: f64) -> (f64, f64) {
        let z = self.side_slope;
        let area = (self.bottom_width + z * depth) * depth;
        let perimeter = self.bottom_width + 2.0 * depth * (1.0 + z * z).sqrt();
        (area, perimeter)
    }

    /// Normal flow at `depth`.
    pub fn flow_at_depth(&self, depth: f64, n: f64, slope: f64) -> SectionFlow {
        let (area, perimeter) = self.section(depth);
        let velocity = if area > 0.0 {
            manning_velocity(MANNING_K_SI, n, area / perimeter, slope)
        } else {
            0.0
        };
        SectionFlow {
            depth,
            area,
            velocity,
            flow: velocity * area,
        }
    }

    /// Normal flow of `flow` m^3/s: the depth where Manning's flow equals it, found by
    /// bracketing (doubling an upper depth until it carries the flow) and then bisection; the
    /// flow grows with depth in a trapezoid, so the bracket always holds the one answer.
    pub fn normal_flow(&self, flow: f64, n: f64, slope: f64) -> SectionFlow {
        if flow <= 0.0 {
            return self.flow_at_depth(0.0, n, slope);
        }
        let mut high = self.max_depth.max(0.01);
        let mut doublings = 0;
        while self.flow_at_depth(high, n, slope).flow < flow && doublings < 200 {
            high *= 2.0;
            doublings += 1;
        }
        let mut low = 0.0;
        for _ in 0..200 {
            let middle = 0.5 * (low + high);
            if self.flow_at_depth(middle, n, slope).flow >= flow {
                high = middle;
            } else {
                low = middle;
            }
            if high - low <= 1e-12 * high {
                break;
            }
        }
        SectionFlow {
            flow,
            ..self.flow_at_depth(high, n, slope)
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::drainage::units::UnitSystem;

    const FOOT: f64 = 0.3048;

    #[test]
    fn us_factor_is_the_cube_root_of_the_foot() {
        // k_US = (1 m / 1 ft)^(1/3) = 0.3048^(-1/3) = 1.4859 (Chow 1959, ch. 5, from memory: the
        // 1.49 of US handbooks is this rounded).
        let exact = FOOT.powf(-1.0 / 3.0);
        assert!((exact - 1.4859).abs() < 1e-4, "{exact}");
        assert!((MANNING_K_US - exact).abs() / exact < 0.003);
        // The SI form with k = 1, converted to ft/s, equals the US form with the exact k.
        let si = manning_velocity(MANNING_K_SI, 0.013, 0.5 * FOOT, 0.004) / FOOT;
        let us = manning_velocity(exact, 0.013, 0.5, 0.004);
        assert!((si - us).abs() < 1e-12, "{si} {us}");
    }

    #[test]
    fn full_eight_inch_pipe_matches_a_published_example() {
        // civiltoolbox.com/manningpipe worked output: D = 0.667 ft (8 in), n = 0.013,
        // S = 0.005, k = 1.49: A = 0.349 ft^2, R = 0.167 ft, Q = 0.854 cfs, V = 2.448 ft/s.
        let (diameter, n, slope) = (8.0 / 12.0, 0.013, 0.005);
        let area = std::f64::consts::PI * diameter * diameter / 4.0;
        let v = manning_velocity(MANNING_K_US, n, diameter / 4.0, slope);
        assert!((area - 0.349).abs() < 0.001, "{area}");
        assert!((v - 2.448).abs() / 2.448 < 0.005, "{v}");
        assert!((v * area - 0.854).abs() / 0.854 < 0.005, "{}", v * area);
        // The SI full-pipe function agrees after conversion (k = 1.4859 against 1.49: 0.3 %).
        let si = full_pipe(diameter * FOOT, n, slope);
        let cfs = UnitSystem::Us.flow_from_si(si.flow);
        assert!((cfs - 0.854).abs() / 0.854 < 0.006, "{cfs}");
    }

    #[test]
    fn full_24_inch_concrete_pipe_matches_a_published_example() {
        // pe-calc.com "Manning's equation for 24-inch concrete pipe" (citing Chow 1959):
        // D = 2.0 ft, n = 0.012, S = 0.003, k = 1.486: Q_full = 13.4 cfs.
        let si = full_pipe(2.0 * FOOT, 0.012, 0.003);
        let cfs = UnitSystem::Us.flow_from_si(si.flow);
        assert!((cfs - 13.4).abs() < 0.05, "{cfs}");
    }

    #[test]
    fn half_full_pipe_runs_at_the_full_velocity_with_half_the_flow() {
        // Circle geometry: at half depth A = pi D^2 / 8 and P = pi D / 2, so R = D/4 as when
        // full: V_half = V_full and Q_half = Q_full / 2.
        let full = full_pipe(0.6, 0.013, 0.01);
        let half = pipe_at_flow(0.6, 0.013, 0.01, full.flow / 2.0);
        assert!((half.depth - 0.3).abs() < 1e-9, "{}", half.depth);
        assert!((half.velocity - full.velocity).abs() < 1e-9);
        // Above capacity the pipe is surcharged at full depth.
        let over = pipe_at_flow(0.6, 0.013, 0.01, full.flow * 2.0);
        assert_eq!(over.depth, 0.6);
        assert!((over.velocity - 2.0 * full.velocity).abs() < 1e-9);
    }

    #[test]
    fn smallest_pipe_is_chosen_and_too_small_lists_are_flagged() {
        // Capacities at n = 0.013, S = 0.01 (hand arithmetic, Q = (1/n) (pi D^2/4) (D/4)^(2/3)
        // S^(1/2), 1/n = 76.923):
        // D = 0.300: 76.923 * 0.070686 * 0.17784 (= 0.075^(2/3)) * 0.1 = 0.09670 m^3/s;
        // D = 0.375: 76.923 * 0.110447 * 0.20637 * 0.1 = 0.17533 m^3/s;
        // D = 0.450: 76.923 * 0.159043 * 0.23304 * 0.1 = 0.28511 m^3/s.
        let list = [0.45, 0.3, 0.375];
        let pipe = smallest_pipe(&list, 0.013, 0.01, 0.15).unwrap();
        assert_eq!(pipe.diameter, 0.375);
        assert!(pipe.large_enough);
        assert!(
            (pipe.capacity - 0.17533).abs() < 0.00002,
            "{}",
            pipe.capacity
        );
        let small = smallest_pipe(&list, 0.013, 0.01, 0.09).unwrap();
        assert_eq!(small.diameter, 0.3);
        assert!(
            (small.capacity - 0.09670).abs() < 0.00002,
            "{}",
            small.capacity
        );
        let too_big = smallest_pipe(&list, 0.013, 0.01, 0.3).unwrap();
        assert_eq!((too_big.diameter, too_big.large_enough), (0.45, false));
        assert!(
            (too_big.capacity - 0.28511).abs() < 0.00002,
            "{}",
            too_big.capacity
        );
        assert!(smallest_pipe(&[], 0.013, 0.01, 0.1).is_none());
    }

    #[test]
    fn trapezoid_normal_depth_matches_chow() {
        // Chow 1959, Open-Channel Hydraulics, Example 6-2 (from memory): b = 20 ft, z = 2,
        // S = 0.0016, n = 0.025, Q = 400 cfs: normal depth y_n = 3.36 ft.
        let swale = SwaleShape {
            bottom_width: 20.0 * FOOT,
            side_slope: 2.0,
            max_depth: 1.0,
        };
        let flow = swale.normal_flow(UnitSystem::Us.flow_to_si(400.0), 0.025, 0.0016);
        let depth_ft = flow.depth / FOOT;
        assert!((depth_ft - 3.36).abs() < 0.02, "{depth_ft}");
        // The bracket had to grow past the 1 m start; the flow closes.
        let check = swale.flow_at_depth(flow.depth, 0.025, 0.0016).flow;
        assert!((check / UnitSystem::Us.flow_to_si(400.0) - 1.0).abs() < 1e-9);
    }
}
