//! `ramulus bench`: growth speed and memory figures (cells per second, peak bytes per cell,
//! scaling between sizes), measured with a counting global allocator. Prints figures; it
//! never fails on slowness.

use ramulus_core::params::{CostWeights, Domain, RunControl};
use std::alloc::{GlobalAlloc, Layout, System};
use std::sync::atomic::{AtomicUsize, Ordering};
use std::time::Instant;

use ramulus_core::growth::Growth;
use ramulus_core::params::{Joining, Params, Root};

use crate::options::{BenchOptions, CliError};

static CURRENT: AtomicUsize = AtomicUsize::new(0);
static PEAK: AtomicUsize = AtomicUsize::new(0);

/// The system allocator, counting live and peak bytes.
pub struct CountingAllocator;

unsafe impl GlobalAlloc for CountingAllocator {
    unsafe fn alloc(&self, layout: Layout) -> *mut u8 {
        let pointer = unsafe { System.alloc(layout) };
        if !pointer.is_null() {
            let now = CURRENT.fetch_add(layout.size(), Ordering::Relaxed) + layout.size();
            PEAK.fetch_max(now, Ordering::Relaxed);
        }
        pointer
    }

    unsafe fn dealloc(&self, pointer: *mut u8, layout: Layout) {
        unsafe { System.dealloc(pointer, layout) };
        CURRENT.fetch_sub(layout.size(), Ordering::Relaxed);
    }
}

struct Case {
    name: String,
    params: Params,
}

struct Figures {
    cells: u64,
    seconds: f64,
    peak_bytes: usize,
}

fn measure(case: &Case) -> Result<Figures, CliError> {
    let baseline = CURRENT.load(Ordering::Relaxed);
    PEAK.store(baseline, Ordering::Relaxed);
    let start = Instant::now();
    let mut growth =
        Growth::new(&case.params).map_err(|error| CliError::Failed(error.to_string()))?;
    growth.run();
    let seconds = start.elapsed().as_secs_f64();
    let cells = growth.cell_count();
    drop(growth);
    let peak_bytes = PEAK.load(Ordering::Relaxed).saturating_sub(baseline);
    Ok(Figures {
        cells,
        seconds,
        peak_bytes,
    })
}

/// Cheapest-first pure length on a full square lattice (Prim's minimum spanning tree).
fn pure_length(side: u32) -> Params {
    Params {
        domain: Domain {
            width: side,
            height: side,
            cell_size: 1.0,
            roots: vec![Root {
                x: side / 2,
                y: side / 2,
                outflow: [0.0, 1.0],
            }],
            jitter: 0.0,
            ..Domain::default()
        },
        costs: CostWeights {
            w_turn: 0.0,
            w_flow: 0.0,
            w_path: 0.0,
            ..CostWeights::default()
        },
        run: RunControl {
            cells: side as u64 * side as u64,
            radius: 1.5,
            joining: Joining::Cheapest,
            ..RunControl::default()
        },
        ..Params::default()
    }
}

/// The full cost model: weighted joining, jitter, turn, flow and path terms, radius 4.
fn full_model(cells: u64) -> Params {
    let side = ((cells as f64 * 1.6).sqrt() as u32).max(20);
    Params {
        domain: Domain {
            width: side,
            height: side,
            cell_size: 0.15,
            roots: vec![Root {
                x: side / 2,
                y: side / 2,
                outflow: [0.0, 1.0],
            }],
            jitter: 0.4,
            ..Domain::default()
        },
        costs: CostWeights {
            w_len: 1.0,
            w_turn: 1.0,
            w_flow: 0.5,
            alpha: 0.5,
            w_path: 0.05,
            ..CostWeights::default()
        },
        run: RunControl {
            cells,
            radius: 4.0,
            joining: Joining::Weighted,
            temperature: 0.5,
            ..RunControl::default()
        },
        ..Params::default()
    }
}

