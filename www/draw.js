// Canvas drawing of a network through the wasm session (session.js): widths to scale, colouring
// by order, flow or plain, tissue (below the conducting threshold) faint, hidden or like the
// veins (the core draws it: tissue has no width, so it is never a wide stroke), zoom and pan, the scale bar and finding the segment under the
// pointer. Lines at most RASTER_MAX_PX wide (the great majority of a network's segments) are
// painted by the core with putImageData; wider ones are stroked by the canvas on top. The
// scale bar's length and label and the segment search come from the core too. While a run is
// animated, `drawPart` spreads one picture over several frames (the core draws the thin lines
// a slice at a time into its pixel buffer, off screen, and the canvas gets the finished picture,
// the same pixels as `draw`).
// scale bar's length and label and the segment search come from the core too. Fit frames the
// network's extent (the core's marks) with a margin; every root gets a ring.

// Draw every line at least this wide in device pixels, so that true-scale veinlets thinner
// than a pixel stay visible (common practice, no source).
const MIN_LINE_PX = 0.75;
// Width buckets per doubling of line width: one stroke call per (colour, bucket).
const BUCKETS_PER_DOUBLING = 3;
const BUCKET_OFFSET = 8;
const BUCKET_COUNT = 48;
// Lines up to this width in device pixels are rasterised by the core; wider ones are stroked.
const RASTER_MAX_PX = 1.6;
const BACKGROUND = 0xfffdf8;
// The fewest thin lines drawn in one slice of a picture drawn a part at a time.
const MIN_SLICE_LINES = 512;
// Free canvas on each side of a fitted view, as a fraction of its width or height (room for
// the root markers, the zoom buttons and the scale bar; common practice, no source).
const FIT_MARGIN = 0.06;
// Height in CSS pixels kept free for the scale bar under a fitted view (it is drawn 18 px
// above the bottom, its label 20 px higher).
const SCALE_BAR_BAND_PX = 40;
// Root marker radius in CSS pixels (its colours are the core's, as in the SVG export).
const ROOT_RADIUS_PX = 5;

export class NetworkView {
  /// `session`: the wasm session (its run and geometry); `colours`: the core's colour scheme.
  constructor(canvas, session, colours) {
    this.canvas = canvas;
    this.context = canvas.getContext('2d');
    this.session = session;
    this.colours = colours;
    this.frame = { width: 1, height: 1, units: 'mm' };
    this.scale = 1; // device pixels per length unit
    this.offsetX = 0; // device pixels
    this.offsetY = 0;
    this.fitted = true;
    // What Fit frames: [x0, y0, x1, y1] of the network (the core's marks), or null for the
    // whole lattice; and where the roots are marked.
    this.fitBounds = null;
    this.roots = [];
    this.colouring = 'order';
    // How segments below the conducting threshold are drawn: 'faint', 'hidden' or 'veins'.
    this.tissue = 'faint';
    this.keys = new Uint16Array(0);
    this.sorted = new Uint32Array(0);
    this.lastDrawMs = 0;
    this.pixelRatio = 0; // 0: follow the screen's devicePixelRatio
    // A picture drawn a part at a time (drawPart): null, or {linesDone, ms} while one is.
    this.painting = null;
    this.msPerLine = 1e-4; // thin-line raster, measured
    this.finishMs = 0; // putting the picture on the canvas and stroking the wide lines, measured
    // Drawings laid over the network by other panels (the site panel's parts no outlet
    // reaches and natural flow): name -> function(ctx, {scale, offsetX, offsetY, ratio}).
    this.overlays = new Map();
  }

  /// Draws every overlay, in the order they were set, over the network.
  drawOverlays(ctx) {
    if (this.overlays.size === 0) return;
    const place = { scale: this.scale, offsetX: this.offsetX, offsetY: this.offsetY, ratio: this.ratio() };
    for (const overlay of this.overlays.values()) {
      ctx.save();
      overlay(ctx, place);
      ctx.restore();
    }
  }

  ratio() {
    return this.pixelRatio || window.devicePixelRatio || 1;
  }

  /// Sets the physical frame `{width, height, units, ...}` of the lattice.
  setFrame(frame) {
    this.frame = frame;
    this.fitBounds = null;
    this.roots = [];
    if (this.fitted) this.fit();
  }

