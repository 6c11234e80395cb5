// The fit panel: which growth parameters reproduce a specimen. Builds its controls from the
// core's fit choices (fittable keys with default ranges, matchable metrics, defaults), sends
// what the user typed to the core (`FitSession`, which checks everything before any work),
// runs the sensitivity check, the fit and the predictive check in Web Workers (fit-pool.js),
// and shows the results: posterior table, pairwise and convergence plots, predictive table,
// specimen beside best run, exports and links. Every number and sentence about the fit comes
// from Rust; user data is written with textContent only.
import { FitCancelled, FitPool } from './fit-pool.js';

const STARTING_KEYS = ['alpha', 'w_turn', 'branch_angle'];
const STARTING_METRICS = ['transport_cost', 'branching_angle_mean', 'tortuosity', 'bifurcation_ratio'];
const FIT_QUERY = 'fit';

/// Mounts the panel into `root`. `page` gives `core` (the session's wasm exports), `link()`
/// (the page's settings as a run link), and of the finished run (else null): `metrics()` (its
/// metrics as JSON), `runLink()` (the link that grows it; empty for a record shown as saved)
/// and `record()` (its run record).
export function mountFitPanel(root, page) {
  const panel = new FitPanel(root, page);
  window.ramulusFit = panel; // for the page tests and the benchmark
  panel.openFitLink();
  return panel;
}

const element = (tag, attributes = {}, text = '') => {
  const node = document.createElement(tag);
  for (const [name, value] of Object.entries(attributes)) node.setAttribute(name, value);
  if (text) node.textContent = text;
  return node;
};

class FitPanel {
  constructor(root, page) {
    this.root = root;
    this.page = page;
    this.core = page.core;
    this.session = null; // FitSession in the page's wasm
    this.pool = null;
    this.specimen = null; // {bytes, name} of a loaded file
    this.linked = null; // FitSession read from a fit link, used until the form is edited
    this.urls = [];
    this.build();
  }

  // ---- building the panel -------------------------------------------------------------

