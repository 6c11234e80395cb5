//! Parts of a site no outlet reaches are drawn and listed, never dropped: a site whose L-shaped
//! wall cuts off its north-east corner grows everywhere else, and the corner comes back as one
//! unreached part whose area equals the corner's by the shoelace formula (computed here from
//! the corner's corners, listed by hand), whose traced outline has exactly those corners, and
//! which the channels GeoJSON, the plan SVG and the summary all carry.

use ramulus_core::drainage::site_geojson;
use ramulus_core::growth::Growth;
use ramulus_core::params::Params;
use ramulus_core::run::{RunView, SITE_CAUTION};
use ramulus_core::site::{read_site, unreached_parts, Site, Terrain};
use ramulus_core::site_sizing::{read_sizing_form, size_run};
use ramulus_draw::site_plan::plan_svg;
use ramulus_draw::site_texts::{site_plan_input, unreached_summary};

/// A 20 m x 12 m site (x east, y north) with its outlet at the south-west corner and a 1 m
/// wall, drawn as one ring, bending round the north-east corner: down from the north edge at
/// x 13-14 to y 6-7, east to x 16-17, down to y 3-4 and east to the east edge.
const SITE: &str = r#"{"type": "FeatureCollection", "properties": {"units": "m", "runoff_coefficient": 0.5}, "features": [
  {"type": "Feature", "properties": {"role": "outline"}, "geometry": {"type": "Polygon",
   "coordinates": [[[0, 0], [20, 0], [20, 12], [0, 12], [0, 0]]]}},
  {"type": "Feature", "properties": {"role": "obstacle", "name": "wall"}, "geometry": {"type": "Polygon",
   "coordinates": [[[13, 12], [14, 12], [14, 7], [17, 7], [17, 4], [20, 4], [20, 3], [16, 3],
                    [16, 6], [13, 6], [13, 12]]]}},
  {"type": "Feature", "properties": {"role": "outlet", "name": "drain"}, "geometry": {"type": "Point",
   "coordinates": [1, 1]}}]}"#;

/// The cut-off corner, between the wall and the outline (site coordinates, counter-clockwise).
const CORNER: [[f64; 2]; 6] = [
    [14.0, 12.0],
    [14.0, 7.0],
    [17.0, 7.0],
    [17.0, 4.0],
    [20.0, 4.0],
    [20.0, 12.0],
];

/// Area of a simple polygon by the shoelace formula (Gauss's area formula; e.g. Braden 1986,
/// "The surveyor's area formula", College Math. J. 17(4)): half the absolute sum of
/// `x_i y_(i+1) - x_(i+1) y_i`.
fn shoelace(ring: &[[f64; 2]]) -> f64 {
    let n = ring.len();
    let twice: f64 = (0..n)
        .map(|i| {
            let (a, b) = (ring[i], ring[(i + 1) % n]);
            a[0] * b[1] - b[0] * a[1]
        })
        .sum();
    twice.abs() / 2.0
}

fn site_and_params(keep_clear: bool) -> (Site, Params) {
    let site = read_site(SITE.as_bytes()).expect("the site reads");
    let mut params = site
        .to_params(
            1.0,
            &Terrain::Grade {
                east: 0.01,
                north: 0.01,
            },
        )
        .expect("a site with a part cut off still converts");
    params.run.keep_clear = keep_clear;
    (site, params)
}

fn grow(params: &Params) -> RunView {
    let mut growth = Growth::new(params).expect("valid parameters");
    growth.run();
    RunView::new(growth.network(), params).expect("a view")
}

