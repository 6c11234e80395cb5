// Canvas plots of a run's metrics: order-ratio (Horton) plot, branching-angle histogram, text summary.

const FONT = '12px system-ui, sans-serif';
const INK = '#000000';
const GRID = '#dddddd';
const COUNT_COLOUR = '#0072B2'; // blue
const LENGTH_COLOUR = '#D55E00'; // vermillion
const BAR_FILL = '#56B4E9'; // sky blue
const BAR_EDGE = '#0072B2'; // blue
const MEAN_COLOUR = '#D55E00'; // vermillion
const BIN_COUNT = 18;
const BIN_WIDTH_DEG = 10;
const SUPERSCRIPT = { '-': '\u207B', 0: '\u2070', 1: '\u00B9', 2: '\u00B2', 3: '\u00B3', 4: '\u2074', 5: '\u2075', 6: '\u2076', 7: '\u2077', 8: '\u2078', 9: '\u2079' };

// ---- small helpers -------------------------------------------------------------------------

const finite = (value) => (typeof value === 'number' && Number.isFinite(value) ? value : null);
const list = (value) => (Array.isArray(value) ? value : []);
const fixed = (value, digits) => (finite(value) === null ? null : value.toFixed(digits));

// Sizes the backing store to CSS size x devicePixelRatio, scales the context to CSS pixels and
// clears everything. Returns null when the canvas gives no 2D context.
function prepare(canvas) {
  const ctx = canvas && typeof canvas.getContext === 'function' ? canvas.getContext('2d') : null;
  if (!ctx) return null;
  const width = canvas.clientWidth || canvas.width || 300;
  const height = canvas.clientHeight || canvas.height || 150;
  const ratio = finite(globalThis.devicePixelRatio) || 1;
  canvas.width = Math.round(width * ratio);
  canvas.height = Math.round(height * ratio);
  ctx.setTransform(ratio, 0, 0, ratio, 0, 0);
  ctx.clearRect(0, 0, width, height);
  ctx.font = FONT;
  ctx.lineWidth = 1;
  ctx.setLineDash([]);
  return { ctx, width, height };
}

function centredMessage(ctx, width, height, text) {
  ctx.fillStyle = INK;
  ctx.textAlign = 'center';
  ctx.textBaseline = 'middle';
  ctx.fillText(text, width / 2, height / 2);
}

// Least-squares line y = intercept + slope * x; null with fewer than two distinct x values.
function leastSquares(points) {
  const n = points.length;
  if (n < 2) return null;
  const meanX = points.reduce((sum, p) => sum + p.x, 0) / n;
  const meanY = points.reduce((sum, p) => sum + p.y, 0) / n;
  let sxx = 0;
  let sxy = 0;
  for (const p of points) {
    sxx += (p.x - meanX) ** 2;
    sxy += (p.x - meanX) * (p.y - meanY);
  }
  if (sxx === 0) return null;
  const slope = sxy / sxx;
  return { slope, intercept: meanY - slope * meanX };
}

// A tick step of 1, 2 or 5 times a power of ten giving about `target` intervals up to `max`.
function niceStep(max, target) {
  if (!(max > 0)) return 1;
  const raw = max / target;
  const power = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= raw) ?? 10 * power;
  return Math.max(1, step);
}

function decadeLabel(exponent) {
  if (exponent >= 0 && exponent <= 4) return String(10 ** exponent);
  if (exponent < 0 && exponent >= -3) return (10 ** exponent).toFixed(-exponent);
  return `10${[...String(exponent)].map((c) => SUPERSCRIPT[c]).join('')}`;
}

function line(ctx, x0, y0, x1, y1) {
  ctx.beginPath();
  ctx.moveTo(x0, y0);
  ctx.lineTo(x1, y1);
  ctx.stroke();
}

function filledCircle(ctx, x, y, colour) {
  ctx.fillStyle = colour;
  ctx.beginPath();
  ctx.arc(x, y, 4, 0, 2 * Math.PI);
  ctx.fill();
}

function openSquare(ctx, x, y, colour) {
  ctx.strokeStyle = colour;
  ctx.lineWidth = 1.5;
  ctx.strokeRect(x - 4, y - 4, 8, 8);
  ctx.lineWidth = 1;
}

