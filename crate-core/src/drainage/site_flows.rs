//! The pass over a site's forest network: per segment the drained area, composite runoff
//! coefficient, time of concentration, design intensity, peak flow (Rational Method), size
//! (pipe or swale, Manning's equation), velocity and flags; per outlet the contributing area and
//! peak flow (`size_network`, HEC-22's storm-drain procedure).

use serde::{Deserialize, Serialize};

use super::manning::{pipe_at_flow, smallest_pipe, SectionFlow, SwaleShape};
use super::rainfall::DesignStorm;
use super::rational::peak_flow_si;
use super::units::{metres_per_network_unit, UnitSystem};
use super::DrainageError;
use crate::network::{Network, Topology, NO_PARENT};

/// The plain per-node inputs, indexed like `Network::nodes`, in the network's length unit.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct HydraulicsInput {
    /// Area each node drains itself (not counting nodes upstream), network units squared.
    pub node_area: Vec<f64>,
    /// Runoff coefficient C of each node's own area, 0 to 1.
    pub node_runoff: Vec<f64>,
    /// Ground (or invert) elevation at each node, network units.
    pub node_ground: Vec<f64>,
}

/// What carries the flow.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Conveyance {
    /// Circular pipes flowing at most full; the smallest of the list that carries the flow.
    Pipes {
        /// Nominal inside diameters on offer, m (any order).
        diameters: Vec<f64>,
    },
    /// One trapezoidal swale shape everywhere; the normal depth is computed.
    Swale(SwaleShape),
}

/// Rules for sizing, in SI (minutes, m, m/s). Each default names where it comes from.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct SizingRules {
    /// Inlet time, minutes: the time runoff takes to reach the network at a node (overland and
    /// gutter flow). Default 5 min (a common minimum, common practice, no source).
    pub inlet_time_minutes: f64,
    /// Manning's roughness n of the channels. Default 0.013 (concrete pipe; Chow 1959 Table
    /// 5-6 gives 0.011-0.015 for concrete culverts and sewers, from memory).
    pub manning_n: f64,
    /// Pipes or a swale.
    pub conveyance: Conveyance,
    /// Least velocity at design flow that keeps the channel clean, m/s. Default 0.6 m/s
    /// (common practice, no source).
    pub min_velocity: f64,
    /// Greatest velocity at design flow before scour, m/s. Default 3 m/s (common practice, no
    /// source).
    pub max_velocity: f64,
    /// Least grade (fall over run, m/m); flatter or uphill segments are sized at it and
    /// flagged. Default 0.005 (common practice, no source).
    pub min_grade: f64,
}

/// Common metric nominal pipe diameters, mm (from memory).
pub const METRIC_PIPE_SIZES_MM: [f64; 14] = [
    150.0, 225.0, 300.0, 375.0, 450.0, 525.0, 600.0, 675.0, 750.0, 900.0, 1050.0, 1200.0, 1350.0,
    1500.0,
];
/// Common US nominal pipe diameters, inches (from memory).
pub const US_PIPE_SIZES_IN: [f64; 14] = [
    8.0, 10.0, 12.0, 15.0, 18.0, 21.0, 24.0, 27.0, 30.0, 36.0, 42.0, 48.0, 54.0, 60.0,
];

impl Default for SizingRules {
    fn default() -> Self {
        SizingRules::pipes(UnitSystem::Si)
    }
}

impl SizingRules {
    /// Pipe rules with the nominal diameters of `system` (mm or inches, held in metres).
    pub fn pipes(system: UnitSystem) -> Self {
        let diameters = match system {
            UnitSystem::Si => METRIC_PIPE_SIZES_MM.to_vec(),
            UnitSystem::Us => US_PIPE_SIZES_IN.to_vec(),
        }
        .into_iter()
        .map(|diameter| system.diameter_to_si(diameter))
        .collect();
        SizingRules {
            inlet_time_minutes: 5.0,
            manning_n: 0.013,
            conveyance: Conveyance::Pipes { diameters },
            min_velocity: 0.6,
            max_velocity: 3.0,
            min_grade: 0.005,
        }
    }

