//! `CostModel`: the cost of joining a cell to an attachment point, term by term. Geometry comes
//! in lattice units (lengths in cells, flows in cell weights); each term is turned into units of
//! the given (unrefined) cell, so that a run with `refine` = r prices the same physical join as
//! a run with `refine` = 1 (at r = 1 every factor is exactly 1 and the costs keep their bits):
//! - length `w_len * L`: a length, times `1 / r`;
//! - supply distance `w_path * (dist + supply)`: a length, times `1 / r`;
//! - uphill `w_grade * 100 * rise`: a rise, a length, times `1 / r`;
//! - transport `w_flow * D`, `D = sum L ((q + a)^alpha - q^alpha)` along the path to the root
//!   with `a` one cell's flow: lengths scale by `1 / r` and flows by `1 / r^2`, and the sum is
//!   taken per unit of the new cell's area (one cell of the given lattice is `a = 1`), so `D`
//!   is multiplied by `r^-1 r^(-2 alpha) r^2 = r^(1 - 2 alpha)` (1 at `alpha` = 1/2); it
//!   approaches the lattice-free `sum L alpha q^(alpha - 1)` as cells shrink;
//! - junction angle `w_turn * turn`: an angle, dimensionless, the same at every cell size.
//!   It is a price per join, not per length: a vein of given length is built from r times more
//!   joins, but a straight run pays nothing and a branching point pays once, so the term does
//!   not grow with refinement as long as veins do not zigzag.

use crate::params::Params;

/// Everything about an attachment point that the cost needs.
#[derive(Clone, Copy, Debug)]
pub(crate) struct Anchor {
    /// Position in cells.
    pub x: f64,
    /// Position in cells.
    pub y: f64,
    /// Unit downstream direction at the point (towards its parent; a root's outflow).
    pub down_x: f64,
    /// Unit downstream direction at the point.
    pub down_y: f64,
    /// Supply distance from the point to its root (anisotropic, cells).
    pub dist: f64,
    /// Marginal transport cost `D_alpha` of carrying one more cell from the point to the root.
    pub transport: f64,
    /// Unit outflow axis of the point's root (for `elongation`).
    pub axis_x: f64,
    /// Unit outflow axis of the point's root.
    pub axis_y: f64,
    /// Whether the point is a vein tip (no upstream segment yet): extending a tip always
    /// prefers going straight on.
    pub is_tip: bool,
    /// Ground elevation at the point from the spot levels, in the length unit (0 without).
    pub ground: f64,
}

/// Weights and constants of the cost formula.
#[derive(Clone, Copy, Debug)]
pub(crate) struct CostModel {
    pub w_len: f64,
    pub w_turn: f64,
    pub w_flow: f64,
    pub w_path: f64,
    pub w_grade: f64,
    /// Inverse of `elongation`: scale of lengths whose flow runs along the outflow axis.
    pub along_scale: f64,
    /// `rear_cost`: scale of lengths whose flow runs against the outflow axis.
    pub rear_scale: f64,
    /// cos and sin of the preferred branching angle, when one is set.
    pub preferred: Option<(f64, f64)>,
    pub grade_x: f64,
    pub grade_y: f64,
    /// With spot levels: `1 / cell_size`, turning a rise in the length unit into a rise in
    /// cells (the unit of `grade_x * vx`); none without levels (the tilted plane counts).
    pub levels_scale: Option<f64>,
    /// Coarse-cell lengths per lattice length: `1 / refine` (exactly 1 without refinement).
    pub length_unit: f64,
    /// Factor of the transport term: `refine^(1 - 2 alpha)` (exactly 1 without refinement).
    pub transport_unit: f64,
    /// Whether only the length term counts (every other weight is not positive), so the cost
    /// of an anchor needs nothing but its position (`length_cost`).
    pub length_only: bool,
}

impl CostModel {
    /// The model of `params` (on the lattice growth runs on) refined by `refine` from the given
    /// lattice (1 when not refined).
    pub fn new(params: &Params, refine: u32) -> CostModel {
        let r = f64::from(refine.max(1));
        let preferred = params.costs.branch_angle.map(|degrees| {
            let radians = degrees.to_radians();
            (libm::cos(radians), libm::sin(radians))
        });
        CostModel {
            w_len: params.costs.w_len,
            w_turn: params.costs.w_turn,
            w_flow: params.costs.w_flow,
            w_path: params.costs.w_path,
            w_grade: params.costs.w_grade,
            along_scale: 1.0 / params.costs.elongation,
            rear_scale: params.costs.rear_cost,
            preferred,
            grade_x: params.domain.grade_x,
            grade_y: params.domain.grade_y,
            levels_scale: (!params.domain.levels.is_empty()).then(|| 1.0 / params.domain.cell_size),
            length_unit: 1.0 / r,
            transport_unit: libm::pow(r, 1.0 - 2.0 * params.costs.alpha),
            // Validated weights are finite and not negative, so `<= 0` is "the term is off".
            length_only: params.costs.w_turn <= 0.0
                && params.costs.w_flow <= 0.0
                && params.costs.w_path <= 0.0
                && params.costs.w_grade <= 0.0,
        }
    }

