//! The blade's smooth margin (`blade_margin`): the occupied cells closed, filled and traced, the
//! trace smoothed, as polygons. The outline metrics measure it; the drawing may draw it.
//!
//! The rule, all in cells:
//! 1. *Closing* of the occupied cells by a disc of radius `CLOSING_RADIUS` (a dilation then an
//!    erosion, Serra 1982, Image Analysis and Mathematical Morphology): bays and gaps of the
//!    growth front narrower than about two radii fill in, the blade's own shape stays.
//! 2. *Holes filled*: every empty cell that no 4-connected path of empty cells joins to the
//!    outside becomes blade.
//! 3. *Tracing*: the outer boundary of each 8-connected piece, cell centre to cell centre, by
//!    Moore-neighbour tracing, stopped when the start is entered the way it was first left
//!    (Jacob's criterion; Gonzalez & Woods, Digital Image Processing, boundary following).
//! 4. *Smoothing*: each closed trace of at least `2 SMOOTHING_HALF_WINDOW + 1` points is
//!    replaced by its circular moving average over `2 SMOOTHING_HALF_WINDOW + 1` points,
//!    `SMOOTHING_PASSES` times (common practice, no source): the one-cell stair steps of the
//!    lattice go, curves of a few cells' radius and more stay.
//!
//! The polygon runs through boundary cell centres, so it lies about half a cell inside the
//! cells' edges. Its radius-sized parameters are in cells: at `refine` 2 the margin follows
//! finer details (in physical length) than at `refine` 1.

use crate::network::CellSet;

/// Radius of the closing disc, in cells.
pub const CLOSING_RADIUS: i64 = 2;
/// Half the moving-average window, in trace points.
pub const SMOOTHING_HALF_WINDOW: usize = 3;
/// Passes of the moving average.
pub const SMOOTHING_PASSES: usize = 2;

/// The smooth margin of the occupied cells: one closed polygon per 8-connected piece (after
/// closing), vertices `[x, y]` in cell coordinates (cell `(i, j)` has its centre at
/// `(i + 0.5, j + 0.5)`), not repeating the first vertex. Empty without cells in the lattice.
pub fn blade_margin(cells: &CellSet) -> Vec<Vec<[f64; 2]>> {
    let Some(mut grid) = Grid::of(cells) else {
        return Vec::new();
    };
    grid.close();
    grid.fill_holes();
    grid.traces()
        .into_iter()
        .map(|trace| {
            let points: Vec<[f64; 2]> = trace
                .into_iter()
                .map(|(column, row)| {
                    [
                        (column + grid.first_column) as f64 + 0.5,
                        (row + grid.first_row) as f64 + 0.5,
                    ]
                })
                .collect();
            smooth(points)
        })
        .collect()
}

/// Area (shoelace, not signed) and perimeter of a closed polygon.
pub(crate) fn polygon_area_perimeter(polygon: &[[f64; 2]]) -> (f64, f64) {
    let mut twice_area = 0.0;
    let mut perimeter = 0.0;
    for (index, &[x0, y0]) in polygon.iter().enumerate() {
        let [x1, y1] = polygon[(index + 1) % polygon.len()];
        twice_area += x0 * y1 - x1 * y0;
        perimeter += (x1 - x0).hypot(y1 - y0);
    }
    (twice_area.abs() / 2.0, perimeter)
}

/// The circular moving average, `SMOOTHING_PASSES` times.
fn smooth(mut points: Vec<[f64; 2]>) -> Vec<[f64; 2]> {
    let window = 2 * SMOOTHING_HALF_WINDOW + 1;
    let count = points.len();
    if count < window {
        return points;
    }
    for _ in 0..SMOOTHING_PASSES {
        points = (0..count)
            .map(|index| {
                let mut sum = [0.0, 0.0];
                for offset in 0..window {
                    let [x, y] = points[(index + count + offset - SMOOTHING_HALF_WINDOW) % count];
                    sum[0] += x;
                    sum[1] += y;
                }
                [sum[0] / window as f64, sum[1] / window as f64]
            })
            .collect();
    }
    points
}

