//! Ground elevation: `SpotSurface` (spot levels interpolated by inverse distance weighting,
//! Shepard 1968, power 2), `Elevation` (the ground of a run: a tilted plane or its spot levels,
//! read with `at(x, y)`) and `node_ground` (the ground under every node of a network).
//!
//! Inverse distance weighting (Shepard 1968, "A two-dimensional interpolation function for
//! irregularly-spaced data", Proc. 23rd ACM National Conference, eq. for the basic method):
//! `z(p) = sum_i w_i z_i / sum_i w_i` with `w_i = 1 / d(p, p_i)^2`, and `z(p_i) = z_i` exactly at
//! each level. The weights add up to one, so a constant field comes back exactly; a plane does
//! not (the surface flattens towards each level), which is why a uniform grade stays a plane of
//! its own (`Elevation::Plane`) rather than being sampled into levels.

use crate::network::Network;
use crate::params::Params;

/// Squared distance under which a point counts as standing on a level: weights stay below
/// 1e200, so sums over thousands of levels of elevations up to 1e6 stay finite.
const NEAR_SQUARED: f64 = 1.0e-200;

/// Spot levels `[x, y, z]` and the surface through them by inverse distance weighting, power 2.
#[derive(Clone, Debug, PartialEq)]
pub struct SpotSurface {
    levels: Vec<[f64; 3]>,
}

impl SpotSurface {
    /// The surface through `levels`; `None` when there are none (no surface to interpolate).
    /// The levels should be finite and at distinct places (`Params::validate` checks both for
    /// a run's `levels`).
    pub fn new(levels: Vec<[f64; 3]>) -> Option<SpotSurface> {
        if levels.is_empty() {
            None
        } else {
            Some(SpotSurface { levels })
        }
    }

    /// The levels, as given.
    pub fn levels(&self) -> &[[f64; 3]] {
        &self.levels
    }

    /// The interpolated elevation at `(x, y)` (same coordinates as the levels): the level's own
    /// elevation at a level, the weighted mean of all levels with weights `1 / d^2` elsewhere.
    pub fn at(&self, x: f64, y: f64) -> f64 {
        let mut weighted = 0.0;
        let mut total = 0.0;
        for &[level_x, level_y, z] in &self.levels {
            let dx = x - level_x;
            let dy = y - level_y;
            let squared = dx * dx + dy * dy;
            // At a level, or nearer than 1e-100 (where 1 / d^2 times the levels could
            // overflow), the surface is the level.
            if squared < NEAR_SQUARED {
                return z;
            }
            let weight = 1.0 / squared;
            weighted += weight * z;
            total += weight;
        }
        weighted / total
    }
}

/// The ground of a run in the network's frame (physical units, x to the right, y down the
/// page, origin at the lattice's top-left corner), elevations in the run's length unit.
#[derive(Clone, Debug, PartialEq)]
pub enum Elevation {
    /// A uniform grade: `z = grade_x * x + grade_y * y`, 0 at the origin (a relative datum).
    Plane {
        /// Rise per unit run along +x.
        grade_x: f64,
        /// Rise per unit run along +y (down the page).
        grade_y: f64,
    },
    /// Spot levels in cells, read at `(x / cell_size, y / cell_size)`.
    Spots {
        /// The surface through the levels, x and y in cells.
        surface: SpotSurface,
        /// The cell size: physical coordinates are divided by it before interpolating.
        cell_size: f64,
    },
}

impl Elevation {
    /// The ground the growth of `params` follows: its spot levels (`levels`) when it has
    /// some, else the tilted plane of `grade_x` and `grade_y`.
    pub fn of_run(params: &Params) -> Elevation {
        match SpotSurface::new(params.domain.levels.clone()) {
            Some(surface) => Elevation::Spots {
                surface,
                cell_size: params.domain.cell_size,
            },
            None => Elevation::Plane {
                grade_x: params.domain.grade_x,
                grade_y: params.domain.grade_y,
            },
        }
    }

