// Benchmark (prints figures, never fails on slowness): the fit panel's fit in headless
// Chromium with 1 and 2 Web Workers against `ramulus fit` with --jobs 1 and 2 on the same
// plan, the plan of `ramulus bench --fit`: 3 keys (alpha, w_turn, branch_angle), 4 metrics,
// 4 seeds per set, 300 sets by the quick method, against a 20,000-cell broad-leaf specimen
// (alpha 0.6, seed 3), with the sensitivity design and 20 predictive runs (1,248 growth runs).
// Runs alternate page and command line, so both see the same machine load; the load average
// is printed beside each figure. `--quick`: 2,000 cells and 60 sets. `--rounds N` repeats.
//
//   cargo build --release -p ramulus-cli && ./x build && node tests/e2e/bench-fit.mjs
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import path from 'node:path';
import { finishedDigest, launchBrowser, newPage, root, serveSite } from './support.mjs';

const quick = process.argv.includes('--quick');
const roundsAt = process.argv.indexOf('--rounds');
const rounds = roundsAt > 0 ? Number(process.argv[roundsAt + 1]) : 1;
const cells = quick ? 2000 : 20000;
const simulations = quick ? 60 : 300;
const native = path.join(root, 'target', 'release', 'ramulus');
const KEYS = [['alpha', '0.3', '0.9'], ['w_turn', '0.5', '3'], ['branch_angle', '20', '80']];
const METRICS = ['transport_cost', 'branching_angle_mean', 'tortuosity', 'bifurcation_ratio'];
const SETTINGS = { method: 'quick', replicates: '4', simulations: String(simulations), accept: String(simulations / 10), predictive: '20', seed: '1' };
const RUNS = (1 + 2 * KEYS.length) * 4 + simulations * 4 + 20;

const load = () => loadavg().map((value) => value.toFixed(2)).join(' ');

