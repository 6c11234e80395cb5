//! Words and numbers of a sized site for people: the page's channel schedule and outlet rows
//! (`site_tables`), the flag words, and the drainage plan's input (`site_plan_input`) with its
//! size and flow labels. Units follow the report unit system of the hydraulics.

use ramulus_core::drainage::units::metres_per_network_unit;
use ramulus_core::drainage::{ChannelSize, HydraulicFlag, SiteHydraulics, UnitSystem};
use ramulus_core::params::Params;
use ramulus_core::site::{Site, UnreachedPart};
use ramulus_core::site_sizing::{SiteDesign, SizedSite};
use serde::Serialize;

use crate::format::{fixed, four_digits, grouped};
use crate::site_plan::{PlanArea, PlanAreaKind, PlanChannel, PlanInput, PlanOutlet, PlanUnreached};

/// The page's tables of a sized site.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SiteTables {
    /// Column headings of the schedule, units included.
    pub columns: Vec<String>,
    /// One row of texts per channel segment, in segment order.
    pub rows: Vec<Vec<String>>,
    /// One entry per outlet.
    pub outlets: Vec<OutletRow>,
    /// A sentence counting the flagged channels by flag, or saying none is flagged.
    pub flags_text: String,
}

/// One outlet's texts.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct OutletRow {
    /// "outlet 1", ...
    pub name: String,
    /// Contributing area with its unit.
    pub area_text: String,
    /// Peak flow with its unit.
    pub peak_flow_text: String,
    /// Time of concentration in minutes.
    pub time_text: String,
}

/// What a flag says to a designer.
pub fn flag_words(flag: HydraulicFlag) -> &'static str {
    match flag {
        HydraulicFlag::Uphill => "runs uphill",
        HydraulicFlag::BelowMinimumGrade => "flatter than the least grade",
        HydraulicFlag::TooFast => "faster than the scour limit",
        HydraulicFlag::TooSlow => "slower than the self-cleansing limit",
        HydraulicFlag::NoPipeLargeEnough => "no pipe on the list is large enough",
        HydraulicFlag::SwaleTooDeep => "swale deeper than allowed",
    }
}

const ALL_FLAGS: [HydraulicFlag; 6] = [
    HydraulicFlag::Uphill,
    HydraulicFlag::BelowMinimumGrade,
    HydraulicFlag::TooFast,
    HydraulicFlag::TooSlow,
    HydraulicFlag::NoPipeLargeEnough,
    HydraulicFlag::SwaleTooDeep,
];

/// A contributing area in the report units: m² below a tenth of a hectare, else ha (acres in
/// US units, ft² below a tenth of an acre).
pub fn area_text(square_metres: f64, units: UnitSystem) -> String {
    match units {
        UnitSystem::Si if square_metres < 1000.0 => format!("{} m²", four_digits(square_metres)),
        UnitSystem::Si => format!("{} ha", four_digits(square_metres / 10_000.0)),
        UnitSystem::Us => {
            let acres = units.area_from_si(square_metres);
            if acres < 0.1 {
                format!("{} ft²", four_digits(acres * SQUARE_FEET_PER_ACRE))
            } else {
                format!("{} acres", four_digits(acres))
            }
        }
    }
}

/// Square feet in an acre (by definition, 43,560).
const SQUARE_FEET_PER_ACRE: f64 = 43_560.0;

/// A flow with its unit (m³/s or ft³/s), four significant digits.
/// Flows under 0.1 m³/s are written in litres per second (1 m³/s = 1000 L/s), as site
/// drainage usually states them.
pub fn flow_text(cubic_metres_per_second: f64, units: UnitSystem) -> String {
    match units {
        UnitSystem::Si if cubic_metres_per_second < 0.1 => {
            format!("{} L/s", three_digits(cubic_metres_per_second * 1000.0))
        }
        UnitSystem::Si => format!("{} m³/s", three_digits(cubic_metres_per_second)),
        UnitSystem::Us => format!(
            "{} ft³/s",
            three_digits(units.flow_from_si(cubic_metres_per_second))
        ),
    }
}

