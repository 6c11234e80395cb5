// The specimen panel: loads a traced SVG, GeoJSON or CSV file (picker, drop on a drawing, or a
// demo in one click), has the core read, calibrate, repair and measure it
// (`measure_specimen`), shows it with its repairs marked and listed, lets the user set the
// scale (unit, factor, or two clicks a known length apart) and the root (a click), puts a
// cleared-leaf image under it at the calibrated scale, traces veins from that image
// (`trace_cleared_image`: thresholds, thinning and skeleton graph in the core) into a specimen
// measured like a traced file, with each step's picture shown under the drawing on request,
// and compares its measures with the
// current settings grown over several seeds (specimen-compare.js). Every text from a file
// reaches the page through `textContent` only; a file is refused by size before it is read;
// whatever fails here leaves the grown run on the page as it was.
import { growSeeds, seedLinks, SEED_COUNT } from './specimen-compare.js';
import { RunSnapshotView, sharedFit, SpecimenView } from './specimen-draw.js';

// Repairs listed one by one at most (all are marked on the drawing).
const LISTED_REPAIRS = 400;
// Largest image shown under a specimen, in pixels (common practice, no source: 64 megapixels
// is about the largest canvas bitmap browsers draw reliably).
const MAX_IMAGE_PIXELS = 64_000_000;
const IMAGE_TYPES = ['image/png', 'image/jpeg'];

const byId = (id) => document.getElementById(id);

/// Starts the panel. `session`: the page's wasm session; `state`: the page's state (link,
/// frame, current simulation).
export function startSpecimens({ session, state }) {
  const panel = new SpecimenPanel(session, state);
  window.ramulusSpecimens = panel;
  return panel;
}

class SpecimenPanel {
  constructor(session, state) {
    this.session = session;
    this.state = state;
    this.file = null; // {name, bytes}
    this.result = null; // the core's JSON for the file shown
    this.root = null; // [x, y] in file coordinates, or null for the core's default
    this.bar = null; // {from, to} in file coordinates
    this.mode = null; // 'root' | 'bar' while waiting for clicks
    this.picks = []; // scale bar ends clicked so far, in file coordinates
    this.runs = null; // {link, seeds, metrics: JSON text of an array, units}
    this.comparing = false;
    this.stopRequested = false;
    this.image = null; // {bitmap, name, millimetres (stated per pixel, or NaN), rgba (cached)}
    this.steps = {}; // step name -> ImageBitmap of the last trace's step
    this.step = 'photo';
    this.view = new SpecimenView(byId('specimen-canvas'), this.core);
    this.runView = new RunSnapshotView(byId('specimen-run-canvas'), this.core);
    this.wire();
    this.fillDemos();
    this.takeRunSnapshot();
    this.fitBoth();
  }

  /// The wasm module's functions (fresh after the session replaces a trapped instance).
  get core() {
    return this.session.core;
  }

  // ---- loading ----------------------------------------------------------------------------

  async fillDemos() {
    const holder = byId('specimen-demos');
    let names = [];
    try {
      const response = await fetch('specimens/index.json');
      if (response.ok) names = await response.json();
    } catch {
      // No demos served: the list stays empty and says so.
    }
    holder.replaceChildren();
    if (!Array.isArray(names) || names.length === 0) {
      holder.textContent = 'none served (./x build copies them)';
      return;
    }
    for (const name of names) {
      const button = document.createElement('button');
      button.type = 'button';
      button.textContent = name;
      button.dataset.demo = name;
      button.addEventListener('click', () => this.openDemo(name));
      holder.append(button);
    }
  }

  async openDemo(name) {
    try {
      const response = await fetch(`specimens/${encodeURIComponent(name)}`);
      if (!response.ok) throw new Error(`the page's server answered ${response.status}`);
      const blob = await response.blob();
      const file = new File([blob], name, { type: blob.type });
      await this.openFile(file);
    } catch (error) {
      if (isTrap(error)) throw error;
      this.showMessage(`Demo ${name} could not be fetched: ${messageOf(error)}.`);
    }
  }

