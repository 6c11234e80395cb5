//! `read_site`: a GeoJSON site file (bytes) into a `Site`, feature by feature, every error
//! naming its feature.

use geojson::{Feature, Geometry, Value};
use serde_json::Value as Json;

use super::geometry::{first_self_contact, inside_or_on};
use super::{
    check_levels, feature_place, Outlet, RunoffZone, Site, SiteError, SitePolygon, SpotLevel,
    MAX_RING_POSITIONS, MAX_SITE_EDGE_PAIRS, MAX_SITE_FEATURES,
};
use crate::region::point_in_polygon;

/// Reads a site file: a GeoJSON `FeatureCollection` whose features carry `properties.role`
/// (see the module's documentation). Fails with the first problem found, naming the feature.
pub fn read_site(bytes: &[u8]) -> Result<Site, SiteError> {
    let text = std::str::from_utf8(bytes).map_err(|error| SiteError::NotJson {
        place: format!("byte {}", error.valid_up_to()),
        problem: "not UTF-8 text".to_string(),
    })?;
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let value: Json = serde_json::from_str(text).map_err(|error| SiteError::NotJson {
        place: format!("line {} column {}", error.line(), error.column()),
        problem: error.to_string(),
    })?;
    if value.get("type").and_then(Json::as_str) != Some("FeatureCollection") {
        return Err(SiteError::NotSite {
            problem: "a site file is a GeoJSON FeatureCollection (\"type\": \"FeatureCollection\")"
                .to_string(),
        });
    }
    let Some(features) = value.get("features").and_then(Json::as_array) else {
        return Err(SiteError::NotSite {
            problem: "the FeatureCollection has no `features` array".to_string(),
        });
    };
    if features.len() > MAX_SITE_FEATURES {
        return Err(SiteError::NotSite {
            problem: format!(
                "{} features; a site file holds at most {MAX_SITE_FEATURES}",
                features.len()
            ),
        });
    }
    let collection = value.get("properties");
    let units = match collection.and_then(|properties| properties.get("units")) {
        None | Some(Json::Null) => "m".to_string(),
        Some(Json::String(units)) if units == "m" || units == "ft" => units.clone(),
        Some(other) => {
            return Err(SiteError::Units {
                feature: "the site".to_string(),
                problem: format!("{other} is not a site unit; use \"m\" or \"ft\""),
            })
        }
    };
    let runoff_coefficient =
        match collection.and_then(|properties| properties.get("runoff_coefficient")) {
            None | Some(Json::Null) => None,
            Some(value) => Some(coefficient(value, "the site")?),
        };
    // Pairs of edges the self-crossing checks have left to compare (`MAX_SITE_EDGE_PAIRS`).
    let mut pairs = MAX_SITE_EDGE_PAIRS;
    let mut outline: Option<(usize, Vec<[f64; 2]>)> = None;
    let mut obstacles = Vec::new();
    let mut zones = Vec::new();
    let mut outlets = Vec::new();
    let mut levels = Vec::new();
    for (index, feature) in features.iter().enumerate() {
        let name = feature
            .get("properties")
            .and_then(|properties| properties.get("name"))
            .and_then(Json::as_str)
            .map(str::to_string);
        let place = feature_place(index, name.as_deref());
        let feature =
            Feature::from_json_value(feature.clone()).map_err(|error| SiteError::NotSite {
                problem: format!("{place}: not a GeoJSON feature: {error}"),
            })?;
        match feature.property("units") {
            None | Some(Json::Null) => {}
            Some(Json::String(found)) if *found == units => {}
            Some(found) => {
                return Err(SiteError::Units {
                    feature: place,
                    problem: format!(
                        "the feature says {found} but the site's coordinates are in {units:?}; one site has one unit"
                    ),
                })
            }
        }
        let role = match feature.property("role") {
            Some(Json::String(role)) => role.as_str(),
            Some(other) => {
                return Err(SiteError::Role {
                    feature: place,
                    found: Some(other.to_string()),
                })
            }
            None => {
                return Err(SiteError::Role {
                    feature: place,
                    found: None,
                })
            }
        };
        match role {
            "outline" => {
                let ring = polygon(&feature, &place, "outline", &mut pairs)?;
                if let Some((first, _)) = &outline {
                    return Err(SiteError::TwoOutlines {
                        first: feature_place(*first, None),
                        second: place,
                    });
                }
                outline = Some((index, ring));
            }
            "obstacle" => obstacles.push(SitePolygon {
                feature: index,
                ring: polygon(&feature, &place, "obstacle", &mut pairs)?,
                name,
            }),
            "zone" => {
                let ring = polygon(&feature, &place, "zone", &mut pairs)?;
                let runoff = match feature.property("runoff_coefficient") {
                    None | Some(Json::Null) => {
                        return Err(SiteError::RunoffCoefficient {
                            feature: place,
                            problem:
                                "missing; a zone needs `runoff_coefficient`, a number in [0, 1]"
                                    .to_string(),
                        })
                    }
                    Some(value) => coefficient(value, &place)?,
                };
                let surface = feature
                    .property("surface")
                    .and_then(Json::as_str)
                    .map(str::to_string);
                zones.push(RunoffZone {
                    feature: index,
                    name,
                    surface,
                    runoff_coefficient: runoff,
                    ring,
                });
            }
            "outlet" => outlets.push(Outlet {
                feature: index,
                point: point(&feature, &place, "outlet")?,
                name,
            }),
            "level" => {
                let [x, y] = point(&feature, &place, "spot level")?;
                let z = match feature.property("elevation") {
                    Some(value) => value.as_f64().filter(|z| z.is_finite()).ok_or_else(|| {
                        SiteError::Elevation {
                            feature: place.clone(),
                            problem: format!("`elevation` is {value}, not a number"),
                        }
                    })?,
                    None => {
                        return Err(SiteError::Elevation {
                            feature: place,
                            problem:
                                "no `elevation` property (the ground's height, in the site's unit)"
                                    .to_string(),
                        })
                    }
                };
                levels.push(SpotLevel { place, x, y, z });
            }
            other => {
                return Err(SiteError::Role {
                    feature: place,
                    found: Some(other.to_string()),
                })
            }
        }
    }
    let Some((outline_feature, outline)) = outline else {
        return Err(SiteError::NoOutline);
    };
    if outlets.is_empty() {
        return Err(SiteError::NoOutlet);
    }
    for outlet in &outlets {
        let place = feature_place(outlet.feature, outlet.name.as_deref());
        if !inside_or_on(&outline, outlet.point) {
            return Err(SiteError::OutletOutside {
                feature: place,
                point: outlet.point,
            });
        }
        if let Some(obstacle) = obstacles
            .iter()
            .find(|obstacle| point_in_polygon(outlet.point[0], outlet.point[1], &obstacle.ring))
        {
            return Err(SiteError::OutletInObstacle {
                feature: place,
                obstacle: feature_place(obstacle.feature, obstacle.name.as_deref()),
            });
        }
    }
    check_levels(&outline, &levels)?;
    Ok(Site {
        units,
        outline,
        outline_feature,
        obstacles,
        zones,
        outlets,
        levels,
        runoff_coefficient,
    })
}

