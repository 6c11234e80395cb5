// End-to-end tests of the page as a newcomer meets it, in headless Chromium: the layout at four
// widths (nothing overflows its panel, every control has a visible label in its row, keep and
// share come before the readings on a phone), the view fitted to the network, the root marked,
// the progress bar complete after a stop before the budget, export confirmation, printable SVG
// text, the first-visit guide, and an accessibility pass (the browser's accessibility tree,
// visible focus, WCAG 2.2 contrast). References outside the page: the native `ramulus` binary
// (cells grown and why it stopped), WCAG 2.2's relative-luminance and contrast-ratio formulas,
// and SVG 1.1 section 7.10 (width in mm over the viewBox width gives paper mm per user unit).
// Screenshots of every preset at 1400 and 420 px go to artifacts/e2e/.
import { after, before, test } from 'node:test';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import {
  finishedDigest, fragmentOf, launchBrowser, nativeRun, newPage, screenshot, serveSite, tabTo,
} from './support.mjs';

const WIDTHS = [1400, 1024, 768, 420];
const HEIGHT = 900;

let site;
let context;

before(async () => {
  site = await serveSite();
  context = await launchBrowser({ width: 1400, height: HEIGHT });
});

after(async () => {
  await context?.close();
  site?.close();
});

/// A page at `width` x 900 with the first leaf grown; the guide dismissed unless `keepGuide`.
async function openAt(width, keepGuide = false) {
  const page = await newPage(context);
  await page.setViewportSize({ width, height: HEIGHT });
  await page.goto(site.url);
  await finishedDigest(page);
  if (!keepGuide && await page.isVisible('#guide')) await page.click('#guide-close');
  return page;
}

/// Boxes that leave their panel (the nearest section or header) or the page, texts cut off
/// inside their own box, and selects too narrow for their chosen option.
function overflowsIn(page) {
  return page.evaluate(() => {
    const problems = [];
    const visible = (element) => {
      const box = element.getBoundingClientRect();
      return box.width > 0 && box.height > 0 && getComputedStyle(element).visibility !== 'hidden'
        && !element.closest('[hidden], details:not([open]) > :not(summary)');
    };
    const name = (element) => `${element.tagName.toLowerCase()}${element.id ? `#${element.id}` : ''}`
      + ` "${(element.textContent || element.getAttribute('aria-label') || '').trim().slice(0, 30)}"`;
    const pageWidth = document.documentElement.clientWidth;
    if (document.documentElement.scrollWidth > pageWidth) {
      problems.push(`page scrolls sideways: ${document.documentElement.scrollWidth} > ${pageWidth}`);
    }
    const selector = 'main *, header *, #guide *, #notices *';
    for (const element of document.querySelectorAll(selector)) {
      if (!visible(element) || element.closest('option, svg, .probe, .visually-hidden')) continue;
      const box = element.getBoundingClientRect();
      const panel = element.parentElement.closest('section, header');
      if (panel) {
        const outer = panel.getBoundingClientRect();
        if (box.left < outer.left - 1 || box.right > outer.right + 1) {
          problems.push(`${name(element)} [${box.left.toFixed(0)}, ${box.right.toFixed(0)}] leaves its panel [${outer.left.toFixed(0)}, ${outer.right.toFixed(0)}]`);
        }
      }
      if (box.right > pageWidth + 1) problems.push(`${name(element)} passes the page's right edge`);
      const style = getComputedStyle(element);
      const clips = style.overflowX !== 'visible' || ['BUTTON', 'LABEL'].includes(element.tagName);
      if (clips && element.children.length === 0 && element.scrollWidth > element.clientWidth + 1
        && !['INPUT', 'TEXTAREA', 'SELECT', 'CANVAS', 'PROGRESS'].includes(element.tagName)) {
        problems.push(`${name(element)} cuts its text: ${element.scrollWidth} > ${element.clientWidth}`);
      }
      if (element.tagName === 'SELECT') {
        // The chosen option's text, in the select's font, must fit beside the arrow and padding (about 22 px).
        const probe = document.createElement('span');
        probe.style.font = style.font;
        probe.style.position = 'absolute';
        probe.style.whiteSpace = 'pre';
        probe.textContent = element.selectedOptions[0]?.textContent ?? '';
        document.body.append(probe);
        const needed = probe.getBoundingClientRect().width + 22;
        probe.remove();
        if (needed > box.width + 1) problems.push(`${name(element)} cuts its option: needs ${needed.toFixed(0)} px, has ${box.width.toFixed(0)}`);
      }
    }
    return problems;
  });
}

