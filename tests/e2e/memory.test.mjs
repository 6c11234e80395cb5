// End-to-end tests of the page's memory ceiling in headless Chromium: a run whose estimate does
// not fit under the 4 GiB of a wasm32 instance is refused before it starts, naming the budget
// asked for and the largest that fits; a run that traps the instance anyway (forced here by a
// test hook that fails the way exhausted memory does) leaves a live page that keeps the form
// and link and grows again. References outside the page: the native `ramulus` binary for
// digests, and the cell count at which the browser's instance trapped on this lattice before
// the page knew its ceiling (9,156,720 cells, 5000 x 5000, pure length cheapest first).
import { after, before, test } from 'node:test';
import assert from 'node:assert/strict';
import {
  finishedDigest, fragmentOf, launchBrowser, nativeRun, newPage, screenshot, serveSite,
} from './support.mjs';

let site;
let context;

before(async () => {
  site = await serveSite();
  context = await launchBrowser();
});

after(async () => {
  await context?.close();
  site?.close();
});

const TOO_BIG = 'v=1&width=5000&height=5000&roots=2500,4990,0,1&cells=25000000&joining=cheapest'
  + '&w_turn=0&w_flow=0&w_path=0';
// Where the instance trapped on TOO_BIG's lattice when the page let it run (measured in
// Chromium; the wasm32 memory ceiling of 4 GiB).
const TRAPPED_AT_CELLS = 9156720;

const SMALL = 'v=1&width=200&height=200&roots=100,190,0,1&cells=20000&joining=cheapest'
  + '&w_turn=0&w_flow=0&w_path=0&seed=5';

/// The number written with thousands commas right after `before` in `text`.
function numberAfter(text, before) {
  const match = text.match(new RegExp(`${before}([0-9][0-9,]*)`));
  assert.ok(match, `"${before}" followed by a number in: ${text}`);
  return Number(match[1].replaceAll(',', ''));
}

/// Commits `text` to the form field of `key` as a user does (type, then leave the field).
async function setField(page, key, text) {
  await page.fill(`#param-${key}`, text);
  await page.press(`#param-${key}`, 'Tab');
}

test('a run too big for the page is refused before it starts, naming the budget and what fits', async () => {
  const page = await newPage(context);
  await page.addInitScript(() => localStorage.setItem('ramulus.animate', 'yes'));
  await page.goto(`${site.url}#${TOO_BIG}`);
  await page.waitForFunction(() => /not started/.test(document.querySelector('#notices')?.textContent ?? ''));
  const message = await page.textContent('#notices');
  assert.match(message, /cell budget of 25,000,000 cells/);
  const largest = numberAfter(message, 'at most ');
  // Below the count at which this lattice trapped the instance, and not absurdly low.
  assert.ok(largest < TRAPPED_AT_CELLS, `${largest} cells offered`);
  assert.ok(largest > TRAPPED_AT_CELLS / 2, `${largest} cells offered`);
  // Consistent with the estimate function: that budget fits, one cell more does not.
  const refusedLink = await fragmentOf(page);
  assert.match(refusedLink, /&cells=25000000&.*&width=5000&height=5000&/);
  const [fitsAtLargest, fitsAbove, reported] = await page.evaluate(([link, cells]) => {
    const { session } = window.ramulusPage.state;
    const withCells = (count) => link.replace(/cells=\d+/, `cells=${count}`);
    return [
      session.memoryNeeds(withCells(cells)).fits,
      session.memoryNeeds(withCells(cells + 1)).fits,
      session.memoryNeeds(link).largest_budget,
    ];
  }, [refusedLink, largest]);
  assert.equal(fitsAtLargest, true);
  assert.equal(fitsAbove, false);
  assert.equal(reported, largest);
  // Nothing was started: no run, no lattice in memory, no Hold button; form and link intact.
  const [hasRun, memory] = await page.evaluate(() => [
    window.ramulusPage.state.simulation !== null,
    window.ramulusPage.state.session.core.wasm_memory_bytes(),
  ]);
  assert.equal(hasRun, false);
  assert.ok(memory < 100e6, `${memory} bytes of wasm memory after the refusal`);
  assert.equal(await page.textContent('#play'), 'Grow');
  assert.match(await page.textContent('#digest'), /no run/);
  assert.equal(await page.inputValue('#param-cells'), '25000000');
  assert.match(await page.textContent('#error-cells'), /at most/);
  assert.equal(await fragmentOf(page), refusedLink);
  await screenshot(page, '20-run-refused-for-memory');
  // Lowering the budget starts the run on the same lattice.
  await setField(page, 'cells', '3000');
  const digest = await finishedDigest(page);
  const fragment = await fragmentOf(page);
  assert.equal(fragment, refusedLink.replace('cells=25000000', 'cells=3000'));
  assert.equal(digest, nativeRun(fragment).digest);
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('a run that traps the wasm instance leaves a live page that keeps its settings and grows again', async () => {
  for (const mode of ['yes', 'no']) {
    const page = await newPage(context);
    await page.addInitScript((animate) => {
      localStorage.setItem('ramulus.animate', animate);
      // Test hook (www/session.js): runs trap once they hold this many cells.
      window.ramulusTestHooks = { trapAtCells: 3000 };
    }, mode);
    await page.goto(`${site.url}#${SMALL}`);
    await page.waitForFunction(() => /started afresh/.test(document.querySelector('#notices')?.textContent ?? ''));
    const message = await page.textContent('#notices');
    assert.match(message, /out of memory/, mode);
    assert.match(message, /Lower the cell budget/, mode);
    assert.match(message, /unreachable/, mode);
    // The last progress shown before the trap, which came at the hook's 3,000 cells.
    assert.ok(numberAfter(message, 'stopped at ') <= 3000, message);
    assert.match(message, /of 20,000 cells/, mode);
    const state = await page.evaluate(() => ({
      hasRun: window.ramulusPage.state.simulation !== null,
      playing: window.ramulusPage.runner.playing,
    }));
    assert.deepEqual(state, { hasRun: false, playing: false }, mode);
    assert.equal(await page.textContent('#play'), 'Grow', mode);
    assert.equal(await page.inputValue('#param-cells'), '20000', mode);
    const trappedLink = await fragmentOf(page);
    assert.match(trappedLink, /&cells=20000&.*&width=200&height=200&/, mode);
    if (mode === 'yes') await screenshot(page, '21-recovered-after-trap');
    // The fresh instance grows a smaller run to the native digest.
    await page.evaluate(() => { window.ramulusTestHooks = null; });
    await setField(page, 'cells', '2000');
    const digest = await finishedDigest(page);
    const fragment = await fragmentOf(page);
    assert.equal(fragment, trappedLink.replace('cells=20000', 'cells=2000'), mode);
    assert.equal(digest, nativeRun(fragment).digest, mode);
    assert.equal(await page.textContent('#notices'), '', mode);
    assert.deepEqual(page.errors, [], mode);
    await page.close();
  }
});