function verticalTitle(ctx, text, x, y) {
  ctx.save();
  ctx.translate(x, y);
  ctx.rotate(-Math.PI / 2);
  ctx.textAlign = 'center';
  ctx.textBaseline = 'top';
  ctx.fillText(text, 0, 0);
  ctx.restore();
}

function frame(ctx, box) {
  ctx.strokeStyle = INK;
  ctx.lineWidth = 1;
  ctx.strokeRect(box.left, box.top, box.right - box.left, box.bottom - box.top);
}

function plotBox(width, height, margin) {
  const box = {
    left: margin.left,
    right: width - margin.right,
    top: margin.top,
    bottom: height - margin.bottom,
  };
  return box.right - box.left > 20 && box.bottom - box.top > 20 ? box : null;
}

// ---- Horton plot ---------------------------------------------------------------------------

function hortonSeries(metrics) {
  const counts = [];
  const lengths = [];
  for (const stream of list(metrics?.streams)) {
    const order = finite(stream?.order);
    if (order === null) continue;
    const count = finite(stream.stream_count);
    const length = finite(stream.mean_stream_length);
    if (count !== null && count > 0) counts.push({ x: order, y: Math.log10(count) });
    if (length !== null && length > 0) lengths.push({ x: order, y: Math.log10(length) });
  }
  return { counts, lengths };
}

function drawFit(ctx, points, toX, toY, colour, box) {
  const fit = leastSquares(points);
  if (!fit) return;
  const xs = points.map((p) => p.x);
  const x0 = Math.min(...xs);
  const x1 = Math.max(...xs);
  ctx.save();
  ctx.beginPath();
  ctx.rect(box.left, box.top, box.right - box.left, box.bottom - box.top);
  ctx.clip();
  ctx.strokeStyle = colour;
  ctx.lineWidth = 1.5;
  line(ctx, toX(x0), toY(fit.intercept + fit.slope * x0), toX(x1), toY(fit.intercept + fit.slope * x1));
  ctx.restore();
}

function legendRow(ctx, x, y, colour, marker, text) {
  ctx.strokeStyle = colour;
  ctx.lineWidth = 1.5;
  line(ctx, x, y, x + 24, y);
  ctx.lineWidth = 1;
  marker(ctx, x + 12, y, colour);
  ctx.fillStyle = INK;
  ctx.textAlign = 'left';
  ctx.textBaseline = 'middle';
  ctx.fillText(text, x + 32, y);
}

