// The tissue control: with a conducting threshold (`vein_area`), the segments draining less are
// tissue (hillslope on a site), drawn faint, hidden or like the veins, on the canvas, in the
// PNG and in the SVG. References outside the page: the native `ramulus` binary for the number
// of segments, the browser's XML parser for the SVG, relative luminance as WCAG 2.0 defines it
// for "lighter". Screenshots go to artifacts/e2e/.
import { after, before, test } from 'node:test';
import assert from 'node:assert/strict';
import { mkdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import {
  artifacts, finishedDigest, fragmentOf, launchBrowser, nativeRun, newPage, screenshot, serveSite,
} from './support.mjs';

/// Saves the drawing with its controls and key (the page's network section) as a screenshot.
async function drawingShot(page, name) {
  mkdirSync(artifacts, { recursive: true });
  await page.locator('section.field').screenshot({ path: path.join(artifacts, `${name}-drawing.png`) });
}

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

/// Sets one form field as a person does (type, then leave the field) and waits for the run.
async function setField(page, key, text) {
  await page.evaluate((id) => { document.getElementById(id).closest('details').open = true; }, `param-${key}`);
  await page.fill(`#param-${key}`, text);
  await page.press(`#param-${key}`, 'Tab');
  return finishedDigest(page);
}

/// The canvas's pixels as [r, g, b] triples (device pixels, row by row).
function canvasPixels(page) {
  return page.evaluate(() => {
    const canvas = document.getElementById('canvas');
    const data = canvas.getContext('2d').getImageData(0, 0, canvas.width, canvas.height).data;
    return Array.from(data.filter((_, index) => index % 4 !== 3));
  });
}

/// Relative luminance of sRGB bytes (WCAG 2.0, "relative luminance").
function luminance(r, g, b) {
  const channel = (value) => {
    const c = value / 255;
    return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  };
  return 0.2126 * channel(r) + 0.7152 * channel(g) + 0.0722 * channel(b);
}

const BACKGROUND = [0xff, 0xfd, 0xf8];

function isBackground(pixels, at) {
  return pixels[at] === BACKGROUND[0] && pixels[at + 1] === BACKGROUND[1] && pixels[at + 2] === BACKGROUND[2];
}

async function showTissue(page, value) {
  await page.selectOption('#tissue', value);
  // The control redraws at once; wait for the frame to be painted.
  await page.evaluate(() => new Promise((resolve) => requestAnimationFrame(() => resolve())));
  return canvasPixels(page);
}

async function savedSvg(page) {
  const [download] = await Promise.all([page.waitForEvent('download'), page.click('#save-svg')]);
  const text = readFileSync(await download.path(), 'utf8');
  return page.evaluate((svg) => {
    const document = new DOMParser().parseFromString(svg, 'image/svg+xml');
    const run = document.getElementsByTagNameNS('tag:ramulus.invalid,2026:run-metadata/1', 'run')[0];
    return {
      parseError: document.getElementsByTagName('parsererror').length,
      tissue: run?.getAttributeNS('tag:ramulus.invalid,2026:run-metadata/1', 'tissue') ?? null,
      veins: document.querySelectorAll('line.segment').length,
      faint: document.querySelectorAll('g.tissue line').length,
      desc: document.querySelector('desc')?.textContent ?? '',
    };
  }, text);
}

test('tissue drawn faint, hidden or like veins on the canvas and in the SVG', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  await finishedDigest(page);
  await page.selectOption('#start-from', 'elliptic-leaf');
  await finishedDigest(page);
  // The preset has veins apart from tissue: the tissue control shows. Without a threshold
  // every cell is a vein: no tissue control, and the readings that only follow the cell size
  // say so (the core's mark).
  assert.equal(await page.isVisible('#tissue'), true, 'the elliptic leaf has tissue');
  await setField(page, 'vein_area', '0');
  assert.equal(await page.isVisible('#tissue'), false, 'no tissue control without a threshold');
  const marked = await page.locator('#metrics tr.says-little').allTextContents();
  assert.ok(marked.some((row) => row.startsWith('vein density')), `marked rows: ${marked}`);
  assert.ok(marked.some((row) => row.startsWith('free-ending veinlet density')), `marked rows: ${marked}`);
  assert.match(marked.join(' '), /follows the cell size/);

  // 0.5 mm² is 22 cells of 0.15 mm: the finest streams become tissue.
  await setField(page, 'vein_area', '0.5');
  assert.equal(await page.isVisible('#tissue'), true);
  assert.equal(await page.textContent('label[for="tissue"]'), 'Tissue (below the vein threshold)');
  assert.equal(await page.locator('#metrics tr.says-little').count(), 0, 'veins measured: nothing marked');

  const asVeins = await showTissue(page, 'veins');
  await screenshot(page, 'tissue-veins');
  await drawingShot(page, 'tissue-veins');
  const hidden = await showTissue(page, 'hidden');
  await screenshot(page, 'tissue-hidden');
  await drawingShot(page, 'tissue-hidden');
  const faint = await showTissue(page, 'faint');
  await screenshot(page, 'tissue-faint');
  await drawingShot(page, 'tissue-faint');
  assert.match(await page.textContent('#legend'), /tissue: drains less than the vein threshold/);

  // Where the veins-like drawing inks a pixel and the hidden one leaves the background, there
  // was only tissue; where the hidden drawing inks, a vein.
  let tissueOnly = 0;
  let veinPixels = 0;
  let faintTissueLuminance = 0;
  let faintVeinLuminance = 0;
  let faintTissueInked = 0;
  let hiddenInkedOutsideVeins = 0;
  for (let at = 0; at < asVeins.length; at += 3) {
    const inkedAsVeins = !isBackground(asVeins, at);
    const inkedHidden = !isBackground(hidden, at);
    if (inkedHidden && !inkedAsVeins) hiddenInkedOutsideVeins += 1;
    if (inkedAsVeins && !inkedHidden) {
      tissueOnly += 1;
      faintTissueLuminance += luminance(faint[at], faint[at + 1], faint[at + 2]);
      if (!isBackground(faint, at)) faintTissueInked += 1;
    } else if (inkedHidden) {
      veinPixels += 1;
      faintVeinLuminance += luminance(faint[at], faint[at + 1], faint[at + 2]);
    }
  }
  assert.ok(tissueOnly > 1000, `${tissueOnly} pixels of tissue alone`);
  assert.ok(veinPixels > 1000, `${veinPixels} pixels of veins`);
  // Hiding takes ink away and never adds any.
  assert.equal(hiddenInkedOutsideVeins, 0);
  // Faint tissue is still drawn, and lighter than the veins.
  assert.ok(faintTissueInked > 0.9 * tissueOnly, `${faintTissueInked} of ${tissueOnly} tissue pixels inked when faint`);
  const meanTissue = faintTissueLuminance / tissueOnly;
  const meanVein = faintVeinLuminance / veinPixels;
  assert.ok(meanTissue > meanVein + 0.1, `faint tissue ${meanTissue.toFixed(3)}, veins ${meanVein.toFixed(3)}`);

  // The SVG carries the choice: every segment of the native run is a vein line or a faint
  // tissue line; hidden, the tissue lines are gone.
  const native = nativeRun(await fragmentOf(page));
  const faintSvg = await savedSvg(page);
  assert.equal(faintSvg.parseError, 0);
  assert.equal(faintSvg.tissue, 'faint');
  assert.ok(faintSvg.faint > 0, 'faint tissue lines in the SVG');
  assert.equal(faintSvg.veins + faintSvg.faint, native.segments);
  assert.match(faintSvg.desc, /tissue segments? drawn faint/);
  await showTissue(page, 'hidden');
  const hiddenSvg = await savedSvg(page);
  assert.equal(hiddenSvg.tissue, 'hidden');
  assert.equal(hiddenSvg.faint, 0);
  assert.equal(hiddenSvg.veins, faintSvg.veins);
  await showTissue(page, 'veins');
  const veinsSvg = await savedSvg(page);
  assert.equal(veinsSvg.tissue, 'veins');
  assert.equal(veinsSvg.veins, native.segments);

  // A view setting: the link and the digest stay as they were, and the choice is kept.
  const link = await fragmentOf(page);
  await showTissue(page, 'hidden');
  assert.equal(await fragmentOf(page), link);
  await page.reload();
  await finishedDigest(page);
  assert.equal(await page.inputValue('#tissue'), 'hidden');
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('on a drainage site the control speaks of hillslope and channels, never veins', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  await finishedDigest(page);
  await page.selectOption('#start-from', 'drainage-site');
  await finishedDigest(page);
  // 200 m² on 2 m cells: 50 cells drain to a channel head.
  await setField(page, 'vein_area', '200');
  await showTissue(page, 'faint');
  assert.equal(await page.textContent('label[for="tissue"]'), 'Hillslope (below the channel threshold)');
  assert.match(await page.textContent('#legend'), /hillslope: drains less than the channel threshold/);
  await screenshot(page, 'tissue-site-faint');
  await drawingShot(page, 'tissue-site-faint');
  const words = await page.evaluate(() => document.querySelector('main').innerText);
  assert.doesNotMatch(words, /vein/i);
  const svg = await savedSvg(page);
  assert.match(svg.desc, /hillslope segments? drawn faint/);
  assert.doesNotMatch(svg.desc, /vein/i);
  assert.deepEqual(page.errors, []);
  await page.close();
});
