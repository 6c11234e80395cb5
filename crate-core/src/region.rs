//! The allowed region of a run: `allowed_cells` combines the outline, the image mask and the
//! obstacles of a `Params`; `point_in_polygon` is the even-odd test they use.

use crate::mask::MaskGrid;
use crate::params::Params;

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
    allowed
}

/// Clears cells outside (`inside_clears == false`) or inside (`true`) the polygon.
fn fill_polygon(
    allowed: &mut [bool],
    width: usize,
    height: usize,
    polygon: &[[f64; 2]],
    inside_clears: bool,
) {
    for row in 0..height {
        let y = row as f64 + 0.5;
        for column in 0..width {
            let inside = point_in_polygon(column as f64 + 0.5, y, polygon);
            if inside == inside_clears {
                allowed[row * width + column] = false;
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn square_contains_its_centre_only() {
        let square = [[1.0, 1.0], [3.0, 1.0], [3.0, 3.0], [1.0, 3.0]];
        assert!(point_in_polygon(2.0, 2.0, &square));
        assert!(!point_in_polygon(0.5, 2.0, &square));
        assert!(!point_in_polygon(2.0, 3.5, &square));
    }
}
