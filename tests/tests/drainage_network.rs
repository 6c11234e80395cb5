//! The drainage pass (`ramulus_core::drainage::size_network`) on a small hand-built site whose
//! times of concentration, flows and sizes are computed by hand below (Rational Method and
//! Manning's equation as in US FHWA HEC-22, 3rd ed. 2009, storm-drain procedure: time of
//! concentration = inlet time + longest travel time upstream); flow accumulation on a larger
//! forest; the reports (CSV, GeoJSON) and their caution; and every bad input's message.

use ramulus_core::drainage::{
    outlet_csv, schedule_csv, site_geojson, size_network, ChannelSize, Conveyance, DesignStorm,
    DrainageError, HydraulicFlag, HydraulicsInput, SiteHydraulics, SizingRules, SwaleShape,
    UnitSystem, DRAINAGE_CAUTION,
};
use ramulus_core::network::{Network, Node, Segment};

/// A network in `units` from points and (upstream, downstream) ends.
fn network(points: &[(f64, f64)], ends: &[(u32, u32)], units: &str) -> Network {
    Network {
        nodes: points
            .iter()
            .map(|&(x, y)| Node { x, y, weight: 1.0 })
            .collect(),
        segments: ends
            .iter()
            .map(|&(from, to)| Segment { from, to })
            .collect(),
        area: 0.0,
        units: units.to_string(),
        cell_size: 0.0,
        cells: Default::default(),
    }
}

/// The hand-built site (metres): outlet 0; node 1 100 m east of it; node 2 100 m further east;
/// node 3 60 m south of node 1; node 4 50 m south of the outlet. Segments in this order:
/// 0: 1->0, 1: 2->1, 2: 3->1, 3: 4->0.
fn hand_site() -> (Network, HydraulicsInput) {
    let site = network(
        &[
            (0.0, 0.0),
            (100.0, 0.0),
            (200.0, 0.0),
            (100.0, 60.0),
            (0.0, 50.0),
        ],
        &[(1, 0), (2, 1), (3, 1), (4, 0)],
        "m",
    );
    let input = HydraulicsInput {
        node_area: vec![0.0, 1000.0, 4000.0, 2000.0, 1500.0],
        node_runoff: vec![0.0, 0.95, 0.9, 0.3, 0.5],
        node_ground: vec![10.0, 11.0, 12.0, 11.12, 9.9],
    };
    (site, input)
}

/// i = 1200 / (t + 10) mm/h, t in minutes (invented coefficients, not a real place).
fn storm() -> DesignStorm {
    DesignStorm::IntensityDuration {
        a: 1200.0,
        b: 10.0,
        c: 1.0,
        unit: UnitSystem::Si,
    }
}

fn rules(diameters_mm: &[f64]) -> SizingRules {
    SizingRules {
        inlet_time_minutes: 5.0,
        manning_n: 0.013,
        conveyance: Conveyance::Pipes {
            diameters: diameters_mm.iter().map(|d| d / 1000.0).collect(),
        },
        min_velocity: 0.78,
        max_velocity: 3.0,
        min_grade: 0.005,
    }
}

fn size(site: &(Network, HydraulicsInput), rules: &SizingRules) -> SiteHydraulics {
    let topology = site.0.topology().unwrap();
    size_network(&site.0, &topology, &site.1, &storm(), rules, UnitSystem::Si).unwrap()
}

fn close(value: f64, expected: f64, tolerance: f64, what: &str) {
    assert!(
        (value - expected).abs() <= tolerance,
        "{what}: {value}, expected {expected}"
    );
}

fn diameter(size: ChannelSize) -> f64 {
    match size {
        ChannelSize::Pipe { diameter } => diameter,
        ChannelSize::Swale { .. } => panic!("a pipe was expected"),
    }
}

