//! `BlockedCells`: which cells of the lattice lie near a cell outside the allowed region
//! (obstacles, outside the outline or mask), one bit a cell, and whether a straight segment
//! passes over such a cell (parameter `keep_clear`).
//!
//! A segment is walked cell by cell with the voxel traversal of Amanatides & Woo (1987, "A fast
//! voxel traversal algorithm for ray tracing", Eurographics '87, 3-10), in two dimensions: from
//! the cell holding its start, step into the next cell whose edge the segment reaches first,
//! until the cell holding its end. Which cells count: every cell whose inside the segment
//! passes through, its two end cells included. Where the segment passes exactly through a
//! corner of the lattice it touches the two cells beside that corner at one point only; they
//! count too (a wall of cells meeting corner to corner lets nothing through), so the rule is
//! on the safe side. A point on a cell edge belongs to the cell to its right (below), as
//! `floor` places it.

/// Which cells have a blocked cell within `margin` columns and rows (see the module comment).
pub(crate) struct BlockedCells {
    width: usize,
    height: usize,
    /// One bit per cell, row-major: set when a blocked cell lies in the square of cells
    /// `margin` either side of it.
    near: Vec<u64>,
}

impl BlockedCells {
    /// The near bits of a lattice of `width` x `height` cells whose cell `i` is blocked when
    /// `blocked(i)`. A square window is the sum of a row window and a column window, each
    /// slid along once (a box filter), so the cost is a few operations a cell for any margin.
    pub fn new(
        width: usize,
        height: usize,
        margin: usize,
        blocked: impl Fn(usize) -> bool,
    ) -> BlockedCells {
        let mut near = vec![0u64; (width * height).div_ceil(64)];
        let window = 2 * margin + 1;
        // Row windows of the last `window` rows (ring), and per column how many of them are set.
        let mut rows_seen = vec![vec![false; width]; window];
        let mut column_counts = vec![0u32; width];
        let mut prefix = vec![0u32; width + 1];
        for row in 0..height + margin {
            let slot = row % window;
            if row >= window {
                for (count, &was) in column_counts.iter_mut().zip(&rows_seen[slot]) {
                    *count -= u32::from(was);
                }
            }
            if row < height {
                for column in 0..width {
                    prefix[column + 1] = prefix[column] + u32::from(blocked(row * width + column));
                }
                for column in 0..width {
                    let low = column.saturating_sub(margin);
                    let high = (column + margin + 1).min(width);
                    let any = prefix[high] > prefix[low];
                    rows_seen[slot][column] = any;
                    column_counts[column] += u32::from(any);
                }
            } else {
                rows_seen[slot].iter_mut().for_each(|value| *value = false);
            }
            if row >= margin {
                let target = row - margin;
                for (column, &count) in column_counts.iter().enumerate() {
                    if count > 0 {
                        let cell = target * width + column;
                        near[cell / 64] |= 1 << (cell % 64);
                    }
                }
            }
        }
        BlockedCells {
            width,
            height,
            near,
        }
    }

    /// Whether a blocked cell lies within the margin of `cell`.
    #[inline]
    pub fn near(&self, cell: usize) -> bool {
        self.near[cell / 64] & (1 << (cell % 64)) != 0
    }

