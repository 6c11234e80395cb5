//! `refined`: the parameters of a run on a lattice whose every cell is split into
//! `refine x refine` cells, with every physical quantity kept (parameter `refine`).
//!
//! What changes and what stays, for refinement factor `r` (cell side `h` becomes `h / r`):
//! - counted in cells, so multiplied: `width`, `height` (by `r`), the budget `cells` (by `r^2`,
//!   the same area), `radius` (by `r`, the same reach), outline, obstacle, runoff-zone and
//!   spot-level points (by `r`; a level's elevation is kept),
//!   each mask pixel (becomes `r x r` cells), each root (the fine cell holding the coarse cell's
//!   centre, or, when that one is outside the region, the allowed fine cell of the coarse cell
//!   nearest its centre: `move_roots_inside`);
//! - physical already, so kept: `cell_size * width`, grades, runoff, angles, the cost weights,
//!   `alpha`, `elongation`, `rear_cost`, `threshold`, `temperature`, `vein_area`, the widths
//!   (`RunView` takes the given parameters, whose `tip_width` and `cell_size` give the same
//!   physical width) and `refresh` (a fraction);
//! - kept as a fraction of a cell, so smaller in length: `jitter` (it breaks the lattice's
//!   symmetry, it is not a physical length).
//!
//! The cost formula works in cells; `CostModel` turns its lengths and flows back into coarse-cell
//! units with the factor `r` (`growth::cost`), so each term is per unit of physical length.

use crate::mask::MaskGrid;
use crate::params::Params;

/// `params` on the refined lattice (a copy, unchanged when `refine` is 1).
pub(crate) fn refined(params: &Params) -> Params {
    let factor = params.domain.refine.max(1);
    if factor == 1 {
        return params.clone();
    }
    let r = f64::from(factor);
    let mut fine = params.clone();
    let domain = &mut fine.domain;
    domain.width = params.domain.width * factor;
    domain.height = params.domain.height * factor;
    domain.cell_size = params.domain.cell_size / r;
    domain.refine = 1;
    for root in &mut domain.roots {
        // The coarse centre (x + 1/2) r falls on the fine cell x r + r / 2 (its corner when r
        // is even, the fine cell right and below of it).
        root.x = root.x * factor + factor / 2;
        root.y = root.y * factor + factor / 2;
    }
    let scale = |points: &mut Vec<[f64; 2]>| {
        for point in points.iter_mut() {
            point[0] *= r;
            point[1] *= r;
        }
    };
    if let Some(outline) = domain.outline.as_mut() {
        scale(outline);
    }
    for obstacle in &mut domain.obstacles {
        scale(obstacle);
    }
    for zone in &mut domain.zones {
        scale(&mut zone.polygon);
    }
    // Spot levels: their place is in cells, their elevation a physical length (kept).
    for level in &mut domain.levels {
        level[0] *= r;
        level[1] *= r;
    }
    if let Some(mask) = domain.mask.as_ref() {
        domain.mask = mask.to_bits().map(|bits| upsample(mask, &bits, factor));
    }
    fine.run.cells = params.run.cells * u64::from(factor * factor);
    fine.run.radius = params.run.radius * r;
    fine
}

/// Moves each root of `fine` (`refined(given)`) whose fine cell is not allowed to the allowed
/// fine cell of its coarse cell nearest the coarse centre (ties: the upper row, then the left
/// column), when there is one. A region edge may cross a coarse root cell so that its centre
/// cell lies outside while the coarse cell itself counts as inside (its centre is in); such a
/// run would otherwise be refused only because it is refined. A root whose fine cell is
/// allowed stays, so every run that started before starts from the same cell.
pub(crate) fn move_roots_inside(fine: &mut Params, given: &Params, allowed: &[bool]) {
    let factor = given.domain.refine.max(1);
    if factor == 1 {
        return;
    }
    let width = fine.domain.width as usize;
    let is_allowed = |x: u32, y: u32| {
        allowed
            .get(y as usize * width + x as usize)
            .copied()
            .unwrap_or(false)
    };
    for (root, coarse) in fine.domain.roots.iter_mut().zip(&given.domain.roots) {
        if is_allowed(root.x, root.y) {
            continue;
        }
        let centre = f64::from(factor) / 2.0;
        let mut nearest: Option<(f64, u32, u32)> = None;
        for dy in 0..factor {
            for dx in 0..factor {
                let (x, y) = (coarse.x * factor + dx, coarse.y * factor + dy);
                if !is_allowed(x, y) {
                    continue;
                }
                let (ox, oy) = (f64::from(dx) + 0.5 - centre, f64::from(dy) + 0.5 - centre);
                let distance = ox * ox + oy * oy;
                if nearest.is_none_or(|(best, _, _)| distance < best) {
                    nearest = Some((distance, x, y));
                }
            }
        }
        if let Some((_, x, y)) = nearest {
            root.x = x;
            root.y = y;
        }
    }
}

