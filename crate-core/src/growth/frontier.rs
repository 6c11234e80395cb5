//! `Frontier`: the allowed empty cells within reach of the network, each with its best
//! attachment, kept in a segment tree that answers "cheapest slot" and "slot drawn by weight"
//! in O(log n) and is rebuilt (never patched by subtraction) so sums do not drift.

/// No attachment yet / not a node.
pub(crate) const NONE: u32 = u32::MAX;

/// Where a frontier cell would attach.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct Attachment {
    /// Node attached to, or the upstream node of the segment attached to.
    pub target: u32,
    /// The parent of `target` when this was computed (segment attachments only, else `NONE`).
    pub segment_parent: u32,
    /// Position along the segment from `target` (0) to its parent (1); 0 for a node.
    pub along: f64,
}

/// One frontier cell.
#[derive(Clone, Copy, Debug)]
pub(crate) struct Slot {
    /// Row-major cell index.
    pub cell: u32,
    /// Cost of the best attachment.
    pub cost: f64,
    /// The best attachment.
    pub best: Attachment,
}

/// Frontier slots with a min tree (cheapest first) and a sum tree (random joining).
pub(crate) struct Frontier {
    capacity: usize,
    min_cost: Vec<f64>,
    min_slot: Vec<u32>,
    weight_sum: Vec<f64>,
    /// Slots by index; a free slot has `cell == NONE`.
    pub slots: Vec<Slot>,
    free: Vec<u32>,
    live: usize,
}

impl Frontier {
    pub fn new() -> Frontier {
        let mut frontier = Frontier {
            capacity: 0,
            min_cost: Vec::new(),
            min_slot: Vec::new(),
            weight_sum: Vec::new(),
            slots: Vec::new(),
            free: Vec::new(),
            live: 0,
        };
        frontier.resize(64);
        frontier
    }

    /// Number of frontier cells.
    pub fn len(&self) -> usize {
        self.live
    }

    /// Adds a cell; returns its slot.
    pub fn insert(&mut self, slot: Slot, weight: f64) -> u32 {
        let index = match self.free.pop() {
            Some(index) => index,
            None => {
                if self.slots.len() == self.capacity {
                    self.resize(self.capacity * 2);
                }
                self.slots.push(slot);
                (self.slots.len() - 1) as u32
            }
        };
        self.slots[index as usize] = slot;
        self.live += 1;
        self.set_leaf(index, slot.cost, weight);
        index
    }

    /// Changes a slot's attachment, cost and weight.
    pub fn update(&mut self, index: u32, cost: f64, best: Attachment, weight: f64) {
        let slot = &mut self.slots[index as usize];
        slot.cost = cost;
        slot.best = best;
        self.set_leaf(index, cost, weight);
    }

    /// Removes a slot.
    pub fn remove(&mut self, index: u32) {
        self.slots[index as usize].cell = NONE;
        self.free.push(index);
        self.live -= 1;
        self.set_leaf(index, f64::INFINITY, 0.0);
    }

    /// Cheapest live slot and its cost (ties: lowest slot index).
    pub fn cheapest(&self) -> Option<(u32, f64)> {
        if self.live == 0 {
            return None;
        }
        Some((self.min_slot[1], self.min_cost[1]))
    }

    /// Sum of all weights.
    pub fn total_weight(&self) -> f64 {
        self.weight_sum[1]
    }

    /// The slot where the cumulative weight passes `target` (0 <= target < total).
    /// Never lands on a zero-weight slot while the total is positive.
    pub fn pick_by_weight(&self, mut target: f64) -> u32 {
        let mut node = 1;
        while node < self.capacity {
            let left = 2 * node;
            let right = left + 1;
            let left_sum = self.weight_sum[left];
            if left_sum > 0.0 && (target < left_sum || self.weight_sum[right] <= 0.0) {
                node = left;
            } else {
                target -= left_sum;
                node = right;
            }
        }
        (node - self.capacity) as u32
    }