// Hand computation (n = 0.013, inlet time 5 min, minimum grade 0.005, pipes 150, 225, 300,
// 375 mm; full capacity Q = (1/n)(pi D^2/4)(D/4)^(2/3) S^(1/2)):
//
// Heads first, t = 5 min, i = 1200 / 15 = 80 mm/h.
// Segment 1 (2->1): A = 4000 m^2, C A = 0.9 * 4000 = 3600 m^2, grade (12 - 11) / 100 = 0.01.
//   Q = 3600 * 80 / 3,600,000 = 0.08 m^3/s. Capacities at S = 0.01: 225 mm:
//   76.923 * 0.039761 * 0.056250^(2/3) (= 0.14680) * 0.1 = 0.04490; 300 mm: 76.923 * 0.070686
//   * 0.17784 * 0.1 = 0.09670 >= 0.08 -> 300 mm. Part-full (bisection on the central angle,
//   checked in a separate calculator run): depth 0.2081 m, V = 1.5289 m/s, travel 100 / 1.5289
//   / 60 = 1.0902 min, arriving at node 1 at 6.0902 min.
// Segment 2 (3->1): A = 2000, C A = 600, grade (11.12 - 11) / 60 = 0.002 < 0.005: flagged,
//   sized at S = 0.005. Q = 600 * 80 / 3.6e6 = 0.013333. 150 mm at S = 0.005: 76.923 *
//   0.017671 * 0.0375^(2/3) (= 0.11203) * 0.070711 = 0.01077 < Q; 225 mm: 76.923 * 0.039761 *
//   0.14680 * 0.070711 = 0.03175 -> 225 mm. Part-full: depth 0.1017 m, V = 0.7637 m/s (below
//   0.78: too slow), travel 60 / 0.7637 / 60 = 1.3094 min, arriving at 6.3094 min.
// Segment 0 (1->0): A = 1000 + 4000 + 2000 = 7000 m^2, C A = 950 + 3600 + 600 = 5150,
//   C = 5150 / 7000 = 0.73571. t = max(5, 6.0902, 6.3094) = 6.3094 min (the longer travel
//   comes from the smaller branch), i = 1200 / 16.3094 = 73.577 mm/h,
//   Q = 5150 * 73.577 / 3.6e6 = 0.10526 m^3/s. 300 mm carries 0.09670 < Q; 375 mm: 76.923 *
//   0.110447 * 0.20637 * 0.1 = 0.17533 -> 375 mm. Part-full V = 1.6595 m/s, travel 1.0043 min.
// Segment 3 (4->0): A = 1500, C A = 750, grade (9.9 - 10) / 50 = -0.002: uphill, flagged,
//   sized at 0.005. Q = 750 * 80 / 3.6e6 = 0.016667 -> 225 mm (0.03175); V = 0.8082 m/s.
// Outlet 0: area 8500 m^2, C A = 5900, t = max(6.3094 + 1.0043, 5 + 1.0311) = 7.3137 min,
//   i = 1200 / 17.3137 = 69.309 mm/h, Q = 5900 * 69.309 / 3.6e6 = 0.11359 m^3/s.
#[test]
fn hand_built_site_matches_the_hand_computation() {
    let site = hand_site();
    let result = size(&site, &rules(&[150.0, 225.0, 300.0, 375.0]));
    let s = &result.segments;
    assert_eq!(s.len(), 4);

    close(s[1].peak_flow, 0.08, 1e-12, "Q of 2->1");
    close(s[1].time_of_concentration, 5.0, 1e-12, "t_c of 2->1");
    close(diameter(s[1].size), 0.3, 0.0, "D of 2->1");
    close(s[1].capacity, 0.09670, 0.00001, "capacity of 2->1");
    close(s[1].depth, 0.2081, 0.0001, "depth of 2->1");
    close(s[1].velocity, 1.5289, 0.0001, "V of 2->1");
    close(s[1].travel_time, 1.0902, 0.0001, "travel on 2->1");
    assert!(s[1].flags.is_empty(), "{:?}", s[1].flags);

    close(s[2].grade, 0.002, 1e-9, "grade of 3->1");
    close(s[2].design_grade, 0.005, 0.0, "design grade of 3->1");
    close(s[2].peak_flow, 0.013333, 0.000001, "Q of 3->1");
    close(diameter(s[2].size), 0.225, 0.0, "D of 3->1");
    close(s[2].velocity, 0.7637, 0.0001, "V of 3->1");
    assert_eq!(
        s[2].flags,
        [HydraulicFlag::BelowMinimumGrade, HydraulicFlag::TooSlow]
    );

    close(s[0].drained_area, 7000.0, 1e-9, "A of 1->0");
    close(s[0].runoff_coefficient, 0.73571, 0.00001, "C of 1->0");
    close(s[0].time_of_concentration, 6.3094, 0.0001, "t_c of 1->0");
    close(s[0].intensity, 73.577, 0.001, "i of 1->0");
    close(s[0].peak_flow, 0.10526, 0.00001, "Q of 1->0");
    close(diameter(s[0].size), 0.375, 0.0, "D of 1->0");
    close(s[0].velocity, 1.6595, 0.0001, "V of 1->0");

    close(s[3].grade, -0.002, 1e-9, "grade of 4->0");
    close(diameter(s[3].size), 0.225, 0.0, "D of 4->0");
    assert_eq!(s[3].flags, [HydraulicFlag::Uphill]);

    let outlet = &result.outlets[0];
    assert_eq!(result.outlets.len(), 1);
    close(outlet.contributing_area, 8500.0, 1e-9, "outlet area");
    close(outlet.time_of_concentration, 7.3137, 0.0001, "outlet t_c");
    close(outlet.peak_flow, 0.11359, 0.00001, "outlet Q");
}