  /// Keeps the canvas backing store at its CSS size times the device pixel ratio.
  resize() {
    const ratio = this.ratio();
    const width = Math.max(1, Math.round(this.canvas.clientWidth * ratio));
    const height = Math.max(1, Math.round(this.canvas.clientHeight * ratio));
    if (this.canvas.width !== width || this.canvas.height !== height) {
      this.canvas.width = width;
      this.canvas.height = height;
      if (this.fitted) this.fit();
    }
  }

  /// Fits the view to `bounds` ([x0, y0, x1, y1] of the network, or null for the lattice)
  /// from now on, until the next run.
  fitTo(bounds) {
    this.fitBounds = bounds;
    this.fit();
  }

  /// Zooms so the network (or, before it has grown, the whole lattice) shows, centred, with
  /// FIT_MARGIN of the canvas free on each side.
  fit() {
    const margin = FIT_MARGIN;
    const [x0, y0, x1, y1] = this.fitBounds ?? [0, 0, this.frame.width, this.frame.height];
    const width = x1 - x0;
    const height = y1 - y0;
    // The scale bar keeps a band of its own at the bottom.
    const band = Math.min(SCALE_BAR_BAND_PX * this.ratio(), this.canvas.height / 4);
    const tall = this.canvas.height - band;
    const sx = (this.canvas.width * (1 - 2 * margin)) / Math.max(width, 1e-12);
    const sy = (tall * (1 - 2 * margin)) / Math.max(height, 1e-12);
    this.scale = Math.min(sx, sy);
    this.offsetX = (this.canvas.width - width * this.scale) / 2 - x0 * this.scale;
    this.offsetY = (tall - height * this.scale) / 2 - y0 * this.scale;
    this.fitted = true;
  }

  /// Zooms by `factor` about the device-pixel point (px, py).
  zoom(factor, px = this.canvas.width / 2, py = this.canvas.height / 2) {
    const next = Math.min(Math.max(this.scale * factor, 1e-6), 1e9);
    const applied = next / this.scale;
    this.offsetX = px - (px - this.offsetX) * applied;
    this.offsetY = py - (py - this.offsetY) * applied;
    this.scale = next;
    this.fitted = false;
  }

  pan(dx, dy) {
    this.offsetX += dx;
    this.offsetY += dy;
    this.fitted = false;
  }

  /// Draws the whole picture; returns the time it took in milliseconds.
  draw() {
    const started = performance.now();
    this.painting = null;
    const ctx = this.context;
    ctx.setTransform(1, 0, 0, 1, 0, 0);
    if (this.session.simulation && this.session.count > 0) {
      this.drawSegments(ctx);
    } else {
      ctx.fillStyle = '#fffdf8';
      ctx.fillRect(0, 0, this.canvas.width, this.canvas.height);
    }
    this.drawOverlays(ctx);
    this.drawFrame(ctx);
    this.drawRoots(ctx);
    this.drawScaleBar(ctx);
    this.lastDrawMs = performance.now() - started;
    return this.lastDrawMs;
  }

  drawFrame(ctx) {
    ctx.strokeStyle = '#d9d3c4';
    ctx.lineWidth = 1;
    ctx.setLineDash([4, 4]);
    ctx.strokeRect(
      this.offsetX,
      this.offsetY,
      this.frame.width * this.scale,
      this.frame.height * this.scale,
    );
    ctx.setLineDash([]);
  }

  palette() {
    if (this.colouring === 'order') return this.colours.order;
    if (this.colouring === 'flow') return this.colours.flow;
    return [this.colours.plain];
  }

