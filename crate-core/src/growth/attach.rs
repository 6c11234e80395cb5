//! Attachment search: anchors at nodes and segment interiors, and recomputing a cell's best
//! attachment from scratch (offering a new node to the cells within reach is `offer.rs`).

use super::*;

impl Growth {
    pub(super) fn node_anchor(&self, node: u32) -> Anchor {
        let index = node as usize;
        let record = &self.nodes[index];
        let (axis_x, axis_y) = self.axes[record.root as usize];
        Anchor {
            x: record.x,
            y: record.y,
            down_x: record.down_x,
            down_y: record.down_y,
            dist: record.dist,
            transport: self.transport[index],
            axis_x,
            axis_y,
            is_tip: record.children == 0,
            ground: self.node_ground.get(index).copied().unwrap_or(0.0),
        }
    }

    /// The anchor at fraction `along` of the segment from `node` to its parent.
    pub(super) fn segment_anchor(&self, node: u32, along: f64) -> Anchor {
        let index = node as usize;
        let parent = self.parent[index] as usize;
        let (near, far) = (&self.nodes[index], &self.nodes[parent]);
        let x = near.x + along * (far.x - near.x);
        let y = near.y + along * (far.y - near.y);
        let (axis_x, axis_y) = self.axes[near.root as usize];
        let to_parent_x = far.x - x;
        let to_parent_y = far.y - y;
        let rest = (to_parent_x * to_parent_x + to_parent_y * to_parent_y).sqrt();
        Anchor {
            x,
            y,
            down_x: near.down_x,
            down_y: near.down_y,
            dist: far.dist
                + self
                    .model
                    .supply_length(to_parent_x, to_parent_y, axis_x, axis_y),
            transport: self.transport[parent]
                + rest * marginal(self.flow[index], self.cell_weight, self.refined.costs.alpha),
            axis_x,
            axis_y,
            is_tip: false,
            ground: match &self.surface {
                Some(surface) => surface.at(x, y),
                None => 0.0,
            },
        }
    }

