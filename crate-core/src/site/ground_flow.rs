//! Natural flow on a site's ground, before any channel: `ground_flow` routes every allowed cell
//! of a run to its steepest-descent neighbour among eight (the D8 method of O'Callaghan & Mark
//! 1984, "The extraction of drainage networks from digital elevation data", Computer Vision,
//! Graphics and Image Processing 28: 323-344), accumulates the contributing area of each cell,
//! and reports where the water ends: at an outlet, over the site's edge, or in a low spot
//! (`LowSpot`: a cell with no lower neighbour that is not an outlet, where water ponds unless
//! the ground is graded). `d8_directions` and `accumulate` are the two steps on a bare grid.
//!
//! Slope to a neighbour is drop / distance, the distance one cell size across and down and
//! sqrt(2) cell sizes on the diagonals (O'Callaghan & Mark 1984, section 3). Water does not
//! cross obstacles (buildings, walls): a blocked neighbour is never a receiver. A neighbour
//! outside the outline (or off the lattice) may receive: the water then leaves the site there.
//! Outlet cells receive and pass nothing on. Ties are broken in a fixed order: of equally
//! steep neighbours the first in `NEIGHBOURS` (north, then clockwise: north-east, east,
//! south-east, south, south-west, west, north-west; north is up the lattice, a row less) wins.
//! A cell whose lowest neighbour is level with it or higher has no downhill neighbour: a flat
//! or a pit both count as low spots.

use crate::params::Params;
use crate::region::allowed_cells;
use crate::terrain::Elevation;

/// `downhill` of a cell that passes its water to no other cell of the site.
pub const NO_DOWNHILL: u32 = u32::MAX;

/// The eight neighbours `(dx, dy)` in lattice axes (y down), in the tie-breaking order: north
/// (up the lattice), then clockwise.
pub const NEIGHBOURS: [(i64, i64); 8] = [
    (0, -1),
    (1, -1),
    (1, 0),
    (1, 1),
    (0, 1),
    (-1, 1),
    (-1, 0),
    (-1, -1),
];

/// What a cell is to the flow.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum CellKind {
    /// Allowed ground: it passes its water on.
    Ground,
    /// An outlet's cell: it takes water and passes none on.
    Outlet,
    /// Outside the outline: water reaching it has left the site.
    Outside,
    /// An obstacle: water does not enter it.
    Blocked,
}

/// Where a cell's water goes.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Route {
    /// To this cell of the site (row-major index).
    To(u32),
    /// Off the site, over its edge.
    OffSite,
    /// Nowhere lower: a low spot (or the cell is an outlet, outside, or blocked).
    Stays,
}

/// A low spot: a cell of the site with no lower neighbour that is not an outlet.
#[derive(Clone, Debug, PartialEq)]
pub struct LowSpot {
    /// Row-major cell index.
    pub cell: usize,
    /// Its centre in the network's frame (physical units, y down the page).
    pub centre: [f64; 2],
    /// Ground elevation there, the run's length unit.
    pub elevation: f64,
    /// Area whose water ends there (the cell's own included), the run's length unit squared.
    pub area: f64,
}

/// Natural flow on a run's ground.
#[derive(Clone, Debug, PartialEq)]
pub struct GroundFlow {
    /// Lattice columns.
    pub width: usize,
    /// Lattice rows.
    pub height: usize,
    /// Each cell's downhill neighbour (row-major), or `NO_DOWNHILL`.
    pub downhill: Vec<u32>,
    /// Each cell's contributing area (its own and every cell draining through it), the run's
    /// length unit squared; 0 outside the allowed cells.
    pub area: Vec<f64>,
    /// Area reaching each outlet (root order) over the ground alone.
    pub outlet_areas: Vec<f64>,
    /// Area leaving over the site's edge.
    pub off_site_area: f64,
    /// The low spots, largest catchment first (ties: lower cell index first).
    pub low_spots: Vec<LowSpot>,
    /// Area of every allowed cell: the outlets', the edge's and the low spots' areas add up to it.
    pub allowed_area: f64,
}