#[test]
fn too_short_a_pipe_list_gives_its_largest_pipe_flagged() {
    // Segment 1->0 needs 0.10526 m^3/s; the largest pipe, 300 mm, carries 0.09670 (above).
    let result = size(&hand_site(), &rules(&[150.0, 225.0, 300.0]));
    let main = &result.segments[0];
    close(diameter(main.size), 0.3, 0.0, "D");
    assert!(main.flags.contains(&HydraulicFlag::NoPipeLargeEnough));
    // Surcharged: velocity = Q / full area = 0.10526 / 0.070686 = 1.4891 m/s (the travel time
    // and so this Q use it).
    close(
        main.velocity,
        main.peak_flow / 0.070_686,
        0.0001,
        "surcharged V",
    );
}

#[test]
fn v_shaped_swale_depth_matches_the_closed_form() {
    // V-shaped swale (bottom 0, side slope z = 4), n = 0.03. Segment 2->1: Q = 0.08 m^3/s at
    // S = 0.01 (its time of concentration is the inlet time whatever the size). A = z y^2,
    // P = 2 y sqrt(1 + z^2), so Q = (1/n) z y^2 (z y / (2 sqrt(1 + z^2)))^(2/3) S^(1/2) and
    // y^(8/3) = (Q n / (z S^(1/2))) (2 sqrt(17) / 4)^(2/3) = 0.006 * 1.61981 = 0.0097188,
    // y = 0.0097188^(3/8) = 0.17594 m; V = Q / (4 y^2) = 0.64613 m/s.
    let mut swale = rules(&[]);
    swale.manning_n = 0.03;
    swale.conveyance = Conveyance::Swale(SwaleShape {
        bottom_width: 0.0,
        side_slope: 4.0,
        max_depth: 0.15,
    });
    let result = size(&hand_site(), &swale);
    let segment = &result.segments[1];
    match segment.size {
        ChannelSize::Swale { depth } => close(depth, 0.17594, 0.00001, "swale depth"),
        ChannelSize::Pipe { .. } => panic!("a swale was expected"),
    }
    close(segment.velocity, 0.64613, 0.00001, "swale V");
    assert_eq!(
        segment.flags,
        [HydraulicFlag::SwaleTooDeep, HydraulicFlag::TooSlow]
    );
}

/// A pseudo-random forest of `count` nodes and `roots` roots in feet: node k > roots drains to
/// an earlier node (a fixed linear congruential sequence, so the test is repeatable).
fn random_forest(count: usize, roots: usize) -> (Network, HydraulicsInput) {
    let mut state: u64 = 12345;
    let mut next = move || {
        state = state
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (state >> 33) as f64 / (1u64 << 31) as f64
    };
    let mut points = Vec::new();
    let mut ends = Vec::new();
    let mut area = Vec::new();
    let mut runoff = Vec::new();
    let mut ground = Vec::new();
    for node in 0..count {
        points.push((next() * 1000.0, next() * 1000.0));
        if node >= roots {
            ends.push((node as u32, (next() * node as f64) as u32));
        }
        area.push(next() * 5000.0);
        runoff.push(next());
        ground.push(next() * 20.0);
    }
    let input = HydraulicsInput {
        node_area: area,
        node_runoff: runoff,
        node_ground: ground,
    };
    (network(&points, &ends, "ft"), input)
}

