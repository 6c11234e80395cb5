//! Reports of a site's hydraulics as text: the segment schedule and the outlet list as CSV
//! (`schedule_csv`, `outlet_csv`, the caution on the first line, units in the header) and the
//! segments as a GeoJSON `FeatureCollection` (`site_geojson`, the caution on the collection and
//! on every feature, each channel with `role` `channel` and each part of the site no outlet
//! reaches with `role` `unreached`). Numbers are converted to the chosen unit system here and
//! only here.

use serde_json::{json, Map, Value};

use super::site_flows::{ChannelSize, SegmentHydraulics, SiteHydraulics};
use super::units::{metres_per_network_unit, UnitSystem};
use super::DRAINAGE_CAUTION;
use crate::network::Network;
use crate::site::UnreachedPart;

/// `value` rounded to `decimals` places, without trailing zeros (`-0` written `0`).
fn fixed(value: f64, decimals: usize) -> String {
    let text = format!("{value:.decimals$}");
    let text = if text.contains('.') {
        text.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        text
    };
    if text == "-0" {
        "0".to_string()
    } else {
        text
    }
}

/// The size column's heading and a segment's value in it (diameter in mm or in; swale depth in
/// m or ft).
fn size_value(segment: &SegmentHydraulics, units: UnitSystem) -> f64 {
    match segment.size {
        ChannelSize::Pipe { diameter } => units.diameter_from_si(diameter),
        ChannelSize::Swale { depth } => units.length_from_si(depth),
    }
}

fn size_heading(site: &SiteHydraulics) -> String {
    let units = site.report_units;
    if site.pipes {
        format!("pipe diameter ({})", units.diameter_unit())
    } else {
        format!("swale flow depth ({})", units.length_unit())
    }
}

fn flags_text(segment: &SegmentHydraulics) -> String {
    segment
        .flags
        .iter()
        .map(|flag| flag.key())
        .collect::<Vec<_>>()
        .join(";")
}

/// The segment schedule as CSV: a first line `# CAUTION ...`, a header naming each column's
/// unit, then one row per segment in segment order: segment, from, to, length, grade, drained
/// area, runoff coefficient C, time of concentration, intensity, peak flow, size (pipe
/// diameter or swale flow depth), Manning's n, velocity, capacity, travel time, flags
/// (`;`-separated keys, empty when none).
pub fn schedule_csv(site: &SiteHydraulics) -> String {
    let units = site.report_units;
    let mut text = format!("# {DRAINAGE_CAUTION}\n");
    let header = [
        "segment".to_string(),
        "from".into(),
        "to".into(),
        format!("length ({})", units.length_unit()),
        format!("grade ({0}/{0})", units.length_unit()),
        format!("drained area ({})", units.area_unit()),
        "runoff coefficient C".into(),
        "time of concentration (min)".into(),
        format!("intensity ({})", units.intensity_unit()),
        format!("peak flow ({})", units.flow_unit()),
        size_heading(site),
        "Manning n".into(),
        format!("velocity ({})", units.velocity_unit()),
        format!("capacity ({})", units.flow_unit()),
        "travel time (min)".into(),
        "flags".into(),
    ];
    text.push_str(&header.join(","));
    text.push('\n');
    let size_decimals = if site.pipes && units == UnitSystem::Si {
        0
    } else {
        2
    };
    for segment in &site.segments {
        let row = [
            segment.segment.to_string(),
            segment.from.to_string(),
            segment.to.to_string(),
            fixed(units.length_from_si(segment.length), 2),
            fixed(segment.grade, 5),
            fixed(units.area_from_si(segment.drained_area), 4),
            fixed(segment.runoff_coefficient, 3),
            fixed(segment.time_of_concentration, 2),
            fixed(units.intensity_from_si(segment.intensity), 2),
            fixed(units.flow_from_si(segment.peak_flow), 4),
            fixed(size_value(segment, units), size_decimals),
            fixed(segment.manning_n, 4),
            fixed(units.velocity_from_si(segment.velocity), 3),
            fixed(units.flow_from_si(segment.capacity), 4),
            fixed(segment.travel_time, 2),
            flags_text(segment),
        ];
        text.push_str(&row.join(","));
        text.push('\n');
    }
    text
}

/// The outlets as CSV: a first line `# CAUTION ...`, a header with units, then one row per
/// outlet (root node, contributing area, runoff coefficient, time of concentration, intensity,
/// peak flow).
pub fn outlet_csv(site: &SiteHydraulics) -> String {
    let units = site.report_units;
    let mut text = format!("# {DRAINAGE_CAUTION}\n");
    text.push_str(&format!(
        "outlet node,contributing area ({}),runoff coefficient C,time of concentration (min),\
         intensity ({}),peak flow ({})\n",
        units.area_unit(),
        units.intensity_unit(),
        units.flow_unit()
    ));
    for outlet in &site.outlets {
        text.push_str(&format!(
            "{},{},{},{},{},{}\n",
            outlet.node,
            fixed(units.area_from_si(outlet.contributing_area), 4),
            fixed(outlet.runoff_coefficient, 3),
            fixed(outlet.time_of_concentration, 2),
            fixed(units.intensity_from_si(outlet.intensity), 2),
            fixed(units.flow_from_si(outlet.peak_flow), 4),
        ));
    }
    text
}