  build() {
    const choices = JSON.parse(this.core.fit_choices_json(this.page.link()));
    this.choices = choices;
    this.root.replaceChildren();
    this.root.append(
      element('h2', { id: 'fit-title' }, 'Fit growth parameters to a specimen'),
      element('p', { class: 'hint' }, 'Which parameter values grow networks that measure like the specimen, and how sure that is. '
        + 'The fit starts from this page\'s settings, varies the ticked parameters within their ranges, and compares the ticked metrics, '
        + 'each averaged over the replicate seeds. It runs in the background on every core; the page stays usable.'),
    );

    const specimen = element('fieldset', { class: 'fit-specimen' });
    specimen.append(element('legend', {}, 'Specimen'));
    const current = element('label', { class: 'check' });
    this.useCurrent = element('input', { type: 'radio', name: 'fit-specimen', id: 'fit-use-run', checked: '' });
    current.append(this.useCurrent, ' this page\'s run, once it has finished growing');
    const fromFile = element('label', { class: 'check' });
    this.useFile = element('input', { type: 'radio', name: 'fit-specimen', id: 'fit-use-file' });
    fromFile.append(this.useFile, ' a file');
    this.file = element('input', { type: 'file', id: 'fit-specimen-file', accept: '.json,.svg,.geojson,.csv,application/json,image/svg+xml,text/csv' });
    // The chooser has its own visible label beside it (a label names one control only).
    const fileLabel = element('label', { class: 'fit-inline-label', for: this.file.id }, 'specimen file:');
    const fileRow = element('span', { class: 'fit-file-row' });
    fileRow.append(fileLabel, this.file);
    this.specimenNote = element('p', { class: 'hint', id: 'fit-specimen-note' },
      'A run record (JSON) or a traced network (SVG, GeoJSON, CSV edge list), read in this run\'s length unit.');
    specimen.append(current, fromFile, fileRow, this.specimenNote);
    this.file.addEventListener('change', async () => {
      const chosen = this.file.files[0];
      if (!chosen) return;
      this.specimen = { bytes: new Uint8Array(await chosen.arrayBuffer()), name: chosen.name };
      this.useFile.checked = true;
      this.specimenNote.textContent = `Specimen file: ${chosen.name}.`;
      this.formEdited();
    });

    const keys = element('fieldset', { class: 'fit-keys' });
    keys.append(element('legend', {}, 'Parameters to fit, with the range to search'));
    const keyTable = element('table', { class: 'fit-table', id: 'fit-keys' });
    keyTable.append(headRow(['Fit', 'Parameter', 'From', 'To', 'Scale']));
    const keyBody = element('tbody');
    this.keyRows = new Map();
    for (const key of choices.keys) {
      const row = element('tr');
      const tick = element('input', { type: 'checkbox', id: `fit-key-${key.key}` });
      tick.checked = STARTING_KEYS.includes(key.key);
      const low = element('input', { id: `fit-low-${key.key}`, inputmode: 'decimal', autocomplete: 'off', size: '7' });
      const high = element('input', { id: `fit-high-${key.key}`, inputmode: 'decimal', autocomplete: 'off', size: '7' });
      low.value = key.low_text;
      high.value = key.high_text;
      low.setAttribute('aria-label', `${key.key}: lower bound`);
      high.setAttribute('aria-label', `${key.key}: upper bound`);
      const label = element('label', { for: tick.id, title: `Allowed: ${key.allowed}` });
      label.append(element('code', {}, key.key), describe(key));
      row.append(cell(tick), cell(label), cell(inlineLabelled('from', low)),
        cell(inlineLabelled('to', high)), element('td', {}, key.scale));
      keyBody.append(row);
      this.keyRows.set(key.key, { tick, low, high });
    }
    keyTable.append(keyBody);
    keys.append(keyTable);

    const metrics = element('fieldset', { class: 'fit-metrics' });
    metrics.append(element('legend', {}, 'Metrics to match'));
    metrics.append(element('p', { class: 'hint' }, 'Each metric is standardised by its spread among the first simulations; a weight (default 1) scales its part of the distance.'));
    const metricTable = element('table', { class: 'fit-table', id: 'fit-metrics' });
    metricTable.append(headRow(['Match', 'Metric', 'Weight']));
    const metricBody = element('tbody');
    this.metricRows = new Map();
    for (const metric of choices.metrics) {
      const row = element('tr');
      const tick = element('input', { type: 'checkbox', id: `fit-metric-${metric.key}` });
      tick.checked = STARTING_METRICS.includes(metric.key);
      const weight = element('input', { id: `fit-weight-${metric.key}`, inputmode: 'decimal', autocomplete: 'off', size: '5', placeholder: '1' });
      weight.setAttribute('aria-label', `${metric.key}: weight`);
      const label = element('label', { for: tick.id });
      label.append(element('code', {}, metric.key), describe(metric));
      row.append(cell(tick), cell(label), cell(inlineLabelled('weight', weight)));
      metricBody.append(row);
      this.metricRows.set(metric.key, { tick, weight });
    }
    metricTable.append(metricBody);
    metrics.append(metricTable);

    const settings = element('fieldset', { class: 'fit-settings' });
    settings.append(element('legend', {}, 'How to sample'));
    const defaults = choices.defaults;
    this.method = element('select', { id: 'fit-method' });
    this.method.append(
      element('option', { value: 'sequential' }, 'sequential (ABC-SMC)'),
      element('option', { value: 'quick' }, 'quick (rejection)'),
    );
    const number = (id, value) => {
      const input = element('input', { id, inputmode: 'numeric', autocomplete: 'off', size: '8' });
      input.value = String(value);
      return input;
    };
    this.settings = {
      replicates: number('fit-replicates', defaults.replicates),
      population: number('fit-population', defaults.population),
      generations: number('fit-generations', defaults.generations),
      simulations: number('fit-simulations', defaults.simulations),
      accept: number('fit-accept', defaults.accept),
      predictive: number('fit-predictive', defaults.predictive),
      seed: number('fit-seed', defaults.seed),
    };
    const labels = {
      replicates: 'Replicates (seeds per parameter set)',
      population: 'Population (particles per generation)',
      generations: 'Generations after the first',
      simulations: 'Simulations (parameter sets drawn)',
      accept: 'Accepted (parameter sets kept)',
      predictive: 'Runs for the predictive check',
      seed: 'Fit seed',
    };
    const grid = element('div', { class: 'fit-grid' });
    const pair = (label, control, extra = '') => {
      const wrap = element('div', { class: `fit-setting ${extra}` });
      wrap.append(element('label', { for: control.id }, label), control);
      return wrap;
    };
    grid.append(pair('Method', this.method));
    for (const [name, input] of Object.entries(this.settings)) {
      const kind = ['population', 'generations'].includes(name) ? 'fit-sequential'
        : ['simulations', 'accept'].includes(name) ? 'fit-quick' : '';
      grid.append(pair(labels[name], input, kind));
    }
    settings.append(grid);
    const showMethod = () => {
      for (const node of settings.querySelectorAll('.fit-sequential')) node.hidden = this.method.value !== 'sequential';
      for (const node of settings.querySelectorAll('.fit-quick')) node.hidden = this.method.value !== 'quick';
    };
    this.method.addEventListener('change', showMethod);
    showMethod();

    const controls = element('div', { class: 'buttons fit-controls', role: 'toolbar', 'aria-label': 'Fit controls' });
    this.checkButton = element('button', { type: 'button', id: 'fit-check' }, 'Check what the metrics can tell');
    this.startButton = element('button', { type: 'button', id: 'fit-start' }, 'Start fit');
    this.pauseButton = element('button', { type: 'button', id: 'fit-pause', disabled: '' }, 'Pause');
    this.cancelButton = element('button', { type: 'button', id: 'fit-cancel', disabled: '' }, 'Cancel');
    controls.append(this.checkButton, this.startButton, this.pauseButton, this.cancelButton);
    this.checkButton.addEventListener('click', () => this.start(true));
    this.startButton.addEventListener('click', () => this.start(false));
    this.pauseButton.addEventListener('click', () => this.togglePause());
    this.cancelButton.addEventListener('click', () => this.cancel());

    const progressRow = element('div', { class: 'progress-row' });
    this.progress = element('progress', { id: 'fit-progress', max: '1', value: '0', 'aria-label': 'Fit progress' });
    this.status = element('span', { id: 'fit-status', role: 'status' });
    progressRow.append(this.progress, this.status);
    this.error = element('p', { id: 'fit-error', class: 'field-error', role: 'alert' });
    this.error.hidden = true;

    this.checks = element('div', { id: 'fit-sensitivity', class: 'fit-sensitivity' });
    this.results = element('div', { id: 'fit-results', class: 'fit-results' });

    this.root.append(specimen, keys, metrics, settings, controls, progressRow, this.error, this.checks, this.results);
    for (const input of this.root.querySelectorAll('fieldset input, fieldset select')) {
      input.addEventListener('change', () => this.formEdited());
    }
  }