  /// A file picked or dropped: an image goes under the drawing, anything else is a trace.
  async openFile(file) {
    if (IMAGE_TYPES.includes(file.type) || /\.(png|jpe?g)$/i.test(file.name)) {
      await this.openImage(file);
      return;
    }
    const refusal = this.core.specimen_size_refusal(file.size);
    if (refusal) {
      this.showMessage(`${file.name}: ${refusal}. The file was not read.`);
      return;
    }
    byId('specimen-status').textContent = `Reading ${file.name} (${file.size} bytes)…`;
    const bytes = new Uint8Array(await file.arrayBuffer());
    // A frame for the line above before the core works on a large file.
    await new Promise((resolve) => { requestAnimationFrame(() => setTimeout(resolve, 0)); });
    const previous = { file: this.file, root: this.root, bar: this.bar, picks: this.picks };
    this.file = { name: file.name, bytes };
    this.root = null;
    this.bar = null;
    this.picks = [];
    this.setMode(null);
    // A scale bar clicked on another file means nothing here: start from the file's scale.
    const scaleBefore = byId('specimen-scale').value;
    if (scaleBefore === 'bar') {
      byId('specimen-scale').value = 'file';
      this.showScaleRows();
    }
    if (!this.measure()) {
      byId('specimen-scale').value = scaleBefore;
      this.showScaleRows();
      // The file shown before (if any) stays, with its own settings.
      Object.assign(this, previous);
      if (this.result) this.showStatus();
      else byId('specimen-status').textContent = '';
      this.showMessage(`${file.name}: ${this.lastError}${this.file ? ` The specimen shown is still ${this.file.name}.` : ''}`);
    }
  }

  /// Asks the core for the specimen under the current settings; returns whether it could.
  measure() {
    if (!this.file) return false;
    const options = {
      units: byId('specimen-units').value,
      scale: this.scaleOption(),
      root: this.root,
      snap: this.snapOption(),
    };
    if (options.scale === undefined) {
      this.lastError = 'The scale bar is not set yet: click its two ends on the drawing.';
      return false;
    }
    const result = this.file.image
      ? this.traceImage(options)
      : JSON.parse(this.core.measure_specimen(this.file.bytes, JSON.stringify(options)));
    if (result.error) {
      this.lastError = `${result.error.message}.`;
      return false;
    }
    this.result = result;
    this.clearMessage();
    this.show();
    return true;
  }

  /// The snap tolerance as typed (the core reads it; empty for its default).
  snapOption() {
    return byId('specimen-snap').value;
  }

  /// The scale option for the core, or undefined while a scale bar is not complete.
  scaleOption() {
    const kind = byId('specimen-scale').value;
    if (kind === 'factor') return { factor: byId('specimen-factor').value };
    if (kind === 'bar') {
      if (!this.bar) return undefined;
      return { from: this.bar.from, to: this.bar.to, distance: byId('specimen-bar-length').value };
    }
    return 'file';
  }

  /// Re-measures after a setting changed; a rejected setting keeps the specimen shown.
  remeasure() {
    if (!this.file) {
      this.placeImage();
      this.fitBoth();
      return;
    }
    if (!this.measure() && this.lastError) {
      this.showMessage(`${this.file.name}: ${this.lastError} The specimen is shown as it was last measured.`);
    }
  }

  // ---- showing ----------------------------------------------------------------------------

  show() {
    const result = this.result;
    this.view.specimen = result;
    this.view.units = result.units;
    this.view.highlighted = -1;
    this.placeImage();
    this.showPicks();
    this.takeRunSnapshot();
    this.fitBoth();
    byId('specimen-caption').textContent = `Specimen: ${this.file.name} (${result.format})`;
    byId('specimen-root-default').disabled = this.root === null;
    byId('specimen-root-pick').disabled = false;
    byId('specimen-bar-pick').disabled = false;
    byId('specimen-bar-file').hidden = result.scale_bars.length === 0;
    this.showStatus();
    this.showRepairs();
    this.showNotes();
    this.showTable();
    this.updateCompareButton();
  }

  showStatus() {
    const result = this.result;
    const status = byId('specimen-status');
    status.replaceChildren();
    const line = (text) => {
      const item = document.createElement('span');
      item.textContent = text;
      status.append(item);
    };
    line(`${this.file.name}: ${result.format}, ${result.nodes} nodes, ${result.segments} segments, total length ${rowValue(result, 'total vein length')} ${result.units}.`);
    line(`Scale: ${result.calibration.rule}.`);
    for (const root of result.roots) line(`Root: ${root.message}.`);
    if (result.image) line(stepsText(result.image, this.core));
  }

