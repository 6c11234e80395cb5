// Canvas drawing of a network from typed-array views into wasm memory: widths to scale,
// colouring by order, flow or plain, zoom and pan, a scale bar, and finding the segment under
// the pointer. Lines at most RASTER_MAX_PX wide (the great majority of a network's segments)
// are rasterised by the core into a pixel buffer in wasm memory (see `source` below); wider
// ones are stroked by the canvas on top. Holds no simulation logic.

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

export class NetworkView {
  constructor(canvas, colours) {
    this.canvas = canvas;
    this.context = canvas.getContext('2d');
    this.colours = colours;
    this.frame = { width: 1, height: 1, units: 'mm' };
    this.scale = 1; // device pixels per length unit
    this.offsetX = 0; // device pixels
    this.offsetY = 0;
    this.fitted = true;
    this.geometry = null;
    this.colouring = 'order';
    // `{ raster(width, height, scale, offsetX, offsetY, colouring, minPx, maxPx, background)`
    // -> ImageData, `colours(colouring)` -> Uint8Array of palette indices }, set by the page.
    this.source = null;
    this.keys = new Uint16Array(0);
    this.sorted = new Uint32Array(0);
    this.lastDrawMs = 0;
    this.pixelRatio = 0; // 0: follow the screen's devicePixelRatio
    // Called when the geometry views were detached by wasm memory growth; returns new views.
    this.renewGeometry = null;
  }

  /// The geometry, with fresh views if wasm memory grew since they were taken.
  liveGeometry() {
    const g = this.geometry;
    if (g && g.count > 0 && g.widths.length === 0 && this.renewGeometry) {
      this.geometry = this.renewGeometry(g);
    }
    return this.geometry;
  }

  ratio() {
    return this.pixelRatio || window.devicePixelRatio || 1;
  }

  /// Sets the physical frame `{width, height, units, ...}` of the lattice.
  setFrame(frame) {
    this.frame = frame;
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

  /// Zooms so the whole lattice shows, centred.
  fit() {
    const margin = 0.04;
    const { width, height } = this.frame;
    const sx = (this.canvas.width * (1 - 2 * margin)) / Math.max(width, 1e-12);
    const sy = (this.canvas.height * (1 - 2 * margin)) / Math.max(height, 1e-12);
    this.scale = Math.min(sx, sy);
    this.offsetX = (this.canvas.width - width * this.scale) / 2;
    this.offsetY = (this.canvas.height - height * this.scale) / 2;
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

  /// Geometry is `{count, ends, widths, orders, flows, lengths, flowLow, flowHigh, maxOrder}`
  /// with typed arrays that view wasm memory; valid until the next wasm call that grows.
  setGeometry(geometry) {
    this.geometry = geometry;
  }

  /// Draws the whole picture; returns the time it took in milliseconds.
  draw() {
    const started = performance.now();
    const ctx = this.context;
    ctx.setTransform(1, 0, 0, 1, 0, 0);
    const geometry = this.liveGeometry();
    if (geometry && geometry.count > 0 && this.source) {
      this.drawSegments(ctx);
    } else {
      ctx.fillStyle = '#fffdf8';
      ctx.fillRect(0, 0, this.canvas.width, this.canvas.height);
    }
    this.drawFrame(ctx);
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

  drawSegments(ctx) {
    const w = this.canvas.width;
    const h = this.canvas.height;
    const s = this.scale;
    const ox = this.offsetX;
    const oy = this.offsetY;
    const image = this.source.raster(w, h, s, ox, oy, this.colouring, MIN_LINE_PX, RASTER_MAX_PX, BACKGROUND);
    ctx.putImageData(image, 0, 0);
    // The wasm calls may have grown wasm memory: take the geometry views afresh after them.
    const colourOf = this.source.colours(this.colouring);
    const g = this.liveGeometry();
    const n = g.count;
    const palette = this.palette();
    const keyCount = palette.length * BUCKET_COUNT;
    if (this.keys.length < n) {
      this.keys = new Uint16Array(n);
      this.sorted = new Uint32Array(n);
    }
    const counts = new Uint32Array(keyCount + 1);
    const { ends, widths } = g;
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

  /// A scale bar of 1, 2 or 5 times a power of ten, about 120 CSS pixels long, bottom left.
  drawScaleBar(ctx) {
    const ratio = this.ratio();
    const target = (120 * ratio) / this.scale;
    const power = 10 ** Math.floor(Math.log10(target));
    const length = [5, 2, 1].map((m) => m * power).find((value) => value <= target) ?? power;
    const px = length * this.scale;
    const x = 16 * ratio;
    const y = this.canvas.height - 18 * ratio;
    ctx.fillStyle = 'rgba(255, 253, 248, 0.85)';
    ctx.fillRect(x - 6 * ratio, y - 20 * ratio, px + 12 * ratio, 30 * ratio);
    ctx.strokeStyle = '#1d2a24';
    ctx.lineWidth = 2 * ratio;
    ctx.beginPath();
    ctx.moveTo(x, y - 5 * ratio);
    ctx.lineTo(x, y);
    ctx.lineTo(x + px, y);
    ctx.lineTo(x + px, y - 5 * ratio);
    ctx.stroke();
    ctx.fillStyle = '#1d2a24';
    ctx.font = `${12 * ratio}px system-ui, sans-serif`;
    ctx.fillText(`${fourDigits(length)} ${this.frame.units}`, x, y - 8 * ratio);
  }

  /// The segment nearest to CSS point (cx, cy) within `reach` CSS pixels, or -1.
  segmentAt(cx, cy, reach = 6) {
    const g = this.liveGeometry();
    if (!g || g.widths.length === 0) return -1;
    const ratio = this.ratio();
    const x = (cx * ratio - this.offsetX) / this.scale;
    const y = (cy * ratio - this.offsetY) / this.scale;
    const limit = (reach * ratio) / this.scale;
    let best = -1;
    let bestDistance = limit * limit;
    const { ends } = g;
    for (let i = 0; i < g.count; i += 1) {
      const x0 = ends[4 * i];
      const y0 = ends[4 * i + 1];
      const dx = ends[4 * i + 2] - x0;
      const dy = ends[4 * i + 3] - y0;
      const squared = dx * dx + dy * dy;
      if (squared === 0) continue;
      const t = Math.min(1, Math.max(0, ((x - x0) * dx + (y - y0) * dy) / squared));
      const ex = x0 + t * dx - x;
      const ey = y0 + t * dy - y;
      const distance = ex * ex + ey * ey;
      if (distance < bestDistance) {
        bestDistance = distance;
        best = i;
      }
    }
    return best;
  }
}

/// Up to four significant digits without trailing zeros (exponent form outside 1e-3 .. 1e5).
export function fourDigits(value) {
  if (value === 0) return '0';
  if (Math.abs(value) >= 1e5 || Math.abs(value) < 1e-3) return value.toExponential(2);
  return String(Number(value.toPrecision(4)));
}