  // ---- the request --------------------------------------------------------------------

  /// What the user typed, as the texts the core parses.
  request() {
    const fitted = [];
    for (const [key, row] of this.keyRows) {
      if (row.tick.checked) fitted.push({ key, low: row.low.value, high: row.high.value });
    }
    const matched = [];
    for (const [key, row] of this.metricRows) {
      if (row.tick.checked) matched.push({ key, weight: row.weight.value });
    }
    const texts = Object.fromEntries(Object.entries(this.settings).map(([name, input]) => [name, input.value]));
    return { link: this.page.link(), fitted, matched, method: this.method.value, ...texts };
  }

  /// What the next fit starts from, checked as far as it can be before any work (throws the
  /// core's message): `{session}` ready, or `{request, file}` whose specimen file a worker
  /// measures first. Also notes how the specimen will be drawn.
  prepare() {
    if (this.linked) {
      const session = this.linked;
      this.linked = null;
      this.specimenShown = null; // a fit link holds the specimen's values, not its drawing
      return { session };
    }
    const request = this.request();
    const requestText = JSON.stringify(request);
    this.core.fit_check_request(requestText);
    if (this.useFile.checked) {
      if (!this.specimen) throw new Error('Choose a specimen file first.');
      const file = { ...this.specimen, link: request.link };
      this.specimenShown = { file };
      return { requestText, file };
    }
    // This page's run: its metrics are already measured for the readings.
    const metrics = this.page.metrics();
    if (!metrics) throw new Error('This page\'s run has not finished growing yet: let it finish, or choose a specimen file.');
    const runLink = this.page.runLink();
    this.specimenShown = runLink ? { link: runLink } : { record: true };
    return { session: new this.core.FitSession(requestText, metrics, 'this page\'s run') };
  }

