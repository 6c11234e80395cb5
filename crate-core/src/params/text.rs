//! Link text of parameter values: shortest round-trip numbers, `none`, `x,y,dx,dy` roots,
//! `x,y;x,y` polygons, `WIDTHxHEIGHT:run.run` masks, `x,y,z;x,y,z` spot levels and
//! `C:x,y;x,y;x,y~C:...` runoff zones, written and read back exactly.

use super::{Joining, Root, Zone};
use crate::mask::MaskGrid;

/// The words of the joining rules, in the order of `Joining`'s variants.
pub(crate) const JOINING_NAMES: [&str; 3] = ["cheapest", "weighted", "uniform"];

/// Roots as `x,y,dx,dy` groups joined by `;`.
pub(crate) fn roots_text(roots: &[Root]) -> String {
    roots
        .iter()
        .map(|root| {
            format!(
                "{},{},{},{}",
                root.x,
                root.y,
                number(root.outflow[0]),
                number(root.outflow[1])
            )
        })
        .collect::<Vec<_>>()
        .join(";")
}

/// A mask as `WIDTHxHEIGHT:run.run.run`.
pub(crate) fn mask_text(mask: &MaskGrid) -> String {
    format!(
        "{}x{}:{}",
        mask.width,
        mask.height,
        mask.runs
            .iter()
            .map(u32::to_string)
            .collect::<Vec<_>>()
            .join(".")
    )
}

pub(crate) fn number(value: f64) -> String {
    format!("{value}")
}

pub(crate) fn optional(value: Option<f64>) -> String {
    value.map(number).unwrap_or_else(|| "none".to_string())
}

pub(crate) fn polygon_text(points: &[[f64; 2]]) -> String {
    points
        .iter()
        .map(|point| format!("{},{}", number(point[0]), number(point[1])))
        .collect::<Vec<_>>()
        .join(";")
}

pub(crate) fn joining_name(joining: Joining) -> &'static str {
    match joining {
        Joining::Cheapest => JOINING_NAMES[0],
        Joining::Weighted => JOINING_NAMES[1],
        Joining::Uniform => JOINING_NAMES[2],
    }
}

pub(crate) fn whole<T: std::str::FromStr>(text: &str) -> Result<T, String> {
    if text.is_empty() || !text.bytes().all(|byte| byte.is_ascii_digit()) {
        return Err("expected a whole number".to_string());
    }
    text.parse()
        .map_err(|_| "whole number out of range".to_string())
}

pub(crate) fn real(text: &str) -> Result<f64, String> {
    let value: f64 = text
        .parse()
        .map_err(|_| "expected a number such as 0.5 or 1e-3".to_string())?;
    if value.is_finite() {
        Ok(value)
    } else {
        Err("expected a finite number".to_string())
    }
}

pub(crate) fn optional_real(text: &str) -> Result<Option<f64>, String> {
    if text == "none" || text.is_empty() {
        return Ok(None);
    }
    real(text)
        .map(Some)
        .map_err(|_| "expected a number or none".to_string())
}

pub(crate) fn flag(text: &str) -> Result<bool, String> {
    match text {
        "true" => Ok(true),
        "false" => Ok(false),
        _ => Err("expected true or false".to_string()),
    }
}

pub(crate) fn joining(text: &str) -> Result<Joining, String> {
    match text {
        "cheapest" => Ok(Joining::Cheapest),
        "weighted" => Ok(Joining::Weighted),
        "uniform" => Ok(Joining::Uniform),
        _ => Err("expected cheapest, weighted or uniform".to_string()),
    }
}

pub(crate) fn roots(text: &str) -> Result<Vec<Root>, String> {
    text.split(';')
        .filter(|part| !part.trim().is_empty())
        .map(|group| {
            let parts: Vec<&str> = group.split(',').map(str::trim).collect();
            let [x, y, dx, dy] = parts[..] else {
                return Err(format!("root {group:?}: expected x,y,dx,dy"));
            };
            Ok(Root {
                x: whole(x).map_err(|error| format!("root {group:?}: x: {error}"))?,
                y: whole(y).map_err(|error| format!("root {group:?}: y: {error}"))?,
                outflow: [
                    real(dx).map_err(|error| format!("root {group:?}: dx: {error}"))?,
                    real(dy).map_err(|error| format!("root {group:?}: dy: {error}"))?,
                ],
            })
        })
        .collect()
}

pub(crate) fn polygon(text: &str) -> Result<Vec<[f64; 2]>, String> {
    text.split(';')
        .filter(|part| !part.trim().is_empty())
        .map(|point| {
            let Some((x, y)) = point.split_once(',') else {
                return Err(format!("point {point:?}: expected x,y"));
            };
            Ok([
                real(x.trim()).map_err(|error| format!("point {point:?}: {error}"))?,
                real(y.trim()).map_err(|error| format!("point {point:?}: {error}"))?,
            ])
        })
        .collect()
}