/// Three significant digits in plain decimal notation (no exponent), e.g. 0.00179, 12.3, 1230.
fn three_digits(value: f64) -> String {
    if !value.is_finite() || value == 0.0 {
        return "0".into();
    }
    let magnitude = value.abs().log10().floor() as i32;
    let decimals = (2 - magnitude).max(0) as usize;
    fixed(value, decimals)
}

/// A size as drawn on the plan: "Ø300" (mm) or "Ø12 in", or a swale's flow depth.
pub fn size_text(size: ChannelSize, units: UnitSystem) -> String {
    match (size, units) {
        (ChannelSize::Pipe { diameter }, UnitSystem::Si) => {
            format!("Ø{}", fixed(diameter * 1000.0, 0))
        }
        (ChannelSize::Pipe { diameter }, UnitSystem::Us) => {
            format!("Ø{} in", fixed(units.diameter_from_si(diameter), 0))
        }
        (ChannelSize::Swale { depth }, _) => format!(
            "swale {} {} deep",
            four_digits(units.length_from_si(depth)),
            units.length_unit()
        ),
    }
}

/// What a site file holds, in one sentence: its size, area and features.
pub fn site_summary(site: &Site) -> String {
    let units = site.units.as_str();
    let xs = site.outline.iter().map(|p| p[0]);
    let ys = site.outline.iter().map(|p| p[1]);
    let width = xs.clone().fold(f64::NEG_INFINITY, f64::max) - xs.fold(f64::INFINITY, f64::min);
    let height = ys.clone().fold(f64::NEG_INFINITY, f64::max) - ys.fold(f64::INFINITY, f64::min);
    let area = shoelace(&site.outline).abs();
    let count = |n: usize, one: &str, many: &str| {
        format!("{} {}", grouped(n as u64), if n == 1 { one } else { many })
    };
    format!(
        "{} {units} × {} {units} site, {} {units}² inside the outline; {}, {}, {}, {}.",
        four_digits(width),
        four_digits(height),
        four_digits(area),
        count(site.obstacles.len(), "area kept clear", "areas kept clear"),
        count(site.zones.len(), "surface zone", "surface zones"),
        count(site.outlets.len(), "outlet", "outlets"),
        count(site.levels.len(), "spot level", "spot levels"),
    )
}

fn shoelace(ring: &[[f64; 2]]) -> f64 {
    let n = ring.len();
    (0..n)
        .map(|i| {
            let (a, b) = (ring[i], ring[(i + 1) % n]);
            a[0] * b[1] - b[0] * a[1]
        })
        .sum::<f64>()
        / 2.0
}

/// The schedule, outlets and flag summary of a sized site; `site_file`, when given, names the
/// outlets (in order, as `Site::to_params` makes the roots).
pub fn site_tables(site: &SiteHydraulics, site_file: Option<&Site>) -> SiteTables {
    let units = site.report_units;
    let length = units.length_unit();
    let columns = vec![
        "Channel".to_string(),
        "From → to".into(),
        format!("Length ({length})"),
        "Grade (%)".into(),
        "Drained area".into(),
        "C".into(),
        "t_c (min)".into(),
        format!("i ({})", intensity_unit(units)),
        "Peak flow".into(),
        if site.pipes {
            "Pipe".into()
        } else {
            "Swale".into()
        },
        format!("Velocity ({})", units.velocity_unit()),
        "Look at".into(),
    ];
    let rows = site
        .segments
        .iter()
        .map(|segment| {
            vec![
                (segment.segment + 1).to_string(),
                format!("{} → {}", segment.from, segment.to),
                fixed(units.length_from_si(segment.length), 2),
                fixed(segment.grade * 100.0, 2),
                area_text(segment.drained_area, units),
                fixed(segment.runoff_coefficient, 2),
                fixed(segment.time_of_concentration, 1),
                four_digits(units.intensity_from_si(segment.intensity)),
                flow_text(segment.peak_flow, units),
                size_text(segment.size, units),
                fixed(units.velocity_from_si(segment.velocity), 2),
                segment
                    .flags
                    .iter()
                    .map(|&flag| flag_words(flag))
                    .collect::<Vec<_>>()
                    .join("; "),
            ]
        })
        .collect();
    let outlets = site
        .outlets
        .iter()
        .enumerate()
        .map(|(k, outlet)| OutletRow {
            name: outlet_name(site_file, k),
            area_text: area_text(outlet.contributing_area, units),
            peak_flow_text: flow_text(outlet.peak_flow, units),
            time_text: format!("{} min", fixed(outlet.time_of_concentration, 1)),
        })
        .collect();
    SiteTables {
        columns,
        rows,
        outlets,
        flags_text: flags_summary(site),
    }
}