/// The segments as a GeoJSON `FeatureCollection` (RFC 7946): one `LineString` per segment in
/// segment order, positions in the network's own length unit with y negated (GeoJSON's y grows
/// north, a network's down the page, as `network_export` writes them). Properties hold the
/// schedule's values in the report units (full precision) plus `flags` (array of keys) and
/// `caution`; the collection carries `caution` and `units` (each quantity's unit) as foreign
/// members (RFC 7946 section 6.1).
pub fn site_geojson(
    network: &Network,
    site: &SiteHydraulics,
    unreached: &[UnreachedPart],
) -> String {
    let units = site.report_units;
    let mut features: Vec<Value> = site
        .segments
        .iter()
        .map(|segment| {
            let position = |node: u32| {
                network
                    .nodes
                    .get(node as usize)
                    .map_or(json!([0.0, 0.0]), |point| json!([point.x, -point.y]))
            };
            let mut properties = Map::new();
            let mut put = |key: &str, value: Value| {
                properties.insert(key.to_string(), value);
            };
            put("role", json!("channel"));
            put("segment", json!(segment.segment));
            put("from", json!(segment.from));
            put("to", json!(segment.to));
            put("length", json!(units.length_from_si(segment.length)));
            put("grade", json!(segment.grade));
            put(
                "drained_area",
                json!(units.area_from_si(segment.drained_area)),
            );
            put("runoff_coefficient", json!(segment.runoff_coefficient));
            put(
                "time_of_concentration_min",
                json!(segment.time_of_concentration),
            );
            put(
                "intensity",
                json!(units.intensity_from_si(segment.intensity)),
            );
            put("peak_flow", json!(units.flow_from_si(segment.peak_flow)));
            match segment.size {
                ChannelSize::Pipe { diameter } => {
                    put("pipe_diameter", json!(units.diameter_from_si(diameter)))
                }
                ChannelSize::Swale { depth } => {
                    put("swale_flow_depth", json!(units.length_from_si(depth)))
                }
            }
            put("manning_n", json!(segment.manning_n));
            put("velocity", json!(units.velocity_from_si(segment.velocity)));
            put("capacity", json!(units.flow_from_si(segment.capacity)));
            put("travel_time_min", json!(segment.travel_time));
            put(
                "flags",
                json!(segment
                    .flags
                    .iter()
                    .map(|flag| flag.key())
                    .collect::<Vec<_>>()),
            );
            put("caution", json!(DRAINAGE_CAUTION));
            json!({
                "type": "Feature",
                "geometry": {
                    "type": "LineString",
                    "coordinates": [position(segment.from), position(segment.to)],
                },
                "properties": Value::Object(properties),
            })
        })
        .collect();
    // A site's unit is m or ft; any other unit is reported as it stands.
    let metres = metres_per_network_unit(&network.units).unwrap_or(1.0);
    features.extend(
        unreached
            .iter()
            .map(|part| unreached_feature(part, metres, units)),
    );
    let collection = json!({
        "type": "FeatureCollection",
        "caution": DRAINAGE_CAUTION,
        "units": {
            "coordinates": network.units,
            "area": units.area_unit(),
            "length": units.length_unit(),
            "grade": format!("{0}/{0}", units.length_unit()),
            "drained_area": units.area_unit(),
            "intensity": units.intensity_unit(),
            "peak_flow": units.flow_unit(),
            "capacity": units.flow_unit(),
            "pipe_diameter": units.diameter_unit(),
            "swale_flow_depth": units.length_unit(),
            "velocity": units.velocity_unit(),
            "time_of_concentration_min": "min",
            "travel_time_min": "min",
        },
        "features": features,
    });
    collection.to_string()
}

/// A part of the site no outlet reaches as a GeoJSON feature: a `Polygon` (or `MultiPolygon`
/// when it has several outer rings) in the channels' coordinates (y north), rings closed,
/// outer rings counter-clockwise and holes clockwise (RFC 7946, section 3.1.6).
fn unreached_feature(part: &UnreachedPart, metres: f64, units: UnitSystem) -> Value {
    // The network's frame runs y down the page: flipping y turns each ring round, so it is
    // walked backwards to keep its orientation.
    let ring = |corners: &[[f64; 2]]| -> Value {
        let mut points: Vec<Value> = corners
            .iter()
            .rev()
            .map(|corner| json!([corner[0], -corner[1]]))
            .collect();
        if let Some(first) = points.first().cloned() {
            points.push(first);
        }
        Value::Array(points)
    };
    let polygons: Vec<Value> = part
        .polygons
        .iter()
        .map(|polygon| {
            let mut rings = vec![ring(polygon.outer.as_slice())];
            rings.extend(polygon.holes.iter().map(|hole| ring(hole.as_slice())));
            Value::Array(rings)
        })
        .collect();
    let geometry = match polygons.as_slice() {
        [one] => json!({ "type": "Polygon", "coordinates": one }),
        _ => json!({ "type": "MultiPolygon", "coordinates": polygons }),
    };
    json!({
        "type": "Feature",
        "geometry": geometry,
        "properties": {
            "role": "unreached",
            "note": "no outlet reaches this part of the site: add an outlet there or open a way past the obstacle",
            "cells": part.cells,
            "area": units.area_from_si(part.area * metres * metres),
            "caution": DRAINAGE_CAUTION,
        },
    })
}