#[test]
fn a_corner_cut_off_by_a_wall_is_one_part_with_the_corners_area() {
    // By hand: 6 x 5 m above y 7 plus 3 x 3 m between y 4 and 7 = 39 m².
    assert_eq!(shoelace(&CORNER), 39.0);
    let (site, params) = site_and_params(true);
    let view = grow(&params);
    let parts = unreached_parts(&params, &view.network);
    assert_eq!(parts.len(), 1, "{parts:?}");
    let part = &parts[0];
    // Cells of 1 m² whose centres lie in the corner: one per square metre of it.
    assert_eq!(part.cells, 39);
    assert_eq!(part.area, shoelace(&CORNER));
    assert_eq!(part.polygons.len(), 1);
    assert!(part.polygons[0].holes.is_empty());
    // The traced outline, in site coordinates, has the corner's six corners and its area.
    let outline: Vec<[f64; 2]> = part.polygons[0]
        .outer
        .iter()
        .map(|&point| site.network_to_site(point))
        .collect();
    assert_eq!(shoelace(&outline), 39.0);
    let mut traced = outline.clone();
    let mut expected = CORNER.to_vec();
    traced.sort_by(|a, b| a.partial_cmp(b).expect("finite"));
    expected.sort_by(|a, b| a.partial_cmp(b).expect("finite"));
    assert_eq!(traced, expected);
    // Its label sits inside it.
    let label = site.network_to_site(part.label_at);
    assert!(
        (14.0..20.0).contains(&label[0]) && (7.0..12.0).contains(&label[1])
            || (17.0..20.0).contains(&label[0]) && (4.0..7.0).contains(&label[1]),
        "label at {label:?}"
    );

    // Every other allowed cell is reached: 240 cells less 39 cut off less the wall's cells,
    // counted by their centres: column x 13-14 for y 6-12 (6), row y 6-7 for x 14-17 (3 more),
    // column x 16-17 for y 4-6 (2) and row y 3-4 for x 16-20 (4).
    let wall_cells = 6 + 3 + 2 + 4;
    assert_eq!(view.network.cells.occupied.len(), 240 - 39 - wall_cells);

    // The outputs carry it.
    let design = read_sizing_form(r#"{"rain":{"kind":"constant","intensity":"60"}}"#)
        .expect("a design form");
    let sized = size_run(&view, &params, &design).expect("sized");
    assert_eq!(sized.unreached, parts);
    let geojson: serde_json::Value = serde_json::from_str(&site_geojson(
        &sized.network,
        &sized.hydraulics,
        &sized.unreached,
    ))
    .expect("GeoJSON");
    let features = geojson["features"].as_array().expect("features");
    let unreached: Vec<_> = features
        .iter()
        .filter(|feature| feature["properties"]["role"] == "unreached")
        .collect();
    assert_eq!(unreached.len(), 1);
    assert!(features
        .iter()
        .filter(|feature| feature["properties"]["role"] != "unreached")
        .all(|feature| feature["properties"]["role"] == "channel"));
    // 39 m² = 0.0039 ha.
    assert!((unreached[0]["properties"]["area"].as_f64().expect("area") - 0.0039).abs() < 1e-12);
    assert_eq!(unreached[0]["geometry"]["type"], "Polygon");
    let ring: Vec<[f64; 2]> = unreached[0]["geometry"]["coordinates"][0]
        .as_array()
        .expect("a ring")
        .iter()
        .map(|point| {
            [
                point[0].as_f64().unwrap_or(f64::NAN),
                point[1].as_f64().unwrap_or(f64::NAN),
            ]
        })
        .collect();
    // Closed (RFC 7946, section 3.1.6), and counter-clockwise: a positive signed area.
    assert_eq!(ring.first(), ring.last());
    let signed: f64 = ring
        .windows(2)
        .map(|w| w[0][0] * w[1][1] - w[1][0] * w[0][1])
        .sum();
    assert_eq!(signed / 2.0, 39.0);
    let svg = plan_svg(&site_plan_input(
        &sized,
        &params,
        &design,
        Some(&site),
        SITE_CAUTION,
        String::new(),
    ));
    assert!(svg.contains("class=\"unreached\""), "the plan hatches it");
    assert!(
        svg.contains("no outlet reaches: 39 m²"),
        "the plan labels its area"
    );
    let summary = unreached_summary(&parts, "m", design.system, Some(&site)).expect("a summary");
    assert!(summary.contains("39 m²"), "{summary}");
    // Its place: the centre of its bounding box, x 14-20, y 4-12.
    assert!(summary.contains("(17, 8) m"), "{summary}");
}

#[test]
fn without_keep_clear_channels_jump_the_wall_and_nothing_is_left() {
    let (_, params) = site_and_params(false);
    let view = grow(&params);
    assert!(unreached_parts(&params, &view.network).is_empty());
}
