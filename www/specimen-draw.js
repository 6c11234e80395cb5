// Canvas views of the specimen panel: `SpecimenView` draws a measured specimen in its output
// units (outline, veins, roots, repair markers, the points picked for a scale bar) over a
// cleared-leaf image at the calibrated scale; `RunSnapshotView` draws a copy of the grown run's
// segments beside it. Both share one pixels-per-unit (`sharedFit`) so sizes compare by eye.
// Scale bar lengths and labels come from the core; colours of repair kinds come with the
// specimen from the core.

const BACKGROUND = '#fffdf8';
const INK = '#1d2a24';
const OUTLINE = '#8c7f63';
const MARGIN = 0.06;

/// A canvas showing a plane in physical units: zoom, pan, fit, scale bar, pointer mapping.
class PlaneView {
  constructor(canvas, core) {
    this.canvas = canvas;
    this.context = canvas.getContext('2d');
    this.core = core;
    this.scale = 1; // device pixels per unit
    this.offsetX = 0;
    this.offsetY = 0;
    this.units = 'mm';
  }

  ratio() {
    return window.devicePixelRatio || 1;
  }

  resize() {
    const ratio = this.ratio();
    const width = Math.max(1, Math.round(this.canvas.clientWidth * ratio));
    const height = Math.max(1, Math.round(this.canvas.clientHeight * ratio));
    if (this.canvas.width !== width || this.canvas.height !== height) {
      this.canvas.width = width;
      this.canvas.height = height;
    }
  }

  /// The bounds `[x0, y0, x1, y1]` shown, or null when the view is empty.
  bounds() {
    return null;
  }

  /// Device pixels per unit that fit `bounds` in this canvas.
  fitScale() {
    const bounds = this.bounds();
    if (!bounds) return Infinity;
    const [x0, y0, x1, y1] = bounds;
    const sx = (this.canvas.width * (1 - 2 * MARGIN)) / Math.max(x1 - x0, 1e-12);
    const sy = (this.canvas.height * (1 - 2 * MARGIN)) / Math.max(y1 - y0, 1e-12);
    return Math.min(sx, sy);
  }

  /// Centres the bounds at `scale` device pixels per unit.
  centreAt(scale) {
    const bounds = this.bounds();
    if (!bounds || !Number.isFinite(scale)) return;
    const [x0, y0, x1, y1] = bounds;
    this.scale = scale;
    this.offsetX = this.canvas.width / 2 - ((x0 + x1) / 2) * scale;
    this.offsetY = this.canvas.height / 2 - ((y0 + y1) / 2) * scale;
  }

  /// Plane coordinates of the middle of the canvas.
  centre() {
    return [(this.canvas.width / 2 - this.offsetX) / this.scale, (this.canvas.height / 2 - this.offsetY) / this.scale];
  }

  /// Centres `(x, y)` and zooms so that `span` units fill about a third of the canvas.
  showPoint(x, y, span) {
    const scale = Math.min(this.canvas.width, this.canvas.height) / 3 / Math.max(span, 1e-9);
    this.scale = Math.max(this.scale, scale);
    this.offsetX = this.canvas.width / 2 - x * this.scale;
    this.offsetY = this.canvas.height / 2 - y * this.scale;
  }

  zoom(factor, px = this.canvas.width / 2, py = this.canvas.height / 2) {
    const next = Math.min(Math.max(this.scale * factor, 1e-6), 1e9);
    const applied = next / this.scale;
    this.offsetX = px - (px - this.offsetX) * applied;
    this.offsetY = py - (py - this.offsetY) * applied;
    this.scale = next;
  }

  pan(dx, dy) {
    this.offsetX += dx;
    this.offsetY += dy;
  }

  /// Plane coordinates of a pointer event.
  toPlane(event) {
    const rect = this.canvas.getBoundingClientRect();
    const ratio = this.ratio();
    return [
      ((event.clientX - rect.left) * ratio - this.offsetX) / this.scale,
      ((event.clientY - rect.top) * ratio - this.offsetY) / this.scale,
    ];
  }

