//! `Site::to_params`: a site as run parameters (lattice from the outline's bounding box,
//! outline, obstacles and zones in cells, roots from outlets, spot levels).

use super::geometry::{bounds, nearest_edge, signed_area};
use super::{feature_place, ElevationRaster, Site, SiteError, SpotLevel};
use crate::params::{
    CostWeights, Domain, Joining, Params, Root, RunControl, Widths, Zone, MAX_CELLS,
};
use crate::region::{allowed_cells, zone_cells};
use crate::terrain::SpotSurface;

/// How the ground of a site reaches the run.
#[derive(Clone, Debug, PartialEq)]
pub enum Terrain {
    /// The site's own spot levels (from its file, or `Site::set_levels`), at least three.
    SpotLevels,
    /// A uniform grade: rise per unit run to the east and to the north (m/m or ft/ft).
    Grade {
        /// Rise per unit run to the east.
        east: f64,
        /// Rise per unit run to the north.
        north: f64,
    },
    /// An elevation raster, sampled into spot levels on a regular grid of `per_side` x
    /// `per_side` points over the outline's bounding box (those inside the outline with
    /// ground): an approximation of the raster by inverse distance weighting.
    Raster {
        /// The raster, placed in the site's coordinates.
        raster: ElevationRaster,
        /// Sample points per side of the bounding box; at most 64 (`MAX_LEVELS` = 64²).
        per_side: u32,
    },
}

/// Drained area at which a site's channels begin, m² (about one yard inlet's catchment;
/// common practice, no source): the `vein_area` of a site's parameters.
pub const CHANNEL_HEAD_AREA_M2: f64 = 25.0;

/// Outlets farther than this from every allowed cell centre (in cells) are refused: the
/// site is too narrow there for the cell size.
const OUTLET_REACH_CELLS: f64 = 2.0;

impl Site {
    /// A point of the network's frame of `to_params` (physical units from the outline's
    /// bounding box's top-left corner, y down the page) in the site's coordinates (y north).
    pub fn network_to_site(&self, point: [f64; 2]) -> [f64; 2] {
        let (low, high) = bounds(&self.outline);
        [low[0] + point[0], high[1] - point[1]]
    }

