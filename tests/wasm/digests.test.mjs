// Cross-platform determinism: the wasm build, run under node, must give the same digest as the
// native `ramulus` binary for every preset and for varied parameter sets (joining rules, fixed
// and fresh random seeds). The native run prints its link; the wasm run starts from that link,
// as the page does. Also checks the link text against the WHATWG URL standard's
// `URLSearchParams`, the parser every browser uses for `key=value&...` text.
// Run by `./x test` after `./x build`; uses node's built-in test runner.
import { test } from 'node:test';
import assert from 'node:assert/strict';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { execFileSync } from 'node:child_process';
import { randomInt } from 'node:crypto';
import { fileURLToPath } from 'node:url';
import path from 'node:path';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const glue = await import(path.join(root, 'www/pkg/ramulus_web.js'));
glue.initSync({ module: readFileSync(path.join(root, 'www/pkg/ramulus_web_bg.wasm')) });
const native = path.join(root, 'target/release/ramulus');

const scratch = mkdtempSync(path.join(tmpdir(), 'ramulus-digests-'));

function nativeRun(params, name) {
  const file = path.join(scratch, `${name.replace(/\W+/g, '-')}.json`);
  writeFileSync(file, JSON.stringify(params));
  const output = execFileSync(native, ['grow', '--params', file, '--json']);
  return JSON.parse(output.toString());
}

function wasmRun(link) {
  const simulation = new glue.Simulation(link);
  while (!simulation.finished()) simulation.step(997);
  const result = { digest: simulation.digest(), cells: simulation.cells() };
  simulation.free();
  return result;
}

const presets = JSON.parse(glue.presets_json());
const cases = presets.map((preset) => ({ name: `preset ${preset.name}`, params: preset.params }));
const base = { width: 60, height: 50, roots: [{ x: 30, y: 45, outflow: [0, 1] }], cells: 2000 };
const variants = [
  { joining: 'cheapest' },
  { joining: 'uniform', seed: 2 },
  { joining: 'weighted', seed: 3, temperature: 0.2 },
  { joining: 'weighted', seed: 4, attach_to_segments: true },
  { joining: 'weighted', seed: 5, branch_angle: 60, w_path: 0.1, threshold: 7 },
  { joining: 'weighted', seed: 6, alpha: 0.0, w_flow: 1 },
  { joining: 'weighted', seed: 7, alpha: 1.0, w_flow: 1, refresh: 0.01 },
  { joining: 'uniform', seed: 8, jitter: 0.49, attach_to_segments: true },
  { joining: 'cheapest', seed: 9, jitter: 0.2, w_turn: 2, elongation: 3, rear_cost: 4, w_path: 0.2 },
  { joining: 'weighted', seed: 10, units: 'm', cell_size: 2, w_grade: 1, grade_x: 0.02, grade_y: -0.01, runoff: 0.4 },
  { joining: 'weighted', seed: 11, roots: [{ x: 5, y: 5, outflow: [-1, 0] }, { x: 55, y: 40, outflow: [1, 1] }] },
  { joining: 'weighted', seed: 12, obstacles: [[[20, 10], [40, 10], [40, 30], [20, 30]]] },
  { joining: 'weighted', seed: 13, outline: [[2, 2], [58, 4], [30, 49]], roots: [{ x: 30, y: 20, outflow: [0, 1] }] },
  { joining: 'uniform', seed: 14, radius: 1 },
  { joining: 'weighted', seed: 2 ** 40 + 17, radius: 6.5, gamma: 2 },
  { joining: 'weighted', seed: 16, temperature: 5, cells: 3000 },
  // Passes after growth that reshape the network: the finished digest is the pipeline's.
  { joining: 'weighted', seed: 17, relax_junctions: 3 },
  { joining: 'weighted', seed: 18, units: 'm', cell_size: 0.5, energy_sweeps: 2, energy_reach: 1.5 },
  { joining: 'weighted', seed: 19, vein_area: 0.5, reconnect: 6, loop_levels: 2 },
  { joining: 'weighted', seed: 20, units: 'm', cell_size: 0.5, levels: [[0, 0, 10], [59, 0, 11], [30, 49, 9]], w_grade: 1,
    zones: [{ runoff: 0.9, polygon: [[10, 10], [30, 10], [30, 30]] }] },
  // Loops with arches and nesting (the tree paths and the rounds in wasm as natively).
  { joining: 'weighted', seed: 21, vein_area: 0.05, reconnect: 4, loop_levels: 4, arches: true, nest_loops: true },
];
variants.forEach((variant, index) => cases.push({ name: `variant ${index}`, params: { ...base, ...variant } }));
// Fresh random seeds on every run, one per joining rule, named in the test title to reproduce.
for (const joining of ['cheapest', 'weighted', 'uniform']) {
  const seed = randomInt(0, 2 ** 47);
  cases.push({ name: `random seed ${seed}, ${joining}`, params: { ...base, joining, seed, jitter: 0.3 } });
}