/// Form controls without a visible label in their row: the label's box overlaps the control's
/// vertically (beside it), or ends at most 16 px above it and overlaps it horizontally (a
/// label over a text area or file chooser).
function unlabelledIn(page) {
  return page.evaluate(() => {
    const problems = [];
    for (const details of document.querySelectorAll('details')) details.open = true;
    for (const control of document.querySelectorAll('input, select, textarea')) {
      const box = control.getBoundingClientRect();
      if (control.type === 'hidden' || box.width === 0 || box.height === 0) continue;
      const labels = [...(control.labels ?? [])].filter((label) => {
        const text = label.textContent.trim();
        const shown = label.getBoundingClientRect();
        return text !== '' && shown.width > 0 && shown.height > 0;
      });
      if (labels.length === 0) {
        problems.push(`#${control.id}: no visible label`);
        continue;
      }
      const inRow = labels.some((label) => {
        const shown = label.getBoundingClientRect();
        if (label.contains(control)) return true;
        const beside = shown.top < box.bottom && shown.bottom > box.top;
        const above = shown.bottom <= box.top + 2 && box.top - shown.bottom <= 16
          && shown.left < box.right && shown.right > box.left;
        return beside || above;
      });
      if (!inRow) problems.push(`#${control.id}: label "${labels[0].textContent.trim()}" not beside or just above it`);
    }
    return problems;
  });
}

for (const width of WIDTHS) {
  test(`at ${width} px nothing overflows, every control has its label, share comes before the readings`, async () => {
    const page = await openAt(width);
    assert.deepEqual(await overflowsIn(page), [], `overflow at ${width} px`);
    assert.deepEqual(await unlabelledIn(page), [], `labels at ${width} px`);
    const tops = await page.evaluate(() => Object.fromEntries(['keep', 'readings'].map((name) => [
      name, document.querySelector(`section.${name}`).getBoundingClientRect().top + window.scrollY,
    ])));
    // Keep and share comes before the readings (above them in their column, or before them in
    // the one column of a phone), and Copy link is within the first screen on a laptop, the
    // first two on a phone.
    assert.ok(tops.keep < tops.readings, `keep and share (${tops.keep}) before the readings (${tops.readings})`);
    const copy = await page.evaluate(() => document.getElementById('copy-link').getBoundingClientRect().bottom + window.scrollY);
    assert.ok(copy <= (width <= 860 ? 2 : 1) * 900 + 1, `Copy link at ${copy} px from the top`);
    assert.deepEqual(page.errors, []);
    await page.close();
  });
}

test('every preset at 1400 and 420 px: screenshots, fitted view, marked roots, words of its kind', async () => {
  for (const width of [1400, 420]) {
    const page = await openAt(width);
    const presets = await page.evaluate(() => window.ramulusPage.state.presets.map((preset) => preset.name));
    assert.ok(presets.length >= 5, presets.join(', '));
    for (const name of presets) {
      if (await page.inputValue('#start-from') !== name) {
        await page.selectOption('#start-from', name);
        await finishedDigest(page);
      }
      await page.waitForFunction(() => window.ramulusPage.state.networkBounds != null);
      const fill = await networkFill(page);
      assert.ok(fill.share >= 0.7, `${name} at ${width} px: the network fills ${fill.share.toFixed(2)} of the canvas`);
      assert.ok(fill.inside, `${name} at ${width} px: the network lies inside the canvas`);
      const site = await page.evaluate(() => window.ramulusPage.state.frame.site);
      const legend = await page.textContent('#legend');
      assert.match(legend, site ? /outlet \(root\)/ : /petiole \(root\)/, `${name}: the root's key`);
      assert.equal(await rootPixel(page), '255,255,255', `${name}: a white root marker on the paper-coloured canvas`);
      if (site) {
        const words = await page.evaluate(() => document.querySelector('main').innerText);
        assert.doesNotMatch(words, /vein/i, `${name}: drainage words only`);
        assert.match(words, /drainage density/);
        assert.match(await page.textContent('#caution'), /concept|licensed engineer/i);
      }
      await screenshot(page, `ux-${width}-${name}`);
    }
    assert.deepEqual(page.errors, []);
    await page.close();
  }
});

