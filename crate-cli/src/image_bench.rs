//! `ramulus bench --image`: times reading a drawn cleared-leaf image of 2000 x 2000 pixels
//! (1000 x 1000 with `--quick`), step by step (leaf threshold and outline, vein threshold,
//! thinning, skeleton graph, distance transform) and whole (`build_cleared_specimen` plus the
//! metrics), best of three rounds.

use std::time::{Duration, Instant};

use ramulus_core::cleared::distance::squared_distance_to_background;
use ramulus_core::cleared::regions::{fill_holes, largest_component, outline_ring};
use ramulus_core::cleared::skeleton_graph::skeleton_graph;
use ramulus_core::cleared::thinning::{remove_staircase_corners, zhang_suen_thin};
use ramulus_core::cleared::threshold::{histogram, otsu_threshold};
use ramulus_core::cleared::{build_cleared_specimen, ClearedOptions, GreyImage};
use ramulus_core::params::Params;
use ramulus_core::run::RunView;
use ramulus_core::specimen::{ScaleRule, SpecimenOptions};

use crate::options::CliError;

/// A drawn leaf: an elliptic blade (grey 175) on white (250) with a branching tree of dark
/// veins (grey 60), each generation thinner, branching at fixed angles (no randomness).
fn drawn_leaf(side: usize) -> Vec<u8> {
    let mut pixels = vec![250u8; side * side];
    let s = side as f64;
    for y in 0..side {
        for x in 0..side {
            let (dx, dy) = (
                (x as f64 - s / 2.0) / (0.42 * s),
                (y as f64 - s / 2.0) / (0.47 * s),
            );
            if dx * dx + dy * dy <= 1.0 {
                pixels[y * side + x] = 175;
            }
        }
    }
    let mut stroke = |a: (f64, f64), b: (f64, f64), radius: f64| {
        let x0 = (a.0.min(b.0) - radius).max(0.0) as usize;
        let x1 = ((a.0.max(b.0) + radius) as usize + 1).min(side);
        let y0 = (a.1.min(b.1) - radius).max(0.0) as usize;
        let y1 = ((a.1.max(b.1) + radius) as usize + 1).min(side);
        let (vx, vy) = (b.0 - a.0, b.1 - a.1);
        let length_squared = (vx * vx + vy * vy).max(1e-12);
        for y in y0..y1 {
            for x in x0..x1 {
                let (px, py) = (x as f64 + 0.5, y as f64 + 0.5);
                let t = (((px - a.0) * vx + (py - a.1) * vy) / length_squared).clamp(0.0, 1.0);
                let (cx, cy) = (a.0 + t * vx - px, a.1 + t * vy - py);
                if cx * cx + cy * cy <= radius * radius {
                    pixels[y * side + x] = 60;
                }
            }
        }
    };
    // Direction vectors turned by +-40 degrees: cos 40 = 0.766, sin 40 = 0.643.
    let mut level = vec![((s / 2.0, 0.95 * s), (0.0, -1.0))];
    let mut length = 0.3 * s;
    let mut radius = s / 150.0;
    for _ in 0..7 {
        let mut next = Vec::new();
        for (start, (ux, uy)) in level {
            let end = (start.0 + ux * length, start.1 + uy * length);
            stroke(start, end, radius.max(1.5));
            for sign in [-1.0, 1.0] {
                let (c, si) = (0.766, 0.643 * sign);
                next.push((end, (ux * c - uy * si, ux * si + uy * c)));
            }
        }
        level = next;
        length *= 0.62;
        radius *= 0.7;
    }
    pixels
}

fn best_of(rounds: usize, mut work: impl FnMut()) -> Duration {
    (0..rounds)
        .map(|_| {
            let started = Instant::now();
            work();
            started.elapsed()
        })
        .min()
        .unwrap_or_default()
}

/// Prints the figures.
pub fn run(quick: bool) -> Result<(), CliError> {
    let side = if quick { 1000 } else { 2000 };
    let pixels = drawn_leaf(side);
    let image = GreyImage::new(side as u32, side as u32, pixels.clone())
        .map_err(|error| CliError::Failed(error.to_string()))?;
    let options = ClearedOptions::default();
    let rounds = 3;
    let mut leaf = Vec::new();
    let leaf_time = best_of(rounds, || {
        let level = otsu_threshold(&histogram(&pixels, None)).unwrap_or(0);
        let dark: Vec<bool> = pixels.iter().map(|&v| v <= level).collect();
        let (mut part, _) = largest_component(&dark, side, side);
        fill_holes(&mut part, side, side);
        let _ = outline_ring(&part, side, side);
        leaf = part;
    });
    let mut veins = Vec::new();
    let vein_time = best_of(rounds, || {
        let level = otsu_threshold(&histogram(&pixels, Some(&leaf))).unwrap_or(0);
        veins = pixels
            .iter()
            .zip(&leaf)
            .map(|(&v, &inside)| inside && v <= level)
            .collect();
    });
    let mut skeleton = Vec::new();
    let thin_time = best_of(rounds, || {
        skeleton = veins.clone();
        zhang_suen_thin(&mut skeleton, side, side);
        remove_staircase_corners(&mut skeleton, side, side);
    });
    let mut chains = 0;
    let graph_time = best_of(rounds, || {
        chains = skeleton_graph(&skeleton, side, side, 10.0, 1.0)
            .chains
            .len();
    });
    let distance_time = best_of(rounds, || {
        let _ = squared_distance_to_background(&veins, side, side);
    });
    let specimen_options = SpecimenOptions {
        units: Some("mm".into()),
        scale: ScaleRule::Factor(0.01),
        ..SpecimenOptions::default()
    };
    let mut failure = None;
    let mut length = 0.0;
    let whole_time = best_of(rounds, || {
        match build_cleared_specimen(&image, &options, &specimen_options) {
            Ok(read) => match RunView::new(read.specimen.network, &Params::default()) {
                Ok(view) => length = view.metrics.total_length,
                Err(error) => failure = Some(error.to_string()),
            },
            Err(error) => failure = Some(error.to_string()),
        }
    });
    if let Some(message) = failure {
        return Err(CliError::Failed(format!("bench --image: {message}")));
    }
    let ms = |d: Duration| d.as_secs_f64() * 1000.0;
    say!("cleared-leaf image, {side} x {side} pixels, best of {rounds} rounds:");
    say!(
        "  leaf (Otsu, largest part, holes, outline)  {:8.1} ms",
        ms(leaf_time)
    );
    say!(
        "  veins (Otsu over the leaf)                 {:8.1} ms",
        ms(vein_time)
    );
    say!(
        "  thinning (Zhang-Suen, simple points)       {:8.1} ms",
        ms(thin_time)
    );
    say!(
        "  skeleton graph ({chains} chains)               {:8.1} ms",
        ms(graph_time)
    );
    say!(
        "  distance transform                         {:8.1} ms",
        ms(distance_time)
    );
    say!(
        "  whole: read, calibrate, repair, measure    {:8.1} ms ({length:.1} mm of veins)",
        ms(whole_time)
    );
    Ok(())
}