for (const { name, params } of cases) {
  test(`wasm digest equals native digest: ${name}`, () => {
    const expected = nativeRun(params, name);
    const actual = wasmRun(expected.link);
    assert.equal(actual.cells, expected.cells);
    assert.equal(actual.digest, expected.digest);
  });
}

test('link text reads the same through URLSearchParams as through the core', () => {
  for (const preset of presets) {
    const read = JSON.parse(glue.read_link(`#${preset.link}`));
    assert.deepEqual(read.problems, []);
    const standard = new URLSearchParams(preset.link);
    assert.equal(standard.get('v'), '1');
    for (const [key, text] of Object.entries(read.fields)) {
      assert.equal(standard.get(key), text, `${preset.name}: ${key}`);
    }
  }
  // A unit with characters outside the plain set must be %-escaped so the standard decodes it.
  const damaged = JSON.parse(glue.read_link('#v=1&units=m%26m%20x'));
  assert.equal(damaged.problems[0].key, 'units');
  assert.equal(damaged.problems[0].value, 'm&m x');
});

// The page's passes after growth a slice at a time (`reshape_step`, as www/passes.js runs them)
// give the native command line's digest (which runs them in one go); a stop after whole sweeps
// gives the native digest of the link asking for the sweeps that ran.
const stepwiseCases = [
  { name: 'channel energy', params: { ...base, joining: 'weighted', seed: 21, units: 'm', cell_size: 0.5, energy_sweeps: 4 } },
  { name: 'energy and junctions', params: { ...base, joining: 'weighted', seed: 22, energy_sweeps: 2, relax_junctions: 3 } },
  { name: 'junctions and loops', params: { ...base, joining: 'weighted', seed: 23, relax_junctions: 2, vein_area: 0.5, reconnect: 6, loop_levels: 2 } },
];
for (const { name, params } of stepwiseCases) {
  test(`stepwise passes after growth equal the native digest: ${name}`, () => {
    const expected = nativeRun(params, `stepwise ${name}`);
    const simulation = new glue.Simulation(expected.link);
    simulation.set_stepwise_passes(true);
    while (!simulation.finished()) simulation.step(997);
    assert.equal(simulation.passes_pending(), true, 'the passes wait for the page');
    let progress;
    let slices = 0;
    do {
      progress = JSON.parse(simulation.reshape_step(0));
      slices += 1;
      assert.ok(slices < 100, 'the passes end');
    } while (!progress.done);
    assert.ok(slices >= 2, `set-up, sweeps and the end are separate slices (${slices})`);
    assert.equal(simulation.passes_pending(), false);
    assert.equal(simulation.digest(), expected.digest);
    simulation.free();
  });
}

test('a stop inside a channel energy sweep takes it back: the native run of the whole sweeps', () => {
  const params = { ...base, joining: 'weighted', seed: 25, units: 'm', cell_size: 0.5, energy_sweeps: 30 };
  const link = nativeRun(params, 'stop midway').link;
  const simulation = new glue.Simulation(link);
  simulation.set_stepwise_passes(true);
  while (!simulation.finished()) simulation.step(997);
  simulation.reshape_step(0); // set-up
  let progress;
  do progress = JSON.parse(simulation.reshape_step(0)); while (progress.sweep < 1);
  progress = JSON.parse(simulation.reshape_step(0));
  assert.equal(progress.sweep, 1);
  assert.ok(progress.part > 0 && progress.part < progress.part_of, `inside sweep 2: ${progress.part} of ${progress.part_of}`);
  const stopped = JSON.parse(simulation.reshape_stop());
  assert.equal(stopped.taken_back, 2);
  do progress = JSON.parse(simulation.reshape_step(0)); while (!progress.done);
  assert.equal(progress.log.length, 1, 'one whole sweep');
  const expected = nativeRun({ ...params, energy_sweeps: 1 }, 'stop midway, one sweep');
  assert.equal(simulation.digest(), expected.digest);
  assert.match(simulation.link(), /energy_sweeps=1(&|$)/);
  simulation.free();
});

