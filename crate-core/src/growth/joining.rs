//! The joining rules: weights for weighted and uniform joining, rescaling, and picking the next
//! cell (with the re-check of stale attachments).

use super::*;

/// How a frontier cell's cost turns into its joining weight: the joining rule, the threshold
/// and, for weighted joining, the temperature and the reference cost the weights are taken
/// against (`exp((reference - cost) / temperature)`).
#[derive(Clone, Copy)]
pub(super) struct WeightRule {
    joining: Joining,
    threshold: Option<f64>,
    temperature: f64,
    reference: f64,
}

impl WeightRule {
    /// Joining weight of a cost (0 when not eligible).
    #[inline]
    pub fn weight(&self, cost: f64) -> f64 {
        if let Some(threshold) = self.threshold {
            if cost >= threshold {
                return 0.0;
            }
        }
        match self.joining {
            Joining::Cheapest => 0.0,
            Joining::Uniform => 1.0,
            Joining::Weighted => {
                let exponent = (self.reference - cost) / self.temperature;
                libm::exp(exponent.min(WEIGHT_CEILING_EXPONENT))
            }
        }
    }
}

impl Growth {
    /// The weight rule as it stands (the frontier weighs its cells by it when it is read).
    fn weight_rule(&self) -> WeightRule {
        WeightRule {
            joining: self.refined.run.joining,
            threshold: self.refined.run.threshold,
            temperature: self.refined.run.temperature,
            reference: self.weight_reference,
        }
    }

    /// Notes a cost a frontier cell is about to take (inserted or changed): the first eligible
    /// one (below the threshold, if any) becomes the weights' reference cost.
    #[inline]
    pub(super) fn note_cost(&mut self, cost: f64) {
        if self.weight_reference.is_nan()
            && !self
                .refined
                .run
                .threshold
                .is_some_and(|threshold| cost >= threshold)
        {
            self.weight_reference = cost;
        }
    }

    /// Rescales weighted-joining weights against the cheapest current cost.
    pub(super) fn reweigh(&mut self) {
        self.weight_reference = match self.frontier.cheapest() {
            Some((_, cost)) => cost,
            None => return,
        };
        let rule = self.weight_rule();
        self.frontier.reweigh(|cost| rule.weight(cost));
    }

    /// Whether the cheapest cost lies so far below the weights' reference cost that the
    /// weights must be rescaled. A floor of the cheapest cost that does not lie so far below
    /// settles it without the cheapest slot: subtracting a greater number and dividing by the
    /// same positive temperature never gives more (rounding is monotone).
    fn weights_drifted(&mut self) -> bool {
        let temperature = self.refined.run.temperature;
        let far_below = |cheapest: f64, reference: f64| {
            (reference - cheapest) / temperature > WEIGHT_CEILING_EXPONENT * 0.5
        };
        if !far_below(self.frontier.cost_floor(), self.weight_reference) {
            return false;
        }
        match self.frontier.cheapest() {
            Some((_, cost)) => far_below(cost, self.weight_reference),
            None => false,
        }
    }

    /// Picks the next cell by the joining rule, re-checking stale attachments.
    pub(super) fn pick(&mut self) -> Result<(u32, Attachment), StopReason> {
        loop {
            if self.frontier.len() == 0 {
                return Err(StopReason::Full);
            }
            let joining = self.refined.run.joining;
            let threshold = self.refined.run.threshold;
            // The cheapest slot is needed by the cheapest rule and by a threshold; weighted
            // joining needs only to know that weights have not drifted far from the cheapest
            // cost, which a floor of it tells nearly always.
            let cheapest = if joining == Joining::Cheapest || threshold.is_some() {
                self.frontier.cheapest()
            } else {
                None
            };
            if let (Some((_, cheapest_cost)), Some(threshold)) = (cheapest, threshold) {
                if cheapest_cost >= threshold {
                    return Err(StopReason::Threshold);
                }
            }
            let slot_index = match (joining, cheapest) {
                (Joining::Cheapest, Some((cheapest_slot, _))) => cheapest_slot,
                _ => {
                    let mut rule = self.weight_rule();
                    let mut total = self.frontier.total_weight(|cost| rule.weight(cost));
                    let drifted = joining == Joining::Weighted && self.weights_drifted();
                    if total <= WEIGHT_FLOOR || !total.is_finite() || drifted {
                        self.reweigh();
                        rule = self.weight_rule();
                        total = self.frontier.total_weight(|cost| rule.weight(cost));
                    }
                    if total <= 0.0 {
                        return Err(StopReason::Threshold);
                    }
                    let target = unit_interval(&mut self.random) * total;
                    self.frontier
                        .pick_by_weight(target, |cost| rule.weight(cost))
                }
            };
            let slot = self.frontier.slots[slot_index as usize];
            if !self.recheck {
                return Ok((slot_index, slot.best));
            }
            let mut found = if self.stale_costs {
                self.best_from_scratch(slot.cell as usize)
            } else {
                Some((self.frontier.costs[slot_index as usize], slot.best))
            };
            if self.refined.run.planar {
                let cell = slot.cell as usize;
                let (cx, cy) = self.lattice.position(cell);
                if found.is_some_and(|(_, best)| self.crosses_network(cx, cy, best)) {
                    found = self.best_plane_attachment(cell);
                }
            }
            let Some((cost, attachment)) = found else {
                if self.refined.run.planar {
                    // Every attachment within reach would cross a segment: the cell leaves the
                    // frontier until a new node within reach offers it one again.
                    self.frontier.remove(slot_index);
                    self.lattice.state[slot.cell as usize] = FREE;
                    continue;
                }
                return Ok((slot_index, slot.best));
            };
            let still_valid = cost <= self.frontier.costs[slot_index as usize] + 1e-12;
            if still_valid
                && !self
                    .refined
                    .run
                    .threshold
                    .is_some_and(|threshold| cost >= threshold)
            {
                return Ok((slot_index, attachment));
            }
            self.note_cost(cost);
            self.frontier.update(slot_index, cost, attachment);
        }
    }
}

/// A uniform draw in [0, 1) from the top 53 bits of one 64-bit output.
fn unit_interval(random: &mut ChaCha8Rng) -> f64 {
    (random.next_u64() >> 11) as f64 * (1.0 / (1u64 << 53) as f64)
}