    /// Swale rules: 0.6 m bottom, 3:1 sides, 0.3 m deepest flow (common practice, no source),
    /// n = 0.030 (Chow 1959 Table 5-6, earth channel with short grass 0.022-0.033, from
    /// memory).
    pub fn grass_swale() -> Self {
        SizingRules {
            manning_n: 0.030,
            conveyance: Conveyance::Swale(SwaleShape {
                bottom_width: 0.6,
                side_slope: 3.0,
                max_depth: 0.3,
            }),
            ..SizingRules::pipes(UnitSystem::Si)
        }
    }

    /// Checks every rule, naming the first out of range.
    pub fn validate(&self) -> Result<(), DrainageError> {
        let rule = |field: &'static str, value: f64, ok: bool| {
            if ok && value.is_finite() {
                Ok(())
            } else {
                Err(DrainageError::Rule { field, value })
            }
        };
        rule(
            "inlet_time_minutes",
            self.inlet_time_minutes,
            self.inlet_time_minutes >= 0.0,
        )?;
        rule("manning_n", self.manning_n, self.manning_n > 0.0)?;
        rule("min_velocity", self.min_velocity, self.min_velocity >= 0.0)?;
        rule(
            "max_velocity",
            self.max_velocity,
            self.max_velocity > self.min_velocity,
        )?;
        rule("min_grade", self.min_grade, self.min_grade > 0.0)?;
        match &self.conveyance {
            Conveyance::Pipes { diameters } => {
                if diameters.is_empty() {
                    return Err(DrainageError::NoPipeSizes);
                }
                for (index, &value) in diameters.iter().enumerate() {
                    if !(value.is_finite() && value > 0.0) {
                        return Err(DrainageError::PipeSize { index, value });
                    }
                }
            }
            Conveyance::Swale(shape) => {
                rule(
                    "swale bottom_width",
                    shape.bottom_width,
                    shape.bottom_width >= 0.0,
                )?;
                rule(
                    "swale side_slope",
                    shape.side_slope,
                    shape.side_slope >= 0.0 && (shape.side_slope > 0.0 || shape.bottom_width > 0.0),
                )?;
                rule("swale max_depth", shape.max_depth, shape.max_depth > 0.0)?;
            }
        }
        Ok(())
    }
}

/// Something a designer must look at on a segment; never hidden.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum HydraulicFlag {
    /// The ground rises downstream: sized at the minimum grade.
    Uphill,
    /// Flat or flatter than the minimum grade: sized at the minimum grade.
    BelowMinimumGrade,
    /// Velocity at design flow above the scour limit.
    TooFast,
    /// Velocity at design flow below the self-cleansing limit.
    TooSlow,
    /// Even the largest pipe of the list cannot carry the flow flowing full (it is given).
    NoPipeLargeEnough,
    /// The swale's normal depth exceeds the deepest flow allowed.
    SwaleTooDeep,
}

impl HydraulicFlag {
    /// Short key for CSV and GeoJSON.
    pub fn key(self) -> &'static str {
        match self {
            HydraulicFlag::Uphill => "uphill",
            HydraulicFlag::BelowMinimumGrade => "below_min_grade",
            HydraulicFlag::TooFast => "too_fast",
            HydraulicFlag::TooSlow => "too_slow",
            HydraulicFlag::NoPipeLargeEnough => "no_pipe_large_enough",
            HydraulicFlag::SwaleTooDeep => "swale_too_deep",
        }
    }
}

/// The size chosen for a segment.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum ChannelSize {
    /// A pipe of this inside diameter, m.
    Pipe {
        /// Diameter, m.
        diameter: f64,
    },
    /// The swale, flowing at this normal depth, m.
    Swale {
        /// Normal depth at design flow, m.
        depth: f64,
    },
}

/// One segment's hydraulics, in SI.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SegmentHydraulics {
    /// Index in `Network::segments`.
    pub segment: usize,
    /// Upstream node.
    pub from: u32,
    /// Downstream node.
    pub to: u32,
    /// Length, m.
    pub length: f64,
    /// Ground fall over run (m/m), positive downhill.
    pub grade: f64,
    /// Grade the segment is sized at: `grade`, or the minimum grade when flatter.
    pub design_grade: f64,
    /// Area draining through the segment, m^2.
    pub drained_area: f64,
    /// Area-weighted runoff coefficient of that area.
    pub runoff_coefficient: f64,
    /// Time of concentration at the segment's upstream end, minutes.
    pub time_of_concentration: f64,
    /// Design intensity for that duration, mm/h.
    pub intensity: f64,
    /// Peak flow, m^3/s.
    pub peak_flow: f64,
    /// Pipe diameter or swale depth.
    pub size: ChannelSize,
    /// Manning's n used.
    pub manning_n: f64,
    /// Mean velocity at the peak flow, m/s.
    pub velocity: f64,
    /// Flow depth at the peak flow, m.
    pub depth: f64,
    /// Capacity: full-pipe flow, or swale flow at the deepest allowed depth, m^3/s.
    pub capacity: f64,
    /// Travel time along the segment at `velocity`, minutes.
    pub travel_time: f64,
    /// What a designer must look at.
    pub flags: Vec<HydraulicFlag>,
}

