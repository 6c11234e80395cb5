// The page's one wasm session: loads the module, holds the run (a core Simulation), and hands
// out everything the other modules read from it: typed-array views of the geometry, thin lines
// painted by the core, the colour key, the scale bar, a segment's readings, the plots and the
// progress line. Views into wasm memory are detached whenever that memory grows (any
// allocating wasm call), so no view leaves this module to be kept: callers take them afresh
// for each drawing, in the order `drawingViews` gives. No other module imports pkg/.
// A trap (a wasm `RuntimeError`, as when memory runs out at the 4 GiB ceiling of wasm32) kills
// the instance: `recover` drops it with its run and starts a fresh one from the same module.
import init, * as core from './pkg/ramulus_web.js';

export class Session {
  /// Loads the wasm module; resolves to a session without a run.
  static async open() {
    await init();
    return new Session();
  }

  constructor() {
    this.core = core;
    this.simulation = null;
    this.count = 0; // geometry entries as last refilled
  }

  /// Replaces the run (freeing the old one); `simulation` null to hold none.
  setSimulation(simulation) {
    if (this.simulation && this.simulation !== simulation) this.simulation.free();
    this.simulation = simulation;
    this.count = 0;
  }

  /// A new run grown from a link.
  grow(link) {
    const simulation = new core.Simulation(link);
    const trapAt = globalThis.ramulusTestHooks?.trapAtCells;
    if (trapAt) simulation.debug_trap_at_cells(trapAt);
    // Benchmark switch (tests/e2e/bench-page.mjs): refill the geometry in full every time.
    if (globalThis.ramulusTestHooks?.fullRefill) simulation.set_full_refill(true);
    // The passes after growth run a slice at a time (passes.js), not inside a refill.
    simulation.set_stepwise_passes(globalThis.ramulusTestHooks?.passesInOneGo !== true);
    return simulation;
  }

  /// What the run a link describes needs of the page's memory: `{fits, budget,
  /// largest_budget, bytes, ceiling_bytes, message}` (see crate-web's `RunMemory`).
  memoryNeeds(link) {
    return JSON.parse(core.run_memory_json(link));
  }

  /// Whether `error` is a trap of the wasm instance (which leaves it unusable).
  static isTrap(error) {
    return error instanceof WebAssembly.RuntimeError;
  }

  /// After a trap: forgets the dead run (its memory belongs to the dead instance, so it is
  /// not freed through it) and replaces the instance with a fresh one of the same module, so
  /// the dead instance's memory can be reclaimed. Functions of `core` then call the new one.
  recover() {
    this.simulation = null;
    this.count = 0;
    core.__wbg_reset_state();
  }

  /// A run restored from a run record's text.
  restore(text) {
    const simulation = core.Simulation.from_record(text);
    simulation.set_stepwise_passes(true);
    return simulation;
  }

  /// Refills the geometry from the network as it stands (a growing run: the nodes grown since
  /// the last refill, oldest first, until `mostNodes` nodes are to be recomputed); returns the
  /// entry count.
  refill(mostNodes = Infinity) {
    this.count = this.simulation ? this.simulation.update_geometry_part(mostNodes) : 0;
    return this.count;
  }

  /// `{colours, ends, widths}` for one drawing: palette indices under `colouring`, end points
  /// and widths. Colour indices first, as computing them may grow memory; the two views after
  /// them allocate nothing in wasm. Use them at once, before any other wasm call.
  drawingViews(colouring) {
    const colours = this.simulation.colour_indices(colouring);
    const ends = this.simulation.ends();
    const widths = this.simulation.widths();
    return { colours, ends, widths };
  }

  /// Paints the thin lines into `context`'s whole canvas (see Simulation.paint_thin_lines).
  paintThinLines(context, width, height, scale, offsetX, offsetY, colouring, tissue, minPx, maxPx, background) {
    this.simulation.paint_thin_lines(context, width, height, scale, offsetX, offsetY, colouring, tissue, minPx, maxPx, background);
  }

  /// Starts painting the thin lines a slice at a time (arguments as paintThinLines, without
  /// the context): see Simulation.start_thin_lines.
  startThinLines(width, height, scale, offsetX, offsetY, colouring, tissue, minPx, maxPx, background) {
    this.simulation.start_thin_lines(width, height, scale, offsetX, offsetY, colouring, tissue, minPx, maxPx, background);
  }

  /// Draws up to `count` more thin lines; returns how many are left, or -1 when no painting
  /// is in progress (a refill dropped it).
  drawThinLines(count) {
    return this.simulation.draw_thin_lines(count);
  }

  /// Puts the painted thin lines onto `context`'s canvas.
  putThinLines(context) {
    this.simulation.put_thin_lines(context);
  }

  /// The colour key of the canvas: `[{pieces: [{line: '#rrggbb'} | 'circle' | {text}]}]`.
  /// `tissue`: how segments below the conducting threshold are drawn (faint, hidden, veins).
  legend(colouring, tissue) {
    return this.simulation ? JSON.parse(this.simulation.legend_json(colouring, tissue)) : [];
  }

  /// `{length, pixels, label}` of a round scale bar about `targetPixels` long.
  scaleBar(pixelsPerUnit, targetPixels) {
    return JSON.parse(this.simulation.scale_bar_json(pixelsPerUnit, targetPixels));
  }

  /// The entry nearest to (x, y) in physical units within `reach`, or -1 (hidden tissue is
  /// never found).
  segmentAt(x, y, reach, tissue) {
    return this.simulation && this.count > 0 ? this.simulation.segment_at(x, y, reach, tissue) : -1;
  }

  /// The readings of entry `index`, one per line.
  reading(index) {
    return this.simulation.segment_reading(index);
  }

  /// The Horton plot and angle histogram as data to draw, with their summary in words.
  plots() {
    return JSON.parse(this.simulation.plots_json());
  }

  /// `1,234 of 5,000 cells, stopped: ...`.
  progressText() {
    return this.simulation ? this.simulation.progress_text() : '';
  }
}