  formEdited() {
    // A fit link's plan holds its own specimen values; an edit asks for a real specimen.
    if (this.linked) {
      this.linked.free();
      this.linked = null;
      this.specimenNote.textContent = 'The form was edited: the fit link\'s specimen values no longer apply; choose a specimen.';
    }
  }

  // ---- running ------------------------------------------------------------------------

  /// Runs the sensitivity check (and, unless `checkOnly`, the fit and the predictive check).
  /// A session whose check has run continues from there when the form is unchanged.
  async start(checkOnly) {
    if (this.running) return;
    this.showError('');
    const requestText = JSON.stringify({ request: this.request(), file: this.useFile.checked ? this.specimen?.name : null });
    const reuse = this.session && this.session.phase() === 'fit' && this.sessionRequest === requestText && !this.linked;
    let prepared = null;
    if (!reuse) {
      this.clearResults();
      this.session?.free();
      this.session = null;
      try {
        prepared = this.prepare();
      } catch (error) {
        this.showError(messageOf(error));
        return;
      }
      this.session = prepared.session ?? null;
      this.sessionRequest = requestText;
    } else {
      this.results.replaceChildren();
    }
    const count = globalThis.ramulusTestHooks?.fitWorkers ?? navigator.hardwareConcurrency ?? 1;
    this.workerCount = Math.max(1, count);
    this.setRunning(true);
    this.status.textContent = 'Starting workers…';
    const started = performance.now();
    try {
      this.cancelAsked = false;
      this.pool = await FitPool.open(this.workerCount);
      if (this.cancelAsked) this.pool.cancel(); // cancelled while the workers were loading
      if (this.pool.cancelled) throw new FitCancelled();
      if (!this.session) {
        // A specimen file is read and measured in a worker, then the plan gets its values.
        this.status.textContent = `Measuring ${prepared.file.name}…`;
        const metrics = await this.pool.measure(prepared.file);
        if (this.pool.cancelled) throw new FitCancelled();
        try {
          this.session = new this.core.FitSession(prepared.requestText, metrics, prepared.file.name);
        } catch (error) {
          this.showError(messageOf(error));
          this.status.textContent = '';
          return;
        }
      }
      this.pool.setPlan(this.session);
      const progress = (done, total, secondsLeft, phase) => {
        this.progress.max = Math.max(total, 1);
        this.progress.value = done;
        const paused = this.pool?.paused ? ' (paused: parameter sets already running finish)' : '';
        this.status.textContent = `${this.core.fit_progress_text(phase, done, total, secondsLeft, this.workerCount)}${paused}`;
      };
      await this.pool.run(this.session, {
        progress,
        stopAt: (phase) => {
          if (phase !== 'design') this.showChecks();
          return checkOnly && phase === 'fit';
        },
      });
      this.lastSeconds = (performance.now() - started) / 1000;
      this.longestCall = this.pool.longestCall; // for the benchmark
      if (this.session.phase() === 'done') {
        this.status.textContent = this.core.fit_progress_text('done', ...this.session.progress(), Number.NaN, this.workerCount);
        await this.showResults();
      } else {
        this.status.textContent = 'Sensitivity check done: see the table below; Start fit continues from it.';
      }
    } catch (error) {
      if (error instanceof FitCancelled) {
        this.status.textContent = 'Cancelled: every worker was stopped.';
      } else {
        this.showError(`The fit stopped: ${messageOf(error)}`);
        this.status.textContent = '';
      }
      this.session?.free();
      this.session = null;
    } finally {
      this.pool?.close();
      this.pool = null;
      this.setRunning(false);
    }
  }

