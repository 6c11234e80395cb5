// The drainage-site panel: a site comes from a file, the demo or the sketch; "Grow" turns it
// into a run link (the core reads the site file and names what is wrong), and when the run ends
// the core sizes every channel for the design storm the designer enters. Every rule, default,
// number format and sentence is the core's; this module moves values between the form and it.
import { download } from './keep.js';
import { SiteSketch, TOOLS, shapesFromGeojson } from './site-sketch.js';

const DEMO_SITE = 'sites/community-garden.geojson';
// Rows of the schedule shown on the page; the CSV holds them all.
const SHOWN_ROWS = 300;

const byId = (id) => document.getElementById(id);

/// Starts the panel. `state`: the page's state (its simulation and frame); `session`: the wasm
/// session.
export function startSitePanel({ session, state, view }) {
  const panel = new SitePanel(session, state, view);
  window.ramulusSite = panel;
  return panel;
}

// Colours of what the panel lays over the layout's picture: the areas kept clear (grey, as
// on the sketch), the parts no outlet reaches (the plan's warning orange) and the natural flow
// on the bare ground (a faint blue-grey).
const KEPT_CLEAR_FILL = 'rgba(150, 150, 145, 0.55)';
const KEPT_CLEAR_INK = '#55554f';
const UNREACHED_FILL = 'rgba(251, 227, 200, 0.75)';
const UNREACHED_INK = '#b35900';
const GROUND_FLOW_INK = 'rgba(70, 110, 140, 0.55)';
// Line widths in CSS pixels of the four classes of ground flow (by the area draining through).
const GROUND_FLOW_WIDTHS = [0.6, 1.0, 1.6, 2.4];

class SitePanel {
  constructor(session, state, view) {
    this.session = session;
    this.state = state;
    this.view = view;
    // What was laid over the picture, and for which run: {simulation, parts} and
    // {simulation, lines}.
    this.unreached = null;
    this.groundFlow = null;
    // The run's areas kept clear, drawn under the others whenever a site is shown:
    // {simulation, text, list}.
    this.keptClear = null;
    this.view.overlays.set('kept-clear', (ctx, place) => this.drawKeptClear(ctx, place));
    this.core = session.core;
    this.sized = null;
    this.siteText = null;
    byId('site-caution').textContent = `Caution: ${this.core.site_caution()}`;
    this.surfaces = JSON.parse(this.core.runoff_surfaces_json());
    this.sketch = new SiteSketch(byId('site-canvas'), () => this.showFeatures());
    this.sketch.pointProperties = (role) => (role === 'outlet'
      ? { name: byId('site-outlet-name').value.trim() || 'outlet' }
      : { elevation: Number(byId('site-level-z').value) });
    this.sketch.zoneProperties = () => ({
      surface: byId('site-zone-surface').selectedOptions[0]?.dataset.surface ?? 'zone',
      runoff_coefficient: Number(byId('site-zone-c').value),
    });
    this.sketch.obstacleProperties = () => ({ name: byId('site-obstacle-name').value.trim() || 'kept clear' });
    this.fillSurfaces();
    this.setSystem('si');
    this.wire();
    this.showFeatures();
  }

  // ---- the form --------------------------------------------------------------------------

  fillSurfaces() {
    const select = byId('site-zone-surface');
    select.replaceChildren();
    for (const surface of this.surfaces) {
      const option = document.createElement('option');
      option.value = String(surface.coefficient);
      option.dataset.surface = surface.surface;
      option.textContent = `${surface.surface} (${surface.coefficient.toFixed(2)})`;
      select.append(option);
    }
    byId('site-zone-c').value = select.value;
  }

  /// Unit labels and the defaults of the chosen unit system, from the core.
  setSystem(system) {
    const defaults = JSON.parse(this.core.drainage_defaults_json(system));
    for (const element of document.querySelectorAll('.site-panel [data-unit]')) {
      element.textContent = defaults.units[element.dataset.unit] ?? '';
    }
    byId('site-pipes').value = defaults.pipe_sizes.join(', ');
    byId('site-v-min').value = String(defaults.velocity_min);
    byId('site-v-max').value = String(defaults.velocity_max);
  }

