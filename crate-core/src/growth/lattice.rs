//! `Lattice`: cell states (blocked, free, frontier slot, node), jittered cell positions and the
//! neighbourhood offsets of the search radius.

use rand_chacha::ChaCha8Rng;
use rand_core::{RngCore, SeedableRng};

use crate::params::Params;

/// Cell that may never be occupied.
pub(crate) const BLOCKED: u32 = u32::MAX;
/// Allowed empty cell not yet within reach.
pub(crate) const FREE: u32 = u32::MAX - 1;
/// Set on the state of a frontier cell; the low bits hold its frontier slot. States below this
/// tag are node indices.
pub(crate) const FRONTIER_TAG: u32 = 1 << 31;

/// The lattice of one run. Positions are in cells: cell `(i, j)` has its centre at
/// `(i + 0.5, j + 0.5)`, moved by its jitter.
pub(crate) struct Lattice {
    width: usize,
    height: usize,
    /// State of each cell, row-major.
    pub state: Vec<u32>,
    /// Jitter of each cell in cells, `[dx, dy]`, each in `[-jitter, jitter)`.
    jitter: Vec<[f32; 2]>,
    /// The offsets `(dx, dy)` with `dx^2 + dy^2 <= radius^2`, nearest first, excluding
    /// `(0, 0)`, with what an offer needs of each (`Spot`).
    pub spots: Vec<Spot>,
    /// The distinct length floors of the offsets (`Spot::floor_index`), nearest first: an
    /// offer works out its node's cost floor once for each.
    pub spot_floors: Vec<f64>,
    /// The largest `|dx|` and `|dy|` of the offsets.
    reach: i32,
}

/// One offset of the search radius as an offer walks it.
#[derive(Clone, Copy, Debug)]
pub(crate) struct Spot {
    /// The step `dy * width + dx` between the two cells' row-major indices.
    pub step: isize,
    pub dx: i32,
    pub dy: i32,
    /// Where `Lattice::spot_floors` holds this offset's length floor: a length (in cells) no
    /// greater than the computed distance between a cell's position and any node in the cell
    /// at this offset from it (`length_floor`). Offsets that differ only in sign or order
    /// share one.
    pub floor_index: u32,
}

impl Lattice {
    /// Frees the states, jitters and offsets (growth is over; `Growth::into_network`).
    pub fn release(&mut self) {
        self.state = Vec::new();
        self.jitter = Vec::new();
        self.spots = Vec::new();
        self.spot_floors = Vec::new();
    }

    /// Builds the lattice; the jitter comes from ChaCha8 stream 0 of the seed, in row-major
    /// order, two draws a cell.
    pub fn new(params: &Params, allowed: &[bool]) -> Lattice {
        let width = params.domain.width as usize;
        let height = params.domain.height as usize;
        let state = allowed
            .iter()
            .map(|&ok| if ok { FREE } else { BLOCKED })
            .collect();
        let jitter = if params.domain.jitter > 0.0 {
            let mut random = ChaCha8Rng::seed_from_u64(params.run.seed);
            random.set_stream(0);
            let amplitude = params.domain.jitter;
            (0..width * height)
                .map(|_| {
                    let mut draw = || {
                        let unit = (random.next_u32() >> 8) as f64 * (1.0 / (1u32 << 24) as f64);
                        ((2.0 * unit - 1.0) * amplitude) as f32
                    };
                    let dx = draw();
                    let dy = draw();
                    [dx, dy]
                })
                .collect()
        } else {
            Vec::new()
        };
        let reach = params.run.radius.floor() as i32;
        let squared = params.run.radius * params.run.radius;
        let mut offsets = Vec::new();
        for dy in -reach..=reach {
            for dx in -reach..=reach {
                let distance = (dx * dx + dy * dy) as f64;
                if (dx, dy) != (0, 0) && distance <= squared {
                    offsets.push((dx, dy));
                }
            }
        }
        offsets.sort_by_key(|&(dx, dy)| (dx * dx + dy * dy, dy, dx));
        // A cell's position is off its centre by at most the jitter in x and in y; a junction
        // (segment attachment) lies anywhere in its cell, at most half a cell off.
        let node_slack = if params.run.attach_to_segments {
            params.domain.jitter.max(0.5)
        } else {
            params.domain.jitter
        };
        let slack = params.domain.jitter + node_slack;
        let mut spot_floors: Vec<f64> = Vec::new();
        let spots = offsets
            .iter()
            .map(|&(dx, dy)| {
                let floor = length_floor(dx, dy, slack);
                let floor_index = match spot_floors
                    .iter()
                    .position(|known| known.to_bits() == floor.to_bits())
                {
                    Some(index) => index,
                    None => {
                        spot_floors.push(floor);
                        spot_floors.len() - 1
                    }
                };
                Spot {
                    step: dy as isize * width as isize + dx as isize,
                    dx,
                    dy,
                    floor_index: floor_index as u32,
                }
            })
            .collect();
        Lattice {
            width,
            height,
            state,
            jitter,
            spots,
            spot_floors,
            reach,
        }
    }

