//! Offering a new node to the cells within reach, in three sweeps over the search radius's
//! spots (nearest first): a sweep without branches keeps the cells that may take the node (free
//! cells, and frontier cells whose kept cost the node's cost floor at the spot's least length
//! does not already reach); a second, also without branches, computes their positions and
//! distances to the node and passes over the frontier cells that the floor at their very
//! length reaches; the last prices the node for the cells left and inserts or updates them, in
//! the order of the spots.
//!
//! Which cells are kept depends only on their states and kept costs, and what the last sweep
//! changes in one cell touches no other cell's, so reading them all first keeps the very
//! cells, in the very order, that deciding cell by cell does. Deciding without branches
//! matters because the decisions follow no pattern (about half the cells within reach are
//! taken, and a kept cost is beaten or not as the geometry falls), and a processor that
//! guesses a branch wrong throws away the work after it.

use super::cost::CostFloor;
use super::lattice::Spot;
use super::*;

/// A cell within reach that may take the offered node.
#[derive(Clone, Copy, Debug, Default)]
pub(super) struct Reached {
    cell: u32,
    state: u32,
    column: u32,
    row: u32,
    /// The cost a frontier cell keeps (its slot's); unused for a free cell.
    kept: f64,
    /// The cell's position and its computed distance to the node (set by the second sweep).
    x: f64,
    y: f64,
    length: f64,
}

impl Growth {
    /// Offers `node` (and its segment, when segments may be joined) to the cells within the
    /// search radius of `centre_cell`.
    pub(super) fn offer(&mut self, centre_cell: usize, node: u32) {
        let node_anchor = self.node_anchor(node);
        let segment =
            self.refined.run.attach_to_segments && self.parent[node as usize] != NO_PARENT;
        // A frontier cell keeps its attachment unless the node is strictly cheaper, so when a
        // floor of the node's cost is already no cheaper its cost need not be computed.
        let floor = (!segment && self.model.has_floor()).then(|| self.model.floor(&node_anchor));
        // The floor at each distinct least length of the spots; NaN, which no comparison
        // finds reached, without a floor.
        let mut floor_costs = std::mem::take(&mut self.scratch_floor_costs);
        floor_costs.clear();
        floor_costs.extend(self.lattice.spot_floors.iter().map(|&length| match floor {
            Some(floor) => floor.at(length),
            None => f64::NAN,
        }));
        // Taken out for the sweeps, so that the last may change the lattice's states.
        let spots = std::mem::take(&mut self.lattice.spots);
        let mut reached = std::mem::take(&mut self.scratch_reached);
        reached.resize(spots.len(), Reached::default());
        let count = self.reach_cells(centre_cell, &spots, &floor_costs, &mut reached);
        self.scratch_floor_costs = floor_costs;
        let count = self.place_reached(&node_anchor, floor, &mut reached[..count]);
        self.price_reached(centre_cell, node, &node_anchor, segment, &reached[..count]);
        self.scratch_reached = reached;
        self.lattice.spots = spots;
    }

    /// The first sweep: writes the cells within reach that may take the node to the front of
    /// `reached`, in the order of `spots`, and returns how many. A free cell may; a frontier
    /// cell may unless the node's cost floor at the spot's least length (`floor_costs`, by
    /// `Spot::floor_index`) is no cheaper than its kept cost.
    fn reach_cells(
        &self,
        centre_cell: usize,
        spots: &[Spot],
        floor_costs: &[f64],
        reached: &mut [Reached],
    ) -> usize {
        let (column, row) = self.lattice.column_row(centre_cell);
        // Away from the lattice's edges (nearly every offer) no neighbour needs a bounds test.
        let inside = self.lattice.reaches_inside(column, row);
        let states = &self.lattice.state;
        let costs = &self.frontier.costs;
        let mut count = 0;
        for spot in spots {
            let (cell, cell_column, cell_row) = if inside {
                self.lattice.step_from(centre_cell, column, row, spot)
            } else {
                match self.lattice.neighbour_at(column, row, spot.dx, spot.dy) {
                    Some(found) => found,
                    None => continue,
                }
            };
            let state = states[cell];
            let free = state == FREE;
            let frontier = (FRONTIER_TAG..FREE).contains(&state);
            // Slot 0 stands in for cells that are not on the frontier (read, never used).
            let slot = if frontier {
                (state & !FRONTIER_TAG) as usize
            } else {
                0
            };
            let kept = costs.get(slot).copied().unwrap_or(f64::INFINITY);
            let reached_by_floor = floor_costs[spot.floor_index as usize] >= kept;
            // Only what this sweep knows: the second sweep sets the rest.
            let entry = &mut reached[count];
            entry.cell = cell as u32;
            entry.state = state;
            entry.column = cell_column as u32;
            entry.row = cell_row as u32;
            entry.kept = kept;
            count += usize::from(free | (frontier & !reached_by_floor));
        }
        count
    }

