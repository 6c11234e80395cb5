//! Drainage sites brought in from a file: `read_site` reads a GeoJSON site (RFC 7946) into a
//! `Site` (outline, obstacles, runoff zones, outlets, spot levels), `read_spot_levels_csv`
//! reads spot levels from `x,y,z` lines, `Site::to_params` turns a site into run parameters,
//! `unreached_parts` finds the parts of a grown layout that no outlet reaches, and
//! `node_area_runoff` gives each node of a grown network its drained area and runoff
//! coefficient.
//!
//! The site file is a `FeatureCollection` whose features carry `properties.role`:
//! - `outline` (Polygon, exactly one): the site boundary;
//! - `obstacle` (Polygon, optional `name`): kept clear, no channel crosses it;
//! - `zone` (Polygon, `runoff_coefficient` in [0, 1], optional `name` and `surface`): a surface
//!   with its own runoff coefficient; a later zone lies over an earlier one;
//! - `outlet` (Point, optional `name`): where the drainage leaves the site;
//! - `level` (Point, `elevation`): a spot level of the ground.
//!
//! The collection's own `properties` may give `units` (`m`, the default, or `ft`) and
//! `runoff_coefficient` (the coefficient of ground in no zone). Coordinates are projected
//! (x east, y north) in those units, not longitude and latitude (RFC 7946 section 4 allows
//! such an agreement between the parties). Polygons are single rings: a ring must be closed
//! (last position equal to the first) and must not cross or touch itself; holes are refused
//! (draw an obstacle or a zone over the place instead). Every error names the feature (index
//! and name) and what is wrong; nothing is repaired silently. Nothing here reads files.

pub(crate) mod geometry;
mod geotiff;
mod ground_flow;
mod levels_csv;
mod reader;
mod runoff;
mod to_params;
mod unreached;
mod writer;

pub use geotiff::{read_geotiff, ElevationRaster};
pub use ground_flow::{
    accumulate, d8_directions, ground_flow, CellKind, GroundFlow, LowSpot, Route, NEIGHBOURS,
    NO_DOWNHILL,
};
pub use levels_csv::read_spot_levels_csv;
pub use reader::read_site;
pub use runoff::{node_area_runoff, NodeRunoff};
pub use to_params::Terrain;
pub use unreached::{unreached_parts, UnreachedPart, UnreachedPolygon};

/// Most positions in one ring: the self-crossing check compares every pair of edges.
pub const MAX_RING_POSITIONS: usize = 10_000;

/// Most pairs of edges the self-crossing checks of one site file compare, over all its rings
/// (a ring of n positions takes about n² / 2): those of one ring of `MAX_RING_POSITIONS`, so
/// that a small file of many long rings cannot keep the reader busy for minutes.
pub const MAX_SITE_EDGE_PAIRS: u64 = (MAX_RING_POSITIONS as u64 * MAX_RING_POSITIONS as u64) / 2;

/// Most features in a site file.
pub const MAX_SITE_FEATURES: usize = 20_000;

/// A drainage site as read from its file, in the file's projected coordinates (x east, y north).
#[derive(Clone, Debug, PartialEq)]
pub struct Site {
    /// Length unit of the coordinates and elevations: `m` or `ft`.
    pub units: String,
    /// The outline's ring, without the closing position repeated.
    pub outline: Vec<[f64; 2]>,
    /// Index of the outline's feature in the file.
    pub outline_feature: usize,
    /// Areas kept clear.
    pub obstacles: Vec<SitePolygon>,
    /// Surfaces with their own runoff coefficients, in file order.
    pub zones: Vec<RunoffZone>,
    /// Where the drainage leaves the site.
    pub outlets: Vec<Outlet>,
    /// Spot levels of the ground (from the file or `Site::set_levels`).
    pub levels: Vec<SpotLevel>,
    /// Runoff coefficient of ground in no zone (the collection's `runoff_coefficient`).
    pub runoff_coefficient: Option<f64>,
}