  clear() {
    const ctx = this.context;
    ctx.setTransform(1, 0, 0, 1, 0, 0);
    ctx.fillStyle = BACKGROUND;
    ctx.fillRect(0, 0, this.canvas.width, this.canvas.height);
  }

  /// The core's round scale bar about 100 CSS pixels long, bottom left.
  drawScaleBar() {
    const ctx = this.context;
    const ratio = this.ratio();
    const bar = JSON.parse(this.core.specimen_scale_bar_json(this.scale, 100 * ratio, this.units));
    const x = 12 * ratio;
    const y = this.canvas.height - 12 * ratio;
    ctx.font = `${11 * ratio}px system-ui, sans-serif`;
    const labelWidth = ctx.measureText(bar.label).width;
    ctx.fillStyle = 'rgba(255, 253, 248, 0.85)';
    ctx.fillRect(x - 5 * ratio, y - 18 * ratio, Math.max(bar.pixels, labelWidth) + 10 * ratio, 26 * ratio);
    ctx.strokeStyle = INK;
    ctx.lineWidth = 2 * ratio;
    ctx.beginPath();
    ctx.moveTo(x, y - 4 * ratio);
    ctx.lineTo(x, y);
    ctx.lineTo(x + bar.pixels, y);
    ctx.lineTo(x + bar.pixels, y - 4 * ratio);
    ctx.stroke();
    ctx.fillStyle = INK;
    ctx.fillText(bar.label, x, y - 7 * ratio);
  }

  /// Wheel zoom and drag pan; `click(point)` for a click that did not drag.
  wire(click) {
    const canvas = this.canvas;
    let drag = null;
    canvas.addEventListener('pointerdown', (event) => {
      drag = { x: event.clientX, y: event.clientY, moved: false };
      canvas.setPointerCapture(event.pointerId);
    });
    canvas.addEventListener('pointermove', (event) => {
      if (!drag) return;
      const dx = event.clientX - drag.x;
      const dy = event.clientY - drag.y;
      if (drag.moved || Math.hypot(dx, dy) > 3) {
        drag.moved = true;
        this.pan(dx * this.ratio(), dy * this.ratio());
        drag.x = event.clientX;
        drag.y = event.clientY;
        this.draw();
      }
    });
    canvas.addEventListener('pointerup', (event) => {
      const clicked = drag && !drag.moved;
      drag = null;
      if (clicked) click(this.toPlane(event));
    });
    canvas.addEventListener('wheel', (event) => {
      if (!this.bounds()) return;
      event.preventDefault();
      const rect = canvas.getBoundingClientRect();
      const ratio = this.ratio();
      this.zoom(Math.exp(-event.deltaY * 0.0015), (event.clientX - rect.left) * ratio, (event.clientY - rect.top) * ratio);
      this.draw();
    }, { passive: false });
  }
}

/// The specimen: image underneath, outline, veins, roots, repair markers, picked points.
export class SpecimenView extends PlaneView {
  constructor(canvas, core) {
    super(canvas, core);
    this.specimen = null;
    this.image = null; // {bitmap, x, y, width, height} in output units
    this.picked = []; // points picked for a scale bar, in output units
    this.highlighted = -1; // index into specimen.repairs
    this.picking = false; // waiting for a point to be picked
    this.hiddenKinds = new Set(); // repair kinds whose markers are not drawn
    this.focused = false; // the canvas has the keyboard
    this.message = 'Load a specimen: pick a file, drop one here, or open a demo.';
  }

  /// The specimen's bounds and the image's, together.
  bounds() {
    const boxes = [];
    if (this.specimen) boxes.push(this.specimen.bounds);
    if (this.image) boxes.push([this.image.x, this.image.y, this.image.x + this.image.width, this.image.y + this.image.height]);
    if (boxes.length === 0) return null;
    return [
      Math.min(...boxes.map((box) => box[0])),
      Math.min(...boxes.map((box) => box[1])),
      Math.max(...boxes.map((box) => box[2])),
      Math.max(...boxes.map((box) => box[3])),
    ];
  }