  togglePause() {
    if (!this.pool) return;
    if (this.pool.paused) {
      this.pool.resume();
      this.pauseButton.textContent = 'Pause';
      this.pauseButton.setAttribute('aria-pressed', 'false');
    } else {
      this.pool.pause();
      this.pauseButton.textContent = 'Resume';
      this.pauseButton.setAttribute('aria-pressed', 'true');
      this.status.textContent += ' (paused: parameter sets already running finish)';
    }
  }

  cancel() {
    this.cancelAsked = true;
    this.pool?.cancel();
  }

  setRunning(running) {
    this.running = running;
    this.checkButton.disabled = running;
    this.startButton.disabled = running;
    this.pauseButton.disabled = !running;
    this.cancelButton.disabled = !running;
    this.pauseButton.textContent = 'Pause';
    this.pauseButton.setAttribute('aria-pressed', 'false');
    if (!running) this.progress.value = this.session?.phase() === 'done' ? this.progress.max : this.progress.value;
  }

  showError(text) {
    this.error.textContent = text;
    this.error.hidden = !text;
  }

  // ---- showing ------------------------------------------------------------------------

  showChecks() {
    if (!this.session || this.checks.childElementCount > 0) return;
    const table = JSON.parse(this.session.sensitivity_table_json());
    if (!table) return;
    this.checks.append(element('h3', {}, 'What the chosen metrics can tell'));
    this.checks.append(element('p', { class: 'hint' },
      'Change of each metric when one parameter goes from 10 % to 90 % of its range (the others at the centre), against the spread between seeds. '
      + 'Below 2 seed-noise units the metric does not see the parameter.'));
    for (const warning of table.warnings) {
      this.checks.append(element('p', { class: 'fit-warning', role: 'alert' }, warning));
    }
    const grid = element('table', { class: 'fit-table', id: 'fit-sensitivity-table' });
    grid.append(headRow(['Parameter', 'Metric', 'Change', 'Seed noise', 'Change / noise', 'Seen']));
    const body = element('tbody');
    for (const row of table.rows) {
      body.append(textRow([row.key, row.metric, row.effect, row.noise, row.ratio, row.seen ? 'yes' : 'no'], row.seen ? '' : 'fit-unseen'));
    }
    grid.append(body);
    this.checks.append(grid);
  }

  clearResults() {
    this.checks.replaceChildren();
    this.results.replaceChildren();
    for (const url of this.urls) URL.revokeObjectURL(url);
    this.urls = [];
  }

  pageAddress() {
    return `${location.origin}${location.pathname}`;
  }

