// The fit panel in headless Chromium. The reference outside the page is the native command
// line: the page's posterior JSON (its fit run in Web Workers, outcomes absorbed in job order)
// must equal `ramulus fit --json` for the same plan, specimen and seed, key for key. Also:
// cancel ends every worker (Playwright's own list of the page's workers), and bad input gets
// the core's message before any worker starts. The specimen and the best run are drawn to
// pixels in the workers: both canvases hold drawn (non-white) pixels, and the best run's
// inked box matches the extent of the network the native binary grows from the best run's
// link (`ramulus grow --link ... --record`), mapped by the canvas's own scale and offset.
// Screenshots at 1400 and 420 px wide.
import { after, before, test } from 'node:test';
import assert from 'node:assert/strict';
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import {
  finishedDigest, launchBrowser, newPage, root, screenshot, serveSite,
} from './support.mjs';

const native = path.join(root, 'target', 'release', 'ramulus');
// A small leaf (1,500 cells) so a whole fit takes seconds.
const SMALL_LEAF = 'v=1&seed=7&cells=1500&joining=weighted&temperature=0.5&threshold=10&radius=4&attach_to_segments=false&refresh=0.05&w_len=1&w_turn=1.5&branch_angle=50&w_flow=0.1&alpha=0.5&w_path=0.1&elongation=3&rear_cost=3&w_grade=0&grade_x=0&grade_y=0&runoff=1&gamma=3&tip_width=0.12&width=220&height=300&cell_size=0.15&units=mm&jitter=0.4&roots=110,270,0,1&outline=none&obstacles=&mask=none';

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

/// Ticks exactly the given keys and metrics and fills the settings.
async function fillPlan(page, { keys, metrics, settings }) {
  await page.evaluate(({ keys, metrics }) => {
    const panel = window.ramulusFit;
    for (const [key, row] of panel.keyRows) row.tick.checked = key in keys;
    for (const [key, row] of panel.metricRows) row.tick.checked = metrics.includes(key);
  }, { keys, metrics });
  for (const [key, [low, high]] of Object.entries(keys)) {
    await page.fill(`#fit-low-${key}`, low);
    await page.fill(`#fit-high-${key}`, high);
  }
  for (const [id, value] of Object.entries(settings)) {
    if (id === 'method') await page.selectOption('#fit-method', value);
    else await page.fill(`#fit-${id}`, value);
  }
}

/// A result canvas's view (device pixels per unit, offsets) and the box of its drawn pixels,
/// those not the white background: `[minX, minY, maxX, maxY]` in pixels, or null.
async function pictureFacts(page, id) {
  return page.evaluate((id) => {
    const canvas = document.getElementById(id);
    const { width, height } = canvas;
    const data = canvas.getContext('2d').getImageData(0, 0, width, height).data;
    let box = null;
    let inked = 0;
    for (let y = 0; y < height; y += 1) {
      for (let x = 0; x < width; x += 1) {
        const at = 4 * (y * width + x);
        if (data[at] === 255 && data[at + 1] === 255 && data[at + 2] === 255) continue;
        inked += 1;
        box = box ? [Math.min(box[0], x), Math.min(box[1], y), Math.max(box[2], x), Math.max(box[3], y)] : [x, y, x, y];
      }
    }
    return {
      width, height, inked, box,
      scale: Number(canvas.dataset.scale), offsetX: Number(canvas.dataset.offsetX), offsetY: Number(canvas.dataset.offsetY),
    };
  }, id);
}

async function openSmallLeaf(page) {
  await page.goto(`${site.url}#${SMALL_LEAF}`);
  await finishedDigest(page);
  await page.waitForFunction(() => window.ramulusFit);
}