  showRepairs() {
    const result = this.result;
    const kinds = byId('specimen-kinds');
    kinds.replaceChildren();
    let total = 0;
    for (const kind of result.kinds) {
      total += kind.count;
      const item = document.createElement('li');
      item.dataset.kind = kind.kind;
      // Each kind's markers can be hidden, so that thousands of one kind do not hide the rest.
      const label = document.createElement('label');
      const box = document.createElement('input');
      box.type = 'checkbox';
      box.checked = !this.view.hiddenKinds.has(kind.kind);
      box.disabled = kind.count === 0;
      box.addEventListener('change', () => {
        if (box.checked) this.view.hiddenKinds.delete(kind.kind);
        else this.view.hiddenKinds.add(kind.kind);
        this.view.draw();
      });
      const swatch = document.createElement('i');
      swatch.style.borderColor = kind.colour;
      const text = document.createElement('span');
      text.textContent = `${kind.label}: ${kind.count}`;
      label.append(box, swatch, text);
      item.append(label);
      if (kind.count === 0) item.classList.add('none');
      kinds.append(item);
    }
    byId('specimen-repair-summary').textContent = total === 0
      ? `No repairs were needed (snap tolerance ${this.core.specimen_number_text(result.snap_tolerance)} ${result.units}).`
      : `${total} repair${total === 1 ? '' : 's'} (snap tolerance ${this.core.specimen_number_text(result.snap_tolerance)} ${result.units}), each marked on the drawing with a ring of its kind's colour (untick a kind to hide its rings). Pick one in the list to see where it is.`;
    const list = byId('specimen-repairs');
    list.replaceChildren();
    const colours = Object.fromEntries(result.kinds.map((kind) => [kind.kind, kind.colour]));
    result.repairs.slice(0, LISTED_REPAIRS).forEach((repair, index) => {
      const item = document.createElement('li');
      const button = document.createElement('button');
      button.type = 'button';
      button.className = 'specimen-repair';
      button.style.borderLeftColor = colours[repair.kind] ?? '';
      button.textContent = repair.message;
      button.addEventListener('click', () => this.highlight(index));
      item.append(button);
      list.append(item);
    });
    if (result.repairs.length > LISTED_REPAIRS) {
      const item = document.createElement('li');
      item.textContent = `… the first ${LISTED_REPAIRS} of ${result.repairs.length} are listed; all are marked.`;
      list.append(item);
    }
  }

  /// Centres the drawing on repair `index` and rings it.
  highlight(index) {
    const repair = this.result.repairs[index];
    if (!repair) return;
    this.view.highlighted = index;
    const [x0, y0, x1, y1] = this.result.bounds;
    const span = Math.max(this.result.snap_tolerance * 30, Math.max(x1 - x0, y1 - y0) / 12);
    this.view.showPoint(repair.marker[0], repair.marker[1], span);
    this.view.draw();
    for (const [position, button] of [...byId('specimen-repairs').querySelectorAll('button')].entries()) {
      button.setAttribute('aria-current', String(position === index));
    }
    byId('specimen-status').dataset.highlighted = String(index);
  }

  showNotes() {
    const notes = byId('specimen-notes');
    notes.replaceChildren();
    for (const note of this.result.notes) {
      const item = document.createElement('li');
      item.textContent = note;
      notes.append(item);
    }
    for (const bar of this.result.scale_bars) {
      const item = document.createElement('li');
      item.textContent = `A scale bar is drawn in the file (${bar.element}); to scale by it, choose Scale from "a scale bar", type its length and press "Use the file's bar".`;
      notes.append(item);
    }
  }