  async showResults() {
    const session = this.session;
    const tables = JSON.parse(session.tables_json());
    this.reportText = session.report_json(this.pageAddress());
    const out = this.results;
    out.replaceChildren(element('h3', {}, 'Posterior'), element('p', { id: 'fit-summary' }, tables.summary));
    for (const note of tables.notes) out.append(element('p', { class: 'hint' }, `Note: ${note}`));
    const posterior = element('table', { class: 'fit-table', id: 'fit-posterior' });
    posterior.append(headRow(['Parameter', 'Median', '90 % interval', 'Searched', 'Scale']));
    const body = element('tbody');
    for (const row of tables.posterior) {
      const unit = row.unit ? ` ${row.unit}` : '';
      body.append(textRow([row.key, `${row.median}${unit}`, `${row.low} to ${row.high}${unit}`, `${row.range}${unit}`, row.scale]));
    }
    posterior.append(body);
    out.append(posterior);

    out.append(element('h3', {}, 'Pairwise posterior and convergence'));
    out.append(element('p', { class: 'hint' }, 'Each dot a posterior particle (darker: more weight); axes span the searched ranges, so a cloud that fills its panel has learned nothing, and a ridge marks parameters that trade off.'));
    const svgText = session.posterior_svg();
    out.append(this.svgImage(svgText, 'Pairwise posterior plots, histograms with 90 % intervals, and tolerance and acceptance per generation', 'fit-plots'));

    out.append(element('h3', {}, 'Posterior predictive check'));
    const predictive = element('table', { class: 'fit-table', id: 'fit-predictive' });
    predictive.append(headRow(['Metric', 'Specimen', 'Runs from the posterior: median', '5 to 95 %', 'Specimen inside']));
    const predictiveBody = element('tbody');
    for (const row of tables.predictive) {
      const unit = row.unit ? ` ${row.unit}` : '';
      predictiveBody.append(textRow([row.metric, `${row.specimen}${unit}`, `${row.median}${unit}`, `${row.low} to ${row.high}${unit}`, row.inside ? 'yes' : 'no: outside'], row.inside ? '' : 'fit-unseen'));
    }
    predictive.append(predictiveBody);
    out.append(predictive);

    out.append(element('h3', {}, 'Specimen and best run'));
    const pair = element('div', { class: 'fit-pair' });
    const left = element('figure');
    const shown = this.specimenShown;
    const specimenCaption = element('figcaption', {}, shown ? 'Specimen (drawing…)' : 'Specimen');
    if (!shown) left.append(element('p', { class: 'hint' }, 'A fit link holds the specimen\'s metric values, not its drawing.'));
    left.append(specimenCaption);
    const right = element('figure');
    const bestCaption = element('figcaption', {}, 'Best run (growing…)');
    right.append(bestCaption);
    pair.append(left, right);
    out.append(pair);

    const fragment = session.best_fragment();
    const links = element('div', { class: 'buttons fit-exports' });
    const best = element('a', { id: 'fit-best-link', href: `#${fragment}` }, 'Open the best run');
    const json = element('button', { type: 'button', id: 'fit-save-json' }, 'Posterior (JSON)');
    const csv = element('button', { type: 'button', id: 'fit-save-csv' }, 'Posterior sample (CSV)');
    const plots = element('button', { type: 'button', id: 'fit-save-plots' }, 'Plots (SVG)');
    json.addEventListener('click', () => saveFile('ramulus-fit.json', this.reportText, 'application/json'));
    csv.addEventListener('click', () => saveFile('ramulus-fit-sample.csv', session.posterior_csv(), 'text/csv'));
    plots.addEventListener('click', () => saveFile('ramulus-fit-plots.svg', svgText, 'image/svg+xml'));
    links.append(best, json, csv, plots);
    out.append(links);

    const linkRow = element('div', { class: 'field-row' });
    const linkText = element('input', { id: 'fit-link', readonly: '' });
    linkText.value = `${this.pageAddress()}?${FIT_QUERY}=${encodeURIComponent(session.fit_link())}#${this.page.link()}`;
    const copy = element('button', { type: 'button', id: 'fit-copy-link' }, 'Copy link');
    copy.addEventListener('click', () => navigator.clipboard?.writeText(linkText.value));
    linkRow.append(element('label', { for: 'fit-link' }, 'Link to this fit'), linkText, copy);
    out.append(linkRow);
    out.append(element('p', { class: 'hint' },
      'The link holds the whole plan (starting settings, ranges, the specimen\'s metric values, seeds, method); opening it runs the same fit again, '
      + 'which gives this result exactly, since every draw comes from the fit seed. It stays short because it holds no samples.'));

    // Both pictures grow or read a whole network and are drawn to pixels in the workers; the
    // page's thread only puts finished pixels on two canvases (an SVG of ~20,000 segments
    // shown as an image froze the page for about a second while the browser drew it).
    const scaleRow = element('p', { class: 'hint fit-scale', id: 'fit-scale' });
    out.append(scaleRow);
    const sources = [{ which: 'best', source: { link: fragment }, figure: right, caption: bestCaption, label: 'Best run', alt: 'The best run' }];
    if (shown) {
      // A grown run is drawn from its link, a file from its bytes, a record without
      // parameters (shown as saved) from its text.
      const record = shown.record ? { bytes: new TextEncoder().encode(this.page.record() ?? ''), name: 'this page\'s run', link: this.page.link() } : null;
      sources.push({ which: 'specimen', source: shown.link ? { link: shown.link } : (shown.file ?? record), figure: left, caption: specimenCaption, label: 'Specimen', alt: 'The specimen' });
    }
    const grown = await Promise.all(sources.map((item) => this.pool.picture(item.which, item.source).then(
      (info) => ({ ...item, info }),
      (error) => {
        item.caption.textContent = `${item.label}: could not be drawn (${messageOf(error)})`;
        return null;
      },
    )));
    const ready = grown.filter(Boolean);
    if (ready.length > 0) {
      const view = pictureView(ready.map((item) => item.info.extent), right.clientWidth || pair.clientWidth / 2 || 400);
      const bar = JSON.parse(this.core.fit_scale_bar_json(view.scale / view.ratio, 100, ready[0].info.units));
      const barLine = element('span', { class: 'fit-scale-bar' });
      barLine.style.width = `${bar.pixels.toFixed(1)}px`;
      scaleRow.replaceChildren(element('span', {}, 'Both pictures at one scale: '), barLine, element('span', {}, ` ${bar.label}`));
      await Promise.all(ready.map(async (item) => {
        const [minX, minY, maxX, maxY] = item.info.extent;
        const offsetX = view.width / 2 - ((minX + maxX) / 2) * view.scale;
        const offsetY = view.height / 2 - ((minY + maxY) / 2) * view.scale;
        try {
          const painted = await this.pool.paint(item.which, {
            width: view.width, height: view.height, scale: view.scale, offsetX, offsetY, colouring: 'order',
          });
          const canvas = element('canvas', { id: `fit-${item.which}-image`, class: 'fit-image', role: 'img', 'aria-label': item.alt });
          canvas.width = painted.width;
          canvas.height = painted.height;
          canvas.style.aspectRatio = `${painted.width} / ${painted.height}`;
          canvas.dataset.scale = String(view.scale);
          canvas.dataset.offsetX = String(offsetX);
          canvas.dataset.offsetY = String(offsetY);
          const pixels = new Uint8ClampedArray(painted.pixels.buffer, painted.pixels.byteOffset, painted.pixels.byteLength);
          canvas.getContext('2d').putImageData(new ImageData(pixels, painted.width, painted.height), 0, 0);
          item.figure.prepend(canvas);
          item.caption.textContent = item.label;
        } catch (error) {
          item.caption.textContent = `${item.label}: could not be drawn (${messageOf(error)})`;
        }
      }));
    }
    // The SVGs, for download only, made in the workers after the pictures.
    const svgButtons = element('div', { class: 'buttons fit-exports' });
    const svgOf = [this.pool.draw(fragment, 'order').then((svg) => ['fit-save-best-svg', 'Best run (SVG)', 'ramulus-fit-best-run.svg', svg])];
    if (shown) {
      const record = shown.record ? { bytes: new TextEncoder().encode(this.page.record() ?? ''), name: 'this page\'s run', link: this.page.link() } : null;
      svgOf.push((shown.link ? this.pool.draw(shown.link, 'order') : this.pool.drawSpecimen(shown.file ?? record, 'order'))
        .then((svg) => ['fit-save-specimen-svg', 'Specimen (SVG)', 'ramulus-fit-specimen.svg', svg]));
    }
    for (const made of await Promise.allSettled(svgOf)) {
      if (made.status !== 'fulfilled') continue;
      const [id, label, file, svg] = made.value;
      const button = element('button', { type: 'button', id }, label);
      button.addEventListener('click', () => saveFile(file, svg, 'image/svg+xml'));
      svgButtons.append(button);
    }
    if (svgButtons.childElementCount > 0) pair.after(svgButtons);
  }

