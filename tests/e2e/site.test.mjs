// The drainage-site panel in headless Chromium, as a designer uses it: open the demo site,
// enter a design rainfall, grow the layout, read the outlets and the schedule, export the plan
// and the schedule; and sketch a site by clicking. Outside references: the Rational Method
// Q = C i A / 360 (Q in m³/s, i in mm/h, A in ha; US FHWA HEC-22, the Rational Method
// equation) checked on the exported schedule's rows, and the native command line's
// `ramulus drain` on the same run link (a separate path from the page's wasm).
// Screenshots go to artifacts/e2e/site-*.png.
import { after, before, test } from 'node:test';
import assert from 'node:assert/strict';
import { execFileSync } from 'node:child_process';
import path from 'node:path';
import {
  finishedDigest, fragmentOf, launchBrowser, newPage, root, screenshot, serveSite,
} from './support.mjs';

const native = path.join(root, 'target', 'release', 'ramulus');

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

async function openPage() {
  const page = await newPage(context);
  await page.goto(site.url);
  await finishedDigest(page);
  await page.waitForFunction(() => window.ramulusSite != null);
  return page;
}

/// Clicks inside the site canvas at fractions of its box.
async function clickAt(page, fx, fy, options = {}) {
  await page.locator('#site-canvas').scrollIntoViewIfNeeded();
  const box = await page.locator('#site-canvas').boundingBox();
  await page.mouse.click(box.x + fx * box.width, box.y + fy * box.height, options);
}