    /// Cost of joining the cell at `(x, y)`, whose ground is `ground` (from the spot levels; 0
    /// without), to `anchor`:
    /// `w_len * len + w_turn * turn + w_flow * D + w_path * (dist + len_aniso) + w_grade * uphill`.
    pub fn cost(&self, x: f64, y: f64, ground: f64, anchor: &Anchor) -> f64 {
        let vx = anchor.x - x;
        let vy = anchor.y - y;
        let length = (vx * vx + vy * vy).sqrt();
        self.cost_at_length(vx, vy, length, ground, anchor)
    }

    /// `cost` of a cell from which the anchor lies at `(vx, vy)` = `(anchor.x - x, anchor.y -
    /// y)`, `length` = `sqrt(vx^2 + vy^2)` apart, as computed by the caller (the same bits).
    #[inline]
    pub fn cost_at_length(
        &self,
        vx: f64,
        vy: f64,
        length: f64,
        ground: f64,
        anchor: &Anchor,
    ) -> f64 {
        let mut cost = self.w_len * (length * self.length_unit);
        if self.length_only {
            return cost;
        }
        if self.w_turn > 0.0 && length > 0.0 {
            cost += self.w_turn * self.turn(vx / length, vy / length, anchor);
        }
        if self.w_flow > 0.0 {
            cost += self.w_flow * (anchor.transport * self.transport_unit);
        }
        if self.w_path > 0.0 {
            // Without elongation or rear cost the supply length is `length` itself (the same
            // expression), so it is not taken twice.
            let supply = if self.along_scale == 1.0 && self.rear_scale == 1.0 {
                length
            } else {
                self.supply_length(vx, vy, anchor.axis_x, anchor.axis_y)
            };
            cost += self.w_path * ((anchor.dist + supply) * self.length_unit);
        }
        if self.w_grade > 0.0 {
            // Rise of the anchor over the cell, in cells, counted in percent of one cell
            // length: from the interpolated ground with spot levels (z(to) - z(from)), else
            // along the tilted plane.
            let rise = match self.levels_scale {
                Some(scale) => (anchor.ground - ground) * scale,
                None => self.grade_x * vx + self.grade_y * vy,
            };
            if rise > 0.0 {
                cost += self.w_grade * 100.0 * (rise * self.length_unit);
            }
        }
        cost
    }

    /// Whether `floor` bounds `cost` from below: every term left out of it is never
    /// negative. A preferred branching angle's turn, `1 - cos(phi - theta0)`, may round to a
    /// hair below 0, so it has no floor.
    pub fn has_floor(&self) -> bool {
        self.preferred.is_none()
    }

    /// The parts of `cost` that do not depend on the cell, for `CostFloor::at`.
    pub fn floor(&self, anchor: &Anchor) -> CostFloor {
        debug_assert!(self.has_floor());
        // A weight that is off is exactly 0 (validated weights are finite and not negative),
        // so its term adds exactly 0 and the sum keeps the bits of the sum without it.
        let flow = if self.length_only || self.w_flow <= 0.0 {
            0.0
        } else {
            self.w_flow * (anchor.transport * self.transport_unit)
        };
        let path = !self.length_only && self.w_path > 0.0;
        CostFloor {
            w_len: self.w_len,
            w_path: if path { self.w_path } else { 0.0 },
            length_unit: self.length_unit,
            flow,
            dist: anchor.dist,
            // With elongation or rear cost the supply length may be shorter than the length.
            supply: if self.along_scale == 1.0 && self.rear_scale == 1.0 {
                1.0
            } else {
                0.0
            },
        }
    }

    /// The cost of joining the cell at `(x, y)` to an anchor at `(anchor_x, anchor_y)` when
    /// `length_only`: the very bits `cost` gives then, without gathering the whole anchor.
    #[inline]
    pub fn length_cost(&self, x: f64, y: f64, anchor_x: f64, anchor_y: f64) -> f64 {
        debug_assert!(self.length_only);
        let vx = anchor_x - x;
        let vy = anchor_y - y;
        self.w_len * ((vx * vx + vy * vy).sqrt() * self.length_unit)
    }