export function drawHortonPlot(canvas, metrics, units) {
  const prepared = prepare(canvas);
  if (!prepared) return;
  const { ctx, width, height } = prepared;
  const { counts, lengths } = hortonSeries(metrics);
  const all = [...counts, ...lengths];
  if (all.length === 0) {
    centredMessage(ctx, width, height, 'No streams yet');
    return;
  }
  const box = plotBox(width, height, { left: 64, right: 16, top: 48, bottom: 44 });
  if (!box) return;

  const orders = all.map((p) => p.x);
  const minOrder = Math.min(...orders);
  const maxOrder = Math.max(...orders);
  const logs = all.map((p) => p.y);
  let lowDecade = Math.floor(Math.min(...logs));
  let highDecade = Math.ceil(Math.max(...logs));
  if (highDecade === lowDecade) highDecade += 1;
  const pad = 0.04 * (highDecade - lowDecade);
  const yLow = lowDecade - pad;
  const yHigh = highDecade + pad;
  const xLow = minOrder - 0.5;
  const xHigh = maxOrder + 0.5;
  const toX = (order) => box.left + ((order - xLow) / (xHigh - xLow)) * (box.right - box.left);
  const toY = (log) => box.bottom - ((log - yLow) / (yHigh - yLow)) * (box.bottom - box.top);

  // Decade grid, labels and minor ticks on the shared log axis.
  const decades = highDecade - lowDecade;
  const labelEvery = Math.max(1, Math.ceil(decades / 6));
  ctx.textAlign = 'right';
  ctx.textBaseline = 'middle';
  for (let e = lowDecade; e <= highDecade; e += 1) {
    const y = toY(e);
    ctx.strokeStyle = GRID;
    line(ctx, box.left, y, box.right, y);
    ctx.strokeStyle = INK;
    line(ctx, box.left - 5, y, box.left, y);
    if ((e - lowDecade) % labelEvery === 0) {
      ctx.fillStyle = INK;
      ctx.fillText(decadeLabel(e), box.left - 8, y);
    }
    if (e < highDecade && decades <= 6) {
      for (let m = 2; m <= 9; m += 1) {
        const ym = toY(e + Math.log10(m));
        line(ctx, box.left - 3, ym, box.left, ym);
      }
    }
  }

  // Integer order ticks.
  const orderStep = Math.max(1, Math.ceil((maxOrder - minOrder + 1) / 12));
  const orderTicks = [];
  for (let w = Math.ceil(minOrder); w <= maxOrder; w += orderStep) orderTicks.push(w);
  drawXTicks(ctx, box, orderTicks, toX);
  frame(ctx, box);

  // Fitted lines only where the core reports a ratio; points drawn on top.
  const countRatio = finite(metrics?.bifurcation_ratio);
  const lengthRatio = finite(metrics?.length_ratio);
  if (countRatio !== null) drawFit(ctx, counts, toX, toY, COUNT_COLOUR, box);
  if (lengthRatio !== null) drawFit(ctx, lengths, toX, toY, LENGTH_COLOUR, box);
  for (const p of counts) filledCircle(ctx, toX(p.x), toY(p.y), COUNT_COLOUR);
  for (const p of lengths) openSquare(ctx, toX(p.x), toY(p.y), LENGTH_COLOUR);

  // Legend above the plot area, so it never hides points.
  const unitText = typeof units === 'string' && units.trim() ? ` (${units.trim()})` : '';
  const countText = `count N_w, R_B = ${countRatio === null ? 'n/a' : countRatio.toFixed(2)}`;
  const lengthText = `mean length L_w${unitText}, R_L = ${lengthRatio === null ? 'n/a' : lengthRatio.toFixed(2)}`;
  legendRow(ctx, box.left, 14, COUNT_COLOUR, filledCircle, countText);
  legendRow(ctx, box.left, 32, LENGTH_COLOUR, openSquare, lengthText);

  // Axis titles.
  ctx.fillStyle = INK;
  ctx.textAlign = 'center';
  ctx.textBaseline = 'bottom';
  ctx.fillText('Strahler order', (box.left + box.right) / 2, height - 4);
  verticalTitle(ctx, `N_w or L_w${unitText}, log scale`, 4, (box.top + box.bottom) / 2);
}

// ---- branching-angle histogram -------------------------------------------------------------

function angleBins(metrics) {
  const raw = list(metrics?.branching_angle_histogram);
  const bins = [];
  for (let i = 0; i < BIN_COUNT; i += 1) {
    const value = finite(raw[i]);
    bins.push(value !== null && value > 0 ? value : 0);
  }
  return bins;
}

function angleCount(metrics, bins) {
  const count = finite(metrics?.branching_angle_count);
  return count !== null ? count : bins.reduce((sum, b) => sum + b, 0);
}

