//! `read_site_svg`: a site plan drawn in a vector editor (SVG) into the same `Site` as
//! `read_site`, at a scale the user states (`SvgScale`, read by `parse_svg_scale`).
//!
//! The convention (README, "Site plans drawn as SVG"):
//! - each drawn shape has a role: its own `data-role` attribute, or the first word of `outline`,
//!   `obstacle(s)`, `zone(s)`, `outlet(s)`, `level(s)` or `ignore` in the `id` or
//!   `inkscape:label` of the shape or of an enclosing group (a shape's own beats a group's,
//!   an inner group's beats an outer one's); a `data-role` other than those is refused;
//! - the outline, obstacles and zones are `polygon`, `rect`, closed `path` (ending in `Z` or
//!   at its start), `circle` or `ellipse` elements, one ring each; curves are flattened to
//!   within 0.01 of the site's unit; open paths, polylines and lines are refused;
//! - outlets and spot levels are `circle` or `ellipse` elements, at their centre; a level
//!   carries `data-elevation`;
//! - a zone carries `data-runoff-coefficient` (in [0, 1]) or `data-surface` (a surface of the
//!   runoff table: `roof`, `lawn_sandy_flat`, ...); the root `svg` may carry
//!   `data-runoff-coefficient` for ground in no zone;
//! - names come from `data-name`, else the element's `title` child;
//! - transforms of the shape and its groups are applied; `defs`, `use`, `text`, `image`,
//!   scripts and the like are never read.
//!
//! Orientation: SVG's y grows down the sheet, a site's y grows north. The drawing is read with
//! north at the top of the sheet: site x = drawing x times the scale, site y = minus drawing y
//! times the scale (a plan whose north arrow points elsewhere gets a `rotate` on its top group).

use roxmltree::{Document, Node, ParsingOptions};
use svgtypes::LengthUnit;

use crate::drainage::RunoffTable;
use crate::region::point_in_polygon;
use crate::site::geometry::{first_self_contact, inside_or_on};
use crate::site::{
    check_levels, Outlet, RunoffZone, Site, SiteError, SitePolygon, SpotLevel, MAX_RING_POSITIONS,
    MAX_SITE_FEATURES,
};
use crate::specimen::flatten::Affine;
use crate::specimen::svg_trace::{
    attribute_any_namespace, describe, physical_scale, ShapeReader, SKIPPED,
};
use crate::specimen::{SpecimenError, MAX_SVG_NODES};

/// How far a flattened curve may stray from the drawn one, in the site's unit (1 cm, or
/// 0.01 ft): well under any cell a site is laid out on (common practice, no source).
const CURVE_TOLERANCE: f64 = 0.01;

/// The scale of a drawing, as the user states it.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum SvgScale {
    /// `1:N`: one length on the sheet is N on the ground; the sheet's lengths come from the
    /// root's `width`/`height` in mm, cm, in, pt or pc and its `viewBox`. The site is in metres.
    Ratio(f64),
    /// So many metres or feet on the ground per SVG user unit.
    PerUnit {
        /// Ground length per user unit.
        length: f64,
        /// `m` or `ft`.
        units: &'static str,
    },
}

/// Reads a scale: `1:200` (with the drawing's physical size), or `0.05 m per unit`,
/// `0.05 m/unit`, `0.2 ft per unit`.
pub fn parse_svg_scale(text: &str) -> Result<SvgScale, SiteError> {
    let problem = |problem: String| SiteError::SvgScale { problem };
    let trimmed = text.trim();
    if let Some((one, ratio)) = trimmed.split_once(':') {
        let one: f64 = one.trim().parse().map_err(|_| {
            problem(format!(
                "{text:?}: a ratio scale is 1:N, such as 1:200 (one length on the sheet is N on the ground)"
            ))
        })?;
        let ratio: f64 = ratio.trim().parse().unwrap_or(f64::NAN);
        if one != 1.0 || !(ratio.is_finite() && ratio > 0.0) {
            return Err(problem(format!(
                "{text:?}: a ratio scale is 1:N with N a positive number, such as 1:200"
            )));
        }
        return Ok(SvgScale::Ratio(ratio));
    }
    let lowered = trimmed.to_lowercase();
    let rest = lowered
        .strip_suffix("per unit")
        .or_else(|| lowered.strip_suffix("/unit"))
        .map(str::trim_end);
    let parsed = rest.and_then(|rest| {
        let (number, units) = if let Some(number) = rest.strip_suffix("ft") {
            (number, "ft")
        } else {
            (rest.strip_suffix('m')?, "m")
        };
        let length: f64 = number.trim().parse().ok()?;
        (length.is_finite() && length > 0.0).then_some(SvgScale::PerUnit { length, units })
    });
    parsed.ok_or_else(|| {
        problem(format!(
            "{text:?} is not a scale; give 1:N (such as 1:200, with the drawing's width in mm) \
             or a ground length per drawing unit (such as \"0.05 m per unit\" or \"0.2 ft per unit\")"
        ))
    })
}

