// The page's memory estimate (crate-web/src/memory.rs) against the wasm engine's own count of
// the instance's memory (`memory.size` in pages of 64 KiB, WebAssembly core specification 2.0,
// section 4.4.7): runs grown under node as the page grows them (see memory-wasm.mjs) must stay
// within their estimate, so a run the page lets start does not reach the 4 GiB ceiling.
import { test } from 'node:test';
import assert from 'node:assert/strict';
import { link, measure } from './memory-wasm.mjs';

test('runs grown in wasm stay within the page\'s memory estimate', () => {
  for (const entry of [
    [600, 600, 360000, ''],
    [700, 500, 200000, '&attach_to_segments=true'],
    [1500, 1500, 50000, ''],
  ]) {
    const { grown, cells, estimate } = measure(link(entry));
    assert.ok(cells > 0.9 * entry[2], `${cells} cells grown of ${entry[2]}`);
    assert.ok(grown <= estimate.bytes, `${entry}: ${grown} bytes measured, ${estimate.bytes} estimated`);
    assert.equal(estimate.fits, true);
  }
});