  wire() {
    for (const radio of document.querySelectorAll('input[name="site-tool"]')) {
      radio.addEventListener('change', () => this.setTool(radio.value));
    }
    byId('site-zone-surface').addEventListener('change', (event) => { byId('site-zone-c').value = event.target.value; });
    byId('site-snap').addEventListener('change', (event) => { this.sketch.snap = Number(event.target.value) || 0; });
    byId('site-close').addEventListener('click', () => {
      if (!this.sketch.closeDraft()) this.message('A shape needs at least three corners before it can close.');
    });
    byId('site-undo').addEventListener('click', () => this.sketch.undo());
    byId('site-units').addEventListener('change', (event) => this.setSiteUnits(event.target.value));
    byId('site-system').addEventListener('change', (event) => { this.setSystem(event.target.value); this.resize(); this.showUnreached(); });
    byId('site-rain-kind').addEventListener('change', (event) => {
      byId('site-intensity-row').hidden = event.target.value !== 'constant';
      byId('site-idf-row').hidden = event.target.value !== 'idf';
    });
    byId('site-conveyance').addEventListener('change', () => this.resize());
    byId('site-demo').addEventListener('click', () => this.openDemo());
    byId('site-blank').addEventListener('click', () => {
      const width = Number(byId('site-blank-width').value);
      const height = Number(byId('site-blank-height').value);
      if (!(width > 0 && height > 0)) {
        this.message('A blank site needs a width and a height above 0.');
        return;
      }
      this.sketch.blank(width, height, byId('site-units').value);
    });
    byId('site-file').addEventListener('change', async (event) => {
      const file = event.target.files?.[0];
      if (file) this.openText(await file.text(), file.name);
      event.target.value = '';
    });
    byId('site-svg-file').addEventListener('change', async (event) => {
      const file = event.target.files?.[0];
      if (file) this.openSvg(await file.text(), file.name);
      event.target.value = '';
    });
    byId('site-grow').addEventListener('click', () => this.grow());
    byId('site-size').addEventListener('click', () => this.resize(true));
    byId('site-ground-flow').addEventListener('change', () => this.showGroundFlow());
    window.addEventListener('ramulus:finished', () => this.runEnded());
    byId('site-save-plan').addEventListener('click', () => this.save('svg', 'plan drawing to a stated map scale',
      () => this.state.simulation.drainage_plan_svg(this.rulesText(), this.siteTextFor()), 'image/svg+xml'));
    byId('site-save-csv').addEventListener('click', () => this.save('csv', 'channel schedule',
      () => this.state.simulation.drainage_csv(this.rulesText()), 'text/csv'));
    byId('site-save-geojson').addEventListener('click', () => this.save('geojson', 'channels with their flows and sizes',
      () => this.state.simulation.drainage_geojson(this.rulesText()), 'application/geo+json'));
    byId('site-save-site').addEventListener('click', () => {
      const text = JSON.stringify(this.sketch.geojson(), null, 1);
      const file = 'ramulus-site.geojson';
      byId('site-saved').textContent = this.core.saved_text(file, 'site file', download(file, text, 'application/geo+json'));
    });
  }

  setTool(tool) {
    this.sketch.tool = tool;
    this.sketch.draft = [];
    this.sketch.draw();
    byId('site-obstacle-row').hidden = tool !== 'obstacle';
    byId('site-zone-row').hidden = tool !== 'zone';
    byId('site-level-row').hidden = tool !== 'level';
    byId('site-outlet-row').hidden = tool !== 'outlet';
  }

  setSiteUnits(units) {
    this.sketch.units = units;
    for (const id of ['site-level-unit', 'site-snap-unit', 'site-cell-unit']) byId(id).textContent = units;
    this.sketch.emit();
  }

  // ---- opening a site --------------------------------------------------------------------

  async openDemo() {
    try {
      const response = await fetch(DEMO_SITE);
      if (!response.ok) throw new Error(`the demo site could not be loaded (${response.status})`);
      this.openText(await response.text(), 'community-garden.geojson');
    } catch (error) {
      this.message(`The demo site could not be opened: ${error.message ?? error}`);
    }
  }

  /// A site file's text: the core checks it first and names what is wrong; a good file fills
  /// the sketch.
  openText(text, name) {
    const checked = JSON.parse(this.core.site_summary_json(text));
    if (checked.error) {
      this.message(`${name}: ${checked.error}`);
      return;
    }
    this.message('');
    const { units, shapes, groundRunoff } = shapesFromGeojson(JSON.parse(text));
    if (Number.isFinite(groundRunoff)) byId('site-ground-c').value = String(groundRunoff);
    byId('site-units').value = units;
    this.setSiteUnits(units);
    this.sketch.load(shapes, units);
    byId('site-status').textContent = `${name}: ${checked.summary}`;
  }