for (const method of ['quick', 'sequential']) {
  test(`a ${method} fit on the page equals ramulus fit --json for the same plan and seed`, async () => {
    const page = await newPage(context);
    await openSmallLeaf(page);
    const settings = method === 'quick'
      ? { method, replicates: '2', simulations: '40', accept: '10', predictive: '6', seed: '11' }
      : { method, replicates: '2', population: '12', generations: '2', predictive: '6', seed: '12' };
    await fillPlan(page, {
      keys: { w_turn: ['0.5', '3'], alpha: ['0.3', '0.9'] },
      metrics: ['transport_cost', 'tortuosity', 'bifurcation_ratio'],
      settings,
    });
    await page.evaluate(() => { window.ramulusTestHooks = { fitWorkers: 2 }; });
    await page.click('#fit-start');
    await page.waitForSelector('#fit-posterior tbody tr', { timeout: 240000 });
    await page.waitForSelector('#fit-best-image', { timeout: 60000 });

    // The page's posterior JSON, as the user downloads it.
    const [download] = await Promise.all([page.waitForEvent('download'), page.click('#fit-save-json')]);
    const pageResult = JSON.parse(readFileSync(await download.path(), 'utf8'));
    // The specimen the page fitted, as the user downloads it, fitted again by the command line.
    const [record] = await Promise.all([page.waitForEvent('download'), page.click('#save-record')]);
    const folder = mkdtempSync(path.join(tmpdir(), 'ramulus-fit-'));
    const specimen = path.join(folder, 'specimen.json');
    writeFileSync(specimen, readFileSync(await record.path()));
    const plan = await page.evaluate(() => JSON.parse(window.ramulusFit.session.request_json()));
    const pageAddress = await page.evaluate(() => `${location.origin}${location.pathname}`);
    const args = ['fit', '--specimen', specimen, '--link', SMALL_LEAF, '--json', '--page', pageAddress,
      '--method', method, '--replicates', settings.replicates, '--predictive', settings.predictive,
      '--seed', settings.seed];
    for (const key of plan.fitted) args.push('--fit', `${key.key}=${key.low}:${key.high}`);
    for (const metric of plan.matched) args.push('--match', metric.key);
    if (method === 'quick') args.push('--simulations', settings.simulations, '--accept', settings.accept);
    else args.push('--population', settings.population, '--generations', settings.generations);
    const cliResult = JSON.parse(execFileSync(native, args, { stdio: ['ignore', 'pipe', 'pipe'] }).toString());

    assert.deepEqual(Object.keys(pageResult).sort(), Object.keys(cliResult).sort());
    for (const key of Object.keys(cliResult)) assert.deepEqual(pageResult[key], cliResult[key], key);
    assert.deepEqual(Object.keys(pageResult.posterior).sort(), ['alpha', 'w_turn']);

    // The table shows the same medians the JSON holds (as the page formats them), the plots
    // and the specimen beside the best run are images, and the best run link opens that run.
    assert.equal(await page.locator('#fit-posterior tbody tr').count(), 2);
    assert.equal(await page.locator('#fit-predictive tbody tr').count(), 3);
    assert.equal(await page.locator('#fit-sensitivity-table tbody tr').count(), 6);
    assert.ok(await page.evaluate(() => document.getElementById('fit-plots').naturalWidth > 0));
    await page.waitForSelector('#fit-specimen-image', { timeout: 60000 });
    const specimenPicture = await pictureFacts(page, 'fit-specimen-image');
    const bestPicture = await pictureFacts(page, 'fit-best-image');
    // Both drawn, at one scale (the page's rule: so they compare), on canvases of one size.
    assert.ok(specimenPicture.inked > 100, `specimen: ${specimenPicture.inked} drawn pixels`);
    assert.ok(bestPicture.inked > 100, `best run: ${bestPicture.inked} drawn pixels`);
    assert.equal(specimenPicture.scale, bestPicture.scale);
    assert.deepEqual([specimenPicture.width, specimenPicture.height], [bestPicture.width, bestPicture.height]);
    // The outside check: the native binary grows the best run's link; the extent of its
    // segment ends, mapped by the canvas's scale and offset, is the inked box within 2 px (an
    // anti-aliased line reaches into the pixel beside its end: Wu 1991).
    const recordFile = path.join(folder, 'best-run.json');
    execFileSync(native, ['grow', '--link', cliResult.best_link, '--record', recordFile], { stdio: ['ignore', 'pipe', 'pipe'] });
    const grown = JSON.parse(readFileSync(recordFile, 'utf8'));
    const ends = grown.segments.flatMap((segment) => [grown.nodes[segment.from], grown.nodes[segment.to]]);
    const expected = [
      Math.min(...ends.map(([x]) => x)) * bestPicture.scale + bestPicture.offsetX,
      Math.min(...ends.map(([, y]) => y)) * bestPicture.scale + bestPicture.offsetY,
      Math.max(...ends.map(([x]) => x)) * bestPicture.scale + bestPicture.offsetX,
      Math.max(...ends.map(([, y]) => y)) * bestPicture.scale + bestPicture.offsetY,
    ];
    for (let side = 0; side < 4; side += 1) {
      assert.ok(Math.abs(bestPicture.box[side] - expected[side]) <= 2,
        `best run's drawn box ${bestPicture.box} against the grown extent ${expected.map((v) => v.toFixed(1))} px`);
    }
    assert.match(await page.textContent('#fit-scale'), /one scale: +[\d.]+ mm$/);
    const best = await page.getAttribute('#fit-best-link', 'href');
    assert.equal(`${pageAddress}${best}`, cliResult.best_link);
    const csv = await page.evaluate(() => window.ramulusFit.session.posterior_csv());
    const rows = csv.trim().split('\n');
    assert.equal(rows[0], `${plan.fitted.map((key) => key.key).join(',')},weight,distance,seed`);
    if (method === 'quick') assert.equal(rows.length - 1, Number(settings.accept));

    if (method === 'quick') {
      // The same record loaded as a specimen file (measured in a worker) fits the same.
      await page.setInputFiles('#fit-specimen-file', specimen);
      await page.waitForFunction(() => document.getElementById('fit-use-file').checked);
      await page.click('#fit-start');
      await page.waitForSelector('#fit-specimen-image', { timeout: 240000 });
      const fromFile = JSON.parse(await page.evaluate(() => window.ramulusFit.reportText));
      assert.deepEqual(fromFile, cliResult);
      await screenshot(page, 'fit-01-result-1400');
      await page.setViewportSize({ width: 420, height: 900 });
      await screenshot(page, 'fit-02-result-420');
      // The fit link opens the same fit again, run again to the same posterior.
      const fitLink = await page.inputValue('#fit-link');
      const again = await newPage(context);
      await again.goto(fitLink);
      await again.waitForSelector('#fit-posterior tbody tr', { timeout: 240000 });
      const reopened = JSON.parse(await again.evaluate(() => window.ramulusFit.reportText));
      assert.deepEqual(reopened.posterior, cliResult.posterior);
      assert.equal(reopened.best_link, cliResult.best_link);
      assert.deepEqual(again.errors, []);
      await again.close();
    }
    assert.deepEqual(page.errors, []);
    await page.close();
  });
}

