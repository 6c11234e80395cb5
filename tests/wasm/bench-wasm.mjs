// Benchmark, not a test: grows the engine benchmark's runs (`ramulus bench --json` gives their
// links) in the wasm build under node and prints wasm time, native time and their ratio
// (target: wasm at most 1.6 times native). Prints figures; never fails on slowness.
// Usage: node tests/wasm/bench-wasm.mjs [--quick]
import { readFileSync } from 'node:fs';
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import path from 'node:path';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const glue = await import(path.join(root, 'www/pkg/ramulus_web.js'));
glue.initSync({ module: readFileSync(path.join(root, 'www/pkg/ramulus_web_bg.wasm')) });
const quick = process.argv.includes('--quick');
const native = path.join(root, 'target/release/ramulus');
const ROUNDS = 3;
// Cells per `step` call, as the page steps in slices. V8 moves a hot wasm function to its
// optimising tier only when the function is next entered, so one call that grows the whole
// run would stay in the baseline tier throughout.
const SLICE = 4096;

function nativeCases() {
  const output = execFileSync(native, ['bench', '--json', ...(quick ? ['--quick'] : [])]);
  return JSON.parse(output.toString());
}

function wasmSeconds(link) {
  const started = performance.now();
  const simulation = new glue.Simulation(link);
  while (!simulation.finished()) simulation.step(SLICE);
  const seconds = (performance.now() - started) / 1000;
  const cells = simulation.cells();
  simulation.free();
  return { seconds, cells };
}

// Best of several rounds on both sides, so a busy moment on the machine counts least.
const best = new Map();
for (let round = 0; round < ROUNDS; round += 1) {
  for (const entry of nativeCases()) {
    const wasm = wasmSeconds(entry.link);
    if (wasm.cells !== entry.cells) throw new Error(`${entry.case}: wasm grew ${wasm.cells} cells, native ${entry.cells}`);
    const previous = best.get(entry.case) ?? { native: Infinity, wasm: Infinity, cells: entry.cells };
    previous.native = Math.min(previous.native, entry.seconds);
    previous.wasm = Math.min(previous.wasm, wasm.seconds);
    best.set(entry.case, previous);
  }
}
console.log(`wasm (node ${process.version}) against native, best of ${ROUNDS}; target: ratio at most 1.6`);
console.log(`${'case'.padEnd(58)} ${'cells'.padStart(8)} ${'native s'.padStart(9)} ${'wasm s'.padStart(9)} ${'ratio'.padStart(6)}`);
for (const [name, figures] of best) {
  const ratio = figures.wasm / figures.native;
  console.log(`${name.padEnd(58)} ${String(figures.cells).padStart(8)} ${figures.native.toFixed(3).padStart(9)} ${figures.wasm.toFixed(3).padStart(9)} ${ratio.toFixed(2).padStart(6)}`);
}