fn intensity_unit(units: UnitSystem) -> &'static str {
    units.intensity_unit()
}

/// "No channel is flagged." or "Flagged: 12 run uphill, 3 ... (of 240 channels)."
pub fn flags_summary(site: &SiteHydraulics) -> String {
    let counts: Vec<String> = ALL_FLAGS
        .iter()
        .filter_map(|&flag| {
            let count = site
                .segments
                .iter()
                .filter(|segment| segment.flags.contains(&flag))
                .count();
            (count > 0).then(|| format!("{} {}", grouped(count as u64), flag_words(flag)))
        })
        .collect();
    if counts.is_empty() {
        format!(
            "No channel is flagged (of {}).",
            grouped(site.segments.len() as u64)
        )
    } else {
        format!(
            "Flagged channels (of {}): {}. Flagged channels are drawn dashed in red on the plan.",
            grouped(site.segments.len() as u64),
            counts.join(", ")
        )
    }
}

/// The drainage plan's input for a sized run: the outline and kept-clear areas of the
/// parameters, every channel with its size and flow, the outlets with their area and flow, the
/// design notes and `caution`.
///
/// `site`: the site file the run was made from, if known; its obstacle, zone and outlet names
/// label the plan (matched in order, as `Site::to_params` keeps them).
pub fn site_plan_input(
    sized: &SizedSite,
    params: &Params,
    design: &SiteDesign,
    site_file: Option<&Site>,
    caution: &str,
    metadata_json: String,
) -> PlanInput {
    let site = &sized.hydraulics;
    let units = site.report_units;
    let cell = params.domain.cell_size;
    let to_units = |points: &[[f64; 2]]| -> Vec<[f64; 2]> {
        points.iter().map(|p| [p[0] * cell, p[1] * cell]).collect()
    };
    let mut areas = Vec::new();
    if let Some(outline) = &params.domain.outline {
        areas.push(PlanArea {
            kind: PlanAreaKind::Outline,
            ring: to_units(&polygon_points(outline)),
            label: String::new(),
        });
    } else {
        let (w, h) = (
            params.domain.width as f64 * cell,
            params.domain.height as f64 * cell,
        );
        areas.push(PlanArea {
            kind: PlanAreaKind::Outline,
            ring: vec![[0.0, 0.0], [w, 0.0], [w, h], [0.0, h]],
            label: String::new(),
        });
    }
    let names = |k: usize| -> Option<String> {
        site_file
            .filter(|site| site.obstacles.len() == params.domain.obstacles.len())
            .and_then(|site| site.obstacles[k].name.clone())
    };
    for (k, obstacle) in params.domain.obstacles.iter().enumerate() {
        areas.push(PlanArea {
            kind: PlanAreaKind::KeptClear,
            ring: to_units(&polygon_points(obstacle)),
            label: names(k).unwrap_or_else(|| "kept clear".into()),
        });
    }
    let zone_names = site_file.filter(|site| site.zones.len() == params.domain.zones.len());
    for (k, zone) in params.domain.zones.iter().enumerate() {
        let name = zone_names
            .and_then(|site| site.zones[k].surface.clone().or(site.zones[k].name.clone()))
            .unwrap_or_else(|| "zone".into());
        areas.push(PlanArea {
            kind: PlanAreaKind::Zone,
            ring: to_units(&zone.polygon),
            label: format!("{name}, C {}", fixed(zone.runoff, 2)),
        });
    }
    let channels = site
        .segments
        .iter()
        .map(|segment| {
            let from = &sized.network.nodes[segment.from as usize];
            let to = &sized.network.nodes[segment.to as usize];
            // Drawn 0.3 mm plus 2 mm per metre of size: a 150 mm pipe 0.6 mm, a 600 mm one
            // 1.5 mm (legible at any map scale; the label gives the size).
            let share = size_metres(segment.size) * 2.0 / 1.4;
            PlanChannel {
                from_node: segment.from as usize,
                to_node: segment.to as usize,
                from: [from.x, from.y],
                to: [to.x, to.y],
                size_label: size_text(segment.size, units),
                flow_label: flow_text(segment.peak_flow, units),
                width_mm: 0.3 + 1.4 * share,
                flagged: !segment.flags.is_empty(),
            }
        })
        .collect();
    let outlets = site
        .outlets
        .iter()
        .enumerate()
        .filter_map(|(k, outlet)| {
            let node = sized.network.nodes.get(outlet.node as usize)?;
            Some(PlanOutlet {
                at: [node.x, node.y],
                label: format!(
                    "{}: {}, {}",
                    outlet_name(site_file, k),
                    area_text(outlet.contributing_area, units),
                    flow_text(outlet.peak_flow, units)
                ),
            })
        })
        .collect();
    let mut notes = vec![storm_words(design), rules_words(design)];
    notes.push(flags_summary(site));
    let unreached = unreached_plan(&sized.unreached, &params.domain.units, units);
    if let Some(summary) =
        unreached_summary(&sized.unreached, &params.domain.units, units, site_file)
    {
        notes.push(summary);
    }
    PlanInput {
        title: "Ramulus drainage concept plan".into(),
        units: params.domain.units.clone(),
        areas,
        channels,
        outlets,
        unreached,
        notes,
        caution: caution.to_string(),
        metadata_json,
    }
}