/// What a drawn shape stands for on the site.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum SvgRole {
    Outline,
    Obstacle,
    Zone,
    Outlet,
    Level,
    Ignore,
}

impl SvgRole {
    fn from_word(word: &str) -> Option<SvgRole> {
        Some(match word {
            "outline" => SvgRole::Outline,
            "obstacle" | "obstacles" => SvgRole::Obstacle,
            "zone" | "zones" => SvgRole::Zone,
            "outlet" | "outlets" => SvgRole::Outlet,
            "level" | "levels" => SvgRole::Level,
            "ignore" => SvgRole::Ignore,
            _ => return None,
        })
    }
}

/// Reads a site plan drawn as SVG at `scale` (see the module's documentation). Fails with the
/// first problem found, naming the element and its line.
pub fn read_site_svg(bytes: &[u8], scale: &SvgScale) -> Result<Site, SiteError> {
    let text = std::str::from_utf8(bytes).map_err(|error| SiteError::Svg {
        element: format!("the drawing, byte {}", error.valid_up_to()),
        problem: "not UTF-8 text".to_string(),
    })?;
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let options = ParsingOptions {
        allow_dtd: false,
        nodes_limit: MAX_SVG_NODES,
        ..ParsingOptions::default()
    };
    let document = Document::parse_with_options(text, options).map_err(|error| SiteError::Svg {
        element: "the drawing".to_string(),
        problem: format!("not readable XML: {error}"),
    })?;
    let root = document.root_element();
    if root.tag_name().name() != "svg" {
        return Err(SiteError::Svg {
            element: describe(&document, root),
            problem: "the root element is not `svg`: a site plan is an SVG drawing".to_string(),
        });
    }
    let (factor, units) = match *scale {
        SvgScale::Ratio(ratio) => {
            if !physical_size_stated(root) {
                return Err(SiteError::SvgScale {
                    problem: format!(
                        "1:{ratio} needs the drawing's size on paper, and the root `svg` states \
                         no width or height in mm, cm, in, pt or pc; give the scale as a ground \
                         length per drawing unit instead (such as \"0.05 m per unit\")"
                    ),
                });
            }
            let mm_per_unit =
                physical_scale(&document, root, &mut Vec::new()).map_err(from_specimen)?;
            (mm_per_unit * ratio / 1000.0, "m")
        }
        SvgScale::PerUnit { length, units } => (length, units),
    };
    if !(factor.is_finite() && factor > 0.0) {
        return Err(SiteError::SvgScale {
            problem: format!(
                "the scale gives {factor} {units} per drawing unit; it must be a positive number"
            ),
        });
    }
    let runoff_coefficient = match root.attribute("data-runoff-coefficient") {
        Some(value) => Some(coefficient(value, &describe(&document, root))?),
        None => None,
    };
    let mut reader = SiteSvgReader {
        document: &document,
        shapes: ShapeReader::new(&document, text, CURVE_TOLERANCE / factor),
        factor,
        places: Vec::new(),
        outline: None,
        obstacles: Vec::new(),
        zones: Vec::new(),
        outlets: Vec::new(),
        levels: Vec::new(),
    };
    reader.walk(root, Affine::IDENTITY, None)?;
    let Some((outline_feature, outline)) = reader.outline else {
        return Err(SiteError::NoOutline);
    };
    if reader.outlets.is_empty() {
        return Err(SiteError::NoOutlet);
    }
    let places = &reader.places;
    for outlet in &reader.outlets {
        let place = places[outlet.feature].clone();
        if !inside_or_on(&outline, outlet.point) {
            return Err(SiteError::OutletOutside {
                feature: place,
                point: outlet.point,
            });
        }
        if let Some(obstacle) = reader
            .obstacles
            .iter()
            .find(|obstacle| point_in_polygon(outlet.point[0], outlet.point[1], &obstacle.ring))
        {
            return Err(SiteError::OutletInObstacle {
                feature: place,
                obstacle: places[obstacle.feature].clone(),
            });
        }
    }
    check_levels(&outline, &reader.levels)?;
    Ok(Site {
        units: units.to_string(),
        outline,
        outline_feature,
        obstacles: reader.obstacles,
        zones: reader.zones,
        outlets: reader.outlets,
        levels: reader.levels,
        runoff_coefficient,
    })
}