/// How much of the canvas the network's segments fill after the page's fit: the larger of
/// their extent's width over the canvas width and height over height (the side that limits
/// the fit), and whether the extent lies inside. Read from the segment ends in wasm memory,
/// not from the marks the fit used.
function networkFill(page) {
  return page.evaluate(() => {
    const { view, state } = window.ramulusPage;
    const ends = state.simulation.ends();
    let [x0, y0, x1, y1] = [Infinity, Infinity, -Infinity, -Infinity];
    for (let i = 0; i < ends.length; i += 2) {
      const x = ends[i] * view.scale + view.offsetX;
      const y = ends[i + 1] * view.scale + view.offsetY;
      x0 = Math.min(x0, x); x1 = Math.max(x1, x); y0 = Math.min(y0, y); y1 = Math.max(y1, y);
    }
    const { width, height } = view.canvas;
    return {
      share: Math.max((x1 - x0) / width, (y1 - y0) / height),
      inside: x0 >= 0 && y0 >= 0 && x1 <= width && y1 <= height,
    };
  });
}

/// The canvas pixel at the first root, as "r,g,b".
function rootPixel(page) {
  return page.evaluate(() => {
    const { view } = window.ramulusPage;
    view.draw();
    const [x, y] = view.roots[0];
    const px = Math.round(x * view.scale + view.offsetX);
    const py = Math.round(y * view.scale + view.offsetY);
    return [...view.context.getImageData(px, py, 1, 1).data.slice(0, 3)].join(',');
  });
}

