//! The drainage pass against a published storm-sewer design computation: Ponce 1989,
//! Engineering Hydrology: Principles and Practices (Prentice Hall), Table 4-2, "Summary of
//! computations illustrating application of the rational method to storm-sewer design"
//! (online edition, facets.sdsu.edu/enghydro, chapter 4). Nine 12- to 42-inch sewers drain
//! 37.85 acres with a 20-minute inlet time; each line's time of concentration is the longest
//! flow time to its upper end, its intensity is read for that time, Q = C i A with the average
//! C of the drained area, and the smallest pipe whose full capacity carries Q at the sewer's
//! slope is chosen; the flow time in a section is its length over the velocity at design flow.
//!
//! What we supply, because the table gives it only in rounded or graphical form:
//! - the intensity curve, as i = 126.6 / (t + 14.2) in/h, a straight-line fit of 1/i against t
//!   to the table's seven (time, intensity) pairs (20, 3.7), (21.4, 3.6), (21.1, 3.6),
//!   (22.6, 3.4), (23.8, 3.3), (24.9, 3.2), (26.0, 3.2), done once by hand; it reproduces them
//!   within 0.06 in/h;
//! - each increment's C, from the table's average C of the total area (two decimals):
//!   C_inc = (A_total C_avg - upstream sum C A) / A_inc;
//! - node elevations giving each sewer the table's slope (the manhole drops left out);
//! - Manning's n = 0.013 (the table's full capacities follow from it).
//!
//! The table's capacities and velocities were read from a nomograph: its two 12-inch lines
//! disagree with each other (3.3 ft^3/s at 0.85 % but 3.2 at the steeper 0.90 %), so flows,
//! capacities and velocities are checked within 6 %, depths within 2 inches, times within
//! 0.15 minutes; the pipe sizes exactly.

use ramulus_core::drainage::{
    size_network, ChannelSize, DesignStorm, HydraulicsInput, SizingRules, UnitSystem,
};
use ramulus_core::network::{Network, Node, Segment};

/// One line of Table 4-2: upper manhole, lower manhole, length (ft), area increment (acres),
/// average C of the total area, slope (%), and the published results: flow time to the upper
/// end (min), flow time in the section (min, none for the last), total runoff (ft^3/s),
/// diameter (in), full capacity (ft^3/s), design-flow velocity (ft/s), depth of flow (in).
struct Line {
    upper: &'static str,
    lower: &'static str,
    length: f64,
    area: f64,
    average_c: f64,
    slope_percent: f64,
    time_to_upper: f64,
    time_in_section: Option<f64>,
    runoff: f64,
    diameter: f64,
    capacity: f64,
    velocity: f64,
    depth: f64,
}

#[rustfmt::skip]
const LINES: [Line; 9] = [
    Line { upper: "1-6", lower: "1-5", length: 400.0, area: 2.64, average_c: 0.30, slope_percent: 0.85, time_to_upper: 20.0, time_in_section: Some(1.4), runoff: 2.93, diameter: 12.0, capacity: 3.3, velocity: 4.6, depth: 9.0 },
    Line { upper: "1-5", lower: "1-4", length: 400.0, area: 3.61, average_c: 0.30, slope_percent: 0.75, time_to_upper: 21.4, time_in_section: Some(1.2), runoff: 6.75, diameter: 18.0, capacity: 9.2, velocity: 5.6, depth: 11.0 },
    Line { upper: "1-4", lower: "1-3", length: 400.0, area: 3.88, average_c: 0.42, slope_percent: 0.45, time_to_upper: 22.6, time_in_section: Some(1.2), runoff: 14.50, diameter: 24.0, capacity: 15.2, velocity: 5.6, depth: 18.0 },
    Line { upper: "3-2", lower: "3-1", length: 400.0, area: 5.55, average_c: 0.30, slope_percent: 1.00, time_to_upper: 20.0, time_in_section: Some(1.1), runoff: 6.16, diameter: 15.0, capacity: 6.4, velocity: 5.9, depth: 12.0 },
    Line { upper: "3-1", lower: "1-3", length: 400.0, area: 6.43, average_c: 0.30, slope_percent: 0.60, time_to_upper: 21.1, time_in_section: Some(1.1), runoff: 12.92, diameter: 24.0, capacity: 17.5, velocity: 6.1, depth: 15.0 },
    Line { upper: "1-3", lower: "1-2", length: 400.0, area: 3.92, average_c: 0.39, slope_percent: 0.30, time_to_upper: 23.8, time_in_section: Some(1.1), runoff: 33.60, diameter: 36.0, capacity: 37.0, velocity: 5.9, depth: 26.0 },
    Line { upper: "2-1", lower: "1-2", length: 400.0, area: 2.52, average_c: 0.30, slope_percent: 0.90, time_to_upper: 20.0, time_in_section: Some(1.4), runoff: 2.80, diameter: 12.0, capacity: 3.2, velocity: 4.7, depth: 9.0 },
    Line { upper: "1-2", lower: "1-1", length: 400.0, area: 3.86, average_c: 0.41, slope_percent: 0.24, time_to_upper: 24.9, time_in_section: Some(1.1), runoff: 42.50, diameter: 42.0, capacity: 50.0, velocity: 5.9, depth: 29.0 },
    Line { upper: "1-1", lower: "outfall", length: 125.0, area: 5.44, average_c: 0.44, slope_percent: 0.30, time_to_upper: 26.0, time_in_section: None, runoff: 53.20, diameter: 42.0, capacity: 56.0, velocity: 6.6, depth: 33.0 },
];