  /// Draws the picture of the geometry as last refilled a part at a time: each call works
  /// about `budgetMs` (thin lines in slices sized from their measured cost; the canvas is
  /// touched only by the last call, which puts the finished picture on it, strokes the wide
  /// lines and draws the frame, root rings and scale bar, as `draw` does). Returns true once the picture
  /// is on the canvas. A refill (`dropPart`) or a whole `draw` in between starts it over.
  drawPart(budgetMs) {
    const started = performance.now();
    const session = this.session;
    if (!session.simulation || session.count === 0) {
      this.draw();
      return true;
    }
    // Where this part's time goes, for the page benchmark's slowest frames.
    this.lastPart = { beginMs: 0, linesMs: 0, finishMs: 0 };
    if (!this.painting) {
      this.resize();
      const beginStart = performance.now();
      session.startThinLines(this.canvas.width, this.canvas.height, this.scale, this.offsetX,
        this.offsetY, this.colouring, this.tissue, MIN_LINE_PX, RASTER_MAX_PX, BACKGROUND);
      this.painting = { linesDone: false, left: session.count };
      this.lastPart.beginMs = performance.now() - beginStart;
    }
    // At least one slice a call, so that every call makes progress.
    let sliced = false;
    while (!this.painting.linesDone) {
      const left = budgetMs - (performance.now() - started);
      if (sliced && left <= 0.5) return false;
      sliced = true;
      // Half the lines the measured cost allows: line costs vary across the picture, and a
      // slice that overruns makes a long frame.
      const count = Math.max(MIN_SLICE_LINES, Math.floor((0.5 * left) / this.msPerLine));
      const sliceStart = performance.now();
      const remaining = session.drawThinLines(count);
      this.lastPart.linesMs += performance.now() - sliceStart;
      if (remaining < 0) {
        // The core dropped the painting (a refill): start it over next time.
        this.painting = null;
        return false;
      }
      const drawn = this.painting.left - remaining;
      this.painting.left = remaining;
      if (drawn > 0) {
        const perLine = (performance.now() - sliceStart) / drawn;
        this.msPerLine = 0.7 * this.msPerLine + 0.3 * Math.max(perLine, 1e-6);
      }
      if (remaining === 0) this.painting.linesDone = true;
    }
    // Finishing goes to the next frame unless it fits in what is left of this one's budget.
    if (performance.now() - started + this.finishMs > budgetMs && performance.now() - started > 0.5) {
      return false;
    }
    const finishStart = performance.now();
    const ctx = this.context;
    ctx.setTransform(1, 0, 0, 1, 0, 0);
    session.putThinLines(ctx);
    this.strokeWideLines(ctx);
    this.drawOverlays(ctx);
    this.drawFrame(ctx);
    this.drawRoots(ctx);
    this.drawScaleBar(ctx);
    this.painting = null;
    this.finishMs = performance.now() - finishStart;
    this.lastPart.finishMs = this.finishMs;
    return true;
  }

  /// Forgets a picture being drawn a part at a time (the geometry has changed).
  dropPart() {
    this.painting = null;
  }

  drawSegments(ctx) {
    const w = this.canvas.width;
    const h = this.canvas.height;
    const s = this.scale;
    const ox = this.offsetX;
    const oy = this.offsetY;
    this.session.paintThinLines(ctx, w, h, s, ox, oy, this.colouring, this.tissue, MIN_LINE_PX, RASTER_MAX_PX, BACKGROUND);
    this.strokeWideLines(ctx);
  }

