// The passes after growth on the page, a slice at a time: a 2-hectare site (the sloping field
// at 0.5 m cells, 80,000 cells) grown with channel energy sweeps shows its progress sweep by
// sweep, stops on Stop (a sweep stopped midway is taken back, so the run keeps its whole
// sweeps), and the page stays usable. Outside references: the
// optimal-channel-network search accepts only changes that lower the energy E = sum Q^0.5 L
// (Rinaldo et al. 1992, Water Resour. Res. 28(9)), so the energy shown after is never above
// the energy before; and the native command line (`ramulus grow --json`, a separate path from
// the page's wasm) grows the stopped run's link to the digest the page shows.
// Screenshots go to artifacts/e2e/passes-*.png.
import { after, before, test } from 'node:test';
import assert from 'node:assert/strict';
import { mkdirSync } from 'node:fs';
import path from 'node:path';
import {
  artifacts, finishedDigest, launchBrowser, nativeRun, newPage, screenshot, serveSite,
} from './support.mjs';

let site;
let context;

before(async () => {
  site = await serveSite();
  context = await launchBrowser({ width: 1400, height: 1000 });
});

after(async () => {
  await context?.close();
  site?.close();
});

/// The sloping field as a run link at 0.5 m cells with `sweeps` channel energy sweeps.
async function slopingFieldLink(page, sweeps, seed = 1) {
  return page.evaluate(async ([count, seedText]) => {
    const text = await (await fetch('sites/sloping-field.geojson')).text();
    const { core } = window.ramulusPage.state.session;
    const made = JSON.parse(core.site_link_json(text, '0.5'));
    if (made.error) throw new Error(made.error);
    const set = JSON.parse(core.set_link_field(made.link, 'energy_sweeps', String(count)));
    if (set.error) throw new Error(JSON.stringify(set.error));
    return JSON.parse(core.set_link_field(set.link, 'seed', seedText)).link;
  }, [sweeps, String(seed)]);
}

const numbers = (text) => [...text.matchAll(/(\d+(?:\.\d+)?(?:e[+-]?\d+)?)/g)].map((m) => Number(m[1]));

