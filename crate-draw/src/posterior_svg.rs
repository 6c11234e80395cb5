//! The picture of a fit (`posterior_svg`): the pairwise posterior plots, one panel per pair of
//! fitted keys (every particle a dot whose opacity is its weight, so confounded keys show as
//! ridges), a weighted histogram of each key on the diagonal with its 90 % interval marked, and
//! a convergence panel (tolerance and acceptance per generation). Axes span each key's prior
//! bounds, so a posterior that fills its panel has learned nothing.

use std::fmt::Write as _;

use ramulus_core::fit::{FitPlan, FitResult};
use ramulus_core::params::table::FitScale;

use crate::format::{escape_attribute, escape_text, four_digits};

/// Side of one panel, in px.
const PANEL: f64 = 150.0;
/// Gap around panels, in px (room for labels).
const GAP: f64 = 40.0;
/// Bars of each diagonal histogram.
const BARS: usize = 20;

/// Position of `value` of key `index` within its prior bounds, 0 to 1 (log keys on a log axis).
fn fraction(plan: &FitPlan, index: usize, value: f64) -> f64 {
    let key = &plan.fitted[index];
    let (low, high, value) = match key.scale {
        FitScale::Linear => (key.low, key.high, value),
        FitScale::Log => (libm::log(key.low), libm::log(key.high), libm::log(value)),
    };
    ((value - low) / (high - low)).clamp(0.0, 1.0)
}

/// The SVG document of a fit's posterior.
pub fn posterior_svg(plan: &FitPlan, result: &FitResult) -> String {
    let keys = plan.fitted.len();
    let grid = keys as f64 * (PANEL + GAP) + GAP;
    let width = grid + 2.0 * PANEL + 2.0 * GAP;
    let height = grid.max(PANEL + 2.0 * GAP) + 20.0;
    let mut svg = String::new();
    let _ = writeln!(
        svg,
        "<svg xmlns=\"http://www.w3.org/2000/svg\" version=\"1.1\" width=\"{width}\" \
         height=\"{height}\" viewBox=\"0 0 {width} {height}\" font-family=\"sans-serif\" \
         font-size=\"11\">"
    );
    let _ = writeln!(
        svg,
        "<rect width=\"{width}\" height=\"{height}\" fill=\"#ffffff\"/>"
    );
    let largest = result
        .particles
        .iter()
        .map(|p| p.weight)
        .fold(0.0_f64, f64::max)
        .max(f64::MIN_POSITIVE);
    for row in 0..keys {
        // The lower triangle and the diagonal: the upper panels would repeat the lower ones.
        for column in 0..=row {
            let x0 = GAP + column as f64 * (PANEL + GAP);
            let y0 = GAP + row as f64 * (PANEL + GAP);
            let _ = writeln!(
                svg,
                "<g class=\"panel\" data-row=\"{}\" data-column=\"{}\">\
                 <rect x=\"{x0}\" y=\"{y0}\" width=\"{PANEL}\" height=\"{PANEL}\" fill=\"none\" \
                 stroke=\"#999999\"/>",
                escape_attribute(&plan.fitted[row].key),
                escape_attribute(&plan.fitted[column].key)
            );
            if row == column {
                histogram(&mut svg, plan, result, row, x0, y0);
            } else if row > column {
                for particle in &result.particles {
                    let x = x0 + PANEL * fraction(plan, column, particle.values[column]);
                    let y = y0 + PANEL * (1.0 - fraction(plan, row, particle.values[row]));
                    let opacity = 0.15 + 0.85 * particle.weight / largest;
                    let _ = writeln!(
                        svg,
                        "<circle class=\"particle\" cx=\"{x:.2}\" cy=\"{y:.2}\" r=\"2\" \
                         fill=\"#0072b2\" fill-opacity=\"{opacity:.3}\"/>"
                    );
                }
            }
            svg.push_str("</g>\n");
            if row == keys - 1 {
                axis_label(
                    &mut svg,
                    plan,
                    column,
                    x0 + PANEL / 2.0,
                    y0 + PANEL + 28.0,
                    false,
                );
            }
            if column == 0 && row > 0 {
                axis_label(&mut svg, plan, row, x0 - 28.0, y0 + PANEL / 2.0, true);
            }
        }
    }
    convergence(&mut svg, result, grid, GAP);
    let _ = writeln!(
        svg,
        "<text x=\"{GAP}\" y=\"{:.1}\">Axes span the fitted bounds; dots are posterior \
         particles (darker = more weight); bars: posterior of each key, line: its 90 % interval.\
         </text>",
        height - 6.0
    );
    svg.push_str("</svg>\n");
    svg
}