    /// The elevation at `(x, y)` in the network's frame, in the run's length unit.
    pub fn at(&self, x: f64, y: f64) -> f64 {
        match self {
            Elevation::Plane { grade_x, grade_y } => grade_x * x + grade_y * y,
            Elevation::Spots { surface, cell_size } => surface.at(x / cell_size, y / cell_size),
        }
    }
}

/// The ground under every node of `network` (`node_ground` of the hydraulics), in order.
pub fn node_ground(network: &Network, elevation: &Elevation) -> Vec<f64> {
    network
        .nodes
        .iter()
        .map(|node| elevation.at(node.x, node.y))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Shepard 1968: the interpolant passes through every data point exactly.
    #[test]
    fn passes_exactly_through_each_level() {
        let levels = vec![
            [0.0, 0.0, 101.25],
            [7.0, 1.5, 100.8],
            [3.3, 9.1, 99.95],
            [12.0, 12.0, 100.4],
        ];
        let surface = SpotSurface::new(levels.clone()).expect("levels");
        for [x, y, z] in levels {
            assert_eq!(surface.at(x, y), z);
        }
    }

    /// Shepard 1968: the weights add up to one, so a constant field is reproduced exactly
    /// (to the last bit, since `w z / w` of equal z is z up to rounding of the sums: checked
    /// within one unit in the last place).
    #[test]
    fn reproduces_a_constant_field() {
        let levels: Vec<[f64; 3]> = [[0.0, 0.0], [5.0, 1.0], [2.0, 8.0], [9.0, 9.0]]
            .iter()
            .map(|&[x, y]| [x, y, 42.5])
            .collect();
        let surface = SpotSurface::new(levels).expect("levels");
        for (x, y) in [(1.0, 1.0), (4.4, 6.6), (-20.0, 3.0), (100.0, 100.0)] {
            let z = surface.at(x, y);
            assert!((z - 42.5).abs() <= 42.5 * f64::EPSILON * 4.0, "{z}");
        }
    }

    /// A worked example by hand: levels 0 at x = 0 and 4 at x = 2; at x = 0.5 the weights are
    /// 1/0.25 = 4 and 1/2.25 = 4/9, so z = (4 * 4/9) / (4 + 4/9) = 0.4; at x = 1 both weigh
    /// 1 and z = 2 (Shepard 1968, basic method, power 2).
    #[test]
    fn hand_worked_two_level_example() {
        let surface = SpotSurface::new(vec![[0.0, 0.0, 0.0], [2.0, 0.0, 4.0]]).expect("levels");
        assert!((surface.at(0.5, 0.0) - 0.4).abs() < 1e-12);
        assert!((surface.at(1.0, 0.0) - 2.0).abs() < 1e-12);
    }

    /// A plane is reproduced only approximately between levels taken on it: inverse distance
    /// weighting flattens towards each level (Shepard 1968 adds gradient terms for that). At
    /// the centre of a square of corner levels on z = x the error is zero by symmetry, off
    /// the centre it is not, yet it stays within the plane's range over the square.
    #[test]
    fn reproduces_a_plane_only_approximately() {
        let corners = [[0.0, 0.0], [10.0, 0.0], [0.0, 10.0], [10.0, 10.0]];
        let levels: Vec<[f64; 3]> = corners.iter().map(|&[x, y]| [x, y, x]).collect();
        let surface = SpotSurface::new(levels).expect("levels");
        assert!((surface.at(5.0, 5.0) - 5.0).abs() < 1e-12);
        let off = surface.at(2.0, 5.0);
        assert!((off - 2.0).abs() > 0.05, "IDW at x = 2 gave {off}");
        assert!((0.0..=10.0).contains(&off));
    }

    #[test]
    fn plane_elevation_follows_the_grades() {
        let elevation = Elevation::Plane {
            grade_x: 0.01,
            grade_y: -0.02,
        };
        assert!((elevation.at(100.0, 50.0) - 0.0).abs() < 1e-12);
        assert!((elevation.at(100.0, 0.0) - 1.0).abs() < 1e-12);
    }
}