test('the sensitivity check warns about a key no chosen metric sees, before the fit starts', async () => {
  const page = await newPage(context);
  await openSmallLeaf(page);
  // The leaf grows from its one root whatever gamma is, so the root count moves with no key
  // and has no seed noise: it sees nothing. alpha is the exponent of the transport cost
  // (sum of flow^alpha times length, flows of many mm^2), so that metric sees alpha far beyond
  // seed noise. gamma only sets widths (width grows as flow^(1/gamma), Murray 1926), so the
  // check must name gamma, and only gamma.
  await fillPlan(page, {
    keys: { gamma: ['1', '10'], alpha: ['0.3', '0.9'] },
    metrics: ['root_count', 'transport_cost'],
    settings: { method: 'quick', replicates: '2', simulations: '40', accept: '10', seed: '5' },
  });
  await page.evaluate(() => { window.ramulusTestHooks = { fitWorkers: 2 }; });
  await page.click('#fit-check');
  await page.waitForSelector('#fit-sensitivity-table tbody tr', { timeout: 120000 });
  await page.waitForFunction(() => !document.getElementById('fit-start').disabled);
  const warnings = await page.locator('.fit-warning').allTextContents();
  assert.equal(warnings.length, 1, warnings.join('\n'));
  assert.match(warnings[0], /`gamma`/);
  const rows = await page.locator('#fit-sensitivity-table tbody tr').evaluateAll((trs) => trs.map((tr) => [...tr.cells].map((td) => td.textContent)));
  const row = (key, metric) => rows.find((cells) => cells[0] === key && cells[1] === metric);
  assert.deepEqual(row('gamma', 'root_count').slice(2), ['0', '0', '0', 'no']);
  assert.deepEqual(row('alpha', 'root_count').slice(2), ['0', '0', '0', 'no']);
  assert.equal(row('alpha', 'transport_cost')[5], 'yes');
  assert.equal(await page.locator('#fit-posterior').count(), 0, 'the check alone runs no fit');
  // Start fit continues from the check and finishes; the warning stays beside the result.
  await page.click('#fit-start');
  await page.waitForSelector('#fit-posterior tbody tr', { timeout: 240000 });
  assert.equal(await page.locator('.fit-warning').count(), 1);
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('cancel ends every fit worker and leaves the panel ready', async () => {
  const page = await newPage(context);
  await openSmallLeaf(page);
  await fillPlan(page, {
    keys: { w_turn: ['0.5', '3'], alpha: ['0.3', '0.9'] },
    metrics: ['transport_cost', 'tortuosity'],
    settings: { method: 'quick', replicates: '2', simulations: '5000', accept: '10', seed: '3' },
  });
  await page.evaluate(() => { window.ramulusTestHooks = { fitWorkers: 2 }; });
  const started = [];
  page.on('worker', (worker) => started.push(worker));
  await page.click('#fit-start');
  await page.waitForFunction(() => /^Fit: [1-9]/.test(document.getElementById('fit-status').textContent), null, { timeout: 120000 });
  assert.equal(started.length, 2, 'one worker per requested core');
  assert.equal(page.workers().length, 2);
  // Pause keeps the workers; the progress stops once running chunks are in.
  await page.click('#fit-pause');
  assert.equal(await page.textContent('#fit-pause'), 'Resume');
  await page.click('#fit-pause');
  const closed = started.map((worker) => new Promise((resolve) => worker.on('close', resolve)));
  await page.click('#fit-cancel');
  await Promise.all(closed);
  assert.equal(page.workers().length, 0, 'no worker left running');
  assert.match(await page.textContent('#fit-status'), /Cancelled/);
  assert.equal(await page.isDisabled('#fit-start'), false);
  assert.equal(await page.locator('#fit-posterior').count(), 0);
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('bad input gets the core\'s message before any work starts', async () => {
  const page = await newPage(context);
  await openSmallLeaf(page);
  const started = [];
  page.on('worker', (worker) => started.push(worker));
  // Bounds reversed: named by the plan's check (crate-core fit/plan.rs).
  await fillPlan(page, {
    keys: { alpha: ['0.9', '0.3'] },
    metrics: ['tortuosity'],
    settings: { method: 'quick', simulations: '40', accept: '10' },
  });
  await page.click('#fit-start');
  const reversed = await page.textContent('#fit-error');
  assert.match(reversed, /bounds of `alpha`: 0\.9 to 0\.3; the lower bound must be below the upper one/);
  // An unknown key (as a fit link or an edited page could send): the core's own words.
  await page.evaluate(() => {
    const panel = window.ramulusFit;
    const row = panel.keyRows.get('alpha');
    panel.keyRows.set('no_such_key', row);
    panel.keyRows.delete('alpha');
  });
  await page.fill('#fit-low-alpha', '0.3');
  await page.fill('#fit-high-alpha', '0.9');
  await page.click('#fit-start');
  assert.match(await page.textContent('#fit-error'), /`no_such_key` is not a parameter/);
  // Outside the allowed range, and zero replicates.
  await page.evaluate(() => {
    const panel = window.ramulusFit;
    panel.keyRows.set('alpha', panel.keyRows.get('no_such_key'));
    panel.keyRows.delete('no_such_key');
  });
  await page.fill('#fit-high-alpha', '1.5');
  await page.click('#fit-start');
  assert.match(await page.textContent('#fit-error'), /bounds of `alpha`: 0\.3 to 1\.5; both must lie in the allowed range/);
  await page.fill('#fit-high-alpha', '0.9');
  await page.fill('#fit-replicates', '0');
  await page.click('#fit-start');
  assert.match(await page.textContent('#fit-error'), /replicates is 0; allowed: 1 to 100/);
  assert.equal(started.length, 0, 'no worker was started for a plan that cannot run');
  await screenshot(page, 'fit-03-bad-input');
  assert.deepEqual(page.errors, []);
  await page.close();
});
