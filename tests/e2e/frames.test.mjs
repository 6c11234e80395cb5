// End-to-end check of the page's partial geometry refill: a run animated at the steady pace
// (its geometry refilled many times, each time only where growth changed it) ends with the
// very picture, pixel for pixel, of the same run grown without animation and refilled once at
// the end, and both show the native command line's digest.
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

/// Grows RUN on a fresh page, animated at `pace` cells a second or not at all; returns the
/// digest, the number of geometry refills, and the canvas pixels under `colouring`.
async function grown(animate, colouring) {
  const page = await newPage(context);
  await page.addInitScript((on) => localStorage.setItem('ramulus.animate', on ? 'yes' : 'no'), animate);
  await page.goto(`${site.url}#${RUN}`);
  await page.waitForFunction(() => window.ramulusPage);
  if (animate) {
    await page.selectOption('#pace', '20000');
    await page.click('#restart');
  }
  const digest = await finishedDigest(page);
  await page.selectOption('#colouring', colouring);
  const result = await page.evaluate(() => {
    const { view, runner } = window.ramulusPage;
    const { width, height } = view.canvas;
    const pixels = view.context.getImageData(0, 0, width, height).data;
    return { refills: runner.stats.refills.length, width, pixels: Array.from(pixels) };
  });
  const fragment = await fragmentOf(page);
  assert.deepEqual(page.errors, []);
  await page.close();
  return { digest, fragment, ...result };
}

test('an animated run refilled piece by piece ends with the picture of one full refill', async () => {
  for (const colouring of ['order', 'flow']) {
    const animated = await grown(true, colouring);
    const once = await grown(false, colouring);
    assert.ok(animated.refills > 10, `${animated.refills} refills while animating`);
    assert.equal(animated.digest, once.digest);
    assert.equal(animated.digest, nativeRun(animated.fragment).digest);
    assert.equal(animated.pixels.length, once.pixels.length);
    let differing = 0;
    for (let at = 0; at < once.pixels.length; at += 1) {
      if (animated.pixels[at] !== once.pixels[at]) differing += 1;
    }
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
