//! `ramulus bench`: growth speed and memory figures (cells per second, peak bytes per cell,
//! scaling between sizes), measured with a counting global allocator; the whole work of
//! `grow --json` on the cheapest-first lattice beside two general minimum-spanning-tree codes
//! on the same points (petgraph's, and a plain binary-heap Prim), in alternating rounds; and
//! the whole work of `grow --json` on the full cost model, phase by phase.
//! Prints figures; it never fails on slowness.

use ramulus_core::params::{CostWeights, Domain, RunControl};
use std::alloc::{GlobalAlloc, Layout, System};
use std::sync::atomic::{AtomicUsize, Ordering};
use std::time::Instant;

use ramulus_core::growth::Growth;
use ramulus_core::network::Network;
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

    /// The system's own `realloc`, which grows a block in place or remaps it where it can,
    /// instead of the default's new block, copy and free (a growing vector's every doubling
    /// would touch fresh pages and copy). The peak counts both blocks for the moment, as a move
    /// would hold both.
    unsafe fn realloc(&self, pointer: *mut u8, layout: Layout, new_size: usize) -> *mut u8 {
        let moved = unsafe { System.realloc(pointer, layout, new_size) };
        if !moved.is_null() {
            let now = CURRENT.fetch_add(new_size, Ordering::Relaxed) + new_size;
            PEAK.fetch_max(now, Ordering::Relaxed);
            CURRENT.fetch_sub(layout.size(), Ordering::Relaxed);
        }
        moved
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
    if options.image {
        return crate::image_bench::run(options.quick);
    }
    if options.refill {
        return crate::refill_bench::run(options.quick);
    }
    if options.fit {
        return crate::fit_bench::run(options.quick);
    }
    if options.passes {
        sloping_field_figures(10)?;
        return looped_preset_figures(if options.quick {
            [25_000, 100_000]
        } else {
            [100_000, 400_000]
        });
    }
    if options.identifiability {
        return crate::identifiability_bench::run(options.quick, options.json);
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
    pipeline_figures()?;
    energy_figures(if quick { 20_000 } else { 80_000 })?;
    loop_figures(if quick {
        [25_000, 100_000]
    } else {
        [100_000, 400_000]
    })?;
    looped_preset_figures(if quick {
        [25_000, 100_000]
    } else {
        [100_000, 400_000]
    })?;
    full_model_command_figures(if quick { 25_000 } else { 100_000 }, 5)?;
    spanning_tree_figures(side, 3)
}

/// The `ovate-leaf` preset scaled to `cells` cells: its lattice, blade outline and petiole
/// scaled about the lattice corner so the blade holds 2 % more than `cells` cells (the leaf
/// grows until its blade is full, so the budget ends the run), the cell size, growth reach and
/// vein threshold kept (so the blade is larger, not finer). The page benchmark
/// (tests/e2e/bench-page.mjs, `leafFigures`) scales the preset the same way.
pub fn scaled_looped_leaf(cells: u64) -> Result<Params, CliError> {
    let mut params = ramulus_core::presets::preset("ovate-leaf")
        .ok_or_else(|| CliError::Failed("preset ovate-leaf is missing".into()))?;
    // The blade's area in cells (shoelace formula), summed as the page benchmark sums it.
    let outline = params.domain.outline.clone().unwrap_or_default();
    let mut twice = 0.0;
    for (index, point) in outline.iter().enumerate() {
        let next = outline[(index + 1) % outline.len()];
        twice += point[0] * next[1] - next[0] * point[1];
    }
    let area = (twice / 2.0).abs().max(1.0);
    let scale = (cells as f64 / area).sqrt() * 1.02;
    params.domain.width = (f64::from(params.domain.width) * scale).ceil() as u32;
    params.domain.height = (f64::from(params.domain.height) * scale).ceil() as u32;
    for root in &mut params.domain.roots {
        root.x = ((f64::from(root.x) + 0.5) * scale).floor() as u32;
        root.y = ((f64::from(root.y) + 0.5) * scale).floor() as u32;
    }
    if let Some(outline) = params.domain.outline.as_mut() {
        for point in outline.iter_mut() {
            point[0] *= scale;
            point[1] *= scale;
        }
    }
    params.run.cells = cells;
    Ok(params)
}

/// The `ovate-leaf` preset scaled to each size (`scaled_looped_leaf`): growth, then the
/// pipeline after growth with its loop pass, best of 3, and the loop pass's share of the whole.
fn looped_preset_figures(sizes: [u64; 2]) -> Result<(), CliError> {
    let mut wholes = Vec::new();
    for cells in sizes {
        let params = scaled_looped_leaf(cells)?;
        let mut tree_params = params.clone();
        tree_params.widths.reconnect = None;
        // The same leaf with loops splitting faces one at a time (`nest_loops`), for comparison.
        let mut nest_params = params.clone();
        nest_params.widths.nest_loops = true;
        let mut best = (f64::INFINITY, f64::INFINITY, f64::INFINITY);
        let mut best_nest = f64::INFINITY;
        let mut grown_cells = 0;
        let mut links = 0;
        let mut loop_slices = Vec::new();
        for _ in 0..3 {
            let start = Instant::now();
            let mut growth =
                Growth::new(&params).map_err(|error| CliError::Failed(error.to_string()))?;
            growth.run();
            let network = growth.network();
            grown_cells = growth.cell_count();
            drop(growth);
            let grown = start.elapsed().as_secs_f64();
            let start = Instant::now();
            let tree = ramulus_core::run::RunView::new(network.clone(), &tree_params)
                .map_err(|error| CliError::Failed(error.to_string()))?;
            let tree_seconds = start.elapsed().as_secs_f64();
            std::hint::black_box(&tree);
            let start = Instant::now();
            let nested = ramulus_core::run::RunView::new(network.clone(), &nest_params)
                .map_err(|error| CliError::Failed(error.to_string()))?;
            best_nest = best_nest.min(start.elapsed().as_secs_f64());
            std::hint::black_box(&nested);
            loop_slices.push(loop_slice_figures(&network, &params)?);
            let start = Instant::now();
            let view = ramulus_core::run::RunView::new(network, &params)
                .map_err(|error| CliError::Failed(error.to_string()))?;
            let looped_seconds = start.elapsed().as_secs_f64();
            links = view
                .loops
                .as_ref()
                .map_or(0, |loops| loops.reconnection.links.len());
            best = (
                best.0.min(grown),
                best.1.min(tree_seconds),
                best.2.min(looped_seconds),
            );
        }
        let whole = best.0 + best.2;
        let loops = (best.2 - best.1).max(0.0);
        say!(
            "ovate-leaf preset scaled to {cells} cells ({grown_cells} grown), best of 3: \
             growth {:.2} s, pipeline with loops {:.2} s (without {:.2} s; with nest_loops \
             {:.2} s), whole {:.2} s; loop pass {:.2} s = {:.0} % \
             of the whole ({links} loop segments)",
            best.0,
            best.2,
            best.1,
            best_nest,
            whole,
            loops,
            100.0 * loops / whole
        );
        wholes.push((cells, whole));
        for figures in &loop_slices {
            say!(
                "  loop pass in one go {:.3} s; in slices of {SLICE_BUDGET_MS} ms (as the page \
                 runs it) {:.3} s ({:+.1} %), {} slices, longest slice {:.1} ms; longest \
                 single piece {:.1} ms (level {} of {}); before it, the conducting pass \
                 {:.1} ms and the loop pass's set-up {:.1} ms",
                figures.whole,
                figures.stepped,
                100.0 * (figures.stepped - figures.whole) / figures.whole,
                figures.slices,
                1000.0 * figures.longest_slice,
                1000.0 * figures.longest_piece,
                figures.longest_piece_level + 1,
                figures.levels,
                1000.0 * figures.conducting,
                1000.0 * figures.set_up
            );
        }
    }
    if let [(small, a), (large, b)] = wholes[..] {
        say!(
            "ovate-leaf: {:.1} x the cells took {:.2} x the time (growth and loop pass)",
            large as f64 / small as f64,
            b / a
        );
    }
    Ok(())
}

/// The page's slice budget (`SLICE_BUDGET_MS` in www/passes.js) and first part
/// (`FIRST_LOOP_PART` in crate-web/src/passes.rs).
const SLICE_BUDGET_MS: f64 = 40.0;
const FIRST_LOOP_PART: usize = 4096;

/// The loop pass in one go against the same pass in slices as the page runs it.
struct LoopSliceFigures {
    /// Seconds of `close_loops` (set-up included).
    whole: f64,
    /// Seconds of `LoopClosing::new` and every slice.
    stepped: f64,
    slices: usize,
    /// Seconds of the longest slice (set-up excluded).
    longest_slice: f64,
    /// Seconds of the longest single piece, in a separate run a piece at a time, and its level.
    longest_piece: f64,
    longest_piece_level: u32,
    levels: u32,
    /// Seconds of the conducting pass and of `LoopClosing::new`.
    conducting: f64,
    set_up: f64,
}

/// The loop pass of `params` on the grown `network`: in one go, in slices of
/// `SLICE_BUDGET_MS` with parts sized by `next_part_size` (as `Simulation::reshape_step`), and
/// a piece at a time (the longest piece).
fn loop_slice_figures(network: &Network, params: &Params) -> Result<LoopSliceFigures, CliError> {
    use ramulus_core::reconnection::{close_loops, next_part_size, GrownVeins, LoopClosing};
    let mut forest = ramulus_core::run::topology_pass(network)
        .map_err(|error| CliError::Failed(error.to_string()))?;
    let start = Instant::now();
    let conducting = ramulus_core::run::conducting_pass(network, &mut forest, params);
    let conducting_seconds = start.elapsed().as_secs_f64();
    let (Some(forest), Some(rule)) = (forest, ramulus_core::run::loop_rule(params)) else {
        return Err(CliError::Failed("the leaf closes no loops".into()));
    };
    let veins = GrownVeins {
        network,
        topology: &forest.topology,
        conducts: &conducting.conducts,
    };
    let start = Instant::now();
    std::hint::black_box(LoopClosing::new(veins, &rule));
    let set_up_seconds = start.elapsed().as_secs_f64();
    let start = Instant::now();
    let whole = close_loops(network, &forest.topology, &conducting.conducts, &rule);
    let whole_seconds = start.elapsed().as_secs_f64();
    let ms = |since: Instant| since.elapsed().as_secs_f64() * 1000.0;
    let start = Instant::now();
    let mut closing = LoopClosing::new(veins, &rule);
    let (mut slices, mut longest_slice, mut pieces) = (0, 0.0f64, FIRST_LOOP_PART);
    while !closing.done() {
        let slice = Instant::now();
        loop {
            let part = Instant::now();
            closing.advance(veins, pieces);
            pieces = next_part_size(pieces, ms(part), SLICE_BUDGET_MS);
            if closing.done() || ms(slice) >= SLICE_BUDGET_MS {
                break;
            }
        }
        longest_slice = longest_slice.max(ms(slice) / 1000.0);
        slices += 1;
    }
    let stepped = closing.finish(veins);
    let stepped_seconds = start.elapsed().as_secs_f64();
    if stepped != whole {
        return Err(CliError::Failed("the stepped loop pass differs".into()));
    }
    let mut closing = LoopClosing::new(veins, &rule);
    let (mut longest_piece, mut longest_piece_level) = (0.0f64, 0);
    while !closing.done() {
        let level = closing.progress().level;
        let piece = Instant::now();
        closing.advance(veins, 1);
        let seconds = piece.elapsed().as_secs_f64();
        if seconds > longest_piece {
            (longest_piece, longest_piece_level) = (seconds, level);
        }
    }
    Ok(LoopSliceFigures {
        whole: whole_seconds,
        stepped: stepped_seconds,
        slices,
        longest_slice,
        longest_piece,
        longest_piece_level,
        levels: rule.levels + 1,
        conducting: conducting_seconds,
        set_up: set_up_seconds,
    })
}

/// The channel energy pass (`channel_energy::lower_energy`) on an open lattice of `cells`
/// cells (the drainage site without its building, twice as wide as high, one outlet on the
/// left side): `sum Q^0.5 L` before, then per sweep the energy, moves and time.
fn energy_figures(cells: u64) -> Result<(), CliError> {
    let mut params = ramulus_core::presets::preset("drainage-site")
        .ok_or_else(|| CliError::Failed("preset drainage-site is missing".into()))?;
    let height = ((cells as f64 / 2.0).sqrt().round() as u32).max(2);
    params.domain.obstacles.clear();
    params.domain.width = 2 * height;
    params.domain.height = height;
    params.domain.roots[0].y = height / 2;
    params.run.cells = u64::from(2 * height * height);
    let mut growth = Growth::new(&params).map_err(|error| CliError::Failed(error.to_string()))?;
    growth.run();
    let network = growth.network();
    drop(growth);
    let topology = network
        .topology()
        .map_err(|error| CliError::Failed(error.to_string()))?;
    let reach = params.run.radius * network.cell_size;
    say!(
        "channel energy, open lattice {} x {height} ({} nodes), reach {} cells: E before {:.4e}",
        2 * height,
        network.nodes.len(),
        params.run.radius,
        ramulus_core::channel_energy::network_energy(&network, &topology)
    );
    // Sweep by sweep: each call runs one sweep on the previous sweep's result.
    let mut current = network.clone();
    let mut view = topology;
    for sweep in 1..=5 {
        let start = Instant::now();
        let (parent, report) =
            ramulus_core::channel_energy::lower_energy(&current, &view, reach, 1);
        let seconds = start.elapsed().as_secs_f64();
        ramulus_core::channel_energy::apply_parents(&mut current, &parent);
        view = current
            .topology()
            .map_err(|error| CliError::Failed(error.to_string()))?;
        say!(
            "  sweep {sweep}: E {:.4e} ({:+.2} %), {} moves, {} blocked by crossings, {:.3} s",
            report.energy_after,
            100.0 * (report.energy_after - report.energy_before) / report.energy_before,
            report.moves(),
            report.sweeps.first().map_or(0, |s| s.blocked),
            seconds
        );
    }
    Ok(())
}

/// Where the whole work of `ramulus grow --json` goes on the full cost model, phase by phase,
/// over `rounds` rounds (min-max): setting up the lattice (`Growth::new`), growth, handing
/// the network over, the pipeline after growth (topology, widths, metrics, digest) and the
/// JSON text. Process start and printing are not included.
fn full_model_command_figures(cells: u64, rounds: usize) -> Result<(), CliError> {
    let params = full_model(cells);
    let names = [
        "set-up (Growth::new: lattice, jitter, frontier)",
        "growth (Growth::run)",
        "network handed over (Growth::into_network)",
        "pipeline (topology, widths, metrics, digest)",
        "JSON text",
        "whole",
    ];
    let mut times: Vec<Vec<f64>> = vec![Vec::new(); names.len()];
    for _ in 0..rounds {
        let start = Instant::now();
        let mut growth =
            Growth::new(&params).map_err(|error| CliError::Failed(error.to_string()))?;
        let set_up = start.elapsed().as_secs_f64();
        let stopped = growth.run();
        let grown = start.elapsed().as_secs_f64();
        let cell_count = growth.cell_count();
        let network = growth.into_network();
        let handed = start.elapsed().as_secs_f64();
        let view = ramulus_core::run::RunView::new(network, &params)
            .map_err(|error| CliError::Failed(error.to_string()))?;
        let piped = start.elapsed().as_secs_f64();
        let text = crate::commands::grow_json(
            &view,
            &params,
            cell_count,
            stopped,
            crate::options::DEFAULT_PAGE,
        )
        .to_string();
        std::hint::black_box(text);
        let whole = start.elapsed().as_secs_f64();
        let marks = [set_up, grown, handed, piped, whole];
        let mut last = 0.0;
        for (phase, &mark) in marks.iter().enumerate() {
            times[phase].push(mark - last);
            last = mark;
        }
        times[names.len() - 1].push(whole);
    }
    say!("full cost model, {cells} cells, whole work of grow --json by phase, {rounds} rounds (min-max):");
    for (name, times) in names.iter().zip(&times) {
        let fastest = times.iter().copied().fold(f64::INFINITY, f64::min);
        let slowest = times.iter().copied().fold(0.0, f64::max);
        say!(
            "  {name:<50} {:>7.1}-{:.1} ms",
            fastest * 1e3,
            slowest * 1e3
        );
    }
    Ok(())
}

/// Times, in `rounds` alternating rounds, the whole work of `ramulus grow --json` on the
/// cheapest-first pure-length lattice (growth, the pipeline with metrics and digest, the JSON
/// text) and two general minimum-spanning-tree codes on the same cell centres joined to their 8
/// neighbours: petgraph's `min_spanning_tree` (Kruskal, building the graph included) and a
/// binary-heap Prim (Prim 1957). All three must find the same total length, since the pure
/// length network is a minimum spanning tree of those points (printed as a check).
fn spanning_tree_figures(side: u32, rounds: usize) -> Result<(), CliError> {
    let params = pure_length(side);
    let mut times = [Vec::new(), Vec::new(), Vec::new()];
    let mut lengths = [0.0; 3];
    for _ in 0..rounds {
        let start = Instant::now();
        lengths[0] = grow_json_work(&params)?;
        times[0].push(start.elapsed().as_secs_f64());
        let start = Instant::now();
        lengths[1] = petgraph_spanning_tree_length(side);
        times[1].push(start.elapsed().as_secs_f64());
        let start = Instant::now();
        lengths[2] = heap_prim_length(side);
        times[2].push(start.elapsed().as_secs_f64());
    }
    say!("cheapest first, pure length, {side} x {side}, {rounds} alternating rounds (min-max):");
    let names = [
        "ramulus grow --json work (growth, pipeline, metrics, JSON)",
        "petgraph min_spanning_tree on the 8-neighbour grid (with building it)",
        "binary-heap Prim on the 8-neighbour grid",
    ];
    for ((name, times), length) in names.iter().zip(&times).zip(lengths) {
        let fastest = times.iter().copied().fold(f64::INFINITY, f64::min);
        let slowest = times.iter().copied().fold(0.0, f64::max);
        say!("  {name:<72} {fastest:.3}-{slowest:.3} s  total length {length:.6}");
    }
    Ok(())
}

/// Everything `ramulus grow --json` computes, from the parameters to its JSON text; returns the
/// total length.
fn grow_json_work(params: &Params) -> Result<f64, CliError> {
    let mut growth = Growth::new(params).map_err(|error| CliError::Failed(error.to_string()))?;
    let stopped = growth.run();
    let cell_count = growth.cell_count();
    let network = growth.network();
    drop(growth);
    let view = ramulus_core::run::RunView::new(network, params)
        .map_err(|error| CliError::Failed(error.to_string()))?;
    let text = crate::commands::grow_json(
        &view,
        params,
        cell_count,
        stopped,
        crate::options::DEFAULT_PAGE,
    )
    .to_string();
    std::hint::black_box(text);
    Ok(view.metrics.total_length)
}

/// The distance between two cell centres `(dx, dy)` cells apart.
fn grid_distance(dx: i64, dy: i64) -> f64 {
    ((dx * dx + dy * dy) as f64).sqrt()
}

/// Half of the 8 neighbour offsets: each grid edge once.
const FORWARD_NEIGHBOURS: [(i64, i64); 4] = [(1, 0), (-1, 1), (0, 1), (1, 1)];

/// Total length of petgraph's minimum spanning tree of the `side` x `side` grid with 8
/// neighbours, building the graph included.
fn petgraph_spanning_tree_length(side: u32) -> f64 {
    let side = i64::from(side);
    let count = (side * side) as usize;
    let mut graph: petgraph::graph::UnGraph<(), f64> =
        petgraph::graph::UnGraph::with_capacity(count, 4 * count);
    let nodes: Vec<_> = (0..count).map(|_| graph.add_node(())).collect();
    for row in 0..side {
        for column in 0..side {
            for (dx, dy) in FORWARD_NEIGHBOURS {
                let (x, y) = (column + dx, row + dy);
                if (0..side).contains(&x) && (0..side).contains(&y) {
                    graph.add_edge(
                        nodes[(row * side + column) as usize],
                        nodes[(y * side + x) as usize],
                        grid_distance(dx, dy),
                    );
                }
            }
        }
    }
    petgraph::algo::min_spanning_tree(&graph)
        .map(|element| match element {
            petgraph::data::Element::Edge { weight, .. } => weight,
            petgraph::data::Element::Node { .. } => 0.0,
        })
        .sum()
}

/// Total length of the minimum spanning tree of the `side` x `side` grid with 8 neighbours by
/// Prim's rule with a binary heap and lazy deletion, from the centre cell.
fn heap_prim_length(side: u32) -> f64 {
    use std::cmp::Reverse;
    let side = i64::from(side);
    let count = (side * side) as usize;
    let mut in_tree = vec![false; count];
    let mut best = vec![f64::INFINITY; count];
    let mut heap = std::collections::BinaryHeap::new();
    let start = ((side / 2) * side + side / 2) as usize;
    best[start] = 0.0;
    // Distances are positive, so their bit patterns order as the numbers do.
    heap.push(Reverse((0u64, start as u32)));
    let mut total = 0.0;
    while let Some(Reverse((bits, node))) = heap.pop() {
        let node = node as usize;
        if in_tree[node] {
            continue;
        }
        in_tree[node] = true;
        total += f64::from_bits(bits);
        let (column, row) = (node as i64 % side, node as i64 / side);
        for dy in -1..=1 {
            for dx in -1..=1 {
                let (x, y) = (column + dx, row + dy);
                if (dx, dy) == (0, 0) || !(0..side).contains(&x) || !(0..side).contains(&y) {
                    continue;
                }
                let other = (y * side + x) as usize;
                let distance = grid_distance(dx, dy);
                if !in_tree[other] && distance < best[other] {
                    best[other] = distance;
                    heap.push(Reverse((distance.to_bits(), other as u32)));
                }
            }
        }
    }
    total
}

/// Time and peak memory of everything computed after growth (topology, widths, metrics,
/// digest, then the SVG, the record and the CSV) on the broad-leaf preset.
fn pipeline_figures() -> Result<(), CliError> {
    let params = ramulus_core::presets::preset("ovate-leaf")
        .ok_or_else(|| CliError::Failed("preset ovate-leaf is missing".into()))?;
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

/// The broad-leaf model on a lattice scaled to hold `cells` cells (no stop threshold, so it
/// grows to the budget), veins from 0.05 mm^2 of drained area, loops closed at ratio 6 over
/// levels 0 to 3 (the loop settings suggested for the leaf presets).
fn looped_leaf(cells: u64) -> Result<Params, CliError> {
    let mut params = ramulus_core::presets::preset("broad-leaf")
        .ok_or_else(|| CliError::Failed("preset broad-leaf is missing".into()))?;
    // Open growth on a 220 x 300 lattice scaled to the budget (the preset's blade outline is
    // drawn for its own lattice, so it is left out here).
    params.domain.outline = None;
    let scale = (cells as f64 / (220.0 * 300.0 * 0.7)).sqrt().max(1.0);
    params.domain.width = (220.0 * scale) as u32;
    params.domain.height = (300.0 * scale) as u32;
    params.domain.roots[0].x = (110.0 * scale) as u32;
    params.domain.roots[0].y = (270.0 * scale) as u32;
    params.run.cells = cells;
    params.run.threshold = None;
    params.widths.vein_area = 0.05;
    params.widths.reconnect = Some(6.0);
    params.widths.loop_levels = 3;
    Ok(params)
}

/// Time of a leaf with loops (growth, then the pipeline after growth with and without the loop
/// pass, best of 3), the loop pass's share of the whole, at two sizes.
fn loop_figures(sizes: [u64; 2]) -> Result<(), CliError> {
    for cells in sizes {
        let params = looped_leaf(cells)?;
        let mut tree_params = params.clone();
        tree_params.widths.reconnect = None;
        let mut best = (f64::INFINITY, f64::INFINITY, f64::INFINITY);
        let mut figures = (0, 0, 0.0, 0.0);
        let mut best_pass = f64::INFINITY;
        for _ in 0..3 {
            let start = Instant::now();
            let mut growth =
                Growth::new(&params).map_err(|error| CliError::Failed(error.to_string()))?;
            growth.run();
            let network = growth.network();
            drop(growth);
            let grown = start.elapsed().as_secs_f64();
            let start = Instant::now();
            let tree = ramulus_core::run::RunView::new(network.clone(), &tree_params)
                .map_err(|error| CliError::Failed(error.to_string()))?;
            let tree_seconds = start.elapsed().as_secs_f64();
            std::hint::black_box(&tree);
            // The loop pass alone, on the tree's passes.
            let mut forest = ramulus_core::run::topology_pass(&network)
                .map_err(|error| CliError::Failed(error.to_string()))?;
            let conducting = ramulus_core::run::conducting_pass(&network, &mut forest, &params);
            let start = Instant::now();
            let closed =
                ramulus_core::run::loop_pass(&network, forest.as_ref(), &conducting, &params);
            best_pass = best_pass.min(start.elapsed().as_secs_f64());
            std::hint::black_box(closed);
            let start = Instant::now();
            let view = ramulus_core::run::RunView::new(network, &params)
                .map_err(|error| CliError::Failed(error.to_string()))?;
            let looped_seconds = start.elapsed().as_secs_f64();
            best = (
                best.0.min(grown),
                best.1.min(tree_seconds),
                best.2.min(looped_seconds),
            );
            figures = (
                view.network.cells.occupied.len(),
                view.loops
                    .as_ref()
                    .map_or(0, |loops| loops.reconnection.links.len()),
                view.metrics.areole_density.unwrap_or(0.0),
                view.metrics.nesting_number.unwrap_or(0.0),
            );
        }
        let whole = best.0 + best.2;
        let loop_share = (best.2 - best.1).max(0.0);
        say!(
            "leaf with loops, {} cells, best of 3: growth {:.2} s, pipeline {:.2} s (tree \
             alone {:.2} s), whole {:.2} s; loop pass and loop metrics {:.2} s = {:.0} % \
             (loop pass alone {:.2} s; {} new segments, {:.2} areoles/mm\u{b2}, nesting {:.2})",
            figures.0,
            best.0,
            best.2,
            best.1,
            whole,
            loop_share,
            100.0 * loop_share / whole,
            best_pass,
            figures.1,
            figures.2,
            figures.3
        );
    }
    Ok(())
}

/// The 2-hectare sloping field (`examples/sites/sloping-field.geojson`, compiled in) at 0.5 m
/// cells: growth, then `sweeps` channel energy sweeps a sweep at a time as the page runs them
/// (`reshaping::Reshaping`), with each sweep's time and energy drop.
fn sloping_field_figures(sweeps: u32) -> Result<(), CliError> {
    let text = include_str!("../../examples/sites/sloping-field.geojson");
    let site = ramulus_core::site::read_site(text.as_bytes())
        .map_err(|error| CliError::Failed(format!("sloping-field.geojson: {error}")))?;
    let mut params = site
        .to_params(0.5, &ramulus_core::site::Terrain::SpotLevels)
        .map_err(|error| CliError::Failed(format!("sloping-field.geojson: {error}")))?;
    params.run.energy_sweeps = sweeps;
    let start = Instant::now();
    let mut growth = Growth::new(&params).map_err(|error| CliError::Failed(error.to_string()))?;
    growth.run();
    let network = growth.network();
    let cells = growth.cell_count();
    drop(growth);
    let grown = start.elapsed().as_secs_f64();
    let start = Instant::now();
    let mut reshaping = ramulus_core::reshaping::Reshaping::new(network, &params)
        .map_err(|error| CliError::Failed(error.to_string()))?;
    say!(
        "sloping field, 2 ha at 0.5 m cells ({cells} cells): growth {grown:.2} s, sweep set-up \
         {:.2} s, E before {:.5e}",
        start.elapsed().as_secs_f64(),
        reshaping.progress().before
    );
    let mut previous = reshaping.progress().before;
    while !reshaping.done() {
        let start = Instant::now();
        let progress = reshaping
            .sweep()
            .map_err(|error| CliError::Failed(error.to_string()))?;
        say!(
            "  sweep {}: {:.3} s, E {:.5e} ({:+.2} %), {} paths re-pointed",
            progress.sweep,
            start.elapsed().as_secs_f64(),
            progress.now,
            100.0 * (progress.now - previous) / previous,
            progress.moved
        );
        previous = progress.now;
    }
    let start = Instant::now();
    let (view, _) = reshaping
        .finish()
        .map_err(|error| CliError::Failed(error.to_string()))?;
    say!(
        "  measuring after the sweeps {:.2} s; E {:.5e} -> {:.5e}",
        start.elapsed().as_secs_f64(),
        view.energy
            .as_ref()
            .map_or(0.0, |energy| energy.energy_before),
        view.energy
            .as_ref()
            .map_or(0.0, |energy| energy.energy_after)
    );
    Ok(())
}
