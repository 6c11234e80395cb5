// Canvas drawing of the readings plots the core lays out (ramulus_draw::plots): the order-ratio
// (Horton) plot and the branching-angle histogram. Every point, fitted line, tick, label and
// caption comes from Rust; this module only maps plot coordinates to pixels and draws.

const FONT = '12px system-ui, sans-serif';
const INK = '#000000';
const GRID = '#dddddd';
const COUNT_COLOUR = '#0072B2'; // blue
const LENGTH_COLOUR = '#D55E00'; // vermillion
const BAR_FILL = '#56B4E9'; // sky blue
const BAR_EDGE = '#0072B2'; // blue
const MEAN_COLOUR = '#D55E00'; // vermillion

// ---- small helpers -------------------------------------------------------------------------

// Sizes the backing store to CSS size x devicePixelRatio, scales the context to CSS pixels and
// clears everything. Returns null when the canvas gives no 2D context.
function prepare(canvas) {
  const ctx = canvas && typeof canvas.getContext === 'function' ? canvas.getContext('2d') : null;
  if (!ctx) return null;
  const width = canvas.clientWidth || canvas.width || 300;
  const height = canvas.clientHeight || canvas.height || 150;
  const ratio = Number.isFinite(globalThis.devicePixelRatio) ? globalThis.devicePixelRatio : 1;
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

/// Maps plot coordinates in `[xLow, xHigh] x [yLow, yHigh]` onto the box.
function mapping(box, [xLow, xHigh], [yLow, yHigh]) {
  return {
    toX: (x) => box.left + ((x - xLow) / (xHigh - xLow)) * (box.right - box.left),
    toY: (y) => box.bottom - ((y - yLow) / (yHigh - yLow)) * (box.bottom - box.top),
  };
}

/// Ticks on the left edge: major ones get a grid line, a longer mark and their label.
function drawYTicks(ctx, box, ticks, toY) {
  ctx.textAlign = 'right';
  ctx.textBaseline = 'middle';
  for (const tick of ticks) {
    const y = toY(tick.at);
    if (tick.major) {
      ctx.strokeStyle = GRID;
      line(ctx, box.left, y, box.right, y);
      ctx.strokeStyle = INK;
      line(ctx, box.left - 5, y, box.left, y);
      ctx.fillStyle = INK;
      ctx.fillText(tick.label, box.left - 8, y);
    } else {
      ctx.strokeStyle = INK;
      line(ctx, box.left - 3, y, box.left, y);
    }
  }
}

/// Tick marks and labels under the plot box.
function drawXTicks(ctx, box, ticks, toX) {
  ctx.textAlign = 'center';
  ctx.textBaseline = 'top';
  for (const tick of ticks) {
    const x = toX(tick.at);
    ctx.strokeStyle = INK;
    line(ctx, x, box.bottom, x, box.bottom + 5);
    ctx.fillStyle = INK;
    ctx.fillText(tick.label, x, box.bottom + 8);
  }
}

function axisTitles(ctx, box, height, xTitle, yTitle) {
  ctx.fillStyle = INK;
  ctx.textAlign = 'center';
  ctx.textBaseline = 'bottom';
  ctx.fillText(xTitle, (box.left + box.right) / 2, height - 4);
  verticalTitle(ctx, yTitle, 4, (box.top + box.bottom) / 2);
}

// ---- Horton plot ---------------------------------------------------------------------------

function drawFit(ctx, fit, toX, toY, colour, box) {
  if (!fit) return;
  const [[x0, y0], [x1, y1]] = fit;
  ctx.save();
  ctx.beginPath();
  ctx.rect(box.left, box.top, box.right - box.left, box.bottom - box.top);
  ctx.clip();
  ctx.strokeStyle = colour;
  ctx.lineWidth = 1.5;
  line(ctx, toX(x0), toY(y0), toX(x1), toY(y1));
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

/// Draws the core's Horton plot description (`ramulus_draw::plots::HortonPlot`).
export function drawHortonPlot(canvas, plot) {
  const prepared = prepare(canvas);
  if (!prepared) return;
  const { ctx, width, height } = prepared;
  if (plot.empty) {
    centredMessage(ctx, width, height, plot.empty);
    return;
  }
  const box = plotBox(width, height, { left: 64, right: 16, top: 48, bottom: 44 });
  if (!box) return;
  const { toX, toY } = mapping(box, plot.x_range, plot.y_range);
  drawYTicks(ctx, box, plot.y_ticks, toY);
  drawXTicks(ctx, box, plot.x_ticks, toX);
  frame(ctx, box);
  drawFit(ctx, plot.counts.fit, toX, toY, COUNT_COLOUR, box);
  drawFit(ctx, plot.lengths.fit, toX, toY, LENGTH_COLOUR, box);
  for (const [x, y] of plot.counts.points) filledCircle(ctx, toX(x), toY(y), COUNT_COLOUR);
  for (const [x, y] of plot.lengths.points) openSquare(ctx, toX(x), toY(y), LENGTH_COLOUR);
  // Legend above the plot area, so it never hides points.
  legendRow(ctx, box.left, 14, COUNT_COLOUR, filledCircle, plot.counts.label);
  legendRow(ctx, box.left, 32, LENGTH_COLOUR, openSquare, plot.lengths.label);
  axisTitles(ctx, box, height, plot.x_title, plot.y_title);
}

// ---- branching-angle histogram -------------------------------------------------------------

/// Draws the core's angle histogram description (`ramulus_draw::plots::AnglePlot`).
export function drawAngleHistogram(canvas, plot) {
  const prepared = prepare(canvas);
  if (!prepared) return;
  const { ctx, width, height } = prepared;
  const box = plotBox(width, height, { left: 56, right: 16, top: 30, bottom: 44 });
  if (!box) {
    centredMessage(ctx, width, height, plot.caption);
    return;
  }
  ctx.fillStyle = INK;
  ctx.textAlign = 'left';
  ctx.textBaseline = 'middle';
  ctx.fillText(plot.caption, box.left, 14);
  const span = plot.bins.length * plot.bin_width;
  const { toX, toY } = mapping(box, [0, span], [0, plot.y_max]);
  drawYTicks(ctx, box, plot.y_ticks, toY);
  ctx.fillStyle = BAR_FILL;
  ctx.strokeStyle = BAR_EDGE;
  plot.bins.forEach((value, i) => {
    if (value <= 0) return;
    const x0 = toX(i * plot.bin_width);
    const x1 = toX((i + 1) * plot.bin_width);
    const y = toY(value);
    ctx.fillRect(x0, y, x1 - x0, box.bottom - y);
    ctx.strokeRect(x0, y, x1 - x0, box.bottom - y);
  });
  drawXTicks(ctx, box, plot.x_ticks, toX);
  frame(ctx, box);
  if (plot.mean !== null) {
    const x = toX(plot.mean);
    ctx.save();
    ctx.strokeStyle = MEAN_COLOUR;
    ctx.lineWidth = 2;
    ctx.setLineDash([6, 4]);
    line(ctx, x, box.top, x, box.bottom);
    ctx.restore();
  }
  axisTitles(ctx, box, height, plot.x_title, plot.y_title);
}
