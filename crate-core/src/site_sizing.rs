//! Sizing a grown site: the design form (`SizingForm`, the texts a designer typed on the page or
//! the command line, read into a `SiteDesign`: design storm, sizing rules, report units) and
//! `size_run`, which turns a run's channel network into the per-node inputs of
//! `drainage::size_network` and sizes it.
//!
//! Channels are the conducting network (`vein_area`, the channel-initiation threshold): with a
//! threshold, every hillslope cell drains overland to the first channel node downstream of it,
//! whose own area, runoff coefficient (area-weighted) and inlet time take it in; without one,
//! every segment is a channel. Ground levels come from the run's terrain (`terrain::Elevation`:
//! its spot levels, else its uniform grade).

use serde::Deserialize;

use crate::drainage::{
    size_network, Conveyance, DesignStorm, DrainageError, HydraulicsInput, SiteHydraulics,
    SizingRules, SwaleShape, UnitSystem,
};
use crate::network::{Network, Topology, NO_PARENT};
use crate::params::Params;
use crate::run::RunView;
use crate::site::{node_area_runoff, unreached_parts, UnreachedPart};
use crate::terrain::{node_ground, Elevation};

/// The design form as typed: every value a text, so a wrong one is named as the user wrote it.
#[derive(Clone, Debug, Default, Deserialize)]
#[serde(default)]
pub struct SizingForm {
    /// `si` or `us`: the units the results are reported in and the form's values are given in.
    pub system: String,
    /// The design rainfall.
    pub rain: RainForm,
    /// Inlet (overland) time, minutes.
    pub inlet_time: String,
    /// `pipe` or `swale`.
    pub conveyance: String,
    /// Nominal pipe diameters, mm (SI) or inches (US), separated by commas or spaces.
    pub pipe_sizes: String,
    /// Manning's n.
    pub manning_n: String,
    /// Least grade, percent.
    pub min_grade_percent: String,
    /// Least velocity at design flow, m/s or ft/s.
    pub velocity_min: String,
    /// Greatest velocity at design flow, m/s or ft/s.
    pub velocity_max: String,
}

/// The design rainfall as typed.
#[derive(Clone, Debug, Default, Deserialize)]
#[serde(default)]
pub struct RainForm {
    /// `constant` or `idf`.
    pub kind: String,
    /// The constant intensity, mm/h or in/h.
    pub intensity: String,
    /// `a` of `i = a / (t + b)^c`.
    pub a: String,
    /// `b`, minutes.
    pub b: String,
    /// `c`.
    pub c: String,
}

/// Everything sizing needs besides the run: storm, rules (SI), report units.
#[derive(Clone, Debug, PartialEq)]
pub struct SiteDesign {
    /// The design rainfall (given by the user; never a default).
    pub storm: DesignStorm,
    /// Sizing rules, SI.
    pub rules: SizingRules,
    /// Units of the reports.
    pub system: UnitSystem,
}

/// Why a site cannot be sized.
#[derive(Clone, Debug, PartialEq)]
pub enum SiteSizingError {
    /// A field of the design form is missing or not a usable number.
    Field {
        /// The field's name in the form.
        field: &'static str,
        /// The text given.
        text: String,
        /// What is wrong.
        why: &'static str,
    },
    /// The design form is not JSON of the expected shape.
    Form(String),
    /// The run is not a site (its length unit is not `m` or `ft`).
    NotASite,
    /// The run's network has loops, so its flows are not defined by drainage.
    NotAForest,
    /// The drainage computation refused a value.
    Drainage(DrainageError),
}

impl std::fmt::Display for SiteSizingError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            SiteSizingError::Field { field, text, why } => {
                let shown: String = text.chars().take(40).collect();
                write!(f, "{field}: \"{shown}\" {why}")
            }
            SiteSizingError::Form(message) => write!(f, "the design form cannot be read: {message}"),
            SiteSizingError::NotASite => write!(
                f,
                "only a site (lengths in m or ft) can be sized; this run is measured in other units"
            ),
            SiteSizingError::NotAForest => write!(
                f,
                "this layout has loops, so the flow in each channel is not defined by where it drains"
            ),
            SiteSizingError::Drainage(error) => write!(f, "{error}"),
        }
    }
}

impl std::error::Error for SiteSizingError {}

impl From<DrainageError> for SiteSizingError {
    fn from(error: DrainageError) -> Self {
        SiteSizingError::Drainage(error)
    }
}

/// Reads the design form (JSON) into a design, naming the first field that is wrong.
pub fn read_sizing_form(json: &str) -> Result<SiteDesign, SiteSizingError> {
    let form: SizingForm =
        serde_json::from_str(json).map_err(|error| SiteSizingError::Form(error.to_string()))?;
    form.design()
}