/// The label of a part no outlet reaches, e.g. "no outlet reaches: 39 m²".
pub fn unreached_label(part: &UnreachedPart, length_unit: &str, units: UnitSystem) -> String {
    let metres = metres_per_network_unit(length_unit).unwrap_or(1.0);
    format!(
        "no outlet reaches: {}",
        area_text(part.area * metres * metres, units)
    )
}

/// The parts no outlet reaches as the plan draws them: rings and labels.
pub fn unreached_plan(
    parts: &[UnreachedPart],
    length_unit: &str,
    units: UnitSystem,
) -> Vec<PlanUnreached> {
    parts
        .iter()
        .map(|part| PlanUnreached {
            rings: part
                .polygons
                .iter()
                .flat_map(|polygon| {
                    std::iter::once(polygon.outer.clone()).chain(polygon.holes.iter().cloned())
                })
                .collect(),
            label: unreached_label(part, length_unit, units),
            label_at: part.label_at,
        })
        .collect()
}

/// Parts listed one by one in the summary; the rest are counted.
const UNREACHED_LISTED: usize = 5;

/// One sentence on the parts of the site no outlet reaches, or `None` when there are none:
/// their number and area, then the largest with their places. `site_file`, when given, places
/// them in the site's coordinates (x east, y north); else in the plan's (x right, y down from
/// the top-left corner).
pub fn unreached_summary(
    parts: &[UnreachedPart],
    length_unit: &str,
    units: UnitSystem,
    site_file: Option<&Site>,
) -> Option<String> {
    if parts.is_empty() {
        return None;
    }
    let metres = metres_per_network_unit(length_unit).unwrap_or(1.0);
    let total: f64 = parts.iter().map(|part| part.area).sum();
    let places: Vec<String> = parts
        .iter()
        .take(UNREACHED_LISTED)
        .map(|part| {
            let [x, y] = match site_file {
                Some(site) => site.network_to_site(part.centre),
                None => part.centre,
            };
            format!(
                "{} around ({}, {}) {}",
                area_text(part.area * metres * metres, units),
                fixed(units.length_from_si(x * metres), 1),
                fixed(units.length_from_si(y * metres), 1),
                units.length_unit()
            )
        })
        .collect();
    let more = if parts.len() > UNREACHED_LISTED {
        format!(
            " and {} smaller",
            grouped((parts.len() - UNREACHED_LISTED) as u64)
        )
    } else {
        String::new()
    };
    Some(format!(
        "No outlet reaches {} of the site, in {} part{} ({}{more}): obstacles or the outline cut {} off. Add an outlet there or open a way past the obstacle; the plan hatches {}.",
        area_text(total * metres * metres, units),
        grouped(parts.len() as u64),
        if parts.len() == 1 { "" } else { "s" },
        places.join("; "),
        if parts.len() == 1 { "it" } else { "them" },
        if parts.len() == 1 { "it" } else { "them" },
    ))
}