  draw() {
    this.resize();
    this.clear();
    const ctx = this.context;
    const s = this.scale;
    const ox = this.offsetX;
    const oy = this.offsetY;
    const ratio = this.ratio();
    if (!this.specimen && !this.image) {
      ctx.fillStyle = '#5b665f';
      ctx.font = `${13 * ratio}px system-ui, sans-serif`;
      ctx.textAlign = 'center';
      ctx.fillText(this.message, this.canvas.width / 2, this.canvas.height / 2);
      ctx.textAlign = 'start';
      return;
    }
    if (this.image) {
      const { bitmap, x, y, width, height } = this.image;
      ctx.globalAlpha = 0.75;
      ctx.imageSmoothingEnabled = s * (width / bitmap.width) < 4;
      ctx.drawImage(bitmap, x * s + ox, y * s + oy, width * s, height * s);
      ctx.globalAlpha = 1;
    }
    const specimen = this.specimen;
    if (specimen) {
      if (specimen.outline) {
        ctx.strokeStyle = OUTLINE;
        ctx.lineWidth = 1 * ratio;
        ctx.setLineDash([5 * ratio, 4 * ratio]);
        ctx.beginPath();
        specimen.outline.forEach(([x, y], index) => {
          if (index === 0) ctx.moveTo(x * s + ox, y * s + oy);
          else ctx.lineTo(x * s + ox, y * s + oy);
        });
        ctx.closePath();
        ctx.stroke();
        ctx.setLineDash([]);
      }
      const ends = specimen.ends;
      ctx.strokeStyle = INK;
      ctx.lineWidth = 1.4 * ratio;
      ctx.lineCap = 'round';
      ctx.beginPath();
      for (let i = 0; i + 3 < ends.length; i += 4) {
        ctx.moveTo(ends[i] * s + ox, ends[i + 1] * s + oy);
        ctx.lineTo(ends[i + 2] * s + ox, ends[i + 3] * s + oy);
      }
      ctx.stroke();
      for (const bar of specimen.scale_bars) {
        ctx.strokeStyle = OUTLINE;
        ctx.lineWidth = 2 * ratio;
        ctx.beginPath();
        ctx.moveTo(bar.from_output[0] * s + ox, bar.from_output[1] * s + oy);
        ctx.lineTo(bar.to_output[0] * s + ox, bar.to_output[1] * s + oy);
        ctx.stroke();
      }
      const colours = Object.fromEntries(specimen.kinds.map((kind) => [kind.kind, kind.colour]));
      // Smaller rings when there are many.
      const ring = specimen.repairs.length > 200 ? 3 : 5;
      specimen.repairs.forEach((repair, index) => {
        const big = index === this.highlighted;
        if (!big && this.hiddenKinds.has(repair.kind)) return;
        const [x, y] = repair.marker;
        ctx.strokeStyle = colours[repair.kind] ?? INK;
        ctx.lineWidth = (big ? 3 : 2) * ratio;
        ctx.beginPath();
        ctx.arc(x * s + ox, y * s + oy, (big ? 11 : ring) * ratio, 0, 2 * Math.PI);
        ctx.stroke();
        if (big) {
          ctx.beginPath();
          ctx.moveTo(x * s + ox - 18 * ratio, y * s + oy);
          ctx.lineTo(x * s + ox + 18 * ratio, y * s + oy);
          ctx.moveTo(x * s + ox, y * s + oy - 18 * ratio);
          ctx.lineTo(x * s + ox, y * s + oy + 18 * ratio);
          ctx.stroke();
        }
      });
      for (const root of specimen.roots) {
        ctx.fillStyle = '#ffffff';
        ctx.strokeStyle = '#222222';
        ctx.lineWidth = 1.5 * ratio;
        ctx.beginPath();
        ctx.arc(root.at[0] * s + ox, root.at[1] * s + oy, 4.5 * ratio, 0, 2 * Math.PI);
        ctx.fill();
        ctx.stroke();
      }
    }
    if (this.picking && this.focused) {
      // The keyboard's pointer: a cross in the middle of the drawing.
      const cx = this.canvas.width / 2;
      const cy = this.canvas.height / 2;
      ctx.strokeStyle = '#0072b2';
      ctx.lineWidth = 1.5 * ratio;
      ctx.beginPath();
      ctx.moveTo(cx - 14 * ratio, cy);
      ctx.lineTo(cx + 14 * ratio, cy);
      ctx.moveTo(cx, cy - 14 * ratio);
      ctx.lineTo(cx, cy + 14 * ratio);
      ctx.stroke();
    }
    for (const [x, y] of this.picked) {
      ctx.strokeStyle = '#d55e00';
      ctx.lineWidth = 2 * ratio;
      ctx.beginPath();
      ctx.moveTo(x * s + ox - 8 * ratio, y * s + oy - 8 * ratio);
      ctx.lineTo(x * s + ox + 8 * ratio, y * s + oy + 8 * ratio);
      ctx.moveTo(x * s + ox + 8 * ratio, y * s + oy - 8 * ratio);
      ctx.lineTo(x * s + ox - 8 * ratio, y * s + oy + 8 * ratio);
      ctx.stroke();
    }
    this.drawScaleBar();
  }
}