/// One outlet (a root of the forest), in SI.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct OutletHydraulics {
    /// The root node.
    pub node: u32,
    /// Area draining to it (its own included), m^2.
    pub contributing_area: f64,
    /// Area-weighted runoff coefficient of that area.
    pub runoff_coefficient: f64,
    /// Time of concentration at the outlet, minutes.
    pub time_of_concentration: f64,
    /// Design intensity for that duration, mm/h.
    pub intensity: f64,
    /// Peak flow, m^3/s.
    pub peak_flow: f64,
}

/// The hydraulics of a site: every segment (in `Network::segments` order) and every outlet (in
/// node order), in SI, plus the units to report them in.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SiteHydraulics {
    /// One entry per segment, in segment order.
    pub segments: Vec<SegmentHydraulics>,
    /// One entry per root, in node order.
    pub outlets: Vec<OutletHydraulics>,
    /// Whether segments are pipes (false: a swale).
    pub pipes: bool,
    /// Units the reports use.
    pub report_units: UnitSystem,
}

impl HydraulicsInput {
    /// Checks lengths and values against a network of `nodes` nodes.
    pub fn validate(&self, nodes: usize) -> Result<(), DrainageError> {
        let lists: [(&'static str, &[f64]); 3] = [
            ("node_area", &self.node_area),
            ("node_runoff", &self.node_runoff),
            ("node_ground", &self.node_ground),
        ];
        for (field, values) in lists {
            if values.len() != nodes {
                return Err(DrainageError::InputLength {
                    field,
                    expected: nodes,
                    found: values.len(),
                });
            }
            for (node, &value) in values.iter().enumerate() {
                let ok = value.is_finite()
                    && match field {
                        "node_area" => value >= 0.0,
                        "node_runoff" => (0.0..=1.0).contains(&value),
                        _ => true,
                    };
                if !ok {
                    return Err(DrainageError::NodeValue { field, node, value });
                }
            }
        }
        Ok(())
    }
}

/// Sizes every segment of a forest network: the public entry point of `drainage`.
///
/// Nodes are taken from the channel heads downstream (the reverse of `topology.order`), as in
/// HEC-22's storm-drain computation: a segment's drained area and `sum(C A)` gather its own
/// node's and everything upstream; its time of concentration is the longest of the inlet time
/// and, over the segments entering its upstream node that drain any area, their time of
/// concentration plus their travel time; the intensity for that duration gives
/// `Q = (sum C A) i`; the smallest pipe whose full capacity carries `Q` at the design grade is
/// chosen (or the swale's normal depth found), and its velocity at `Q` gives the travel time
/// passed downstream. Because a segment's time of concentration is taken at its upstream end,
/// its own size does not feed back into its flow: one pass suffices, no iteration.
///
/// Grade is (ground at `from` - ground at `to`) / length; segments flatter than
/// `rules.min_grade` or running uphill are sized at the minimum grade and flagged. `network`
/// must be in `m` or `ft` (its `units`); `input` in the same unit; `report_units` only decides
/// how reports print.
pub fn size_network(
    network: &Network,
    topology: &Topology,
    input: &HydraulicsInput,
    storm: &DesignStorm,
    rules: &SizingRules,
    report_units: UnitSystem,
) -> Result<SiteHydraulics, DrainageError> {
    let count = network.nodes.len();
    storm.validate()?;
    rules.validate()?;
    input.validate(count)?;
    let metres = metres_per_network_unit(&network.units)?;
    let mismatch = || DrainageError::TopologyMismatch {
        nodes: count,
        topology: topology.parent.len(),
    };
    if [
        topology.parent.len(),
        topology.segment_of.len(),
        topology.order.len(),
        topology.length.len(),
    ]
    .iter()
    .any(|&len| len != count)
    {
        return Err(mismatch());
    }

    let mut drained: Vec<f64> = input
        .node_area
        .iter()
        .map(|a| a * metres * metres)
        .collect();
    let mut runoff_area: Vec<f64> = drained
        .iter()
        .zip(&input.node_runoff)
        .map(|(area, c)| area * c)
        .collect();
    // Latest arrival time (minutes) of the flow entering each node from upstream segments.
    let mut arrival = vec![rules.inlet_time_minutes; count];
    let mut segments: Vec<Option<SegmentHydraulics>> = vec![None; network.segments.len()];
    let mut outlets = Vec::new();

    for &node in topology.order.iter().rev() {
        let node = node as usize;
        if node >= count {
            return Err(mismatch());
        }
        let area = drained[node];
        let c = if area > 0.0 {
            runoff_area[node] / area
        } else {
            0.0
        };
        let time = arrival[node];
        let intensity = storm.intensity_mm_per_hour(time)?;
        let flow = peak_flow_si(c, intensity, area);
        let parent = topology.parent[node];
        if parent == NO_PARENT {
            outlets.push(OutletHydraulics {
                node: node as u32,
                contributing_area: area,
                runoff_coefficient: c,
                time_of_concentration: time,
                intensity,
                peak_flow: flow,
            });
            continue;
        }
        let (parent, index) = (parent as usize, topology.segment_of[node] as usize);
        if parent >= count || index >= segments.len() {
            return Err(mismatch());
        }
        let length = topology.length[node] * metres;
        if length.is_nan() || length <= 0.0 {
            return Err(DrainageError::ZeroLength { segment: index });
        }
        let grade = (input.node_ground[node] - input.node_ground[parent]) * metres / length;
        let mut flags = Vec::new();
        if grade < 0.0 {
            flags.push(HydraulicFlag::Uphill);
        } else if grade < rules.min_grade {
            flags.push(HydraulicFlag::BelowMinimumGrade);
        }
        let design_grade = grade.max(rules.min_grade);
        let n = rules.manning_n;
        let (size, section, capacity): (ChannelSize, SectionFlow, f64) = match &rules.conveyance {
            Conveyance::Pipes { diameters } => {
                let pipe = smallest_pipe(diameters, n, design_grade, flow)
                    .ok_or(DrainageError::NoPipeSizes)?;
                if !pipe.large_enough {
                    flags.push(HydraulicFlag::NoPipeLargeEnough);
                }
                let section = pipe_at_flow(pipe.diameter, n, design_grade, flow);
                let size = ChannelSize::Pipe {
                    diameter: pipe.diameter,
                };
                (size, section, pipe.capacity)
            }
            Conveyance::Swale(shape) => {
                let section = shape.normal_flow(flow, n, design_grade);
                if section.depth > shape.max_depth {
                    flags.push(HydraulicFlag::SwaleTooDeep);
                }
                let capacity = shape.flow_at_depth(shape.max_depth, n, design_grade).flow;
                let size = ChannelSize::Swale {
                    depth: section.depth,
                };
                (size, section, capacity)
            }
        };
        if section.velocity > rules.max_velocity {
            flags.push(HydraulicFlag::TooFast);
        } else if section.velocity < rules.min_velocity {
            flags.push(HydraulicFlag::TooSlow);
        }
        let travel_time = if section.velocity > 0.0 {
            length / section.velocity / 60.0
        } else {
            0.0
        };
        // Only a branch that drains something sets the time downstream.
        if area > 0.0 {
            arrival[parent] = arrival[parent].max(time + travel_time);
        }
        drained[parent] += area;
        runoff_area[parent] += runoff_area[node];
        let segment = network.segments[index];
        segments[index] = Some(SegmentHydraulics {
            segment: index,
            from: segment.from,
            to: segment.to,
            length,
            grade,
            design_grade,
            drained_area: area,
            runoff_coefficient: c,
            time_of_concentration: time,
            intensity,
            peak_flow: flow,
            size,
            manning_n: n,
            velocity: section.velocity,
            depth: section.depth,
            capacity,
            travel_time,
            flags,
        });
    }
    outlets.sort_by_key(|outlet| outlet.node);
    let segments = segments
        .into_iter()
        .collect::<Option<Vec<_>>>()
        .ok_or_else(mismatch)?;
    Ok(SiteHydraulics {
        segments,
        outlets,
        pipes: matches!(rules.conveyance, Conveyance::Pipes { .. }),
        report_units,
    })
}
