//! Checks of the SVG site-plan reader: areas by the shoelace formula and outlet places worked
//! out by hand from the drawing and its scale, transforms, curves, and one check per bad input.

use super::*;
use crate::site::geometry::signed_area;
use crate::site::read_site;

/// Area of a ring by the shoelace formula, unsigned.
fn area(ring: &[[f64; 2]]) -> f64 {
    signed_area(ring).abs()
}

fn close(a: f64, b: f64) -> bool {
    (a - b).abs() <= 1e-9 * (1.0 + a.abs().max(b.abs()))
}

/// A plan 200 mm x 100 mm on the sheet, one user unit a millimetre (width 200mm over a view
/// box 200 wide).
const PLAN: &str = r#"<svg xmlns="http://www.w3.org/2000/svg" width="200mm" height="100mm" viewBox="0 0 200 100" data-runoff-coefficient="0.3">
  <g id="outline"><polygon points="0,0 200,0 200,100 0,100"/></g>
  <g id="obstacles"><rect data-name="shed" x="20" y="20" width="40" height="30"/></g>
  <g id="zones">
    <path data-surface="roof" d="M 100 20 L 160 20 L 160 60 Z"><title>porch roof</title></path>
    <rect data-runoff-coefficient="0.5" x="10" y="60" width="50" height="20"/>
  </g>
  <g id="outlets" transform="translate(10, 5)"><circle cx="90" cy="90" r="2" data-name="street drain"/></g>
  <text x="5" y="5">North is up</text>
</svg>"#;

#[test]
fn a_site_plan_at_1_to_200_reads_with_hand_computed_areas_and_places() {
    let site = read_site_svg(PLAN.as_bytes(), &parse_svg_scale("1:200").unwrap()).unwrap();
    // 1:200 with 1 mm per user unit: one unit is 200 mm on the ground, 0.2 m.
    assert_eq!(site.units, "m");
    assert_eq!(site.runoff_coefficient, Some(0.3));
    // Outline 200 x 100 units = 40 m x 20 m. Shoelace over (0,0), (40,0), (40,-20), (0,-20):
    // (0*0 - 40*0) + (40*-20 - 40*0) + (40*-20 - 0*-20) + (0*0 - 0*-20) = -1600, half: 800 m².
    assert!(close(area(&site.outline), 800.0), "{}", area(&site.outline));
    // Shed: 40 x 30 units = 8 m x 6 m = 48 m².
    assert_eq!(site.obstacles.len(), 1);
    assert_eq!(site.obstacles[0].name.as_deref(), Some("shed"));
    assert!(close(area(&site.obstacles[0].ring), 48.0));
    // Porch roof: a right triangle with legs 60 and 40 units, 12 m and 8 m: 12 * 8 / 2 = 48 m².
    let roof = &site.zones[0];
    assert_eq!(roof.name.as_deref(), Some("porch roof"));
    assert_eq!(roof.surface.as_deref(), Some("roof"));
    // Roofs: 0.75-0.95, the upper end used (HEC-22, 3rd ed. 2009, Table 3-1).
    assert_eq!(roof.runoff_coefficient, 0.95);
    assert!(close(area(&roof.ring), 48.0));
    // The bed: 50 x 20 units = 10 m x 4 m = 40 m².
    assert_eq!(site.zones[1].runoff_coefficient, 0.5);
    assert!(close(area(&site.zones[1].ring), 40.0));
    // Outlet: centre (90, 90) moved by (10, 5) is (100, 95) units: x 20 m, and 95 units down
    // the sheet is 19 m south of the top edge: y = -19 m (north up the sheet).
    assert_eq!(site.outlets.len(), 1);
    assert_eq!(site.outlets[0].name.as_deref(), Some("street drain"));
    assert!(close(site.outlets[0].point[0], 20.0) && close(site.outlets[0].point[1], -19.0));
    // North up: the shed's top edge (y = 20 units) lies north of its bottom (y = 50 units).
    let ys: Vec<f64> = site.obstacles[0].ring.iter().map(|p| p[1]).collect();
    assert!(ys.iter().any(|&y| close(y, -4.0)) && ys.iter().any(|&y| close(y, -10.0)));
}

#[test]
fn a_site_plan_reads_the_same_as_its_geojson() {
    let site = read_site_svg(PLAN.as_bytes(), &parse_svg_scale("0.2 m per unit").unwrap()).unwrap();
    let again = read_site(site.to_geojson().as_bytes()).unwrap();
    assert_eq!(again.outline, site.outline);
    assert_eq!(again.obstacles.len(), 1);
    assert_eq!(again.zones[0].ring, site.zones[0].ring);
    assert_eq!(again.zones[0].runoff_coefficient, 0.95);
    assert_eq!(again.outlets[0].point, site.outlets[0].point);
    assert_eq!(again.runoff_coefficient, Some(0.3));
}