    /// The second sweep: computes each kept cell's position and distance to the node and, with
    /// a cost floor, passes over the frontier cells whose kept cost the floor at that very
    /// length (the length the cost takes, by the same expression from the same positions)
    /// already reaches; returns how many are left at the front of `reached`.
    fn place_reached(
        &self,
        node_anchor: &Anchor,
        floor: Option<CostFloor>,
        reached: &mut [Reached],
    ) -> usize {
        let mut count = 0;
        for index in 0..reached.len() {
            let cell = reached[index];
            let (x, y) = self.lattice.position_at(
                cell.cell as usize,
                cell.column as usize,
                cell.row as usize,
            );
            let (vx, vy) = (node_anchor.x - x, node_anchor.y - y);
            let length = (vx * vx + vy * vy).sqrt();
            let reached_by_floor = match floor {
                Some(floor) => floor.at(length) >= cell.kept,
                None => false,
            };
            let passed = (cell.state != FREE) & reached_by_floor;
            reached[count] = Reached {
                x,
                y,
                length,
                ..cell
            };
            count += usize::from(!passed);
        }
        count
    }

    /// The last sweep: prices the node (and its segment) for each cell left, inserts the free
    /// ones into the frontier and updates the frontier cells it beats.
    fn price_reached(
        &mut self,
        centre_cell: usize,
        node: u32,
        node_anchor: &Anchor,
        segment: bool,
        reached: &[Reached],
    ) {
        // A copy the loop's writes cannot touch, so its fields stay in registers.
        let model = self.model;
        // With `keep_clear`, segments near blocked cells are walked (`meets_blocked`).
        let check_clear = self.clear_checks(centre_cell);
        let (node_x, node_y) = (node_anchor.x, node_anchor.y);
        for cell in reached {
            let (cx, cy) = (cell.x, cell.y);
            let ground = self.cell_ground_remembered(cell.cell as usize, cx, cy);
            let node_clear = !check_clear || !self.meets_blocked((cx, cy), (node_x, node_y));
            let mut found = node_clear.then(|| {
                let attachment = Attachment {
                    target: node,
                    segment_parent: NONE,
                    along: 0.0,
                };
                let (vx, vy) = (node_x - cx, node_y - cy);
                let cost = model.cost_at_length(vx, vy, cell.length, ground, node_anchor);
                (cost, attachment)
            });
            if segment {
                if let Some((cost, attachment)) =
                    self.best_on_segment(cx, cy, ground, node, check_clear)
                {
                    if found.is_none_or(|(best_cost, _)| cost < best_cost) {
                        found = Some((cost, attachment));
                    }
                }
            }
            // Every way to the node passes over blocked ground: nothing is offered.
            let Some((best_cost, best)) = found else {
                continue;
            };
            if cell.state == FREE {
                let slot = Slot {
                    cell: cell.cell,
                    best,
                };
                self.note_cost(best_cost);
                let index = self.frontier.insert(slot, best_cost);
                self.lattice.state[cell.cell as usize] = FRONTIER_TAG | index;
            } else if best_cost < cell.kept {
                self.note_cost(best_cost);
                self.frontier
                    .update(cell.state & !FRONTIER_TAG, best_cost, best);
            }
        }
    }
}
