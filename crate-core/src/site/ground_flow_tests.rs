//! Checks of D8 natural flow against directions worked out by hand on small grids, following
//! O'Callaghan & Mark 1984 (Computer Vision, Graphics and Image Processing 28: 323-344): each
//! cell drains to the neighbour of greatest drop / distance, distance 1 across and down and
//! sqrt(2) on diagonals. Ties go to the first of north, north-east, east, south-east, south,
//! south-west, west, north-west (north = a row less).

use super::*;

const N: (i64, i64) = (0, -1);
const NE: (i64, i64) = (1, -1);
const E: (i64, i64) = (1, 0);
const SE: (i64, i64) = (1, 1);
const S: (i64, i64) = (0, 1);
const W: (i64, i64) = (-1, 0);

/// A wall around the grid: no water leaves it.
fn wall(_: i64, _: i64) -> f64 {
    f64::INFINITY
}

/// The route of cell `(column, row)` taking the step `(dx, dy)`.
fn to(width: usize, column: usize, row: usize, (dx, dy): (i64, i64)) -> Route {
    let x = column as i64 + dx;
    let y = row as i64 + dy;
    Route::To((y as usize * width + x as usize) as u32)
}

fn grid(width: usize, height: usize, z: impl Fn(f64, f64) -> f64) -> Vec<f64> {
    (0..width * height)
        .map(|cell| z((cell % width) as f64, (cell / width) as f64))
        .collect()
}

#[test]
fn d8_on_a_tilted_site_plane_weighs_diagonals_by_sqrt_2() {
    // z = 3 x + y (x east, y down the lattice). Drops: west 3 / 1 = 3; north 1 / 1 = 1;
    // north-west (3 + 1) / sqrt(2) = 2.83; south-west (3 - 1) / sqrt(2) = 1.41. West wins (a
    // diagonal counted at distance 1 would win with 4: the sqrt(2) matters here). Column 0
    // drains west off the grid, where the plane goes on.
    let (width, height) = (4, 3);
    let z = grid(width, height, |x, y| 3.0 * x + y);
    let kinds = vec![CellKind::Ground; width * height];
    let routes = d8_directions(&z, &kinds, width, &|x, y| 3.0 * x as f64 + y as f64);
    for row in 0..height {
        assert_eq!(routes[row * width], Route::OffSite);
        for column in 1..width {
            assert_eq!(routes[row * width + column], to(width, column, row, W));
        }
    }
}

#[test]
fn d8_in_a_site_bowl_drains_every_cell_to_the_bottom() {
    // A cone z = distance from cell (2, 2) on 5 x 5 cells. By hand: (0, 0) at 2.83: south-east
    // (1, 1) at 1.41 drops 1.41 / 1.41 = 1.0, east and south (2.24) drop 0.59: south-east.
    // (1, 0) at 2.24: south-east (2, 1) at 1 drops 1.24 / 1.41 = 0.87, south (1, 1) drops 0.82,
    // east (2, 0) at 2 drops 0.24: south-east. (2, 0) at 2: south (2, 1) drops 1, south-east
    // and south-west (1.41) drop 0.41: south. The bottom has no lower neighbour: a low spot
    // whose catchment is all 25 cells.
    let (width, height) = (5, 5);
    let z = grid(width, height, |x, y| {
        ((x - 2.0).powi(2) + (y - 2.0).powi(2)).sqrt()
    });
    let kinds = vec![CellKind::Ground; width * height];
    let routes = d8_directions(&z, &kinds, width, &wall);
    assert_eq!(routes[0], to(width, 0, 0, SE));
    assert_eq!(routes[1], to(width, 1, 0, SE));
    assert_eq!(routes[2], to(width, 2, 0, S));
    assert_eq!(routes[12], Route::Stays);
    let area = accumulate(&z, &kinds, &routes, 4.0);
    assert_eq!(area[12], 25.0 * 4.0);
}