    /// Run parameters for this site on cells of `cell_size` (the site's unit): a lattice over
    /// the outline's bounding box, the outline, obstacles and runoff zones in cells, a root on
    /// the allowed cell nearest each outlet with its outflow out through the nearest edge of
    /// the outline (an outlet within two cells of it) or else downhill, the ground from
    /// `terrain`, and drainage costs (those of the `drainage-site` preset), with segments kept
    /// off the obstacles (`keep_clear`). The budget is every allowed cell. Fails when the
    /// parameters would not validate. Parts of the site that no outlet can reach are not
    /// refused: the grown layout leaves them unreached, and `unreached_parts` lists them.
    pub fn to_params(&self, cell_size: f64, terrain: &Terrain) -> Result<Params, SiteError> {
        let problem = |problem: String| SiteError::Params { problem };
        if !(cell_size.is_finite() && cell_size > 0.0) {
            return Err(problem(format!(
                "cell size {cell_size} {}: a positive length is needed",
                self.units
            )));
        }
        // A `Site` from `read_site` always passes; one built by hand may not.
        let rings = std::iter::once(&self.outline)
            .chain(self.obstacles.iter().map(|obstacle| &obstacle.ring))
            .chain(self.zones.iter().map(|zone| &zone.ring));
        for ring in rings {
            if ring.len() < 3 || !ring.iter().flatten().all(|value| value.is_finite()) {
                return Err(problem(format!(
                    "a ring of {} positions; every ring needs at least 3 finite positions",
                    ring.len()
                )));
            }
        }
        let (low, high) = bounds(&self.outline);
        let columns = ((high[0] - low[0]) / cell_size).ceil().max(1.0);
        let rows = ((high[1] - low[1]) / cell_size).ceil().max(1.0);
        if columns > 20_000.0 || rows > 20_000.0 || columns * rows > MAX_CELLS as f64 {
            return Err(problem(format!(
                "a {cell_size} {} cell size makes {columns} x {rows} cells; at most 20,000 a side and {MAX_CELLS} in all: choose larger cells",
                self.units
            )));
        }
        let (width, height) = (columns as u32, rows as u32);
        // Site (x east, y north) to cells (x right, y down from the bounding box's top).
        let to_cells = |point: [f64; 2]| -> [f64; 2] {
            [
                (point[0] - low[0]) / cell_size,
                (high[1] - point[1]) / cell_size,
            ]
        };
        let ring_cells = |ring: &[[f64; 2]]| ring.iter().map(|&point| to_cells(point)).collect();
        let mut zones = Vec::with_capacity(self.zones.len());
        for zone in &self.zones {
            if zone.runoff_coefficient < 0.01 {
                return Err(SiteError::RunoffCoefficient {
                    feature: feature_place(zone.feature, zone.name.as_deref()),
                    problem: format!(
                        "{} is below 0.01, the smallest that growth carries; draw ground that sheds no water as an obstacle",
                        zone.runoff_coefficient
                    ),
                });
            }
            zones.push(Zone {
                runoff: zone.runoff_coefficient,
                polygon: ring_cells(&zone.ring),
            });
        }
        let (levels, grade) = match terrain {
            Terrain::SpotLevels => {
                if self.levels.is_empty() {
                    return Err(problem(
                        "the site has no spot levels; give some (role \"level\" or a spot-level file) or choose a uniform grade".to_string(),
                    ));
                }
                (self.levels.clone(), [0.0, 0.0])
            }
            Terrain::Grade { east, north } => {
                if !(east.abs() <= 1.0 && north.abs() <= 1.0) {
                    return Err(problem(format!(
                        "grade ({east}, {north}): a rise of at most 1 per unit run each way"
                    )));
                }
                // `grade_y` rises down the page, i.e. to the south.
                (Vec::new(), [*east, -north])
            }
            Terrain::Raster { raster, per_side } => {
                let per_side = (*per_side).clamp(1, 64);
                let samples = raster.sample_levels(&self.outline, per_side);
                if samples.len() < 3 {
                    return Err(SiteError::Raster {
                        problem: format!(
                            "only {} of {} sample points fall on the raster inside the site; does the raster cover the site, in the site's coordinates?",
                            samples.len(),
                            per_side * per_side
                        ),
                    });
                }
                (samples, [0.0, 0.0])
            }
        };
        let level_cells: Vec<[f64; 3]> = levels
            .iter()
            .map(|level| {
                let [x, y] = to_cells([level.x, level.y]);
                [x, y, level.z]
            })
            .collect();
        let mut params = Params {
            domain: Domain {
                width,
                height,
                cell_size,
                units: self.units.clone(),
                jitter: 0.35,
                roots: vec![Root {
                    x: 0,
                    y: 0,
                    outflow: [0.0, 1.0],
                }],
                outline: Some(ring_cells(&self.outline)),
                obstacles: self
                    .obstacles
                    .iter()
                    .map(|obstacle| ring_cells(&obstacle.ring))
                    .collect(),
                mask: None,
                grade_x: grade[0],
                grade_y: grade[1],
                runoff: 1.0,
                levels: level_cells,
                zones,
                refine: 1,
                front_only: false,
                midrib: 0.0,
            },
            costs: CostWeights::drainage(),
            run: RunControl {
                seed: 1,
                radius: 4.0,
                joining: Joining::Weighted,
                temperature: 0.5,
                // Channels go round buildings and areas kept clear, never across them.
                keep_clear: true,
                ..RunControl::default()
            },
            widths: Widths {
                tip_width: 0.05,
                // Channels begin where this much drains; the rest is hillslope, drained
                // overland to them (the inlet time covers it).
                vein_area: if self.units == "ft" {
                    CHANNEL_HEAD_AREA_M2 / (0.3048 * 0.3048)
                } else {
                    CHANNEL_HEAD_AREA_M2
                },
                ..Widths::default()
            },
        };
        let allowed = allowed_cells(&params);
        let allowed_count = allowed.iter().filter(|&&ok| ok).count();
        if allowed_count == 0 {
            return Err(problem(format!(
                "no cell centre of {cell_size} {} lies inside the outline and outside the obstacles: choose smaller cells",
                self.units
            )));
        }
        params.run.cells = allowed_count as u64;
        params.domain.runoff = self.ground_runoff(&params, &allowed)?;
        params.domain.roots = self.roots(&params, &allowed, &to_cells, &levels)?;
        params
            .validate()
            .map_err(|error| problem(error.to_string()))?;
        Ok(params)
    }