/// Runs the benchmark cases and prints one line of figures per case.
pub fn run(options: BenchOptions) -> Result<(), CliError> {
    if options.fit {
        return crate::fit_bench::run(options.quick);
    }
    let (quick, as_json) = (options.quick, options.json);
    let (side, small, large) = if quick {
        (300, 25_000, 100_000)
    } else {
        (1000, 100_000, 400_000)
    };
    let cases = [
        Case {
            name: format!("cheapest, pure length, {side} x {side} full lattice, radius 1.5"),
            params: pure_length(side),
        },
        Case {
            name: format!("full cost model, weighted, {small} cells"),
            params: full_model(small),
        },
        Case {
            name: format!("full cost model, weighted, {large} cells"),
            params: full_model(large),
        },
    ];
    if as_json {
        // One object per case with its run link, so other builds (wasm) can time the same runs.
        let mut list = Vec::new();
        for case in &cases {
            let figures = measure(case)?;
            list.push(serde_json::json!({
                "case": case.name,
                "link": ramulus_core::link::encode_link(&case.params),
                "cells": figures.cells,
                "seconds": figures.seconds,
            }));
        }
        say!("{}", serde_json::Value::Array(list));
        return Ok(());
    }
    say!(
        "{:<58} {:>9} {:>9} {:>12} {:>10} {:>10}",
        "case",
        "cells",
        "seconds",
        "cells/s",
        "peak MiB",
        "bytes/cell"
    );
    let mut results = Vec::new();
    for case in &cases {
        let figures = measure(case)?;
        say!(
            "{:<58} {:>9} {:>9.3} {:>12.0} {:>10.1} {:>10.1}",
            case.name,
            figures.cells,
            figures.seconds,
            figures.cells as f64 / figures.seconds,
            figures.peak_bytes as f64 / (1024.0 * 1024.0),
            figures.peak_bytes as f64 / figures.cells as f64
        );
        results.push(figures);
    }
    let (small, large) = (&results[1], &results[2]);
    say!(
        "scaling: {:.1} x the cells took {:.2} x the time",
        large.cells as f64 / small.cells as f64,
        large.seconds / small.seconds
    );
    pipeline_figures()
}

/// Time and peak memory of everything computed after growth (topology, widths, metrics,
/// digest, then the SVG, the record and the CSV) on the broad-leaf preset.
fn pipeline_figures() -> Result<(), CliError> {
    let params = ramulus_core::presets::preset("broad-leaf")
        .ok_or_else(|| CliError::Failed("preset broad-leaf is missing".into()))?;
    let mut growth = Growth::new(&params).map_err(|error| CliError::Failed(error.to_string()))?;
    growth.run();
    let network = growth.network();
    let segments = network.segment_count();
    drop(growth);
    // Best of five rounds: the figures of a shared machine vary from round to round.
    let mut best = (f64::INFINITY, f64::INFINITY);
    let mut peak_bytes = 0;
    let mut bytes = 0;
    for _ in 0..5 {
        let baseline = CURRENT.load(Ordering::Relaxed);
        PEAK.store(baseline, Ordering::Relaxed);
        let start = Instant::now();
        let view = ramulus_core::run::RunView::new(network.clone(), &params)
            .map_err(|error| CliError::Failed(error.to_string()))?;
        let derived = start.elapsed().as_secs_f64();
        let svg = ramulus_draw::run_svg(&view, &params, ramulus_draw::Colouring::ByOrder);
        let record = ramulus_core::record::write_record(&ramulus_core::record::make_record(
            &view, &params, None,
        ));
        let csv = ramulus_core::metrics::metrics_csv(&view.metrics, &view.network.units, None);
        let seconds = start.elapsed().as_secs_f64();
        peak_bytes = PEAK.load(Ordering::Relaxed).saturating_sub(baseline);
        bytes = svg.len() + record.len() + csv.len();
        best = (best.0.min(derived), best.1.min(seconds));
    }
    say!(
        "pipeline after growth, broad-leaf ({segments} segments), best of 5: derived view \
         {:.1} ms, with SVG + record + CSV ({bytes} bytes) {:.1} ms, peak {:.1} MiB",
        best.0 * 1e3,
        best.1 * 1e3,
        peak_bytes as f64 / (1024.0 * 1024.0)
    );
    Ok(())
}