/// An obstacle: a ring and where it came from.
#[derive(Clone, Debug, PartialEq)]
pub struct SitePolygon {
    /// Feature index in the file.
    pub feature: usize,
    /// The feature's `name`, if any.
    pub name: Option<String>,
    /// The ring, without the closing position repeated.
    pub ring: Vec<[f64; 2]>,
}

/// A runoff zone: a surface with its runoff coefficient.
#[derive(Clone, Debug, PartialEq)]
pub struct RunoffZone {
    /// Feature index in the file.
    pub feature: usize,
    /// The feature's `name`, if any.
    pub name: Option<String>,
    /// The surface's name (`surface` property), if any: roof, gravel, lawn.
    pub surface: Option<String>,
    /// Runoff coefficient C (rational method), in [0, 1].
    pub runoff_coefficient: f64,
    /// The ring, without the closing position repeated.
    pub ring: Vec<[f64; 2]>,
}

/// An outlet: where the site's drainage leaves it (a street drain, a ditch, a soakaway).
#[derive(Clone, Debug, PartialEq)]
pub struct Outlet {
    /// Feature index in the file.
    pub feature: usize,
    /// The feature's `name`, if any.
    pub name: Option<String>,
    /// Its position.
    pub point: [f64; 2],
}

/// A spot level: a surveyed ground elevation.
#[derive(Clone, Debug, PartialEq)]
pub struct SpotLevel {
    /// Where it came from: `feature 7` or `line 3`.
    pub place: String,
    /// Position, x east.
    pub x: f64,
    /// Position, y north.
    pub y: f64,
    /// Ground elevation in the site's unit.
    pub z: f64,
}