/// Flags over the occupied cells' bounding box, padded so that the closing stays inside.
struct Grid {
    first_column: i64,
    first_row: i64,
    columns: i64,
    rows: i64,
    filled: Vec<bool>,
}

/// Which way `Grid::sweep_disc` sweeps.
#[derive(Clone, Copy)]
enum Sweep {
    Dilate,
    Erode,
}

/// The cells `dx^2 + dy^2 <= radius^2` of the disc of `radius`, row by row: `(dy, w)` for the
/// run `-w ..= w` of row `dy`.
fn disc_rows(radius: i64) -> Vec<(i64, i64)> {
    (-radius..=radius)
        .map(|dy| {
            let half_width = (0..=radius)
                .take_while(|dx| dx * dx + dy * dy <= radius * radius)
                .last()
                .unwrap_or(0);
            (dy, half_width)
        })
        .collect()
}

/// The 8 neighbours clockwise (y down), from the west.
const AROUND: [(i64, i64); 8] = [
    (-1, 0),
    (-1, -1),
    (0, -1),
    (1, -1),
    (1, 0),
    (1, 1),
    (0, 1),
    (-1, 1),
];

impl Grid {
    fn of(cells: &CellSet) -> Option<Grid> {
        let width = u64::from(cells.width);
        let total = width * u64::from(cells.height);
        let inside: Vec<(i64, i64)> = cells
            .occupied
            .iter()
            .map(|&index| u64::from(index))
            .filter(|&index| index < total)
            .map(|index| ((index % width) as i64, (index / width) as i64))
            .collect();
        let left = inside.iter().map(|cell| cell.0).min()?;
        let right = inside.iter().map(|cell| cell.0).max()?;
        let top = inside.iter().map(|cell| cell.1).min()?;
        let bottom = inside.iter().map(|cell| cell.1).max()?;
        let pad = CLOSING_RADIUS + 2;
        let mut grid = Grid {
            first_column: left - pad,
            first_row: top - pad,
            columns: right - left + 1 + 2 * pad,
            rows: bottom - top + 1 + 2 * pad,
            filled: Vec::new(),
        };
        grid.filled = vec![false; (grid.columns * grid.rows) as usize];
        for (column, row) in inside {
            let index = grid.index(column - grid.first_column, row - grid.first_row);
            grid.filled[index] = true;
        }
        Some(grid)
    }

    fn index(&self, column: i64, row: i64) -> usize {
        (row * self.columns + column) as usize
    }

    fn get(&self, column: i64, row: i64) -> bool {
        column >= 0
            && row >= 0
            && column < self.columns
            && row < self.rows
            && self.filled[self.index(column, row)]
    }

    /// Dilation then erosion by the disc of radius `CLOSING_RADIUS`.
    fn close(&mut self) {
        let disc = disc_rows(CLOSING_RADIUS);
        self.filled = self.sweep_disc(&disc, Sweep::Dilate);
        self.filled = self.sweep_disc(&disc, Sweep::Erode);
    }

    /// The dilation (some cell of the disc around a cell is filled) or the erosion (every cell
    /// of it is, outside the grid counting as empty) of the filled cells by a disc given row by
    /// row as `(dy, half_width)`. Each row of the disc is a run of cells: the rows are first
    /// swept by runs of every half-width (a run one wider on each side is the narrower run's
    /// sweep swept by `-1 ..= 1`), then each row of the result combines the swept rows the disc
    /// covers. Whole rows at a time, so the loops run over plain slices.
    fn sweep_disc(&self, disc: &[(i64, i64)], sweep: Sweep) -> Vec<bool> {
        let columns = self.columns as usize;
        let combine = |a: bool, b: bool| match sweep {
            Sweep::Dilate => a | b,
            Sweep::Erode => a & b,
        };
        // `by_run[w]`: the filled cells swept along their row by the run `-w ..= w`.
        let widest = disc.iter().map(|&(_, width)| width).max().unwrap_or(0);
        let mut by_run = vec![self.filled.clone()];
        for _ in 0..widest {
            let narrower = &by_run[by_run.len() - 1];
            let mut wider = narrower.clone();
            for (out, cells) in wider
                .chunks_exact_mut(columns)
                .zip(narrower.chunks_exact(columns))
            {
                for (cell, around) in out[1..].iter_mut().zip(cells.windows(3)) {
                    *cell = combine(combine(around[0], around[1]), around[2]);
                }
                // The edge cells' missing neighbour is outside the grid: empty.
                let second = cells.get(1).copied().unwrap_or(false);
                out[0] = combine(combine(false, cells[0]), second);
                if columns > 1 {
                    let last = columns - 1;
                    out[last] = combine(combine(cells[last - 1], cells[last]), false);
                }
            }
            by_run.push(wider);
        }
        let mut swept = vec![matches!(sweep, Sweep::Erode); self.filled.len()];
        for (row, out) in swept.chunks_exact_mut(columns).enumerate() {
            for &(dy, half_width) in disc {
                let across = row as i64 + dy;
                if across < 0 || across >= self.rows {
                    if matches!(sweep, Sweep::Erode) {
                        out.fill(false);
                    }
                    continue;
                }
                let start = across as usize * columns;
                let source = &by_run[half_width as usize][start..start + columns];
                for (cell, &swept_cell) in out.iter_mut().zip(source) {
                    *cell = combine(*cell, swept_cell);
                }
            }
        }
        swept
    }

