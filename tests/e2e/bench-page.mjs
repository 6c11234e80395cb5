// Benchmark, not a test: page figures in headless Chromium (software drawing, no GPU).
//  1. Drawing: one full frame of a network of over 200,000 segments (target: at most 16 ms),
//     and the time to refill the geometry views from the core before it.
//  2. Animating that run at the steady pace (20,000 cells a second): the page's work per
//     animation frame (growth, geometry refill, drawing), median, 95th percentile and maximum,
//     over all frames and over those past 100,000 segments (target: every frame at most
//     16 ms), the geometry refill per redraw, and the drawing per picture (spread over several
//     frames of at most 6 ms of drawing each); twice each, alternating the page's partial
//     refill (only what growth changed) with a full refill every time, for comparison.
//  3. Growth while animating: cells per second on the page at the fastest pace, and how long
//     the growth step took per frame (target: at least 20,000 cells a second, with each
//     frame's growth inside its 8 ms budget so frames are not dropped on its account).
//  4. The passes after growth (run a slice at a time, www/passes.js): the 2-hectare sloping
//     field (examples/sites/sloping-field.geojson at 0.5 m cells, 80,000 cells) grown and sized
//     in the page (target under 5 s), then grown with 10 channel energy sweeps: time and energy
//     drop per sweep; and the ovate-leaf preset scaled to 100,000 cells (its lattice and blade
//     outline scaled so the blade holds the budget, as `ramulus bench` scales it), growth plus the loop pass (target under
//     5 s), with the loop pass's share.
// Prints figures; never fails on slowness. Usage: node tests/e2e/bench-page.mjs [--frames |
// --passes [--leaf-only]] (`--frames`: sections 1-3 only; `--passes`: section 4 only;
// `--leaf-only`: its leaf only).
import { finishedDigest, launchBrowser, newPage, serveSite } from './support.mjs';

const DRAW_ROUNDS = 15;

// 500 x 420 lattice filled cheapest first with jitter: 210,000 cells, 209,999 segments.
const BIG = 'v=1&width=500&height=420&cell_size=0.1&roots=250,410,0,1&cells=210000&joining=cheapest'
  + '&radius=1.5&jitter=0.3&w_turn=0&w_flow=0&w_path=0&seed=3';
// The engine benchmark's full cost model at 100,000 cells (see `ramulus bench`).
const ANIMATED = 'v=1&width=400&height=400&cell_size=0.15&roots=200,200,0,1&cells=100000'
  + '&joining=weighted&temperature=0.5&radius=4&jitter=0.4&w_len=1&w_turn=1&w_flow=0.5'
  + '&alpha=0.5&w_path=0.05&seed=1';

const site = await serveSite();
const context = await launchBrowser({ width: 1500, height: 1000 });
const passesOnly = process.argv.includes('--passes');
const framesOnly = process.argv.includes('--frames');
try {
  if (!passesOnly) await drawingAndAnimation();
  if (!framesOnly) await passesFigures();
} finally {
  await context.close();
  site.close();
}

