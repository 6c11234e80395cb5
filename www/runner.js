// The growth loop: steps the simulation in slices that fit a frame budget, redraws as often as
// drawing cost allows, and reports progress, pauses and the end of the run. Keeps timing
// figures for the page benchmark. Reads no wasm memory (session.js does).

// Milliseconds of growth per animation frame (of about 16.7 ms at 60 frames a second), which
// leaves the rest of the frame for drawing and the browser (common practice, no source).
const STEP_BUDGET_MS = 8;
// Milliseconds of drawing per animation frame while animating: a picture that takes longer is
// spread over several frames, and growth gets what drawing leaves of STEP_BUDGET_MS.
const DRAW_BUDGET_MS = 6;
// Figures kept per list for the page benchmark (enough for any benchmark run).
const STATS_KEPT = 100000;
// Milliseconds a geometry refill aims at while a run grows (a refill takes the nodes grown
// since the last one, oldest first, until it has as many nodes to recompute, the new ones
// and those downstream, as this allows at the measured cost per node; the picture shows the
// run's first nodes until a later refill takes the rest), and the fewest nodes one may
// recompute (common practice for keeping frames short, no source).
const REFILL_BUDGET_MS = 5;
const MIN_REFILL_WORK = 1000;
// Milliseconds of growth between yields when growing without animation.
const QUIET_CHUNK_MS = 40;

export class Runner {
  /// `hooks`: `redraw()` (refill and draw; returns ms), `refill(mostNodes)` (new nodes until
  /// that many are to be recomputed; returns its ms), `segments()` (entries as last
  /// refilled), `draw()` (returns its ms), `drawPart(budgetMs)` (works about that long on
  /// drawing; returns `{ms, done, detail}`), `progress()`, `paused()`, `finished()`,
  /// `playing(bool)`, `failed(error)` (growing or drawing threw; the loop has stopped).
  constructor(hooks) {
    this.hooks = hooks;
    this.simulation = null;
    this.playingNow = false;
    this.msPerCell = 0.01;
    this.pace = 0; // cells per second; 0 = as fast as the frame budget allows
    this.carry = 0;
    this.lastTick = 0;
    this.lastDraw = 0;
    this.drawCostMs = 0;
    this.refillMs = 0;
    this.drawPending = false; // the geometry is refilled and waits for the coming frames' drawing
    this.drawingMs = 0; // drawing time so far of the pending picture
    this.refilledFinished = false; // the pending picture shows the run's last cell
    this.msPerRefillNode = 0; // a growing refill's cost per node recomputed, measured
    this.catchingUp = false; // growth has ended and the geometry still lags: refill only
    this.generation = 0;
    this.quiet = false; // growing to the end without drawing (see growQuietly)
    this.stats = freshStats();
  }

  get playing() {
    return this.playingNow;
  }

  /// Takes a new simulation; `mode` is `animate`, `quiet` (grow to the end without drawing
  /// in between) or `hold` (wait for the user).
  start(simulation, mode) {
    this.stop();
    this.quiet = false;
    this.generation += 1;
    this.simulation = simulation;
    this.msPerCell = 0.01;
    this.msPerRefillNode = 0;
    this.catchingUp = false;
    this.stats = freshStats();
    this.hooks.redraw();
    this.hooks.progress();
    if (mode === 'animate') this.play();
    else if (mode === 'quiet' && !simulation.finished()) this.growQuietly(this.generation);
  }

  play() {
    if (!this.simulation || this.simulation.finished() || this.quiet) return;
    this.drawPending = false;
    this.drawingMs = 0;
    this.refillMs = 0;
    this.catchingUp = false;
    this.playingNow = true;
    this.hooks.playing(true);
    this.lastTick = performance.now();
    this.carry = 0;
    const generation = this.generation;
    requestAnimationFrame((time) => this.guarded(() => this.tick(time, generation)));
  }

  pause() {
    if (!this.playingNow) return;
    this.stop();
    this.hooks.redraw();
    this.hooks.paused();
  }

  toggle() {
    if (this.playingNow) this.pause();
    else this.play();
  }

  stop() {
    this.playingNow = false;
    this.hooks.playing(false);
  }

  /// Stops and lets go of the simulation (a refused or dead run): nothing more is grown.
  clear() {
    this.stop();
    this.generation += 1;
    this.quiet = false;
    this.simulation = null;
  }

  /// Runs `action`; if it throws, stops the loop and hands the error to `failed`.
  guarded(action) {
    try {
      action();
    } catch (error) {
      this.clear();
      this.hooks.failed(error);
    }
  }

  /// Grows one slice (a fiftieth of the budget, at least one cell) and shows it.
  stepOnce() {
    const simulation = this.simulation;
    if (!simulation || simulation.finished()) return;
    this.stop();
    this.guarded(() => {
      simulation.step(Math.max(1, Math.round(simulation.budget() / 50)));
      this.hooks.redraw();
      this.hooks.progress();
      if (simulation.finished()) this.hooks.finished();
      else this.hooks.paused();
    });
  }

