//! The posterior picture of a fit, read back with an XML parser (roxmltree): one panel per pair
//! of keys, a dot per particle in each lower panel placed by its values within the fitted
//! bounds (linear or logarithmic axis), dot opacity rising with weight, a histogram on the
//! diagonal whose bar heights follow the weights, and the 90 % interval drawn where it lies.

use ramulus_core::fit::{
    FitPlan, FitResult, FittedKey, Generation, Interval, Method, Particle, Target,
};
use ramulus_core::params::table::FitScale;
use ramulus_core::params::Params;
use ramulus_draw::posterior_svg::posterior_svg;

fn plan() -> FitPlan {
    FitPlan {
        base: Params::default(),
        fitted: vec![
            FittedKey {
                key: "alpha".into(),
                low: 0.2,
                high: 1.0,
                scale: FitScale::Linear,
            },
            FittedKey {
                key: "temperature".into(),
                low: 0.01,
                high: 100.0,
                scale: FitScale::Log,
            },
            FittedKey {
                key: "w_turn".into(),
                low: 0.0,
                high: 4.0,
                scale: FitScale::Linear,
            },
        ],
        targets: vec![Target {
            key: "tortuosity".into(),
            weight: None,
            observed: 1.1,
        }],
        replicates: 1,
        seed: 1,
        method: Method::Quick {
            simulations: 10,
            accepted: 5,
        },
    }
}

fn result() -> FitResult {
    let particle = |alpha: f64, temperature: f64, w_turn: f64, weight: f64| Particle {
        values: vec![alpha, temperature, w_turn],
        weight,
        distance: 0.1,
        seed: 1,
    };
    let particles = vec![
        particle(0.6, 1.0, 2.0, 0.5),
        particle(0.4, 0.1, 1.0, 0.3),
        particle(0.8, 10.0, 3.0, 0.2),
    ];
    FitResult {
        posterior: vec![
            Interval {
                key: "alpha".into(),
                median: 0.6,
                low: 0.4,
                high: 0.8,
            },
            Interval {
                key: "temperature".into(),
                median: 1.0,
                low: 0.1,
                high: 10.0,
            },
            Interval {
                key: "w_turn".into(),
                median: 2.0,
                low: 1.0,
                high: 3.0,
            },
        ],
        best: particles[0].clone(),
        particles,
        generations: vec![
            Generation {
                tolerance: 1.0,
                simulations: 40,
                accepted: 10,
            },
            Generation {
                tolerance: 0.5,
                simulations: 20,
                accepted: 10,
            },
        ],
        simulations: 60,
        accepted: 10,
        scales: vec![1.0],
        notes: vec![],
    }
}

fn number(node: roxmltree::Node, name: &str) -> f64 {
    node.attribute(name)
        .and_then(|v| v.parse().ok())
        .unwrap_or(f64::NAN)
}

#[test]
fn dots_bars_and_intervals_sit_where_the_values_put_them() {
    let svg = posterior_svg(&plan(), &result());
    let document = roxmltree::Document::parse(&svg).expect("well-formed SVG");
    let panels: Vec<roxmltree::Node> = document
        .descendants()
        .filter(|n| n.attribute("class") == Some("panel"))
        .collect();
    assert_eq!(
        panels.len(),
        6,
        "the lower triangle and the diagonal of 3 x 3"
    );
    // The panel of temperature (row) against alpha (column).
    let panel = panels
        .iter()
        .find(|n| {
            n.attribute("data-row") == Some("temperature")
                && n.attribute("data-column") == Some("alpha")
        })
        .expect("the temperature-alpha panel");
    let frame = panel
        .children()
        .find(|n| n.has_tag_name("rect"))
        .expect("a frame");
    let (x0, y0, side) = (
        number(frame, "x"),
        number(frame, "y"),
        number(frame, "width"),
    );
    let dots: Vec<roxmltree::Node> = panel
        .children()
        .filter(|n| n.attribute("class") == Some("particle"))
        .collect();
    assert_eq!(dots.len(), 3);
    // Particle 0: alpha 0.6 is half-way in [0.2, 1.0]; temperature 1 is half-way in
    // [0.01, 100] on a log axis (log10: -2 .. 2), so the dot sits at the panel's centre.
    assert!((number(dots[0], "cx") - (x0 + 0.5 * side)).abs() < 0.01);
    assert!((number(dots[0], "cy") - (y0 + 0.5 * side)).abs() < 0.01);
    // Particle 1: temperature 0.1 is a quarter up the log axis.
    assert!((number(dots[1], "cy") - (y0 + 0.75 * side)).abs() < 0.01);
    // Opacity rises with weight (0.5 > 0.3 > 0.2).
    let opacity: Vec<f64> = dots.iter().map(|d| number(*d, "fill-opacity")).collect();
    assert!(
        opacity[0] > opacity[1] && opacity[1] > opacity[2],
        "{opacity:?}"
    );
    // Upper panels hold no dots; the whole picture has 3 dots in each of 3 lower panels.
    let all_dots = document
        .descendants()
        .filter(|n| n.attribute("class") == Some("particle"))
        .count();
    assert_eq!(all_dots, 9);
    // The alpha histogram: the tallest bar holds the heaviest particle (0.6, weight 0.5).
    let diagonal = panels
        .iter()
        .find(|n| {
            n.attribute("data-row") == Some("alpha") && n.attribute("data-column") == Some("alpha")
        })
        .expect("the alpha histogram");
    let bars: Vec<roxmltree::Node> = diagonal
        .children()
        .filter(|n| n.attribute("class") == Some("bar"))
        .collect();
    let tallest = bars
        .iter()
        .max_by(|a, b| number(**a, "height").total_cmp(&number(**b, "height")))
        .expect("bars");
    let frame = diagonal
        .children()
        .find(|n| n.has_tag_name("rect"))
        .expect("a frame");
    // alpha 0.6 lies half-way across [0.2, 1.0]; that point is inside the tallest bar's span
    // (bars are a twentieth of the panel wide, drawn 1 px narrower).
    let start = number(*tallest, "x") - number(frame, "x");
    let end = start + number(*tallest, "width") + 1.0;
    let position = 0.5 * number(frame, "width");
    assert!(
        start - 0.01 <= position && position <= end + 0.01,
        "{position} in {start}..{end}"
    );
    let heights: Vec<f64> = bars
        .iter()
        .map(|b| number(*b, "height"))
        .filter(|h| *h > 0.0)
        .collect();
    assert_eq!(heights.len(), 3, "three particles in three different bars");
    // The 90 % interval of alpha [0.4, 0.8] spans a quarter to three quarters of the panel.
    let line = diagonal
        .children()
        .find(|n| n.attribute("class") == Some("interval"))
        .expect("an interval line");
    let x = number(frame, "x");
    assert!((number(line, "x1") - (x + 0.25 * side)).abs() < 0.01);
    assert!((number(line, "x2") - (x + 0.75 * side)).abs() < 0.01);
    // Convergence: one acceptance dot per generation (10 of 40, then 10 of 20: the second higher).
    let acceptance: Vec<roxmltree::Node> = document
        .descendants()
        .filter(|n| n.attribute("class") == Some("acceptance"))
        .collect();
    assert_eq!(acceptance.len(), 2);
    assert!(number(acceptance[1], "cy") < number(acceptance[0], "cy"));
}