  /// A site plan drawn as SVG: the core reads it at the scale given and hands back the same
  /// site as a site file, or names the element and line that is wrong.
  openSvg(text, name) {
    const scale = byId('site-svg-scale').value;
    if (scale.trim() === '') {
      this.message(`${name}: give the plan's scale first (1:200 with the drawing's width in mm, or "0.05 m per unit").`);
      return;
    }
    const read = JSON.parse(this.core.site_svg_json(text, scale));
    if (read.error) {
      this.message(`${name}: ${read.error}`);
      return;
    }
    this.openText(read.geojson, `${name} at ${scale.trim()}`);
  }

  showFeatures() {
    const list = byId('site-features');
    list.replaceChildren();
    this.sketch.features.forEach((feature, index) => {
      const item = document.createElement('li');
      const text = document.createElement('span');
      text.textContent = describe(feature, this.sketch.units);
      const remove = document.createElement('button');
      remove.type = 'button';
      remove.textContent = 'Remove';
      remove.setAttribute('aria-label', `Remove ${describe(feature, this.sketch.units)}`);
      remove.addEventListener('click', () => this.sketch.remove(index));
      item.append(text, ' ', remove);
      list.append(item);
    });
    if (this.sketch.features.length === 0) {
      const item = document.createElement('li');
      item.textContent = 'Nothing yet: open a site file, the demo, or draw the outline.';
      list.append(item);
    }
  }

  // ---- growing and sizing ----------------------------------------------------------------

  /// The sketch as a run link; the page opens it (through the address bar) and grows it.
  grow() {
    const ground = byId('site-ground-c').value.trim();
    this.sketch.groundRunoff = ground === '' ? NaN : Number(ground);
    if (ground !== '' && !Number.isFinite(this.sketch.groundRunoff)) {
      this.message(`Runoff coefficient of ground in no zone: "${ground}" is not a number.`);
      return;
    }
    const text = JSON.stringify(this.sketch.geojson());
    const result = JSON.parse(this.core.site_link_json(text, byId('site-cell').value));
    if (result.error) {
      this.message(result.error);
      return;
    }
    this.message('');
    this.siteText = text;
    this.grownLink = result.link;
    byId('site-status').textContent = result.summary;
    byId('site-results').hidden = true;
    byId('site-unreached').hidden = true;
    this.sized = null;
    location.hash = result.link;
    document.querySelector('.field')?.scrollIntoView({ block: 'start' });
  }

  /// The site file of the current run when the panel grew it (its names label the plan).
  siteTextFor() {
    return this.siteText && this.state.link === this.grownLink ? this.siteText : '';
  }

  runEnded() {
    const site = Boolean(this.state.frame?.site);
    byId('site-size').disabled = !site;
    this.showUnreached();
    this.showGroundFlow();
    if (site && this.rainGiven()) this.resize();
  }

  // ---- over the layout's picture ---------------------------------------------------------

  /// The site's areas kept clear (buildings, trees, paths), grey and named, so the layout is
  /// read against them while it grows and after.
  drawKeptClear(ctx, { scale, offsetX, offsetY, ratio }) {
    const simulation = this.state.simulation;
    if (!simulation || !this.state.frame?.site) return;
    const text = this.siteTextFor();
    if (this.keptClear?.simulation !== simulation || this.keptClear.text !== text) {
      this.keptClear = { simulation, text, list: JSON.parse(simulation.obstacles_json(text)) };
    }
    ctx.fillStyle = KEPT_CLEAR_FILL;
    ctx.strokeStyle = KEPT_CLEAR_INK;
    ctx.lineWidth = 1 * ratio;
    for (const { ring } of this.keptClear.list) {
      ctx.beginPath();
      for (let k = 0; k < ring.length; k += 2) {
        const x = ring[k] * scale + offsetX;
        const y = ring[k + 1] * scale + offsetY;
        if (k === 0) ctx.moveTo(x, y); else ctx.lineTo(x, y);
      }
      ctx.closePath();
      ctx.fill();
      ctx.stroke();
    }
    ctx.font = `${11 * ratio}px system-ui, sans-serif`;
    ctx.textAlign = 'center';
    ctx.textBaseline = 'middle';
    ctx.fillStyle = '#222';
    for (const { ring, name } of this.keptClear.list) {
      if (!name || ring.length < 6) continue;
      let [sx, sy] = [0, 0];
      for (let k = 0; k < ring.length; k += 2) {
        sx += ring[k];
        sy += ring[k + 1];
      }
      const n = ring.length / 2;
      ctx.fillText(name, (sx / n) * scale + offsetX, (sy / n) * scale + offsetY);
    }
  }

