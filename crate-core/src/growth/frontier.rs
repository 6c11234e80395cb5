//! `Frontier`: the allowed empty cells within reach of the network, each with its best
//! attachment, kept in a segment tree that answers "cheapest slot" and "slot drawn by weight"
//! in O(log n) and is rebuilt (never patched by subtraction) so sums do not drift.
//!
//! Leaf changes are applied to the tree's inner nodes lazily, just before the tree is next
//! read (`settle_sums`, `settle_costs`): the inner nodes are a function of the leaves alone, so
//! the answers are the same as with every change applied at once. A leaf's weight is a function
//! of its cost given by whoever reads the sums (the joining rule), so it too is computed only
//! then, for every changed leaf in one loop whose exponentials do not wait on each other.
//! Weighted and uniform joining without a threshold read the sums at every pick but the
//! cheapest slot seldom (`cost_floor` stands in for it): they keep no min tree and find the
//! cheapest slot by reading every leaf.

/// No attachment yet / not a node.
pub(crate) const NONE: u32 = u32::MAX;

/// Marks a removed slot in `Frontier::unsettled_sums`: its weight is 0 whatever the rule gives
/// its cost. Slot indices stay below it (a lattice state holds one beside `FRONTIER_TAG`).
const REMOVED: u32 = 1 << 31;

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

/// One frontier cell (its cost is kept apart, in `Frontier::costs`).
#[derive(Clone, Copy, Debug)]
pub(crate) struct Slot {
    /// Row-major cell index.
    pub cell: u32,
    /// The best attachment.
    pub best: Attachment,
}

/// One node of the min tree: the cheapest leaf under it, its cost and its slot.
#[derive(Clone, Copy, Debug)]
struct Cheapest {
    cost: f64,
    slot: u32,
}

/// Frontier slots with a min tree (cheapest first) and a sum tree (random joining).
pub(crate) struct Frontier {
    capacity: usize,
    /// The min tree: node 1 is the root, node `capacity + i` the leaf of slot `i`.
    cheapest: Vec<Cheapest>,
    /// The sum tree of weights, numbered as the min tree; empty when weights are not kept
    /// (the cheapest rule, whose weights are all 0). Kept apart from the min tree: every
    /// changed weight changes the sums up to the root, while a changed cost seldom changes the
    /// cheapest leaf more than a few levels up, so a min-tree walk mostly stops early.
    weights: Vec<f64>,
    /// Whether weights are kept.
    keeps_weights: bool,
    /// Whether the min tree's inner nodes are kept; without them `cheapest` reads the leaves.
    keeps_min_tree: bool,
    /// Slots by index; a free slot has `cell == NONE`.
    pub slots: Vec<Slot>,
    /// The cost of each slot's best attachment, by slot index (stale for a free slot). Kept
    /// apart from the slots, at 8 bytes a slot, because an offer reads the costs of the
    /// frontier cells around a new node, at slots all over the frontier, and reads nothing
    /// else of them unless the node may beat their cost: packed densely they take fewer of
    /// the processor's cache lines.
    pub costs: Vec<f64>,
    free: Vec<u32>,
    live: usize,
    /// Leaves whose cost changed since the sum tree was last brought up to date, in order, a
    /// removed slot's with `REMOVED` set (only when weights are kept).
    unsettled_sums: Vec<u32>,
    /// Leaves whose cost changed since the min tree was last brought up to date.
    unsettled_costs: Vec<u32>,
    /// No greater than the cost of any live slot: the cheapest cost when it was last known
    /// (the min tree settled or rebuilt, or the leaves read), lowered by every cost set since
    /// (a removal leaves it a floor).
    cost_floor: f64,
}

impl Frontier {
    /// An empty frontier; `keeps_weights` is false when every weight will be 0 (the cheapest
    /// rule), so the sum tree is left out and `total_weight` stays 0; `keeps_min_tree` is false
    /// when the cheapest slot is asked for seldom, so that reading every leaf then costs less
    /// than keeping the tree at every change.
    pub fn new(keeps_weights: bool, keeps_min_tree: bool) -> Frontier {
        let mut frontier = Frontier {
            capacity: 0,
            cheapest: Vec::new(),
            weights: Vec::new(),
            keeps_weights,
            keeps_min_tree,
            slots: Vec::new(),
            costs: Vec::new(),
            free: Vec::new(),
            live: 0,
            unsettled_sums: Vec::new(),
            unsettled_costs: Vec::new(),
            cost_floor: f64::INFINITY,
        };
        frontier.resize(64);
        frontier
    }

