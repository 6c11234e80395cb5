//! The allowed region of a run: `allowed_cells` combines the outline, the image mask and the
//! obstacles of a `Params`; `point_in_polygon` is the even-odd test they use.

use crate::mask::MaskGrid;
use crate::params::{ParamError, Params};

/// Whether point `(x, y)` lies inside the polygon (even-odd rule).
pub fn point_in_polygon(x: f64, y: f64, polygon: &[[f64; 2]]) -> bool {
    let mut inside = false;
    let mut previous = polygon[polygon.len() - 1];
    for &current in polygon {
        let crosses = (current[1] > y) != (previous[1] > y);
        if crosses {
            let t = (y - current[1]) / (previous[1] - current[1]);
            let x_cross = current[0] + t * (previous[0] - current[0]);
            if x < x_cross {
                inside = !inside;
            }
        }
        previous = current;
    }
    inside
}

/// The allowed cells of a validated `Params`, row-major: inside the outline (if any), allowed
/// by the mask (if any), and outside every obstacle. Cell `(i, j)` has its centre at
/// `(i + 0.5, j + 0.5)` in cell coordinates.
pub fn allowed_cells(params: &Params) -> Vec<bool> {
    let width = params.domain.width as usize;
    let height = params.domain.height as usize;
    let mut allowed = match params.domain.mask.as_ref().and_then(MaskGrid::to_bits) {
        Some(bits) => bits,
        None => vec![true; width * height],
    };
    if let Some(outline) = &params.domain.outline {
        fill_polygon(&mut allowed, width, height, outline, false);
    }
    for obstacle in &params.domain.obstacles {
        fill_polygon(&mut allowed, width, height, obstacle, true);
    }
    if params.domain.front_only {
        clear_behind_roots(&mut allowed, width, params);
    }
    allowed
}

/// The runoff zone of every cell of a validated `Params`, row-major: 0 for a cell in no zone,
/// `k + 1` for a cell whose centre lies inside zone `k` and inside no later zone (later zones
/// lie over earlier ones). Empty when the run has no zones.
pub fn zone_cells(params: &Params) -> Vec<u16> {
    let zones = &params.domain.zones;
    if zones.is_empty() {
        return Vec::new();
    }
    let width = params.domain.width as usize;
    let height = params.domain.height as usize;
    let mut zone_of = vec![0u16; width * height];
    let mut inside = vec![true; width * height];
    for (index, zone) in zones.iter().enumerate() {
        inside.fill(true);
        fill_polygon(&mut inside, width, height, &zone.polygon, false);
        // Validated runs hold at most `MAX_ZONES` (4,096) zones, so the number fits 16 bits.
        let number = u16::try_from(index + 1).unwrap_or(u16::MAX);
        for (cell, &held) in zone_of.iter_mut().zip(&inside) {
            if held {
                *cell = number;
            }
        }
    }
    zone_of
}

/// The rule of `front_only`: a cell is kept out when its centre lies strictly behind the line
/// through every root's centre across that root's outflow, i.e. `(c - r) . u > 0` for the
/// cell centre `c`, the root centre `r` and the root's outflow `u` (flow leaves through the
/// petiole, so the blade lies on the side the outflow points away from). Cells on the line
/// stay, so the root's own row is open. With several roots a cell stays when it lies in front
/// of at least one of them.
fn clear_behind_roots(allowed: &mut [bool], width: usize, params: &Params) {
    let roots: Vec<(f64, f64, f64, f64)> = params
        .domain
        .roots
        .iter()
        .map(|root| {
            let [dx, dy] = root.outflow;
            // Only the sign of the dot product matters, so the outflow need not be unit.
            (f64::from(root.x), f64::from(root.y), dx, dy)
        })
        .collect();
    if roots.is_empty() || width == 0 {
        return;
    }
    for (index, cell) in allowed.iter_mut().enumerate() {
        if !*cell {
            continue;
        }
        let (column, row) = ((index % width) as f64, (index / width) as f64);
        let behind_all = roots
            .iter()
            .all(|&(x, y, dx, dy)| (column - x) * dx + (row - y) * dy > 0.0);
        if behind_all {
            *cell = false;
        }
    }
}

/// Whether a run of validated `params` can start on its `allowed` cells: at least one allowed
/// cell, and every root on an allowed cell of its own. The error names the root or region.
pub fn check_start(params: &Params, allowed: &[bool]) -> Result<(), ParamError> {
    if !allowed.iter().any(|&cell| cell) {
        return Err(ParamError {
            key: "outline / mask / obstacles".into(),
            value: "no allowed cell".into(),
            allowed: "a region with at least one allowed cell".into(),
        });
    }
    let width = params.domain.width as usize;
    let cell_of = |x: u32, y: u32| y as usize * width + x as usize;
    for (index, root) in params.domain.roots.iter().enumerate() {
        let cell = cell_of(root.x, root.y);
        if !allowed.get(cell).copied().unwrap_or(false) {
            return Err(ParamError {
                key: format!("roots[{index}]"),
                value: format!("cell ({}, {})", root.x, root.y),
                allowed: "a cell inside the outline and mask and outside obstacles".into(),
            });
        }
        let taken = params.domain.roots[..index]
            .iter()
            .any(|earlier| cell_of(earlier.x, earlier.y) == cell);
        if taken {
            return Err(ParamError {
                key: format!("roots[{index}]"),
                value: format!("cell ({}, {})", root.x, root.y),
                allowed: "a cell not already taken by another root".into(),
            });
        }
    }
    Ok(())
}

