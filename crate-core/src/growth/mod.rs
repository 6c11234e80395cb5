//! `Growth`: the incremental grower. `Growth::new` validates parameters (the only place that
//! can fail); `step(n)` adds up to `n` cells and never fails; `network()` returns the forest in
//! physical units.
//!
//! One step is a pipeline: pick a frontier cell by the joining rule, re-check its attachment
//! when attachments can go stale, add its node (splitting a segment if it attaches to one),
//! offer the new node to every cell within the search radius, and refresh flows and transport
//! costs when the network has grown by `refresh`.

mod cost;
mod frontier;
mod lattice;

use rand_chacha::ChaCha8Rng;
use rand_core::{RngCore, SeedableRng};

use crate::mask::allowed_cells;
use crate::network::{CellSet, Network, Node, NO_PARENT};
use crate::params::{Joining, ParamError, Params};
use cost::{marginal, Anchor, CostModel};
use frontier::{Attachment, Frontier, Slot, NONE};
use lattice::{Lattice, BLOCKED, FREE, FRONTIER_TAG};

/// Why growth stopped.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum StopReason {
    /// The cell budget `cells` is reached.
    Budget,
    /// No allowed empty cell is within reach: the mask is full (or the rest is cut off).
    Full,
    /// Open growth: no frontier cell costs less than `threshold`.
    Threshold,
}

impl std::fmt::Display for StopReason {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            StopReason::Budget => "cell budget reached",
            StopReason::Full => "no allowed cell left within reach",
            StopReason::Threshold => "no frontier cell below the cost threshold",
        })
    }
}

impl StopReason {
    /// The reason's short name as used in JSON (`budget`, `full`, `threshold`).
    pub fn name(self) -> &'static str {
        match self {
            StopReason::Budget => "budget",
            StopReason::Full => "full",
            StopReason::Threshold => "threshold",
        }
    }
}

/// What one call of `step` did.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct StepReport {
    /// Cells added by this call.
    pub added: u64,
    /// Set once growth has stopped (it stays stopped).
    pub stopped: Option<StopReason>,
}

/// An incremental grower holding the lattice, the network so far and the frontier.
pub struct Growth {
    params: Params,
    model: CostModel,
    lattice: Lattice,
    frontier: Frontier,
    /// Random stream for joining (ChaCha8, stream 1 of the seed; stream 0 is the jitter).
    random: ChaCha8Rng,
    // Nodes, structure of arrays, positions in cells.
    x: Vec<f64>,
    y: Vec<f64>,
    parent: Vec<u32>,
    down_x: Vec<f64>,
    down_y: Vec<f64>,
    dist: Vec<f64>,
    transport: Vec<f64>,
    flow: Vec<f64>,
    root_of: Vec<u32>,
    child_count: Vec<u32>,
    cell_of: Vec<u32>,
    /// Junctions (nodes off the cell centres) in each cell, as linked lists (segments only).
    junction_head: Vec<u32>,
    junction_next: Vec<u32>,
    axes: Vec<(f64, f64)>,
    cell_count: u64,
    cell_weight: f64,
    /// Whether a stored attachment may be out of date and must be re-checked when picked.
    recheck: bool,
    /// Reference cost for weights of weighted joining.
    weight_reference: f64,
    last_refresh_nodes: usize,
    scratch_order: Vec<u32>,
    scratch_start: Vec<u32>,
    scratch_children: Vec<u32>,
    stopped: Option<StopReason>,
}

/// Weights below this total are rescaled against the current cheapest cost.
const WEIGHT_FLOOR: f64 = 1e-150;
/// Largest exponent `(reference - cost) / T` allowed before rescaling.
const WEIGHT_CEILING_EXPONENT: f64 = 500.0;