    /// Junction-angle penalty for flow leaving the cell along unit `(fx, fy)`:
    /// `1 - cos(phi)`, or with a preferred angle `theta0` at a non-tip, `1 - cos(phi - theta0)`.
    pub fn turn(&self, fx: f64, fy: f64, anchor: &Anchor) -> f64 {
        let cos_phi = (fx * anchor.down_x + fy * anchor.down_y).clamp(-1.0, 1.0);
        match self.preferred {
            Some((cos_pref, sin_pref)) if !anchor.is_tip => {
                let sin_phi = (1.0 - cos_phi * cos_phi).max(0.0).sqrt();
                1.0 - (cos_phi * cos_pref + sin_phi * sin_pref)
            }
            _ => 1.0 - cos_phi,
        }
    }

    /// Length of the flow vector `(vx, vy)` with its component along the root's outflow axis
    /// scaled by `1 / elongation` (flow heading out through the root) or by `rear_cost` (flow
    /// heading back against the outflow, i.e. growth behind the root).
    pub fn supply_length(&self, vx: f64, vy: f64, axis_x: f64, axis_y: f64) -> f64 {
        if self.along_scale == 1.0 && self.rear_scale == 1.0 {
            return (vx * vx + vy * vy).sqrt();
        }
        let mut along = vx * axis_x + vy * axis_y;
        along *= if along >= 0.0 {
            self.along_scale
        } else {
            self.rear_scale
        };
        let across = vx * axis_y - vy * axis_x;
        (along * along + across * across).sqrt()
    }
}

/// A floor of the cost of joining one anchor, from every cell at least a given length away
/// (`CostModel::floor`, when `has_floor`).
#[derive(Clone, Copy, Debug)]
pub(crate) struct CostFloor {
    w_len: f64,
    w_path: f64,
    length_unit: f64,
    /// The transport term (0 when off).
    flow: f64,
    /// The anchor's supply distance.
    dist: f64,
    /// 1 when the supply length is the length, else 0.
    supply: f64,
}

impl CostFloor {
    /// A cost no greater than `CostModel::cost` for a cell whose computed length to the
    /// anchor is at least `length` (cells): the same terms summed in the same order, with the
    /// turn and uphill terms (never negative) left out, `length` for the length and the supply
    /// length, and terms that are off adding exactly 0. Rounding to nearest is monotone, so
    /// every sum and product of smaller non-negative operands is no greater, and so is the
    /// total.
    #[inline]
    pub fn at(&self, length: f64) -> f64 {
        let cost = self.w_len * (length * self.length_unit) + self.flow;
        cost + self.w_path * ((self.dist + length * self.supply) * self.length_unit)
    }
}

/// Marginal branched-transport cost of adding flow `extra` to a segment carrying `flow`:
/// `(flow + extra)^alpha - flow^alpha` (Gilbert 1967; Xia 2003).
pub(crate) fn marginal(flow: f64, extra: f64, alpha: f64) -> f64 {
    crate::fast_libm::pow(flow + extra, alpha) - crate::fast_libm::pow(flow, alpha)
}

/// `marginal(flow, extra, alpha)` for fixed `extra` and `alpha`, with the last results
/// remembered by the exact bits of `flow`: a refresh prices every node, and most carry one of a
/// few flows (every tip carries one cell), so most are found, not computed. The results are
/// the very bits `marginal` gives.
pub(crate) struct MarginalMemo {
    extra: f64,
    alpha: f64,
    /// `(flow bits, marginal)` per slot, flow bits `u64::MAX` (a NaN, never a flow) when empty.
    slots: Vec<(u64, f64)>,
}

/// Slots of `MarginalMemo`, a power of two: 4,096 slots (64 KiB) stay in the processor cache.
const MARGINAL_MEMO_BITS: u32 = 12;

impl MarginalMemo {
    pub fn new(extra: f64, alpha: f64) -> MarginalMemo {
        MarginalMemo {
            extra,
            alpha,
            slots: vec![(u64::MAX, 0.0); 1 << MARGINAL_MEMO_BITS],
        }
    }

