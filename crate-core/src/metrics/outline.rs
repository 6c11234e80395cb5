//! Outline of the occupied lattice cells (`OutlineMeasures`): area, marching-squares perimeter,
//! circularity and the aspect ratio of the cell centres' covariance.

use crate::network::CellSet;

/// Outline values; all `None` when no occupied cell lies inside the lattice.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct OutlineMeasures {
    /// Occupied cells times the squared cell size, in squared length units.
    pub(crate) area: Option<f64>,
    /// Marching-squares contour length, in length units.
    pub(crate) perimeter: Option<f64>,
    /// `4 pi A / P^2`, from the cell count and the contour length in cell units.
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
    let none = OutlineMeasures {
        area: None,
        perimeter: None,
        circularity: None,
        aspect_ratio: None,
    };
    let grid = OccupiedCells::new(cells);
    let cell_count = grid.sorted_indices.len();
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

/// Occupied cells inside the lattice, as sorted distinct row-major indices.
struct OccupiedCells {
    /// Lattice width in cells.
    width: u64,
    /// Lattice height in cells.
    height: u64,
    /// Sorted, distinct row-major indices below `width * height`.
    sorted_indices: Vec<u64>,
}

impl OccupiedCells {
    /// Keeps the in-lattice indices of `cells`, sorted and without repeats.
    fn new(cells: &CellSet) -> OccupiedCells {
        let width = u64::from(cells.width);
        let height = u64::from(cells.height);
        let lattice_cells = width * height;
        let mut sorted_indices: Vec<u64> = cells
            .occupied
            .iter()
            .map(|&index| u64::from(index))
            .filter(|&index| index < lattice_cells)
            .collect();
        sorted_indices.sort_unstable();
        sorted_indices.dedup();
        OccupiedCells {
            width,
            height,
            sorted_indices,
        }
    }

    /// Column and row of each occupied cell.
    fn column_rows(&self) -> impl Iterator<Item = (i64, i64)> + '_ {
        // `width` is positive whenever an index passed the filter, and both parts fit in i64
        // because indices are below 2^32.
        self.sorted_indices
            .iter()
            .map(|&index| ((index % self.width) as i64, (index / self.width) as i64))
    }

    /// Whether the cell at `column`, `row` is occupied; cells outside the lattice are empty.
    fn is_occupied(&self, column: i64, row: i64) -> bool {
        if column < 0 || row < 0 || column as u64 >= self.width || row as u64 >= self.height {
            return false;
        }
        let index = row as u64 * self.width + column as u64;
        self.sorted_indices.binary_search(&index).is_ok()
    }

    /// Length, in cells, of the marching-squares contour through the midpoints between occupied
    /// and empty cell centres.
    ///
    /// Each square of four neighbouring cell centres holds: nothing when all four corners agree;
    /// one corner cut of length `sqrt(2) / 2` when one or three corners are occupied; a straight
    /// piece of length 1 when two adjacent corners are; two corner cuts (`sqrt(2)` together,
    /// whichever way the saddle is resolved) when two opposite corners are. Only squares that
    /// touch an occupied cell can hold contour.
    fn marching_squares_length(&self) -> f64 {
        let mut squares: Vec<(i64, i64)> = Vec::with_capacity(4 * self.sorted_indices.len());
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
        let half_diagonal = core::f64::consts::SQRT_2 / 2.0;
        let mut length = 0.0;
        for (top, left) in squares {
            let top_left = self.is_occupied(left, top);
            let top_right = self.is_occupied(left + 1, top);
            let bottom_left = self.is_occupied(left, top + 1);
            let bottom_right = self.is_occupied(left + 1, top + 1);
            let occupied_corners = [top_left, top_right, bottom_left, bottom_right]
                .iter()
                .filter(|&&occupied| occupied)
                .count();
            length += match occupied_corners {
                1 | 3 => half_diagonal,
                2 if top_left == bottom_right => 2.0 * half_diagonal,
                2 => 1.0,
                _ => 0.0,
            };
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
        let count = self.sorted_indices.len() as f64;
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