  /// One animation frame. A redraw is spread over several frames, the geometry refill in one
  /// and the drawing in the next ones (DRAW_BUDGET_MS each), and growth gets what the drawing
  /// or the refill leaves of its budget, so that no frame carries a refill and drawing
  /// together.
  tick(now, generation) {
    if (!this.playingNow || generation !== this.generation) return;
    const simulation = this.simulation;
    const frameStart = performance.now();
    let growthBudget = STEP_BUDGET_MS;
    // Where this frame's time goes, for the page benchmark's slowest frames.
    const parts = { drawMs: 0, stepMs: 0, refillMs: 0 };
    const drewThisFrame = this.drawPending;
    if (this.drawPending) {
      // Test hook (tests/e2e/frames.test.mjs): a smaller budget, so pictures take many parts.
      const budget = globalThis.ramulusTestHooks?.drawBudgetMs ?? DRAW_BUDGET_MS;
      const { ms, done, detail } = this.hooks.drawPart(budget);
      parts.drawMs = ms;
      parts.drawDetail = detail;
      this.drawingMs += ms;
      growthBudget -= ms;
      if (done) {
        this.drawPending = false;
        this.drawCostMs = this.refillMs + this.drawingMs;
        this.drawingMs = 0;
        this.lastDraw = performance.now();
        this.stats.draws += 1;
        // Growth goes on while a picture is drawn: the run has ended on screen only when the
        // geometry drawn was refilled after the last cell.
        if (this.refilledFinished) {
          this.endFrame(frameStart, simulation, parts);
          this.stop();
          this.hooks.finished();
          return;
        }
      }
    }
    // Redraw when drawing has had its share (at most a third of the time goes to it): this
    // frame grows what the last refill's time leaves of the budget, then refills. A frame
    // that finished a picture leaves the refill to the next one, so no frame carries drawing
    // and a refill together.
    const refillNow = !this.drawPending && !drewThisFrame
      && (simulation.finished() || this.catchingUp
        || now - this.lastDraw >= Math.min(3 * this.drawCostMs, 1000));
    if (refillNow) growthBudget -= this.refillMs;
    let allowance = Infinity;
    if (this.pace > 0) {
      this.carry += (this.pace * Math.min(now - this.lastTick, 100)) / 1000;
      allowance = Math.floor(this.carry);
      this.carry -= allowance;
    }
    this.lastTick = now;
    // Each slice is sized from the measured time per cell so that the frame's growth ends
    // inside its budget; the estimate follows the run as its cells get dearer.
    const growthStart = performance.now();
    let added = 0;
    while (!simulation.finished() && added < allowance) {
      const left = growthBudget - (performance.now() - growthStart);
      if (left <= 0.5) break;
      const count = Math.max(1, Math.min(allowance - added, Math.floor(left / this.msPerCell)));
      const sliceStart = performance.now();
      const grown = simulation.step(count);
      added += grown;
      if (grown > 0) {
        const perCell = (performance.now() - sliceStart) / grown;
        this.msPerCell = 0.7 * this.msPerCell + 0.3 * Math.max(perCell, 1e-5);
      }
    }
    const stepMs = performance.now() - growthStart;
    parts.stepMs = stepMs;
    this.stats.frames += 1;
    this.stats.cells += added;
    this.stats.stepMs += stepMs;
    this.stats.maxStepMs = Math.max(this.stats.maxStepMs, stepMs);
    if (stepMs > 16.7) this.stats.overBudget += 1;
    if (this.stats.firstTick === 0) this.stats.firstTick = frameStart;
    this.stats.lastTick = performance.now();
    if (refillNow) {
      const before = this.hooks.segments();
      const limit = this.msPerRefillNode > 0
        ? Math.max(MIN_REFILL_WORK, Math.floor(REFILL_BUDGET_MS / this.msPerRefillNode))
        : Infinity;
      // Growth over, nothing competes with the refill: twice the share.
      const most = simulation.finished() ? 2 * limit : limit;
      const refillMs = this.hooks.refill(most);
      const work = simulation.refill_work();
      if (work > 0 && before > 0 && this.hooks.segments() > before) {
        const perNode = refillMs / work;
        this.msPerRefillNode = this.msPerRefillNode > 0 ? 0.7 * this.msPerRefillNode + 0.3 * perNode : perNode;
      }
      parts.refillMs = refillMs;
      const behind = simulation.geometry_behind();
      this.refilledFinished = simulation.finished() && !behind;
      // Growth has ended but the geometry lags: refill again next frame before drawing.
      this.catchingUp = simulation.finished() && behind;
      if (!this.catchingUp) {
        this.refillMs = refillMs;
        this.drawPending = true;
      }
    } else if (simulation.finished()) {
      // Growth has just stopped: the coming frames refill and draw the final network.
      this.lastDraw = -Infinity;
    }
    this.endFrame(frameStart, simulation, parts);
    requestAnimationFrame((time) => this.guarded(() => this.tick(time, generation)));
  }

  /// Adds one figure to the benchmark's list `name` (the first 100,000 of a run are kept).
  record(name, figure) {
    const list = this.stats[name];
    if (list.length < STATS_KEPT) list.push(figure);
  }

  endFrame(frameStart, simulation, parts) {
    const progressStart = performance.now();
    this.hooks.progress();
    const end = performance.now();
    this.record('frameTimes', {
      ms: end - frameStart, cells: simulation.cells(), progressMs: end - progressStart, ...parts,
    });
  }

  growQuietly(generation) {
    const simulation = this.simulation;
    this.quiet = true;
    const chunk = () => {
      if (generation !== this.generation) return;
      const started = performance.now();
      while (!simulation.finished() && performance.now() - started < QUIET_CHUNK_MS) {
        simulation.step(4096);
      }
      this.hooks.progress();
      if (simulation.finished()) {
        this.quiet = false;
        this.hooks.redraw();
        this.hooks.finished();
      } else {
        setTimeout(() => this.guarded(chunk), 0);
      }
    };
    setTimeout(() => this.guarded(chunk), 0);
  }
}

/// Figures of the page benchmark: per animation frame its whole work in milliseconds
/// (growth, refill or drawing, progress), per geometry refill and per drawing.
function freshStats() {
  return {
    frames: 0, cells: 0, stepMs: 0, maxStepMs: 0, overBudget: 0, draws: 0, firstTick: 0, lastTick: 0,
    frameTimes: [], refills: [], drawTimes: [],
  };
}