impl Growth {
    /// Validates the parameters and plants the roots. Fails with an error naming the parameter.
    pub fn new(params: &Params) -> Result<Growth, ParamError> {
        params.validate()?;
        // The budget counts the roots, which are all planted at once: it must hold them.
        if params.cells < params.roots.len() as u64 {
            return Err(ParamError {
                key: "cells".into(),
                value: params.cells.to_string(),
                allowed: format!(
                    "at least the number of roots ({}), since the budget counts the roots",
                    params.roots.len()
                ),
            });
        }
        let allowed = allowed_cells(params);
        if !allowed.iter().any(|&cell| cell) {
            return Err(ParamError {
                key: "outline / mask / obstacles".into(),
                value: "no allowed cell".into(),
                allowed: "a region with at least one allowed cell".into(),
            });
        }
        let lattice = Lattice::new(params, &allowed);
        let mut random = ChaCha8Rng::seed_from_u64(params.seed);
        random.set_stream(1);
        let mut growth = Growth {
            params: params.clone(),
            model: CostModel::new(params),
            lattice,
            frontier: Frontier::new(),
            random,
            x: Vec::new(),
            y: Vec::new(),
            parent: Vec::new(),
            down_x: Vec::new(),
            down_y: Vec::new(),
            dist: Vec::new(),
            transport: Vec::new(),
            flow: Vec::new(),
            root_of: Vec::new(),
            child_count: Vec::new(),
            cell_of: Vec::new(),
            junction_head: Vec::new(),
            junction_next: Vec::new(),
            axes: Vec::new(),
            cell_count: 0,
            cell_weight: params.runoff,
            recheck: params.attach_to_segments || params.branch_angle.is_some(),
            weight_reference: f64::NAN,
            last_refresh_nodes: 0,
            scratch_order: Vec::new(),
            scratch_start: Vec::new(),
            scratch_children: Vec::new(),
            stopped: None,
        };
        if params.attach_to_segments {
            growth.junction_head = vec![NONE; growth.lattice.cell_total()];
        }
        for (index, root) in params.roots.iter().enumerate() {
            let cell = growth.lattice.cell_index(root.x, root.y);
            match growth.lattice.state[cell] {
                BLOCKED => {
                    return Err(ParamError {
                        key: format!("roots[{index}]"),
                        value: format!("cell ({}, {})", root.x, root.y),
                        allowed: "a cell inside the outline and mask and outside obstacles".into(),
                    })
                }
                state if state < FRONTIER_TAG => {
                    return Err(ParamError {
                        key: format!("roots[{index}]"),
                        value: format!("cell ({}, {})", root.x, root.y),
                        allowed: "a cell not already taken by another root".into(),
                    })
                }
                _ => {}
            }
            let [dx, dy] = root.outflow;
            let norm = (dx * dx + dy * dy).sqrt();
            growth.axes.push((dx / norm, dy / norm));
            growth.add_root(cell, index as u32);
        }
        if growth.cell_count >= params.cells {
            growth.stopped = Some(StopReason::Budget);
        }
        Ok(growth)
    }

    /// Adds up to `count` cells; stops early when a stop rule fires. Never fails.
    pub fn step(&mut self, count: u64) -> StepReport {
        let mut added = 0;
        while added < count && self.stopped.is_none() {
            match self.pick() {
                Ok((slot, attachment)) => {
                    self.join(slot, attachment);
                    added += 1;
                    if self.cell_count >= self.params.cells {
                        self.stopped = Some(StopReason::Budget);
                    }
                }
                Err(reason) => self.stopped = Some(reason),
            }
        }
        StepReport {
            added,
            stopped: self.stopped,
        }
    }

    /// Grows to the end (a stop rule) and returns why it stopped.
    pub fn run(&mut self) -> StopReason {
        loop {
            if let Some(reason) = self.step(u64::MAX).stopped {
                return reason;
            }
        }
    }

    /// Why growth stopped, once it has.
    pub fn stopped(&self) -> Option<StopReason> {
        self.stopped
    }

    /// The parameters this run was built from.
    pub fn params(&self) -> &Params {
        &self.params
    }

    /// Cells occupied so far (roots included).
    pub fn cell_count(&self) -> u64 {
        self.cell_count
    }

    /// Nodes so far: cells plus junctions on segments.
    pub fn node_count(&self) -> usize {
        self.x.len()
    }

    /// Cells currently on the frontier.
    pub fn frontier_len(&self) -> usize {
        self.frontier.len()
    }

