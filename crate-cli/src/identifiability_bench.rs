//! `ramulus bench --identifiability`: for every leaf preset and every parameter a fit may
//! vary, the change of each metric per parameter step over its seed-to-seed spread, the number
//! of independent metric directions and the confounded parameter pairs
//! (`ramulus_core::fit::identifiability`). Grows the runs on every core; prints a table per
//! preset (or one JSON array). Computes nothing itself.

use std::time::Instant;

use rayon::prelude::*;

use ramulus_core::fit::identifiability::{
    identifiability, level_params, metric_keys, metric_values, studied_keys, DesignValues,
    Identifiability, CONFOUNDED_COSINE, DIRECTION_THRESHOLD, LEVELS, SEEN_RATIO, SIZE_METRICS,
};
use ramulus_core::growth::Growth;
use ramulus_core::params::Params;
use ramulus_core::presets::preset;
use ramulus_core::run::RunView;

use crate::options::CliError;

/// The presets studied: the leaves, each with veins apart from tissue and closing loops (the
/// drainage sites and the shortest-tree reference are left out). A name no preset answers to
/// stops the study with an error, so a renamed preset is never silently left out.
const LEAF_PRESETS: [&str; 4] = [
    "ovate-leaf",
    "elliptic-leaf",
    "lanceolate-leaf",
    "filled-outline",
];

/// The conducting threshold a studied preset without one gets, in cell areas: enough that vein
/// density measures veins, not the lattice (with 0 every cell is a vein). A preset with its
/// own threshold keeps it.
const VEIN_CELLS: f64 = 20.0;

/// Seeds per level: 5, or 2 with `--quick`.
const SEEDS: u64 = 5;
const QUICK_SEEDS: u64 = 2;

/// Cell budget with `--quick` (the presets' own otherwise).
const QUICK_CELLS: u64 = 6000;

/// Runs the study and prints it.
pub fn run(quick: bool, as_json: bool) -> Result<(), CliError> {
    let seeds = if quick { QUICK_SEEDS } else { SEEDS };
    let metrics = metric_keys();
    let mut studies = Vec::new();
    for name in LEAF_PRESETS {
        let started = Instant::now();
        let mut base = preset(name)
            .ok_or_else(|| CliError::Failed(format!("the study names no preset {name:?}")))?;
        if base.widths.vein_area <= 0.0 {
            base.widths.vein_area = VEIN_CELLS * base.domain.cell_size * base.domain.cell_size;
        }
        if quick {
            base.run.cells = base.run.cells.min(QUICK_CELLS);
        }
        let keys = studied_keys(&base);
        let jobs: Vec<(usize, usize, u64)> = (0..keys.len())
            .flat_map(|k| {
                (0..LEVELS).flat_map(move |level| (1..=seeds).map(move |seed| (k, level, seed)))
            })
            .collect();
        let measured: Vec<Vec<Option<f64>>> = jobs
            .par_iter()
            .map(|&(k, level, seed)| {
                level_params(&base, &keys[k].key, keys[k].levels[level], seed)
                    .and_then(|params| grow_and_measure(&params, &metrics))
                    .unwrap_or_default()
            })
            .collect();
        let mut values: DesignValues = keys
            .iter()
            .map(|_| std::array::from_fn(|_| Vec::new()))
            .collect();
        for (&(k, level, _), row) in jobs.iter().zip(measured) {
            values[k][level].push(row);
        }
        let study = identifiability(&keys, &metrics, &values);
        let seconds = started.elapsed().as_secs_f64();
        if !as_json {
            print_study(name, &base, seeds, &study, jobs.len(), seconds);
        }
        studies.push(serde_json::json!({
            "preset": name,
            "vein_area": base.widths.vein_area,
            "cells": base.run.cells,
            "seeds": seeds,
            "runs": jobs.len(),
            "seconds": seconds,
            "study": study,
        }));
    }
    if as_json {
        println!(
            "{}",
            serde_json::to_string(&studies).map_err(|error| CliError::Failed(error.to_string()))?
        );
    }
    Ok(())
}

/// Grows and measures one run; `None` when it cannot grow or measure.
fn grow_and_measure(params: &Params, metrics: &[&str]) -> Option<Vec<Option<f64>>> {
    let mut growth = Growth::new(params).ok()?;
    growth.run();
    let view = RunView::new(growth.into_network(), params).ok()?;
    Some(metric_values(&view.metrics, metrics))
}