/// Whether the root's `width` or `height` is a length on paper (mm, cm, in, pt, pc).
fn physical_size_stated(root: Node) -> bool {
    ["width", "height"].iter().any(|name| {
        root.attribute(*name)
            .and_then(|text| text.parse::<svgtypes::Length>().ok())
            .is_some_and(|length| {
                matches!(
                    length.unit,
                    LengthUnit::Mm
                        | LengthUnit::Cm
                        | LengthUnit::In
                        | LengthUnit::Pt
                        | LengthUnit::Pc
                )
            })
    })
}

/// A specimen reader's SVG error in a site's words.
fn from_specimen(error: SpecimenError) -> SiteError {
    match error {
        SpecimenError::Svg { element, problem } => SiteError::Svg { element, problem },
        other => SiteError::Svg {
            element: "the drawing".to_string(),
            problem: other.to_string(),
        },
    }
}

/// A runoff coefficient written in an attribute: a number in [0, 1].
fn coefficient(text: &str, place: &str) -> Result<f64, SiteError> {
    match text.trim().parse::<f64>() {
        Ok(number) if (0.0..=1.0).contains(&number) => Ok(number),
        Ok(number) => Err(SiteError::RunoffCoefficient {
            feature: place.to_string(),
            problem: format!("{number} is outside [0, 1] (the share of rain that runs off)"),
        }),
        Err(_) => Err(SiteError::RunoffCoefficient {
            feature: place.to_string(),
            problem: format!("{text:?} is not a number; give a number in [0, 1]"),
        }),
    }
}

struct SiteSvgReader<'a, 'input> {
    document: &'a Document<'input>,
    shapes: ShapeReader<'a, 'input>,
    /// Site units per drawing user unit.
    factor: f64,
    /// Each read shape's description (`<rect id="shed"> (line 9)`), by feature index.
    places: Vec<String>,
    outline: Option<(usize, Vec<[f64; 2]>)>,
    obstacles: Vec<SitePolygon>,
    zones: Vec<RunoffZone>,
    outlets: Vec<Outlet>,
    levels: Vec<SpotLevel>,
}

impl SiteSvgReader<'_, '_> {
    fn error(&self, node: Node, problem: String) -> SiteError {
        SiteError::Svg {
            element: describe(self.document, node),
            problem,
        }
    }

    /// The role an element gives itself: its `data-role` (refused when unknown), else a role
    /// word in its `id` or `inkscape:label`.
    fn own_role(&self, node: Node) -> Result<Option<SvgRole>, SiteError> {
        if let Some(role) = node.attribute("data-role") {
            return SvgRole::from_word(role.trim().to_lowercase().as_str())
                .map(Some)
                .ok_or_else(|| {
                    self.error(
                        node,
                        format!(
                            "unknown data-role {role:?}; a site shape's role is outline, obstacle, zone, outlet, level or ignore"
                        ),
                    )
                });
        }
        for name in ["id", "inkscape:label"] {
            if let Some(value) = attribute_any_namespace(node, name) {
                let lowered = value.to_lowercase();
                let found = lowered
                    .split(|c: char| !c.is_alphanumeric())
                    .find_map(SvgRole::from_word);
                if found.is_some() {
                    return Ok(found);
                }
            }
        }
        Ok(None)
    }