    /// The network so far in physical units: node `i` of the grower is node `i` here.
    pub fn network(&self) -> Network {
        let size = self.params.cell_size;
        let cell_area = size * size;
        let weight = self.cell_weight * cell_area;
        let nodes = (0..self.x.len())
            .map(|index| Node {
                x: self.x[index] * size,
                y: self.y[index] * size,
                parent: self.parent[index],
                weight: if self.cell_of[index] == NONE {
                    0.0
                } else {
                    weight
                },
            })
            .collect();
        let occupied = self
            .cell_of
            .iter()
            .copied()
            .filter(|&cell| cell != NONE)
            .collect();
        Network {
            nodes,
            area: self.cell_count as f64 * cell_area,
            units: self.params.units.clone(),
            cell_size: size,
            cells: CellSet {
                width: self.params.width,
                height: self.params.height,
                occupied,
            },
        }
    }
}

// Internal stages.
impl Growth {
    fn add_root(&mut self, cell: usize, root_index: u32) {
        let (x, y) = self.lattice.position(cell);
        let (axis_x, axis_y) = self.axes[root_index as usize];
        let node = self.push_node(
            x,
            y,
            NO_PARENT,
            axis_x,
            axis_y,
            0.0,
            0.0,
            root_index,
            cell as u32,
        );
        self.flow[node as usize] = self.cell_weight;
        self.occupy(cell, node);
    }

    #[allow(clippy::too_many_arguments)]
    fn push_node(
        &mut self,
        x: f64,
        y: f64,
        parent: u32,
        down_x: f64,
        down_y: f64,
        dist: f64,
        transport: f64,
        root: u32,
        cell: u32,
    ) -> u32 {
        let node = self.x.len() as u32;
        self.x.push(x);
        self.y.push(y);
        self.parent.push(parent);
        self.down_x.push(down_x);
        self.down_y.push(down_y);
        self.dist.push(dist);
        self.transport.push(transport);
        self.flow.push(0.0);
        self.root_of.push(root);
        self.child_count.push(0);
        self.cell_of.push(cell);
        if self.params.attach_to_segments {
            self.junction_next.push(NONE);
        }
        if parent != NO_PARENT {
            self.child_count[parent as usize] += 1;
        }
        node
    }

    /// Marks a cell occupied by `node`, removes it from the frontier, and offers the node to
    /// every cell within reach.
    fn occupy(&mut self, cell: usize, node: u32) {
        let state = self.lattice.state[cell];
        if state != FREE && state & FRONTIER_TAG != 0 && state != BLOCKED {
            self.frontier.remove(state & !FRONTIER_TAG);
        }
        self.lattice.state[cell] = node;
        self.cell_count += 1;
        self.offer(cell, node);
    }

    /// Offers `node` (and its segment, when segments may be joined) to the cells within the
    /// search radius of `centre_cell`.
    fn offer(&mut self, centre_cell: usize, node: u32) {
        let (column, row) = self.lattice.column_row(centre_cell);
        let node_anchor = self.node_anchor(node);
        let segment = self.params.attach_to_segments && self.parent[node as usize] != NO_PARENT;
        for offset_index in 0..self.lattice.offsets.len() {
            let (dx, dy) = self.lattice.offsets[offset_index];
            let Some(cell) = self.lattice.neighbour(column, row, dx, dy) else {
                continue;
            };
            let state = self.lattice.state[cell];
            if state == BLOCKED || state < FRONTIER_TAG {
                continue;
            }
            let (cx, cy) = self.lattice.position(cell);
            let mut best_cost = self.model.cost(cx, cy, &node_anchor);
            let mut best = Attachment {
                target: node,
                segment_parent: NONE,
                along: 0.0,
            };
            if segment {
                if let Some((cost, attachment)) = self.best_on_segment(cx, cy, node) {
                    if cost < best_cost {
                        best_cost = cost;
                        best = attachment;
                    }
                }
            }
            if state == FREE {
                let slot = Slot {
                    cell: cell as u32,
                    cost: best_cost,
                    best,
                };
                let weight = self.weight(best_cost);
                let index = self.frontier.insert(slot, weight);
                self.lattice.state[cell] = FRONTIER_TAG | index;
            } else {
                let index = state & !FRONTIER_TAG;
                if best_cost < self.frontier.slots[index as usize].cost {
                    let weight = self.weight(best_cost);
                    self.frontier.update(index, best_cost, best, weight);
                }
            }
        }
    }