fn print_study(
    name: &str,
    base: &Params,
    seeds: u64,
    study: &Identifiability,
    runs: usize,
    seconds: f64,
) {
    let units = &base.domain.units;
    println!(
        "{name}: vein_area {} {units}\u{b2} ({:.1} cells), budget {} cells, {LEVELS} levels x {seeds} seeds, {runs} runs in {seconds:.1} s",
        short(base.widths.vein_area),
        base.widths.vein_area / (base.domain.cell_size * base.domain.cell_size),
        base.run.cells
    );
    println!("change of each metric per parameter step / its seed-to-seed spread (pooled sample SD); |value| >= {SEEN_RATIO} marked *");
    let level_texts: Vec<String> = study
        .keys
        .iter()
        .map(|key| {
            format!(
                "{}..{}",
                short(key.levels[0]),
                short(key.levels[LEVELS - 1])
            )
        })
        .collect();
    let widths: Vec<usize> = study
        .keys
        .iter()
        .zip(&level_texts)
        .map(|(key, levels)| key.key.len().max(levels.len()).max(6) + 2)
        .collect();
    let label_width = study
        .metrics
        .iter()
        .map(String::len)
        .max()
        .unwrap_or(6)
        .max(24);
    let mut header = format!("{:<label_width$}", "metric \\ parameter");
    for (key, width) in study.keys.iter().zip(&widths) {
        header.push_str(&format!("{:>width$}", key.key));
    }
    println!("{header}");
    let mut steps = format!("{:<label_width$}", "  levels (low..high)");
    for (text, width) in level_texts.iter().zip(&widths) {
        steps.push_str(&format!("{text:>width$}"));
    }
    println!("{steps}");
    let mut silent = Vec::new();
    for (m, metric) in study.metrics.iter().enumerate() {
        if study.ratio.iter().all(|column| column[m].is_none()) {
            silent.push(metric.as_str());
            continue;
        }
        let mut line = format!("{metric:<label_width$}");
        for (k, width) in widths.iter().enumerate() {
            let text = match study.ratio[k][m] {
                Some(ratio) => {
                    let mark = if ratio.abs() >= SEEN_RATIO { "*" } else { " " };
                    format!("{ratio:.1}{mark}")
                }
                None => "n/a ".to_string(),
            };
            line.push_str(&format!("{text:>width$}"));
        }
        println!("{line}");
    }
    let values: Vec<String> = study
        .singular_values
        .iter()
        .map(|value| format!("{value:.1}"))
        .collect();
    println!(
        "metrics constant or undefined in every run (left out): {}",
        silent.join(", ")
    );
    let size_free: Vec<String> = study
        .size_free_singular_values
        .iter()
        .map(|value| format!("{value:.1}"))
        .collect();
    println!(
        "singular values of the matrix (n/a as 0): {}\nindependent metric directions (singular values above {DIRECTION_THRESHOLD}): {}",
        values.join(" "),
        study.directions
    );
    println!(
        "without the size metrics ({}): singular values {}; independent directions: {}",
        SIZE_METRICS.join(", "),
        size_free.join(" "),
        study.size_free_directions
    );
    println!(
        "confounded pairs (|cosine| of their columns above {CONFOUNDED_COSINE}): {}",
        pair_list(&study.confounded)
    );
    println!(
        "confounded pairs without the size metrics: {}",
        pair_list(&study.size_free_confounded)
    );
    println!(
        "parameters no metric sees (below {SEEN_RATIO} spreads per step): {}\n",
        if study.unseen.is_empty() {
            "none".to_string()
        } else {
            study.unseen.join(", ")
        }
    );
}

/// Pairs as `a & b (cosine)`, or `none`.
fn pair_list(pairs: &[(String, String, f64)]) -> String {
    if pairs.is_empty() {
        return "none".to_string();
    }
    pairs
        .iter()
        .map(|(a, b, cosine)| format!("{a} & {b} ({cosine:.2})"))
        .collect::<Vec<_>>()
        .join(", ")
}

/// A level in at most 4 significant digits, for the table's header.
fn short(value: f64) -> String {
    ramulus_draw::format::four_digits(value)
}

#[cfg(test)]
mod tests {
    use super::LEAF_PRESETS;
    use ramulus_core::presets::presets;

    /// Every studied preset is listed by the name the preset list gives it today (an old name
    /// resolves through the aliases, but the study's table should say the current one).
    #[test]
    fn every_studied_preset_goes_by_its_current_name() {
        let names: Vec<&str> = presets().iter().map(|preset| preset.name).collect();
        for name in LEAF_PRESETS {
            assert!(names.contains(&name), "no preset is named {name:?} today");
        }
    }
}