async function drawingAndAnimation() {
  const page = await newPage(context);
  await page.addInitScript(() => localStorage.setItem('ramulus.animate', 'no'));
  await page.goto(`${site.url}#${BIG}`);
  await finishedDigest(page, 300000);
  const draw = await page.evaluate((rounds) => {
    const { view, state, runner } = window.ramulusPage;
    const geometryTimes = [];
    const drawTimes = [];
    for (let round = 0; round < rounds; round += 1) {
      const started = performance.now();
      runner.hooks.redraw();
      geometryTimes.push(performance.now() - started - view.lastDrawMs);
      drawTimes.push(view.lastDrawMs);
    }
    return {
      segments: state.session.count,
      canvas: `${view.canvas.width} x ${view.canvas.height}`,
      geometryTimes,
      drawTimes,
    };
  }, DRAW_ROUNDS);
  console.log(`drawing, ${draw.segments} segments on a ${draw.canvas} canvas, ${DRAW_ROUNDS} frames (target: draw at most 16 ms):`);
  console.log(`  draw ms      ${summary(draw.drawTimes)}`);
  console.log(`  geometry ms  ${summary(draw.geometryTimes)}  (refill of an unchanged network)`);
  await page.close();

  // Alternating: refilled only where growth changed it, then in full every time.
  for (const fullRefill of [false, true, false, true]) {
    const steady = await newPage(context);
    await steady.addInitScript((full) => {
      localStorage.setItem('ramulus.animate', 'yes');
      window.ramulusTestHooks = { fullRefill: full };
    }, fullRefill);
    await steady.goto(`${site.url}#${BIG}`);
    await steady.waitForFunction(() => window.ramulusPage);
    await steady.evaluate(() => {
      document.querySelector('#pace').value = '20000';
      document.querySelector('#pace').dispatchEvent(new Event('change'));
      document.querySelector('#restart').click();
    });
    await finishedDigest(steady, 300000);
    const frames = await steady.evaluate(() => {
      const { stats } = window.ramulusPage.runner;
      return { frameTimes: stats.frameTimes, refills: stats.refills, drawTimes: stats.drawTimes };
    });
    const late = frames.frameTimes.filter((frame) => frame.cells >= 100000);
    const lateRefills = frames.refills.filter((refill) => refill.segments >= 100000);
    const lateDraws = frames.drawTimes.filter((drawn) => drawn.segments >= 100000);
    const how = fullRefill ? 'full refills' : 'partial refills';
    console.log(`animating it at 20,000 cells/s, ${how}, ${frames.frameTimes.length} frames, ${frames.drawTimes.length} redraws (target: every frame at most 16 ms):`);
    console.log(`  frame ms, all frames          ${spread(frames.frameTimes.map((frame) => frame.ms))}`);
    console.log(`  frame ms, past 100,000 cells  ${spread(late.map((frame) => frame.ms))}`);
    console.log(`  refill ms, past 100,000 cells ${spread(lateRefills.map((refill) => refill.refillMs))}`);
    console.log(`  draw ms, past 100,000 cells   ${spread(lateDraws.map((drawn) => drawn.drawMs))}  (over all parts of a picture)`);
    console.log(`  frames a picture takes        ${spread(lateDraws.map((drawn) => drawn.parts ?? 1))}`);
    const breakdown = (list) => [...list].sort((a, b) => b.ms - a.ms).slice(0, 5)
      .map((f) => `${f.ms.toFixed(1)} = ${f.stepMs.toFixed(1)} + ${f.refillMs.toFixed(1)} + ${f.drawMs.toFixed(1)}${f.drawMs > 0 && f.drawDetail ? ` (begin ${f.drawDetail.beginMs.toFixed(1)}, lines ${f.drawDetail.linesMs.toFixed(1)}, finish ${f.drawDetail.finishMs.toFixed(1)})` : ''} + ${f.progressMs.toFixed(1)} + ${(f.ms - f.stepMs - f.refillMs - f.drawMs - f.progressMs).toFixed(1)} (at ${f.cells} cells)`)
      .join('; ');
    console.log('  slowest frames (ms: whole = growth + refill + drawing + progress + rest):');
    console.log(`    past 100,000 cells: ${breakdown(late)}`);
    console.log(`    all frames: ${breakdown(frames.frameTimes)}`);
    await steady.close();
  }

  const animated = await newPage(context);
  await animated.addInitScript(() => localStorage.setItem('ramulus.animate', 'yes'));
  await animated.goto(`${site.url}#${ANIMATED}`);
  await finishedDigest(animated, 300000);
  const stats = await animated.evaluate(() => window.ramulusPage.runner.stats);
  const seconds = (stats.lastTick - stats.firstTick) / 1000;
  console.log(`growth while animating, full cost model, ${stats.cells} cells (target: at least 20,000 cells/s):`);
  console.log(`  ${Math.round(stats.cells / seconds)} cells/s over ${seconds.toFixed(2)} s, ${stats.frames} frames, ${stats.draws} redraws`);
  console.log(`  growth step per frame: mean ${(stats.stepMs / stats.frames).toFixed(2)} ms, max ${stats.maxStepMs.toFixed(2)} ms, frames whose step exceeded 16.7 ms: ${stats.overBudget}`);
  await animated.close();
}

/// A page without animation, its first run finished.
async function quietPage() {
  const page = await newPage(context);
  await page.addInitScript(() => localStorage.setItem('ramulus.animate', 'no'));
  await page.goto(site.url);
  await finishedDigest(page, 300000);
  return page;
}