  /// The specimen's measures, and the grown run's beside them once compared.
  showTable() {
    const result = this.result;
    const runs = this.runs;
    const comparison = JSON.parse(this.core.specimen_comparison_json(
      JSON.stringify(result.metrics),
      runs ? runs.metrics : '[]',
      result.units,
      runs ? runs.units : result.units,
    ));
    const body = byId('specimen-table').querySelector('tbody');
    body.replaceChildren();
    if (comparison.error) {
      this.showMessage(comparison.error.message);
      return;
    }
    byId('specimen-mean-head').textContent = runs ? `Run, mean of ${runs.seeds.length} seeds` : 'Run, mean';
    for (const row of comparison.rows) {
      const tr = document.createElement('tr');
      tr.dataset.key = row.key;
      const texts = runs ? row.texts : [row.texts[0], '', '', ''];
      for (const text of [row.label, ...texts, row.unit === '-' ? '' : row.unit]) {
        const cell = document.createElement('td');
        cell.textContent = text;
        tr.append(cell);
      }
      if (runs && row.difference !== null && Math.abs(row.difference) >= 2) tr.classList.add('far');
      body.append(tr);
    }
    const status = byId('specimen-compare-status');
    if (!runs) {
      status.textContent = `Press Compare to grow the current settings with ${SEED_COUNT} seeds; the spread is their seed-to-seed standard deviation.`;
    } else {
      const units = comparison.same_units ? '' : ` The specimen is in ${result.units} and the run in ${runs.units}: lengths and areas do not compare.`;
      status.textContent = `Grown run: the current settings with ${runs.seeds.length} seeds (${runs.seeds.join(', ')}). Spread: the sample standard deviation over those seeds; difference: (specimen − mean) / spread; rows 2 or more spreads apart are marked. The angle histogram and per-order streams are left out.${units}`;
    }
  }

  // ---- the grown run beside it --------------------------------------------------------------

  /// Copies the grown run's segments as last drawn (geometry views are never kept).
  takeRunSnapshot() {
    const simulation = this.state.simulation;
    const count = this.session.count;
    const frame = this.state.frame;
    if (!simulation || count === 0 || !frame) return;
    this.runView.snapshot = {
      ends: simulation.ends().slice(0, 4 * count),
      widths: simulation.widths().slice(0, count),
      count,
      width: frame.width,
      height: frame.height,
    };
    this.runView.units = frame.units;
    const seed = JSON.parse(this.core.read_link(this.state.link)).fields.seed;
    byId('specimen-run-caption').textContent = `Grown run: current settings, seed ${seed}`;
  }

  fitBoth() {
    sharedFit([this.view, this.runView]);
  }

  /// The grown run finished (its digest is shown): copy it, and drop a comparison made with
  /// other settings.
  runFinished() {
    this.takeRunSnapshot();
    this.fitBoth();
    if (this.runs && this.runs.link !== this.state.link) {
      this.runs = null;
      if (this.result) this.showTable();
    }
    this.updateCompareButton();
  }

  updateCompareButton() {
    byId('specimen-compare').disabled = this.comparing || !this.result || !this.state.link;
  }

  async compare() {
    if (this.comparing || !this.result) return;
    const link = this.state.link;
    const memory = this.session.memoryNeeds(link);
    if (!memory.fits) {
      this.showMessage(memory.message);
      return;
    }
    this.comparing = true;
    this.stopRequested = false;
    this.updateCompareButton();
    byId('specimen-compare-stop').hidden = false;
    const status = byId('specimen-compare-status');
    try {
      const links = seedLinks(this.core, link);
      const metrics = await growSeeds(
        this.core,
        links,
        (text) => { status.textContent = `Growing the current settings: ${text}`; },
        () => this.stopRequested || this.state.link !== link,
      );
      if (metrics) {
        this.runs = {
          link,
          seeds: links.map((entry) => entry.seed),
          metrics: `[${metrics.join(',')}]`,
          units: this.state.frame?.units ?? this.result.units,
        };
      }
      if (this.result) this.showTable();
      if (!metrics) status.textContent = 'Comparison stopped (or the settings changed); nothing was compared.';
    } catch (error) {
      if (isTrap(error)) throw error;
      status.textContent = `The comparison failed: ${messageOf(error)}`;
    } finally {
      this.comparing = false;
      byId('specimen-compare-stop').hidden = true;
      this.updateCompareButton();
    }
  }

  // ---- clicks: root and scale bar -----------------------------------------------------------

  setMode(mode) {
    this.mode = mode;
    byId('specimen-root-pick').setAttribute('aria-pressed', String(mode === 'root'));
    byId('specimen-bar-pick').setAttribute('aria-pressed', String(mode === 'bar'));
    byId('specimen-canvas').classList.toggle('picking', mode !== null);
    this.view.picking = mode !== null;
    this.view.draw();
    const prompt = {
      root: 'Click the root (petiole base) on the specimen drawing (or, with the drawing focused, move it under the cross with the arrow keys and press Enter).',
      bar: `Click the two ends of the scale bar on the specimen drawing (${this.picks.length} of 2; or arrow keys and Enter).`,
    }[mode];
    byId('specimen-canvas').dataset.mode = mode ?? '';
    if (prompt) this.showPrompt(prompt);
    else this.clearPrompt();
  }

