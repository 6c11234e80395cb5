// The passes after growth (channel energy sweeps on a site, junction relaxation and loops on a
// leaf), run a slice at a time once growth stops, so the page keeps painting between slices;
// sweeps and the loop pass run in parts, so the page answers within a slice, and a Stop control
// keeps the network as the last whole sweep left it (loops, once started, run to the end). The
// status line and the figures come from Rust (`Simulation::reshape_step`); this module only
// schedules the slices, lists the per-sweep figures and draws the loops as they close
// (`Simulation::loop_lines`) over the network as grown, until the passes end.

// Milliseconds of work per slice: a slice runs parts of sweeps (a few hundred nodes or
// junctions each) or of the loop pass (a few dozen free ends), at least one part, until this
// has passed, so a slice ends within about one part after it (common practice for keeping a
// page responsive, no source).
const SLICE_BUDGET_MS = 40;

// The colour of loop walls drawn as they close, and their width in CSS pixels: apart from the
// order colours (Okabe & Ito) so new walls stand out; the status line names it.
const LOOP_INK = '#d1007a';
const LOOP_WIDTH_PX = 1.25;

const byId = (id) => document.getElementById(id);

export class AfterGrowth {
  /// `view`: the network view (draw.js) the loops are drawn on as they close.
  constructor(view) {
    this.view = view;
    this.simulation = null;
    this.generation = 0;
    // The loop walls closed so far (Float32Array chunks of x0, y0, x1, y1) and their count.
    this.loopLines = [];
    this.loopCount = 0;
    byId('passes-stop').addEventListener('click', () => this.stop());
  }

  /// Runs the pending passes of `simulation` a slice at a time; calls `done()` once they have
  /// ended (not when the run has been replaced meanwhile).
  run(simulation, site, done) {
    this.generation += 1;
    const generation = this.generation;
    this.simulation = simulation;
    // For the page benchmark (tests/e2e/bench-page.mjs): when the passes began.
    this.startedAt = performance.now();
    this.site = site;
    byId('passes-row').hidden = false;
    byId('passes-stop').hidden = false;
    byId('passes-stop').disabled = false;
    byId('passes-stop').textContent = site ? 'Stop the sweeps' : 'Stop';
    this.showFigures(null);
    this.loopLines = [];
    this.loopCount = 0;
    // A whole redraw meanwhile (zoom, pan, resize) keeps the loops closed so far.
    this.view.overlays.set('loops-forming', (ctx, place) => this.strokeLoops(ctx, place, this.loopLines));
    const slice = () => {
      if (generation !== this.generation || this.simulation !== simulation) return;
      let progress;
      try {
        progress = JSON.parse(simulation.reshape_step(SLICE_BUDGET_MS));
      } catch (error) {
        this.forget();
        byId('passes-text').textContent = `The passes after growth failed: ${error?.message ?? error}`;
        return;
      }
      this.show(progress);
      // The loops closed in this slice (none outside the loop pass, and none once done).
      if (!progress.done) this.drawNewLoops(simulation);
      if (progress.done) {
        // The line stays with the passes' outcome; nothing is left to stop. The finished
        // network, redrawn by `done`, holds the loops.
        byId('passes-stop').hidden = true;
        this.simulation = null;
        this.dropLoops();
        done();
        return;
      }
      // Let the browser paint the new status before the next slice.
      requestAnimationFrame(() => setTimeout(slice, 0));
    };
    requestAnimationFrame(() => setTimeout(slice, 0));
  }

  /// Stops the sweeps (a sweep stopped midway is taken back); the next slice ends the passes.
  stop() {
    if (!this.simulation) return;
    this.show(JSON.parse(this.simulation.reshape_stop()));
    byId('passes-stop').disabled = true;
  }

  /// Draws the loop walls closed since the last slice straight onto the canvas, over the
  /// picture already there (no whole redraw per slice).
  drawNewLoops(simulation) {
    const lines = simulation.loop_lines(this.loopCount);
    if (lines.length === 0) return;
    this.loopLines.push(lines);
    this.loopCount += lines.length / 4;
    const view = this.view;
    const ctx = view.context;
    ctx.save();
    ctx.setTransform(1, 0, 0, 1, 0, 0);
    this.strokeLoops(ctx, { scale: view.scale, offsetX: view.offsetX, offsetY: view.offsetY, ratio: view.ratio() }, [lines]);
    ctx.restore();
  }

  /// Strokes `chunks` of loop walls in the network's frame placed by `place`.
  strokeLoops(ctx, { scale, offsetX, offsetY, ratio }, chunks) {
    ctx.strokeStyle = LOOP_INK;
    ctx.lineWidth = LOOP_WIDTH_PX * ratio;
    ctx.lineCap = 'round';
    ctx.beginPath();
    for (const lines of chunks) {
      for (let k = 0; k < lines.length; k += 4) {
        ctx.moveTo(lines[k] * scale + offsetX, lines[k + 1] * scale + offsetY);
        ctx.lineTo(lines[k + 2] * scale + offsetX, lines[k + 3] * scale + offsetY);
      }
    }
    ctx.stroke();
  }

  /// Forgets the loops drawn as they formed.
  dropLoops() {
    this.loopLines = [];
    this.loopCount = 0;
    this.view.overlays.delete('loops-forming');
  }

  /// Drops the passes of a run that is being replaced (a new run, a reset).
  forget() {
    this.generation += 1;
    this.simulation = null;
    this.dropLoops();
    byId('passes-row').hidden = true;
    byId('site-energy').hidden = true;
  }

  show(progress) {
    byId('passes-text').textContent = progress.text;
    // Loops run to the end once started (a pass stopped halfway would close loops no link
    // asks for): Stop leaves once they begin, and the status line says so.
    if (progress.stage === 'loops') byId('passes-stop').hidden = true;
    this.showFigures(progress);
  }

  /// The per-sweep figures of a site's channel energy pass, in the site panel.
  showFigures(progress) {
    const box = byId('site-energy');
    const log = (progress?.log ?? []).filter((figure) => figure.pass === 'energy');
    if (!this.site || !progress || (log.length === 0 && !progress.energy)) {
      box.hidden = true;
      return;
    }
    box.hidden = false;
    const energy = progress.energy;
    byId('site-energy-summary').textContent = energy
      ? `Channel energy before \u2192 after: ${fmt(energy.before)} \u2192 ${fmt(energy.after)}`
        + ` (${percent(energy.before, energy.after)})${progress.stopped ? ', stopped by you' : ''}.`
      : '';
    const body = byId('site-energy-sweeps').querySelector('tbody');
    body.replaceChildren();
    let previous = energy?.before ?? 0;
    log.forEach((figure, index) => {
      const row = document.createElement('tr');
      const cells = [
        String(index + 1),
        fmt(figure.sum),
        percent(previous, figure.sum),
        figure.moved.toLocaleString('en'),
        `${Math.round(figure.ms).toLocaleString('en')} ms`,
      ];
      for (const text of cells) {
        const cell = document.createElement('td');
        cell.textContent = text;
        row.append(cell);
      }
      body.append(row);
      previous = figure.sum;
    });
  }
}

function fmt(value) {
  return String(Number(Number(value).toPrecision(6)));
}

/// The change from `before` to `after` in per cent, signed.
function percent(before, after) {
  if (!(before > 0)) return '';
  const change = (100 * (after - before)) / before;
  return `${change <= 0 ? '\u2212' : '+'}${Math.abs(change).toFixed(2)} %`;
}