/// Opens `link` on `page` and waits for the run and its passes after growth to end: `{ms, grownMs,
/// passesMs, progress}` (milliseconds from opening to the end, to the passes' start, of passes).
async function timedRun(page, link) {
  await page.evaluate((fragment) => {
    window.benchRun = { start: performance.now(), end: 0 };
    window.addEventListener('ramulus:finished', () => { window.benchRun.end = performance.now(); }, { once: true });
    location.hash = fragment;
  }, link);
  await page.waitForFunction(() => window.benchRun.end > 0, null, { timeout: 600000, polling: 50 });
  return page.evaluate(() => {
    const { afterGrowth, state } = window.ramulusPage;
    const { start, end } = window.benchRun;
    const grownAt = afterGrowth.startedAt > start ? afterGrowth.startedAt : end;
    return {
      ms: end - start,
      grownMs: grownAt - start,
      passesMs: end - grownAt,
      progress: JSON.parse(state.simulation.reshape_progress()),
    };
  });
}

async function passesFigures() {
  const page = await quietPage();
  if (!process.argv.includes('--leaf-only')) await siteFigures(page);
  await leafFigures(page);
  await page.close();
}

async function siteFigures(page) {
  const siteLink = (sweeps, seed = 1) => page.evaluate(async ([count, seedText]) => {
    const text = await (await fetch('sites/sloping-field.geojson')).text();
    const { core } = window.ramulusPage.state.session;
    const made = JSON.parse(core.site_link_json(text, '0.5'));
    const set = JSON.parse(core.set_link_field(made.link, 'energy_sweeps', String(count))).link;
    return JSON.parse(core.set_link_field(set, 'seed', seedText)).link;
  }, [sweeps, String(seed)]);
  const plain = await timedRun(page, await siteLink(0));
  const sizing = await page.evaluate(() => {
    document.querySelector('#site-intensity').value = '60';
    const started = performance.now();
    const tables = JSON.parse(window.ramulusPage.state.simulation.drainage_json(window.ramulusSite.rulesText(), ''));
    return { ms: performance.now() - started, rows: tables.rows?.length ?? 0, error: tables.error };
  });
  console.log('sloping field, 2 ha at 0.5 m cells (target: grown and sized under 5 s):');
  console.log(`  grown ${(plain.ms / 1000).toFixed(2)} s, sized ${(sizing.ms / 1000).toFixed(2)} s (${sizing.rows} channels${sizing.error ? `, ${sizing.error}` : ''}), together ${((plain.ms + sizing.ms) / 1000).toFixed(2)} s`);
  const swept = await timedRun(page, await siteLink(10));
  const { progress } = swept;
  console.log(`  with 10 channel energy sweeps: whole run ${(swept.ms / 1000).toFixed(2)} s, growth ${(swept.grownMs / 1000).toFixed(2)} s, passes ${(swept.passesMs / 1000).toFixed(2)} s (set-up ${progress.setup_ms.toFixed(0)} ms, measuring after ${progress.finish_ms.toFixed(0)} ms)`);
  let previous = progress.energy.before;
  console.log(`  E before ${previous.toPrecision(5)}`);
  for (const [index, figure] of progress.log.entries()) {
    console.log(`  sweep ${index + 1}: ${figure.ms.toFixed(0)} ms, E ${figure.sum.toPrecision(5)} (${((100 * (figure.sum - previous)) / previous).toFixed(2)} %), ${figure.moved} paths re-pointed`);
    previous = figure.sum;
  }
  console.log(`  E after ${progress.energy.after.toPrecision(5)} (${((100 * (progress.energy.after - progress.energy.before)) / progress.energy.before).toFixed(2)} % in all)`);
  // Stop within a sweep: how long the click waits for the slice in progress (the event's
  // queueing), and how long until the run has ended with the sweep taken back.
  for (const sweep of [1, 2]) {
    await page.evaluate((fragment) => {
      window.stopBench = { finished: 0 };
      window.addEventListener('ramulus:finished', () => { window.stopBench.finished = performance.now(); }, { once: true });
      document.querySelector('#passes-stop').addEventListener('click', (event) => {
        window.stopBench.clicked = event.timeStamp;
        window.stopBench.handled = performance.now();
      }, { once: true, capture: true });
      location.hash = fragment;
    }, await siteLink(10, 1 + sweep));
    await page.waitForFunction((n) => new RegExp(`sweep ${n} of 10 \\([1-5]\\d % through`).test(document.querySelector('#passes-text').textContent),
      sweep, { timeout: 600000, polling: 20 });
    await page.click('#passes-stop', { timeout: 600000 });
    await page.waitForFunction(() => window.stopBench.finished > 0, null, { timeout: 600000, polling: 20 });
    const stop = await page.evaluate(() => ({
      ...window.stopBench,
      progress: JSON.parse(window.ramulusPage.state.simulation.reshape_progress()),
    }));
    console.log(`  Stop pressed during sweep ${sweep}: handled ${(stop.handled - stop.clicked).toFixed(0)} ms after the click, run ended ${(stop.finished - stop.clicked).toFixed(0)} ms after it (sweep taken back: ${stop.progress.taken_back ?? 'none'}, whole sweeps kept ${stop.progress.sweep})`);
  }
}