    fn walk(
        &mut self,
        node: Node,
        transform: Affine,
        role: Option<SvgRole>,
    ) -> Result<(), SiteError> {
        for child in node.children().filter(|child| child.is_element()) {
            let name = child.tag_name().name();
            if SKIPPED.contains(&name) || name == "title" || name == "desc" {
                continue;
            }
            if child.attribute("display") == Some("none") {
                continue;
            }
            let local = self.shapes.transform_of(child).map_err(from_specimen)?;
            let transform = transform.then_inner(&local);
            let role = self.own_role(child)?.or(role);
            if role == Some(SvgRole::Ignore) {
                continue;
            }
            match name {
                "g" | "svg" | "a" => self.walk(child, transform, role)?,
                "path" | "polyline" | "polygon" | "line" | "rect" | "circle" | "ellipse" => {
                    self.shape(child, &transform, role)?
                }
                _ => {}
            }
        }
        Ok(())
    }

    fn shape(
        &mut self,
        node: Node,
        transform: &Affine,
        role: Option<SvgRole>,
    ) -> Result<(), SiteError> {
        let Some(role) = role else {
            return Err(self.error(
                node,
                "this shape has no site role: give it data-role (outline, obstacle, zone, outlet, \
                 level, or ignore to leave it out) or put it in a group whose id names the role"
                    .to_string(),
            ));
        };
        if self.places.len() >= MAX_SITE_FEATURES {
            return Err(self.error(
                node,
                format!(
                    "more than {MAX_SITE_FEATURES} site shapes; a site holds at most that many"
                ),
            ));
        }
        let feature = self.places.len();
        let place = describe(self.document, node);
        let name = self.name_of(node);
        match role {
            SvgRole::Outline | SvgRole::Obstacle | SvgRole::Zone => {
                let ring = self.ring(node, transform, role)?;
                self.places.push(place.clone());
                match role {
                    SvgRole::Outline => {
                        if let Some((first, _)) = &self.outline {
                            return Err(SiteError::TwoOutlines {
                                first: self.places[*first].clone(),
                                second: place,
                            });
                        }
                        self.outline = Some((feature, ring));
                    }
                    SvgRole::Obstacle => self.obstacles.push(SitePolygon {
                        feature,
                        name,
                        ring,
                    }),
                    _ => {
                        let surface = node.attribute("data-surface").map(|s| s.trim().to_string());
                        let runoff_coefficient = match (
                            node.attribute("data-runoff-coefficient"),
                            &surface,
                        ) {
                            (Some(value), _) => coefficient(value, &place)?,
                            (None, Some(surface)) => {
                                let table = RunoffTable::default();
                                table.coefficient_of(surface).map_err(|error| {
                                    SiteError::RunoffCoefficient {
                                        feature: place.clone(),
                                        problem: error.to_string(),
                                    }
                                })?
                            }
                            (None, None) => {
                                return Err(SiteError::RunoffCoefficient {
                                    feature: place,
                                    problem: "missing; a zone needs data-runoff-coefficient (a number in [0, 1]) or data-surface (a surface of the runoff table, such as roof or lawn_sandy_flat)".to_string(),
                                })
                            }
                        };
                        self.zones.push(RunoffZone {
                            feature,
                            name,
                            surface,
                            runoff_coefficient,
                            ring,
                        });
                    }
                }
            }
            SvgRole::Outlet | SvgRole::Level => {
                let what = if role == SvgRole::Outlet {
                    "an outlet"
                } else {
                    "a spot level"
                };
                if !matches!(node.tag_name().name(), "circle" | "ellipse") {
                    return Err(self.error(
                        node,
                        format!("{what} is drawn as a circle (its centre marks the place)"),
                    ));
                }
                let centre = (
                    self.shapes.number(node, "cx").map_err(from_specimen)?,
                    self.shapes.number(node, "cy").map_err(from_specimen)?,
                );
                let point = self.to_site(transform.apply(centre));
                if !point.iter().all(|value| value.is_finite()) {
                    return Err(self.error(
                        node,
                        "the centre is not a finite number after its transforms".to_string(),
                    ));
                }
                self.places.push(place.clone());
                if role == SvgRole::Outlet {
                    self.outlets.push(Outlet {
                        feature,
                        name,
                        point,
                    });
                } else {
                    let z =
                        match node.attribute("data-elevation") {
                            Some(text) => text
                                .trim()
                                .parse::<f64>()
                                .ok()
                                .filter(|z| z.is_finite())
                                .ok_or_else(|| SiteError::Elevation {
                                    feature: place.clone(),
                                    problem: format!("data-elevation {text:?} is not a number"),
                                })?,
                            None => return Err(SiteError::Elevation {
                                feature: place,
                                problem:
                                    "no data-elevation (the ground's height, in the site's unit)"
                                        .to_string(),
                            }),
                        };
                    self.levels.push(SpotLevel {
                        place,
                        x: point[0],
                        y: point[1],
                        z,
                    });
                }
            }
            SvgRole::Ignore => {}
        }
        Ok(())
    }