    fn node_anchor(&self, node: u32) -> Anchor {
        let index = node as usize;
        let (axis_x, axis_y) = self.axes[self.root_of[index] as usize];
        Anchor {
            x: self.x[index],
            y: self.y[index],
            down_x: self.down_x[index],
            down_y: self.down_y[index],
            dist: self.dist[index],
            transport: self.transport[index],
            axis_x,
            axis_y,
            is_tip: self.child_count[index] == 0,
        }
    }

    /// The anchor at fraction `along` of the segment from `node` to its parent.
    fn segment_anchor(&self, node: u32, along: f64) -> Anchor {
        let index = node as usize;
        let parent = self.parent[index] as usize;
        let x = self.x[index] + along * (self.x[parent] - self.x[index]);
        let y = self.y[index] + along * (self.y[parent] - self.y[index]);
        let (axis_x, axis_y) = self.axes[self.root_of[index] as usize];
        let to_parent_x = self.x[parent] - x;
        let to_parent_y = self.y[parent] - y;
        let rest = (to_parent_x * to_parent_x + to_parent_y * to_parent_y).sqrt();
        Anchor {
            x,
            y,
            down_x: self.down_x[index],
            down_y: self.down_y[index],
            dist: self.dist[parent]
                + self
                    .model
                    .supply_length(to_parent_x, to_parent_y, axis_x, axis_y),
            transport: self.transport[parent]
                + rest * marginal(self.flow[index], self.cell_weight, self.params.alpha),
            axis_x,
            axis_y,
            is_tip: false,
        }
    }

    /// Cheapest interior point of the segment `node -> parent` for a cell at `(cx, cy)`: the
    /// foot of the perpendicular, and the point that makes a 45 degree junction downstream.
    fn best_on_segment(&self, cx: f64, cy: f64, node: u32) -> Option<(f64, Attachment)> {
        let index = node as usize;
        let parent = self.parent[index];
        if parent == NO_PARENT {
            return None;
        }
        let (ax, ay) = (self.x[index], self.y[index]);
        let (bx, by) = (self.x[parent as usize], self.y[parent as usize]);
        let (sx, sy) = (bx - ax, by - ay);
        let squared = sx * sx + sy * sy;
        if squared <= 0.0 {
            return None;
        }
        let length = squared.sqrt();
        let foot = ((cx - ax) * sx + (cy - ay) * sy) / squared;
        let cross = ((cx - ax) * sy - (cy - ay) * sx).abs() / length;
        let mut best: Option<(f64, Attachment)> = None;
        for along in [foot, foot + cross / length] {
            if !(0.05..=0.95).contains(&along) {
                continue;
            }
            let anchor = self.segment_anchor(node, along);
            let cost = self.model.cost(cx, cy, &anchor);
            if best.is_none_or(|(best_cost, _)| cost < best_cost) {
                best = Some((
                    cost,
                    Attachment {
                        target: node,
                        segment_parent: parent,
                        along,
                    },
                ));
            }
        }
        best
    }

    /// Recomputes a cell's best attachment from every node and segment within reach.
    fn best_from_scratch(&self, cell: usize) -> Option<(f64, Attachment)> {
        let (column, row) = self.lattice.column_row(cell);
        let (cx, cy) = self.lattice.position(cell);
        let mut best: Option<(f64, Attachment)> = None;
        let mut consider = |cost: f64, attachment: Attachment| {
            if best.is_none_or(|(best_cost, _)| cost < best_cost) {
                best = Some((cost, attachment));
            }
        };
        for &(dx, dy) in &self.lattice.offsets {
            let Some(other) = self.lattice.neighbour(column, row, dx, dy) else {
                continue;
            };
            let state = self.lattice.state[other];
            let mut candidates = [NONE; 2];
            if state < FRONTIER_TAG {
                candidates[0] = state;
            }
            if self.params.attach_to_segments {
                candidates[1] = self.junction_head[other];
            }
            for (kind, &first) in candidates.iter().enumerate() {
                let mut node = first;
                while node != NONE {
                    let cost = self.model.cost(cx, cy, &self.node_anchor(node));
                    consider(
                        cost,
                        Attachment {
                            target: node,
                            segment_parent: NONE,
                            along: 0.0,
                        },
                    );
                    if self.params.attach_to_segments {
                        if let Some((cost, attachment)) = self.best_on_segment(cx, cy, node) {
                            consider(cost, attachment);
                        }
                    }
                    node = if kind == 1 {
                        self.junction_next[node as usize]
                    } else {
                        NONE
                    };
                }
            }
        }
        best
    }