impl SizingForm {
    /// The design this form describes.
    pub fn design(&self) -> Result<SiteDesign, SiteSizingError> {
        let system = match self.system.trim() {
            "" | "si" | "SI" => UnitSystem::Si,
            "us" | "US" => UnitSystem::Us,
            _ => {
                return Err(SiteSizingError::Field {
                    field: "system",
                    text: self.system.clone(),
                    why: "is not a unit system: use si or us",
                })
            }
        };
        let storm = match self.rain.kind.trim() {
            "" | "constant" => DesignStorm::Constant {
                intensity: positive("intensity", &self.rain.intensity)?,
                unit: system,
            },
            "idf" => DesignStorm::IntensityDuration {
                a: positive("a", &self.rain.a)?,
                b: number("b", &self.rain.b)?,
                c: number("c", &self.rain.c)?,
                unit: system,
            },
            _ => {
                return Err(SiteSizingError::Field {
                    field: "rain",
                    text: self.rain.kind.clone(),
                    why: "is not a kind of design rainfall: use constant or idf",
                })
            }
        };
        storm.validate()?;
        let mut rules = match self.conveyance.trim() {
            "" | "pipe" | "pipes" => SizingRules::pipes(system),
            "swale" => SizingRules::grass_swale(),
            _ => {
                return Err(SiteSizingError::Field {
                    field: "conveyance",
                    text: self.conveyance.clone(),
                    why: "is not a kind of channel: use pipe or swale",
                })
            }
        };
        if let Some(minutes) = optional("inlet_time", &self.inlet_time)? {
            rules.inlet_time_minutes = minutes;
        }
        if let Some(n) = optional("manning_n", &self.manning_n)? {
            rules.manning_n = n;
        }
        if let Some(percent) = optional("min_grade_percent", &self.min_grade_percent)? {
            rules.min_grade = percent / 100.0;
        }
        if let Some(v) = optional("velocity_min", &self.velocity_min)? {
            rules.min_velocity = system.velocity_to_si(v);
        }
        if let Some(v) = optional("velocity_max", &self.velocity_max)? {
            rules.max_velocity = system.velocity_to_si(v);
        }
        if matches!(rules.conveyance, Conveyance::Pipes { .. })
            && !self.pipe_sizes.trim().is_empty()
        {
            let mut diameters = Vec::new();
            for part in self
                .pipe_sizes
                .split(|c: char| c == ',' || c == ';' || c.is_whitespace())
                .filter(|part| !part.is_empty())
            {
                diameters.push(system.diameter_to_si(positive("pipe_sizes", part)?));
            }
            rules.conveyance = Conveyance::Pipes { diameters };
        }
        rules.validate()?;
        // The relation must give a finite, positive intensity at every duration a site's time
        // of concentration takes, from the inlet time (5 min at most) to 120 min: a / (t + b)^c
        // is monotonic in t, so its two ends bound it (a negative `b` or a large `c` fail here,
        // before any growth, rather than when a channel is sized).
        for minutes in [rules.inlet_time_minutes.min(5.0), 120.0] {
            storm.intensity_mm_per_hour(minutes)?;
        }
        Ok(SiteDesign {
            storm,
            rules,
            system,
        })
    }
}

fn number(field: &'static str, text: &str) -> Result<f64, SiteSizingError> {
    let value: f64 = text.trim().parse().map_err(|_| SiteSizingError::Field {
        field,
        text: text.to_string(),
        why: if text.trim().is_empty() {
            "is empty: enter a number"
        } else {
            "is not a number"
        },
    })?;
    if value.is_finite() {
        Ok(value)
    } else {
        Err(SiteSizingError::Field {
            field,
            text: text.to_string(),
            why: "is not a finite number",
        })
    }
}

fn positive(field: &'static str, text: &str) -> Result<f64, SiteSizingError> {
    let value = number(field, text)?;
    if value > 0.0 {
        Ok(value)
    } else {
        Err(SiteSizingError::Field {
            field,
            text: text.to_string(),
            why: "must be above 0",
        })
    }
}

fn optional(field: &'static str, text: &str) -> Result<Option<f64>, SiteSizingError> {
    if text.trim().is_empty() {
        Ok(None)
    } else {
        number(field, text).map(Some)
    }
}

/// A sized site: the channel network that was sized (the conducting network of the run) and
/// its hydraulics, segment by segment in that network's order.
#[derive(Clone, Debug)]
pub struct SizedSite {
    /// The channels and their nodes, in the run's length unit.
    pub network: Network,
    /// Its forest view.
    pub topology: Topology,
    /// Flows, sizes and flags.
    pub hydraulics: SiteHydraulics,
    /// The parts of the site that no outlet reaches (`site::unreached_parts`), largest first.
    pub unreached: Vec<UnreachedPart>,
}