    /// Number of frontier cells.
    pub fn len(&self) -> usize {
        self.live
    }

    /// Adds a cell whose best attachment costs `cost`; returns its slot.
    pub fn insert(&mut self, slot: Slot, cost: f64) -> u32 {
        let index = match self.free.pop() {
            Some(index) => index,
            None => {
                if self.slots.len() == self.capacity {
                    self.resize(self.capacity * 2);
                }
                self.slots.push(slot);
                self.costs.push(cost);
                (self.slots.len() - 1) as u32
            }
        };
        self.slots[index as usize] = slot;
        self.costs[index as usize] = cost;
        self.live += 1;
        self.set_leaf(index, cost);
        index
    }

    /// Changes a slot's attachment and cost.
    pub fn update(&mut self, index: u32, cost: f64, best: Attachment) {
        self.slots[index as usize].best = best;
        self.costs[index as usize] = cost;
        self.set_leaf(index, cost);
    }

    /// Removes a slot.
    pub fn remove(&mut self, index: u32) {
        self.slots[index as usize].cell = NONE;
        self.free.push(index);
        self.live -= 1;
        self.set_leaf(index, f64::INFINITY);
        if let Some(last) = self.unsettled_sums.last_mut() {
            *last |= REMOVED;
        }
    }

    /// Cheapest live slot and its cost (ties: lowest slot index).
    pub fn cheapest(&mut self) -> Option<(u32, f64)> {
        if self.live == 0 {
            return None;
        }
        if !self.keeps_min_tree {
            let best = self.least_leaf();
            self.cost_floor = best.cost;
            return Some((best.slot, best.cost));
        }
        self.settle_costs();
        Some((self.cheapest[1].slot, self.cheapest[1].cost))
    }

    /// A cost no greater than `cheapest()`'s, without settling the min tree.
    pub fn cost_floor(&self) -> f64 {
        self.cost_floor
    }

    /// Sum of all weights (0 when weights are not kept), a live slot's weight being
    /// `weight_of(its cost)` (which must not change between reads of the sums but at
    /// `reweigh`) and an emptied slot's 0.
    pub fn total_weight(&mut self, weight_of: impl Fn(f64) -> f64) -> f64 {
        if !self.keeps_weights {
            return 0.0;
        }
        self.settle_sums(weight_of);
        self.weights[1]
    }

    /// The slot where the cumulative weight passes `target` (0 <= target < total), weights
    /// as `total_weight` gives them. Never lands on a zero-weight slot while the total is
    /// positive.
    pub fn pick_by_weight(&mut self, mut target: f64, weight_of: impl Fn(f64) -> f64) -> u32 {
        if !self.keeps_weights {
            return 0;
        }
        self.settle_sums(weight_of);
        let weights = &self.weights[..2 * self.capacity];
        let mut node = 1;
        // Without branches: which way the walk turns follows no pattern, and a processor that
        // guesses a turn wrong throws away the work after it. Turning left takes the left sum
        // times 0 from the target: +0 (the sum is positive and, below a finite total, finite),
        // which leaves the target as it is. (A choice between the sum and 0, by `if` or by
        // masking its bits, is compiled as a branch again.)
        while node < self.capacity {
            let left = 2 * node;
            let left_sum = weights[left];
            let turn_left = (left_sum > 0.0) & ((target < left_sum) | (weights[left + 1] <= 0.0));
            target -= left_sum * f64::from(u8::from(!turn_left));
            node = left + usize::from(!turn_left);
        }
        (node - self.capacity) as u32
    }

