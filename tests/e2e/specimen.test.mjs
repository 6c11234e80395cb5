// The specimen panel in headless Chromium. Outside references: the native command line's
// `ramulus measure --json` on the same files (a separate path from the page's wasm and its
// panel: file reading, options from flags), `ramulus grow --json` for each seed of the
// comparison with the mean and sample standard deviation computed here (Bessel's n - 1 divisor,
// any statistics text), and the browser's own DOM for what reached the page as markup.
// Screenshots at 1400 and 420 pixels wide go to artifacts/e2e/.
import { after, before, test } from 'node:test';
import assert from 'node:assert/strict';
import { execFileSync } from 'node:child_process';
import path from 'node:path';
import {
  finishedDigest, fragmentOf, launchBrowser, nativeRun, newPage, root, screenshot, serveSite,
} from './support.mjs';

const native = path.join(root, 'target', 'release', 'ramulus');
const demos = path.join(root, 'examples', 'specimens');

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

function measure(file, ...flags) {
  const output = execFileSync(native, ['measure', '--json', ...flags, path.join(demos, file)], {
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  return JSON.parse(output.toString());
}

async function openDemo(page, name) {
  await page.click(`[data-demo="${name}"]`);
  await page.waitForFunction(
    (wanted) => window.ramulusSpecimens?.file?.name === wanted
      && document.querySelector('#specimen-table tbody tr') !== null,
    name,
  );
}

const shown = (page) => page.evaluate(() => window.ramulusSpecimens.result);

/// The Specimen column of the table, by metric key.
const specimenCells = (page) => page.evaluate(() => Object.fromEntries(
  [...document.querySelectorAll('#specimen-table tbody tr')].map((row) => [row.dataset.key, row.cells[1].textContent]),
));

/// Checks a shown number (four significant digits) against the command line's full value.
function assertShown(text, value, what) {
  if (value === null) {
    assert.equal(text, 'n/a', what);
    return;
  }
  const number = Number(text);
  assert.ok(Number.isFinite(number), `${what}: ${text}`);
  const tolerance = Math.abs(value) * 5e-4 + 1e-12;
  assert.ok(Math.abs(number - value) <= tolerance, `${what}: page shows ${text}, command line ${value}`);
}

test('a demo specimen opens in one click and measures as `ramulus measure --json` does', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  await finishedDigest(page);
  for (const [name, flags] of [
    ['hand-traced-leaf.svg', []],
    ['small-net.csv', ['--units', 'mm']],
    ['small-net.geojson', ['--units', 'mm']],
  ]) {
    await openDemo(page, name);
    const cli = measure(name, ...flags);
    const result = await shown(page);
    assert.deepEqual(result.metrics, cli.metrics, name);
    assert.equal(result.nodes, cli.nodes, name);
    assert.equal(result.segments, cli.segments, name);
    assert.equal(result.calibration.factor, cli.calibration.factor, name);
    // What the table shows, number by number.
    const cells = await specimenCells(page);
    for (const key of ['total_length', 'vein_density', 'junction_count', 'tip_count', 'loop_count', 'area']) {
      assertShown(cells[key], cli.metrics[key], `${name} ${key}`);
    }
    // Repairs: the list and the counts per kind equal the command line's report; every
    // repair but the roots has its marker.
    const repairs = cli.repairs.filter((repair) => repair.kind !== 'root');
    assert.equal(await page.locator('#specimen-repairs button').count(), repairs.length, name);
    assert.equal(result.repairs.length, repairs.length, name);
    const counts = await page.evaluate(() => Object.fromEntries(
      [...document.querySelectorAll('#specimen-kinds li')].map((item) => [item.dataset.kind, Number(item.textContent.match(/(\d+)$/)[1])]),
    ));
    for (const [kind, count] of Object.entries(counts)) {
      assert.equal(count, repairs.filter((repair) => repair.kind === kind).length, `${name} ${kind}`);
    }
    const markers = result.repairs.map((repair) => repair.marker);
    for (const repair of repairs) {
      const at = repair.at ?? repair.root ?? [(repair.from[0] + repair.to[0]) / 2, (repair.from[1] + repair.to[1]) / 2];
      assert.ok(markers.some(([x, y]) => x === at[0] && y === at[1]), `${name}: a marker at ${at}`);
    }
    // The page says which root the core chose.
    const status = await page.textContent('#specimen-status');
    for (const root of cli.repairs.filter((repair) => repair.kind === 'root')) {
      assert.ok(status.includes(`root of part ${root.part} at`), status);
    }
  }
  assert.equal(
    measure('hand-traced-leaf.svg').repairs.filter((repair) => repair.kind === 'root')[0].rule,
    'lowest end',
  );
  assert.match(await page.textContent('#specimen-status'), /line end nearest the drawing's bottom edge/);
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('a clicked root and the file\'s scale bar measure as --root and --scale-bar do; a repair entry shows its place', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  await finishedDigest(page);
  await openDemo(page, 'hand-traced-leaf.svg');
  // The list entry rings its repair and centres the drawing on it.
  await page.click('#specimen-repairs li:nth-child(8) button');
  const centred = await page.evaluate(() => {
    const panel = window.ramulusSpecimens;
    const view = panel.view;
    const [x, y] = panel.result.repairs[7].marker;
    return {
      highlighted: view.highlighted,
      x: x * view.scale + view.offsetX - view.canvas.width / 2,
      y: y * view.scale + view.offsetY - view.canvas.height / 2,
      current: document.querySelector('#specimen-repairs li:nth-child(8) button').getAttribute('aria-current'),
    };
  });
  assert.equal(centred.highlighted, 7);
  assert.ok(Math.abs(centred.x) < 1 && Math.abs(centred.y) < 1, JSON.stringify(centred));
  assert.equal(centred.current, 'true');
  await page.click('#specimen-fit');

  // The midrib's top end: file point (160, 50) (the path starts at 150,40 in a group moved by
  // 10,10), drawn at 0.25 mm per user unit.
  await page.click('#specimen-root-pick');
  const spot = await page.evaluate(() => {
    const view = window.ramulusSpecimens.view;
    const ratio = window.devicePixelRatio || 1;
    view.canvas.scrollIntoView({ block: 'center' });
    const rect = view.canvas.getBoundingClientRect();
    return { x: rect.left + (160 * 0.25 * view.scale + view.offsetX) / ratio, y: rect.top + (50 * 0.25 * view.scale + view.offsetY) / ratio };
  });
  await page.mouse.click(spot.x, spot.y);
  await page.waitForFunction(() => window.ramulusSpecimens.result.roots[0].rule === 'given');
  const rooted = await shown(page);
  const cliRooted = measure('hand-traced-leaf.svg', '--root', '160,50');
  assert.deepEqual(rooted.metrics, cliRooted.metrics);
  assert.deepEqual(rooted.roots[0].at, cliRooted.repairs.find((repair) => repair.kind === 'root').at);
  assert.match(await page.textContent('#specimen-status'), /the node nearest the given root/);

  // The bar drawn in the file, said to be 20 mm long (twice the scale the file's size gives).
  await page.selectOption('#specimen-scale', 'bar');
  assert.match(await page.textContent('#specimen-message'), /Click the two ends of the scale bar/);
  await page.fill('#specimen-bar-length', '20');
  await page.click('#specimen-bar-file');
  await page.waitForFunction(() => window.ramulusSpecimens.result.calibration.factor === 0.5);
  const barred = await shown(page);
  const cliBarred = measure('hand-traced-leaf.svg', '--root', '160,50', '--scale-bar', '230,460,270,460,20');
  assert.deepEqual(barred.metrics, cliBarred.metrics);
  // Two clicks on the drawn bar's ends (file points 230,460 and 270,460) said to be 10 mm:
  // the clicks land within a screen pixel of them, so the scale is 0.25 mm per user unit
  // within that pixel's share of the bar.
  await page.fill('#specimen-bar-length', '10');
  await page.click('#specimen-bar-pick');
  for (const [x, y] of [[230, 460], [270, 460]]) {
    const where = await page.evaluate(([fx, fy]) => {
      const panel = window.ramulusSpecimens;
      const view = panel.view;
      const ratio = window.devicePixelRatio || 1;
      view.canvas.scrollIntoView({ block: 'center' });
      const rect = view.canvas.getBoundingClientRect();
      const [sx, sy] = panel.result.to_file;
      return { x: rect.left + ((fx / sx) * view.scale + view.offsetX) / ratio, y: rect.top + ((fy / sy) * view.scale + view.offsetY) / ratio, pixel: ratio / view.scale / sx };
    }, [x, y]);
    await page.mouse.click(where.x, where.y);
    if (x === 230) assert.match(await page.textContent('#specimen-message'), /\(1 of 2;/);
  }
  await page.waitForFunction(() => Math.abs(window.ramulusSpecimens.result.calibration.factor - 0.25) < 0.01);
  const clickedBar = await page.evaluate(() => window.ramulusSpecimens.bar);
  assert.ok(Math.hypot(clickedBar.from[0] - 230, clickedBar.from[1] - 460) < 2, JSON.stringify(clickedBar));
  assert.ok(Math.hypot(clickedBar.to[0] - 270, clickedBar.to[1] - 460) < 2, JSON.stringify(clickedBar));
  assert.match(await page.textContent('#specimen-status'), /Scale: 0\.2\d* mm per file unit, from two points 10 mm apart/);
  // A factor typed in: 0.1 mm per user unit.
  await page.selectOption('#specimen-scale', 'factor');
  await page.fill('#specimen-factor', '0.1');
  await page.press('#specimen-factor', 'Tab');
  await page.waitForFunction(() => window.ramulusSpecimens.result.calibration.factor === 0.1);
  assert.deepEqual((await shown(page)).metrics, measure('hand-traced-leaf.svg', '--root', '160,50', '--scale', '0.1').metrics);
  // A typing slip is named and the specimen stays as last measured.
  await page.fill('#specimen-factor', 'abc');
  await page.press('#specimen-factor', 'Tab');
  assert.match(await page.textContent('#specimen-message'), /the scale factor must be a finite number, is "abc"/);
  assert.equal(await page.evaluate(() => window.ramulusSpecimens.result.calibration.factor), 0.1);
  // A snap tolerance typed in reaches the core as --snap does.
  await page.selectOption('#specimen-scale', 'file');
  await page.fill('#specimen-snap', '0.5');
  await page.press('#specimen-snap', 'Tab');
  await page.waitForFunction(() => window.ramulusSpecimens.result.snap_tolerance === 0.5);
  assert.deepEqual((await shown(page)).metrics, measure('hand-traced-leaf.svg', '--root', '160,50', '--snap', '0.5').metrics);
  // Back to the core's default root.
  await page.click('#specimen-root-default');
  await page.waitForFunction(() => window.ramulusSpecimens.result.roots[0].rule === 'lowest end');
  // By keyboard: the cross in the middle of the drawing is put on the midrib's top end (here by
  // the view, as arrow keys would), Enter picks it.
  await page.focus('#specimen-root-pick');
  await page.keyboard.press('Enter');
  await page.focus('#specimen-canvas');
  await page.evaluate(() => {
    const view = window.ramulusSpecimens.view;
    view.offsetX = view.canvas.width / 2 - 40 * view.scale;
    view.offsetY = view.canvas.height / 2 - 12.5 * view.scale;
  });
  await page.keyboard.press('ArrowLeft');
  await page.keyboard.press('ArrowRight');
  await page.keyboard.press('Enter');
  await page.waitForFunction(() => window.ramulusSpecimens.result.roots[0].rule === 'given');
  assert.deepEqual((await shown(page)).metrics, measure('hand-traced-leaf.svg', '--root', '160,50', '--snap', '0.5').metrics);
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('bad files are refused with the core\'s message naming the place; the page keeps its run and still grows', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  const digest = await finishedDigest(page);
  await openDemo(page, 'small-net.geojson');
  const message = () => page.textContent('#specimen-message');
  const pick = async (name, text) => {
    await page.setInputFiles('#specimen-file', { name, mimeType: 'application/octet-stream', buffer: Buffer.from(text) });
    await page.waitForFunction((wanted) => document.querySelector('#specimen-message').textContent.startsWith(wanted), name);
  };

  await pick('broken.svg', '<svg xmlns="http://www.w3.org/2000/svg">\n<path d="M 0 0 L 10 10">\n</svg>');
  assert.match(await message(), /^broken\.svg: SVG is not readable XML: .* at 3:1/);
  assert.match(await message(), /The specimen shown is still small-net\.geojson/);
  await pick('bad-path.svg', '<svg xmlns="http://www.w3.org/2000/svg">\n<path d="M 0 0 L 10 Q"/>\n</svg>');
  assert.match(await message(), /SVG <path> \(line 2\): path data `d` is not readable/);
  await pick('nan.geojson', '{"type":"Feature","geometry":{"type":"LineString","coordinates":[[0,0],[NaN,1]]}}');
  assert.match(await message(), /GeoJSON text \(line 1, column 73\)/);
  await pick('wrong.geojson', '{"type":"FeatureCollection","features":[{"type":"Feature","geometry":{"type":"LineString","coordinates":[[0,0],[1,1]]}},{"type":"Feature","geometry":{"type":"MultiPoint","coordinates":[[0,0]]}}]}');
  assert.match(await message(), /GeoJSON feature 1: a MultiPoint is neither a vein/);
  await pick('short.csv', 'x1,y1,x2,y2\n0,0,1,1\n2,2,3\n');
  assert.match(await message(), /line 3/);

  // A file past the size limit is refused before it is read (dropped on the drawing).
  const refused = await page.evaluate(async () => {
    const limit = window.ramulusSpecimens.core.specimen_max_bytes();
    const file = new File([new Uint8Array(limit + 1)], 'huge.svg', { type: 'image/svg+xml' });
    let read = false;
    file.arrayBuffer = () => { read = true; return Promise.resolve(new ArrayBuffer(0)); };
    const transfer = new DataTransfer();
    transfer.items.add(file);
    document.getElementById('specimen-canvas').dispatchEvent(new DragEvent('drop', { dataTransfer: transfer, bubbles: true, cancelable: true }));
    await new Promise((resolve) => { setTimeout(resolve, 50); });
    return { read, limit, message: document.getElementById('specimen-message').textContent };
  });
  assert.equal(refused.read, false, 'the file was not read');
  assert.match(refused.message, new RegExp(`^huge\\.svg: the file has ${refused.limit + 1} bytes, more than the ${refused.limit} bytes`));

  // Scripts and markup in a file never reach the page as markup.
  const hostile = `<svg xmlns="http://www.w3.org/2000/svg" onload="window.pwned = 1">
<script>window.pwned = 2</script>
<path id="&lt;img src=x onerror=window.pwned=3&gt;" d="M 0 0 L 10 0 L 10 10"/>
<path d="M 10 0 L 20 0.01 M 10 10 L 20 30"/>
</svg>`;
  await page.setInputFiles('#specimen-file', { name: '<b>hostile</b>.svg', mimeType: 'image/svg+xml', buffer: Buffer.from(hostile) });
  await page.waitForFunction(() => window.ramulusSpecimens.file.name === '<b>hostile</b>.svg');
  const dom = await page.evaluate(() => ({
    pwned: window.pwned ?? null,
    scripts: document.querySelectorAll('#specimens script, #specimens img, #specimens b').length,
    notes: document.getElementById('specimen-notes').textContent,
    caption: document.getElementById('specimen-caption').textContent,
  }));
  assert.equal(dom.pwned, null);
  assert.equal(dom.scripts, 0);
  assert.match(dom.notes, /scripts are never run/);
  assert.match(dom.caption, /<b>hostile<\/b>\.svg/);

  // The run is as it was, and the page still grows.
  assert.equal(await page.textContent('[data-role="digest"]'), digest);
  await page.click('#restart');
  assert.equal(await finishedDigest(page), nativeRun(await fragmentOf(page)).digest);
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('a cleared-leaf image lies under the specimen at its calibrated scale; a broken image is named', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  await finishedDigest(page);
  await openDemo(page, 'hand-traced-leaf.svg');
  // A 320 x 480 picture (the drawing's viewBox in pixels), one pixel per user unit: at the
  // file's 4 user units per mm (80 mm wide, viewBox 320 wide) it spans 80 x 120 mm.
  const placed = await page.evaluate(async () => {
    const canvas = new OffscreenCanvas(320, 480);
    const context = canvas.getContext('2d');
    context.fillStyle = 'rgb(200, 220, 180)';
    context.fillRect(0, 0, 320, 480);
    context.fillStyle = 'rgb(10, 20, 30)';
    context.fillRect(100, 200, 1, 1);
    const blob = await canvas.convertToBlob({ type: 'image/png' });
    const panel = window.ramulusSpecimens;
    await panel.openFile(new File([blob], 'cleared.png', { type: 'image/png' }));
    const pixels = panel.imageRgba();
    const at = (x, y) => [...pixels.rgba.slice(4 * (y * pixels.width + x), 4 * (y * pixels.width + x) + 4)];
    return {
      image: { ...panel.view.image, bitmap: undefined },
      size: [pixels.width, pixels.height],
      dark: at(100, 200),
      light: at(0, 0),
      status: document.getElementById('specimen-image-status').textContent,
    };
  });
  assert.deepEqual(placed.size, [320, 480]);
  assert.deepEqual(placed.dark, [10, 20, 30, 255]);
  assert.deepEqual(placed.light, [200, 220, 180, 255]);
  assert.equal(placed.image.width, 80);
  assert.equal(placed.image.height, 120);
  assert.match(placed.status, /320 × 480 pixels, each 0\.25 mm/);
  // Two file units per pixel: twice as large.
  await page.fill('#specimen-image-pixel', '2');
  await page.press('#specimen-image-pixel', 'Tab');
  assert.equal(await page.evaluate(() => window.ramulusSpecimens.view.image.width), 160);
  await screenshot(page, '22-specimen-image');
  await page.setInputFiles('#specimen-image', { name: 'broken.png', mimeType: 'image/png', buffer: Buffer.from('\x89PNG\r\n\x1a\nnot really') });
  await page.waitForFunction(() => document.getElementById('specimen-message').textContent.startsWith('broken.png'));
  assert.match(await page.textContent('#specimen-message'), /not an image this browser can decode/);
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('the demo cleared-leaf image traced on the page measures as `ramulus measure IMAGE.png --json` does; a broken or empty image is named', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  await finishedDigest(page);
  await page.click('[data-demo="cleared-leaf.png"]');
  await page.waitForFunction(() => !document.getElementById('specimen-trace').disabled);
  await page.click('#specimen-trace');
  await page.waitForFunction(() => window.ramulusSpecimens?.result?.image !== undefined
    && document.querySelector('#specimen-table tbody tr') !== null);
  // The outside check: the native command line decodes the PNG itself (its own decoder and
  // its reading of the pHYs resolution), the page had the browser decode it.
  const cli = measure('cleared-leaf.png');
  const result = await shown(page);
  assert.deepEqual(result.metrics, cli.metrics);
  assert.equal(result.nodes, cli.nodes);
  assert.equal(result.segments, cli.segments);
  assert.equal(result.calibration.factor, cli.calibration.factor);
  assert.deepEqual(result.image, cli.image);
  const cells = await specimenCells(page);
  assertShown(cells.total_length, cli.metrics.total_length, 'total length');
  assertShown(cells.vein_density, cli.metrics.vein_density, 'vein density');
  assertShown(cells.tip_count, cli.metrics.tip_count, 'tips');
  const status = await page.textContent('#specimen-status');
  assert.match(status, new RegExp(`thinned in ${cli.image.thinning_iterations} passes to ${cli.image.skeleton_pixels} pixels`));
  // Each step's picture under the drawing: the skeleton's coloured pixels are its pixels.
  await page.selectOption('#specimen-trace-step', 'skeleton');
  const skeleton = await page.waitForFunction(() => {
    const panel = window.ramulusSpecimens;
    const bitmap = panel.view.image?.bitmap;
    if (!bitmap || bitmap === panel.image.bitmap) return null;
    const canvas = new OffscreenCanvas(bitmap.width, bitmap.height);
    const context = canvas.getContext('2d');
    context.drawImage(bitmap, 0, 0);
    const data = context.getImageData(0, 0, bitmap.width, bitmap.height).data;
    let on = 0;
    for (let i = 3; i < data.length; i += 4) if (data[i] === 255) on += 1;
    return on;
  });
  assert.equal(await skeleton.jsonValue(), cli.image.skeleton_pixels);
  await page.selectOption('#specimen-trace-step', 'veins');
  await page.waitForFunction(() => window.ramulusSpecimens.steps.veins !== undefined);
  await screenshot(page, '23-specimen-traced-image');
  // Changed options trace again: a local threshold as `--local-threshold 31,5`.
  await page.selectOption('#specimen-trace-threshold', 'local');
  await page.fill('#specimen-trace-window', '31');
  await page.fill('#specimen-trace-offset', '5');
  await page.press('#specimen-trace-offset', 'Tab');
  await page.waitForFunction(() => window.ramulusSpecimens.result.image.vein_threshold.local_mean !== undefined);
  const local = measure('cleared-leaf.png', '--local-threshold', '31,5');
  assert.deepEqual((await shown(page)).metrics, local.metrics);
  // A bad option is named and the trace shown stays.
  await page.fill('#specimen-trace-window', '2');
  await page.press('#specimen-trace-window', 'Tab');
  await page.waitForFunction(() => /window must be a whole number/.test(document.getElementById('specimen-message').textContent));
  assert.deepEqual((await shown(page)).metrics, local.metrics);
  // An empty image: the core names its size.
  const empty = await page.evaluate(() => JSON.parse(window.ramulusSpecimens.core.trace_cleared_image(new Uint8Array(0), 0, 0, '{"image": {}}')));
  assert.match(empty.error.message, /0 x 0 pixels: it holds no pixel/);
  // A broken image is named and the page still works: the traced specimen stays and grows on.
  await page.setInputFiles('#specimen-image', { name: 'broken.png', mimeType: 'image/png', buffer: Buffer.from('\x89PNG\r\n\x1a\nnot really') });
  await page.waitForFunction(() => document.getElementById('specimen-message').textContent.startsWith('broken.png'));
  assert.match(await page.textContent('#specimen-message'), /not an image this browser can decode/);
  assert.equal(await page.evaluate(() => window.ramulusSpecimens.file.name), 'cleared-leaf.png');
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('the specimen beside the grown run: mean and spread over 5 seeds equal the command line\'s runs', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  await finishedDigest(page);
  await openDemo(page, 'hand-traced-leaf.svg');
  await page.click('#specimen-compare');
  await page.waitForFunction(() => /with 5 seeds/.test(document.querySelector('#specimen-compare-status').textContent), null, { timeout: 300000 });
  const seeds = await page.evaluate(() => window.ramulusSpecimens.runs.seeds);
  assert.equal(seeds.length, 5);
  assert.equal(await page.textContent('#specimen-mean-head'), 'Run, mean of 5 seeds');
  const fragment = await fragmentOf(page);
  const lengths = seeds.map((seed) => nativeRun(fragment.replace(/(^|&)seed=\d+/, `$1seed=${seed}`)).metrics.total_length);
  const mean = lengths.reduce((sum, value) => sum + value, 0) / lengths.length;
  const sd = Math.sqrt(lengths.reduce((sum, value) => sum + (value - mean) ** 2, 0) / (lengths.length - 1));
  const row = await page.evaluate(() => [...document.querySelector('#specimen-table tr[data-key="total_length"]').cells].map((cell) => cell.textContent));
  const specimen = measure('hand-traced-leaf.svg').metrics.total_length;
  assertShown(row[1], specimen, 'specimen length');
  assertShown(row[2], mean, 'mean length of the seeds');
  assertShown(row[3], sd, 'seed-to-seed spread of the length');
  assertShown(row[4], (specimen - mean) / sd, 'difference in spreads');
  // The grown run is drawn beside the specimen at one scale.
  const scales = await page.evaluate(() => [window.ramulusSpecimens.view.scale, window.ramulusSpecimens.runView.scale]);
  assert.equal(scales[0], scales[1]);
  await screenshot(page, '20-specimen-1400');
  await page.setViewportSize({ width: 420, height: 900 });
  await page.waitForTimeout(200);
  await screenshot(page, '21-specimen-420');
  assert.deepEqual(page.errors, []);
  await page.close();
});