  /// The parts of the finished site no outlet reaches: tinted, hatched and labelled with
  /// their area on the picture, and the core's sentence listing them in the panel.
  showUnreached() {
    const simulation = this.state.simulation;
    const box = byId('site-unreached');
    this.unreached = null;
    this.view.overlays.delete('unreached');
    box.hidden = true;
    box.textContent = '';
    if (!simulation || !this.state.frame?.site || !simulation.finished()) {
      this.view.draw();
      return;
    }
    const found = JSON.parse(simulation.unreached_json(this.siteTextFor(), byId('site-system').value));
    if (found.parts.length > 0) {
      this.unreached = { simulation, parts: found.parts };
      this.view.overlays.set('unreached', (ctx, place) => this.drawUnreached(ctx, place));
    }
    if (found.text) {
      box.textContent = found.text;
      box.hidden = false;
    }
    this.view.draw();
  }

  drawUnreached(ctx, { scale, offsetX, offsetY, ratio }) {
    if (!this.unreached || this.unreached.simulation !== this.state.simulation) return;
    if (!this.hatch) this.hatch = hatchPattern(ctx, ratio);
    for (const part of this.unreached.parts) {
      ctx.beginPath();
      for (const ring of part.rings) {
        for (let k = 0; k < ring.length; k += 2) {
          const x = ring[k] * scale + offsetX;
          const y = ring[k + 1] * scale + offsetY;
          if (k === 0) ctx.moveTo(x, y); else ctx.lineTo(x, y);
        }
        ctx.closePath();
      }
      ctx.fillStyle = UNREACHED_FILL;
      ctx.fill('evenodd');
      if (this.hatch) {
        ctx.fillStyle = this.hatch;
        ctx.fill('evenodd');
      }
      ctx.strokeStyle = UNREACHED_INK;
      ctx.lineWidth = 1.5 * ratio;
      ctx.stroke();
    }
    ctx.font = `bold ${12 * ratio}px system-ui, sans-serif`;
    ctx.textAlign = 'center';
    ctx.lineWidth = 3 * ratio;
    ctx.strokeStyle = 'rgba(255, 253, 248, 0.9)';
    ctx.fillStyle = UNREACHED_INK;
    for (const part of this.unreached.parts) {
      const x = part.label_at[0] * scale + offsetX;
      const y = part.label_at[1] * scale + offsetY;
      ctx.strokeText(part.label, x, y);
      ctx.fillText(part.label, x, y);
    }
  }

  /// The natural flow on the bare ground (D8), faint, while the box is ticked.
  showGroundFlow() {
    const simulation = this.state.simulation;
    const note = byId('site-ground-flow-note');
    const wanted = byId('site-ground-flow').checked && simulation && this.state.frame?.site;
    this.view.overlays.delete('ground-flow');
    note.hidden = !wanted;
    if (!wanted) {
      this.groundFlow = null;
      note.textContent = '';
      this.view.draw();
      return;
    }
    if (this.groundFlow?.simulation !== simulation) {
      this.groundFlow = { simulation, lines: simulation.ground_flow_lines() };
    }
    note.textContent = simulation.ground_flow_text();
    this.view.overlays.set('ground-flow', (ctx, place) => this.drawGroundFlow(ctx, place));
    this.view.draw();
  }

  drawGroundFlow(ctx, { scale, offsetX, offsetY, ratio }) {
    if (!this.groundFlow || this.groundFlow.simulation !== this.state.simulation) return;
    const { lines } = this.groundFlow;
    ctx.strokeStyle = GROUND_FLOW_INK;
    ctx.lineCap = 'round';
    // One path per class, thinnest first.
    GROUND_FLOW_WIDTHS.forEach((width, level) => {
      ctx.lineWidth = width * ratio;
      ctx.beginPath();
      for (let k = 0; k < lines.length; k += 5) {
        if (lines[k + 4] !== level) continue;
        ctx.moveTo(lines[k] * scale + offsetX, lines[k + 1] * scale + offsetY);
        ctx.lineTo(lines[k + 2] * scale + offsetX, lines[k + 3] * scale + offsetY);
      }
      ctx.stroke();
    });
  }

  rainGiven() {
    return byId('site-rain-kind').value === 'constant'
      ? byId('site-intensity').value.trim() !== ''
      : ['a', 'b', 'c'].every((k) => byId(`site-idf-${k}`).value.trim() !== '');
  }