    /// Sets every live leaf's weight to `weight_of(its cost)` (the rule the sums are read
    /// with from now on) and rebuilds the trees.
    pub fn reweigh(&mut self, weight_of: impl Fn(f64) -> f64) {
        // The least leaf cost as `least_leaf` finds it (the first leaf's, then any strictly
        // less), taken on the way; the leaves past the slots are unused (infinite), never less.
        let mut least = f64::INFINITY;
        for index in 0..self.slots.len() {
            let leaf = self.capacity + index;
            let (cost, weight) = if self.slots[index].cell == NONE {
                (f64::INFINITY, 0.0)
            } else {
                (self.costs[index], weight_of(self.costs[index]))
            };
            self.cheapest[leaf].cost = cost;
            least = if index == 0 || cost < least {
                cost
            } else {
                least
            };
            if self.keeps_weights {
                self.weights[leaf] = weight;
            }
        }
        self.rebuild_costs_knowing(Some(least));
        self.rebuild_sums();
    }

    /// Sets one leaf's cost; its weight is set and its ancestors are recombined when their
    /// tree is next read (`settle_sums`, `settle_costs`).
    fn set_leaf(&mut self, index: u32, cost: f64) {
        let node = self.capacity + index as usize;
        self.cheapest[node] = Cheapest { cost, slot: index };
        self.cost_floor = self.cost_floor.min(cost);
        if self.keeps_min_tree {
            self.unsettled_costs.push(index);
        }
        if self.keeps_weights {
            self.unsettled_sums.push(index);
        }
    }

    /// Brings the sum tree up to date: sets each changed leaf's weight from its cost, then
    /// walks from each changed leaf to the root, recombining every node on the way. The last
    /// change of a leaf decides its weight: an emptied slot's is 0, any other's is its cost's,
    /// the cost it has now. A node's last recombination comes after both of its children are
    /// final (the last walk through it passes through one child, whose walks are all among its
    /// own, and every walk through the other child came earlier), so the tree is exactly what
    /// recombining every inner node would give.
    ///
    /// The walks go two at a time, level by level (every leaf lies at the same depth), so that
    /// the processor adds their sums side by side: a walk's sums wait on each other, another
    /// walk's do not. Both walks of a pair write their nodes of one level before either reads
    /// the next, so when the two meet (one's sibling is the other's node) each adds the other's
    /// new sum, and they write the same bits to their common parent; from there on they
    /// compute the same sums. The last walk through a node is then one of the last pair
    /// through it, and the argument above holds pair by pair.
    fn settle_sums(&mut self, weight_of: impl Fn(f64) -> f64) {
        let capacity = self.capacity;
        let weights = &mut self.weights[..2 * capacity];
        for &entry in &self.unsettled_sums {
            let leaf = capacity + (entry & !REMOVED) as usize;
            weights[leaf] = if entry & REMOVED != 0 {
                0.0
            } else {
                weight_of(self.cheapest[leaf].cost)
            };
        }
        // Each walk carries its node's new sum up and reads only the sibling: a sum is the same
        // whichever addend comes first (IEEE 754 addition commutes), so each node gets the bits
        // of its left child's sum plus its right child's.
        let leaf = |entry: u32| capacity + (entry & !REMOVED) as usize;
        let mut pairs = self.unsettled_sums.chunks_exact(2);
        for pair in &mut pairs {
            let (mut first, mut second) = (leaf(pair[0]), leaf(pair[1]));
            let (mut first_sum, mut second_sum) = (weights[first], weights[second]);
            while first > 1 {
                first_sum += weights[first ^ 1];
                second_sum += weights[second ^ 1];
                first /= 2;
                second /= 2;
                weights[first] = first_sum;
                weights[second] = second_sum;
            }
        }
        for &entry in pairs.remainder() {
            let mut node = leaf(entry);
            let mut sum = weights[node];
            while node > 1 {
                sum += weights[node ^ 1];
                node /= 2;
                weights[node] = sum;
            }
        }
        self.unsettled_sums.clear();
    }

