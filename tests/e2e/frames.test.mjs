// End-to-end check of the page's partial geometry refill and of pictures drawn a part at a
// time: a run animated at the slow pace (its geometry refilled many times, each time only where
// growth changed it, and each picture drawn over many frames into the core's pixel buffer)
// ends with the very picture, pixel for pixel, of the same run grown without animation,
// refilled once at the end and drawn at once, and both show the native command line's digest.
// Equality is exact: both pictures blend the same lines in the same order with integer
// arithmetic (crate-draw/src/raster.rs), and the wide lines are the same canvas strokes.
import { after, before, test } from 'node:test';
import assert from 'node:assert/strict';
import { finishedDigest, fragmentOf, launchBrowser, nativeRun, newPage, serveSite } from './support.mjs';

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

const RUN = 'v=1&width=160&height=140&roots=80,136,0,1&cells=16000&joining=weighted&temperature=0.5'
  + '&w_turn=1&w_flow=0.5&alpha=0.5&w_path=0.05&seed=12';

/// Grows RUN on a fresh page, animated at the slow pace (each picture drawn in parts of about
/// 0.02 ms, so one slice of 512 thin lines each) or not at all; returns the digest, the number of geometry refills, the parts of the
/// last picture the growth loop drew, and the canvas pixels as the run ended (coloured by
/// order, the page's default) and after choosing `colouring`.
async function grown(animate, colouring) {
  const page = await newPage(context);
  await page.addInitScript((on) => {
    localStorage.setItem('ramulus.animate', on ? 'yes' : 'no');
    if (on) window.ramulusTestHooks = { drawBudgetMs: 0.02 };
  }, animate);
  await page.goto(`${site.url}#${RUN}`);
  await page.waitForFunction(() => window.ramulusPage);
  if (animate) {
    await page.selectOption('#pace', '2000');
    await page.click('#restart');
  }
  const digest = await finishedDigest(page);
  const canvasPixels = () => {
    const { view } = window.ramulusPage;
    const { width, height } = view.canvas;
    return Array.from(view.context.getImageData(0, 0, width, height).data);
  };
  const ended = await page.evaluate(canvasPixels);
  await page.selectOption('#colouring', colouring);
  const result = await page.evaluate(() => {
    const { runner } = window.ramulusPage;
    const lastDrawn = runner.stats.drawTimes.at(-1);
    return { refills: runner.stats.refills.length, lastParts: lastDrawn?.parts ?? 1 };
  });
  const pixels = await page.evaluate(canvasPixels);
  const fragment = await fragmentOf(page);
  assert.deepEqual(page.errors, []);
  await page.close();
  return { digest, fragment, ended, pixels, ...result };
}

/// How many channel values differ between two pictures of the same size.
function differingValues(one, other) {
  assert.equal(one.length, other.length);
  let differing = 0;
  for (let at = 0; at < one.length; at += 1) {
    if (one[at] !== other[at]) differing += 1;
  }
  return differing;
}

test('an animated run refilled piece by piece and drawn in parts ends with the picture of one full refill drawn at once', async () => {
  for (const colouring of ['order', 'flow']) {
    const animated = await grown(true, colouring);
    const once = await grown(false, colouring);
    assert.ok(animated.refills > 10, `${animated.refills} refills while animating`);
    assert.equal(animated.digest, once.digest);
    assert.equal(animated.digest, nativeRun(animated.fragment).digest);
    // The picture the growth loop drew last, in many parts, equals the one drawn at once.
    assert.ok(animated.lastParts > 5, `the last picture took ${animated.lastParts} parts`);
    const endedDiffering = differingValues(animated.ended, once.ended);
    assert.equal(endedDiffering, 0, `as the run ended: ${endedDiffering} channel values differ`);
    const differing = differingValues(animated.pixels, once.pixels);
    assert.equal(differing, 0, `${colouring}: ${differing} channel values differ`);
    // The picture is not blank: some pixels differ from the background.
    const background = [0xff, 0xfd, 0xf8];
    let drawn = 0;
    for (let at = 0; at < once.pixels.length; at += 4) {
      if (once.pixels[at] !== background[0] || once.pixels[at + 1] !== background[1]) drawn += 1;
    }
    assert.ok(drawn > 1000, `${drawn} pixels drawn`);
  }
});
