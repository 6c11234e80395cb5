//! Networks written as data for other programs: GeoJSON (`network_geojson`, RFC 7946: one
//! `LineString` per segment, a `Point` per root, the outline as a `Polygon`) and a CSV edge list
//! (`network_edge_csv`: `x1,y1,x2,y2[,width]`), both read back by `specimen::build_specimen`
//! to the same network; and the outline of a grown network's cells (`cells_outline`).
//!
//! Coordinates are written at full precision (the shortest text that reads back to the same
//! `f64`), so lengths read back exactly. GeoJSON's y grows north while a network's grows down
//! the page, so y is negated on the way out (and the specimen reader negates it back). The
//! GeoJSON positions are the network's own length units, a projected plane, not longitude and
//! latitude: say which unit when reading them (`--units`).

use serde_json::{json, Value};

use crate::cleared::regions::{fill_holes, largest_component, outline_ring};
use crate::network::{CellSet, Network};

/// The outline of a grown network's occupied cells, in the network's units: the largest
/// 4-connected part, holes filled, traced along cell edges (so its shoelace area is that
/// part's cell count times the cell area). `None` without cells or cell size.
pub fn cells_outline(cells: &CellSet, cell_size: f64) -> Option<Vec<(f64, f64)>> {
    let (width, height) = (cells.width as usize, cells.height as usize);
    if cells.occupied.is_empty()
        || cell_size.is_nan()
        || cell_size <= 0.0
        || width == 0
        || height == 0
    {
        return None;
    }
    let mut on = vec![false; width * height];
    for &cell in &cells.occupied {
        if let Some(slot) = on.get_mut(cell as usize) {
            *slot = true;
        }
    }
    let (mut part, _) = largest_component(&on, width, height);
    fill_holes(&mut part, width, height);
    let ring = outline_ring(&part, width, height);
    (ring.len() >= 3).then(|| {
        ring.into_iter()
            .map(|(x, y)| (x * cell_size, y * cell_size))
            .collect()
    })
}

/// The network as a GeoJSON `FeatureCollection`: a `LineString` feature per segment, in
/// segment order, with properties `segment` (its index), `from`, `to` (node indices) and
/// `width` (when `widths` holds one per segment); a `Point` feature with property
/// `part: "root"` per root (a node with segments, none of them leaving it downstream); then,
/// when given, the outline as a `Polygon` feature with property `part: "outline"` (its ring closed, as RFC 7946 section
/// 3.1.6 requires). The collection's `units` member names the length unit (a foreign member,
/// RFC 7946 section 6.1).
pub fn network_geojson(
    network: &Network,
    widths: Option<&[f64]>,
    outline: Option<&[(f64, f64)]>,
) -> String {
    let widths = widths.filter(|widths| widths.len() == network.segments.len());
    let position = |x: f64, y: f64| json!([x, -y]);
    let mut features: Vec<Value> = network
        .segments
        .iter()
        .enumerate()
        .filter_map(|(index, segment)| {
            let a = network.nodes.get(segment.from as usize)?;
            let b = network.nodes.get(segment.to as usize)?;
            let mut properties = json!({
                "segment": index,
                "from": segment.from,
                "to": segment.to,
            });
            if let Some(widths) = widths {
                properties["width"] = json!(widths[index]);
            }
            Some(json!({
                "type": "Feature",
                "geometry": {
                    "type": "LineString",
                    "coordinates": [position(a.x, a.y), position(b.x, b.y)],
                },
                "properties": properties,
            }))
        })
        .collect();
    // Roots: nodes with segments but none leading downstream from them.
    let mut has_segment = vec![false; network.nodes.len()];
    let mut drains = vec![false; network.nodes.len()];
    for segment in &network.segments {
        for end in [segment.from, segment.to] {
            if let Some(slot) = has_segment.get_mut(end as usize) {
                *slot = true;
            }
        }
        if let Some(slot) = drains.get_mut(segment.from as usize) {
            *slot = true;
        }
    }
    for (index, node) in network.nodes.iter().enumerate() {
        if has_segment[index] && !drains[index] {
            features.push(json!({
                "type": "Feature",
                "geometry": { "type": "Point", "coordinates": position(node.x, node.y) },
                "properties": { "part": "root", "node": index },
            }));
        }
    }
    if let Some(ring) = outline.filter(|ring| ring.len() >= 3) {
        let mut closed: Vec<Value> = ring.iter().map(|&(x, y)| position(x, y)).collect();
        closed.push(position(ring[0].0, ring[0].1));
        // RFC 7946 section 3.1.6: exterior rings are counterclockwise (in the y-north plane).
        if signed_area_north(ring) < 0.0 {
            closed.reverse();
        }
        features.push(json!({
            "type": "Feature",
            "geometry": { "type": "Polygon", "coordinates": [closed] },
            "properties": { "part": "outline" },
        }));
    }
    let collection = json!({
        "type": "FeatureCollection",
        "units": network.units,
        "features": features,
    });
    format!("{collection}\n")
}

/// Twice the signed area of a y-down ring as seen with y north (positive: counterclockwise).
fn signed_area_north(ring: &[(f64, f64)]) -> f64 {
    let mut twice = 0.0;
    for (index, &(x1, y1)) in ring.iter().enumerate() {
        let (x2, y2) = ring[(index + 1) % ring.len()];
        twice += x1 * (-y2) - x2 * (-y1);
    }
    twice
}

/// The network as a CSV edge list (RFC 4180, CRLF line ends): header `x1,y1,x2,y2` (plus
/// `width` when `widths` holds one per segment), then one line per segment from its `from`
/// node to its `to` node, in the network's units, y down.
pub fn network_edge_csv(network: &Network, widths: Option<&[f64]>) -> String {
    let widths = widths.filter(|widths| widths.len() == network.segments.len());
    let mut text = String::from(if widths.is_some() {
        "x1,y1,x2,y2,width\r\n"
    } else {
        "x1,y1,x2,y2\r\n"
    });
    for (index, segment) in network.segments.iter().enumerate() {
        let (Some(a), Some(b)) = (
            network.nodes.get(segment.from as usize),
            network.nodes.get(segment.to as usize),
        ) else {
            continue;
        };
        text.push_str(&format!("{},{},{},{}", a.x, a.y, b.x, b.y));
        if let Some(widths) = widths {
            text.push_str(&format!(",{}", widths[index]));
        }
        text.push_str("\r\n");
    }
    text
}