test('the demo garden grows, sizes by the Rational Method and exports with the caution', async () => {
  const page = await openPage();
  await page.click('#site-demo');
  await page.waitForFunction(() => document.querySelectorAll('#site-features li').length > 5);
  const features = await page.textContent('#site-features');
  for (const role of ['site outline', 'area to keep clear', 'surface zone', 'outlet', 'spot level']) {
    assert.match(features, new RegExp(role), `the demo lists a ${role}`);
  }
  // No rainfall is filled in for the designer.
  assert.equal(await page.inputValue('#site-intensity'), '');
  await page.fill('#site-intensity', '60');
  await page.click('#site-grow');
  await page.waitForFunction(() => window.ramulusPage.state.frame?.site === true);
  await finishedDigest(page);
  await page.waitForFunction(() => !document.querySelector('#site-results').hidden, null, { timeout: 60000 });

  // No leaf word on a site page (the list of starting points, which names every preset, aside).
  const words = await page.evaluate(
    () => document.querySelector('main').innerText.replace(document.querySelector('#start-from').innerText, ''));
  assert.doesNotMatch(words, /vein/i, 'drainage words only on a site');
  assert.doesNotMatch(words, /\b(leaf|petiole|areole|blade|tissue|midrib|veinlet)s?\b/i, 'no leaf words on a site');
  assert.match(await page.textContent('#site-caution'), /licensed engineer/);
  const outlets = await page.$$eval('#site-outlets tbody tr', (rows) => rows.map((row) => row.innerText));
  assert.equal(outlets.length, 1, `one outlet: ${outlets}`);
  assert.match(outlets[0], /street drain/, 'the outlet goes by its name in the site file');

  // The schedule the page exports, checked row by row against Q = C i A / 360 (HEC-22).
  const form = await page.evaluate(() => window.ramulusSite.rulesText());
  const csv = await page.evaluate((rules) => window.ramulusPage.state.simulation.drainage_csv(rules), form);
  const lines = csv.trim().split('\n');
  assert.match(lines[0], /^# Concept layouts only/);
  const header = lines[1].split(',');
  const column = (name) => header.findIndex((heading) => heading.startsWith(name));
  const [area, c, intensity, flow] = ['drained area (ha)', 'runoff coefficient C', 'intensity (mm/h)', 'peak flow (m3/s)'].map(column);
  assert.ok(lines.length > 3, 'some channels were sized');
  for (const line of lines.slice(2)) {
    const cells = line.split(',').map(Number);
    assert.equal(cells[intensity], 60, 'a constant intensity is used as entered');
    const expected = (cells[c] * cells[intensity] * cells[area]) / 360;
    // The CSV rounds A to 4 decimals and C to 3: allow for that rounding.
    const slack = 0.0006 * cells[intensity] * (cells[area] + 1e-4) / 360 + 0.00006 + 0.002 * expected;
    assert.ok(Math.abs(cells[flow] - expected) <= slack, `${line}: Q ${cells[flow]} vs C i A / 360 = ${expected}`);
  }

  // The same run link sized by the native command line gives the same outlet flow.
  const link = await fragmentOf(page);
  const json = JSON.parse(execFileSync(native, ['drain', '--link', link, '--intensity', '60', '--json']).toString());
  const pageOutlet = await page.evaluate((rules) => JSON.parse(window.ramulusPage.state.simulation.drainage_json(rules, '')), form);
  assert.equal(json.outlets.length, 1);
  // The page writes flows under 0.1 m³/s in L/s (1 m³/s = 1000 L/s), to three digits.
  const [, number, unit] = pageOutlet.outlets[0].peak_flow_text.match(/^([\d.]+) (L\/s|m³\/s)$/);
  const pageFlow = Number(number) / (unit === 'L/s' ? 1000 : 1);
  assert.ok(Math.abs(pageFlow - json.outlets[0].peak_flow) <= 0.005 * json.outlets[0].peak_flow,
    `page ${pageOutlet.outlets[0].peak_flow_text} vs command line ${json.outlets[0].peak_flow} m³/s`);

  // The plan: a map scale, a north arrow, the outlet and the caution.
  const svg = await page.evaluate(
    (rules) => window.ramulusPage.state.simulation.drainage_plan_svg(rules, window.ramulusSite.siteTextFor()), form);
  assert.match(svg, /scale 1:\d+/);
  assert.match(svg, />N<\/text>/);
  // The demo file's names label the plan: its outlet and its areas kept clear.
  assert.match(svg, /street drain/);
  assert.match(svg, /pavilion/);
  assert.match(svg, /licensed engineer/);
  await screenshot(page, 'site-garden-sized');
  await page.locator('#site-panel').screenshot({ path: path.join(root, 'artifacts', 'e2e', 'site-panel.png') });
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('a sketched site without an outlet is refused by name; with one it grows', async () => {
  const page = await openPage();
  await page.fill('#site-blank-width', '40');
  await page.fill('#site-blank-height', '30');
  await page.click('#site-blank');
  assert.match(await page.textContent('#site-features'), /site outline: 4 corners/);
  // A building: four clicks and Enter.
  await page.check('input[name="site-tool"][value="obstacle"]');
  await page.fill('#site-obstacle-name', 'shed');
  for (const [fx, fy] of [[0.45, 0.4], [0.55, 0.4], [0.55, 0.55], [0.45, 0.55]]) await clickAt(page, fx, fy);
  await page.focus('#site-canvas');
  await page.keyboard.press('Enter');
  assert.match(await page.textContent('#site-features'), /area to keep clear: shed, 4 corners/);
  await page.fill('#site-cell', '1');
  await page.click('#site-grow');
  const message = await page.textContent('#site-message');
  assert.match(message, /outlet/i, `the message names what is missing: ${message}`);
  // An outlet near the low corner, then growth.
  await page.check('input[name="site-tool"][value="outlet"]');
  await clickAt(page, 0.15, 0.8);
  await page.click('#site-grow');
  await page.waitForFunction(() => window.ramulusPage.state.frame?.site === true);
  await finishedDigest(page);
  const geojson = await page.evaluate(() => window.ramulusSite.sketch.geojson());
  assert.deepEqual(geojson.features.map((f) => f.properties.role).sort(), ['obstacle', 'outlet', 'outline']);
  await screenshot(page, 'site-sketched');
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('a site plan drawn as SVG opens at its scale, and a bad plan is named by element and line', async () => {
  const page = await openPage();
  const plan = path.join(root, 'tests', 'fuzz-corpus', 'svg-site', 'garden-plan.svg');
  await page.locator('#site-svg-file').scrollIntoViewIfNeeded();
  // No scale: refused before reading, with the two forms a scale takes.
  await page.fill('#site-svg-scale', '');
  await page.setInputFiles('#site-svg-file', plan);
  await page.waitForFunction(() => document.querySelector('#site-message').textContent !== '');
  assert.match(await page.textContent('#site-message'), /give the plan's scale first/);
  await page.fill('#site-svg-scale', '1:200');
  await page.setInputFiles('#site-svg-file', plan);
  await page.waitForFunction(() => document.querySelectorAll('#site-features li').length > 5);
  const features = await page.textContent('#site-features');
  for (const role of ['site outline', 'area to keep clear', 'surface zone', 'outlet', 'spot level']) {
    assert.match(features, new RegExp(role), `the plan lists a ${role}`);
  }
  // 200 mm x 120 mm sheet at 1:200, outline from 10 to 190 by 10 to 110 mm: 36 m x 20 m.
  assert.match(await page.textContent('#site-status'), /garden-plan\.svg at 1:200/);
  await screenshot(page, 'site-svg-plan');
  const words = await page.textContent('#site-panel');
  assert.doesNotMatch(words, /vein/i, 'drainage words only on a site');
  assert.doesNotMatch(words, /\b(leaf|petiole|areole|blade|tissue|midrib|veinlet)s?\b/i, 'no leaf words on a site');
  // An open path is named with its line.
  await page.setInputFiles('#site-svg-file', {
    name: 'open.svg',
    mimeType: 'image/svg+xml',
    buffer: Buffer.from('<svg xmlns="http://www.w3.org/2000/svg" width="10mm" height="10mm" viewBox="0 0 10 10">\n<path data-role="outline" d="M 0 0 L 10 0 L 10 10"/>\n</svg>'),
  });
  await page.waitForFunction(() => document.querySelector('#site-message').textContent.includes('open.svg'));
  const message = await page.textContent('#site-message');
  assert.match(message, /open\.svg: .*<path> \(line 2\).*open/);
  await page.close();
});

// A wall bending round the north-east corner of a 20 m x 12 m site cuts the corner off from
// the only outlet (the site of tests/tests/unreached_parts.rs, with three spot levels): 6 x 5
// + 3 x 3 = 39 m² by the shoelace formula over the corner's six corners, counted by hand.
const WALLED_SITE = {
  type: 'FeatureCollection',
  properties: { units: 'm', runoff_coefficient: 0.3 },
  features: [
    { type: 'Feature', properties: { role: 'outline' }, geometry: { type: 'Polygon', coordinates: [[[0, 0], [20, 0], [20, 12], [0, 12], [0, 0]]] } },
    {
      type: 'Feature',
      properties: { role: 'obstacle', name: 'wall' },
      geometry: { type: 'Polygon', coordinates: [[[13, 12], [14, 12], [14, 7], [17, 7], [17, 4], [20, 4], [20, 3], [16, 3], [16, 6], [13, 6], [13, 12]]] },
    },
    { type: 'Feature', properties: { role: 'outlet', name: 'drain' }, geometry: { type: 'Point', coordinates: [1, 1] } },
    { type: 'Feature', properties: { role: 'level', elevation: 10 }, geometry: { type: 'Point', coordinates: [0.5, 0.5] } },
    { type: 'Feature', properties: { role: 'level', elevation: 10.4 }, geometry: { type: 'Point', coordinates: [19.5, 0.5] } },
    { type: 'Feature', properties: { role: 'level', elevation: 10.6 }, geometry: { type: 'Point', coordinates: [0.5, 11.5] } },
  ],
};

test('a corner cut off by a wall is drawn, labelled and exported; the ground flow shows on request', async () => {
  const page = await openPage();
  await page.evaluate((text) => window.ramulusSite.openText(text, 'walled.geojson'), JSON.stringify(WALLED_SITE));
  await page.fill('#site-cell', '1');
  await page.fill('#site-intensity', '60');
  await page.click('#site-grow');
  await page.waitForFunction(() => window.ramulusPage.state.frame?.site === true);
  await finishedDigest(page);
  await page.waitForFunction(() => !document.querySelector('#site-unreached').hidden, null, { timeout: 60000 });
  const said = await page.textContent('#site-unreached');
  assert.match(said, /No outlet reaches 39 m² of the site, in 1 part/, said);
  assert.match(said, /\(17, 8\) m/, 'the part is placed in the site coordinates');

  // On the picture: at the centre of the corner cell (19.5, 11.5) m of the site, i.e.
  // (19.5, 0.5) m down from the lattice's top-left corner, the pixel is the warning orange of
  // the part's tint and hatching, not the background.
  const pixel = await page.evaluate(() => {
    const { view } = window.ramulusPage;
    const px = Math.round(19.5 * view.scale + view.offsetX);
    const py = Math.round(0.5 * view.scale + view.offsetY);
    return [...view.canvas.getContext('2d').getImageData(px, py, 1, 1).data];
  });
  const [r, g, b] = pixel;
  assert.ok(r > g && g > b && r - b > 30, `an orange pixel inside the part: ${pixel}`);

  // The wall itself is drawn grey under the layout, named from the site file: at (13.5, 9.5) m
  // of the site, inside the wall's northern leg, i.e. (13.5, 2.5) m down from the top-left.
  const wallPixel = await page.evaluate(() => {
    const { view } = window.ramulusPage;
    const px = Math.round(13.5 * view.scale + view.offsetX);
    const py = Math.round(2.5 * view.scale + view.offsetY);
    return [...view.canvas.getContext('2d').getImageData(px, py, 1, 1).data];
  });
  const [wr, wg, wb] = wallPixel;
  assert.ok(Math.abs(wr - wg) < 16 && Math.abs(wg - wb) < 24 && wr < 230, `a grey pixel inside the wall: ${wallPixel}`);
  const keptClear = JSON.parse(await page.evaluate(
    () => window.ramulusPage.state.simulation.obstacles_json(window.ramulusSite.siteTextFor())));
  assert.deepEqual(keptClear.map((area) => area.name), ['wall']);

  // The channels GeoJSON carries it with its own role; the plan hatches and labels it.
  const form = await page.evaluate(() => window.ramulusSite.rulesText());
  const geojson = JSON.parse(await page.evaluate((rules) => window.ramulusPage.state.simulation.drainage_geojson(rules), form));
  const parts = geojson.features.filter((feature) => feature.properties.role === 'unreached');
  assert.equal(parts.length, 1);
  assert.ok(Math.abs(parts[0].properties.area - 0.0039) < 1e-9, `39 m² = 0.0039 ha: ${parts[0].properties.area}`);
  const svg = await page.evaluate(
    (rules) => window.ramulusPage.state.simulation.drainage_plan_svg(rules, window.ramulusSite.siteTextFor()), form);
  assert.match(svg, /class="unreached"/);
  assert.match(svg, /no outlet reaches: 39 m²/);
  await screenshot(page, 'site-unreached');
  await page.locator('#site-panel').screenshot({ path: path.join(root, 'artifacts', 'e2e', 'site-unreached-panel.png') });

  // Natural flow on the bare ground, faint, on request.
  await page.check('#site-ground-flow');
  assert.ok(await page.evaluate(() => window.ramulusPage.view.overlays.has('ground-flow')));
  assert.match(await page.textContent('#site-ground-flow-note'), /D8/);
  const lines = await page.evaluate(() => window.ramulusPage.state.simulation.ground_flow_lines().length);
  assert.ok(lines > 0 && lines % 5 === 0, `ground flow lines: ${lines / 5}`);
  await page.locator('#canvas').screenshot({ path: path.join(root, 'artifacts', 'e2e', 'site-ground-flow.png') });
  await page.uncheck('#site-ground-flow');
  assert.ok(!(await page.evaluate(() => window.ramulusPage.view.overlays.has('ground-flow'))));

  const words = await page.textContent('#site-panel');
  assert.doesNotMatch(words, /vein/i, 'drainage words only on a site');
  assert.doesNotMatch(words, /\b(leaf|petiole|areole|blade|tissue|midrib|veinlet)s?\b/i, 'no leaf words on a site');
  assert.deepEqual(page.errors, []);
  await page.close();
});