    /// Joining weight of a cost under the current rule (0 when not eligible).
    fn weight(&mut self, cost: f64) -> f64 {
        if let Some(threshold) = self.params.threshold {
            if cost >= threshold {
                return 0.0;
            }
        }
        match self.params.joining {
            Joining::Cheapest => 0.0,
            Joining::Uniform => 1.0,
            Joining::Weighted => {
                if self.weight_reference.is_nan() {
                    self.weight_reference = cost;
                }
                let exponent = (self.weight_reference - cost) / self.params.temperature;
                libm::exp(exponent.min(WEIGHT_CEILING_EXPONENT))
            }
        }
    }

    /// Rescales weighted-joining weights against the cheapest current cost.
    fn reweigh(&mut self) {
        self.weight_reference = match self.frontier.cheapest() {
            Some((_, cost)) => cost,
            None => return,
        };
        let reference = self.weight_reference;
        let temperature = self.params.temperature;
        let threshold = self.params.threshold;
        let joining = self.params.joining;
        self.frontier.reweigh(|slot| {
            if threshold.is_some_and(|threshold| slot.cost >= threshold) {
                return 0.0;
            }
            match joining {
                Joining::Cheapest => 0.0,
                Joining::Uniform => 1.0,
                Joining::Weighted => {
                    libm::exp(((reference - slot.cost) / temperature).min(WEIGHT_CEILING_EXPONENT))
                }
            }
        });
    }

    /// Picks the next cell by the joining rule, re-checking stale attachments.
    fn pick(&mut self) -> Result<(u32, Attachment), StopReason> {
        loop {
            let Some((cheapest_slot, cheapest_cost)) = self.frontier.cheapest() else {
                return Err(StopReason::Full);
            };
            if self
                .params
                .threshold
                .is_some_and(|threshold| cheapest_cost >= threshold)
            {
                return Err(StopReason::Threshold);
            }
            let slot_index = match self.params.joining {
                Joining::Cheapest => cheapest_slot,
                Joining::Uniform | Joining::Weighted => {
                    let mut total = self.frontier.total_weight();
                    let drifted = self.params.joining == Joining::Weighted
                        && (self.weight_reference - cheapest_cost) / self.params.temperature
                            > WEIGHT_CEILING_EXPONENT * 0.5;
                    if total <= WEIGHT_FLOOR || !total.is_finite() || drifted {
                        self.reweigh();
                        total = self.frontier.total_weight();
                    }
                    if total <= 0.0 {
                        return Err(StopReason::Threshold);
                    }
                    let target = unit_interval(&mut self.random) * total;
                    self.frontier.pick_by_weight(target)
                }
            };
            let slot = self.frontier.slots[slot_index as usize];
            if !self.recheck {
                return Ok((slot_index, slot.best));
            }
            let Some((cost, attachment)) = self.best_from_scratch(slot.cell as usize) else {
                return Ok((slot_index, slot.best));
            };
            let still_valid = cost <= slot.cost + 1e-12;
            if still_valid
                && !self
                    .params
                    .threshold
                    .is_some_and(|threshold| cost >= threshold)
            {
                return Ok((slot_index, attachment));
            }
            let weight = self.weight(cost);
            self.frontier.update(slot_index, cost, attachment, weight);
        }
    }

    /// Adds the picked cell's node, splitting a segment when it attaches to one.
    fn join(&mut self, slot_index: u32, attachment: Attachment) {
        let cell = self.frontier.slots[slot_index as usize].cell as usize;
        let (cx, cy) = self.lattice.position(cell);
        let target = if attachment.segment_parent == NONE {
            attachment.target
        } else {
            self.split(attachment)
        };
        let t = target as usize;
        let (vx, vy) = (self.x[t] - cx, self.y[t] - cy);
        let length = (vx * vx + vy * vy).sqrt();
        let (down_x, down_y) = if length > 0.0 {
            (vx / length, vy / length)
        } else {
            (self.down_x[t], self.down_y[t])
        };
        let root = self.root_of[t];
        let (axis_x, axis_y) = self.axes[root as usize];
        let dist = self.dist[t] + self.model.supply_length(vx, vy, axis_x, axis_y);
        let transport = self.transport[t]
            + length * marginal(self.cell_weight, self.cell_weight, self.params.alpha);
        let node = self.push_node(
            cx,
            cy,
            target,
            down_x,
            down_y,
            dist,
            transport,
            root,
            cell as u32,
        );
        self.flow[node as usize] = self.cell_weight;
        self.occupy(cell, node);
        self.maybe_refresh();
    }