    /// A closed shape's single ring in site coordinates, without its closing position,
    /// checked for size and self-contact.
    fn ring(
        &self,
        node: Node,
        transform: &Affine,
        role: SvgRole,
    ) -> Result<Vec<[f64; 2]>, SiteError> {
        let tag = node.tag_name().name();
        let what = match role {
            SvgRole::Outline => "the site outline",
            SvgRole::Obstacle => "an obstacle",
            _ => "a zone",
        };
        if matches!(tag, "polyline" | "line") {
            return Err(self.error(
                node,
                format!("{what} must be a closed shape (polygon, rect, closed path, circle), not an open {tag}"),
            ));
        }
        let lines = self.shapes.lines(node, transform).map_err(from_specimen)?;
        let mut lines = lines.into_iter().filter(|line| line.len() > 1);
        let Some(line) = lines.next() else {
            return Err(self.error(node, format!("{what} draws nothing (no area)")));
        };
        if lines.next().is_some() {
            return Err(self.error(
                node,
                format!("{what} draws more than one ring; one closed shape per element (holes are not read: draw an obstacle or a zone over the place)"),
            ));
        }
        if line.len() > MAX_RING_POSITIONS + 1 {
            return Err(self.error(
                node,
                format!(
                    "the ring has {} positions; a site ring holds at most {MAX_RING_POSITIONS}",
                    line.len()
                ),
            ));
        }
        let (first, last) = (line[0], line[line.len() - 1]);
        if first != last {
            return Err(self.error(
                node,
                format!(
                    "the path is open: it ends at ({}, {}) but starts at ({}, {}); close it with Z",
                    last.0, last.1, first.0, first.1
                ),
            ));
        }
        let mut ring: Vec<[f64; 2]> = line.iter().map(|&point| self.to_site(point)).collect();
        ring.pop();
        if ring.len() < 3 {
            return Err(self.error(
                node,
                format!(
                    "{what} has {} corners; a ring needs at least three",
                    ring.len()
                ),
            ));
        }
        if !ring.iter().flatten().all(|value| value.is_finite()) {
            return Err(self.error(
                node,
                "a coordinate is not a finite number after its transforms and the scale"
                    .to_string(),
            ));
        }
        if let Some((edges, near)) = first_self_contact(&ring) {
            return Err(SiteError::SelfIntersecting {
                feature: describe(self.document, node),
                edges,
                near,
            });
        }
        Ok(ring)
    }

    /// Drawing user units (y down the sheet) to site coordinates (y north).
    fn to_site(&self, (x, y): (f64, f64)) -> [f64; 2] {
        [x * self.factor, -y * self.factor]
    }

    /// `data-name`, else the text of a `title` child.
    fn name_of(&self, node: Node) -> Option<String> {
        if let Some(name) = node.attribute("data-name") {
            return Some(name.trim().to_string());
        }
        node.children()
            .find(|child| child.is_element() && child.tag_name().name() == "title")
            .and_then(|title| title.text())
            .map(|text| text.trim().to_string())
            .filter(|text| !text.is_empty())
    }
}

#[cfg(test)]
mod tests;