    #[inline]
    pub fn marginal(&mut self, flow: f64) -> f64 {
        let bits = flow.to_bits();
        // Fibonacci hashing (Knuth, TAOCP vol. 3, 6.4), as for the widths in `segments`.
        let slot = (bits.wrapping_mul(0x9e37_79b9_7f4a_7c15) >> (64 - MARGINAL_MEMO_BITS)) as usize;
        match self.slots.get_mut(slot) {
            Some((key, value)) if *key == bits => *value,
            Some(entry) => {
                let value = marginal(flow, self.extra, self.alpha);
                *entry = (bits, value);
                value
            }
            None => marginal(flow, self.extra, self.alpha),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::params::CostWeights;

    fn anchor(down_x: f64, down_y: f64) -> Anchor {
        Anchor {
            x: 0.0,
            y: 0.0,
            down_x,
            down_y,
            dist: 0.0,
            transport: 0.0,
            axis_x: 0.0,
            axis_y: 1.0,
            is_tip: false,
            ground: 0.0,
        }
    }

    /// With spot levels the uphill term reads the ground: joining a cell to an anchor 0.1 m
    /// higher on 0.5 m cells rises 0.2 cells, costing `w_grade * 100 * 0.2 = 20`; downhill
    /// costs nothing (the uphill term of `CostModel::cost`, `w_grade * 100 * rise`, only for a
    /// positive rise).
    #[test]
    fn uphill_on_spot_levels_costs_and_downhill_does_not() {
        let mut params = Params::default();
        params.domain.cell_size = 0.5;
        params.domain.levels = vec![[0.0, 0.0, 1.0], [9.0, 9.0, 2.0], [5.0, 0.0, 1.5]];
        params.costs = CostWeights {
            w_len: 0.0,
            w_turn: 0.0,
            w_flow: 0.0,
            w_path: 0.0,
            w_grade: 1.0,
            ..CostWeights::default()
        };
        let model = CostModel::new(&params, 1);
        let mut higher = anchor(0.0, 1.0);
        higher.ground = 10.1;
        assert!((model.cost(1.0, 0.0, 10.0, &higher) - 20.0).abs() < 1e-9);
        higher.ground = 9.9;
        assert_eq!(model.cost(1.0, 0.0, 10.0, &higher), 0.0);
    }

    #[test]
    fn turn_is_zero_straight_on_and_one_at_right_angles() {
        let model = CostModel::new(&Params::default(), 1);
        // Flow from the cell to the anchor goes +y, the anchor drains +y: straight on.
        assert_eq!(model.turn(0.0, 1.0, &anchor(0.0, 1.0)), 0.0);
        assert!((model.turn(1.0, 0.0, &anchor(0.0, 1.0)) - 1.0).abs() < 1e-15);
        assert!((model.turn(0.0, -1.0, &anchor(0.0, 1.0)) - 2.0).abs() < 1e-15);
    }

    #[test]
    fn preferred_angle_costs_nothing_at_that_angle() {
        let params = Params {
            costs: CostWeights {
                branch_angle: Some(60.0),
                ..CostWeights::default()
            },
            ..Params::default()
        };
        let model = CostModel::new(&params, 1);
        let radians = 60f64.to_radians();
        let (fx, fy) = (radians.sin(), radians.cos());
        assert!(model.turn(fx, fy, &anchor(0.0, 1.0)).abs() < 1e-12);
    }

    /// The memo gives the very bits of `marginal`, for repeated flows, flows sharing a slot
    /// and more flows than slots.
    #[test]
    fn remembered_marginals_equal_computed_ones() {
        for alpha in [0.5, 0.75, 1.0] {
            let mut memo = MarginalMemo::new(0.7, alpha);
            for step in 0..20_000u32 {
                let flow = f64::from(step % 6_000) * 0.7;
                assert_eq!(
                    memo.marginal(flow).to_bits(),
                    marginal(flow, 0.7, alpha).to_bits()
                );
            }
        }
    }

    #[test]
    fn marginal_cost_limits() {
        // alpha = 1: every cell pays its own way, marginal = extra.
        assert_eq!(marginal(7.0, 1.0, 1.0), 1.0);
        // alpha = 0: joining an existing flow is free.
        assert_eq!(marginal(7.0, 1.0, 0.0), 0.0);
        // alpha = 1/2: sqrt(4) - sqrt(3).
        assert!((marginal(3.0, 1.0, 0.5) - (2.0 - 3f64.sqrt())).abs() < 1e-15);
    }

    #[test]
    fn elongation_shortens_lengths_along_the_axis() {
        let params = Params {
            costs: CostWeights {
                elongation: 2.0,
                ..CostWeights::default()
            },
            ..Params::default()
        };
        let model = CostModel::new(&params, 1);
        assert!((model.supply_length(0.0, 4.0, 0.0, 1.0) - 2.0).abs() < 1e-15);
        assert!((model.supply_length(4.0, 0.0, 0.0, 1.0) - 4.0).abs() < 1e-15);
    }

    #[test]
    fn rear_cost_lengthens_flow_against_the_outflow() {
        let params = Params {
            costs: CostWeights {
                rear_cost: 3.0,
                ..CostWeights::default()
            },
            ..Params::default()
        };
        let model = CostModel::new(&params, 1);
        assert!((model.supply_length(0.0, -2.0, 0.0, 1.0) - 6.0).abs() < 1e-15);
        assert!((model.supply_length(0.0, 2.0, 0.0, 1.0) - 2.0).abs() < 1e-15);
    }
}