/// What is wrong with a site file, a spot-level file, an elevation raster, or a site's
/// parameters; each names the feature, line or tag it is about.
#[derive(Clone, Debug, PartialEq)]
pub enum SiteError {
    /// The text is not JSON (or not UTF-8).
    NotJson {
        /// Line and column, or byte offset.
        place: String,
        /// The parser's words.
        problem: String,
    },
    /// The JSON is not a GeoJSON `FeatureCollection`, or a feature is not a GeoJSON feature.
    NotSite {
        /// What is wrong.
        problem: String,
    },
    /// A feature has no `role`, or one that a site does not know.
    Role {
        /// Feature index and name.
        feature: String,
        /// The role found, if any.
        found: Option<String>,
    },
    /// A feature's geometry is not the kind its role needs.
    Geometry {
        /// Feature index and name.
        feature: String,
        /// The role.
        role: &'static str,
        /// What it needs (`a Polygon`, `a Point`).
        expected: &'static str,
        /// What it has.
        found: String,
    },
    /// A polygon ring is not closed: its last position differs from its first, or it has
    /// fewer than four positions.
    OpenRing {
        /// Feature index and name.
        feature: String,
        /// What is wrong with the ring.
        problem: String,
    },
    /// A polygon ring crosses or touches itself.
    SelfIntersecting {
        /// Feature index and name.
        feature: String,
        /// The two edges that meet, numbered from 0 (edge k joins positions k and k + 1).
        edges: (usize, usize),
        /// About where they meet.
        near: [f64; 2],
    },
    /// A polygon has holes (inner rings), which a site does not read.
    Holes {
        /// Feature index and name.
        feature: String,
        /// How many.
        count: usize,
    },
    /// A position is not two or three finite numbers, or a ring has too many positions.
    Position {
        /// Feature index and name.
        feature: String,
        /// What is wrong.
        problem: String,
    },
    /// The site has no outline.
    NoOutline,
    /// The site has two outlines.
    TwoOutlines {
        /// The first outline's feature.
        first: String,
        /// The second outline's feature.
        second: String,
    },
    /// The site has no outlet.
    NoOutlet,
    /// An outlet lies outside the site.
    OutletOutside {
        /// Feature index and name.
        feature: String,
        /// Its position.
        point: [f64; 2],
    },
    /// An outlet lies inside an obstacle.
    OutletInObstacle {
        /// Feature index and name of the outlet.
        feature: String,
        /// Feature index and name of the obstacle.
        obstacle: String,
    },
    /// A runoff coefficient is missing, not a number, or outside [0, 1].
    RunoffCoefficient {
        /// Feature index and name, or `the site`.
        feature: String,
        /// What is wrong.
        problem: String,
    },
    /// A spot level has no usable `elevation`.
    Elevation {
        /// Feature index and name.
        feature: String,
        /// What is wrong.
        problem: String,
    },
    /// Spot levels were given, but fewer than three: a ground surface needs at least three.
    FewSpotLevels {
        /// How many were given.
        count: usize,
    },
    /// More spot levels than a run takes (`MAX_LEVELS`).
    TooManyLevels {
        /// How many were given.
        count: usize,
    },
    /// A spot level lies outside the site.
    LevelOutside {
        /// Feature or line.
        place: String,
        /// Its position.
        point: [f64; 2],
    },
    /// Two spot levels at the same place.
    LevelsAtOnePlace {
        /// The first.
        first: String,
        /// The second.
        second: String,
    },
    /// A length unit other than `m` or `ft`, or a feature's unit differing from the site's.
    Units {
        /// Feature index and name, or `the site`.
        feature: String,
        /// What is wrong.
        problem: String,
    },
    /// A line of a spot-level file is not `x,y,z`.
    Csv {
        /// Line number, from 1.
        line: usize,
        /// What is wrong.
        problem: String,
    },
    /// An elevation raster that cannot be read or placed.
    Raster {
        /// What is wrong.
        problem: String,
    },
    /// The site and cell size do not make valid run parameters (too many cells, a zone
    /// coefficient below what growth carries, outlets sharing a cell, ...).
    Params {
        /// What is wrong, in the site's words.
        problem: String,
    },
    /// An SVG site plan's element cannot be read or has no usable site role.
    Svg {
        /// The element and its line, e.g. `<path id="shed"> (line 9)`.
        element: String,
        /// What is wrong.
        problem: String,
    },
    /// The scale of an SVG site plan is missing, unreadable or unusable with the drawing.
    SvgScale {
        /// What is wrong.
        problem: String,
    },
}

