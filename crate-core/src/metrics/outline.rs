//! Outline of the occupied lattice cells (`OutlineMeasures`): area, marching-squares perimeter,
//! the circularity of the smooth margin (`margin`), the aspect ratio of the cell centres'
//! covariance, and the blade's length to width ratio (`blade_length_width`).

use crate::network::CellSet;

/// Outline values; all `None` when no occupied cell lies inside the lattice.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct OutlineMeasures {
    /// Occupied cells times the squared cell size, in squared length units.
    pub(crate) area: Option<f64>,
    /// Marching-squares contour length, in length units.
    pub(crate) perimeter: Option<f64>,
    /// `4 pi A / P^2` of the smooth margin (`margin`), in cell units.
    pub(crate) circularity: Option<f64>,
    /// `sqrt(lambda_1 / lambda_2)` of the covariance of occupied cell centres.
    pub(crate) aspect_ratio: Option<f64>,
}

/// Measures the outline of the occupied cells.
///
/// Indices outside the lattice are ignored and repeated indices count once. The area and the
/// perimeter need a positive, finite `cell_size`; circularity and aspect ratio do not depend on
/// it and are computed in cell units.
pub(crate) fn measure_outline(cells: &CellSet, cell_size: f64) -> OutlineMeasures {
    let measures = measure_outline_of(&OccupiedCells::new(cells, true), cell_size);
    OutlineMeasures {
        circularity: measures.circularity.and(margin_circularity(cells)),
        ..measures
    }
}

/// Circularity `4 pi A / P^2` of the smooth margin (`margin::blade_margin`), with `A` and `P`
/// summed over its polygons; `None` when the margin has no length (a lone cell).
fn margin_circularity(cells: &CellSet) -> Option<f64> {
    let (area, perimeter) = super::margin::blade_margin(cells)
        .iter()
        .map(|polygon| super::margin::polygon_area_perimeter(polygon))
        .fold((0.0, 0.0), |(a, p), (area, perimeter)| {
            (a + area, p + perimeter)
        });
    (perimeter > 0.0).then(|| 4.0 * core::f64::consts::PI * area / (perimeter * perimeter))
}

/// `measure_outline` on cells already gathered.
fn measure_outline_of(grid: &OccupiedCells, cell_size: f64) -> OutlineMeasures {
    let none = OutlineMeasures {
        area: None,
        perimeter: None,
        circularity: None,
        aspect_ratio: None,
    };
    let cell_count = grid.count;
    if cell_count == 0 {
        return none;
    }
    let perimeter_in_cells = grid.marching_squares_length();
    let circularity = (perimeter_in_cells > 0.0).then(|| {
        4.0 * core::f64::consts::PI * cell_count as f64 / (perimeter_in_cells * perimeter_in_cells)
    });
    let has_scale = cell_size > 0.0 && cell_size.is_finite();
    OutlineMeasures {
        area: has_scale.then_some(cell_count as f64 * cell_size * cell_size),
        perimeter: has_scale.then_some(perimeter_in_cells * cell_size),
        circularity,
        aspect_ratio: grid.aspect_ratio(),
    }
}

/// Length to width ratio of a blade (the laminar L:W ratio of leaf-architecture manuals):
/// the extent of the occupied cells along `axis` (base to apex, the midrib's direction) over
/// their largest extent across it, each cell counted as its unit square (extents of cell
/// centres plus one cell). `None` when no cell lies inside the lattice or the axis has no
/// direction. Independent of the cell size.
pub fn blade_length_width(cells: &CellSet, axis: [f64; 2]) -> Option<f64> {
    let norm = (axis[0] * axis[0] + axis[1] * axis[1]).sqrt();
    if !(norm > 0.0 && norm.is_finite()) {
        return None;
    }
    let (ux, uy) = (axis[0] / norm, axis[1] / norm);
    let width = u64::from(cells.width);
    let total = width * u64::from(cells.height);
    let mut along = (f64::INFINITY, f64::NEG_INFINITY);
    let mut across = (f64::INFINITY, f64::NEG_INFINITY);
    for &index in &cells.occupied {
        let index = u64::from(index);
        if index >= total {
            continue;
        }
        let (x, y) = ((index % width) as f64 + 0.5, (index / width) as f64 + 0.5);
        let a = x * ux + y * uy;
        let c = x * uy - y * ux;
        along = (along.0.min(a), along.1.max(a));
        across = (across.0.min(c), across.1.max(c));
    }
    (along.0 <= along.1).then(|| (along.1 - along.0 + 1.0) / (across.1 - across.0 + 1.0))
}