    /// Lattice columns.
    pub fn width(&self) -> usize {
        self.width
    }

    pub fn cell_total(&self) -> usize {
        self.width * self.height
    }

    pub fn cell_index(&self, column: u32, row: u32) -> usize {
        row as usize * self.width + column as usize
    }

    pub fn column_row(&self, cell: usize) -> (i32, i32) {
        ((cell % self.width) as i32, (cell / self.width) as i32)
    }

    /// The cell containing a position (clamped to the lattice).
    pub fn cell_at(&self, x: f64, y: f64) -> usize {
        let column = (x.floor().max(0.0) as usize).min(self.width - 1);
        let row = (y.floor().max(0.0) as usize).min(self.height - 1);
        row * self.width + column
    }

    /// The neighbour at an offset, if inside the lattice.
    #[inline]
    pub fn neighbour(&self, column: i32, row: i32, dx: i32, dy: i32) -> Option<usize> {
        self.neighbour_at(column, row, dx, dy)
            .map(|(cell, _, _)| cell)
    }

    /// The neighbour at an offset with its column and row, if inside the lattice.
    #[inline]
    pub fn neighbour_at(
        &self,
        column: i32,
        row: i32,
        dx: i32,
        dy: i32,
    ) -> Option<(usize, usize, usize)> {
        let (x, y) = (column + dx, row + dy);
        if x < 0 || y < 0 || x as usize >= self.width || y as usize >= self.height {
            return None;
        }
        Some((y as usize * self.width + x as usize, x as usize, y as usize))
    }

    /// Whether every offset from the cell at `(column, row)` stays inside the lattice, so that
    /// `step_from` may be used instead of `neighbour_at`.
    #[inline]
    pub fn reaches_inside(&self, column: i32, row: i32) -> bool {
        column >= self.reach
            && row >= self.reach
            && ((column + self.reach) as usize) < self.width
            && ((row + self.reach) as usize) < self.height
    }

    /// `neighbour_at(column, row, spot.dx, spot.dy)` from `cell`, at `(column, row)`, when
    /// `reaches_inside(column, row)`: no bounds to test.
    #[inline]
    pub fn step_from(
        &self,
        cell: usize,
        column: i32,
        row: i32,
        spot: &Spot,
    ) -> (usize, usize, usize) {
        debug_assert!(self.reaches_inside(column, row));
        (
            cell.wrapping_add_signed(spot.step),
            (column + spot.dx) as usize,
            (row + spot.dy) as usize,
        )
    }

    /// Jittered position of a cell's node, in cells.
    #[inline]
    pub fn position(&self, cell: usize) -> (f64, f64) {
        self.position_at(cell, cell % self.width, cell / self.width)
    }

    /// `position(cell)` for a cell whose column and row are known (no division).
    #[inline]
    pub fn position_at(&self, cell: usize, column: usize, row: usize) -> (f64, f64) {
        debug_assert_eq!(cell, row * self.width + column);
        // Width and height are `u32`s: through `u32` the conversion to `f64` is shorter than
        // from `usize` (an unsigned 64-bit integer) and as exact.
        let column = f64::from(column as u32) + 0.5;
        let row = f64::from(row as u32) + 0.5;
        match self.jitter.get(cell) {
            Some(&[dx, dy]) => (column + dx as f64, row + dy as f64),
            None => (column, row),
        }
    }
}

/// A length no greater than the computed distance `sqrt(vx^2 + vy^2)` between two points whose
/// cells are `(dx, dy)` apart and which lie at most `slack` (in x and in y together) off their
/// cells' centres. Each component is at least `|d| - slack`; the result is further lowered by
/// a millionth of a cell and a millionth of itself, far more than the rounding of positions
/// (single-precision jitter) and of the distance can take off the computed length.
fn length_floor(dx: i32, dy: i32, slack: f64) -> f64 {
    let slack = slack * (1.0 + 1e-6) + 1e-6;
    let x = (f64::from(dx.abs()) - slack).max(0.0);
    let y = (f64::from(dy.abs()) - slack).max(0.0);
    ((x * x + y * y).sqrt() * (1.0 - 1e-6) - 1e-6).max(0.0)
}