    /// Sets every leaf's weight from `weight_of(slot)` and rebuilds the trees.
    pub fn reweigh(&mut self, mut weight_of: impl FnMut(&Slot) -> f64) {
        for index in 0..self.slots.len() {
            let slot = self.slots[index];
            let leaf = self.capacity + index;
            if slot.cell == NONE {
                self.min_cost[leaf] = f64::INFINITY;
                self.weight_sum[leaf] = 0.0;
            } else {
                self.min_cost[leaf] = slot.cost;
                self.weight_sum[leaf] = weight_of(&slot);
            }
        }
        self.rebuild_internal();
    }

    /// Sets one leaf and recombines its ancestors, stopping at the first ancestor whose
    /// cheapest cost, cheapest slot and weight sum all come out as they were: every ancestor
    /// above it depends only on values that did not change, so the trees are exactly what a
    /// walk to the root would give (for the cheapest rule, whose weights are all 0, most walks
    /// stop after a few levels).
    fn set_leaf(&mut self, index: u32, cost: f64, weight: f64) {
        let mut node = self.capacity + index as usize;
        self.min_cost[node] = cost;
        self.min_slot[node] = index;
        self.weight_sum[node] = weight;
        while node > 1 {
            node /= 2;
            let before = (
                self.min_cost[node].to_bits(),
                self.min_slot[node],
                self.weight_sum[node].to_bits(),
            );
            self.combine(node);
            let after = (
                self.min_cost[node].to_bits(),
                self.min_slot[node],
                self.weight_sum[node].to_bits(),
            );
            if before == after {
                break;
            }
        }
    }

    fn combine(&mut self, node: usize) {
        let left = 2 * node;
        let right = left + 1;
        let pick = if self.min_cost[right] < self.min_cost[left] {
            right
        } else {
            left
        };
        self.min_cost[node] = self.min_cost[pick];
        self.min_slot[node] = self.min_slot[pick];
        self.weight_sum[node] = self.weight_sum[left] + self.weight_sum[right];
    }

    fn rebuild_internal(&mut self) {
        for node in (1..self.capacity).rev() {
            self.combine(node);
        }
    }

    fn resize(&mut self, capacity: usize) {
        let old_capacity = self.capacity;
        let mut min_cost = vec![f64::INFINITY; 2 * capacity];
        let mut min_slot = vec![NONE; 2 * capacity];
        let mut weight_sum = vec![0.0; 2 * capacity];
        for index in 0..old_capacity {
            min_cost[capacity + index] = self.min_cost[old_capacity + index];
            min_slot[capacity + index] = index as u32;
            weight_sum[capacity + index] = self.weight_sum[old_capacity + index];
        }
        for index in old_capacity..capacity {
            min_slot[capacity + index] = index as u32;
        }
        self.capacity = capacity;
        self.min_cost = min_cost;
        self.min_slot = min_slot;
        self.weight_sum = weight_sum;
        self.rebuild_internal();
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn slot(cell: u32, cost: f64) -> Slot {
        Slot {
            cell,
            cost,
            best: Attachment {
                target: 0,
                segment_parent: NONE,
                along: 0.0,
            },
        }
    }

    #[test]
    fn cheapest_follows_updates_and_removals() {
        let mut frontier = Frontier::new();
        let mut ids = Vec::new();
        for cell in 0..100u32 {
            ids.push(frontier.insert(slot(cell, 100.0 - cell as f64), 1.0));
        }
        assert_eq!(frontier.cheapest().unwrap().1, 1.0);
        frontier.remove(ids[99]);
        assert_eq!(frontier.cheapest().unwrap().1, 2.0);
        frontier.update(ids[5], -3.0, slot(5, 0.0).best, 1.0);
        assert_eq!(frontier.cheapest().unwrap(), (ids[5], -3.0));
        assert_eq!(frontier.total_weight(), 99.0);
    }

    #[test]
    fn weighted_pick_skips_zero_weights() {
        let mut frontier = Frontier::new();
        for cell in 0..10u32 {
            frontier.insert(slot(cell, 0.0), if cell == 7 { 2.0 } else { 0.0 });
        }
        for step in 0..20 {
            assert_eq!(frontier.pick_by_weight(step as f64 * 0.1), 7);
        }
    }
}