/// D8 routes of a grid: `elevation` and `kinds` row-major, `width` columns. Each `Ground` cell
/// goes to its steepest lower neighbour that is `Ground`, `Outlet` or `Outside` (cells off the
/// grid count as `Outside` at the elevation `beyond` gives for `(column, row)`), ties to the
/// first in `NEIGHBOURS`; `Route::OffSite` when that neighbour is outside; `Route::Stays` when
/// none is lower. Other cells stay.
pub fn d8_directions(
    elevation: &[f64],
    kinds: &[CellKind],
    width: usize,
    beyond: &dyn Fn(i64, i64) -> f64,
) -> Vec<Route> {
    let height = elevation.len().checked_div(width).unwrap_or(0);
    let mut routes = vec![Route::Stays; elevation.len()];
    for (cell, route) in routes.iter_mut().enumerate() {
        if kinds[cell] != CellKind::Ground {
            continue;
        }
        let (column, row) = ((cell % width) as i64, (cell / width) as i64);
        let here = elevation[cell];
        let mut best: Option<(f64, Route)> = None;
        for (dx, dy) in NEIGHBOURS {
            let (x, y) = (column + dx, row + dy);
            let distance = if dx != 0 && dy != 0 {
                core::f64::consts::SQRT_2
            } else {
                1.0
            };
            let inside = x >= 0 && y >= 0 && (x as usize) < width && (y as usize) < height;
            let (there, receiver) = if inside {
                let next = y as usize * width + x as usize;
                match kinds[next] {
                    CellKind::Blocked => continue,
                    CellKind::Outside => (elevation[next], Route::OffSite),
                    CellKind::Ground | CellKind::Outlet => {
                        (elevation[next], Route::To(next as u32))
                    }
                }
            } else {
                (beyond(x, y), Route::OffSite)
            };
            let slope = (here - there) / distance;
            // Strictly steeper replaces: the first of equal slopes stays (the stated tie rule).
            if slope > 0.0 && best.is_none_or(|(steepest, _)| slope > steepest) {
                best = Some((slope, receiver));
            }
        }
        if let Some((_, receiver)) = best {
            *route = receiver;
        }
    }
    routes
}

/// Contributing area of every cell: `cell_area` for each `Ground` or `Outlet` cell plus all
/// that flows into it along `routes`. Flow only runs downhill, so cells are visited from the
/// highest down (ties by index), each handing its total to its receiver.
pub fn accumulate(
    elevation: &[f64],
    kinds: &[CellKind],
    routes: &[Route],
    cell_area: f64,
) -> Vec<f64> {
    let mut area: Vec<f64> = kinds
        .iter()
        .map(|kind| match kind {
            CellKind::Ground | CellKind::Outlet => cell_area,
            _ => 0.0,
        })
        .collect();
    let mut order: Vec<usize> = (0..elevation.len()).collect();
    order.sort_by(|&a, &b| elevation[b].total_cmp(&elevation[a]).then(a.cmp(&b)));
    for cell in order {
        if let Route::To(next) = routes[cell] {
            area[next as usize] += area[cell];
        }
    }
    area
}

/// Natural flow on the ground of validated `params`: elevations at cell centres from the run's
/// ground (`Elevation::of_run`), allowed cells as ground, the roots' cells as outlets, cells
/// outside the outline (or mask) as off-site, obstacles blocked.
pub fn ground_flow(params: &Params) -> GroundFlow {
    let width = params.domain.width as usize;
    let height = params.domain.height as usize;
    let size = params.domain.cell_size;
    let ground = Elevation::of_run(params);
    let centre = |column: i64, row: i64| [(column as f64 + 0.5) * size, (row as f64 + 0.5) * size];
    let at = |column: i64, row: i64| {
        let [x, y] = centre(column, row);
        ground.at(x, y)
    };
    let allowed = allowed_cells(params);
    let inside = {
        let mut open = params.clone();
        open.domain.obstacles.clear();
        allowed_cells(&open)
    };
    let mut kinds: Vec<CellKind> = (0..width * height)
        .map(|cell| {
            if allowed[cell] {
                CellKind::Ground
            } else if inside[cell] {
                CellKind::Blocked
            } else {
                CellKind::Outside
            }
        })
        .collect();
    let outlet_cells: Vec<usize> = params
        .domain
        .roots
        .iter()
        .map(|root| root.y as usize * width + root.x as usize)
        .collect();
    for &cell in &outlet_cells {
        if cell < kinds.len() && kinds[cell] == CellKind::Ground {
            kinds[cell] = CellKind::Outlet;
        }
    }
    let elevation: Vec<f64> = (0..width * height)
        .map(|cell| at((cell % width) as i64, (cell / width) as i64))
        .collect();
    let routes = d8_directions(&elevation, &kinds, width, &at);
    let cell_area = size * size;
    let area = accumulate(&elevation, &kinds, &routes, cell_area);
    let downhill = routes
        .iter()
        .map(|route| match route {
            Route::To(next) => *next,
            _ => NO_DOWNHILL,
        })
        .collect();
    let outlet_areas = outlet_cells
        .iter()
        .map(|&cell| area.get(cell).copied().unwrap_or(0.0))
        .collect();
    let mut off_site_area = 0.0;
    let mut low_spots = Vec::new();
    for cell in 0..width * height {
        if kinds[cell] != CellKind::Ground {
            continue;
        }
        match routes[cell] {
            Route::OffSite => off_site_area += area[cell],
            Route::Stays => low_spots.push(LowSpot {
                cell,
                centre: centre((cell % width) as i64, (cell / width) as i64),
                elevation: elevation[cell],
                area: area[cell],
            }),
            Route::To(_) => {}
        }
    }
    low_spots.sort_by(|a, b| b.area.total_cmp(&a.area).then(a.cell.cmp(&b.cell)));
    let allowed_area = allowed.iter().filter(|&&cell| cell).count() as f64 * cell_area;
    GroundFlow {
        width,
        height,
        downhill,
        area,
        outlet_areas,
        off_site_area,
        low_spots,
        allowed_area,
    }
}
