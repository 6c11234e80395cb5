//! `Site::to_geojson`: a site as the GeoJSON site file `read_site` reads, so a site from any
//! reader (an SVG plan, say) can be saved, opened on the page, or read back unchanged.

use serde_json::{json, Value as Json};

use super::Site;

impl Site {
    /// The site as a GeoJSON `FeatureCollection` (the format `read_site` reads): the outline,
    /// obstacles, zones, outlets and spot levels in that order, each with its role and name.
    pub fn to_geojson(&self) -> String {
        let ring = |ring: &[[f64; 2]]| -> Json {
            let mut positions: Vec<Json> = ring.iter().map(|p| json!([p[0], p[1]])).collect();
            if let Some(first) = ring.first() {
                positions.push(json!([first[0], first[1]]));
            }
            json!({ "type": "Polygon", "coordinates": [positions] })
        };
        let feature = |properties: Json, geometry: Json| -> Json {
            json!({ "type": "Feature", "properties": properties, "geometry": geometry })
        };
        let mut features = vec![feature(json!({ "role": "outline" }), ring(&self.outline))];
        for obstacle in &self.obstacles {
            features.push(feature(
                json!({ "role": "obstacle", "name": obstacle.name }),
                ring(&obstacle.ring),
            ));
        }
        for zone in &self.zones {
            features.push(feature(
                json!({
                    "role": "zone",
                    "name": zone.name,
                    "surface": zone.surface,
                    "runoff_coefficient": zone.runoff_coefficient,
                }),
                ring(&zone.ring),
            ));
        }
        for outlet in &self.outlets {
            features.push(feature(
                json!({ "role": "outlet", "name": outlet.name }),
                json!({ "type": "Point", "coordinates": [outlet.point[0], outlet.point[1]] }),
            ));
        }
        for level in &self.levels {
            features.push(feature(
                json!({ "role": "level", "elevation": level.z }),
                json!({ "type": "Point", "coordinates": [level.x, level.y] }),
            ));
        }
        json!({
            "type": "FeatureCollection",
            "properties": { "units": self.units, "runoff_coefficient": self.runoff_coefficient },
            "features": features,
        })
        .to_string()
    }
}