/// Occupied cells inside the lattice, distinct, in row-major order: a grid of flags over the
/// cells' bounding box (with a margin of one empty cell) when the cells fill enough of it, or
/// the sorted indices when they are few and spread out. Both give the same values to the bit:
/// the grid visits cells and squares in the same row-major order as the sorted list, and the
/// squares it visits beyond the list's hold no contour (they add exactly 0).
struct OccupiedCells {
    /// Lattice width in cells.
    width: u64,
    /// Lattice height in cells.
    height: u64,
    /// Number of distinct occupied cells inside the lattice.
    count: usize,
    /// The cells, in the layout that suits their spread.
    layout: CellLayout,
}

/// How `OccupiedCells` holds its cells.
enum CellLayout {
    /// Flags over the bounding box grown by one cell on every side, row-major.
    Grid(BoxGrid),
    /// Sorted, distinct row-major indices below `width * height`.
    Sorted(Vec<u64>),
}

/// Flags of the occupied cells over their bounding box with a one-cell empty margin.
struct BoxGrid {
    /// Column of the margin's first column (the leftmost occupied column minus one).
    first_column: i64,
    /// Row of the margin's first row (the top occupied row minus one).
    first_row: i64,
    /// Columns of the grid, margins included.
    columns: usize,
    /// Rows of the grid, margins included.
    rows: usize,
    /// Whether each grid cell is occupied, row-major.
    flags: Vec<bool>,
}

/// A grid is used when it holds at most this many flags per occupied cell (plus
/// `GRID_ALLOWANCE`): a grown network fills most of its box, a few scattered cells from a
/// record do not.
const GRID_FLAGS_PER_CELL: usize = 16;
/// Flags a grid may always hold, whatever the cell count.
const GRID_ALLOWANCE: usize = 1 << 16;

impl BoxGrid {
    fn flag_index(&self, column: i64, row: i64) -> Option<usize> {
        let (column, row) = (column - self.first_column, row - self.first_row);
        if column < 0 || row < 0 || column as usize >= self.columns || row as usize >= self.rows {
            return None;
        }
        Some(row as usize * self.columns + column as usize)
    }
}

impl OccupiedCells {
    /// Keeps the in-lattice indices of `cells`, without repeats, in row-major order; in a grid
    /// when `allow_grid` and the cells fill enough of their box, else sorted.
    fn new(cells: &CellSet, allow_grid: bool) -> OccupiedCells {
        let width = u64::from(cells.width);
        let height = u64::from(cells.height);
        let lattice_cells = width * height;
        let inside = || {
            cells
                .occupied
                .iter()
                .map(|&index| u64::from(index))
                .filter(move |&index| index < lattice_cells)
        };
        let mut bounds: Option<(u64, u64, u64, u64)> = None;
        for index in inside() {
            let (column, row) = (index % width, index / width);
            bounds = Some(match bounds {
                None => (column, column, row, row),
                Some((left, right, top, bottom)) => (
                    left.min(column),
                    right.max(column),
                    top.min(row),
                    bottom.max(row),
                ),
            });
        }
        let listed = cells.occupied.len();
        let grid = bounds.and_then(|(left, right, top, bottom)| {
            let columns = usize::try_from(right - left + 3).ok()?;
            let rows = usize::try_from(bottom - top + 3).ok()?;
            let flag_count = columns.checked_mul(rows)?;
            let budget = listed
                .saturating_mul(GRID_FLAGS_PER_CELL)
                .saturating_add(GRID_ALLOWANCE);
            (allow_grid && flag_count <= budget).then(|| BoxGrid {
                first_column: left as i64 - 1,
                first_row: top as i64 - 1,
                columns,
                rows,
                flags: vec![false; flag_count],
            })
        });
        match grid {
            Some(mut grid) => {
                let mut count = 0;
                for index in inside() {
                    let (column, row) = ((index % width) as i64, (index / width) as i64);
                    if let Some(flag) = grid.flag_index(column, row) {
                        if !grid.flags[flag] {
                            grid.flags[flag] = true;
                            count += 1;
                        }
                    }
                }
                OccupiedCells {
                    width,
                    height,
                    count,
                    layout: CellLayout::Grid(grid),
                }
            }
            None => {
                let mut sorted_indices: Vec<u64> = inside().collect();
                sorted_indices.sort_unstable();
                sorted_indices.dedup();
                OccupiedCells {
                    width,
                    height,
                    count: sorted_indices.len(),
                    layout: CellLayout::Sorted(sorted_indices),
                }
            }
        }
    }