#[test]
fn d8_in_a_site_v_valley_runs_down_the_floor_to_the_outlet() {
    // z = |x - 2| + y / 2 on 5 x 4 cells, the outlet at (2, 0). (2, 3) at 1.5: north (2, 2) at
    // 1 drops 0.5; the sides are higher: north. (1, 1) at 1.5: north-east (2, 0) at 0 drops
    // 1.5 / 1.41 = 1.06, east (2, 1) at 0.5 drops 1, north (1, 0) at 1 drops 0.5: north-east.
    // (0, 1) at 2.5: north-east (1, 0) at 1 drops 1.06, east (1, 1) at 1.5 drops 1: north-east.
    // (0, 0) at 2: east (1, 0) drops 1, south-east (1, 1) drops 0.35: east. All 20 cells reach
    // the outlet.
    let (width, height) = (5, 4);
    let z = grid(width, height, |x, y| (x - 2.0).abs() + y / 2.0);
    let mut kinds = vec![CellKind::Ground; width * height];
    kinds[2] = CellKind::Outlet;
    let routes = d8_directions(&z, &kinds, width, &wall);
    assert_eq!(routes[3 * width + 2], to(width, 2, 3, N));
    assert_eq!(routes[width + 1], to(width, 1, 1, NE));
    assert_eq!(routes[width], to(width, 0, 1, NE));
    assert_eq!(routes[0], to(width, 0, 0, E));
    assert_eq!(routes[2], Route::Stays, "an outlet passes nothing on");
    let area = accumulate(&z, &kinds, &routes, 1.0);
    assert_eq!(area[2], 20.0);
}

#[test]
fn d8_on_a_written_out_3_by_3_site_grid() {
    // 5 4 3      (0,0)=5: south-east (1,1)=2 drops 3/1.41 = 2.12, east 4 drops 1: south-east.
    // 6 2 1      (1,0)=4: south-east (2,1)=1 drops 2.12, south 2 drops 2, east 3 drops 1: SE.
    // 7 8 9      (2,0)=3: south 1 drops 2, south-west 2 drops 0.71: south.
    //            (0,1)=6: east 2 drops 4, north-east 4 drops 1.41, north 5 drops 1: east.
    //            (1,1)=2: east 1 drops 1, nothing else lower: east.
    //            (2,1)=1: no lower neighbour: a low spot.
    //            (0,2)=7: north-east 2 drops 3.54, north 6 drops 1: north-east.
    //            (1,2)=8: north 2 drops 6, north-east 1 drops 4.95: north.
    //            (2,2)=9: north 1 drops 8, north-west 2 drops 4.95: north.
    let z = vec![5.0, 4.0, 3.0, 6.0, 2.0, 1.0, 7.0, 8.0, 9.0];
    let kinds = vec![CellKind::Ground; 9];
    let routes = d8_directions(&z, &kinds, 3, &wall);
    let expected = [
        to(3, 0, 0, SE),
        to(3, 1, 0, SE),
        to(3, 2, 0, S),
        to(3, 0, 1, E),
        to(3, 1, 1, E),
        Route::Stays,
        to(3, 0, 2, NE),
        to(3, 1, 2, N),
        to(3, 2, 2, N),
    ];
    assert_eq!(routes, expected);
    let area = accumulate(&z, &kinds, &routes, 1.0);
    assert_eq!(area[5], 9.0);
    // (1,1) collects itself, (0,0), (0,1), (0,2) and (1,2): 5 cells.
    assert_eq!(area[4], 5.0);
}

#[test]
fn d8_on_a_5_by_5_site_grid_with_an_obstacle_breaks_ties_north_first() {
    // z = x + y:        0 1 2 3 4
    //                   1 # 3 4 5     # = (1,1), an obstacle: no water enters it.
    //                   2 3 4 5 6
    //                   3 4 5 6 7
    //                   4 5 6 7 8
    // Inside cells drain north-west (drop 2 / 1.41 = 1.41 against 1 west or north). (2,2)'s
    // north-west is the obstacle: north (2,1) and west (1,2) both drop 1, a tie, and north
    // comes first. Row 0 drains west, column 0 north; (0,0) is the one low spot and collects
    // the 24 open cells.
    let (width, height) = (5, 5);
    let z = grid(width, height, |x, y| x + y);
    let mut kinds = vec![CellKind::Ground; width * height];
    kinds[width + 1] = CellKind::Blocked;
    let routes = d8_directions(&z, &kinds, width, &wall);
    assert_eq!(routes[2 * width + 2], to(width, 2, 2, N));
    assert_eq!(routes[3 * width + 3], to(width, 3, 3, (-1, -1)));
    assert_eq!(routes[3], to(width, 3, 0, W));
    assert_eq!(routes[3 * width], to(width, 0, 3, N));
    assert_eq!(routes[0], Route::Stays);
    assert_eq!(routes[width + 1], Route::Stays);
    let area = accumulate(&z, &kinds, &routes, 1.0);
    assert_eq!(area[0], 24.0);
    assert_eq!(area[width + 1], 0.0);
    // A flat: every cell level with its neighbours has none lower, so each is a low spot.
    let flat = d8_directions(&[1.0; 4], &[CellKind::Ground; 4], 2, &wall);
    assert_eq!(flat, vec![Route::Stays; 4]);
}