    /// Brings the min tree up to date as `settle_sums` does the sums, except that a walk stops
    /// at the first node whose cheapest cost and slot come out as they were: every walk that
    /// changes a node (or sets a leaf) goes on to recombine its parent, so the last change to
    /// a node's children is still followed by its recombination from final children.
    fn settle_costs(&mut self) {
        if self.unsettled_costs.is_empty() {
            return;
        }
        let capacity = self.capacity;
        let cheapest = &mut self.cheapest[..2 * capacity];
        for &index in &self.unsettled_costs {
            let mut node = capacity + index as usize;
            let mut best = cheapest[node];
            while node > 1 {
                let sibling = cheapest[node ^ 1];
                // The left child (the lower slots) wins on equal costs.
                let (left, right) = if node.is_multiple_of(2) {
                    (best, sibling)
                } else {
                    (sibling, best)
                };
                best = if right.cost < left.cost { right } else { left };
                node /= 2;
                let before = cheapest[node];
                if before.cost.to_bits() == best.cost.to_bits() && before.slot == best.slot {
                    break;
                }
                cheapest[node] = best;
            }
        }
        self.unsettled_costs.clear();
        self.cost_floor = self.cheapest[1].cost;
    }

    /// The leftmost least leaf, as the min tree's root holds it (ties go left).
    fn least_leaf(&self) -> Cheapest {
        let mut best = self.cheapest[self.capacity];
        for &leaf in &self.cheapest[self.capacity + 1..] {
            if leaf.cost < best.cost {
                best = leaf;
            }
        }
        best
    }

    /// Recombines every inner node of the min tree (when it is kept); `least` is the least
    /// leaf cost when it is already known (`least_leaf`'s).
    fn rebuild_costs_knowing(&mut self, least: Option<f64>) {
        if !self.keeps_min_tree {
            self.cost_floor = least.unwrap_or_else(|| self.least_leaf().cost);
            return;
        }
        for node in (1..self.capacity).rev() {
            let (left, right) = (self.cheapest[2 * node], self.cheapest[2 * node + 1]);
            self.cheapest[node] = if right.cost < left.cost { right } else { left };
        }
        self.unsettled_costs.clear();
        self.cost_floor = self.cheapest[1].cost;
    }

    /// Recombines every inner node of both trees.
    fn rebuild_internal(&mut self) {
        self.rebuild_costs_knowing(None);
        self.rebuild_sums();
    }

    /// Recombines every inner node of the sum tree (when it is kept).
    fn rebuild_sums(&mut self) {
        if self.keeps_weights {
            for node in (1..self.capacity).rev() {
                self.weights[node] = self.weights[2 * node] + self.weights[2 * node + 1];
            }
        }
        self.unsettled_sums.clear();
    }