  /// File coordinates of a point of the drawing (output units).
  toFile([x, y]) {
    const [sx, sy] = this.result.to_file;
    return [x * sx, y * sy];
  }

  toOutput([x, y]) {
    const [sx, sy] = this.result.to_file;
    return [x / sx, y / sy];
  }

  clicked(point) {
    if (!this.result || !this.mode) return;
    if (this.mode === 'root') {
      this.root = this.toFile(point);
      this.setMode(null);
      this.remeasure();
      return;
    }
    this.picks.push(this.toFile(point));
    if (this.picks.length < 2) {
      this.setMode('bar');
      this.showPicks();
      this.view.draw();
      return;
    }
    this.bar = { from: this.picks[0], to: this.picks[1] };
    this.setMode(null);
    byId('specimen-scale').value = 'bar';
    this.showScaleRows();
    this.remeasure();
  }

  showPicks() {
    this.view.picked = this.result ? this.picks.map((point) => this.toOutput(point)) : [];
  }

  showScaleRows() {
    const kind = byId('specimen-scale').value;
    byId('specimen-factor-row').hidden = kind !== 'factor';
    byId('specimen-bar-row').hidden = kind !== 'bar';
    byId('specimen-scale-hint').hidden = kind !== 'file';
  }

  // ---- cleared-leaf image -----------------------------------------------------------------

  async openImage(file) {
    const status = byId('specimen-image-status');
    const refusal = this.core.specimen_size_refusal(file.size);
    if (refusal) {
      this.showMessage(`${file.name}: ${refusal}. The image was not read.`);
      return;
    }
    let bitmap;
    try {
      // The browser decodes PNG and JPEG.
      bitmap = await createImageBitmap(file, { colorSpaceConversion: 'none', premultiplyAlpha: 'none' });
    } catch (error) {
      this.showMessage(`${file.name}: not an image this browser can decode (PNG or JPEG): ${messageOf(error)}.`);
      return;
    }
    if (bitmap.width * bitmap.height > MAX_IMAGE_PIXELS || bitmap.width === 0 || bitmap.height === 0) {
      this.showMessage(`${file.name}: ${bitmap.width} × ${bitmap.height} pixels; an image under the drawing may have 1 to ${MAX_IMAGE_PIXELS.toLocaleString('en')} pixels.`);
      bitmap.close();
      return;
    }
    // The browser drops a PNG's stated resolution; the core reads it from the chunk headers.
    const millimetres = this.core.cleared_image_stated_resolution(new Uint8Array(await file.arrayBuffer()));
    const before = this.image;
    this.image = { bitmap, name: file.name, millimetres, rgba: null };
    this.forgetSteps();
    this.placeImage();
    before?.bitmap.close();
    this.clearMessage();
    status.textContent = '';
    // The tracing box shows once there is an image to trace (a leaf tool: it stays out of a
    // drainage designer's way until asked for).
    byId('specimen-trace-box').hidden = false;
    byId('specimen-trace').disabled = false;
    byId('specimen-trace-status').textContent = '';
    // A new image under a trace of another image: the trace no longer matches it.
    if (this.file?.image) this.traceFromImage();
    else {
      this.placeImage();
      this.fitBoth();
    }
  }

  /// The image options for the core, from the trace controls.
  imageOptions() {
    const threshold = byId('specimen-trace-threshold').value === 'local'
      ? { window: byId('specimen-trace-window').value, offset: byId('specimen-trace-offset').value }
      : 'otsu';
    return {
      leaf: byId('specimen-trace-leaf').value,
      veins: byId('specimen-trace-veins').value,
      threshold,
      spur: byId('specimen-trace-spur').value,
      millimetres_per_pixel: Number.isFinite(this.image.millimetres) ? this.image.millimetres : null,
    };
  }

  /// The core's trace of the image under `options` (the calibration), as parsed JSON.
  traceImage(options) {
    const pixels = this.imageRgba();
    const started = performance.now();
    const text = this.core.trace_cleared_image(pixels.rgba, pixels.width, pixels.height, JSON.stringify({ ...options, image: this.imageOptions() }));
    this.lastTraceMilliseconds = performance.now() - started;
    this.forgetSteps();
    // The chosen step's picture of this trace, once the specimen is shown.
    if (this.step !== 'photo') setTimeout(() => this.showStep(), 0);
    return JSON.parse(text);
  }