#[test]
fn site_plan_transforms_of_groups_are_applied() {
    let svg = r#"<svg xmlns="http://www.w3.org/2000/svg">
  <polygon data-role="outline" points="0,0 200,0 200,100 0,100"/>
  <g transform="translate(50,10)"><g transform="scale(2)">
    <rect data-role="obstacle" x="5" y="5" width="10" height="10"/>
  </g></g>
  <g transform="matrix(0 1 -1 0 150 0)"><circle data-role="outlet" cx="50" cy="20" r="1"/></g>
</svg>"#;
    let site = read_site_svg(svg.as_bytes(), &parse_svg_scale("0.2 m/unit").unwrap()).unwrap();
    // The rect's corner (5, 5) scaled by 2 is (10, 10), moved by (50, 10) is (60, 20) units;
    // its side 10 scaled by 2 is 20 units, 4 m: 16 m², a corner at (12 m, -4 m).
    let ring = &site.obstacles[0].ring;
    assert!(close(area(ring), 16.0));
    assert!(ring.iter().any(|p| close(p[0], 12.0) && close(p[1], -4.0)));
    // matrix(a b c d e f) maps (x, y) to (a x + c y + e, b x + d y + f) (SVG 1.1, section
    // 7.4): (50, 20) goes to (0*50 - 1*20 + 150, 1*50 + 0*20 + 0) = (130, 50) units, which is
    // (26 m, -10 m).
    assert!(close(site.outlets[0].point[0], 26.0) && close(site.outlets[0].point[1], -10.0));
}

#[test]
fn site_plan_curves_are_flattened_within_a_centimetre() {
    let svg = r#"<svg xmlns="http://www.w3.org/2000/svg">
  <rect data-role="outline" x="0" y="0" width="100" height="100"/>
  <path data-role="zone" data-runoff-coefficient="0.2" d="M 10 50 A 20 20 0 0 1 50 50 Z"/>
  <circle data-role="obstacle" cx="70" cy="70" r="10"/>
  <circle data-role="outlet" cx="5" cy="95" r="1"/>
</svg>"#;
    let site = read_site_svg(svg.as_bytes(), &parse_svg_scale("0.1 m per unit").unwrap()).unwrap();
    // Half a disc of radius 20 units = 2 m: pi r^2 / 2. Chords within 0.01 m of the arc lose
    // at most (arc length) * 0.01 m² of it.
    let half_disc = core::f64::consts::PI * 2.0 * 2.0 / 2.0;
    let zone = area(&site.zones[0].ring);
    assert!(zone <= half_disc && half_disc - zone <= core::f64::consts::PI * 2.0 * 0.01);
    // A circle of radius 1 m: pi m², within 2 pi 0.01 m².
    let disc = area(&site.obstacles[0].ring);
    assert!(
        disc <= core::f64::consts::PI
            && core::f64::consts::PI - disc <= 2.0 * core::f64::consts::PI * 0.01
    );
}

fn message(svg: &str, scale: &str) -> String {
    match parse_svg_scale(scale).and_then(|scale| read_site_svg(svg.as_bytes(), &scale)) {
        Ok(_) => panic!("read, but should be refused"),
        Err(error) => error.to_string(),
    }
}

#[test]
fn a_site_plan_without_a_usable_scale_is_refused() {
    // 1:200 needs the sheet's size; this drawing states it only in pixels.
    let svg = r#"<svg xmlns="http://www.w3.org/2000/svg" width="800" height="400">
  <rect data-role="outline" width="100" height="100"/>
  <circle data-role="outlet" cx="5" cy="5" r="1"/>
</svg>"#;
    let text = message(svg, "1:200");
    assert!(text.contains("no width or height in mm"), "{text}");
    for bad in [
        "",
        "200",
        "2:200",
        "1:0",
        "1:-5",
        "0 m per unit",
        "5 yards per unit",
        "abc",
    ] {
        let Err(error) = parse_svg_scale(bad) else {
            panic!("{bad:?} read as a scale");
        };
        assert!(error.to_string().contains("scale"), "{error}");
    }
}