const site = await serveSite();
const context = await launchBrowser({ width: 1400, height: 1000 });
const folder = mkdtempSync(path.join(tmpdir(), 'ramulus-bench-fit-'));
try {
  const page = await newPage(context);
  await page.goto(site.url);
  await finishedDigest(page);
  // The specimen: the ovate leaf grown as a tree (no loops, every cell a vein, as the leaf
  // presets grew before 2026-12-03) with the cell budget, alpha 0.6 and seed 3, grown on the
  // page. A tree, because a run record read back as a specimen is measured as it stands: a
  // looped network has no branching angles to fit to (the grown tree is not in the record).
  const link = await page.evaluate((cells) => {
    const core = window.ramulusPage.state.session.core;
    const preset = JSON.parse(core.presets_json()).find((entry) => entry.name === 'ovate-leaf');
    let text = preset.link;
    const fields = [['cells', String(cells)], ['alpha', '0.6'], ['seed', '3'], ['reconnect', 'none'], ['vein_area', '0']];
    for (const [key, value] of fields) {
      text = JSON.parse(core.set_link_field(text, key, value)).link;
    }
    return text;
  }, cells);
  await page.goto(`${site.url}#${link}`);
  await page.reload();
  await finishedDigest(page, 600000);
  await page.waitForFunction(() => window.ramulusFit);
  const [record] = await Promise.all([page.waitForEvent('download'), page.click('#save-record')]);
  const specimen = path.join(folder, 'specimen.json');
  writeFileSync(specimen, readFileSync(await record.path()));
  await page.evaluate(({ keys, metrics }) => {
    const panel = window.ramulusFit;
    for (const [key, row] of panel.keyRows) row.tick.checked = keys.includes(key);
    for (const [key, row] of panel.metricRows) row.tick.checked = metrics.includes(key);
  }, { keys: KEYS.map(([key]) => key), metrics: METRICS });
  for (const [key, low, high] of KEYS) {
    await page.fill(`#fit-low-${key}`, low);
    await page.fill(`#fit-high-${key}`, high);
  }
  await page.selectOption('#fit-method', 'quick');
  for (const [id, value] of Object.entries(SETTINGS)) if (id !== 'method') await page.fill(`#fit-${id}`, value);
  const plan = await page.evaluate(() => window.ramulusFit.request());

  console.log(`fit in the browser against the command line: 3 keys, 4 metrics, 4 seeds per set, ${simulations} sets (quick), `
    + `${cells}-cell broad-leaf specimen, design + 20 predictive runs = ${RUNS} growth runs; `
    + `${await page.evaluate(() => navigator.hardwareConcurrency)} cores reported by the browser`);

  async function pageFit(workers) {
    await page.evaluate((count) => { window.ramulusTestHooks = { fitWorkers: count }; }, workers);
    // The main thread while the fit runs: the longest gap between animation frames and the
    // longest task the browser reports (Long Tasks API), so a freeze would show.
    await page.evaluate(() => {
      const watch = { gap: 0, longest: 0, running: true };
      let last = performance.now();
      const frame = (now) => {
        watch.gap = Math.max(watch.gap, now - last);
        last = now;
        if (watch.running) requestAnimationFrame(frame);
      };
      requestAnimationFrame(frame);
      watch.observer = new PerformanceObserver((list) => {
        for (const entry of list.getEntries()) watch.longest = Math.max(watch.longest, entry.duration);
      });
      watch.observer.observe({ type: 'longtask' });
      window.fitWatch = watch;
    });
    const before = load();
    const started = Date.now();
    await page.click('#fit-start');
    await page.waitForSelector('#fit-posterior tbody tr', { timeout: 1800000 });
    const seconds = (Date.now() - started) / 1000;
    const report = await page.evaluate(() => window.ramulusFit.reportText);
    // Up to the posterior table: the fit itself; after it: the results drawn (the two network
    // pictures are canvases put in place once painted; images among the results are decoded).
    const fit = await page.evaluate(() => {
      const taken = { gap: window.fitWatch.gap, longest: window.fitWatch.longest, call: window.ramulusFit.longestCall };
      window.fitWatch.gap = 0;
      window.fitWatch.longest = 0;
      return taken;
    });
    await page.waitForSelector('#fit-best-image', { timeout: 600000 });
    await page.waitForSelector('#fit-specimen-image', { timeout: 600000 });
    await page.evaluate(() => Promise.all([...document.querySelectorAll('.fit-image')].map((image) => (typeof image.decode === 'function' ? image.decode() : null))));
    await page.waitForTimeout(1000);
    const shown = await page.evaluate(() => {
      window.fitWatch.running = false;
      window.fitWatch.observer.disconnect();
      return { gap: window.fitWatch.gap, longest: window.fitWatch.longest };
    });
    return { seconds, report, before, main: fit, shown };
  }

  function cliFit(jobs) {
    const args = ['fit', '--specimen', specimen, '--link', link, '--json', '--jobs', String(jobs),
      '--method', 'quick', '--replicates', '4', '--simulations', SETTINGS.simulations, '--accept', SETTINGS.accept,
      '--predictive', '20', '--seed', '1', '--page', `${site.url}`];
    for (const key of plan.fitted) args.push('--fit', `${key.key}=${key.low}:${key.high}`);
    for (const metric of plan.matched) args.push('--match', metric.key);
    const before = load();
    const started = Date.now();
    const output = execFileSync(native, args, { stdio: ['ignore', 'pipe', 'pipe'] }).toString();
    return { seconds: (Date.now() - started) / 1000, report: output.trim(), before };
  }

  const line = (label, { seconds, before }) => console.log(
    `  ${label.padEnd(26)} ${seconds.toFixed(1).padStart(6)} s  ${(RUNS / seconds).toFixed(1).padStart(5)} growth runs/s  `
    + `${(simulations / seconds).toFixed(2).padStart(5)} sets/s   load average before: ${before}`,
  );
  for (let round = 1; round <= rounds; round += 1) {
    console.log(`round ${round}`);
    const results = {};
    for (const workers of [2, 1]) {
      const browser = await pageFit(workers);
      line(`page, ${workers} worker(s)`, browser);
      console.log(`  page's thread during the fit: longest frame gap ${browser.main.gap.toFixed(0)} ms, longest task ${browser.main.longest.toFixed(0)} ms, `
        + `longest call into the fit's wasm ${browser.main.call.toFixed(1)} ms; showing the results: longest frame gap `
        + `${browser.shown.gap.toFixed(0)} ms, longest task ${browser.shown.longest.toFixed(0)} ms`);
      const command = cliFit(workers);
      line(`ramulus fit --jobs ${workers}`, command);
      results[workers] = { browser, command };
      const same = JSON.stringify(JSON.parse(browser.report).posterior) === JSON.stringify(JSON.parse(command.report).posterior);
      console.log(`  same posterior as the command line: ${same ? 'yes' : 'NO'}; page / command line time: ${(browser.seconds / command.seconds).toFixed(2)}`);
    }
    console.log(`  speed-up from 1 to 2: page ${(results[1].browser.seconds / results[2].browser.seconds).toFixed(2)}, `
      + `command line ${(results[1].command.seconds / results[2].command.seconds).toFixed(2)}`);
  }
  if (page.errors.length) console.log('page errors:', page.errors);
} finally {
  await context.close();
  site.close();
  rmSync(folder, { recursive: true, force: true });
}