  /// "Trace veins from the image": the image becomes the specimen (file coordinates are image
  /// pixels), measured, repaired and compared like a traced file.
  async traceFromImage() {
    if (!this.image) return;
    const status = byId('specimen-trace-status');
    status.textContent = `Tracing ${this.image.name}…`;
    // A frame for the line above before the core works on a large image.
    await new Promise((resolve) => { requestAnimationFrame(() => setTimeout(resolve, 0)); });
    const previous = { file: this.file, root: this.root, bar: this.bar, picks: this.picks };
    const fresh = !this.file?.image || this.file.name !== this.image.name;
    if (fresh) {
      this.file = { name: this.image.name, image: true };
      this.root = null;
      this.bar = null;
      this.picks = [];
      if (byId('specimen-scale').value === 'bar') {
        byId('specimen-scale').value = 'file';
        this.showScaleRows();
      }
    }
    this.setMode(null);
    if (byId('specimen-scale').value === 'file' && !Number.isFinite(this.image.millimetres)) {
      Object.assign(this, previous);
      status.textContent = 'Not traced.';
      this.showMessage(`${this.image.name} states no pixel size: choose Scale from "units per file unit" above and type the length of one image pixel, then trace again.`);
      return;
    }
    if (this.measure()) {
      status.textContent = `Traced in ${Math.round(this.lastTraceMilliseconds)} ms.`;
      byId('specimen-trace-step').disabled = false;
      return;
    }
    Object.assign(this, previous);
    status.textContent = 'Not traced.';
    this.showMessage(`${this.image.name}: ${this.lastError}${this.file ? ` The specimen shown is still ${this.file.name}.` : ''}`);
    if (!this.file?.image) byId('specimen-trace-step').disabled = true;
  }

  /// Drops the last trace's step pictures; the photo takes their place under the drawing
  /// before they are closed.
  forgetSteps() {
    const old = Object.values(this.steps);
    this.steps = {};
    if (old.includes(this.view.image?.bitmap)) this.placeImage();
    for (const bitmap of old) bitmap.close();
  }

  /// Puts the chosen step of the last trace under the drawing (the photo for "photo").
  async showStep() {
    this.step = byId('specimen-trace-step').value;
    if (this.step !== 'photo' && this.file?.image && !this.steps[this.step]) {
      const rgba = this.core.cleared_image_step_rgba(this.step);
      const { width, height } = this.image.bitmap;
      if (rgba.length === width * height * 4) {
        this.steps[this.step] = await createImageBitmap(new ImageData(new Uint8ClampedArray(rgba.buffer), width, height));
      }
    }
    this.placeImage();
    this.view.draw();
  }

  /// The image as the browser decoded it: `{width, height, rgba}` with four bytes per pixel,
  /// rows from the top (unpremultiplied RGBA, as `getImageData` gives). This is what the
  /// core's image pipeline (threshold, thinning, skeleton graph) takes once it is on the page.
  imageRgba() {
    if (!this.image) return null;
    if (this.image.rgba) return this.image.rgba;
    const { bitmap } = this.image;
    const canvas = new OffscreenCanvas(bitmap.width, bitmap.height);
    const context = canvas.getContext('2d', { willReadFrequently: true });
    context.drawImage(bitmap, 0, 0);
    const data = context.getImageData(0, 0, bitmap.width, bitmap.height).data;
    this.image.rgba = { width: bitmap.width, height: bitmap.height, rgba: new Uint8Array(data.buffer) };
    return this.image.rgba;
  }