test('a stop after whole channel energy sweeps equals the native run of those sweeps', () => {
  const params = { ...base, joining: 'weighted', seed: 24, units: 'm', cell_size: 0.5, energy_sweeps: 30 };
  const link = nativeRun(params, 'stop whole').link;
  const simulation = new glue.Simulation(link);
  simulation.set_stepwise_passes(true);
  while (!simulation.finished()) simulation.step(997);
  simulation.reshape_step(0); // set-up
  // A slice of budget 0 runs one part of a sweep (passes::ITEMS_PER_PART nodes).
  let first;
  do first = JSON.parse(simulation.reshape_step(0)); while (first.sweep < 1);
  assert.equal(first.sweep, 1);
  assert.equal(first.part, 0, 'between sweeps');
  const stopped = JSON.parse(simulation.reshape_stop());
  assert.equal(stopped.stopped, true);
  let progress;
  do progress = JSON.parse(simulation.reshape_step(0)); while (!progress.done);
  // Only changes that lower E are accepted (Rinaldo et al. 1992, Water Resour. Res. 28(9)).
  assert.ok(progress.energy.after <= progress.energy.before);
  assert.equal(progress.log.length, 1);
  const expected = nativeRun({ ...params, energy_sweeps: 1 }, 'stop whole, one sweep');
  assert.equal(simulation.digest(), expected.digest);
  assert.match(simulation.link(), /energy_sweeps=1(&|$)/);
  simulation.free();
});

// The loop pass a slice at a time (`reshape_step` with a budget of 0 ms: every slice runs one
// part of the loop pass) closes the loops the native command line closes in one go: the same
// digest, and the progress names the loop stage in leaf words while it runs.
test('a looped leaf stepped in tiny slices equals the native digest', () => {
  const preset = presets.find((p) => p.name === 'ovate-leaf');
  const params = { ...preset.params, cells: 12000, seed: 5 };
  const expected = nativeRun(params, 'stepwise looped leaf');
  const simulation = new glue.Simulation(expected.link);
  simulation.set_stepwise_passes(true);
  while (!simulation.finished()) simulation.step(997);
  let progress;
  const loopSlices = [];
  let slices = 0;
  do {
    progress = JSON.parse(simulation.reshape_step(0));
    slices += 1;
    assert.ok(slices < 100000, 'the passes end');
    if (progress.stage === 'loops') loopSlices.push(progress);
  } while (!progress.done);
  assert.ok(loopSlices.length >= 3, `the loops took several slices (${loopSlices.length})`);
  const middle = loopSlices[Math.floor(loopSlices.length / 2)];
  assert.match(middle.text, /^Closing vein loops: level \d of \d, [\d,]+ of [\d,]+ free vein ends, [\d,]+ loops? closed so far/, middle.text);
  assert.equal(middle.stoppable, false, 'loops run to the end');
  assert.ok(middle.loop.ends_done <= middle.loop.ends, JSON.stringify(middle.loop));
  assert.equal(middle.loop.levels, preset.params.loop_levels + 1);
  assert.equal(simulation.digest(), expected.digest);
  assert.ok(expected.metrics.loop_count > 0, 'the native run closed loops');
  assert.equal(JSON.parse(simulation.metrics_json()).loop_count, expected.metrics.loop_count);
  simulation.free();
});

// A site closing loops shows the loop stage in drainage words: channel loops and channel dead
// ends, never the word "vein" (site pages use drainage words only).
test('a site closing loops a slice at a time says so in drainage words', () => {
  const params = { ...base, joining: 'weighted', seed: 24, units: 'm', cell_size: 0.5, vein_area: 0.5, reconnect: 6, loop_levels: 2 };
  const expected = nativeRun(params, 'stepwise site loops');
  const simulation = new glue.Simulation(expected.link);
  simulation.set_stepwise_passes(true);
  while (!simulation.finished()) simulation.step(997);
  const texts = [];
  let progress;
  do {
    progress = JSON.parse(simulation.reshape_step(0));
    texts.push(progress.text);
    assert.ok(texts.length < 100000, 'the passes end');
  } while (!progress.done);
  const during = texts.filter((text) => /^Closing channel loops: level \d of 3, [\d,]+ of [\d,]+ channel dead ends/.test(text));
  assert.ok(during.length >= 1, texts.join('\n'));
  for (const text of texts) assert.doesNotMatch(text, /vein|leaf|areole/i, text);
  assert.ok(expected.metrics.loop_count > 0, 'the native run closed loops');
  assert.equal(simulation.digest(), expected.digest);
  simulation.free();
});