/// A weighted histogram of key `index` with its 90 % interval as a line under it.
fn histogram(svg: &mut String, plan: &FitPlan, result: &FitResult, index: usize, x0: f64, y0: f64) {
    let mut bars = [0.0; BARS];
    for particle in &result.particles {
        let bar =
            ((fraction(plan, index, particle.values[index]) * BARS as f64) as usize).min(BARS - 1);
        bars[bar] += particle.weight;
    }
    let tallest = bars
        .iter()
        .copied()
        .fold(0.0_f64, f64::max)
        .max(f64::MIN_POSITIVE);
    let bar_width = PANEL / BARS as f64;
    for (bar, &mass) in bars.iter().enumerate() {
        let height = (PANEL - 12.0) * mass / tallest;
        let _ = writeln!(
            svg,
            "<rect class=\"bar\" x=\"{:.2}\" y=\"{:.2}\" width=\"{:.2}\" height=\"{height:.2}\" \
             fill=\"#56b4e9\"/>",
            x0 + bar as f64 * bar_width,
            y0 + PANEL - height,
            bar_width - 1.0
        );
    }
    if let Some(interval) = result.posterior.get(index) {
        let low = x0 + PANEL * fraction(plan, index, interval.low);
        let high = x0 + PANEL * fraction(plan, index, interval.high);
        let _ = writeln!(
            svg,
            "<line class=\"interval\" x1=\"{low:.2}\" y1=\"{:.2}\" x2=\"{high:.2}\" y2=\"{:.2}\" \
             stroke=\"#d55e00\" stroke-width=\"3\"/>",
            y0 + 6.0,
            y0 + 6.0
        );
    }
}

fn axis_label(svg: &mut String, plan: &FitPlan, index: usize, x: f64, y: f64, vertical: bool) {
    let key = &plan.fitted[index];
    let text = format!(
        "{} ({} to {}{})",
        key.key,
        four_digits(key.low),
        four_digits(key.high),
        if key.scale == FitScale::Log {
            ", log"
        } else {
            ""
        }
    );
    let transform = if vertical {
        format!(" transform=\"rotate(-90 {x:.1} {y:.1})\"")
    } else {
        String::new()
    };
    let _ = writeln!(
        svg,
        "<text class=\"axis\" x=\"{x:.1}\" y=\"{y:.1}\" text-anchor=\"middle\"{transform}>{}</text>",
        escape_text(&text)
    );
}

/// Tolerance (log axis) and acceptance rate per generation, right of the grid.
fn convergence(svg: &mut String, result: &FitResult, left: f64, top: f64) {
    let count = result.generations.len();
    let _ = writeln!(
        svg,
        "<g class=\"convergence\"><rect x=\"{left}\" y=\"{top}\" width=\"{w}\" height=\"{PANEL}\" \
         fill=\"none\" stroke=\"#999999\"/><text x=\"{left}\" y=\"{:.1}\">Tolerance (line, log \
         scale) and acceptance (dots)</text>",
        top - 8.0,
        w = 2.0 * PANEL
    );
    let tolerances: Vec<f64> = result
        .generations
        .iter()
        .map(|g| libm::log10(g.tolerance.max(1e-300)))
        .collect();
    let (low, high) = tolerances
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &t| {
            (a.min(t), b.max(t))
        });
    let span = if high > low { high - low } else { 1.0 };
    let x_of = |index: usize| {
        left + 10.0 + (2.0 * PANEL - 20.0) * index as f64 / (count.max(2) - 1) as f64
    };
    let points: Vec<String> = tolerances
        .iter()
        .enumerate()
        .map(|(index, t)| {
            format!(
                "{:.2},{:.2}",
                x_of(index),
                top + 10.0 + (PANEL - 20.0) * (high - t) / span
            )
        })
        .collect();
    let _ = writeln!(
        svg,
        "<polyline class=\"tolerance\" points=\"{}\" fill=\"none\" stroke=\"#000000\"/>",
        points.join(" ")
    );
    let bottom = top + PANEL;
    let _ = writeln!(
        svg,
        "<text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"middle\">generation 0 to {}</text>\
         <text x=\"{:.1}\" y=\"{:.1}\">acceptance 100 %</text>\
         <text x=\"{:.1}\" y=\"{:.1}\">0 %</text>",
        left + PANEL,
        bottom + 16.0,
        count.saturating_sub(1),
        left + 2.0 * PANEL + 4.0,
        top + 14.0,
        left + 2.0 * PANEL + 4.0,
        bottom - 6.0
    );
    for (index, generation) in result.generations.iter().enumerate() {
        let rate = generation.accepted as f64 / generation.simulations.max(1) as f64;
        let _ = writeln!(
            svg,
            "<circle class=\"acceptance\" cx=\"{:.2}\" cy=\"{:.2}\" r=\"3\" fill=\"#e69f00\"/>",
            x_of(index),
            top + PANEL - 10.0 - (PANEL - 20.0) * rate
        );
    }
    svg.push_str("</g>\n");
}