#[test]
fn outlets_drain_the_whole_site() {
    // Flow accumulation: every node's area reaches exactly one outlet, so the outlets'
    // contributing areas sum to the sum of node areas (here converted from ft^2 to m^2 at
    // 0.3048^2), and each segment drains its own node plus the segments entering it.
    let site = random_forest(300, 4);
    let topology = site.0.topology().unwrap();
    let result = size_network(
        &site.0,
        &topology,
        &site.1,
        &storm(),
        &SizingRules::pipes(UnitSystem::Us),
        UnitSystem::Us,
    )
    .unwrap();
    assert_eq!(result.outlets.len(), 4);
    let total: f64 = site.1.node_area.iter().sum::<f64>() * 0.3048 * 0.3048;
    let outlets: f64 = result.outlets.iter().map(|o| o.contributing_area).sum();
    assert!((outlets - total).abs() <= 1e-9 * total, "{outlets} {total}");
    for segment in &result.segments {
        let entering: f64 = result
            .segments
            .iter()
            .filter(|other| other.to == segment.from)
            .map(|other| other.drained_area)
            .sum();
        let own = site.1.node_area[segment.from as usize] * 0.3048 * 0.3048;
        close(
            segment.drained_area,
            own + entering,
            1e-6 * segment.drained_area.max(1.0),
            "drained area",
        );
        // Downstream, the time of concentration never falls.
        let below = result
            .segments
            .iter()
            .find(|other| other.from == segment.to);
        if let Some(below) = below {
            if segment.drained_area > 0.0 {
                assert!(
                    below.time_of_concentration
                        >= segment.time_of_concentration + segment.travel_time - 1e-9
                );
            }
        }
    }
}

#[test]
fn reports_carry_the_caution_and_the_units() {
    let site = hand_site();
    let topology = site.0.topology().unwrap();
    let rules = rules(&[150.0, 225.0, 300.0, 375.0]);
    let us = size_network(
        &site.0,
        &topology,
        &site.1,
        &storm(),
        &rules,
        UnitSystem::Us,
    )
    .unwrap();
    let csv = schedule_csv(&us);
    let mut lines = csv.lines();
    assert_eq!(lines.next().unwrap(), format!("# {DRAINAGE_CAUTION}"));
    // The caution line is one CSV field, and says all three things.
    assert!(!DRAINAGE_CAUTION.contains(',') && !DRAINAGE_CAUTION.contains('"'));
    for part in [
        "Concept layouts only",
        "local rainfall records",
        "licensed engineer",
    ] {
        assert!(DRAINAGE_CAUTION.contains(part), "{part}");
    }
    let header = lines.next().unwrap();
    for unit in [
        "(ft)",
        "(acre)",
        "(in/h)",
        "(ft3/s)",
        "pipe diameter (in)",
        "(ft/s)",
    ] {
        assert!(header.contains(unit), "{unit} missing from {header}");
    }
    // Segment 1->0 in US units: Q = 0.10526 m^3/s / 0.3048^3 = 3.7171 ft^3/s; D = 375 mm /
    // 25.4 = 14.76 in; A = 7000 m^2 / 4046.856 = 1.7297 acres; length 100 m = 328.08 ft.
    let row: Vec<&str> = lines.next().unwrap().split(',').collect();
    assert_eq!(row.len(), 16);
    assert_eq!(row[3], "328.08");
    assert_eq!(row[5], "1.7297");
    close(row[9].parse().unwrap(), 3.7171, 0.0001, "Q in ft3/s");
    assert_eq!(row[10], "14.76");
    let outlets = outlet_csv(&us);
    assert!(outlets.starts_with(&format!("# {DRAINAGE_CAUTION}")));

    let si = size(&site, &rules);
    let json: serde_json::Value = serde_json::from_str(&site_geojson(&site.0, &si, &[])).unwrap();
    assert_eq!(json["caution"], DRAINAGE_CAUTION);
    let features = json["features"].as_array().unwrap();
    assert_eq!(features.len(), 4);
    let second = &features[2];
    assert_eq!(second["properties"]["caution"], DRAINAGE_CAUTION);
    // Segment 2 runs 3 -> 1: (100, 60) -> (100, 0), y negated for GeoJSON (y north).
    assert_eq!(
        second["geometry"]["coordinates"],
        serde_json::json!([[100.0, -60.0], [100.0, -0.0]])
    );
    assert_eq!(
        second["properties"]["flags"],
        serde_json::json!(["below_min_grade", "too_slow"])
    );
    close(
        second["properties"]["pipe_diameter"].as_f64().unwrap(),
        225.0,
        1e-9,
        "diameter in mm",
    );
    assert_eq!(json["units"]["peak_flow"], "m3/s");
}

