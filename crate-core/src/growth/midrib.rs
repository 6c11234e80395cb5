//! The midrib laid before growth (`midrib` > 0): a chain of cells from each root along its axis
//! into the blade, so the rest of the blade grows from a primary vein.
//!
//! In developing leaves the midvein forms first, from the petiole toward the apex, and the
//! secondary veins then branch from it on both sides, the higher orders later (Nelson & Dengler
//! 1997, Plant Cell 9; Sack & Scoffoni 2013, New Phytologist 198). Here the primary vein is
//! laid as the straight run of allowed cells from the root against its outflow (the blade lies
//! in front of the petiole), cut to the fraction `midrib` of that run; every laid cell drains
//! into the one before it. Growth then proceeds as without it, every cell joining the cheapest
//! node within reach, so side veins leave the midrib on both sides.

use super::*;

impl Growth {
    /// Lays one midrib from every root (in root order) while the cell budget lasts.
    pub(super) fn lay_midribs(&mut self, fraction: f64) {
        for root in 0..self.axes.len() {
            let cells = self.midrib_cells(root, fraction);
            let mut previous = root as u32;
            for cell in cells {
                if self.cell_count >= self.refined.run.cells {
                    return;
                }
                let state = self.lattice.state[cell];
                if state == BLOCKED || state < FRONTIER_TAG {
                    // Taken by another root's midrib: this one ends there.
                    break;
                }
                previous = self.lay_cell(cell, previous);
            }
        }
    }

    /// The cells of one root's midrib: the run of allowed cells from the root's cell against
    /// its outflow, one cell length a step, up to the first cell that is blocked or off the
    /// lattice, cut to `fraction` of its length (the root's own cell left out).
    fn midrib_cells(&self, root: usize, fraction: f64) -> Vec<usize> {
        let (axis_x, axis_y) = self.axes[root];
        let root_cell = self.cell_of[root] as usize;
        let (column, row) = self.lattice.column_row(root_cell);
        let (start_x, start_y) = (f64::from(column) + 0.5, f64::from(row) + 0.5);
        let (width, height) = (
            f64::from(self.refined.domain.width),
            f64::from(self.refined.domain.height),
        );
        let mut run: Vec<usize> = Vec::new();
        let mut step = 1.0;
        loop {
            let (x, y) = (start_x - step * axis_x, start_y - step * axis_y);
            if !(0.0..width).contains(&x) || !(0.0..height).contains(&y) {
                break;
            }
            let cell = self.lattice.cell_at(x, y);
            if self.lattice.state[cell] == BLOCKED {
                break;
            }
            if cell != root_cell && run.last() != Some(&cell) {
                run.push(cell);
            }
            step += 1.0;
        }
        let keep = (fraction * run.len() as f64).round() as usize;
        run.truncate(keep.min(run.len()));
        run
    }

    /// Occupies `cell` with a node draining into `target`, as a join does, except that the
    /// supply distance along the midrib counts nothing: the blade is supplied from every point
    /// of the primary vein alike, so secondaries start along its whole length at once instead
    /// of from the petiole upward. Returns the new node.
    fn lay_cell(&mut self, cell: usize, target: u32) -> u32 {
        self.attach_cell(cell, target, Supply::Free)
    }
}