    /// Fills every empty cell that the outside cannot reach through empty cells.
    fn fill_holes(&mut self) {
        let mut outside = vec![false; self.filled.len()];
        let mut stack: Vec<(i64, i64)> = Vec::new();
        for column in 0..self.columns {
            stack.push((column, 0));
            stack.push((column, self.rows - 1));
        }
        for row in 0..self.rows {
            stack.push((0, row));
            stack.push((self.columns - 1, row));
        }
        while let Some((column, row)) = stack.pop() {
            if column < 0 || row < 0 || column >= self.columns || row >= self.rows {
                continue;
            }
            let index = self.index(column, row);
            if self.filled[index] || outside[index] {
                continue;
            }
            outside[index] = true;
            stack.extend([
                (column - 1, row),
                (column + 1, row),
                (column, row - 1),
                (column, row + 1),
            ]);
        }
        for (cell, &out) in self.filled.iter_mut().zip(&outside) {
            *cell = !out;
        }
    }

    /// The outer boundary of every 8-connected piece, as grid cells in tracing order.
    fn traces(&self) -> Vec<Vec<(i64, i64)>> {
        let mut on_trace = vec![false; self.filled.len()];
        let mut traces = Vec::new();
        for row in 0..self.rows {
            for column in 0..self.columns {
                let index = self.index(column, row);
                // A piece's first cell in row order has an empty west neighbour; every other
                // cell with one lies on a boundary already traced (holes are filled).
                if !self.filled[index] || on_trace[index] || self.get(column - 1, row) {
                    continue;
                }
                let trace = self.trace((column, row));
                for &(c, r) in &trace {
                    let at = self.index(c, r);
                    on_trace[at] = true;
                }
                traces.push(trace);
            }
        }
        traces
    }

