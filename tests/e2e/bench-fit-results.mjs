// Benchmark (prints figures, never fails on slowness): the page's thread while the fit panel
// shows its results, the specimen and the best run of a 20,000-cell broad-leaf (about 20,000
// segments each) with the pairwise plots. A tiny fit (1 key, 1 metric, 1 seed per set, 10
// sets by the quick method, 2 predictive runs, 2 workers) so the results come quickly; then,
// from the posterior table to both pictures shown plus 1 s: the longest task the browser
// reports (Long Tasks API) and the longest gap between animation frames. `--rounds N`
// repeats (alternate with another build of the page to compare).
//
//   cargo build --release -p ramulus-cli && ./x build && node tests/e2e/bench-fit-results.mjs
import { launchBrowser, newPage, finishedDigest, serveSite } from './support.mjs';

const roundsAt = process.argv.indexOf('--rounds');
const rounds = roundsAt > 0 ? Number(process.argv[roundsAt + 1]) : 1;
const CELLS = 20000;

const site = await serveSite();
const context = await launchBrowser({ width: 1400, height: 1000 });
try {
  const page = await newPage(context);
  await page.goto(site.url);
  await finishedDigest(page);
  const link = await page.evaluate((cells) => {
    const core = window.ramulusPage.state.session.core;
    const preset = JSON.parse(core.presets_json()).find((entry) => entry.name === 'ovate-leaf');
    let text = preset.link;
    for (const [key, value] of [['cells', String(cells)], ['alpha', '0.6'], ['seed', '3']]) {
      text = JSON.parse(core.set_link_field(text, key, value)).link;
    }
    return text;
  }, CELLS);
  await page.goto(`${site.url}#${link}`);
  await page.reload();
  await finishedDigest(page, 600000);
  await page.waitForFunction(() => window.ramulusFit);
  await page.evaluate(() => {
    const panel = window.ramulusFit;
    for (const [key, row] of panel.keyRows) row.tick.checked = key === 'alpha';
    for (const [key, row] of panel.metricRows) row.tick.checked = key === 'transport_cost';
    window.ramulusTestHooks = { fitWorkers: 2 };
  });
  await page.fill('#fit-low-alpha', '0.5');
  await page.fill('#fit-high-alpha', '0.7');
  await page.selectOption('#fit-method', 'quick');
  for (const [id, value] of Object.entries({ replicates: '1', simulations: '10', accept: '5', predictive: '2', seed: '1' })) {
    await page.fill(`#fit-${id}`, value);
  }
  for (let round = 1; round <= rounds; round += 1) {
    await page.click('#fit-start');
    // The last round's results go when a fit starts: wait for that, then for the new table.
    await page.waitForSelector('#fit-best-image', { state: 'detached', timeout: 600000 });
    await page.waitForSelector('#fit-posterior tbody tr', { timeout: 600000 });
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
      window.resultsWatch = watch;
    });
    const started = Date.now();
    await page.waitForSelector('#fit-best-image', { timeout: 600000 });
    await page.waitForSelector('#fit-specimen-image', { timeout: 600000 });
    await page.evaluate(() => Promise.all([...document.querySelectorAll('img.fit-image')].map((image) => image.decode())));
    const seconds = (Date.now() - started) / 1000;
    await page.waitForTimeout(1000);
    const shown = await page.evaluate(() => {
      window.resultsWatch.running = false;
      window.resultsWatch.observer.disconnect();
      return { gap: window.resultsWatch.gap, longest: window.resultsWatch.longest };
    });
    console.log(`round ${round}: showing the results (${CELLS}-cell specimen and best run): longest task ${shown.longest.toFixed(0)} ms, `
      + `longest frame gap ${shown.gap.toFixed(0)} ms, pictures shown ${seconds.toFixed(1)} s after the posterior table`);
  }
  if (page.errors.length) console.log('page errors:', page.errors);
} finally {
  await context.close();
  site.close();
}