  /// Puts the image under the drawing: its top left corner at the file's origin, one pixel
  /// the stated number of file units, through the specimen's calibration.
  placeImage() {
    if (!this.image) {
      this.view.image = null;
      return;
    }
    const pixel = Number(byId('specimen-image-pixel').value.trim());
    const status = byId('specimen-image-status');
    if (!(pixel > 0 && Number.isFinite(pixel))) {
      status.textContent = 'One image pixel must be a positive number of file units; the image is shown at 1.';
    }
    // A trace of the image is in image pixels: one pixel is one file unit.
    const traced = Boolean(this.file?.image);
    byId('specimen-image-pixel').disabled = traced;
    const filePerPixel = traced ? 1 : (pixel > 0 && Number.isFinite(pixel) ? pixel : 1);
    let unitsPerFileUnit;
    let units;
    if (this.result) {
      unitsPerFileUnit = 1 / Math.abs(this.result.to_file[0]);
      units = this.result.units;
    } else {
      const factor = Number(byId('specimen-factor').value);
      unitsPerFileUnit = byId('specimen-scale').value === 'factor' && factor > 0 ? factor : 1;
      units = byId('specimen-units').value;
      this.view.units = units;
    }
    const perPixel = filePerPixel * unitsPerFileUnit;
    const { bitmap: photo, name } = this.image;
    const step = traced && this.step !== 'photo' ? this.steps[this.step] : null;
    const bitmap = step ?? photo;
    this.view.image = { bitmap, x: 0, y: 0, width: photo.width * perPixel, height: photo.height * perPixel };
    const stated = Number.isFinite(this.image.millimetres) ? ` (the file states ${this.core.specimen_number_text(this.image.millimetres)} mm)` : '';
    const shownText = step ? `its ${byId('specimen-trace-step').selectedOptions[0].textContent.replace(/^the /, '')}` : 'the photo';
    status.textContent = `${name}: ${photo.width} × ${photo.height} pixels, each ${this.core.specimen_number_text(perPixel)} ${units}${stated}; ${shownText} under the drawing.${traced ? '' : ' Press "Trace veins from the image" to measure its veins.'}`;
  }

  // ---- messages ---------------------------------------------------------------------------

  showMessage(text) {
    const box = byId('specimen-message');
    box.textContent = text;
    box.hidden = false;
    box.dataset.kind = 'error';
  }

  showPrompt(text) {
    const box = byId('specimen-message');
    box.textContent = text;
    box.hidden = false;
    box.dataset.kind = 'prompt';
  }

  clearPrompt() {
    if (byId('specimen-message').dataset.kind === 'prompt') this.clearMessage();
  }

  clearMessage() {
    const box = byId('specimen-message');
    box.textContent = '';
    box.hidden = true;
    box.dataset.kind = '';
  }

  // ---- wiring -----------------------------------------------------------------------------