    /// Moore-neighbour tracing from `start`, whose west neighbour is empty.
    fn trace(&self, start: (i64, i64)) -> Vec<(i64, i64)> {
        let mut points = vec![start];
        let mut current = start;
        // Direction (index into `AROUND`) of the empty cell tracing came from.
        let mut back = 0usize;
        // Every boundary cell is entered from at most 8 sides.
        let limit = 8 * self.filled.len() + 8;
        for _ in 0..limit {
            let mut next = None;
            for step in 1..8 {
                let direction = (back + step) % 8;
                let (dx, dy) = AROUND[direction];
                let candidate = (current.0 + dx, current.1 + dy);
                if self.get(candidate.0, candidate.1) {
                    let (bx, by) = AROUND[(back + step - 1) % 8];
                    let empty = (current.0 + bx, current.1 + by);
                    let relative = (empty.0 - candidate.0, empty.1 - candidate.1);
                    back = AROUND
                        .iter()
                        .position(|&offset| offset == relative)
                        .unwrap_or(0);
                    next = Some(candidate);
                    break;
                }
            }
            let Some(next) = next else {
                break; // a lone cell
            };
            if current == start && points.len() > 1 && points.get(1) == Some(&next) {
                points.pop();
                break;
            }
            points.push(next);
            current = next;
        }
        points
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn cells_where(width: u32, height: u32, keep: impl Fn(u32, u32) -> bool) -> CellSet {
        let occupied = (0..height)
            .flat_map(|row| (0..width).map(move |column| (column, row)))
            .filter(|&(column, row)| keep(column, row))
            .map(|(column, row)| row * width + column)
            .collect();
        CellSet {
            width,
            height,
            occupied,
        }
    }

    /// A block's trace through its boundary cell centres is the rectangle of those centres:
    /// 2 (m - 1) + 2 (n - 1) points before smoothing (counted by hand).
    #[test]
    fn block_trace_visits_each_boundary_cell_once() {
        let cells = cells_where(20, 10, |c, r| (3..13).contains(&c) && (2..7).contains(&r));
        let grid = Grid::of(&cells).expect("cells");
        let traces = grid.traces();
        assert_eq!(traces.len(), 1);
        assert_eq!(traces[0].len(), 2 * 9 + 2 * 4);
    }

    /// The row-run sweep gives, cell for cell, the dilation and erosion of their definition
    /// (Serra 1982): some, or every, cell `(dx, dy)` with `dx^2 + dy^2 <= r^2` around the
    /// cell is filled, outside the grid counting as empty. Random grids of 0-100 % fill, radii
    /// 1-4, so the disc meets every edge of the grid.
    #[test]
    fn disc_sweeps_follow_the_definition_cell_by_cell() {
        let mut state = 0x853c_49e6_748f_ea9bu64;
        let mut next = |bound: u64| {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            state % bound
        };
        for round in 0..40 {
            let (columns, rows) = (1 + next(30) as i64, 1 + next(30) as i64);
            let percent = next(101);
            let grid = Grid {
                first_column: 0,
                first_row: 0,
                columns,
                rows,
                filled: (0..columns * rows).map(|_| next(100) < percent).collect(),
            };
            let radius = 1 + round % 4;
            let disc: Vec<(i64, i64)> = (-radius..=radius)
                .flat_map(|dy| (-radius..=radius).map(move |dx| (dx, dy)))
                .filter(|&(dx, dy)| dx * dx + dy * dy <= radius * radius)
                .collect();
            let rows_of_disc = disc_rows(radius);
            let dilated = grid.sweep_disc(&rows_of_disc, Sweep::Dilate);
            let eroded = grid.sweep_disc(&rows_of_disc, Sweep::Erode);
            for row in 0..rows {
                for column in 0..columns {
                    let around = |&(dx, dy): &(i64, i64)| grid.get(column + dx, row + dy);
                    let index = grid.index(column, row);
                    assert_eq!(dilated[index], disc.iter().any(around), "round {round}");
                    assert_eq!(eroded[index], disc.iter().all(around), "round {round}");
                }
            }
        }
    }

    /// A comb's teeth one cell apart close into a solid blade: one piece, no holes.
    #[test]
    fn closing_fills_the_bays_of_a_comb() {
        let cells = cells_where(40, 30, |c, r| {
            (5..35).contains(&c) && (5..25).contains(&r) && (r < 8 || c % 2 == 0)
        });
        let margin = blade_margin(&cells);
        assert_eq!(margin.len(), 1);
        let (area, perimeter) = polygon_area_perimeter(&margin[0]);
        // Close to the rectangle of the centres of the closed comb, columns 6..=34 (column 5
        // holds the back only) and rows 5..=24: 28 x 19 = 532, perimeter 94, corners rounded
        // by the smoothing; the comb's own edge, in and out of 14 bays, would be over 600 long.
        assert!((area - 532.0).abs() < 0.06 * 532.0, "area {area}");
        assert!(perimeter < 96.0 * 1.05, "perimeter {perimeter}");
    }

    #[test]
    fn two_pieces_give_two_polygons() {
        let cells = cells_where(60, 20, |c, r| {
            (2..12).contains(&r) && ((3..15).contains(&c) || (30..45).contains(&c))
        });
        assert_eq!(blade_margin(&cells).len(), 2);
        assert!(blade_margin(&cells_where(5, 5, |_, _| false)).is_empty());
    }
}