    fn resize(&mut self, capacity: usize) {
        let old_capacity = self.capacity;
        let mut cheapest = vec![
            Cheapest {
                cost: f64::INFINITY,
                slot: NONE,
            };
            2 * capacity
        ];
        for index in 0..capacity {
            cheapest[capacity + index].slot = index as u32;
        }
        for index in 0..old_capacity {
            cheapest[capacity + index].cost = self.cheapest[old_capacity + index].cost;
        }
        if self.keeps_weights {
            let mut weights = vec![0.0; 2 * capacity];
            weights[capacity..capacity + old_capacity]
                .copy_from_slice(&self.weights[old_capacity..2 * old_capacity]);
            self.weights = weights;
        }
        self.capacity = capacity;
        self.cheapest = cheapest;
        // Changed leaves keep their place in the list (a slot keeps its index): their weights
        // are set, and the sums on their way to the root recombined, at the next read.
        let pending = std::mem::take(&mut self.unsettled_sums);
        self.rebuild_internal();
        self.unsettled_sums = pending;
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Marsaglia's xorshift64 (2003, "Xorshift RNGs", J. Stat. Softw. 8(14); the shifts 13, 7
    /// and 17 from memory): numbers below `bound` from `seed`, the same in every run.
    fn xorshift(seed: u64) -> impl FnMut(u64) -> u64 {
        let mut state = seed;
        move |bound| {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            state % bound
        }
    }

    fn slot(cell: u32) -> Slot {
        Slot {
            cell,
            best: Attachment {
                target: 0,
                segment_parent: NONE,
                along: 0.0,
            },
        }
    }

    #[test]
    fn cheapest_follows_updates_and_removals() {
        let mut frontier = Frontier::new(true, true);
        let mut ids = Vec::new();
        for cell in 0..100u32 {
            ids.push(frontier.insert(slot(cell), 100.0 - cell as f64));
        }
        assert_eq!(frontier.cheapest().unwrap().1, 1.0);
        frontier.remove(ids[99]);
        assert_eq!(frontier.cheapest().unwrap().1, 2.0);
        frontier.update(ids[5], -3.0, slot(5).best);
        assert_eq!(frontier.cheapest().unwrap(), (ids[5], -3.0));
        assert_eq!(frontier.total_weight(|_| 1.0), 99.0);
    }

    /// Weights are set when the sums are read, from the last change of each slot: a slot
    /// emptied and filled again in between weighs what its new cost gives, one filled and
    /// emptied weighs nothing, though the rule gives every cost (an emptied slot's infinite
    /// one too) a weight of 1.
    #[test]
    fn a_slot_weighs_what_its_last_change_gives() {
        let mut frontier = Frontier::new(true, false);
        let first = frontier.insert(slot(0), 1.0);
        let second = frontier.insert(slot(1), 2.0);
        assert_eq!(frontier.total_weight(|cost| cost), 3.0);
        frontier.remove(first);
        let again = frontier.insert(slot(2), 5.0);
        assert_eq!(again, first, "the emptied slot is taken again");
        frontier.update(second, 7.0, slot(1).best);
        frontier.remove(second);
        assert_eq!(frontier.total_weight(|cost| cost), 5.0);
        assert_eq!(
            frontier.total_weight(|_| 1.0),
            5.0,
            "settled sums stay as read"
        );
        frontier.reweigh(|_| 1.0);
        assert_eq!(frontier.total_weight(|_| 1.0), 1.0);
    }

    /// After any mix of inserts, updates and removals, read at any moment, the tree answers
    /// what a direct scan of the live slots gives: the cheapest cost, the lowest slot among
    /// equal costs, and the sum of the (whole-number, so exactly summed) weights. Each cost
    /// carries its weight in its tens (`weight_of`), so an emptied slot's infinite cost would
    /// weigh infinitely if it were weighed.
    #[test]
    fn lazy_tree_matches_a_direct_scan() {
        let weight_of = |cost: f64| (cost / 10.0).floor();
        for (keeps_weights, keeps_min_tree) in [(false, true), (true, true), (true, false)] {
            let mut frontier = Frontier::new(keeps_weights, keeps_min_tree);
            let mut weights: Vec<f64> = Vec::new();
            let mut next = xorshift(0x9e37_79b9_7f4a_7c15u64);
            let mut live: Vec<u32> = Vec::new();
            for step in 0..5_000u32 {
                let weight = next(4) as f64;
                let cost = [1.0, 2f64.sqrt(), 3.0][next(3) as usize] + 10.0 * weight;
                match next(5) {
                    0 | 1 => {
                        let index = frontier.insert(slot(step), cost);
                        weights.resize(weights.len().max(index as usize + 1), 0.0);
                        weights[index as usize] = weight;
                        live.push(index);
                    }
                    2 if !live.is_empty() => {
                        let index = live[next(live.len() as u64) as usize];
                        frontier.update(index, cost, slot(0).best);
                        weights[index as usize] = weight;
                    }
                    3 if !live.is_empty() => {
                        let index = live.swap_remove(next(live.len() as u64) as usize);
                        frontier.remove(index);
                        weights[index as usize] = 0.0;
                    }
                    _ => {}
                }
                if next(3) != 0 {
                    continue;
                }
                let expected = live
                    .iter()
                    .map(|&index| (frontier.costs[index as usize], index))
                    .min_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
                assert_eq!(
                    frontier.cheapest().map(|(index, cost)| (cost, index)),
                    expected
                );
                let total: f64 = live.iter().map(|&index| weights[index as usize]).sum();
                let expected_total = if keeps_weights { total } else { 0.0 };
                assert_eq!(frontier.total_weight(weight_of), expected_total);
            }
        }
    }

    /// Settling changed leaves two walks at a time leaves every inner node of the sum tree with
    /// the bits of its children's sum, as recombining the whole tree gives, whichever leaves
    /// changed together: siblings, one leaf twice, removed ones, leaves far apart, odd and
    /// even counts.
    #[test]
    fn settled_sums_equal_a_full_rebuild_at_every_node() {
        let mut frontier = Frontier::new(true, false);
        let mut next = xorshift(0x9e37_79b9_7f4a_7c15u64);
        // Weights that are not whole numbers, so that sums in another order round otherwise.
        let weight_of = |cost: f64| cost * 1.5 + 0.01;
        let mut live: Vec<u32> = (0..200u32)
            .map(|cell| frontier.insert(slot(cell), f64::from(cell) / 3.0))
            .collect();
        let mut checked_walks = 0;
        for round in 0..2_000u32 {
            let mut previous = live[0];
            let changes = 1 + next(7);
            for _ in 0..changes {
                let cost = (1 + next(10_000)) as f64 / 7.0;
                let index = match next(5) {
                    0 if live.contains(&(previous ^ 1)) => previous ^ 1,
                    1 => previous,
                    2 if live.len() > 50 => {
                        let index = live.swap_remove(next(live.len() as u64) as usize);
                        frontier.remove(index);
                        previous = index;
                        continue;
                    }
                    _ => live[next(live.len() as u64) as usize],
                };
                frontier.update(index, cost, slot(0).best);
                previous = index;
            }
            if next(4) == 0 {
                live.push(frontier.insert(slot(10_000 + round), f64::from(round) / 9.0));
            }
            checked_walks += frontier.unsettled_sums.len();
            frontier.total_weight(weight_of);
            let mut rebuilt = frontier.weights.clone();
            for node in (1..frontier.capacity).rev() {
                rebuilt[node] = rebuilt[2 * node] + rebuilt[2 * node + 1];
            }
            for (node, (settled, full)) in frontier.weights.iter().zip(&rebuilt).enumerate() {
                assert_eq!(
                    settled.to_bits(),
                    full.to_bits(),
                    "round {round}, node {node}"
                );
            }
        }
        assert!(checked_walks > 5_000, "{checked_walks} walks");
    }

    /// Pairwise summation (Higham 1993, "The accuracy of floating point summation", SIAM J.
    /// Sci. Comput. 14(4)): the sum of `values` (a power of two long) as the sum of its two
    /// halves' sums.
    fn pairwise_sum(values: &[f64]) -> f64 {
        match values.len() {
            1 => values[0],
            length => pairwise_sum(&values[..length / 2]) + pairwise_sum(&values[length / 2..]),
        }
    }

    /// With weights whose sums round (not whole numbers), the total after any mix of inserts,
    /// updates and removals has the very bits of pairwise summation over the slots in order,
    /// emptied slots and unused ones counting 0: the order of the additions is the tree's,
    /// whichever leaves changed between reads.
    #[test]
    fn weight_sums_are_pairwise_sums_to_the_bit() {
        let mut frontier = Frontier::new(true, true);
        let mut weights: Vec<f64> = Vec::new();
        let mut live: Vec<u32> = Vec::new();
        let mut next = xorshift(0x2545_f491_4f6c_dd1du64);
        for step in 0..3_000u32 {
            let weight = 0.1 * (1 + next(1_000)) as f64 / 7.0;
            match next(4) {
                0 | 1 => {
                    let index = frontier.insert(slot(step), weight);
                    weights.resize(weights.len().max(index as usize + 1), 0.0);
                    weights[index as usize] = weight;
                    live.push(index);
                }
                2 if !live.is_empty() => {
                    let index = live[next(live.len() as u64) as usize];
                    frontier.update(index, weight, slot(0).best);
                    weights[index as usize] = weight;
                }
                _ if !live.is_empty() => {
                    let index = live.swap_remove(next(live.len() as u64) as usize);
                    frontier.remove(index);
                    weights[index as usize] = 0.0;
                }
                _ => {}
            }
            if next(4) != 0 {
                continue;
            }
            let mut padded = weights.clone();
            padded.resize(frontier.capacity, 0.0);
            assert_eq!(
                frontier.total_weight(|cost| cost).to_bits(),
                pairwise_sum(&padded).to_bits()
            );
        }
    }

    #[test]
    fn weighted_pick_skips_zero_weights() {
        let mut frontier = Frontier::new(true, true);
        for cell in 0..10u32 {
            frontier.insert(slot(cell), if cell == 7 { 2.0 } else { 0.0 });
        }
        for step in 0..20 {
            assert_eq!(frontier.pick_by_weight(step as f64 * 0.1, |cost| cost), 7);
        }
    }
}