test('a site run sweeps channel energy with progress, stops on Stop and stays usable', async () => {
  const page = await newPage(context);
  await page.addInitScript(() => localStorage.setItem('ramulus.animate', 'no'));
  await page.goto(site.url);
  await finishedDigest(page);
  const link = await slopingFieldLink(page, 40);
  await page.evaluate((fragment) => { location.hash = fragment; }, link);
  await page.waitForFunction(() => window.ramulusPage.state.frame?.site === true);

  // Progress: the status names the sweep and changes from one sweep to the next.
  await page.waitForFunction(() => /sweep 1 of 40/.test(document.querySelector('#passes-text').textContent),
    null, { timeout: 300000 });
  const first = await page.textContent('#passes-text');
  assert.match(first, /Channel energy/);
  assert.match(first, /outlets/);
  assert.equal(await page.isVisible('#passes-stop'), true, 'a Stop control while sweeping');
  await page.waitForFunction((shown) => document.querySelector('#passes-text').textContent !== shown
    && /sweep [2-9]\d* of 40/.test(document.querySelector('#passes-text').textContent), first, { timeout: 300000 });
  assert.notEqual(await page.textContent('#passes-text'), first, 'the progress text changes');
  // The visible part only: the page paints between sweeps of a few seconds each, and a
  // full-page picture needs several paints.
  mkdirSync(artifacts, { recursive: true });
  await page.screenshot({ path: path.join(artifacts, 'passes-sweeping.png'), timeout: 300000 });

  await page.click('#passes-stop', { timeout: 300000 });
  const digest = await finishedDigest(page, 300000);
  const status = await page.textContent('#passes-text');
  assert.match(status, /stopped (after|during) sweep \d+/, status);
  const progress = await page.evaluate(() => JSON.parse(window.ramulusPage.state.simulation.reshape_progress()));
  assert.equal(progress.done, true);
  assert.ok(progress.stopped, 'the run says it was stopped');
  // Stop was pressed once sweep 2 had begun: at least sweep 1 is whole.
  assert.ok(progress.sweep >= 1 && progress.sweep < 40, `stopped after ${progress.sweep} of 40 sweeps`);
  // Rinaldo et al. (1992): only changes that lower E are accepted.
  assert.ok(progress.energy.after <= progress.energy.before,
    `E after ${progress.energy.after} above E before ${progress.energy.before}`);
  // The shown figures (four significant digits) say the same.
  await page.locator('#site-energy').scrollIntoViewIfNeeded();
  const summary = await page.textContent('#site-energy-summary');
  const [shownBefore, shownAfter] = numbers(summary.split(':')[1]);
  assert.ok(shownAfter <= shownBefore, `shown: ${summary}`);
  const rows = await page.$$eval('#site-energy-sweeps tbody tr', (list) => list.map((row) => row.innerText));
  assert.equal(rows.length, progress.sweep, 'one row per whole sweep');
  await screenshot(page, 'passes-stopped');

  // Drainage words only, no leaf words, on the site page.
  const words = await page.evaluate(
    () => document.querySelector('main').innerText.replace(document.querySelector('#start-from').innerText, ''));
  assert.doesNotMatch(words, /vein/i, 'drainage words only on a site');
  assert.doesNotMatch(words, /\b(leaf|petiole|areole|blade|tissue|midrib|veinlet)s?\b/i, 'no leaf words on a site');

  // The stopped run's link asks for the sweeps run; the command line grows it to the same digest.
  const stoppedLink = await page.evaluate(() => location.hash.slice(1));
  assert.match(stoppedLink, new RegExp(`energy_sweeps=${progress.sweep}(&|$)`), 'the address asks for the sweeps run');
  assert.equal(await page.inputValue('#link-text'), await page.evaluate(() => location.href));
  assert.equal(nativeRun(stoppedLink).digest, digest, 'the command line grows the same network');

  // The page stays usable: readings are shown, zoom works, and a new run grows to its end.
  assert.ok((await page.$$('#metrics tbody tr')).length > 0, 'the readings are shown');
  await page.click('#zoom-in');
  await page.click('#zoom-fit');
  const small = await slopingFieldLink(page, 2, 2);
  await page.evaluate((fragment) => { location.hash = fragment; }, small);
  const next = await finishedDigest(page, 180000);
  assert.notEqual(next, digest, 'a new run grew');
  const done = await page.textContent('#passes-text');
  assert.match(done, /Channel energy .* over [12] sweeps?\./, done);
  assert.equal(await page.isHidden('#passes-stop'), true, 'nothing left to stop');
  assert.deepEqual(page.errors, [], 'no console errors');
  await screenshot(page, 'passes-after');
  await page.close();
});

test('Stop within the first sweep takes it back at once: the layout stays as grown', async () => {
  const page = await newPage(context);
  await page.addInitScript(() => localStorage.setItem('ramulus.animate', 'no'));
  await page.goto(site.url);
  await finishedDigest(page);
  const grownLink = await slopingFieldLink(page, 0, 3);
  const link = await slopingFieldLink(page, 40, 3);
  await page.evaluate((fragment) => { location.hash = fragment; }, link);
  // The first sweep is the long one (seconds on this field); stop it early in its course.
  await page.waitForFunction(
    () => /sweep 1 of 40 \([0-3]?\d % through\)/.test(document.querySelector('#passes-text').textContent),
    null, { timeout: 300000, polling: 20 });
  const during = await page.textContent('#passes-text');
  await page.click('#passes-stop', { timeout: 300000 });
  const digest = await finishedDigest(page, 300000);
  const progress = await page.evaluate(() => JSON.parse(window.ramulusPage.state.simulation.reshape_progress()));
  assert.equal(progress.taken_back, 1, `sweep 1 was stopped midway (seen: ${during})`);
  assert.equal(progress.sweep, 0, 'no whole sweep kept');
  assert.deepEqual(progress.log, [], 'no sweep ended before Stop');
  const status = await page.textContent('#passes-text');
  assert.match(status, /Stopped during sweep 1, which was taken back/, status);
  // The run is the grown layout with no sweeps: the same digest as a run asking for none,
  // grown by the command line.
  assert.equal(nativeRun(grownLink).digest, digest, 'the layout as grown');
  const stoppedLink = await page.evaluate(() => location.hash.slice(1));
  assert.equal(nativeRun(stoppedLink).digest, digest, 'the address grows what is shown');
  assert.doesNotMatch(await page.evaluate(() => document.querySelector('main').innerText), /\bvein/i);
  assert.deepEqual(page.errors, [], 'no console errors');
  await screenshot(page, 'passes-stopped-early');
  await page.close();
});

