//! Which cells may be occupied: `MaskGrid` (run-length coded image mask), polygon tests, and
//! `allowed_cells`, which combines the outline, the mask and the obstacles of a `Params`.

use serde::{Deserialize, Serialize};

use crate::params::{ParamError, Params};

/// A boolean image of allowed cells, row-major from the top-left, stored as run lengths.
///
/// `runs` alternates blocked and allowed runs and starts with a blocked run (which may be 0),
/// so `[0, 5, 3]` means five allowed cells then three blocked ones.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MaskGrid {
    /// Width in cells.
    pub width: u32,
    /// Height in cells.
    pub height: u32,
    /// Alternating run lengths, blocked first.
    pub runs: Vec<u32>,
}

impl MaskGrid {
    /// Codes a row-major boolean image (`true` = allowed).
    pub fn from_bits(width: u32, height: u32, bits: &[bool]) -> MaskGrid {
        let mut runs = Vec::new();
        let mut current = false;
        let mut length = 0u32;
        for &bit in bits {
            if bit == current {
                length += 1;
            } else {
                runs.push(length);
                current = bit;
                length = 1;
            }
        }
        runs.push(length);
        MaskGrid {
            width,
            height,
            runs,
        }
    }

    /// Decodes to a row-major boolean image; `None` when the runs do not add up to the size.
    pub fn to_bits(&self) -> Option<Vec<bool>> {
        let total = self.width as u64 * self.height as u64;
        let sum: u64 = self.runs.iter().map(|&run| run as u64).sum();
        if sum != total || total > crate::params::MAX_CELLS {
            return None;
        }
        let mut bits = Vec::with_capacity(total as usize);
        for (index, &run) in self.runs.iter().enumerate() {
            let allowed = index % 2 == 1;
            bits.extend(std::iter::repeat_n(allowed, run as usize));
        }
        Some(bits)
    }

    /// Checks that the mask matches the lattice and decodes.
    pub fn validate(&self, width: u32, height: u32) -> Result<(), ParamError> {
        if self.width != width || self.height != height {
            return Err(ParamError {
                key: "mask".into(),
                value: format!("{} x {} cells", self.width, self.height),
                allowed: format!("the lattice size {width} x {height}"),
            });
        }
        let sum: u64 = self.runs.iter().map(|&run| run as u64).sum();
        let total = width as u64 * height as u64;
        if sum != total {
            return Err(ParamError {
                key: "mask.runs".into(),
                value: format!("runs adding up to {sum}"),
                allowed: format!("runs adding up to width * height = {total}"),
            });
        }
        Ok(())
    }
}

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
    fn runs_round_trip() {
        let bits = [true, true, false, true, false, false];
        let grid = MaskGrid::from_bits(3, 2, &bits);
        assert_eq!(grid.runs, vec![0, 2, 1, 1, 2]);
        assert_eq!(grid.to_bits().unwrap(), bits);
    }

    #[test]
    fn square_contains_its_centre_only() {
        let square = [[1.0, 1.0], [3.0, 1.0], [3.0, 3.0], [1.0, 3.0]];
        assert!(point_in_polygon(2.0, 2.0, &square));
        assert!(!point_in_polygon(0.5, 2.0, &square));
        assert!(!point_in_polygon(2.0, 3.5, &square));
    }
}