/// The message of the error `size_network` gives after `change` spoils the hand site.
fn message(
    change: impl FnOnce(&mut Network, &mut HydraulicsInput, &mut DesignStorm, &mut SizingRules),
) -> String {
    let (mut site, mut input) = hand_site();
    let mut storm = storm();
    let mut rules = rules(&[150.0, 300.0]);
    change(&mut site, &mut input, &mut storm, &mut rules);
    let topology = site.topology().unwrap();
    let error: DrainageError =
        size_network(&site, &topology, &input, &storm, &rules, UnitSystem::Si).unwrap_err();
    error.to_string()
}

#[test]
fn every_bad_input_is_named() {
    let cases: Vec<(String, &[&str])> = vec![
        (
            message(|_, input, _, _| input.node_area[2] = -4.0),
            &["node_area", "node 2", "-4"],
        ),
        (
            message(|_, input, _, _| input.node_runoff[3] = 1.5),
            &["node_runoff", "node 3", "1.5", "between 0 and 1"],
        ),
        (
            message(|_, input, _, _| input.node_ground[1] = f64::NAN),
            &["node_ground", "node 1", "NaN"],
        ),
        (
            message(|_, input, _, _| input.node_ground.pop().map(drop).unwrap_or(())),
            &["node_ground", "4 values", "5 nodes"],
        ),
        (
            message(|site, _, _, _| site.units = "chains".into()),
            &["\"chains\"", "m or ft"],
        ),
        (
            message(|_, _, storm, _| {
                *storm = DesignStorm::Constant {
                    intensity: -3.0,
                    unit: UnitSystem::Si,
                }
            }),
            &["intensity -3", "local rainfall records"],
        ),
        (
            message(|_, _, storm, _| {
                *storm = DesignStorm::IntensityDuration {
                    a: 1200.0,
                    b: f64::INFINITY,
                    c: 1.0,
                    unit: UnitSystem::Si,
                }
            }),
            &["coefficient b", "inf"],
        ),
        (
            message(|_, _, storm, _| {
                // t + b = 5 - 8 < 0 at the inlet time.
                *storm = DesignStorm::IntensityDuration {
                    a: 1200.0,
                    b: -8.0,
                    c: 1.0,
                    unit: UnitSystem::Si,
                }
            }),
            &["duration of 5 min", "a, b and c"],
        ),
        (
            message(|_, _, _, rules| rules.manning_n = 0.0),
            &["manning_n", "= 0"],
        ),
        (
            message(|_, _, _, rules| rules.inlet_time_minutes = -1.0),
            &["inlet_time_minutes", "-1"],
        ),
        (
            message(|_, _, _, rules| rules.min_grade = 0.0),
            &["min_grade"],
        ),
        (
            message(|_, _, _, rules| rules.max_velocity = 0.5),
            &["max_velocity", "0.5"],
        ),
        (
            message(|_, _, _, rules| rules.conveyance = Conveyance::Pipes { diameters: vec![] }),
            &["pipe list", "no diameters"],
        ),
        (
            message(|_, _, _, rules| {
                rules.conveyance = Conveyance::Pipes {
                    diameters: vec![0.3, -0.1],
                }
            }),
            &["pipe diameter 1", "-0.1"],
        ),
        (
            message(|_, _, _, rules| {
                rules.conveyance = Conveyance::Swale(SwaleShape {
                    bottom_width: 0.0,
                    side_slope: 0.0,
                    max_depth: 0.3,
                })
            }),
            &["swale side_slope"],
        ),
        (
            message(|site, _, _, _| site.nodes[2] = site.nodes[1]),
            &["segment 1", "zero length"],
        ),
    ];
    for (text, parts) in cases {
        for part in parts {
            assert!(text.contains(part), "{part:?} missing from {text:?}");
        }
    }
}