    /// Cheapest interior point of the segment `node -> parent` for a cell at `(cx, cy)`: the
    /// foot of the perpendicular, and the point that makes a 45 degree junction downstream.
    /// With `check_clear`, points whose segment from the cell passes over a blocked cell are
    /// passed over (`keep_clear`).
    pub(super) fn best_on_segment(
        &self,
        cx: f64,
        cy: f64,
        ground: f64,
        node: u32,
        check_clear: bool,
    ) -> Option<(f64, Attachment)> {
        let index = node as usize;
        let parent = self.parent[index];
        if parent == NO_PARENT {
            return None;
        }
        let (ax, ay) = (self.nodes[index].x, self.nodes[index].y);
        let (bx, by) = (self.nodes[parent as usize].x, self.nodes[parent as usize].y);
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
            if check_clear && self.meets_blocked((cx, cy), (anchor.x, anchor.y)) {
                continue;
            }
            let cost = self.model.cost(cx, cy, ground, &anchor);
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
    pub(super) fn best_from_scratch(&self, cell: usize) -> Option<(f64, Attachment)> {
        let mut best: Option<(f64, Attachment)> = None;
        self.each_candidate(cell, |cost, attachment| {
            if best.is_none_or(|(best_cost, _)| cost < best_cost) {
                best = Some((cost, attachment));
            }
        });
        best
    }

    /// Every attachment of `cell` to a node or segment within reach with its cost, appended to
    /// `candidates` in the order `best_from_scratch` considers them.
    pub(super) fn candidates_of(&self, cell: usize, candidates: &mut Vec<(f64, Attachment)>) {
        self.each_candidate(cell, |cost, attachment| candidates.push((cost, attachment)));
    }

    /// Calls `visit` with every attachment of `cell` within reach and its cost.
    fn each_candidate(&self, cell: usize, mut visit: impl FnMut(f64, Attachment)) {
        let (column, row) = self.lattice.column_row(cell);
        let (cx, cy) = self.lattice.position(cell);
        let ground = self.cell_ground(cell, cx, cy);
        for spot in &self.lattice.spots {
            let Some(other) = self.lattice.neighbour(column, row, spot.dx, spot.dy) else {
                continue;
            };
            let state = self.lattice.state[other];
            // Nodes in `other` and their segments end within reach of it (as in `offer`).
            let check_clear = self.clear_checks(other);
            let mut candidates = [NONE; 2];
            if state < FRONTIER_TAG {
                candidates[0] = state;
            }
            if self.refined.run.attach_to_segments {
                candidates[1] = self.junction_head[other];
            }
            for (kind, &first) in candidates.iter().enumerate() {
                let mut node = first;
                while node != NONE {
                    let (x, y) = (self.nodes[node as usize].x, self.nodes[node as usize].y);
                    if !check_clear || !self.meets_blocked((cx, cy), (x, y)) {
                        let cost = if self.model.length_only {
                            self.model.length_cost(cx, cy, x, y)
                        } else {
                            self.model.cost(cx, cy, ground, &self.node_anchor(node))
                        };
                        visit(
                            cost,
                            Attachment {
                                target: node,
                                segment_parent: NONE,
                                along: 0.0,
                            },
                        );
                    }
                    if self.refined.run.attach_to_segments {
                        if let Some((cost, attachment)) =
                            self.best_on_segment(cx, cy, ground, node, check_clear)
                        {
                            visit(cost, attachment);
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
    }
}

// Keeping segments off blocked cells (`keep_clear`).
impl Growth {
    /// Whether segments from cells within reach of `cell` to a node in it (or to a point of
    /// that node's segment) may pass over a blocked cell, and so must be walked.
    #[inline]
    pub(super) fn clear_checks(&self, cell: usize) -> bool {
        self.blocked_cells
            .as_ref()
            .is_some_and(|cells| cells.near(cell))
    }

    /// Whether the straight segment from `from` to `to` (in cells) passes over a cell outside
    /// the allowed region (`clearance::BlockedCells::segment_meets`); false without `keep_clear`.
    pub(super) fn meets_blocked(&self, from: (f64, f64), to: (f64, f64)) -> bool {
        let Some(cells) = &self.blocked_cells else {
            return false;
        };
        let width = self.lattice.width();
        cells.segment_meets(from, to, |x, y| {
            self.lattice.state[y * width + x] == BLOCKED
        })
    }
}

// The ground under cells and the weight of cells (spot levels and runoff zones).
impl Growth {
    /// The ground under `cell`'s node at `(cx, cy)` (its jittered position), remembered the
    /// first time it is asked for; 0 without spot levels.
    pub(super) fn cell_ground_remembered(&mut self, cell: usize, cx: f64, cy: f64) -> f64 {
        let Some(surface) = &self.surface else {
            return 0.0;
        };
        let known = self.cell_ground[cell];
        if !known.is_nan() {
            return known;
        }
        let ground = surface.at(cx, cy);
        self.cell_ground[cell] = ground;
        ground
    }

    /// `cell_ground_remembered` without remembering: the remembered value when there is one.
    pub(super) fn cell_ground(&self, cell: usize, cx: f64, cy: f64) -> f64 {
        match &self.surface {
            None => 0.0,
            Some(surface) => match self.cell_ground[cell] {
                known if !known.is_nan() => known,
                _ => surface.at(cx, cy),
            },
        }
    }

    /// The flow weight a cell adds itself: its runoff zone's coefficient, or `runoff` outside
    /// every zone (and always without zones).
    #[inline]
    pub(super) fn own_weight(&self, cell: usize) -> f64 {
        match self.zone_of.get(cell) {
            Some(&zone) if zone > 0 => self.zone_weights[zone as usize - 1],
            _ => self.cell_weight,
        }
    }
}