export function drawAngleHistogram(canvas, metrics) {
  const prepared = prepare(canvas);
  if (!prepared) return;
  const { ctx, width, height } = prepared;
  const bins = angleBins(metrics);
  const count = angleCount(metrics, bins);
  const mean = finite(metrics?.branching_angle_mean);
  const sd = finite(metrics?.branching_angle_sd);
  const box = plotBox(width, height, { left: 56, right: 16, top: 30, bottom: 44 });

  // Caption.
  ctx.fillStyle = INK;
  ctx.textAlign = 'left';
  ctx.textBaseline = 'middle';
  let caption = 'No branching angles yet';
  if (count > 0) {
    const parts = [];
    if (mean !== null) parts.push(`mean ${mean.toFixed(1)}\u00B0`);
    if (sd !== null) parts.push(`sd ${sd.toFixed(1)}\u00B0`);
    parts.push(`n = ${count}`);
    caption = parts.join(', ');
  }
  if (!box) {
    centredMessage(ctx, width, height, caption);
    return;
  }
  ctx.fillText(caption, box.left, 14);

  const maxBin = Math.max(...bins);
  const step = niceStep(maxBin, 4);
  const yMax = Math.max(step, Math.ceil(maxBin / step) * step);
  const toX = (deg) => box.left + (deg / 180) * (box.right - box.left);
  const toY = (value) => box.bottom - (value / yMax) * (box.bottom - box.top);

  // Count grid and ticks.
  ctx.textAlign = 'right';
  ctx.textBaseline = 'middle';
  for (let v = 0; v <= yMax; v += step) {
    const y = toY(v);
    ctx.strokeStyle = GRID;
    line(ctx, box.left, y, box.right, y);
    ctx.strokeStyle = INK;
    line(ctx, box.left - 5, y, box.left, y);
    ctx.fillStyle = INK;
    ctx.fillText(String(v), box.left - 8, y);
  }

  // Bars.
  ctx.fillStyle = BAR_FILL;
  ctx.strokeStyle = BAR_EDGE;
  bins.forEach((value, i) => {
    if (value <= 0) return;
    const x0 = toX(i * BIN_WIDTH_DEG);
    const x1 = toX((i + 1) * BIN_WIDTH_DEG);
    const y = toY(value);
    ctx.fillRect(x0, y, x1 - x0, box.bottom - y);
    ctx.strokeRect(x0, y, x1 - x0, box.bottom - y);
  });

  // Angle ticks every 30 degrees.
  drawXTicks(ctx, box, [0, 30, 60, 90, 120, 150, 180], toX);
  frame(ctx, box);

  // Dashed line at the mean.
  if (count > 0 && mean !== null) {
    const x = toX(Math.min(180, Math.max(0, mean)));
    ctx.save();
    ctx.strokeStyle = MEAN_COLOUR;
    ctx.lineWidth = 2;
    ctx.setLineDash([6, 4]);
    line(ctx, x, box.top, x, box.bottom);
    ctx.restore();
  }

  // Axis titles.
  ctx.fillStyle = INK;
  ctx.textAlign = 'center';
  ctx.textBaseline = 'bottom';
  ctx.fillText('branching angle (degrees)', (box.left + box.right) / 2, height - 4);
  verticalTitle(ctx, 'count', 4, (box.top + box.bottom) / 2);
}

// ---- text summary --------------------------------------------------------------------------

export function plotSummary(metrics, units) {
  const { counts, lengths } = hortonSeries(metrics);
  const orders = new Set([...counts, ...lengths].map((p) => p.x)).size;
  let horton = 'Horton plot: no streams yet.';
  if (orders > 0) {
    const rb = fixed(metrics?.bifurcation_ratio, 2) ?? 'not available';
    const rl = fixed(metrics?.length_ratio, 2) ?? 'not available';
    const unitText = typeof units === 'string' && units.trim() ? ` (lengths in ${units.trim()})` : '';
    horton = `Horton plot: ${orders} order${orders === 1 ? '' : 's'}${unitText}; R_B ${rb}; R_L ${rl}.`;
  }
  const bins = angleBins(metrics);
  const count = angleCount(metrics, bins);
  let angles = 'Angle histogram: no branching angles yet.';
  if (count > 0) {
    const mean = fixed(metrics?.branching_angle_mean, 1);
    const sd = fixed(metrics?.branching_angle_sd, 1);
    const parts = [`${count} angle${count === 1 ? '' : 's'}`];
    if (mean !== null) parts.push(`mean ${mean} degrees`);
    if (sd !== null) parts.push(`sd ${sd} degrees`);
    angles = `Angle histogram: ${parts.join(', ')}.`;
  }
  return `${horton} ${angles}`;
}

/** Tick marks and labels under the plot box at the given x values. */
function drawXTicks(ctx, box, values, toX) {
  ctx.textAlign = 'center';
  ctx.textBaseline = 'top';
  for (const value of values) {
    const x = toX(value);
    ctx.strokeStyle = INK;
    line(ctx, x, box.bottom, x, box.bottom + 5);
    ctx.fillStyle = INK;
    ctx.fillText(String(value), x, box.bottom + 8);
  }
}