/// A 20 m x 10 m site with a 4 m x 2 m shed, one outlet, on 1 m cells.
fn small_site() -> Site {
    Site {
        units: "m".to_string(),
        outline: vec![[0.0, 0.0], [20.0, 0.0], [20.0, 10.0], [0.0, 10.0]],
        outline_feature: 0,
        obstacles: vec![SitePolygon {
            feature: 1,
            name: None,
            ring: vec![[8.0, 4.0], [12.0, 4.0], [12.0, 6.0], [8.0, 6.0]],
        }],
        zones: Vec::new(),
        outlets: vec![Outlet {
            feature: 2,
            name: None,
            point: [0.5, 0.5],
        }],
        levels: Vec::new(),
        runoff_coefficient: Some(0.3),
    }
}

#[test]
fn site_ground_flow_areas_add_up_to_the_site_less_its_obstacles() {
    let site = small_site();
    for (east, north, levels) in [
        (0.02, 0.01, Vec::new()),
        (-0.01, 0.03, Vec::new()),
        (
            0.0,
            0.0,
            vec![
                SpotLevel {
                    place: "a".into(),
                    x: 1.0,
                    y: 1.0,
                    z: 9.0,
                },
                SpotLevel {
                    place: "b".into(),
                    x: 15.5,
                    y: 7.5,
                    z: 9.6,
                },
                SpotLevel {
                    place: "c".into(),
                    x: 5.5,
                    y: 8.5,
                    z: 10.2,
                },
                SpotLevel {
                    place: "d".into(),
                    x: 17.5,
                    y: 2.5,
                    z: 9.1,
                },
            ],
        ),
    ] {
        let mut site = site.clone();
        let terrain = if levels.is_empty() {
            Terrain::Grade { east, north }
        } else {
            site.set_levels(levels).unwrap();
            Terrain::SpotLevels
        };
        let params = site.to_params(1.0, &terrain).unwrap();
        let flow = ground_flow(&params);
        // 200 m² less the 8 m² shed, on cells that fit the rectangles exactly.
        assert_eq!(flow.allowed_area, 192.0);
        let ends: f64 = flow.outlet_areas.iter().sum::<f64>()
            + flow.off_site_area
            + flow.low_spots.iter().map(|spot| spot.area).sum::<f64>();
        assert!((ends - 192.0).abs() < 1e-9, "{ends}");
    }
    // Ground falling to the south-west corner, where the outlet stands: the plane has no low
    // spot, and water leaves over the west and south edges or reaches the outlet.
    let params = site
        .to_params(
            1.0,
            &Terrain::Grade {
                east: 0.02,
                north: 0.01,
            },
        )
        .unwrap();
    let flow = ground_flow(&params);
    assert!(flow.low_spots.is_empty());
    assert!(flow.outlet_areas[0] >= 1.0);
}

#[test]
fn site_ground_flow_finds_a_hollow_as_a_low_spot() {
    // Spot levels: the corners high, one low level in the middle of the east half.
    let mut site = small_site();
    site.set_levels(vec![
        SpotLevel {
            place: "1".into(),
            x: 0.5,
            y: 0.5,
            z: 10.0,
        },
        SpotLevel {
            place: "2".into(),
            x: 19.5,
            y: 0.5,
            z: 10.0,
        },
        SpotLevel {
            place: "3".into(),
            x: 19.5,
            y: 9.5,
            z: 10.0,
        },
        SpotLevel {
            place: "4".into(),
            x: 0.5,
            y: 9.5,
            z: 10.0,
        },
        SpotLevel {
            place: "hollow".into(),
            x: 15.5,
            y: 5.5,
            z: 9.0,
        },
    ])
    .unwrap();
    let params = site.to_params(1.0, &Terrain::SpotLevels).unwrap();
    let flow = ground_flow(&params);
    // Inverse distance weighting takes the level's own value at the level, and a weighted mean
    // of values of 10 and 9 elsewhere: above 9. So the hollow's cell is a low spot.
    let spot = &flow.low_spots[0];
    let centre = site.network_to_site(spot.centre);
    assert_eq!(centre, [15.5, 5.5]);
    assert_eq!(spot.elevation, 9.0);
    assert!(spot.area > 1.0);
}
