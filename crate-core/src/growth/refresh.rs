//! The exact refresh of flows and transport costs, and the re-pricing of the frontier after it.

use super::cost::MarginalMemo;
use super::*;

impl Growth {
    /// Recomputes flows and transport costs exactly when the network has grown by `refresh`
    /// since the last time, then re-prices every frontier cell's stored attachment.
    pub(super) fn maybe_refresh(&mut self) {
        if self.refined.costs.w_flow == 0.0 {
            return;
        }
        let nodes = self.nodes.len();
        let due = self.last_refresh_nodes as f64 * (1.0 + self.refined.run.refresh);
        if (nodes as f64) < due.max(self.last_refresh_nodes as f64 + 8.0) {
            return;
        }
        self.last_refresh_nodes = nodes;
        self.refresh_flows();
        for index in 0..self.frontier.slots.len() {
            let slot = self.frontier.slots[index];
            if slot.cell == NONE {
                continue;
            }
            let (cx, cy) = self.lattice.position(slot.cell as usize);
            let ground = self.cell_ground(slot.cell as usize, cx, cy);
            let best = slot.best;
            let split = best.segment_parent != NONE
                && self.parent[best.target as usize] != best.segment_parent;
            let cost = if split {
                match self.best_from_scratch(slot.cell as usize) {
                    Some((cost, attachment)) => {
                        self.frontier.slots[index].best = attachment;
                        cost
                    }
                    None => f64::INFINITY,
                }
            } else if best.segment_parent == NONE {
                self.model
                    .cost(cx, cy, ground, &self.node_anchor(best.target))
            } else {
                self.model.cost(
                    cx,
                    cy,
                    ground,
                    &self.segment_anchor(best.target, best.along),
                )
            };
            self.frontier.costs[index] = cost;
        }
        self.reweigh();
    }

    pub(super) fn refresh_flows(&mut self) {
        if !self.has_junctions {
            self.refresh_flows_in_index_order();
            return;
        }
        let count = self.nodes.len();
        // Children in compressed rows, then a breadth-first order from the roots.
        self.scratch_children
            .rebuild(self.parent.iter().copied(), count);
        self.scratch_order.clear();
        for (node, &parent) in self.parent.iter().enumerate() {
            if parent == NO_PARENT {
                self.scratch_order.push(node as u32);
            }
        }
        let mut head = 0;
        while head < self.scratch_order.len() {
            let node = self.scratch_order[head] as usize;
            head += 1;
            self.scratch_order
                .extend_from_slice(self.scratch_children.of(node));
        }
        for node in 0..count {
            self.flow[node] = match self.cell_of[node] {
                NONE => 0.0,
                cell => self.own_weight(cell as usize),
            };
        }
        for &node in self.scratch_order.iter().rev() {
            let parent = self.parent[node as usize];
            if parent != NO_PARENT {
                self.flow[parent as usize] += self.flow[node as usize];
            }
        }
        let mut marginals = MarginalMemo::new(self.cell_weight, self.refined.costs.alpha);
        for &node in &self.scratch_order {
            let node = node as usize;
            let parent = self.parent[node];
            if parent == NO_PARENT {
                self.transport[node] = 0.0;
                continue;
            }
            let parent = parent as usize;
            let (near, far) = (&self.nodes[node], &self.nodes[parent]);
            let (vx, vy) = (far.x - near.x, far.y - near.y);
            let length = (vx * vx + vy * vy).sqrt();
            self.transport[node] =
                self.transport[parent] + length * marginals.marginal(self.flow[node]);
        }
    }

    /// `refresh_flows` when every node's parent has a lower index (no segment has been split:
    /// a new node always drains into an older one), to the same bits without building the
    /// breadth-first order. Flows: walking nodes from the last down, each node is final when
    /// read (its children have higher indices) and adds into its parent, so every parent
    /// receives its children's flows in decreasing index order, as the reversed breadth-first
    /// order adds them (a parent's children are listed there together, by increasing index).
    /// Transport costs: each node needs only its parent's, which comes first either way; the
    /// segment lengths are those computed when the nodes were added, by the same expression
    /// from the same positions (no parent has changed since), and a segment whose flow has the
    /// bits it was last priced at keeps that price (`segment_price`).
    fn refresh_flows_in_index_order(&mut self) {
        let count = self.nodes.len();
        if self.zone_of.is_empty() {
            // Every cell weighs `cell_weight` (`own_weight`): a plain fill.
            let weight = self.cell_weight;
            for (flow, &cell) in self.flow.iter_mut().zip(&self.cell_of) {
                *flow = if cell == NONE { 0.0 } else { weight };
            }
        } else {
            for node in 0..count {
                self.flow[node] = match self.cell_of[node] {
                    NONE => 0.0,
                    cell => self.own_weight(cell as usize),
                };
            }
        }
        let parents = &self.parent[..count];
        let flow = &mut self.flow[..count];
        for node in (0..count).rev() {
            let parent = parents[node];
            if parent != NO_PARENT {
                flow[parent as usize] += flow[node];
            }
        }
        let mut marginals = MarginalMemo::new(self.cell_weight, self.refined.costs.alpha);
        let lengths = &self.segment_length[..count];
        let prices = &mut self.segment_price[..count];
        let priced = &mut self.priced_flow[..count];
        let transport = &mut self.transport[..count];
        for node in 0..count {
            let parent = parents[node];
            debug_assert!(parent == NO_PARENT || (parent as usize) < node);
            if parent == NO_PARENT {
                transport[node] = 0.0;
                continue;
            }
            if flow[node].to_bits() != priced[node].to_bits() {
                prices[node] = lengths[node] * marginals.marginal(flow[node]);
                priced[node] = flow[node];
            }
            transport[node] = transport[parent as usize] + prices[node];
        }
    }
}
