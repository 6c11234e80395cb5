// Benchmark, not a test: the wasm build's own memory per lattice cell and per grown cell, the
// figures behind the page's memory estimate (crate-web/src/memory.rs). Grows runs under node in
// slices, refilling the page's geometry every eighth of the budget and at the end as the page
// does, each in a fresh instance (wasm memory never shrinks), and prints the instance's memory
// beside the estimate. Usage: node tests/wasm/memory-wasm.mjs [--large] (--large adds runs of
// 2 to 6 million cells, a few minutes).
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import path from 'node:path';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const glue = await import(path.join(root, 'www/pkg/ramulus_web.js'));
glue.initSync({ module: readFileSync(path.join(root, 'www/pkg/ramulus_web_bg.wasm')) });

const FULL_MODEL = '&joining=weighted&temperature=0.5&w_turn=1&w_flow=0.5&alpha=0.5&w_path=0.05';
const CASES = [
  [1000, 1000, 100000, ''],
  [2000, 2000, 100000, ''],
  [1000, 1000, 500000, ''],
  [1000, 1000, 1000000, ''],
  [1000, 1000, 1000000, FULL_MODEL],
  [1000, 1000, 1000000, '&attach_to_segments=true'],
];
const LARGE = [
  [3000, 3000, 2000000, ''],
  [3000, 3000, 3000000, ''],
  [3000, 3000, 4500000, ''],
  [3000, 3000, 6000000, ''],
];

/// Grows the run of `link` in a fresh instance; returns its memory figures.
export function measure(link) {
  glue.__wbg_reset_state();
  const empty = glue.wasm_memory_bytes();
  const simulation = new glue.Simulation(link);
  const planted = glue.wasm_memory_bytes();
  const every = Math.max(4096, simulation.budget() / 8);
  let next = every;
  while (!simulation.finished()) {
    simulation.step(4096);
    if (simulation.cells() >= next) {
      simulation.update_geometry();
      simulation.colour_indices('order');
      next += every;
    }
  }
  simulation.update_geometry();
  simulation.colour_indices('flow');
  const cells = simulation.cells();
  simulation.free();
  const grown = glue.wasm_memory_bytes();
  const estimate = JSON.parse(glue.run_memory_json(link));
  return { empty, planted, grown, cells, estimate };
}

export function link([width, height, cells, extra]) {
  return `v=1&width=${width}&height=${height}&roots=${width >> 1},${height - 2},0,1&cells=${cells}`
    + `&joining=cheapest&w_turn=0&w_flow=0&w_path=0${extra}`;
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  const cases = process.argv.includes('--large') ? [...CASES, ...LARGE] : CASES;
  console.log('lattice      cells      model          bytes/lattice cell  bytes/grown cell  memory MB  estimate MB');
  for (const entry of cases) {
    const [width, height, , extra] = entry;
    const { empty, planted, grown, cells, estimate } = measure(link(entry));
    const model = extra === '' ? 'pure length' : extra.includes('attach') ? 'attach to sides' : 'full model';
    console.log([
      `${width} x ${height}`.padEnd(12),
      String(cells).padEnd(10),
      model.padEnd(14),
      ((planted - empty) / (width * height)).toFixed(1).padStart(18),
      ((grown - planted) / cells).toFixed(0).padStart(17),
      (grown / 1e6).toFixed(0).padStart(10),
      (estimate.bytes / 1e6).toFixed(0).padStart(12),
    ].join(' '));
  }
}