test('a leaf run relaxes its vein junctions a sweep at a time, in leaf words', async () => {
  const page = await newPage(context);
  await page.addInitScript(() => localStorage.setItem('ramulus.animate', 'no'));
  await page.goto(site.url);
  await finishedDigest(page);
  const link = await page.evaluate(() => {
    const { core } = window.ramulusPage.state.session;
    const preset = JSON.parse(core.presets_json()).find((p) => p.name === 'ovate-leaf');
    const set = JSON.parse(core.set_link_field(preset.link, 'relax_junctions', '4'));
    return JSON.parse(core.set_link_field(set.link, 'cells', '20000')).link;
  });
  await page.evaluate((fragment) => { location.hash = fragment; }, link);
  const digest = await finishedDigest(page, 180000);
  const status = await page.textContent('#passes-text');
  assert.match(status, /Vein junction cost/, status);
  assert.doesNotMatch(status, /channel|outlet/i, 'leaf words on a leaf');
  const numbersShown = numbers(status.split(':')[1]);
  assert.ok(numbersShown[1] <= numbersShown[0], `the junction cost does not rise: ${status}`);
  assert.equal(await page.isHidden('#site-energy'), true, 'no channel energy figures on a leaf');
  // The page's stepwise passes give the command line's network.
  const fragment = await page.evaluate(() => window.ramulusPage.state.simulation.link());
  assert.equal(nativeRun(fragment).digest, digest);
  assert.deepEqual(page.errors, [], 'no console errors');
  await screenshot(page, 'passes-leaf');
  await page.close();
});

/// The ovate-leaf preset scaled to `cells` cells (lattice and blade outline scaled, cell size
/// kept), as `scaled_looped_leaf` in crate-cli/src/bench.rs and tests/e2e/bench-page.mjs.
async function scaledLoopedLeafLink(page, cells) {
  return page.evaluate((target) => {
    const { core } = window.ramulusPage.state.session;
    const { params } = JSON.parse(core.presets_json()).find((p) => p.name === 'ovate-leaf');
    let twice = 0;
    params.outline.forEach(([x, y], index) => {
      const [nx, ny] = params.outline[(index + 1) % params.outline.length];
      twice += x * ny - nx * y;
    });
    const scale = Math.sqrt(target / (Math.abs(twice) / 2)) * 1.02;
    params.width = Math.ceil(params.width * scale);
    params.height = Math.ceil(params.height * scale);
    for (const root of params.roots) {
      root.x = Math.floor((root.x + 0.5) * scale);
      root.y = Math.floor((root.y + 0.5) * scale);
    }
    params.outline = params.outline.map(([x, y]) => [x * scale, y * scale]);
    params.cells = target;
    const made = JSON.parse(core.link_from_params(JSON.stringify(params)));
    if (made.error) throw new Error(JSON.stringify(made.error));
    return made.link;
  }, cells);
}