    /// Column and row of each occupied cell, in row-major order.
    fn column_rows(&self) -> Box<dyn Iterator<Item = (i64, i64)> + '_> {
        match &self.layout {
            // `width` is positive whenever an index passed the filter, and both parts fit in
            // i64 because indices are below 2^32.
            CellLayout::Sorted(sorted_indices) => Box::new(
                sorted_indices
                    .iter()
                    .map(|&index| ((index % self.width) as i64, (index / self.width) as i64)),
            ),
            CellLayout::Grid(grid) => Box::new(
                grid.flags
                    .iter()
                    .enumerate()
                    .filter(|&(_, &occupied)| occupied)
                    .map(|(flag, _)| {
                        (
                            grid.first_column + (flag % grid.columns) as i64,
                            grid.first_row + (flag / grid.columns) as i64,
                        )
                    }),
            ),
        }
    }

    /// Whether the cell at `column`, `row` is occupied; cells outside the lattice are empty.
    fn is_occupied(&self, column: i64, row: i64) -> bool {
        if column < 0 || row < 0 || column as u64 >= self.width || row as u64 >= self.height {
            return false;
        }
        match &self.layout {
            CellLayout::Sorted(sorted_indices) => {
                let index = row as u64 * self.width + column as u64;
                sorted_indices.binary_search(&index).is_ok()
            }
            CellLayout::Grid(grid) => grid
                .flag_index(column, row)
                .is_some_and(|flag| grid.flags[flag]),
        }
    }

    /// Length, in cells, of the marching-squares contour through the midpoints between occupied
    /// and empty cell centres.
    ///
    /// Each square of four neighbouring cell centres holds: nothing when all four corners agree;
    /// one corner cut of length `sqrt(2) / 2` when one or three corners are occupied; a straight
    /// piece of length 1 when two adjacent corners are; two corner cuts (`sqrt(2)` together,
    /// whichever way the saddle is resolved) when two opposite corners are. Only squares that
    /// touch an occupied cell can hold contour; they are visited in row-major order of their
    /// top-left corner.
    fn marching_squares_length(&self) -> f64 {
        let half_diagonal = core::f64::consts::SQRT_2 / 2.0;
        let square_length = |top_left: bool, top_right: bool, bottom_left: bool, bottom_right| {
            let occupied_corners = [top_left, top_right, bottom_left, bottom_right]
                .iter()
                .filter(|&&occupied| occupied)
                .count();
            match occupied_corners {
                1 | 3 => half_diagonal,
                2 if top_left == bottom_right => 2.0 * half_diagonal,
                2 => 1.0,
                _ => 0.0,
            }
        };
        let mut length = 0.0;
        match &self.layout {
            CellLayout::Sorted(_) => {
                let mut squares: Vec<(i64, i64)> = Vec::with_capacity(4 * self.count);
                for (column, row) in self.column_rows() {
                    for (left, top) in [
                        (column - 1, row - 1),
                        (column, row - 1),
                        (column - 1, row),
                        (column, row),
                    ] {
                        squares.push((top, left));
                    }
                }
                squares.sort_unstable();
                squares.dedup();
                for (top, left) in squares {
                    length += square_length(
                        self.is_occupied(left, top),
                        self.is_occupied(left + 1, top),
                        self.is_occupied(left, top + 1),
                        self.is_occupied(left + 1, top + 1),
                    );
                }
            }
            CellLayout::Grid(grid) => {
                // Every square whose top-left corner lies in the grid but off its last row and
                // column: these include every square touching an occupied cell, since the
                // margin is empty. Cells past the lattice never enter the grid.
                let columns = grid.columns;
                for top in 0..grid.rows - 1 {
                    let upper = &grid.flags[top * columns..(top + 1) * columns];
                    let lower = &grid.flags[(top + 1) * columns..(top + 2) * columns];
                    for left in 0..columns - 1 {
                        length += square_length(
                            upper[left],
                            upper[left + 1],
                            lower[left],
                            lower[left + 1],
                        );
                    }
                }
            }
        }
        length
    }

    /// `sqrt(lambda_1 / lambda_2)` of the covariance of the occupied cell centres; `None` with
    /// fewer than two cells or when all centres lie on one line (checked exactly on the integer
    /// cell coordinates).
    fn aspect_ratio(&self) -> Option<f64> {
        let mut centres = self.column_rows();
        let first = centres.next()?;
        let second = centres.next()?;
        let direction = (
            i128::from(second.0 - first.0),
            i128::from(second.1 - first.1),
        );
        let all_on_one_line = self.column_rows().all(|(column, row)| {
            let offset = (i128::from(column - first.0), i128::from(row - first.1));
            direction.0 * offset.1 - direction.1 * offset.0 == 0
        });
        if all_on_one_line {
            return None;
        }
        let count = self.count as f64;
        let (mut sum_x, mut sum_y) = (0.0, 0.0);
        for (column, row) in self.column_rows() {
            sum_x += column as f64;
            sum_y += row as f64;
        }
        let (mean_x, mean_y) = (sum_x / count, sum_y / count);
        let (mut variance_x, mut variance_y, mut covariance) = (0.0, 0.0, 0.0);
        for (column, row) in self.column_rows() {
            let (dx, dy) = (column as f64 - mean_x, row as f64 - mean_y);
            variance_x += dx * dx;
            variance_y += dy * dy;
            covariance += dx * dy;
        }
        let half_sum = (variance_x + variance_y) / 2.0;
        let half_difference = (variance_x - variance_y) / 2.0;
        let largest =
            half_sum + libm::sqrt(half_difference * half_difference + covariance * covariance);
        // The smallest eigenvalue from the determinant avoids cancelling `half_sum - root`.
        let determinant = variance_x * variance_y - covariance * covariance;
        if largest <= 0.0 {
            return None;
        }
        let smallest = determinant / largest;
        (smallest > 0.0).then(|| libm::sqrt(largest / smallest))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn cells(width: u32, height: u32, occupied: Vec<u32>) -> CellSet {
        CellSet {
            width,
            height,
            occupied,
        }
    }

    /// One cell: four corner cuts of sqrt(2)/2 make a diamond of perimeter 2 sqrt(2), area 1
    /// cell (marching-squares cases by hand).
    #[test]
    fn single_cell_is_a_diamond() {
        let outline = measure_outline(&cells(3, 3, vec![4]), 2.0);
        let perimeter = outline.perimeter.unwrap_or(f64::NAN);
        assert!((perimeter - 2.0 * 2.0 * core::f64::consts::SQRT_2).abs() < 1e-12);
        assert_eq!(outline.area, Some(4.0));
        assert_eq!(outline.aspect_ratio, None);
    }

    /// A cell on the last column and the first cell of the next row are not neighbours: two
    /// separate diamonds, 4 sqrt(2) in all; an index past the lattice is ignored.
    #[test]
    fn rows_do_not_wrap() {
        let outline = measure_outline(&cells(3, 3, vec![2, 3, 9, 100]), 1.0);
        let perimeter = outline.perimeter.unwrap_or(f64::NAN);
        assert!((perimeter - 4.0 * core::f64::consts::SQRT_2).abs() < 1e-12);
        assert_eq!(outline.area, Some(2.0));
    }

    /// The grid and the sorted list are two layouts of the same cells: on scattered, clustered,
    /// repeated, out-of-lattice and edge cells they give the same values to the bit (the sorted
    /// list is the direct reading of the rule in `marching_squares_length`).
    #[test]
    fn grid_and_sorted_layouts_agree() {
        let mut state = 0x2545_f491_4f6c_dd1du64;
        let mut next = |bound: u32| {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            (state % u64::from(bound)) as u32
        };
        for (width, height, count) in [(1, 1, 1), (7, 1, 5), (1, 9, 4), (13, 11, 60), (40, 30, 900)]
        {
            let mut occupied: Vec<u32> = (0..count).map(|_| next(width * height + 3)).collect();
            occupied.push(0);
            occupied.push(width * height - 1);
            occupied.push(occupied[1]);
            let set = cells(width, height, occupied);
            let grid = OccupiedCells::new(&set, true);
            let sorted = OccupiedCells::new(&set, false);
            assert!(matches!(grid.layout, CellLayout::Grid(_)));
            assert!(matches!(sorted.layout, CellLayout::Sorted(_)));
            let (from_grid, from_sorted) = (
                measure_outline_of(&grid, 0.3),
                measure_outline_of(&sorted, 0.3),
            );
            let bits = |value: Option<f64>| value.map(f64::to_bits);
            assert_eq!(bits(from_grid.area), bits(from_sorted.area));
            assert_eq!(bits(from_grid.perimeter), bits(from_sorted.perimeter));
            assert_eq!(bits(from_grid.circularity), bits(from_sorted.circularity));
            assert_eq!(bits(from_grid.aspect_ratio), bits(from_sorted.aspect_ratio));
            assert!(from_grid.perimeter.is_some_and(|perimeter| perimeter > 0.0));
        }
    }

    /// No cells, or no positive cell size: nothing or only the scale-free values.
    #[test]
    fn empty_and_unscaled() {
        let empty = measure_outline(&cells(0, 0, vec![]), 1.0);
        assert_eq!(empty.area, None);
        assert_eq!(empty.circularity, None);
        let unscaled = measure_outline(&cells(4, 4, vec![0, 1, 4, 5]), 0.0);
        assert_eq!(unscaled.area, None);
        assert!(unscaled.circularity.is_some());
    }
}