/// A copy of the grown run's segments, drawn in ink at widths to scale (at least a pixel).
export class RunSnapshotView extends PlaneView {
  constructor(canvas, core) {
    super(canvas, core);
    this.snapshot = null; // {ends, widths, count, width, height, units}
  }

  bounds() {
    return this.snapshot ? [0, 0, this.snapshot.width, this.snapshot.height] : null;
  }

  draw() {
    this.resize();
    this.clear();
    const ctx = this.context;
    const ratio = this.ratio();
    const snapshot = this.snapshot;
    if (!snapshot) {
      ctx.fillStyle = '#5b665f';
      ctx.font = `${13 * ratio}px system-ui, sans-serif`;
      ctx.textAlign = 'center';
      ctx.fillText('The grown run appears here when it has grown.', this.canvas.width / 2, this.canvas.height / 2);
      ctx.textAlign = 'start';
      return;
    }
    const s = this.scale;
    const ox = this.offsetX;
    const oy = this.offsetY;
    ctx.strokeStyle = '#d9d3c4';
    ctx.lineWidth = 1;
    ctx.setLineDash([4, 4]);
    ctx.strokeRect(ox, oy, snapshot.width * s, snapshot.height * s);
    ctx.setLineDash([]);
    ctx.strokeStyle = INK;
    ctx.lineCap = 'round';
    const { ends, widths, count } = snapshot;
    // Two passes: hairlines in one path, wider strokes one by one.
    ctx.lineWidth = ratio;
    ctx.beginPath();
    for (let i = 0; i < count; i += 1) {
      if (widths[i] * s > ratio) continue;
      ctx.moveTo(ends[4 * i] * s + ox, ends[4 * i + 1] * s + oy);
      ctx.lineTo(ends[4 * i + 2] * s + ox, ends[4 * i + 3] * s + oy);
    }
    ctx.stroke();
    for (let i = 0; i < count; i += 1) {
      if (widths[i] * s <= ratio) continue;
      ctx.lineWidth = widths[i] * s;
      ctx.beginPath();
      ctx.moveTo(ends[4 * i] * s + ox, ends[4 * i + 1] * s + oy);
      ctx.lineTo(ends[4 * i + 2] * s + ox, ends[4 * i + 3] * s + oy);
      ctx.stroke();
    }
    this.drawScaleBar();
  }
}

/// Fits both views at one pixels-per-unit (the smaller of their own fits) when they share a
/// unit, each its own otherwise.
export function sharedFit(views) {
  for (const view of views) view.resize();
  const shown = views.filter((view) => view.bounds());
  const sameUnits = shown.every((view) => view.units === shown[0]?.units);
  const common = Math.min(...shown.map((view) => view.fitScale()));
  for (const view of shown) view.centreAt(sameUnits ? common : view.fitScale());
  for (const view of views) view.draw();
}