pub(crate) fn mask(text: &str) -> Result<Option<MaskGrid>, String> {
    if text == "none" || text.is_empty() {
        return Ok(None);
    }
    let shape_error = || "expected none or WIDTHxHEIGHT:run.run.run".to_string();
    let (size, runs) = text.split_once(':').ok_or_else(shape_error)?;
    let (width, height) = size.split_once('x').ok_or_else(shape_error)?;
    Ok(Some(MaskGrid {
        width: whole(width)?,
        height: whole(height)?,
        runs: runs.split('.').map(whole).collect::<Result<_, _>>()?,
    }))
}

/// Spot levels as `x,y,z` groups joined by `;`; `none` when there are none.
pub(crate) fn levels_text(levels: &[[f64; 3]]) -> String {
    if levels.is_empty() {
        return "none".to_string();
    }
    levels
        .iter()
        .map(|level| {
            format!(
                "{},{},{}",
                number(level[0]),
                number(level[1]),
                number(level[2])
            )
        })
        .collect::<Vec<_>>()
        .join(";")
}

/// Runoff zones as `C:x,y;x,y;x,y` joined by `~`; empty when there are none.
pub(crate) fn zones_text(zones: &[Zone]) -> String {
    zones
        .iter()
        .map(|zone| format!("{}:{}", number(zone.runoff), polygon_text(&zone.polygon)))
        .collect::<Vec<_>>()
        .join("~")
}

pub(crate) fn levels(text: &str) -> Result<Vec<[f64; 3]>, String> {
    if text == "none" || text.is_empty() {
        return Ok(Vec::new());
    }
    text.split(';')
        .filter(|part| !part.trim().is_empty())
        .map(|group| {
            let parts: Vec<&str> = group.split(',').map(str::trim).collect();
            let [x, y, z] = parts[..] else {
                return Err(format!("spot level {group:?}: expected x,y,z"));
            };
            let read = |name: &str, value: &str| {
                real(value).map_err(|error| format!("spot level {group:?}: {name}: {error}"))
            };
            Ok([read("x", x)?, read("y", y)?, read("z", z)?])
        })
        .collect()
}

pub(crate) fn zones(text: &str) -> Result<Vec<Zone>, String> {
    text.split('~')
        .filter(|part| !part.trim().is_empty())
        .enumerate()
        .map(|(index, part)| {
            let Some((runoff, points)) = part.split_once(':') else {
                return Err(format!(
                    "zone {index}: expected C:x,y;x,y;x,y (a runoff coefficient, a colon, a polygon)"
                ));
            };
            Ok(Zone {
                runoff: real(runoff.trim())
                    .map_err(|error| format!("zone {index}: runoff coefficient: {error}"))?,
                polygon: polygon(points).map_err(|error| format!("zone {index}: {error}"))?,
            })
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn levels_and_zones_read_back_exactly() {
        let levels = vec![[1.5, 2.0, 100.25], [-3.0, 7.0, 99.1]];
        assert_eq!(levels_text(&levels), "1.5,2,100.25;-3,7,99.1");
        assert_eq!(super::levels(&levels_text(&levels)), Ok(levels));
        assert_eq!(levels_text(&[]), "none");
        let zones = vec![
            Zone {
                runoff: 0.9,
                polygon: vec![[0.0, 0.0], [4.0, 0.0], [4.0, 3.0]],
            },
            Zone {
                runoff: 0.15,
                polygon: vec![[5.0, 5.0], [6.5, 5.0], [6.0, 7.0]],
            },
        ];
        let text = zones_text(&zones);
        assert_eq!(text, "0.9:0,0;4,0;4,3~0.15:5,5;6.5,5;6,7");
        assert_eq!(super::zones(&text), Ok(zones));
    }

    #[test]
    fn bad_levels_and_zones_say_what_is_expected() {
        let error = super::levels("1,2,3;4,5").unwrap_err();
        assert!(
            error.contains("\"4,5\"") && error.contains("x,y,z"),
            "{error}"
        );
        let error = super::zones("0.9:0,0;1,0;1,1~0,0;1,0;1,1").unwrap_err();
        assert!(
            error.contains("zone 1") && error.contains("C:x,y"),
            "{error}"
        );
        let error = super::zones("wet:0,0;1,0;1,1").unwrap_err();
        assert!(error.contains("runoff coefficient"), "{error}");
    }

    /// Validation names the level or zone at fault.
    #[test]
    fn validation_names_the_level_or_zone() {
        let mut params = crate::params::Params::default();
        params.domain.levels = vec![[1.0, 1.0, 5.0], [2.0, 1.0, 5.0], [1.0, 1.0, 6.0]];
        let error = params.validate().unwrap_err();
        assert_eq!(error.key, "levels[2]");
        params.domain.levels.clear();
        params.domain.zones = vec![Zone {
            runoff: 0.0,
            polygon: vec![[0.0, 0.0], [4.0, 0.0], [4.0, 3.0]],
        }];
        let error = params.validate().unwrap_err();
        assert_eq!(error.key, "zones[0].runoff");
    }
}
