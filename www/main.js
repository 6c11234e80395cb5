// Page entry: opens the wasm session and wires the settings form, the growth loop, the canvas,
// the readings, exports and the run link in the URL fragment together. Holds no simulation or
// drawing rule: every parameter check, link, measurement, colour key, number and sentence about
// the run comes from Rust through the session (session.js).
import { NetworkView } from './draw.js';
import { AfterGrowth } from './passes.js';
import { ParameterForm } from './form.js';
import { showGuide } from './guide.js';
import { download, forgetRecord, keepRecord, keptRecord, renderPng } from './keep.js';
import { clearReadings, showReadings } from './readings.js';
import { Runner } from './runner.js';
import { Session } from './session.js';

const ANIMATE_KEY = 'ramulus.animate';
// How tissue is drawn, kept across visits: a view setting, never part of the run link.
const TISSUE_KEY = 'ramulus.tissue';
const DEFAULT_START = 'ovate-leaf';

const byId = (id) => document.getElementById(id);
const state = {
  link: '',
  session: null,
  frame: null,
  presets: [],
  colours: null,
  // The colour key on the page, as JSON: a key that has not changed is left in place, since
  // rebuilding it at every redraw made the browser lay the page out again before the next.
  shownLegend: null,
  // The picture being drawn a part at a time while animating: its milliseconds and parts so far.
  drawing: { ms: 0, parts: 0 },
  // page-ux: [x0, y0, x1, y1] of the network that Fit frames, or null for the lattice.
  networkBounds: null,
  /// The current run (the session's), for the page tests.
  get simulation() {
    return this.session?.simulation ?? null;
  },
};
let core;
let view;
let form;
let runner;
let afterGrowth;