test('Fit brings the zoomed-out network back to fill the canvas', async () => {
  const page = await openAt(1024);
  for (let i = 0; i < 4; i += 1) await page.click('#zoom-out');
  assert.ok((await networkFill(page)).share < 0.5, 'zoomed out first');
  await page.click('#zoom-fit');
  const fill = await networkFill(page);
  assert.ok(fill.share >= 0.7 && fill.inside, JSON.stringify(fill));
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('a run that stops before the budget shows a complete bar and why', async () => {
  const page = await openAt(1400);
  const native = nativeRun(await fragmentOf(page));
  const budget = await page.evaluate(() => window.ramulusPage.state.simulation.budget());
  // The first leaf fills its blade outline: the native run stops when no allowed cell is left,
  // short of the budget (the outline's length times its width).
  assert.equal(native.stopped, 'full');
  assert.ok(native.cells < budget, `${native.cells} of ${budget}`);
  const bar = await page.evaluate(() => ({ value: document.getElementById('progress').value, max: document.getElementById('progress').max }));
  assert.equal(bar.value, bar.max, 'the bar is full');
  const text = await page.textContent('#progress-text');
  assert.match(text, new RegExp(`^${native.cells.toLocaleString('en')} of ${budget.toLocaleString('en')} cells, complete before the budget: no allowed cell left`));
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('exports are confirmed with file name and size; SVG text is at least 2.5 mm on paper', async () => {
  const page = await openAt(1400);
  const [download] = await Promise.all([page.waitForEvent('download'), page.click('#save-svg')]);
  const bytes = readFileSync(await download.path());
  const said = await page.textContent('#saved');
  const match = said.match(/^Saved (ramulus-[0-9a-f]{16}\.svg) \(drawing at true size, ([\d.]+) (kB|MB)\)\.$/);
  assert.ok(match, said);
  assert.equal(match[1], download.suggestedFilename());
  // Three significant digits of the size in decimal kB or MB (SI: 1 kB = 1000 bytes).
  const shown = Number(match[2]) * (match[3] === 'MB' ? 1e6 : 1e3);
  assert.ok(Math.abs(shown - bytes.length) <= 0.005 * bytes.length, `${match[2]} ${match[3]} for ${bytes.length} bytes`);
  const sizes = await page.evaluate((text) => {
    const svg = new DOMParser().parseFromString(text, 'image/svg+xml').documentElement;
    const viewWidth = Number(svg.getAttribute('viewBox').split(/\s+/)[2]);
    const paperPerUnit = parseFloat(svg.getAttribute('width')) / viewWidth;
    return [...svg.querySelectorAll('text')].map((element) => {
      const size = parseFloat(element.closest('[font-size]')?.getAttribute('font-size') ?? 'NaN');
      return size * paperPerUnit;
    });
  }, bytes.toString('utf8'));
  assert.ok(sizes.length > 3, 'scale, note and key texts');
  for (const size of sizes) assert.ok(size >= 2.5 - 1e-9, `text ${size} mm high`);
  const [csv] = await Promise.all([page.waitForEvent('download'), page.click('#save-csv')]);
  const csvBytes = readFileSync(await csv.path()).length;
  assert.match(await page.textContent('#saved'), new RegExp(`^Saved ramulus-[0-9a-f]{16}\\.csv \\(readings table, `));
  assert.ok(csvBytes > 0);
  assert.deepEqual(page.errors, []);
  await page.close();
});

test('the first-visit guide shows three steps until dismissed, and stays dismissed', async () => {
  const page = await newPage(context);
  await page.goto(site.url);
  await page.evaluate(() => localStorage.removeItem('ramulus.guide'));
  await page.reload();
  await finishedDigest(page);
  assert.equal(await page.isVisible('#guide'), true);
  assert.equal(await page.locator('#guide li').count(), 3);
  assert.match(await page.textContent('#guide'), /starting point[\s\S]*change a value[\s\S]*share the link/i);
  await page.click('#guide-close');
  assert.equal(await page.isVisible('#guide'), false);
  await page.reload();
  await finishedDigest(page);
  assert.equal(await page.isVisible('#guide'), false, 'remembered across reloads');
  assert.deepEqual(page.errors, []);
  await page.close();
});

/// WCAG 2.2 relative luminance of an sRGB colour [r, g, b] in 0..255 (definition under
/// "relative luminance": linearise each channel, then 0.2126 R + 0.7152 G + 0.0722 B).
function luminance([r, g, b]) {
  const linear = (channel) => {
    const c = channel / 255;
    return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  };
  return 0.2126 * linear(r) + 0.7152 * linear(g) + 0.0722 * linear(b);
}

/// WCAG 2.2 contrast ratio (L1 + 0.05) / (L2 + 0.05), L1 the lighter.
function contrast(a, b) {
  const [l1, l2] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (l1 + 0.05) / (l2 + 0.05);
}

test('WCAG worked values: black on white is 21:1, #777777 on white about 4.48:1', () => {
  // Contrast of the extremes is 21 by the formula's definition; #777 on white is the
  // well-known just-failing grey (4.48, from memory).
  assert.ok(Math.abs(contrast([0, 0, 0], [255, 255, 255]) - 21) < 1e-9);
  assert.ok(Math.abs(contrast([119, 119, 119], [255, 255, 255]) - 4.48) < 0.01);
});

for (const width of [1400, 420]) {
  test(`accessibility at ${width} px: every control named, focus visible, text contrast at least 4.5:1`, async () => {
    const page = await openAt(width, true);
    await page.evaluate(() => { for (const details of document.querySelectorAll('details')) details.open = true; });
    // The browser's accessibility tree (Chrome DevTools Protocol).
    const session = await context.newCDPSession(page);
    const { nodes } = await session.send('Accessibility.getFullAXTree');
    const controls = ['button', 'textbox', 'combobox', 'checkbox', 'spinbutton', 'slider', 'radio', 'link', 'ListBox'.toLowerCase()];
    const unnamed = nodes.filter((node) => !node.ignored && controls.includes(node.role?.value)
      && !(node.name?.value ?? '').trim());
    assert.deepEqual(unnamed.map((node) => `${node.role.value} ${node.backendDOMNodeId}`), [], 'controls without a name');
    const named = nodes.filter((node) => !node.ignored && controls.includes(node.role?.value));
    assert.ok(named.length > 30, `${named.length} controls in the tree`);
    await session.detach();

    // Focus is visible on every control reached with Tab: an outline at least 2 px wide.
    await page.evaluate(() => document.activeElement?.blur());
    await tabTo(page, 'start-from');
    const seen = new Set();
    for (let presses = 0; presses < 80; presses += 1) {
      const focus = await page.evaluate(() => {
        const element = document.activeElement;
        const style = getComputedStyle(element);
        const id = `${element.tagName.toLowerCase()}#${element.id} @${[...document.querySelectorAll('*')].indexOf(element)}`;
        return { id, style: style.outlineStyle, width: parseFloat(style.outlineWidth) };
      });
      if (seen.has(focus.id) || focus.id.startsWith('body#')) break;
      seen.add(focus.id);
      assert.ok(focus.style !== 'none' && focus.width >= 2, `focus on ${focus.id} is visible: ${JSON.stringify(focus)}`);
      await page.keyboard.press('Tab');
    }
    assert.ok(seen.size > 20, `${seen.size} controls reached by Tab`);

    // Text against its background: colours as the browser computes them, the background the
    // nearest ancestor's opaque one; disabled controls are exempt (WCAG 2.2, SC 1.4.3).
    const samples = await page.evaluate(() => {
      const rgb = (text) => (text.match(/[\d.]+/g) ?? []).map(Number);
      const background = (element) => {
        for (let at = element; at; at = at.parentElement) {
          const colour = rgb(getComputedStyle(at).backgroundColor);
          if (colour.length === 3 || colour[3] === 1) return colour.slice(0, 3);
        }
        return [255, 255, 255];
      };
      const out = [];
      for (const element of document.querySelectorAll('body *')) {
        const hasText = [...element.childNodes].some((node) => node.nodeType === 3 && node.textContent.trim());
        const box = element.getBoundingClientRect();
        if (!hasText || box.width === 0 || element.closest(':disabled, [hidden], option, .visually-hidden')) continue;
        const style = getComputedStyle(element);
        const size = parseFloat(style.fontSize);
        const bold = Number(style.fontWeight) >= 700;
        out.push({
          text: element.textContent.trim().slice(0, 40),
          colour: rgb(style.color).slice(0, 3),
          alpha: rgb(style.color)[3] ?? 1,
          opacity: Number(style.opacity),
          background: background(element),
          // WCAG large text: at least 18 pt (24 px), or 14 pt (18.66 px) bold.
          large: size >= 24 || (bold && size >= 18.66),
        });
      }
      return out;
    });
    assert.ok(samples.length > 50, `${samples.length} texts checked`);
    const failing = samples.filter((sample) => {
      const need = sample.large ? 3 : 4.5;
      return sample.alpha < 1 || sample.opacity < 1 || contrast(sample.colour, sample.background) < need;
    }).map((sample) => `${sample.text}: ${contrast(sample.colour, sample.background).toFixed(2)}`);
    assert.deepEqual(failing, [], 'texts below their contrast minimum');
    assert.deepEqual(page.errors, []);
    await page.close();
  });
}

test('under the Content-Security-Policy the page works and an inline script does not run', async () => {
  const page = await openAt(1400);
  const policy = await page.getAttribute('meta[http-equiv="Content-Security-Policy"]', 'content');
  assert.match(policy, /script-src 'self' 'wasm-unsafe-eval'(;|$)/);
  assert.doesNotMatch(policy, /unsafe-inline|https?:/);
  // The page grew its first leaf under the policy (openAt waited for the digest) with no
  // console error, which a blocked module or wasm compile would have logged.
  assert.deepEqual(page.errors, []);
  const outcome = await page.evaluate(() => new Promise((resolve) => {
    document.addEventListener('securitypolicyviolation', (event) => {
      resolve({ ran: window.injectedScriptRan === true, blocked: event.violatedDirective });
    }, { once: true });
    const script = document.createElement('script');
    script.textContent = 'window.injectedScriptRan = true;';
    document.body.append(script);
    setTimeout(() => resolve({ ran: window.injectedScriptRan === true, blocked: '' }), 2000);
  }));
  assert.equal(outcome.ran, false, 'the inline script did not run');
  assert.match(outcome.blocked, /^script-src/);
  await page.close();
});