  wire() {
    byId('specimen-file').addEventListener('change', async (event) => {
      const file = event.target.files[0];
      event.target.value = '';
      if (file) await this.openFile(file);
    });
    byId('specimen-image').addEventListener('change', async (event) => {
      const file = event.target.files[0];
      event.target.value = '';
      if (file) await this.openImage(file);
    });
    for (const id of ['specimen-canvas', 'canvas', 'specimen-run-canvas']) {
      const target = byId(id);
      target.addEventListener('dragover', (event) => {
        if (event.dataTransfer?.types.includes('Files')) event.preventDefault();
      });
      target.addEventListener('drop', (event) => {
        const file = event.dataTransfer?.files[0];
        if (!file) return;
        event.preventDefault();
        if (id === 'canvas') byId('specimens').scrollIntoView({ behavior: 'smooth', block: 'start' });
        this.openFile(file);
      });
    }
    byId('specimen-units').addEventListener('change', () => this.remeasure());
    byId('specimen-scale').addEventListener('change', () => {
      this.showScaleRows();
      if (byId('specimen-scale').value === 'bar' && !this.bar) {
        if (this.result) {
          this.picks = [];
          this.setMode('bar');
        }
        return;
      }
      this.remeasure();
    });
    byId('specimen-factor').addEventListener('change', () => this.remeasure());
    byId('specimen-snap').addEventListener('change', () => this.remeasure());
    byId('specimen-bar-length').addEventListener('change', () => this.remeasure());
    byId('specimen-image-pixel').addEventListener('change', () => {
      this.placeImage();
      this.fitBoth();
    });
    byId('specimen-trace').addEventListener('click', () => this.traceFromImage());
    byId('specimen-trace-step').addEventListener('change', () => this.showStep());
    byId('specimen-trace-threshold').addEventListener('change', () => {
      byId('specimen-trace-local-row').hidden = byId('specimen-trace-threshold').value !== 'local';
    });
    // Changed image options trace again once an image has been traced.
    for (const id of ['specimen-trace-leaf', 'specimen-trace-veins', 'specimen-trace-threshold', 'specimen-trace-window', 'specimen-trace-offset', 'specimen-trace-spur']) {
      byId(id).addEventListener('change', () => {
        if (this.file?.image) this.traceFromImage();
      });
    }
    byId('specimen-bar-pick').addEventListener('click', () => {
      if (!this.result) return;
      this.picks = [];
      this.showPicks();
      this.view.draw();
      this.setMode(this.mode === 'bar' ? null : 'bar');
    });
    byId('specimen-bar-file').addEventListener('click', () => {
      const bar = this.result?.scale_bars[0];
      if (!bar) return;
      this.bar = { from: bar.from, to: bar.to };
      this.picks = [bar.from, bar.to];
      this.setMode(null);
      byId('specimen-scale').value = 'bar';
      this.showScaleRows();
      this.remeasure();
    });
    byId('specimen-root-pick').addEventListener('click', () => {
      if (!this.result) return;
      this.setMode(this.mode === 'root' ? null : 'root');
    });
    byId('specimen-root-default').addEventListener('click', () => {
      this.root = null;
      this.remeasure();
    });
    byId('specimen-fit').addEventListener('click', () => this.fitBoth());
    byId('specimen-compare').addEventListener('click', () => this.compare());
    byId('specimen-compare-stop').addEventListener('click', () => { this.stopRequested = true; });
    this.view.wire((point) => this.clicked(point));
    this.runView.wire(() => {});
    // The keyboard's way: arrows pan, + and - zoom, 0 fits; while picking, Enter or Space
    // picks the point under the cross in the middle of the drawing, Escape stops.
    const canvas = byId('specimen-canvas');
    canvas.addEventListener('keydown', (event) => {
      const view = this.view;
      const step = 40 * view.ratio();
      const actions = {
        '+': () => view.zoom(1.25),
        '=': () => view.zoom(1.25),
        '-': () => view.zoom(0.8),
        0: () => this.fitBoth(),
        ArrowLeft: () => view.pan(step, 0),
        ArrowRight: () => view.pan(-step, 0),
        ArrowUp: () => view.pan(0, step),
        ArrowDown: () => view.pan(0, -step),
        Escape: () => this.setMode(null),
        Enter: () => this.clicked(view.centre()),
        ' ': () => this.clicked(view.centre()),
      };
      const action = actions[event.key];
      if (!action || (!this.mode && ['Enter', ' ', 'Escape'].includes(event.key))) return;
      event.preventDefault();
      action();
      view.draw();
    });
    canvas.addEventListener('focus', () => { this.view.focused = true; this.view.draw(); });
    canvas.addEventListener('blur', () => { this.view.focused = false; this.view.draw(); });
    new ResizeObserver(() => this.fitBoth()).observe(byId('specimen-canvas'));
    // The page shows a finished run's digest (16 hex digits) in #digest: then the run is
    // copied beside the specimen.
    const digest = byId('digest');
    new MutationObserver(() => {
      if (/^[0-9a-f]{16}$/.test(digest.textContent)) this.runFinished();
    }).observe(digest, { childList: true, characterData: true, subtree: true });
  }
}

/// One line of each step's numbers of an image trace.
function stepsText(steps, core) {
  const threshold = steps.vein_threshold.otsu !== undefined
    ? `Otsu's threshold ${steps.vein_threshold.otsu}`
    : `local mean over ${steps.vein_threshold.local_mean.window} pixels minus ${core.specimen_number_text(steps.vein_threshold.local_mean.offset)}`;
  const width = steps.mean_vein_width_pixels === null ? 'n/a' : core.specimen_number_text(steps.mean_vein_width_pixels);
  return `Image steps: leaf ${steps.leaf_pixels} pixels (grey level ${steps.leaf_threshold}, ${steps.leaf_holes_filled} hole pixels filled); veins ${steps.vein_pixels} pixels (${threshold}); thinned in ${steps.thinning_iterations} passes to ${steps.skeleton_pixels} pixels; ${steps.spurs_pruned} twigs under ${core.specimen_number_text(steps.spur_length_pixels)} pixels dropped; ${steps.chains} vein pieces, ${steps.branch_points} branch points, ${steps.end_points} ends; mean vein width ${width} pixels.`;
}

/// Number text of one of the core's readings rows, by its label.
function rowValue(result, label) {
  return result.rows.find((row) => row[0] === label)?.[1] ?? 'n/a';
}

function isTrap(error) {
  return error instanceof WebAssembly.RuntimeError;
}

function messageOf(error) {
  return error?.message ?? String(error);
}