async function start() {
  state.session = await Session.open();
  core = state.session.core;
  state.presets = JSON.parse(core.presets_json());
  state.colours = JSON.parse(core.colours_json());
  const schema = JSON.parse(core.schema_json());

  view = new NetworkView(byId('canvas'), state.session, state.colours);
  view.tissue = readTissuePreference();
  form = new ParameterForm(byId('form'), byId('param-seed'), schema, commitField);
  runner = new Runner({
    redraw, refill, draw, drawPart, segments: () => state.session.count, progress: showProgress, paused: onPaused, finished: onFinished, playing: showPlaying, failed: onFailure,
  });
  afterGrowth = new AfterGrowth(view);
  window.ramulusPage = { runner, view, state, afterGrowth };

  // ---- specimens (issue 10, page side): its own modules (specimen*.js), sharing the session;
  // a failure there leaves the rest of the page working ----
  import('./specimen.js')
    .then(({ startSpecimens }) => startSpecimens({ session: state.session, state }))
    .catch((error) => notice(`The specimen panel could not start: ${messageOf(error)}`));
  // ---- end of specimens ----
  // ---- drainage sites (issue 12, page side): site-panel.js and site-sketch.js ----
  import('./site-panel.js')
    .then(({ startSitePanel }) => startSitePanel({ session: state.session, state, view }))
    .catch((error) => notice(`The site panel could not start: ${messageOf(error)}`));
  // ---- end of drainage sites ----

  fillStartList();
  // page-ux: the guide, and the image-mask upload beside the mask field it sets.
  showGuide(byId('guide'), byId('guide-close'));
  byId('param-mask')?.closest('.field-block')?.after(byId('mask-file-row'));
  wireControls();
  wireCanvas();
  wireKeep();
  showKept();
  byId('animate').checked = readAnimatePreference();

  // A trap outside the growth loop (an event handler drawing or measuring) is recovered too.
  window.addEventListener('error', (event) => {
    if (Session.isTrap(event.error)) {
      event.preventDefault();
      onFailure(event.error);
    }
  });
  window.addEventListener('unhandledrejection', (event) => {
    if (Session.isTrap(event.reason)) {
      event.preventDefault();
      onFailure(event.reason);
    }
  });
  window.addEventListener('hashchange', () => {
    const fragment = location.hash.replace(/^#/, '');
    if (fragment && fragment !== state.link) openLink(fragment);
  });
  const fragment = location.hash.replace(/^#/, '');
  openLink(fragment || presetLink(DEFAULT_START));

  // ---- page fitting (issue 11): the fit panel, its logic in fit-panel.js ----------------
  import('./fit-panel.js')
    .then(({ mountFitPanel }) => mountFitPanel(byId('fit-panel'), {
      core,
      link: () => state.link,
      record: () => (state.simulation?.finished() ? state.simulation.record_json() : null),
      metrics: () => (state.simulation?.finished() ? state.simulation.metrics_json() : null),
      runLink: () => state.simulation?.link() ?? '',
    }))
    .catch((error) => notice(`The fit panel could not start: ${messageOf(error)}`));
  // ---- end of page fitting ----------------------------------------------------------------
}

// ---- run links ----------------------------------------------------------------------------

/// Opens a link: reports damaged fields, fills the form, writes the repaired link to the
/// address bar, and grows the run to its end (animated or not, as the user prefers).
function openLink(text) {
  clearNotices();
  form.clearErrors();
  const read = JSON.parse(core.read_link(text));
  for (const problem of read.problems) {
    const shown = problem.value === '' ? '' : ` = "${problem.value}"`;
    notice(`This link's field "${problem.key}"${shown} could not be used: ${problem.message}.`);
    form.setError(problem.field, `From the link: ${problem.message}.`);
  }
  applyLink(read.link, read.fields);
  startRun();
}

function applyLink(link, fields) {
  state.link = link;
  form.show(fields);
  history.replaceState(null, '', `#${link}`);
  byId('link-text').value = location.href;
  const match = state.presets.find((preset) => preset.link === link);
  byId('start-from').value = match ? match.name : '';
  byId('start-about').textContent = match ? match.description : 'Your own settings.';
}

function presetLink(name) {
  return (state.presets.find((preset) => preset.name === name) ?? state.presets[0]).link;
}

/// One field edited in the form: the core checks it; a rejected value stays in its field
/// with the message beside it, and the run is left as it was.
function commitField(key, text) {
  const result = JSON.parse(core.set_link_field(state.link, key, text));
  if (result.error) {
    form.clearError(key);
    const message = `${result.error.message}.`;
    const shownOnField = form.setError(result.error.field, message);
    if (result.error.field !== key) {
      form.setError(key, `This value does not fit with "${result.error.key}": ${message}`);
    } else if (!shownOnField) {
      notice(`${key}: ${message}`);
    }
    return;
  }
  form.clearErrors();
  clearNotices();
  applyLink(result.link, result.fields);
  startRun();
}

// ---- the run --------------------------------------------------------------------------------

function startRun(simulation = null) {
  runner.clear();
  afterGrowth.forget();
  state.session.setSimulation(null);
  if (!simulation) {
    // The core's estimate of the run's memory: a run past the ceiling would trap on its way.
    const memory = state.session.memoryNeeds(state.link);
    if (!memory.fits) {
      showNoRun(memory.message);
      form.setError('cells', memory.message);
      return;
    }
  }
  try {
    state.session.setSimulation(simulation ?? state.session.grow(state.link));
  } catch (error) {
    if (Session.isTrap(error)) {
      onFailure(error);
      return;
    }
    showNoRun(`The run cannot start: ${messageOf(error)}`);
    return;
  }
  state.frame = JSON.parse(state.simulation.frame_json());
  view.setFrame(state.frame);
  view.fit();
  showMarks(false);
  showCaution(state.frame.site);
  showTissueControl();
  byId('digest').textContent = 'growing…';
  byId('digest-note').textContent = '';
  clearReadings('Readings appear when growth pauses or ends.');
  setExports(false);
  byId('saved').textContent = '';
  const mode = byId('animate').checked ? 'animate' : 'quiet';
  runner.guarded(() => {
    runner.start(state.simulation, mode);
    if (state.simulation.finished()) onFinished();
  });
}

/// No run on the canvas: `message` says why, in the notices; the form and link stay as set.
function showNoRun(message) {
  state.networkBounds = null;
  runner.clear();
  afterGrowth.forget();
  state.session.setSimulation(null);
  notice(message);
  byId('digest').textContent = 'no run (see the message above)';
  byId('digest-note').textContent = '';
  byId('progress').value = 0;
  byId('progress-text').textContent = '';
  clearReadings('No run.');
  setExports(false);
  state.shownLegend = null;
  view.draw();
  showLegend();
}

/// Growing or drawing threw. A trap (wasm memory exhausted, or any other fault of the
/// instance) has killed the wasm instance: the page drops it with its run and starts a fresh
/// one, and says what happened; the form and the link keep what the user set.
function onFailure(error) {
  if (!Session.isTrap(error)) {
    showNoRun(`The run stopped: ${messageOf(error)}`);
    return;
  }
  // The last progress line shown; the dead instance is not asked.
  const progress = byId('progress-text').textContent;
  runner.clear();
  state.session.recover();
  showNoRun(core.trap_message(state.link, progress, messageOf(error)));
}

/// Refills the geometry from the run and draws it; returns the milliseconds both took.
function redraw() {
  return refill() + draw();
}

/// Refills the geometry from the run (only what growth changed; while a run grows, the nodes
/// grown since the last refill until `mostNodes` are to be recomputed); returns its
/// milliseconds.
function refill(mostNodes = Infinity) {
  const started = performance.now();
  const count = state.session.refill(mostNodes);
  view.dropPart();
  const refillMs = performance.now() - started;
  runner.record('refills', { refillMs, segments: count });
  return refillMs;
}

/// Draws the geometry as last refilled, and the colour key; returns its milliseconds.
function draw() {
  const started = performance.now();
  view.resize();
  view.draw();
  showLegend();
  const drawMs = performance.now() - started;
  runner.record('drawTimes', { drawMs, segments: state.session.count });
  return drawMs;
}

/// Works about `budgetMs` on drawing the geometry as last refilled (see NetworkView.drawPart);
/// returns `{ms, done, detail}`, done once the picture and colour key are on the page (`detail`:
/// where the part's time went, for the page benchmark).
function drawPart(budgetMs) {
  const started = performance.now();
  const done = view.drawPart(budgetMs);
  if (done) showLegend();
  const ms = performance.now() - started;
  state.drawing.ms += ms;
  state.drawing.parts += 1;
  if (done) {
    runner.record('drawTimes', { drawMs: state.drawing.ms, parts: state.drawing.parts, segments: state.session.count });
    state.drawing = { ms: 0, parts: 0 };
  }
  return { ms, done, detail: view.lastPart };
}

function showProgress() {
  const simulation = state.simulation;
  if (!simulation) return;
  const cells = simulation.cells();
  const budget = simulation.budget();
  // A finished run fills the bar, also when it stopped before its budget (the text says why).
  const finished = simulation.finished();
  byId('progress').max = budget;
  byId('progress').value = finished ? budget : cells;
  byId('progress-text').textContent = state.session.progressText();
}

// ---- page-ux: framing and root markers ----------------------------------------------------

/// Reads the network's extent and roots from the core; with `refit`, a view the user has not
/// zoomed or panned is fitted to the network.
function showMarks(refit) {
  if (!state.simulation) return;
  const marks = JSON.parse(state.simulation.marks_json());
  view.roots = marks.roots;
  state.networkBounds = framedBounds(marks.bounds);
  if (refit && view.fitted) view.fitTo(state.networkBounds);
  view.draw();
}

/// Bounds worth fitting to: a network at least a few cells across (a lone root would zoom to
/// a speck), else null (the lattice).
function framedBounds(bounds) {
  if (!bounds) return null;
  const least = 4 * (state.frame?.cell_size ?? 0);
  return Math.max(bounds[2] - bounds[0], bounds[3] - bounds[1]) >= least ? bounds : null;
}

function fitNetwork() {
  view.fitTo(state.networkBounds ?? null);
  view.draw();
}

// ---- end page-ux ----------------------------------------------------------------------------

function onPaused() {
  // The marks only: a paused run may grow on, past a view fitted to it now.
  showMarks(false);
  showReadingsNow();
  byId('digest').textContent = 'paused (the digest is shown when the run ends)';
  setExports(true);
}

function onFinished() {
  const simulation = state.simulation;
  if (!simulation) return;
  if (simulation.passes_pending()) {
    // The passes after growth run a slice at a time (passes.js); the network is shown as grown
    // meanwhile, then redrawn as they leave it, and the run ends on screen after them.
    showProgress();
    byId('digest').textContent = 'running the passes after growth…';
    clearReadings('Readings appear once the passes after growth end.');
    afterGrowth.run(simulation, state.frame?.site === true, () => {
      if (state.simulation !== simulation) return;
      // Stopped: the run now asks for the sweeps that ran; the form, the address and the link
      // to share say so (without growing the run again), so the link grows this network.
      if (JSON.parse(simulation.reshape_progress()).stopped) {
        const read = JSON.parse(core.read_link(simulation.link()));
        applyLink(read.link, read.fields);
      }
      runner.guarded(() => {
        redraw();
        onFinished();
      });
    });
    return;
  }
  // The runner has already redrawn the final network.
  showProgress();
  showMarks(true);
  showReadingsNow();
  const digest = simulation.digest();
  byId('digest').textContent = digest;
  const recorded = simulation.recorded_digest();
  if (recorded) {
    byId('digest-note').textContent = recorded === digest
      ? 'equals the digest saved in the record'
      : `differs from the digest saved in the record (${recorded})`;
  }
  setExports(true);
  // The site panel sizes a finished layout's channels.
  window.dispatchEvent(new CustomEvent('ramulus:finished'));
}

function showReadingsNow() {
  try {
    showReadings(state.session);
  } catch (error) {
    clearReadings(`Readings failed: ${messageOf(error)}`);
  }
}

function showPlaying(playing) {
  const button = byId('play');
  button.textContent = playing ? 'Hold' : 'Grow';
  button.setAttribute('aria-pressed', String(playing));
  if (playing) setExports(false);
}

function setExports(enabled) {
  for (const id of ['save-svg', 'save-png', 'save-record', 'save-csv']) byId(id).disabled = !enabled;
}

/// The tissue control, in the words of the run's kind (the core's), shown only when the run
/// has a conducting threshold (`vein_area` above 0), so that some segments may be tissue.
function showTissueControl() {
  const control = JSON.parse(core.tissue_control_json(Boolean(state.frame.site)));
  byId('tissue-label').textContent = control.label;
  const select = byId('tissue');
  const options = select.options;
  control.choices.forEach((choice, index) => {
    if (options[index]) {
      options[index].value = choice.value;
      options[index].textContent = choice.text;
    } else {
      const option = document.createElement('option');
      option.value = choice.value;
      option.textContent = choice.text;
      select.append(option);
    }
  });
  select.value = view.tissue;
  const threshold = Number(JSON.parse(state.simulation.params_json()).vein_area ?? 0);
  byId('tissue-pair').hidden = !(threshold > 0);
}

function showCaution(site) {
  const caution = byId('caution');
  caution.hidden = !site;
  caution.textContent = site ? `Caution: ${core.site_caution()}` : '';
  // Specimens are traced or cleared leaves: their panel is for leaves, not for site work.
  byId('specimens').hidden = site;
}

/// The core's colour key of what the canvas shows: strokes, markers and labels.
function showLegend() {
  const items = state.simulation ? state.session.legend(view.colouring, view.tissue) : [];
  const text = JSON.stringify(items);
  if (text === state.shownLegend) return;
  state.shownLegend = text;
  const legend = byId('legend');
  legend.replaceChildren();
  for (const item of items) {
    const entry = document.createElement('span');
    entry.className = 'swatch';
    for (const piece of item.pieces) {
      if (piece === 'circle') {
        const marker = document.createElement('i');
        marker.className = 'root-marker';
        entry.append(marker);
      } else if (piece.line) {
        const box = document.createElement('i');
        box.style.background = piece.line;
        entry.append(box);
      } else if (piece.text !== undefined) {
        const label = document.createElement('span');
        label.textContent = piece.text;
        entry.append(label);
      }
    }
    legend.append(entry);
  }
}

// ---- controls -------------------------------------------------------------------------------

function fillStartList() {
  const select = byId('start-from');
  const custom = document.createElement('option');
  custom.value = '';
  custom.textContent = '(your own settings)';
  custom.disabled = true;
  select.append(custom);
  for (const preset of state.presets) {
    const option = document.createElement('option');
    option.value = preset.name;
    option.textContent = preset.title ?? preset.name.replace('-', ' ');
    select.append(option);
  }
  select.addEventListener('change', () => {
    if (select.value) {
      clearNotices();
      form.clearErrors();
      openLink(presetLink(select.value));
    }
  });
}

function wireControls() {
  byId('play').addEventListener('click', () => runner.toggle());
  byId('step').addEventListener('click', () => runner.stepOnce());
  byId('restart').addEventListener('click', () => startRun());
  byId('pace').addEventListener('change', (event) => {
    runner.pace = Number(event.target.value);
  });
  byId('colouring').addEventListener('change', (event) => {
    // Same network, other colours: no need to refill the geometry.
    view.colouring = event.target.value;
    view.draw();
    showLegend();
  });
  byId('tissue').addEventListener('change', (event) => {
    // Same network, drawn otherwise: no refill, no new link.
    view.tissue = event.target.value;
    try {
      localStorage.setItem(TISSUE_KEY, view.tissue);
    } catch {
      // Without storage the choice lasts until the page closes.
    }
    view.draw();
    showLegend();
  });
  byId('animate').addEventListener('change', (event) => {
    try {
      localStorage.setItem(ANIMATE_KEY, event.target.checked ? 'yes' : 'no');
    } catch {
      // Without storage the choice lasts until the page closes.
    }
  });
  byId('new-seed').addEventListener('click', () => {
    const words = crypto.getRandomValues(new Uint32Array(2));
    // 53 bits, so the seed is also an exact JavaScript number wherever it is read.
    const seed = (words[0] & 0x1fffff) * 2 ** 32 + words[1];
    commitField('seed', String(seed));
  });
  byId('mask-file').addEventListener('change', async (event) => {
    const file = event.target.files[0];
    event.target.value = '';
    if (!file) return;
    const bytes = new Uint8Array(await file.arrayBuffer());
    const result = JSON.parse(core.set_link_mask(state.link, bytes));
    if (result.error) {
      notice(`${file.name}: ${result.error.message}`);
      return;
    }
    clearNotices();
    form.clearErrors();
    applyLink(result.link, result.fields);
    startRun();
  });
}

function wireCanvas() {
  const canvas = byId('canvas');
  const probe = byId('probe');
  new ResizeObserver(() => {
    view.resize();
    view.draw();
  }).observe(canvas);

  let drag = null;
  canvas.addEventListener('pointerdown', (event) => {
    drag = { x: event.clientX, y: event.clientY, moved: false };
    canvas.setPointerCapture(event.pointerId);
  });
  canvas.addEventListener('pointermove', (event) => {
    if (drag) {
      const dx = event.clientX - drag.x;
      const dy = event.clientY - drag.y;
      if (drag.moved || Math.hypot(dx, dy) > 3) {
        drag.moved = true;
        const ratio = view.ratio();
        view.pan(dx * ratio, dy * ratio);
        drag.x = event.clientX;
        drag.y = event.clientY;
        view.draw();
        probe.hidden = true;
      }
      return;
    }
    if (event.pointerType === 'mouse') showProbe(event);
  });
  canvas.addEventListener('pointerup', (event) => {
    if (drag && !drag.moved) showProbe(event);
    drag = null;
  });
  canvas.addEventListener('pointerleave', () => {
    if (!drag) probe.hidden = true;
  });
  canvas.addEventListener('wheel', (event) => {
    event.preventDefault();
    const rect = canvas.getBoundingClientRect();
    const ratio = view.ratio();
    view.zoom(Math.exp(-event.deltaY * 0.0015), (event.clientX - rect.left) * ratio, (event.clientY - rect.top) * ratio);
    view.draw();
  }, { passive: false });
  canvas.addEventListener('keydown', (event) => {
    const step = 40 * view.ratio();
    const actions = {
      '+': () => view.zoom(1.25),
      '=': () => view.zoom(1.25),
      '-': () => view.zoom(0.8),
      0: () => view.fitTo(state.networkBounds ?? null),
      ArrowLeft: () => view.pan(step, 0),
      ArrowRight: () => view.pan(-step, 0),
      ArrowUp: () => view.pan(0, step),
      ArrowDown: () => view.pan(0, -step),
    };
    const action = actions[event.key];
    if (action) {
      event.preventDefault();
      action();
      view.draw();
    }
  });
  byId('zoom-in').addEventListener('click', () => { view.zoom(1.25); view.draw(); });
  byId('zoom-out').addEventListener('click', () => { view.zoom(0.8); view.draw(); });
  byId('zoom-fit').addEventListener('click', fitNetwork);
}

/// Shows order, flow, width and length of the segment under the pointer.
function showProbe(event) {
  const probe = byId('probe');
  const canvas = byId('canvas');
  const rect = canvas.getBoundingClientRect();
  const x = event.clientX - rect.left;
  const y = event.clientY - rect.top;
  const index = view.segmentAt(x, y);
  if (index < 0) {
    probe.hidden = true;
    return;
  }
  probe.textContent = state.session.reading(index);
  probe.style.left = `${Math.min(x + 14, rect.width - 170)}px`;
  probe.style.top = `${Math.min(y + 14, rect.height - 80)}px`;
  probe.hidden = false;
}

// ---- keep and share -------------------------------------------------------------------------

function wireKeep() {
  byId('copy-link').addEventListener('click', async () => {
    const input = byId('link-text');
    input.value = location.href;
    try {
      await navigator.clipboard.writeText(location.href);
      byId('copy-link').textContent = 'Copied';
      setTimeout(() => { byId('copy-link').textContent = 'Copy link'; }, 1500);
    } catch {
      input.select();
      notice('Copying was not allowed here: the link is selected, copy it with the keyboard.');
    }
  });
  const name = (extension) => `ramulus-${state.simulation?.digest() ?? 'run'}.${extension}`;
  // page-ux: each export is confirmed with what was saved and its size (the core's sentence).
  const saved = (file, what, bytes) => {
    byId('saved').textContent = core.saved_text(file, what, bytes);
  };
  const trueSize = () => (state.frame.site ? 'drawing to a stated map scale' : 'drawing at true size');
  byId('save-svg').addEventListener('click', () => {
    guarded(() => {
      const file = name('svg');
      saved(file, trueSize(), download(file, state.simulation.svg(view.colouring, view.tissue), 'image/svg+xml'));
    });
  });
  byId('save-png').addEventListener('click', () => {
    const caution = state.frame.site ? core.site_caution() : '';
    const file = name('png');
    renderPng(state.session, state.frame, state.colours, view.colouring, caution, view.roots, view.tissue)
      .then((blob) => saved(file, 'picture', download(file, blob)))
      .catch((error) => notice(`PNG export failed: ${messageOf(error)}`));
  });
  byId('save-record').addEventListener('click', () => {
    guarded(() => {
      const file = name('json');
      saved(file, 'run record, reopens this run', download(file, state.simulation.record_json(), 'application/json'));
    });
  });
  byId('save-csv').addEventListener('click', () => {
    guarded(() => {
      const file = name('csv');
      saved(file, 'readings table', download(file, state.simulation.metrics_csv(), 'text/csv'));
    });
  });
  byId('record-file').addEventListener('change', async (event) => {
    const file = event.target.files[0];
    event.target.value = '';
    if (file) openRecord(await file.text(), file.name, true);
  });
  byId('open-stored').addEventListener('click', async () => {
    const kept = await keptRecord();
    if (kept) openRecord(kept.text, 'kept record', false);
  });
  byId('forget-stored').addEventListener('click', async () => {
    await forgetRecord();
    await showKept();
  });
}

async function openRecord(text, source, keep) {
  let simulation;
  try {
    simulation = state.session.restore(text);
  } catch (error) {
    notice(`${source}: not a run record this page can open: ${messageOf(error)}`);
    return;
  }
  clearNotices();
  form.clearErrors();
  const summary = `${source}, digest ${simulation.recorded_digest()}`;
  const link = simulation.link();
  if (link) {
    const read = JSON.parse(core.read_link(link));
    applyLink(read.link, read.fields);
  }
  startRun(simulation);
  if (keep) {
    const problem = await keepRecord(text, summary);
    if (problem) notice(problem);
    await showKept();
  }
}

async function showKept() {
  const kept = await keptRecord();
  byId('stored').textContent = kept
    ? `Kept in this browser: ${kept.summary} (kept ${kept.kept.slice(0, 16).replace('T', ' ')}).`
    : 'No run record kept in this browser.';
  byId('open-stored').hidden = !kept;
  byId('forget-stored').hidden = !kept;
}

// ---- messages -------------------------------------------------------------------------------

function notice(text) {
  const item = document.createElement('p');
  item.textContent = text;
  const dismiss = document.createElement('button');
  dismiss.type = 'button';
  dismiss.textContent = 'Dismiss';
  dismiss.addEventListener('click', () => item.remove());
  item.append(' ', dismiss);
  byId('notices').append(item);
}

function clearNotices() {
  byId('notices').replaceChildren();
}

function guarded(action) {
  try {
    action();
  } catch (error) {
    notice(`Export failed: ${messageOf(error)}`);
  }
}

function messageOf(error) {
  return error?.message ?? String(error);
}

function readAnimatePreference() {
  try {
    return localStorage.getItem(ANIMATE_KEY) !== 'no';
  } catch {
    return true;
  }
}

/// The tissue view kept from an earlier visit, or 'faint'; the core's words check it.
function readTissuePreference() {
  try {
    const kept = localStorage.getItem(TISSUE_KEY);
    return ['faint', 'hidden', 'veins'].includes(kept) ? kept : 'faint';
  } catch {
    return 'faint';
  }
}

start().catch((error) => {
  const message = document.createElement('p');
  message.textContent = `The page could not start: ${messageOf(error)}`;
  byId('notices').append(message);
});