/// Sizes a run's channels for `design`.
pub fn size_run(
    view: &RunView,
    params: &Params,
    design: &SiteDesign,
) -> Result<SizedSite, SiteSizingError> {
    if !params.is_site() {
        return Err(SiteSizingError::NotASite);
    }
    let Some(forest) = &view.forest else {
        return Err(SiteSizingError::NotAForest);
    };
    let whole = &view.network;
    // Each grown cell drains its own area at its zone's runoff coefficient; junctions none.
    let own = node_area_runoff(whole, params);
    let own_area = own.area;
    let own_runoff_area: Vec<f64> = own_area
        .iter()
        .zip(&own.runoff)
        .map(|(&area, &runoff)| area * runoff)
        .collect();

    let (network, topology, channel_of) = match &view.conducting.veins {
        Some(veins) => (
            veins.network.clone(),
            veins.forest.topology.clone(),
            channel_nodes(&forest.topology, &veins.index),
        ),
        None => (
            whole.clone(),
            forest.topology.clone(),
            (0..whole.nodes.len() as u32).collect(),
        ),
    };
    let count = network.nodes.len();
    let mut area = vec![0.0; count];
    let mut runoff_area = vec![0.0; count];
    for (node, &channel) in channel_of.iter().enumerate() {
        if channel == NO_PARENT {
            continue;
        }
        area[channel as usize] += own_area[node];
        runoff_area[channel as usize] += own_runoff_area[node];
    }
    let node_runoff = area
        .iter()
        .zip(&runoff_area)
        .map(|(&a, &ca)| {
            if a > 0.0 {
                (ca / a).clamp(0.0, 1.0)
            } else {
                0.0
            }
        })
        .collect();
    let node_ground = node_ground(&network, &Elevation::of_run(params));
    let input = HydraulicsInput {
        node_area: area,
        node_runoff,
        node_ground,
    };
    let hydraulics = size_network(
        &network,
        &topology,
        &input,
        &design.storm,
        &design.rules,
        design.system,
    )?;
    Ok(SizedSite {
        network,
        topology,
        hydraulics,
        unreached: unreached_parts(params, &view.network),
    })
}

/// For each node of the whole network, the channel node its area drains to: itself when it is
/// on a channel (`index` not `NO_PARENT`), else the first channel node downstream of it.
fn channel_nodes(topology: &Topology, index: &[u32]) -> Vec<u32> {
    let mut channel = vec![NO_PARENT; topology.parent.len()];
    // Root first, so a node's parent is settled before it.
    for &node in &topology.order {
        let node = node as usize;
        channel[node] = if index[node] != NO_PARENT {
            index[node]
        } else {
            match topology.parent[node] {
                NO_PARENT => NO_PARENT,
                parent => channel[parent as usize],
            }
        };
    }
    channel
}

/// The swale shape the rules use, if any.
pub fn swale_of(rules: &SizingRules) -> Option<&SwaleShape> {
    match &rules.conveyance {
        Conveyance::Swale(shape) => Some(shape),
        Conveyance::Pipes { .. } => None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn form(json: &str) -> Result<SiteDesign, SiteSizingError> {
        read_sizing_form(json)
    }

    #[test]
    fn a_missing_intensity_is_named_and_never_defaulted() {
        let error = form(r#"{"rain":{"kind":"constant","intensity":""}}"#).unwrap_err();
        assert!(
            error.to_string().starts_with("intensity: \"\" is empty"),
            "{error}"
        );
    }

    #[test]
    fn us_pipe_sizes_are_inches() {
        // 12 in = 0.3048 m exactly (1 in = 25.4 mm, by definition since 1959).
        let design = form(
            r#"{"system":"us","rain":{"kind":"constant","intensity":"4"},"pipe_sizes":"12, 15"}"#,
        )
        .unwrap();
        let Conveyance::Pipes { diameters } = &design.rules.conveyance else {
            panic!("pipes expected")
        };
        assert!((diameters[0] - 0.3048).abs() < 1e-12);
        assert!((diameters[1] - 0.381).abs() < 1e-12);
    }

    /// Fuzz regression (tests/tests/fuzz_sizing.rs): `b = -10` makes `t + b` negative at
    /// 5 min, where `(t + b)^c` has no real value; the form was accepted and sizing failed only
    /// after growth. Now the form is refused, naming the duration.
    #[test]
    fn idf_coefficients_giving_no_intensity_at_five_minutes_are_refused() {
        let error = form(r#"{"rain":{"kind":"idf","a":"1500","b":"-10","c":"0.8"}}"#).unwrap_err();
        let text = error.to_string();
        assert!(text.contains("at a duration of 5 min"), "{text}");
        // c = 200: 10^200 at 5 min is finite, 125^200 at 120 min overflows, giving 0.
        let error = form(r#"{"rain":{"kind":"idf","a":"1500","b":"5","c":"200"}}"#).unwrap_err();
        assert!(error.to_string().contains("120 min"), "{error}");
    }

    #[test]
    fn a_negative_idf_coefficient_is_named() {
        let error = form(r#"{"rain":{"kind":"idf","a":"-5","b":"10","c":"0.8"}}"#).unwrap_err();
        assert!(
            error.to_string().starts_with("a: \"-5\" must be above 0"),
            "{error}"
        );
    }
}