impl std::fmt::Display for SiteError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            SiteError::NotJson { place, problem } => {
                write!(f, "site file, {place}: not readable JSON: {problem}")
            }
            SiteError::NotSite { problem } => write!(f, "site file: {problem}"),
            SiteError::Role { feature, found } => match found {
                Some(role) => write!(
                    f,
                    "{feature}: unknown role {role:?}; a site feature's role is outline, obstacle, zone, outlet or level"
                ),
                None => write!(
                    f,
                    "{feature}: no `role` property; give outline, obstacle, zone, outlet or level"
                ),
            },
            SiteError::Geometry {
                feature,
                role,
                expected,
                found,
            } => write!(f, "{feature}: a site {role} must be {expected}, not {found}"),
            SiteError::OpenRing { feature, problem } => {
                write!(f, "{feature}: the ring is open: {problem} (RFC 7946, section 3.1.6)")
            }
            SiteError::SelfIntersecting {
                feature,
                edges,
                near,
            } => write!(
                f,
                "{feature}: the ring crosses or touches itself: edges {} and {} meet near ({}, {})",
                edges.0, edges.1, near[0], near[1]
            ),
            SiteError::Holes { feature, count } => write!(
                f,
                "{feature}: the polygon has {count} hole(s); a site reads single rings only: draw an obstacle or a zone over the place instead"
            ),
            SiteError::Position { feature, problem } => write!(f, "{feature}: {problem}"),
            SiteError::NoOutline => write!(
                f,
                "site file: no outline; one Polygon feature needs role \"outline\""
            ),
            SiteError::TwoOutlines { first, second } => write!(
                f,
                "site file: two outlines ({first} and {second}); a site has exactly one"
            ),
            SiteError::NoOutlet => write!(
                f,
                "site file: no outlet; at least one Point feature needs role \"outlet\""
            ),
            SiteError::OutletOutside { feature, point } => write!(
                f,
                "{feature}: the outlet at ({}, {}) lies outside the site outline",
                point[0], point[1]
            ),
            SiteError::OutletInObstacle { feature, obstacle } => write!(
                f,
                "{feature}: the outlet lies inside obstacle {obstacle}, where no channel may run"
            ),
            SiteError::RunoffCoefficient { feature, problem } => {
                write!(f, "{feature}: runoff coefficient: {problem}")
            }
            SiteError::Elevation { feature, problem } => {
                write!(f, "{feature}: spot level: {problem}")
            }
            SiteError::FewSpotLevels { count } => write!(
                f,
                "{count} spot level(s) given; a ground surface needs at least 3 (or none, for a uniform grade)"
            ),
            SiteError::TooManyLevels { count } => write!(
                f,
                "{count} spot levels given; a run takes at most {}",
                crate::limits::MAX_LEVELS
            ),
            SiteError::LevelOutside { place, point } => write!(
                f,
                "{place}: the spot level at ({}, {}) lies outside the site outline",
                point[0], point[1]
            ),
            SiteError::LevelsAtOnePlace { first, second } => write!(
                f,
                "{second}: stands at the same place as {first}; spot levels need places of their own"
            ),
            SiteError::Units { feature, problem } => write!(f, "{feature}: units: {problem}"),
            SiteError::Csv { line, problem } => {
                write!(f, "spot-level file, line {line}: {problem}")
            }
            SiteError::Raster { problem } => write!(f, "elevation raster: {problem}"),
            SiteError::Params { problem } => write!(f, "site parameters: {problem}"),
            SiteError::Svg { element, problem } => write!(f, "site plan (SVG) {element}: {problem}"),
            SiteError::SvgScale { problem } => write!(f, "site plan (SVG) scale: {problem}"),
        }
    }
}

impl std::error::Error for SiteError {}

/// `feature 3 ("pavilion")`, or `feature 3` without a name: how messages name a feature.
pub(crate) fn feature_place(index: usize, name: Option<&str>) -> String {
    match name {
        Some(name) => format!("feature {index} ({name:?})"),
        None => format!("feature {index}"),
    }
}

impl Site {
    /// Replaces the site's spot levels (say, from `read_spot_levels_csv`), checking them as the
    /// file's are: none, or at least three, each inside the site, no two at one place.
    pub fn set_levels(&mut self, levels: Vec<SpotLevel>) -> Result<(), SiteError> {
        check_levels(&self.outline, &levels)?;
        self.levels = levels;
        Ok(())
    }
}

/// None or at least three levels, each inside (or on) the outline, no two at one place.
pub(crate) fn check_levels(outline: &[[f64; 2]], levels: &[SpotLevel]) -> Result<(), SiteError> {
    if !levels.is_empty() && levels.len() < 3 {
        return Err(SiteError::FewSpotLevels {
            count: levels.len(),
        });
    }
    if levels.len() > crate::limits::MAX_LEVELS {
        return Err(SiteError::TooManyLevels {
            count: levels.len(),
        });
    }
    for level in levels {
        if !geometry::inside_or_on(outline, [level.x, level.y]) {
            return Err(SiteError::LevelOutside {
                place: level.place.clone(),
                point: [level.x, level.y],
            });
        }
    }
    for (index, level) in levels.iter().enumerate() {
        if let Some(earlier) = levels[..index]
            .iter()
            .find(|earlier| earlier.x == level.x && earlier.y == level.y)
        {
            return Err(SiteError::LevelsAtOnePlace {
                first: earlier.place.clone(),
                second: level.place.clone(),
            });
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests;

#[cfg(test)]
mod ground_flow_tests;