  /// The design storm and sizing rules as the core reads them (texts as typed: the core checks
  /// each and names the one that is wrong).
  rulesText() {
    const idf = byId('site-rain-kind').value === 'idf';
    return JSON.stringify({
      system: byId('site-system').value,
      rain: idf
        ? { kind: 'idf', a: byId('site-idf-a').value, b: byId('site-idf-b').value, c: byId('site-idf-c').value }
        : { kind: 'constant', intensity: byId('site-intensity').value },
      inlet_time: byId('site-inlet').value,
      conveyance: byId('site-conveyance').value,
      pipe_sizes: byId('site-pipes').value,
      manning_n: byId('site-manning').value,
      min_grade_percent: byId('site-min-grade').value,
      velocity_min: byId('site-v-min').value,
      velocity_max: byId('site-v-max').value,
    });
  }

  /// Sizes the finished run's channels and shows the tables (`explicit`: the button, which
  /// also reports a missing storm).
  resize(explicit = false) {
    const simulation = this.state.simulation;
    if (!simulation || !this.state.frame?.site || !simulation.finished()) {
      if (explicit) this.message('Grow a layout on a site first, and let it finish.');
      return;
    }
    if (!this.rainGiven()) {
      if (explicit) this.message('Enter the design rainfall from your local records first.');
      return;
    }
    const result = JSON.parse(simulation.drainage_json(this.rulesText(), this.siteTextFor()));
    if (result.error) {
      this.message(result.error);
      byId('site-results').hidden = true;
      return;
    }
    this.message('');
    this.sized = result;
    this.showResults(result);
  }

  showResults(result) {
    byId('site-results').hidden = false;
    const outlets = byId('site-outlets').tBodies[0];
    outlets.replaceChildren(...result.outlets.map((outlet) => row([outlet.name, outlet.area_text, outlet.peak_flow_text, outlet.time_text])));
    const head = byId('site-schedule').tHead;
    head.replaceChildren(row(result.columns, 'th'));
    const body = byId('site-schedule').tBodies[0];
    body.replaceChildren(...result.rows.slice(0, SHOWN_ROWS).map((cells) => row(cells)));
    const more = result.rows.length > SHOWN_ROWS ? ` The first ${SHOWN_ROWS} of ${result.rows.length} channels are shown; the CSV holds them all.` : '';
    byId('site-flags').textContent = `${result.flags_text}${more}`;
  }

  save(extension, what, make, type) {
    if (!this.sized) {
      this.message('Size the channels first.');
      return;
    }
    try {
      const file = `ramulus-site-layout.${extension}`;
      byId('site-saved').textContent = this.core.saved_text(file, what, download(file, make(), type));
    } catch (error) {
      this.message(`The export failed: ${error.message ?? error}`);
    }
  }

  message(text) {
    const box = byId('site-message');
    box.hidden = !text;
    box.textContent = text;
  }
}

/// Diagonal hatching for the parts no outlet reaches, as a canvas pattern.
function hatchPattern(ctx, ratio) {
  const size = Math.max(4, Math.round(8 * ratio));
  const tile = document.createElement('canvas');
  tile.width = size;
  tile.height = size;
  const pen = tile.getContext('2d');
  pen.strokeStyle = UNREACHED_INK;
  pen.lineWidth = Math.max(1, ratio);
  pen.beginPath();
  pen.moveTo(0, size);
  pen.lineTo(size, 0);
  pen.moveTo(-size / 2, size / 2);
  pen.lineTo(size / 2, -size / 2);
  pen.moveTo(size / 2, size * 1.5);
  pen.lineTo(size * 1.5, size / 2);
  pen.stroke();
  return ctx.createPattern(tile, 'repeat');
}

function describe(feature, units) {
  const label = TOOLS[feature.role]?.label ?? feature.role;
  if (feature.role === 'zone') return `${label}: ${feature.surface ?? 'zone'}, C ${Number(feature.runoff_coefficient).toFixed(2)}, ${feature.points.length} corners`;
  if (feature.role === 'obstacle') return `${label}: ${feature.name ?? ''}, ${feature.points.length} corners`;
  if (feature.role === 'outline') return `${label}: ${feature.points.length} corners`;
  const [x, y] = feature.points[0];
  if (feature.role === 'level') return `${label}: ${Number(feature.elevation).toFixed(2)} ${units} at ${x}, ${y}`;
  return `${label}: ${feature.name ?? ''} at ${x}, ${y}`;
}

function row(cells, tag = 'td') {
  const tr = document.createElement('tr');
  for (const cell of cells) {
    const td = document.createElement(tag);
    if (tag === 'th') td.scope = 'col';
    td.textContent = cell;
    tr.append(td);
  }
  return tr;
}