    /// Splits the segment `target -> parent` at `along`, returning the new junction node.
    fn split(&mut self, attachment: Attachment) -> u32 {
        let upstream = attachment.target;
        let anchor = self.segment_anchor(upstream, attachment.along);
        let parent = self.parent[upstream as usize];
        let root = self.root_of[upstream as usize];
        let junction = self.push_node(
            anchor.x,
            anchor.y,
            parent,
            anchor.down_x,
            anchor.down_y,
            anchor.dist,
            anchor.transport,
            root,
            NONE,
        );
        self.flow[junction as usize] = self.flow[upstream as usize];
        // The upstream node now drains into the junction; the parent keeps one child.
        self.parent[upstream as usize] = junction;
        self.child_count[parent as usize] -= 1;
        self.child_count[junction as usize] += 1;
        let cell = self.lattice.cell_at(anchor.x, anchor.y);
        self.junction_next[junction as usize] = self.junction_head[cell];
        self.junction_head[cell] = junction;
        self.offer(cell, junction);
        junction
    }

    /// Recomputes flows and transport costs exactly when the network has grown by `refresh`
    /// since the last time, then re-prices every frontier cell's stored attachment.
    fn maybe_refresh(&mut self) {
        if self.params.w_flow == 0.0 {
            return;
        }
        let nodes = self.x.len();
        let due = self.last_refresh_nodes as f64 * (1.0 + self.params.refresh);
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
                self.model.cost(cx, cy, &self.node_anchor(best.target))
            } else {
                self.model
                    .cost(cx, cy, &self.segment_anchor(best.target, best.along))
            };
            self.frontier.slots[index].cost = cost;
        }
        self.reweigh();
    }

    fn refresh_flows(&mut self) {
        let count = self.x.len();
        // Children in compressed rows, then a breadth-first order from the roots.
        self.scratch_start.clear();
        self.scratch_start.resize(count + 1, 0);
        for &parent in &self.parent {
            if parent != NO_PARENT {
                self.scratch_start[parent as usize + 1] += 1;
            }
        }
        for index in 0..count {
            self.scratch_start[index + 1] += self.scratch_start[index];
        }
        self.scratch_children.clear();
        self.scratch_children.resize(count, 0);
        let mut fill: Vec<u32> = self.scratch_start[..count].to_vec();
        for (node, &parent) in self.parent.iter().enumerate() {
            if parent != NO_PARENT {
                self.scratch_children[fill[parent as usize] as usize] = node as u32;
                fill[parent as usize] += 1;
            }
        }
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
            let (start, end) = (
                self.scratch_start[node] as usize,
                self.scratch_start[node + 1] as usize,
            );
            for position in start..end {
                let child = self.scratch_children[position];
                self.scratch_order.push(child);
            }
        }
        for node in 0..count {
            self.flow[node] = if self.cell_of[node] == NONE {
                0.0
            } else {
                self.cell_weight
            };
        }
        for &node in self.scratch_order.iter().rev() {
            let parent = self.parent[node as usize];
            if parent != NO_PARENT {
                self.flow[parent as usize] += self.flow[node as usize];
            }
        }
        let alpha = self.params.alpha;
        let extra = self.cell_weight;
        for &node in &self.scratch_order {
            let node = node as usize;
            let parent = self.parent[node];
            if parent == NO_PARENT {
                self.transport[node] = 0.0;
                continue;
            }
            let parent = parent as usize;
            let (vx, vy) = (self.x[parent] - self.x[node], self.y[parent] - self.y[node]);
            let length = (vx * vx + vy * vy).sqrt();
            self.transport[node] =
                self.transport[parent] + length * marginal(self.flow[node], extra, alpha);
        }
    }
}

/// A uniform draw in [0, 1) from the top 53 bits of one 64-bit output.
fn unit_interval(random: &mut ChaCha8Rng) -> f64 {
    (random.next_u64() >> 11) as f64 * (1.0 / (1u64 << 53) as f64)
}