/// Manholes as nodes (0 the outfall) with positions in feet laid out so each line has its
/// length; lines in table order are upstream before downstream.
fn manhole_network() -> (Network, HydraulicsInput, Vec<usize>) {
    let names = [
        "outfall", "1-1", "1-2", "1-3", "1-4", "1-5", "1-6", "3-1", "3-2", "2-1",
    ];
    let position = [
        (0.0, 0.0),
        (125.0, 0.0),
        (525.0, 0.0),
        (925.0, 0.0),
        (1325.0, 0.0),
        (1725.0, 0.0),
        (2125.0, 0.0),
        (925.0, 400.0),
        (925.0, 800.0),
        (525.0, 400.0),
    ];
    let index = |name: &str| names.iter().position(|&n| n == name).unwrap();
    let count = names.len();
    let mut area = vec![0.0; count];
    let mut runoff = vec![0.0; count];
    let mut ground = vec![0.0; count];
    let mut segments = Vec::new();
    let mut lines_of_segment = Vec::new();
    // Sum of C A (acres) and area arriving at each manhole from upstream lines.
    let mut arriving_ca = vec![0.0; count];
    let mut arriving_area = vec![0.0; count];
    for (line_index, line) in LINES.iter().enumerate() {
        let (upper, lower) = (index(line.upper), index(line.lower));
        let total = arriving_area[upper] + line.area;
        let c = (total * line.average_c - arriving_ca[upper]) / line.area;
        area[upper] = line.area * 43_560.0;
        runoff[upper] = c;
        arriving_area[lower] += total;
        arriving_ca[lower] += total * line.average_c;
        segments.push(Segment {
            from: upper as u32,
            to: lower as u32,
        });
        lines_of_segment.push(line_index);
    }
    // Elevations from the outfall up: each upper end higher by slope * length (reverse table
    // order reaches every lower end before its upper end).
    for line in LINES.iter().rev() {
        ground[index(line.upper)] =
            ground[index(line.lower)] + line.slope_percent / 100.0 * line.length;
    }
    let network = Network {
        nodes: position
            .iter()
            .map(|&(x, y)| Node { x, y, weight: 1.0 })
            .collect(),
        segments,
        area: 0.0,
        units: "ft".into(),
        cell_size: 0.0,
        cells: Default::default(),
    };
    let input = HydraulicsInput {
        node_area: area,
        node_runoff: runoff,
        node_ground: ground,
    };
    (network, input, lines_of_segment)
}

fn within(value: f64, expected: f64, relative: f64, what: &str) {
    assert!(
        (value - expected).abs() <= relative * expected,
        "{what}: {value}, table {expected}"
    );
}

#[test]
fn storm_sewer_design_matches_ponce_table_4_2() {
    let (network, input, lines_of_segment) = manhole_network();
    let topology = network.topology().unwrap();
    let storm = DesignStorm::IntensityDuration {
        a: 126.6,
        b: 14.2,
        c: 1.0,
        unit: UnitSystem::Us,
    };
    let mut rules = SizingRules::pipes(UnitSystem::Us);
    rules.inlet_time_minutes = 20.0;
    rules.manning_n = 0.013;
    rules.min_grade = 0.002;
    let us = UnitSystem::Us;
    let site = size_network(&network, &topology, &input, &storm, &rules, us).unwrap();
    for (segment, &line_index) in site.segments.iter().zip(&lines_of_segment) {
        let line = &LINES[line_index];
        let what = |quantity: &str| format!("{quantity} of line {}", line.upper);
        let diameter = match segment.size {
            ChannelSize::Pipe { diameter } => us.diameter_from_si(diameter),
            ChannelSize::Swale { .. } => panic!("pipes expected"),
        };
        assert!(
            (diameter - line.diameter).abs() < 1e-9,
            "{}: {diameter}",
            what("diameter")
        );
        assert!(
            (segment.time_of_concentration - line.time_to_upper).abs() <= 0.15,
            "{}: {}",
            what("time to upper end"),
            segment.time_of_concentration
        );
        if let Some(time) = line.time_in_section {
            assert!(
                (segment.travel_time - time).abs() <= 0.15,
                "{}: {}",
                what("flow time in section"),
                segment.travel_time
            );
        }
        within(
            us.flow_from_si(segment.peak_flow),
            line.runoff,
            0.06,
            &what("runoff"),
        );
        within(
            us.flow_from_si(segment.capacity),
            line.capacity,
            0.06,
            &what("capacity"),
        );
        within(
            us.velocity_from_si(segment.velocity),
            line.velocity,
            0.06,
            &what("velocity"),
        );
        let depth_inches = us.diameter_from_si(segment.depth);
        assert!(
            (depth_inches - line.depth).abs() <= 2.0,
            "{}: {depth_inches}",
            what("depth of flow")
        );
        within(
            segment.grade,
            line.slope_percent / 100.0,
            1e-9,
            &what("slope"),
        );
        assert!(
            segment.flags.is_empty(),
            "{}: {:?}",
            what("flags"),
            segment.flags
        );
    }
    // The outfall drains the 37.85 acres.
    let outfall = &site.outlets[0];
    within(
        us.area_from_si(outfall.contributing_area),
        37.85,
        1e-9,
        "outfall area",
    );
}