/// Clears cells outside (`inside_clears == false`) or inside (`true`) the polygon.
///
/// A scanline fill with exactly the test of `point_in_polygon`: for each row it computes, with
/// the same arithmetic, where every edge crosses the row's centre line, sorts those crossings,
/// and walks the columns left to right; a centre lies inside when an odd number of crossings
/// lie strictly to its right. Cost: rows x edges plus cells, instead of cells x edges.
fn fill_polygon(
    allowed: &mut [bool],
    width: usize,
    height: usize,
    polygon: &[[f64; 2]],
    inside_clears: bool,
) {
    let mut crossings: Vec<f64> = Vec::new();
    for row in 0..height {
        let y = row as f64 + 0.5;
        row_crossings(polygon, y, &mut crossings);
        let cells = &mut allowed[row * width..(row + 1) * width];
        // `passed`: crossings at or left of the current centre, which do not count for it.
        let mut passed = 0;
        for (column, cell) in cells.iter_mut().enumerate() {
            let x = column as f64 + 0.5;
            while passed < crossings.len() && crossings[passed] <= x {
                passed += 1;
            }
            let inside = (crossings.len() - passed) % 2 == 1;
            if inside == inside_clears {
                *cell = false;
            }
        }
    }
}

/// The x of every edge crossing the line at height `y`, as `point_in_polygon` computes them,
/// sorted; crossings that are not numbers (overflowing coordinates) never count there, so they
/// are left out here too.
fn row_crossings(polygon: &[[f64; 2]], y: f64, crossings: &mut Vec<f64>) {
    crossings.clear();
    let mut previous = polygon[polygon.len() - 1];
    for &current in polygon {
        if (current[1] > y) != (previous[1] > y) {
            let t = (y - current[1]) / (previous[1] - current[1]);
            let x_cross = current[0] + t * (previous[0] - current[0]);
            if !x_cross.is_nan() {
                crossings.push(x_cross);
            }
        }
        previous = current;
    }
    crossings.sort_unstable_by(f64::total_cmp);
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The scanline fill agrees cell for cell with the point test it replaces, on star-shaped,
    /// self-crossing and degenerate polygons with vertices on cell centres and edges along rows.
    #[test]
    fn scanline_fill_equals_the_point_test() {
        let polygons: Vec<Vec<[f64; 2]>> = vec![
            vec![[1.0, 1.0], [3.0, 1.0], [3.0, 3.0], [1.0, 3.0]],
            vec![[0.5, 0.5], [9.5, 0.5], [9.5, 7.5], [0.5, 7.5]],
            vec![[0.0, 0.0], [10.0, 8.0], [10.0, 0.0], [0.0, 8.0]],
            vec![
                [5.0, -3.0],
                [7.5, 4.5],
                [13.0, 4.5],
                [8.5, 6.5],
                [5.0, 12.0],
                [1.5, 6.5],
                [-3.0, 4.5],
                [2.5, 4.5],
            ],
            vec![[2.5, 2.5], [2.5, 2.5], [6.5, 2.5], [4.5, 2.5]],
            vec![[1e300, 1.0], [-1e300, 1.0], [-1e300, 5.0], [1e300, 5.0]],
            vec![
                [3.3, 0.1],
                [8.7, 2.9],
                [0.2, 6.6],
                [9.9, 7.1],
                [4.5, 0.5],
                [4.5, 7.5],
            ],
        ];
        let (width, height) = (11, 9);
        // And random polygons with vertices on quarter cells, so that vertices and edges meet
        // cell centres exactly.
        let mut generator = <rand_chacha::ChaCha8Rng as rand_core::SeedableRng>::seed_from_u64(5);
        let mut quarter = |range: u32| {
            f64::from(rand_core::RngCore::next_u32(&mut generator) % (4 * range)) / 4.0 - 1.0
        };
        let mut polygons = polygons;
        for points in (3..40).cycle().take(300) {
            polygons.push((0..points).map(|_| [quarter(13), quarter(11)]).collect());
        }
        for polygon in &polygons {
            for inside_clears in [false, true] {
                let mut filled = vec![true; width * height];
                fill_polygon(&mut filled, width, height, polygon, inside_clears);
                for row in 0..height {
                    for column in 0..width {
                        let inside =
                            point_in_polygon(column as f64 + 0.5, row as f64 + 0.5, polygon);
                        assert_eq!(
                            filled[row * width + column],
                            inside != inside_clears,
                            "{polygon:?} cell ({column}, {row})"
                        );
                    }
                }
            }
        }
    }

    /// Later zones lie over earlier ones; cells in no zone are 0. A 6 x 4 lattice, zone 1
    /// over columns 0..4, zone 2 over columns 2..6 of rows 1..3 (counted by hand).
    #[test]
    fn later_zones_lie_over_earlier_ones() {
        let mut params = Params::default();
        params.domain.width = 6;
        params.domain.height = 4;
        params.domain.zones = vec![
            crate::params::Zone {
                runoff: 0.9,
                polygon: vec![[0.0, 0.0], [4.0, 0.0], [4.0, 4.0], [0.0, 4.0]],
            },
            crate::params::Zone {
                runoff: 0.2,
                polygon: vec![[2.0, 1.0], [6.0, 1.0], [6.0, 3.0], [2.0, 3.0]],
            },
        ];
        let expected: Vec<u16> = vec![
            1, 1, 1, 1, 0, 0, //
            1, 1, 2, 2, 2, 2, //
            1, 1, 2, 2, 2, 2, //
            1, 1, 1, 1, 0, 0, //
        ];
        assert_eq!(zone_cells(&params), expected);
    }

    #[test]
    fn square_contains_its_centre_only() {
        let square = [[1.0, 1.0], [3.0, 1.0], [3.0, 3.0], [1.0, 3.0]];
        assert!(point_in_polygon(2.0, 2.0, &square));
        assert!(!point_in_polygon(0.5, 2.0, &square));
        assert!(!point_in_polygon(2.0, 3.5, &square));
    }
}
