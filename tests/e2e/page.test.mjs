// End-to-end tests of the page in a real headless Chromium (Debian's, driven by
// playwright-core). References outside the page: the native `ramulus` binary for digests and
// segment counts, the browser's own XML parser for the SVG, Python's csv module (RFC 4180
// reader) for the CSV, and the PNG signature of the PNG specification (ISO/IEC 15948, 5.2).
// Screenshots of the main states go to artifacts/e2e/.
import { after, before, test } from 'node:test';
import assert from 'node:assert/strict';
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import {
  finishedDigest, fragmentOf, launchBrowser, nativeRun, newPage, screenshot, serveSite, tabTo,
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

test('the page loads without console errors and grows the first leaf to its end', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  const digest = await finishedDigest(page);
  const native = nativeRun(await fragmentOf(page));
  assert.equal(digest, native.digest);
  const progress = await page.textContent('#progress-text');
  assert.match(progress, new RegExp(`^${native.cells.toLocaleString('en')} of `));
  assert.ok((await page.locator('#metrics tbody tr').count()) > 20, 'readings table filled');
  await screenshot(page, '01-first-leaf');
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('a preset played to its end shows the digest the native command line prints', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  await finishedDigest(page);
  for (const name of ['elliptic-leaf', 'drainage-site']) {
    await page.selectOption('#start-from', name);
    const digest = await finishedDigest(page);
    const fragment = await fragmentOf(page);
    assert.equal(digest, nativeRun(fragment).digest, name);
    await screenshot(page, `02-${name}`);
  }
  // The drainage site carries the caution.
  assert.match(await page.textContent('#caution'), /licensed engineer/);
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('the SVG export parses as XML and holds one segment element per segment', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  await finishedDigest(page);
  const native = nativeRun(await fragmentOf(page));
  const [download] = await Promise.all([page.waitForEvent('download'), page.click('#save-svg')]);
  const text = readFileSync(await download.path(), 'utf8');
  const parsed = await page.evaluate((svg) => {
    const document = new DOMParser().parseFromString(svg, 'image/svg+xml');
    return {
      error: document.getElementsByTagName('parsererror').length,
      root: document.documentElement.localName,
      segments: document.querySelectorAll('.segment').length,
      tissue: document.querySelectorAll('g.tissue line').length,
      width: document.documentElement.getAttribute('width'),
    };
  }, text);
  assert.equal(parsed.error, 0);
  assert.equal(parsed.root, 'svg');
  // The leaf's veins, and under them its tissue drawn faint (the page's default): together
  // every segment the command line grows.
  assert.ok(parsed.tissue > 0, 'the leaf has tissue below its vein threshold');
  assert.equal(parsed.segments + parsed.tissue, native.segments);
  assert.match(parsed.width, /mm$/, 'a leaf is drawn at true size in millimetres');
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('a copied link opened in a new page reproduces the digest', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  await page.selectOption('#start-from', 'elliptic-leaf');
  await page.fill('#param-seed', '90210');
  await page.press('#param-seed', 'Tab');
  const digest = await finishedDigest(page);
  await page.click('#copy-link');
  const copied = await page.evaluate(() => navigator.clipboard.readText());
  assert.match(copied, /#v=1&seed=90210&/);
  const other = await newPage(context);
  await other.goto(copied);
  assert.equal(await finishedDigest(other), digest);
  assert.equal(digest, nativeRun(copied).digest);
  assert.deepEqual(page.errors, []);
  assert.deepEqual(other.errors, []);
  await page.close();
  await other.close();
});

test('a damaged fragment names the bad fields, falls back to defaults and still grows', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  await page.selectOption('#start-from', 'elliptic-leaf');
  await finishedDigest(page);
  const damaged = (await fragmentOf(page))
    .replace('alpha=0.5', 'alpha=banana')
    .replace('joining=weighted', 'joining=%ZZ');
  const fresh = await newPage(context);
  await fresh.goto(`${site.url}#${damaged}`);
  const digest = await finishedDigest(fresh);
  const notices = await fresh.textContent('#notices');
  assert.match(notices, /"alpha"/);
  assert.match(notices, /"joining"/);
  assert.equal(await fresh.isVisible('#error-alpha'), true);
  assert.equal(await fresh.inputValue('#param-alpha'), '0.5', 'alpha back at its default');
  assert.equal(digest, nativeRun(damaged).digest, 'the native reader falls back the same way');
  await screenshot(fresh, '03-damaged-link');
  assert.deepEqual(fresh.errors, []);
  await page.close();
  await fresh.close();
});

test('a rejected value stays in its field with a message; an accepted one regrows', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  await finishedDigest(page);
  const before = await fragmentOf(page);
  await page.fill('#param-alpha', '7');
  await page.press('#param-alpha', 'Tab');
  assert.match(await page.textContent('#error-alpha'), /0, 1/);
  assert.equal(await page.inputValue('#param-alpha'), '7', 'what the user typed is kept');
  assert.equal(await fragmentOf(page), before, 'the run link is unchanged');
  await screenshot(page, '04-rejected-value');
  await page.fill('#param-alpha', '0.3');
  await page.press('#param-alpha', 'Tab');
  const digest = await finishedDigest(page);
  const fragment = await fragmentOf(page);
  assert.match(fragment, /&alpha=0\.3&/);
  assert.equal(await page.isVisible('#error-alpha'), false);
  assert.equal(digest, nativeRun(fragment).digest);
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('play, pause and step work from the keyboard alone', async () => {
  const page = await newPage(context);
  // At the slow pace (2,000 cells a second) the first leaf takes about ten seconds.
  await page.goto(site.url);
  await finishedDigest(page);
  await tabTo(page, 'pace');
  await page.keyboard.press('ArrowUp');
  await page.keyboard.press('ArrowUp');
  assert.equal(await page.inputValue('#pace'), '2000');
  await tabTo(page, 'restart');
  await page.keyboard.press('Enter');
  await page.keyboard.press('Shift+Tab');
  await page.keyboard.press('Shift+Tab');
  assert.equal(await page.evaluate(() => document.activeElement.id), 'play');
  assert.equal(await page.getAttribute('#play', 'aria-pressed'), 'true');
  await page.keyboard.press('Enter');
  assert.equal(await page.getAttribute('#play', 'aria-pressed'), 'false');
  const paused = await page.evaluate(() => window.ramulusPage.state.simulation.cells());
  await page.waitForTimeout(300);
  assert.equal(await page.evaluate(() => window.ramulusPage.state.simulation.cells()), paused);
  await page.keyboard.press('Space');
  assert.equal(await page.getAttribute('#play', 'aria-pressed'), 'true');
  await page.keyboard.press('Space');
  assert.equal(await page.getAttribute('#play', 'aria-pressed'), 'false');
  const before = await page.evaluate(() => window.ramulusPage.state.simulation.cells());
  await page.keyboard.press('Tab');
  assert.equal(await page.evaluate(() => document.activeElement.id), 'step');
  await page.keyboard.press('Enter');
  const afterStep = await page.evaluate(() => window.ramulusPage.state.simulation.cells());
  assert.ok(afterStep > before, `one step grew cells: ${before} -> ${afterStep}`);
  await screenshot(page, '05-paused-by-keyboard');
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('CSV, PNG and run record exports; a record reopens and is kept across reloads', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  const digest = await finishedDigest(page);
  const save = async (id) => {
    const [download] = await Promise.all([page.waitForEvent('download'), page.click(id)]);
    return download.path();
  };
  const csvPath = await save('#save-csv');
  const rows = JSON.parse(execFileSync('python3', ['-c',
    'import csv, json, sys; print(json.dumps(list(csv.reader(open(sys.argv[1], newline="")))))', csvPath]).toString());
  assert.deepEqual(rows[0], ['metric', 'value', 'unit']);
  assert.ok(rows.every((row) => row.length === 3), 'three fields in every row');
  const density = rows.find((row) => row[0] === 'vein density');
  assert.ok(Number(density[1]) > 0, 'vein density is a number');
  const png = readFileSync(await save('#save-png'));
  assert.deepEqual([...png.subarray(0, 8)], [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
  const recordPath = await save('#save-record');
  assert.equal(JSON.parse(readFileSync(recordPath, 'utf8')).digest, digest);

  await page.reload();
  await finishedDigest(page);
  await page.setInputFiles('#record-file', recordPath);
  await page.waitForFunction(() => document.getElementById('digest-note').textContent !== '');
  assert.equal(await finishedDigest(page), digest);
  assert.match(await page.textContent('#digest-note'), /equals the digest saved/);
  await page.reload();
  await finishedDigest(page);
  await page.waitForSelector('#open-stored', { state: 'visible', timeout: 10000 });
  assert.match(await page.textContent('#stored'), new RegExp(digest));
  await page.click('#forget-stored');
  await page.waitForSelector('#open-stored', { state: 'hidden', timeout: 10000 });
  await page.reload();
  await finishedDigest(page);
  assert.match(await page.textContent('#stored'), /No run record kept/);
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('a file that is not a run record gets a message and the run stays', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  const digest = await finishedDigest(page);
  await page.setInputFiles('#record-file', { name: 'notes.json', mimeType: 'application/json', buffer: Buffer.from('{"format": "shopping-list"}') });
  await page.waitForFunction(() => document.getElementById('notices').textContent.includes('notes.json'));
  assert.match(await page.textContent('#notices'), /not a run record/);
  assert.equal(await page.textContent('[data-role="digest"]'), digest);
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('an image mask sets the lattice to its size; a broken image is named', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  await finishedDigest(page);
  // A plain PBM (Netpbm P1: "1" = black = allowed), 40 x 30 cells, the left half allowed.
  const rows = Array.from({ length: 30 }, () => `${'1 '.repeat(20)}${'0 '.repeat(20)}`.trim());
  const pbm = `P1\n40 30\n${rows.join('\n')}\n`;
  await page.click('summary:text-is("Shape")');
  await page.fill('#param-roots', '10,28,0,1');
  await page.press('#param-roots', 'Tab');
  await page.setInputFiles('#mask-file', { name: 'half.pbm', mimeType: 'image/x-portable-bitmap', buffer: Buffer.from(pbm) });
  await page.waitForFunction(() => document.getElementById('param-width').value === '40');
  const digest = await finishedDigest(page);
  assert.equal(await page.inputValue('#param-height'), '30');
  assert.match(await page.inputValue('#param-mask'), /40 × 30/);
  const native = nativeRun(await fragmentOf(page));
  assert.equal(digest, native.digest);
  assert.ok(native.cells <= 20 * 30, `only the allowed half can fill: ${native.cells} cells`);
  await page.setInputFiles('#mask-file', { name: 'broken.pbm', mimeType: 'image/x-portable-bitmap', buffer: Buffer.from('P1\n40 30\n1 0 x') });
  await page.waitForFunction(() => document.getElementById('notices').textContent.includes('broken.pbm'));
  assert.equal(await page.inputValue('#param-width'), '40', 'the run is left as it was');
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('the colour key on the page is the SVG export\'s, and the probe reads a segment', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  await finishedDigest(page);
  assert.equal(await page.textContent('#settings-title'), 'What to grow');
  await page.selectOption('#colouring', 'flow');
  const pageKey = await page.$$eval('#legend .swatch span', (labels) => labels.map((label) => label.textContent));
  const [download] = await Promise.all([page.waitForEvent('download'), page.click('#save-svg')]);
  const svg = readFileSync(await download.path(), 'utf8');
  const svgKey = await page.evaluate((text) => {
    const parsed = new DOMParser().parseFromString(text, 'image/svg+xml');
    return [...parsed.querySelectorAll('text.legend')].map((element) => element.textContent);
  }, svg);
  // Both come from one Rust function, root markers included (a leaf's root is its petiole).
  assert.deepEqual(svgKey, pageKey);
  assert.equal(pageKey.length, 5, 'title, least and most flow, tissue, the root');
  assert.equal(pageKey[3], 'tissue: drains less than the vein threshold');
  assert.equal(pageKey[4], 'petiole (root)');
  assert.equal(pageKey[0], 'flow (mm²)');
  assert.ok(Number(pageKey[1]) > 0 && Number(pageKey[2]) > Number(pageKey[1]), pageKey.join(' '));
  for (let i = 0; i < 4; i += 1) await page.click('#zoom-in');
  const box = await page.locator('#canvas').boundingBox();
  let shown = false;
  for (let dx = 0; dx < 90 && !shown; dx += 3) {
    await page.mouse.move(box.x + box.width / 2 + dx, box.y + box.height / 2);
    shown = await page.isVisible('#probe');
  }
  assert.ok(shown, 'a segment near the middle of the zoomed leaf is found');
  assert.match(await page.textContent('#probe'), /^Strahler order \d+\nflow [\d.e-]+ mm²\nwidth [\d.e-]+ mm\nlength [\d.e-]+ mm$/);
  assert.deepEqual(page.errors, []);
  await page.close();
});