  /// An SVG from Rust shown as an image (never parsed into the page).
  svgImage(svg, alt, id) {
    const url = URL.createObjectURL(new Blob([svg], { type: 'image/svg+xml' }));
    this.urls.push(url);
    return element('img', { src: url, alt, id, class: 'fit-image' });
  }

  // ---- fit links ----------------------------------------------------------------------

  /// A page opened with `?fit=...`: fills the panel with the plan and runs it again.
  openFitLink() {
    const params = new URLSearchParams(location.search);
    const text = params.get(FIT_QUERY);
    if (!text) return;
    params.delete(FIT_QUERY);
    const query = params.toString();
    history.replaceState(null, '', `${location.pathname}${query ? `?${query}` : ''}${location.hash}`);
    let session;
    try {
      session = this.core.FitSession.from_fit_link(text);
    } catch (error) {
      this.showError(`This fit link cannot be used: ${messageOf(error)}`);
      return;
    }
    const request = JSON.parse(session.request_json());
    for (const [key, row] of this.keyRows) {
      const fitted = request.fitted.find((entry) => entry.key === key);
      row.tick.checked = Boolean(fitted);
      if (fitted) {
        row.low.value = fitted.low;
        row.high.value = fitted.high;
      }
    }
    for (const [key, row] of this.metricRows) {
      const matched = request.matched.find((entry) => entry.key === key);
      row.tick.checked = Boolean(matched);
      row.weight.value = matched ? matched.weight : '';
    }
    this.method.value = request.method;
    this.method.dispatchEvent(new Event('change'));
    for (const [name, input] of Object.entries(this.settings)) input.value = request[name];
    this.linked = session;
    this.specimenNote.textContent = 'From a fit link: the specimen\'s metric values come with the link.';
    this.root.scrollIntoView?.();
    this.start(false);
  }
}