  /// Strokes the lines wider than RASTER_MAX_PX over the painted thin ones.
  strokeWideLines(ctx) {
    const w = this.canvas.width;
    const h = this.canvas.height;
    const s = this.scale;
    const ox = this.offsetX;
    const oy = this.offsetY;
    // Fresh views after the painting (which may have grown wasm memory), used before any
    // other wasm call.
    const { colours: colourOf, ends, widths } = this.session.drawingViews(this.colouring);
    const n = this.session.count;
    const palette = this.palette();
    const keyCount = palette.length * BUCKET_COUNT;
    if (this.keys.length < n) {
      this.keys = new Uint16Array(n);
      this.sorted = new Uint32Array(n);
    }
    const counts = new Uint32Array(keyCount + 1);
    const NONE = 0xffff;
    // Wide lines get a key = bucket * colours + colour, so thinner strokes come first and
    // trunks lie on top.
    for (let i = 0; i < n; i += 1) {
      this.keys[i] = NONE;
      const px = widths[i] * s;
      if (px <= RASTER_MAX_PX) continue;
      const x0 = ends[4 * i] * s + ox;
      const y0 = ends[4 * i + 1] * s + oy;
      const x1 = ends[4 * i + 2] * s + ox;
      const y1 = ends[4 * i + 3] * s + oy;
      const off = (x0 < -px && x1 < -px) || (y0 < -px && y1 < -px)
        || (x0 > w + px && x1 > w + px) || (y0 > h + px && y1 > h + px);
      if (off || (x0 === x1 && y0 === y1)) continue;
      let bucket = Math.round(Math.log2(px) * BUCKETS_PER_DOUBLING) + BUCKET_OFFSET;
      bucket = Math.min(BUCKET_COUNT - 1, Math.max(0, bucket));
      const key = bucket * palette.length + colourOf[i];
      this.keys[i] = key;
      counts[key + 1] += 1;
    }
    for (let k = 1; k <= keyCount; k += 1) counts[k] += counts[k - 1];
    const starts = counts.slice(0, keyCount);
    for (let i = 0; i < n; i += 1) {
      const key = this.keys[i];
      if (key !== NONE) this.sorted[starts[key]++] = i;
    }
    ctx.lineCap = 'round';
    ctx.lineJoin = 'round';
    for (let key = 0; key < keyCount; key += 1) {
      const from = counts[key];
      const to = counts[key + 1];
      if (from === to) continue;
      const bucket = Math.floor(key / palette.length);
      ctx.strokeStyle = palette[key % palette.length];
      ctx.lineWidth = 2 ** ((bucket - BUCKET_OFFSET) / BUCKETS_PER_DOUBLING);
      ctx.beginPath();
      for (let j = from; j < to; j += 1) {
        const i = this.sorted[j];
        ctx.moveTo(ends[4 * i] * s + ox, ends[4 * i + 1] * s + oy);
        ctx.lineTo(ends[4 * i + 2] * s + ox, ends[4 * i + 3] * s + oy);
      }
      ctx.stroke();
    }
  }

  /// A ring on every root (petiole or outlet), the marker of the colour key.
  drawRoots(ctx) {
    if (!this.session.simulation || this.roots.length === 0) return;
    const ratio = this.ratio();
    ctx.lineWidth = 2 * ratio;
    ctx.strokeStyle = this.colours.root_ring;
    ctx.fillStyle = this.colours.root_fill;
    for (const [x, y] of this.roots) {
      ctx.beginPath();
      ctx.arc(x * this.scale + this.offsetX, y * this.scale + this.offsetY, ROOT_RADIUS_PX * ratio, 0, 2 * Math.PI);
      ctx.fill();
      ctx.stroke();
    }
  }

  /// The core's scale bar (a round length about 120 CSS pixels long), bottom left.
  drawScaleBar(ctx) {
    if (!this.session.simulation) return;
    const ratio = this.ratio();
    const bar = this.session.scaleBar(this.scale, 120 * ratio);
    const px = bar.pixels;
    const x = 16 * ratio;
    const y = this.canvas.height - 18 * ratio;
    ctx.font = `${12 * ratio}px system-ui, sans-serif`;
    const labelWidth = ctx.measureText(bar.label).width;
    ctx.fillStyle = 'rgba(255, 253, 248, 0.85)';
    ctx.fillRect(x - 6 * ratio, y - 20 * ratio, Math.max(px, labelWidth) + 12 * ratio, 30 * ratio);
    ctx.strokeStyle = '#1d2a24';
    ctx.lineWidth = 2 * ratio;
    ctx.beginPath();
    ctx.moveTo(x, y - 5 * ratio);
    ctx.lineTo(x, y);
    ctx.lineTo(x + px, y);
    ctx.lineTo(x + px, y - 5 * ratio);
    ctx.stroke();
    ctx.fillStyle = '#1d2a24';
    ctx.fillText(bar.label, x, y - 8 * ratio);
  }

  /// The segment nearest to CSS point (cx, cy) within `reach` CSS pixels, or -1.
  segmentAt(cx, cy, reach = 6) {
    const ratio = this.ratio();
    const x = (cx * ratio - this.offsetX) / this.scale;
    const y = (cy * ratio - this.offsetY) / this.scale;
    return this.session.segmentAt(x, y, (reach * ratio) / this.scale, this.tissue);
  }
}