/// An outlet's name from the site file, else "outlet k".
fn outlet_name(site_file: Option<&Site>, k: usize) -> String {
    site_file
        .and_then(|site| site.outlets.get(k))
        .and_then(|outlet| outlet.name.clone())
        .unwrap_or_else(|| format!("outlet {}", k + 1))
}

fn size_metres(size: ChannelSize) -> f64 {
    match size {
        ChannelSize::Pipe { diameter } => diameter,
        ChannelSize::Swale { depth } => depth,
    }
}

fn polygon_points(polygon: &[[f64; 2]]) -> Vec<[f64; 2]> {
    polygon.to_vec()
}

/// The design storm in words, e.g. "Design rainfall: 75 mm/h for every duration (from the
/// user's local records)."
pub fn storm_words(design: &SiteDesign) -> String {
    use ramulus_core::drainage::DesignStorm;
    match design.storm {
        DesignStorm::Constant { intensity, unit } => format!(
            "Design rainfall: {} {} for every duration, as entered from local records.",
            four_digits(intensity),
            unit.intensity_unit()
        ),
        DesignStorm::IntensityDuration { a, b, c, unit } => format!(
            "Design rainfall: i = {} / (t + {})^{} {} (t in minutes), as entered from local records; each channel takes i at its time of concentration.",
            four_digits(a),
            four_digits(b),
            four_digits(c),
            unit.intensity_unit()
        ),
    }
}

/// The sizing rules in words.
pub fn rules_words(design: &SiteDesign) -> String {
    let rules = &design.rules;
    let units = design.system;
    format!(
        "Rational Method peak flows; sizes by Manning's equation with n = {}; inlet time {} min; least grade {} %; velocity limits {} to {} {}.",
        four_digits(rules.manning_n),
        four_digits(rules.inlet_time_minutes),
        four_digits(rules.min_grade * 100.0),
        four_digits(units.velocity_from_si(rules.min_velocity)),
        four_digits(units.velocity_from_si(rules.max_velocity)),
        units.velocity_unit()
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn areas_switch_to_hectares_and_acres() {
        // 1 ha = 10,000 m²; 1 acre = 43,560 ft² = 4046.856 m² (exact foot of 1959).
        assert_eq!(area_text(500.0, UnitSystem::Si), "500 m²");
        assert_eq!(area_text(25_000.0, UnitSystem::Si), "2.5 ha");
        assert_eq!(area_text(4_046.856_422_4, UnitSystem::Us), "1 acres");
    }

    #[test]
    fn us_pipes_are_labelled_in_inches() {
        // 0.3048 m = 12 in exactly.
        assert_eq!(
            size_text(ChannelSize::Pipe { diameter: 0.3048 }, UnitSystem::Us),
            "Ø12 in"
        );
        assert_eq!(
            size_text(ChannelSize::Pipe { diameter: 0.3 }, UnitSystem::Si),
            "Ø300"
        );
    }
}
