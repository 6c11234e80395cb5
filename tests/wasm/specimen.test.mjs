// The page's specimen path in the wasm build under node: `measure_specimen` on each demo
// specimen gives the metrics, node and segment counts and repairs the native command line's
// `ramulus measure --json` prints for the same file (native and wasm builds must agree to the
// bit, as for growth digests), and a file past the size limit is refused by size alone.
// Run by `./x test` after `./x build`.
import { test } from 'node:test';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import path from 'node:path';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const glue = await import(path.join(root, 'www/pkg/ramulus_web.js'));
glue.initSync({ module: readFileSync(path.join(root, 'www/pkg/ramulus_web_bg.wasm')) });
const native = path.join(root, 'target/release/ramulus');
const demos = path.join(root, 'examples/specimens');

const cases = [
  ['hand-traced-leaf.svg', { units: 'mm', scale: 'file' }, []],
  ['hand-traced-leaf.svg', { units: 'mm', scale: { factor: 0.3 }, root: [160, 50] }, ['--scale', '0.3', '--root', '160,50']],
  ['hand-traced-leaf.svg', { units: 'mm', scale: { from: [230, 460], to: [270, 460], distance: 20 } }, ['--scale-bar', '230,460,270,460,20']],
  ['small-net.csv', { units: 'mm' }, ['--units', 'mm']],
  ['small-net.geojson', { units: 'cm', root: [0, 20] }, ['--units', 'cm', '--root', '0,20']],
];

for (const [file, options, flags] of cases) {
  test(`wasm measures ${file} ${flags.join(' ')} as the native command line does`, () => {
    const bytes = readFileSync(path.join(demos, file));
    const page = JSON.parse(glue.measure_specimen(bytes, JSON.stringify(options)));
    assert.equal(page.error, undefined, JSON.stringify(page.error));
    const cli = JSON.parse(execFileSync(native, ['measure', '--json', ...flags, path.join(demos, file)]).toString());
    assert.deepEqual(page.metrics, cli.metrics);
    assert.equal(page.nodes, cli.nodes);
    assert.equal(page.segments, cli.segments);
    assert.equal(page.units, cli.units);
    assert.equal(page.calibration.factor, cli.calibration.factor);
    const repairs = cli.repairs.filter((repair) => repair.kind !== 'root');
    assert.deepEqual(page.repairs.map((repair) => repair.message), repairs.map((repair) => repair.message));
    assert.deepEqual(page.roots.map((item) => item.message), cli.repairs.filter((repair) => repair.kind === 'root').map((repair) => repair.message));
    // Every segment is drawn: four coordinates each.
    assert.equal(page.ends.length, 4 * cli.segments);
  });
}

test('a file one byte past the limit is refused by its size; one at the limit is not', () => {
  const limit = glue.specimen_max_bytes();
  assert.match(glue.specimen_size_refusal(limit + 1), new RegExp(`^the file has ${limit + 1} bytes, more than the ${limit} bytes`));
  assert.equal(glue.specimen_size_refusal(limit), '');
});