/// ` label (unit)` after a key: the label when it says more than the key, the unit when
/// there is one.
function describe({ key, label, unit }) {
  const words = label && label !== key ? ` ${label}` : '';
  const shownUnit = unit && unit !== '-' ? ` (${unit})` : '';
  return `${words}${shownUnit}`;
}

function headRow(names) {
  const head = element('thead');
  const row = element('tr');
  for (const name of names) row.append(element('th', { scope: 'col' }, name));
  head.append(row);
  return head;
}

function textRow(texts, className = '') {
  const row = element('tr', className ? { class: className } : {});
  for (const text of texts) row.append(element('td', {}, String(text)));
  return row;
}

/// A control with its own small visible label beside it (`text`), inside one label element.
function inlineLabelled(text, control) {
  const label = element('label', { class: 'fit-inline-label' }, `${text} `);
  label.append(control);
  return label;
}

function cell(child) {
  const td = element('td');
  td.append(child);
  return td;
}

function saveFile(name, content, type) {
  const url = URL.createObjectURL(new Blob([content], { type }));
  const link = element('a', { href: url, download: name });
  document.body.append(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}

function messageOf(error) {
  return error?.message ?? String(error);
}

/// One view for both result pictures, so they compare at one scale: both canvases
/// `cssWidth` wide (device pixels: times `devicePixelRatio`), as tall as the taller extent
/// needs (at most 26 rem), and pixels per unit that fit the widest and tallest extent with a
/// margin. `{width, height, scale, ratio}` in device pixels.
function pictureView(extents, cssWidth) {
  const ratio = globalThis.devicePixelRatio || 1;
  const spanX = Math.max(...extents.map(([minX, , maxX]) => maxX - minX), 1e-9);
  const spanY = Math.max(...extents.map(([, minY, , maxY]) => maxY - minY), 1e-9);
  const margin = 6 * ratio;
  const width = Math.max(16, Math.round(cssWidth * ratio));
  const height = Math.max(16, Math.min(Math.round(width * spanY / spanX), Math.round(416 * ratio)));
  const scale = Math.min((width - 2 * margin) / spanX, (height - 2 * margin) / spanY);
  return { width, height, scale, ratio };
}