    /// The coefficient of ground in no zone: the site's `runoff_coefficient`; without one,
    /// every allowed cell must lie in a zone (the mean of their coefficients is then kept as
    /// the run's `runoff`, the reference of the width rule).
    fn ground_runoff(&self, params: &Params, allowed: &[bool]) -> Result<f64, SiteError> {
        let zone_of = zone_cells(params);
        let in_zone = |cell: usize| zone_of.get(cell).is_some_and(|&zone| zone > 0);
        if let Some(coefficient) = self.runoff_coefficient {
            if coefficient < 0.01 {
                return Err(SiteError::RunoffCoefficient {
                    feature: "the site".to_string(),
                    problem: format!(
                        "{coefficient} is below 0.01, the smallest that growth carries"
                    ),
                });
            }
            return Ok(coefficient);
        }
        let bare = (0..allowed.len())
            .filter(|&cell| allowed[cell] && !in_zone(cell))
            .count();
        if bare > 0 {
            return Err(SiteError::RunoffCoefficient {
                feature: "the site".to_string(),
                problem: format!(
                    "{bare} cell(s) lie in no zone and the site gives no `runoff_coefficient` for such ground; give one in the collection's properties"
                ),
            });
        }
        let (sum, count) = (0..allowed.len()).filter(|&cell| allowed[cell]).fold(
            (0.0, 0usize),
            |(sum, count), cell| {
                (
                    sum + params.domain.zones[zone_of[cell] as usize - 1].runoff,
                    count + 1,
                )
            },
        );
        Ok(sum / count as f64)
    }

    /// A root per outlet: the allowed cell whose centre is nearest, flowing out through the
    /// nearest edge of the outline or downhill.
    fn roots(
        &self,
        params: &Params,
        allowed: &[bool],
        to_cells: &dyn Fn([f64; 2]) -> [f64; 2],
        levels: &[SpotLevel],
    ) -> Result<Vec<Root>, SiteError> {
        let width = params.domain.width as usize;
        let cell_size = params.domain.cell_size;
        let counter_clockwise = signed_area(&self.outline) > 0.0;
        let surface = SpotSurface::new(
            levels
                .iter()
                .map(|level| [level.x, level.y, level.z])
                .collect(),
        );
        let mut roots: Vec<Root> = Vec::new();
        for outlet in &self.outlets {
            let place = feature_place(outlet.feature, outlet.name.as_deref());
            let [ox, oy] = to_cells(outlet.point);
            let nearest = (0..allowed.len())
                .filter(|&cell| allowed[cell])
                .map(|cell| {
                    let (column, row) = (cell % width, cell / width);
                    let dx = column as f64 + 0.5 - ox;
                    let dy = row as f64 + 0.5 - oy;
                    (cell, dx * dx + dy * dy)
                })
                .min_by(|a, b| a.1.total_cmp(&b.1));
            let Some((cell, squared)) = nearest else {
                continue;
            };
            if squared.sqrt() > OUTLET_REACH_CELLS {
                return Err(SiteError::Params {
                    problem: format!(
                        "{place}: no cell of the site lies within {OUTLET_REACH_CELLS} cells of the outlet; choose smaller cells"
                    ),
                });
            }
            let (x, y) = ((cell % width) as u32, (cell / width) as u32);
            if let Some(other) = roots.iter().position(|root| root.x == x && root.y == y) {
                let other = &self.outlets[other];
                return Err(SiteError::Params {
                    problem: format!(
                        "{place} and {} fall on the same cell ({x}, {y}); choose smaller cells or keep one outlet",
                        feature_place(other.feature, other.name.as_deref())
                    ),
                });
            }
            let outward = nearest_edge(&self.outline, outlet.point).map(|(edge, distance)| {
                let a = self.outline[edge];
                let b = self.outline[(edge + 1) % self.outline.len()];
                let (dx, dy) = (b[0] - a[0], b[1] - a[1]);
                let normal = if counter_clockwise {
                    [dy, -dx]
                } else {
                    [-dy, dx]
                };
                (normal, distance)
            });
            // Downhill at the outlet, in the site's frame (x east, y north).
            let downhill = match &surface {
                Some(surface) => {
                    let [px, py] = outlet.point;
                    let step = cell_size;
                    [
                        -(surface.at(px + step, py) - surface.at(px - step, py)),
                        -(surface.at(px, py + step) - surface.at(px, py - step)),
                    ]
                }
                // grade_x rises east, grade_y rises south.
                None => [-params.domain.grade_x, params.domain.grade_y],
            };
            let direction = match outward {
                Some((normal, distance)) if distance <= OUTLET_REACH_CELLS * cell_size => normal,
                _ if downhill[0].hypot(downhill[1]) > 1e-12 => downhill,
                Some((normal, _)) => normal,
                None => [0.0, -1.0],
            };
            let length = direction[0].hypot(direction[1]);
            let direction = if length > 0.0 && length.is_finite() {
                [direction[0] / length, direction[1] / length]
            } else {
                [0.0, -1.0]
            };
            roots.push(Root {
                x,
                y,
                // Site y north is lattice y up: flip it.
                outflow: [direction[0], -direction[1]],
            });
        }
        Ok(roots)
    }
}