#[test]
fn an_open_site_plan_path_is_refused_naming_it_and_its_line() {
    let svg = r#"<svg xmlns="http://www.w3.org/2000/svg">
  <rect data-role="outline" width="100" height="100"/>
  <path id="fence" data-role="obstacle" d="M 10 10 L 20 10 L 20 20"/>
  <circle data-role="outlet" cx="5" cy="5" r="1"/>
</svg>"#;
    let text = message(svg, "0.1 m per unit");
    assert!(
        text.contains("<path id=\"fence\"> (line 3)") && text.contains("open"),
        "{text}"
    );
    let polyline = svg.replace(
        r#"<path id="fence" data-role="obstacle" d="M 10 10 L 20 10 L 20 20"/>"#,
        r#"<polyline id="fence" data-role="obstacle" points="10,10 20,10 20,20"/>"#,
    );
    let text = message(&polyline, "0.1 m per unit");
    assert!(
        text.contains("<polyline id=\"fence\"> (line 3)") && text.contains("open polyline"),
        "{text}"
    );
}

#[test]
fn an_unknown_site_plan_role_is_refused_naming_it_and_its_line() {
    let svg = r#"<svg xmlns="http://www.w3.org/2000/svg">
  <rect data-role="outline" width="100" height="100"/>

  <rect id="pond" data-role="pond" x="10" y="10" width="5" height="5"/>
  <circle data-role="outlet" cx="5" cy="5" r="1"/>
</svg>"#;
    let text = message(svg, "0.1 m per unit");
    assert!(
        text.contains("line 4") && text.contains("unknown data-role \"pond\""),
        "{text}"
    );
    // A shape with no role at all is refused too, not guessed.
    let svg = svg.replace(r#" data-role="pond""#, "");
    let text = message(&svg, "0.1 m per unit");
    assert!(
        text.contains("line 4") && text.contains("no site role"),
        "{text}"
    );
}

#[test]
fn other_bad_site_plans_are_refused_with_their_element() {
    let base = |middle: &str| {
        format!(
            "<svg xmlns=\"http://www.w3.org/2000/svg\">\n<rect data-role=\"outline\" width=\"100\" height=\"100\"/>\n{middle}\n</svg>"
        )
    };
    let cases = [
        // An outlet drawn as a square.
        (
            r#"<rect data-role="outlet" width="2" height="2"/>"#,
            "drawn as a circle",
        ),
        // A zone without a coefficient or a surface.
        (
            r#"<rect data-role="zone" width="2" height="2"/><circle data-role="outlet" cx="5" cy="5" r="1"/>"#,
            "missing",
        ),
        // A surface the runoff table does not list.
        (
            r#"<rect data-role="zone" data-surface="lava" width="2" height="2"/><circle data-role="outlet" cx="5" cy="5" r="1"/>"#,
            "lava",
        ),
        // A coefficient out of range.
        (
            r#"<rect data-role="zone" data-runoff-coefficient="1.5" width="2" height="2"/><circle data-role="outlet" cx="5" cy="5" r="1"/>"#,
            "outside [0, 1]",
        ),
        // Two rings in one element (a hole).
        (
            r#"<path data-role="obstacle" d="M 10 10 L 30 10 L 30 30 Z M 15 15 L 20 15 L 20 20 Z"/><circle data-role="outlet" cx="5" cy="5" r="1"/>"#,
            "more than one ring",
        ),
        // A bow tie.
        (
            r#"<polygon data-role="obstacle" points="10,10 30,30 30,10 10,30"/><circle data-role="outlet" cx="5" cy="5" r="1"/>"#,
            "crosses or touches itself",
        ),
        // No outlet.
        ("", "no outlet"),
        // An outlet off the site.
        (
            r#"<circle data-role="outlet" cx="500" cy="5" r="1"/>"#,
            "outside the site outline",
        ),
        // A second outline.
        (
            r#"<rect data-role="outline" width="10" height="10"/><circle data-role="outlet" cx="5" cy="5" r="1"/>"#,
            "two outlines",
        ),
        // A level without an elevation.
        (
            r#"<circle data-role="level" cx="5" cy="5" r="1"/><circle data-role="outlet" cx="5" cy="5" r="1"/>"#,
            "data-elevation",
        ),
    ];
    for (middle, expected) in cases {
        let text = message(&base(middle), "0.1 m per unit");
        assert!(text.contains(expected), "{middle}: {text}");
    }
    assert!(message("<svg><rect", "1:100").contains("not readable XML"));
    assert!(message("<html/>", "1:100").contains("not `svg`"));
    assert!(
        message("<!DOCTYPE svg [<!ENTITY a \"b\">]><svg/>", "0.1 m per unit")
            .contains("not readable XML")
    );
}