test('a large looped leaf closes its loops a slice at a time: progress shown, the page answers', async () => {
  const page = await newPage(context);
  await page.addInitScript(() => localStorage.setItem('ramulus.animate', 'no'));
  await page.goto(site.url);
  await finishedDigest(page);
  const link = await scaledLoopedLeafLink(page, 100000);
  // After each slice of the loop pass: how many loop walls the page has drawn, how many the
  // core says are closed, and how many canvas pixels carry the loop ink (#d1007a, blended).
  await page.evaluate(() => {
    const after = window.ramulusPage.afterGrowth;
    const drawNew = after.drawNewLoops.bind(after);
    window.loopsSeen = [];
    after.drawNewLoops = (simulation) => {
      drawNew(simulation);
      const { width, height } = after.view.canvas;
      const pixels = after.view.context.getImageData(0, 0, width, height).data;
      let ink = 0;
      for (let at = 0; at < pixels.length; at += 4) {
        if (pixels[at] > 150 && pixels[at + 1] < 70 && pixels[at + 2] > 60 && pixels[at + 2] < 180) ink += 1;
      }
      const closed = JSON.parse(simulation.reshape_progress()).loop?.loops ?? null;
      window.loopsSeen.push({ drawn: after.loopCount, closed, ink });
    };
  });
  await page.evaluate((fragment) => { location.hash = fragment; }, link);
  // The loop stage's status line, in leaf words.
  await page.waitForFunction(
    () => /^Closing vein loops: level \d of 6, [\d,]+ of [\d,]+ free vein ends/.test(document.querySelector('#passes-text').textContent),
    null, { timeout: 300000, polling: 10 });
  // The page answers between slices: this evaluation runs while the loop pass is not done.
  const during = await page.evaluate(() => JSON.parse(window.ramulusPage.state.simulation.reshape_progress()));
  const text = await page.textContent('#passes-text');
  await screenshot(page, 'passes-loops-during');
  await page.screenshot({ path: path.join(artifacts, 'passes-loops-during-run.png'), clip: { x: 330, y: 200, width: 1070, height: 800 } });
  assert.equal(during.stage, 'loops', `answered during the loop pass (${during.text})`);
  assert.equal(during.loop.levels, 6);
  assert.ok(during.loop.ends_done <= during.loop.ends, JSON.stringify(during.loop));
  assert.equal(await page.isHidden('#passes-stop'), true, 'no Stop while loops close (they run to the end)');
  assert.match(text, /loops run to the end once started/, text);
  // A later answer, still during the loop pass or after it: the slices go on by themselves.
  const digest = await finishedDigest(page, 300000);
  const progress = await page.evaluate(() => JSON.parse(window.ramulusPage.state.simulation.reshape_progress()));
  assert.ok(progress.loop_figures.slices >= 2, `the loop pass ran in slices (${progress.loop_figures.slices})`);
  assert.match(progress.text, /^[\d,]+ vein loops closed\.$/, progress.text);
  assert.equal(Number(progress.text.split(' ')[0].replaceAll(',', '')),
    await page.evaluate(() => JSON.parse(window.ramulusPage.state.simulation.metrics_json()).loop_count),
    'the loops counted are the independent loops measured');
  // Loops drawn as they form: after every slice the page has drawn each loop closed so far,
  // in the loop ink, and the finished drawing (the network with its loops) replaces them.
  const seen = await page.evaluate(() => window.loopsSeen);
  assert.ok(seen.length >= 2, `loops drawn over ${seen.length} slices`);
  for (const slice of seen) {
    if (slice.closed !== null) assert.equal(slice.drawn, slice.closed, JSON.stringify(slice));
  }
  const closedAll = Number(progress.text.split(' ')[0].replaceAll(',', ''));
  assert.ok(seen.some((slice) => slice.drawn > 0 && slice.drawn < closedAll), 'some loops shown before the pass ended');
  assert.equal(seen.at(-1).drawn, closedAll, 'every loop drawn before the finished drawing');
  assert.ok(seen.at(-1).ink > 0, `the loop ink shows on the canvas: ${JSON.stringify(seen.at(-1))}`);
  assert.equal(await page.evaluate(() => window.ramulusPage.view.overlays.has('loops-forming')), false);
  // The page's slices close the loops the command line closes in one go.
  const fragment = await page.evaluate(() => window.ramulusPage.state.simulation.link());
  assert.equal(nativeRun(fragment).digest, digest);
  assert.deepEqual(page.errors, [], 'no console errors');
  await screenshot(page, 'passes-loops-after');
  await page.screenshot({ path: path.join(artifacts, 'passes-loops-after-run.png'), clip: { x: 330, y: 200, width: 1070, height: 800 } });
  await page.close();
});