/// A mask whose every pixel becomes `factor x factor` pixels.
fn upsample(mask: &MaskGrid, bits: &[bool], factor: u32) -> MaskGrid {
    let (width, height) = (mask.width as usize, mask.height as usize);
    let f = factor as usize;
    let mut fine = Vec::with_capacity(width * height * f * f);
    for row in 0..height {
        let line = &bits[row * width..(row + 1) * width];
        for _ in 0..f {
            for &bit in line {
                fine.extend(std::iter::repeat_n(bit, f));
            }
        }
    }
    MaskGrid::from_bits(mask.width * factor, mask.height * factor, &fine)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::params::Root;

    #[test]
    fn refine_one_changes_nothing() {
        let params = Params::default();
        assert_eq!(refined(&params), params);
    }

    #[test]
    fn refine_keeps_the_physical_sizes() {
        let mut params = Params::default();
        params.domain.refine = 2;
        params.domain.roots = vec![Root {
            x: 3,
            y: 5,
            outflow: [0.0, 1.0],
        }];
        params.domain.mask = Some(MaskGrid::from_bits(2, 1, &[true, false]));
        let fine = refined(&params);
        let extent = |p: &Params| f64::from(p.domain.width) * p.domain.cell_size;
        assert_eq!(extent(&fine), extent(&params));
        assert_eq!(fine.run.cells, params.run.cells * 4);
        assert_eq!(fine.run.radius, params.run.radius * 2.0);
        // The coarse cell (3, 5) spans fine cells 6..8 x 10..12; its centre is at (7, 11).
        assert_eq!((fine.domain.roots[0].x, fine.domain.roots[0].y), (7, 11));
        let mask = fine.domain.mask.expect("a mask");
        assert_eq!(
            mask.to_bits(),
            Some(vec![true, true, false, false, true, true, false, false])
        );
    }

    /// A triangle whose long edge runs just above a root's coarse centre, below the centre of
    /// the fine cell that usually takes the root: the root moves to the nearest allowed fine
    /// cell of its coarse cell, and the run starts, as it does unrefined.
    #[test]
    fn a_root_whose_centre_cell_falls_outside_moves_within_its_cell() {
        let mut params = Params::default();
        params.domain.width = 48;
        params.domain.height = 43;
        params.domain.jitter = 0.0;
        params.domain.outline = Some(vec![[1e6, 0.0], [0.0, 41.58], [0.0, 0.0]]);
        params.domain.roots = vec![Root {
            x: 0,
            y: 41,
            outflow: [0.0, 1.0],
        }];
        params.run.cells = 10;
        assert!(crate::growth::Growth::new(&params).is_ok());
        params.domain.refine = 4;
        let mut fine = refined(&params);
        // Fine cell (2, 166) has its centre at y = 166.5 / 4 = 41.625, above the edge.
        assert_eq!((fine.domain.roots[0].x, fine.domain.roots[0].y), (2, 166));
        let allowed = crate::region::allowed_cells(&fine);
        move_roots_inside(&mut fine, &params, &allowed);
        // Row 165 (centre 41.375) is inside; of its cells 0..3, 1 and 2 are nearest the
        // coarse centre (2, 166) and the left one wins the tie.
        assert_eq!((fine.domain.roots[0].x, fine.domain.roots[0].y), (1, 165));
        assert!(crate::growth::Growth::new(&params).is_ok());
    }
}