/// A runoff coefficient: a number in [0, 1].
fn coefficient(value: &Json, place: &str) -> Result<f64, SiteError> {
    let Some(number) = value.as_f64() else {
        return Err(SiteError::RunoffCoefficient {
            feature: place.to_string(),
            problem: format!("{value} is not a number; give a number in [0, 1]"),
        });
    };
    if !(0.0..=1.0).contains(&number) {
        return Err(SiteError::RunoffCoefficient {
            feature: place.to_string(),
            problem: format!("{number} is outside [0, 1] (the share of rain that runs off)"),
        });
    }
    Ok(number)
}

/// The geometry of a feature, or an error naming what the role needs.
fn geometry<'a>(
    feature: &'a Feature,
    place: &str,
    role: &'static str,
    expected: &'static str,
) -> Result<&'a Geometry, SiteError> {
    feature
        .geometry
        .as_ref()
        .ok_or_else(|| SiteError::Geometry {
            feature: place.to_string(),
            role,
            expected,
            found: "no geometry".to_string(),
        })
}

/// A Polygon feature's single ring, checked closed and simple, without its closing position.
fn polygon(
    feature: &Feature,
    place: &str,
    role: &'static str,
    pairs: &mut u64,
) -> Result<Vec<[f64; 2]>, SiteError> {
    let geometry = geometry(feature, place, role, "a Polygon")?;
    let Value::Polygon(rings) = &geometry.value else {
        return Err(SiteError::Geometry {
            feature: place.to_string(),
            role,
            expected: "a Polygon",
            found: format!("a {}", geometry.value.type_name()),
        });
    };
    let Some(exterior) = rings.first() else {
        return Err(SiteError::OpenRing {
            feature: place.to_string(),
            problem: "the polygon has no ring".to_string(),
        });
    };
    if rings.len() > 1 {
        return Err(SiteError::Holes {
            feature: place.to_string(),
            count: rings.len() - 1,
        });
    }
    if exterior.len() > MAX_RING_POSITIONS {
        return Err(SiteError::Position {
            feature: place.to_string(),
            problem: format!(
                "the ring has {} positions; a site ring holds at most {MAX_RING_POSITIONS}",
                exterior.len()
            ),
        });
    }
    let mut ring = Vec::with_capacity(exterior.len());
    for (index, position) in exterior.iter().enumerate() {
        ring.push(position_xy(
            position,
            &format!("{place}, position {index}"),
        )?);
    }
    if ring.len() < 4 {
        return Err(SiteError::OpenRing {
            feature: place.to_string(),
            problem: format!(
                "{} positions; a closed ring needs at least four, the last equal to the first",
                ring.len()
            ),
        });
    }
    let (first, last) = (ring[0], ring[ring.len() - 1]);
    if first != last {
        return Err(SiteError::OpenRing {
            feature: place.to_string(),
            problem: format!(
                "it ends at ({}, {}) but starts at ({}, {}); the last position must repeat the first",
                last[0], last[1], first[0], first[1]
            ),
        });
    }
    ring.pop();
    let ring_pairs = (ring.len() as u64 * ring.len() as u64) / 2;
    if ring_pairs > *pairs {
        return Err(SiteError::Position {
            feature: place.to_string(),
            problem: format!(
                "the site's rings up to this one hold too many positions together: checking that no ring crosses itself compares every pair of a ring's edges, at most {MAX_SITE_EDGE_PAIRS} pairs in one site (one ring of {MAX_RING_POSITIONS} positions); simplify the rings"
            ),
        });
    }
    *pairs -= ring_pairs;
    if let Some((edges, near)) = first_self_contact(&ring) {
        return Err(SiteError::SelfIntersecting {
            feature: place.to_string(),
            edges,
            near,
        });
    }
    Ok(ring)
}

/// A Point feature's position.
fn point(feature: &Feature, place: &str, role: &'static str) -> Result<[f64; 2], SiteError> {
    let geometry = geometry(feature, place, role, "a Point")?;
    match &geometry.value {
        Value::Point(position) => position_xy(position, place),
        other => Err(SiteError::Geometry {
            feature: place.to_string(),
            role,
            expected: "a Point",
            found: format!("a {}", other.type_name()),
        }),
    }
}

/// x and y of a position of two or three finite numbers (a third, altitude, is not used).
fn position_xy(position: &[f64], place: &str) -> Result<[f64; 2], SiteError> {
    match position {
        [x, y] | [x, y, _] if x.is_finite() && y.is_finite() => Ok([*x, *y]),
        _ => Err(SiteError::Position {
            feature: place.to_string(),
            problem: format!(
                "a position is two or three finite numbers (RFC 7946, section 3.1.1), not {position:?}"
            ),
        }),
    }
}