    /// Whether the segment from `from` to `to` (in cells) passes over a blocked cell (see the
    /// module comment for which cells count). `blocked(column, row)` answers for a cell of
    /// the lattice.
    pub fn segment_meets(
        &self,
        from: (f64, f64),
        to: (f64, f64),
        blocked: impl Fn(usize, usize) -> bool,
    ) -> bool {
        let (start_x, start_y) = (from.0.floor() as i64, from.1.floor() as i64);
        let (end_x, end_y) = (to.0.floor() as i64, to.1.floor() as i64);
        let (width, height) = (self.width as i64, self.height as i64);
        let cell_blocked = |x: i64, y: i64| {
            (0..width).contains(&x) && (0..height).contains(&y) && blocked(x as usize, y as usize)
        };
        let (dx, dy) = (to.0 - from.0, to.1 - from.1);
        let step_x: i64 = if dx > 0.0 { 1 } else { -1 };
        let step_y: i64 = if dy > 0.0 { 1 } else { -1 };
        // Parameter t along the segment (0 at `from`, 1 at `to`) at which it reaches the next
        // vertical (x) and horizontal (y) cell edge, and the step of t from one edge to the
        // next (Amanatides & Woo 1987, tMaxX, tMaxY, tDeltaX, tDeltaY).
        let (mut x, mut y) = (start_x, start_y);
        let mut next_x = if dx > 0.0 {
            ((x + 1) as f64 - from.0) / dx
        } else if dx < 0.0 {
            (x as f64 - from.0) / dx
        } else {
            f64::INFINITY
        };
        let mut next_y = if dy > 0.0 {
            ((y + 1) as f64 - from.1) / dy
        } else if dy < 0.0 {
            (y as f64 - from.1) / dy
        } else {
            f64::INFINITY
        };
        let delta_x = if dx != 0.0 {
            1.0 / dx.abs()
        } else {
            f64::INFINITY
        };
        let delta_y = if dy != 0.0 {
            1.0 / dy.abs()
        } else {
            f64::INFINITY
        };
        // Every step moves one column or one row toward the end cell, so there are at most
        // this many (a bound that also ends the walk if rounding should miss the end cell).
        let mut steps_left = (end_x - start_x).abs() + (end_y - start_y).abs();
        loop {
            if cell_blocked(x, y) {
                return true;
            }
            if steps_left <= 0 || (x, y) == (end_x, end_y) {
                return false;
            }
            if next_x < next_y {
                x += step_x;
                next_x += delta_x;
                steps_left -= 1;
            } else if next_y < next_x {
                y += step_y;
                next_y += delta_y;
                steps_left -= 1;
            } else {
                // Exactly through a corner: the two cells beside it count, then the diagonal.
                if cell_blocked(x + step_x, y) || cell_blocked(x, y + step_y) {
                    return true;
                }
                x += step_x;
                y += step_y;
                next_x += delta_x;
                next_y += delta_y;
                steps_left -= 2;
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A lattice from rows of text: `#` blocked, `.` allowed; row 0 is the first line.
    fn lattice(rows: &[&str], margin: usize) -> (BlockedCells, Vec<bool>, usize) {
        let width = rows[0].len();
        let cells: Vec<bool> = rows
            .iter()
            .flat_map(|row| row.bytes().map(|byte| byte == b'#'))
            .collect();
        let table = BlockedCells::new(width, rows.len(), margin, |cell| cells[cell]);
        (table, cells, width)
    }

    fn meets(rows: &[&str], from: (f64, f64), to: (f64, f64)) -> bool {
        let (table, cells, width) = lattice(rows, 1);
        table.segment_meets(from, to, |x, y| cells[y * width + x])
    }

    // The near bits against a direct count over each cell's square, on a drawing.
    #[test]
    fn near_bits_mark_the_square_around_each_blocked_cell() {
        let rows = [
            "........", ".#......", "........", "........", "......#.", "........",
        ];
        let (width, height) = (rows[0].len(), rows.len());
        for margin in 0..4 {
            let (table, cells, _) = lattice(&rows, margin);
            for cell in 0..width * height {
                let (x, y) = ((cell % width) as i64, (cell / width) as i64);
                let m = margin as i64;
                let direct = (0..width * height).any(|other| {
                    let (ox, oy) = ((other % width) as i64, (other / width) as i64);
                    cells[other] && (ox - x).abs() <= m && (oy - y).abs() <= m
                });
                assert_eq!(table.near(cell), direct, "margin {margin}, cell ({x}, {y})");
            }
        }
        // By hand: margin 1 around (1, 1) covers columns 0-2 of rows 0-2, and no more.
        let (table, _, _) = lattice(&rows, 1);
        assert!(table.near(0) && table.near(2 * width + 2));
        assert!(!table.near(3) && !table.near(3 * width));
    }

    // Segments drawn by hand on a 5 x 3 lattice with a one-cell wall at column 2, rows 0-1.
    #[test]
    fn a_segment_across_a_wall_meets_it_and_one_round_it_does_not() {
        let rows = ["..#..", "..#..", "....."];
        assert!(meets(&rows, (0.5, 0.5), (4.5, 0.5)));
        assert!(meets(&rows, (0.5, 1.5), (4.5, 0.5)));
        // Under the wall, along row 2.
        assert!(!meets(&rows, (0.5, 2.5), (4.5, 2.5)));
        // From cell (1, 1) to cell (2, 2) through the corner (2, 2) under the wall's lower
        // end: it touches the blocked cell (2, 1) at that point only, which counts.
        assert!(meets(&rows, (1.5, 1.5), (2.5, 2.5)));
        // Slightly lower it passes under the wall: it reaches y = 2 at x = 1.9, then x = 2 at
        // y = 2.1, inside cell (2, 2).
        assert!(!meets(&rows, (1.5, 1.6), (2.5, 2.6)));
        // Within one cell, or between two allowed neighbours.
        assert!(!meets(&rows, (0.2, 0.2), (0.8, 0.9)));
        assert!(!meets(&rows, (3.5, 0.5), (4.5, 1.5)));
    }

    // Two cells meeting corner to corner form a wall a diagonal segment cannot slip through.
    #[test]
    fn a_diagonal_wall_holds_at_its_corners() {
        let rows = ["#.", ".#"];
        assert!(meets(&rows, (1.5, 0.5), (0.5, 1.5)));
        let rows = [".#", "#."];
        assert!(meets(&rows, (0.5, 0.5), (1.5, 1.5)));
    }

    /// An independent check: points sampled densely along random segments; whenever one lies
    /// in a blocked cell the traversal must say the segment meets one.
    #[test]
    fn the_walk_agrees_with_dense_sampling() {
        let rows = [
            "......#.....",
            "..##..#.....",
            "......#..#..",
            "....#.......",
            ".#......##..",
            "......#.....",
        ];
        let (table, cells, width) = lattice(&rows, 1);
        let height = rows.len();
        let mut state = 0x2545_f491_4f6c_dd1d_u64;
        let mut unit = || {
            // xorshift64 (Marsaglia 2003, J. Stat. Softw. 8(14)); a test-only stream.
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            (state >> 11) as f64 / (1u64 << 53) as f64
        };
        let mut met = 0;
        for _ in 0..4000 {
            let from = (unit() * width as f64, unit() * height as f64);
            let to = (
                (from.0 + (unit() - 0.5) * 9.0).clamp(0.0, width as f64 - 1e-9),
                (from.1 + (unit() - 0.5) * 9.0).clamp(0.0, height as f64 - 1e-9),
            );
            let walked = table.segment_meets(from, to, |x, y| cells[y * width + x]);
            let samples = 4000;
            let sampled = (0..=samples).any(|k| {
                let t = k as f64 / samples as f64;
                let (x, y) = (from.0 + t * (to.0 - from.0), from.1 + t * (to.1 - from.1));
                cells[y.floor() as usize * width + x.floor() as usize]
            });
            if sampled {
                assert!(
                    walked,
                    "{from:?} -> {to:?}: a sample lies in a blocked cell"
                );
                met += 1;
            }
        }
        assert!(met > 500, "only {met} segments met a blocked cell");
    }
}
