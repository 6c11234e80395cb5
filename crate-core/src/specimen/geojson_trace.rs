//! `read_geojson`: a GeoJSON object (RFC 7946) into a `Trace`. `LineString` and
//! `MultiLineString` geometries are veins (a feature's numeric `width` property, in file units,
//! is kept as the vein's width), one `Polygon` the leaf outline (its exterior ring; holes are
//! named in the notes and not used), and each `Point` marks a root (petiole base or outlet),
//! as `network_export::network_geojson` writes them. Any other geometry type is refused with
//! its feature's index. Positions are projected coordinates in a unit the user states, y growing
//! north; a third coordinate (height) is ignored.

use geojson::{Feature, GeoJson, Geometry, Value};

use super::{Point, SpecimenError, Trace, TracedLine, MAX_TRACE_POINTS};

/// Reads a GeoJSON text. Each feature of a collection is parsed on its own so that every
/// message names the feature it is about.
pub(crate) fn read_geojson(text: &str) -> Result<Trace, SpecimenError> {
    let value: serde_json::Value =
        serde_json::from_str(text).map_err(|error| SpecimenError::GeoJson {
            place: format!("text (line {}, column {})", error.line(), error.column()),
            problem: format!("not readable JSON: {error}"),
        })?;
    let mut trace = Trace {
        y_up: true,
        ..Trace::default()
    };
    let mut reader = GeoJsonReader {
        trace: &mut trace,
        points: 0,
    };
    let is_collection =
        value.get("type").and_then(|kind| kind.as_str()) == Some("FeatureCollection");
    if is_collection {
        let features = match value
            .get("features")
            .and_then(|features| features.as_array())
        {
            Some(features) => features.clone(),
            None => {
                return Err(SpecimenError::GeoJson {
                    place: "FeatureCollection".to_string(),
                    problem: "has no `features` array".to_string(),
                })
            }
        };
        for (index, feature) in features.into_iter().enumerate() {
            let place = format!("feature {index}");
            let feature =
                Feature::from_json_value(feature).map_err(|error| SpecimenError::GeoJson {
                    place: place.clone(),
                    problem: error.to_string(),
                })?;
            if let Some(geometry) = &feature.geometry {
                let before = reader.trace.lines.len();
                reader.geometry(geometry, &place)?;
                let width = feature
                    .property("width")
                    .and_then(|width| width.as_f64())
                    .filter(|width| width.is_finite() && *width >= 0.0);
                for line in &mut reader.trace.lines[before..] {
                    line.width = width;
                }
            }
        }
    } else {
        let object = GeoJson::from_json_value(value).map_err(|error| SpecimenError::GeoJson {
            place: "object".to_string(),
            problem: error.to_string(),
        })?;
        match &object {
            GeoJson::Geometry(geometry) => reader.geometry(geometry, "geometry")?,
            GeoJson::Feature(feature) => {
                if let Some(geometry) = &feature.geometry {
                    reader.geometry(geometry, "feature")?;
                }
            }
            GeoJson::FeatureCollection(_) => {}
        }
    }
    Ok(trace)
}

struct GeoJsonReader<'a> {
    trace: &'a mut Trace,
    points: usize,
}

impl GeoJsonReader<'_> {
    fn positions(
        &mut self,
        positions: &[Vec<f64>],
        place: &str,
    ) -> Result<Vec<Point>, SpecimenError> {
        self.points += positions.len();
        if self.points > MAX_TRACE_POINTS {
            return Err(SpecimenError::TooManyPoints {
                place: place.to_string(),
            });
        }
        positions
            .iter()
            .enumerate()
            .map(|(index, position)| match position.as_slice() {
                [x, y, ..] if x.is_finite() && y.is_finite() => Ok((*x, *y)),
                [_, _, ..] => Err(SpecimenError::GeoJson {
                    place: format!("{place}, position {index}"),
                    problem: "a coordinate is not a finite number".to_string(),
                }),
                _ => Err(SpecimenError::GeoJson {
                    place: format!("{place}, position {index}"),
                    problem: "a position needs two coordinates (RFC 7946, section 3.1.1)"
                        .to_string(),
                }),
            })
            .collect()
    }

    fn geometry(&mut self, geometry: &Geometry, place: &str) -> Result<(), SpecimenError> {
        match &geometry.value {
            Value::LineString(line) => {
                let points = self.positions(line, place)?;
                self.trace.lines.push(TracedLine {
                    points,
                    source: place.to_string(),
                    width: None,
                });
            }
            Value::MultiLineString(lines) => {
                for (index, line) in lines.iter().enumerate() {
                    let inner = format!("{place}, line {index} of the MultiLineString");
                    let points = self.positions(line, &inner)?;
                    self.trace.lines.push(TracedLine {
                        points,
                        source: inner,
                        width: None,
                    });
                }
            }
            Value::Polygon(rings) => {
                if self.trace.outline.is_some() {
                    return Err(SpecimenError::GeoJson {
                        place: place.to_string(),
                        problem: "a second Polygon: only one leaf outline is read".to_string(),
                    });
                }
                let Some(exterior) = rings.first() else {
                    return Err(SpecimenError::GeoJson {
                        place: place.to_string(),
                        problem: "a Polygon without rings".to_string(),
                    });
                };
                let mut ring = self.positions(exterior, place)?;
                if ring.len() > 1 && ring.first() == ring.last() {
                    ring.pop();
                }
                if ring.len() < 3 {
                    return Err(SpecimenError::GeoJson {
                        place: place.to_string(),
                        problem: "the outline ring needs at least four positions, the last \
                                  equal to the first (RFC 7946, section 3.1.6)"
                            .to_string(),
                    });
                }
                if rings.len() > 1 {
                    self.trace.notes.push(format!(
                        "{place}: {} holes of the outline are not used",
                        rings.len() - 1
                    ));
                }
                self.trace.outline = Some(ring);
            }
            Value::Point(position) => {
                let point = self.positions(std::slice::from_ref(position), place)?;
                self.trace.root_marks.extend(point);
            }
            Value::GeometryCollection(geometries) => {
                for (index, inner) in geometries.iter().enumerate() {
                    self.geometry(inner, &format!("{place}, geometry {index}"))?;
                }
            }
            other => {
                return Err(SpecimenError::GeoJson {
                    place: place.to_string(),
                    problem: format!(
                        "a {} is neither a vein (LineString, MultiLineString), a leaf \
                         outline (Polygon) nor a root (Point)",
                        other.type_name()
                    ),
                })
            }
        }
        Ok(())
    }
}