async function leafFigures(page) {
  const leafLink = await page.evaluate(() => {
    const { core } = window.ramulusPage.state.session;
    const preset = JSON.parse(core.presets_json()).find((p) => p.name === 'ovate-leaf');
    const { params } = preset;
    // As `scaled_looped_leaf` in crate-cli/src/bench.rs.
    let twice = 0;
    params.outline.forEach(([x, y], index) => {
      const [nx, ny] = params.outline[(index + 1) % params.outline.length];
      twice += x * ny - nx * y;
    });
    const scale = Math.sqrt(100000 / (Math.abs(twice) / 2)) * 1.02;
    params.width = Math.ceil(params.width * scale);
    params.height = Math.ceil(params.height * scale);
    for (const root of params.roots) {
      root.x = Math.floor((root.x + 0.5) * scale);
      root.y = Math.floor((root.y + 0.5) * scale);
    }
    params.outline = params.outline.map(([x, y]) => [x * scale, y * scale]);
    params.cells = 100000;
    const made = JSON.parse(core.link_from_params(JSON.stringify(params)));
    if (made.error) throw new Error(JSON.stringify(made.error));
    return made.link;
  });
  // The page's longest tasks (Long Tasks API: every task over 50 ms) while the passes after
  // growth run: the longest is the longest the page did not answer.
  await page.evaluate(() => {
    window.benchLongTasks = [];
    new PerformanceObserver((list) => {
      for (const entry of list.getEntries()) window.benchLongTasks.push({ start: entry.startTime, ms: entry.duration });
    }).observe({ type: 'longtask' });
  });
  const leaf = await timedRun(page, leafLink);
  const tasks = await page.evaluate(() => {
    const { startedAt } = window.ramulusPage.afterGrowth;
    return window.benchLongTasks.filter((task) => task.start >= startedAt).map((task) => task.ms);
  });
  const cells = await page.evaluate(() => window.ramulusPage.state.simulation.cells());
  console.log(`ovate-leaf preset scaled to 100,000 cells (${cells} grown; target under 5 s):`);
  console.log(`  whole run ${(leaf.ms / 1000).toFixed(2)} s: growth ${(leaf.grownMs / 1000).toFixed(2)} s, passes after growth (loops, widths, readings) ${(leaf.passesMs / 1000).toFixed(2)} s = ${((100 * leaf.passesMs) / leaf.ms).toFixed(0)} %, of it the last slice ${leaf.progress.finish_ms.toFixed(0)} ms`);
  const loops = leaf.progress.loop_figures;
  if (loops) {
    console.log(`  loop pass: set-up ${loops.setup_ms.toFixed(0)} ms, ${loops.slices} slices taking ${(loops.ms / 1000).toFixed(2)} s, longest slice ${loops.longest_slice_ms.toFixed(0)} ms`);
  }
  console.log(`  longest tasks during the passes (over 50 ms): ${tasks.length ? [...tasks].sort((a, b) => b - a).slice(0, 5).map((ms) => `${ms.toFixed(0)} ms`).join(', ') : 'none'}`);
}

/// Median, 95th percentile and maximum (nearest rank), and how many.
function spread(times) {
  if (times.length === 0) return 'none';
  const sorted = [...times].sort((a, b) => a - b);
  const rank = (fraction) => sorted[Math.min(sorted.length - 1, Math.ceil(fraction * sorted.length) - 1)];
  return `median ${rank(0.5).toFixed(1)}  p95 ${rank(0.95).toFixed(1)}  max ${sorted.at(-1).toFixed(1)}  (n ${sorted.length})`;
}

function summary(times) {
  const sorted = [...times].sort((a, b) => a - b);
  const median = sorted[Math.floor(sorted.length / 2)];
  return `min ${sorted[0].toFixed(1)}  median ${median.toFixed(1)}  max ${sorted.at(-1).toFixed(1)}`;
}
