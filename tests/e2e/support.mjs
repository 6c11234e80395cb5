// Shared setup of the browser tests and page benchmarks: serves www/ on a free local port,
// starts Debian's Chromium through playwright-core with the flags this machine needs, collects
// console errors per page, runs the native `ramulus` binary, and saves screenshots as artifacts.
import { createServer } from 'node:http';
import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from 'playwright-core';

export const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
export const artifacts = path.join(root, 'artifacts', 'e2e');
const www = path.join(root, 'www');
const native = path.join(root, 'target', 'release', 'ramulus');
const CHROMIUM = process.env.RAMULUS_CHROMIUM ?? '/usr/bin/chromium';

const TYPES = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.wasm': 'application/wasm',
  '.json': 'application/json',
  '.png': 'image/png',
  '.svg': 'image/svg+xml',
};

/// Serves www/ read-only on 127.0.0.1 and a free port; resolves to `{ url, close }`.
export function serveSite() {
  const server = createServer((request, response) => {
    const pathname = decodeURIComponent(new URL(request.url, 'http://x').pathname);
    const file = path.join(www, pathname === '/' ? 'index.html' : pathname);
    if (!file.startsWith(www) || !isFile(file)) {
      response.writeHead(404).end('not found');
      return;
    }
    response.writeHead(200, {
      'content-type': TYPES[path.extname(file)] ?? 'application/octet-stream',
      'cache-control': 'no-store',
    });
    response.end(readFileSync(file));
  });
  return new Promise((resolve) => {
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address();
      resolve({ url: `http://127.0.0.1:${port}/`, close: () => server.close() });
    });
  });
}

function isFile(file) {
  try {
    return statSync(file).isFile();
  } catch {
    return false;
  }
}

/// A fresh Chromium profile with downloads and the clipboard allowed.
export async function launchBrowser(viewport = { width: 1500, height: 1000 }) {
  const profile = mkdtempSync(path.join(tmpdir(), 'ramulus-chromium-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    viewport,
    acceptDownloads: true,
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
  await context.grantPermissions(['clipboard-read', 'clipboard-write']);
  return context;
}

/// A new page whose console errors and uncaught exceptions land in `page.errors`.
export async function newPage(context) {
  const page = await context.newPage();
  page.errors = [];
  page.on('console', (message) => {
    if (message.type() === 'error') page.errors.push(message.text());
  });
  page.on('pageerror', (error) => page.errors.push(String(error)));
  return page;
}

/// Waits until the page shows a finished run's digest (16 hex digits) and returns it.
export async function finishedDigest(page, timeout = 120000) {
  await page.waitForFunction(
    () => /^[0-9a-f]{16}$/.test(document.querySelector('[data-role="digest"]')?.textContent ?? ''),
    null,
    { timeout },
  );
  return page.textContent('[data-role="digest"]');
}

/// The native command line's JSON summary of the run a link describes.
export function nativeRun(link) {
  const output = execFileSync(native, ['grow', '--link', link, '--json'], { stdio: ['ignore', 'pipe', 'pipe'] });
  return JSON.parse(output.toString());
}

/// Saves a full-page screenshot under artifacts/e2e/.
export async function screenshot(page, name) {
  mkdirSync(artifacts, { recursive: true });
  await page.screenshot({ path: path.join(artifacts, `${name}.png`), fullPage: true });
}

/// Presses Tab until the element with `id` has focus; fails after `limit` presses.
export async function tabTo(page, id, limit = 300) {
  for (let presses = 0; presses < limit; presses += 1) {
    if (await page.evaluate((wanted) => document.activeElement?.id === wanted, id)) return presses;
    await page.keyboard.press('Tab');
  }
  throw new Error(`Tab never reached #${id}`);
}

/// The page's current link fragment, without `#`.
export function fragmentOf(page) {
  return page.evaluate(() => location.hash.slice(1));
}
