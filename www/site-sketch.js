// The site sketch: a canvas on which a designer draws a site's outline, the areas to keep clear,
// surface zones, outlets and spot levels, in site units (metres or feet, north up), and edits
// them by dragging corners. It holds shapes only; what they mean (cells, flows, sizes) is the
// core's. The sketch reads and writes the site file (a GeoJSON FeatureCollection with a role on
// every feature).

/// What a click adds, per tool: polygons close with a double-click, Enter or "Close shape".
export const TOOLS = {
  outline: { polygon: true, label: 'site outline' },
  obstacle: { polygon: true, label: 'area to keep clear' },
  zone: { polygon: true, label: 'surface zone' },
  outlet: { polygon: false, label: 'outlet' },
  level: { polygon: false, label: 'spot level' },
};

// Screen pixels within which a click picks a corner or a point.
const PICK_PX = 8;
// Share of the canvas kept round the site when the view is fitted.
const MARGIN = 0.08;

const ROLE_STYLE = {
  outline: { stroke: '#1b1b1b', fill: 'rgba(255,255,255,0.0)', width: 2 },
  obstacle: { stroke: '#5a5a5a', fill: 'rgba(90,90,90,0.35)', width: 1.5 },
  zone: { stroke: '#0b6e4f', fill: 'rgba(11,110,79,0.12)', width: 1 },
};

export class SiteSketch {
  /// `canvas`: the drawing; `changed(features)`: called after every edit.
  constructor(canvas, changed) {
    this.canvas = canvas;
    this.changed = changed;
    this.features = [];
    this.tool = 'outline';
    this.units = 'm';
    // Runoff coefficient of ground in no zone (the collection's `runoff_coefficient`).
    this.groundRunoff = NaN;
    this.snap = 1;
    this.draft = [];
    this.pointProperties = () => ({});
    this.zoneProperties = () => ({});
    this.obstacleProperties = () => ({});
    this.dragging = null;
    this.hover = null;
    this.view = { x0: 0, y0: 0, scale: 4 };
    this.extent = { width: 60, height: 40 };
    this.wire();
    this.fit();
  }

  // ---- the shapes ------------------------------------------------------------------------

  /// Replaces every shape (from a site file or the demo site) and frames it.
  load(features, units) {
    this.features = features.map((feature) => ({ ...feature, points: feature.points.map((p) => [...p]) }));
    this.units = units;
    this.draft = [];
    this.fit();
    this.emit();
  }

  /// Starts an empty site of the given size, with its outline as a rectangle.
  blank(width, height, units) {
    this.load([{ role: 'outline', name: 'site', points: [[0, 0], [width, 0], [width, height], [0, height]] }], units);
  }

  /// Removes the shape at `index`.
  remove(index) {
    this.features.splice(index, 1);
    this.emit();
  }

  /// Removes the last corner of the shape being drawn, or the last shape.
  undo() {
    if (this.draft.length > 0) this.draft.pop();
    else this.features.pop();
    this.emit();
  }

  /// Closes the polygon being drawn (three corners or more).
  closeDraft() {
    if (this.draft.length < 3) return false;
    const extra = this.tool === 'zone' ? this.zoneProperties()
      : this.tool === 'obstacle' ? this.obstacleProperties() : {};
    if (this.tool === 'outline') this.features = this.features.filter((f) => f.role !== 'outline');
    this.features.push({ role: this.tool, ...extra, points: this.draft });
    this.draft = [];
    this.emit();
    return true;
  }

  /// The site file: a GeoJSON FeatureCollection, the role and properties on every feature.
  geojson() {
    const features = this.features.map((feature) => {
      const { points, ...properties } = feature;
      const geometry = TOOLS[feature.role].polygon
        ? { type: 'Polygon', coordinates: [[...points, points[0]].map(([x, y]) => [round(x), round(y)])] }
        : { type: 'Point', coordinates: [round(points[0][0]), round(points[0][1])] };
      return { type: 'Feature', properties, geometry };
    });
    const properties = { units: this.units };
    if (Number.isFinite(this.groundRunoff)) properties.runoff_coefficient = this.groundRunoff;
    return { type: 'FeatureCollection', properties, features };
  }

  // ---- the view --------------------------------------------------------------------------

  /// Frames every shape (or the blank extent) in the canvas.
  fit() {
    const points = this.features.flatMap((f) => f.points);
    let x0 = 0; let y0 = 0; let x1 = this.extent.width; let y1 = this.extent.height;
    if (points.length > 0) {
      x0 = Math.min(...points.map((p) => p[0])); x1 = Math.max(...points.map((p) => p[0]));
      y0 = Math.min(...points.map((p) => p[1])); y1 = Math.max(...points.map((p) => p[1]));
    }
    const { width, height } = this.size();
    const spanX = Math.max(x1 - x0, 1e-9); const spanY = Math.max(y1 - y0, 1e-9);
    const scale = Math.min(width * (1 - 2 * MARGIN) / spanX, height * (1 - 2 * MARGIN) / spanY);
    this.view = {
      scale,
      x0: (x0 + x1) / 2 - width / 2 / scale,
      y0: (y0 + y1) / 2 + height / 2 / scale,
    };
    this.draw();
  }

  size() {
    const rect = this.canvas.getBoundingClientRect();
    return { width: Math.max(rect.width, 50), height: Math.max(rect.height, 50) };
  }

  toScreen([x, y]) {
    return [(x - this.view.x0) * this.view.scale, (this.view.y0 - y) * this.view.scale];
  }

  toSite(px, py) {
    return [this.view.x0 + px / this.view.scale, this.view.y0 - py / this.view.scale];
  }

  snapped([x, y]) {
    if (!(this.snap > 0)) return [x, y];
    return [Math.round(x / this.snap) * this.snap, Math.round(y / this.snap) * this.snap];
  }

  // ---- the mouse and keys ----------------------------------------------------------------

  wire() {
    const canvas = this.canvas;
    const at = (event) => {
      const rect = canvas.getBoundingClientRect();
      return [event.clientX - rect.left, event.clientY - rect.top];
    };
    canvas.addEventListener('pointerdown', (event) => {
      const [px, py] = at(event);
      const hit = this.pick(px, py);
      if (hit) {
        this.dragging = hit;
        canvas.setPointerCapture(event.pointerId);
        return;
      }
      this.dragging = null;
    });
    canvas.addEventListener('pointermove', (event) => {
      const [px, py] = at(event);
      this.hover = this.snapped(this.toSite(px, py));
      if (this.dragging) {
        this.dragging.point[0] = this.hover[0];
        this.dragging.point[1] = this.hover[1];
        this.dragging.moved = true;
      }
      this.draw();
    });
    canvas.addEventListener('pointerup', (event) => {
      const [px, py] = at(event);
      if (this.dragging) {
        const moved = this.dragging.moved;
        this.dragging = null;
        if (moved) {
          this.emit();
          return;
        }
      }
      this.click(this.snapped(this.toSite(px, py)));
    });
    canvas.addEventListener('dblclick', (event) => {
      event.preventDefault();
      // The double-click's two clicks added one corner twice; drop the repeat.
      const n = this.draft.length;
      if (n >= 2 && same(this.draft[n - 1], this.draft[n - 2])) this.draft.pop();
      this.closeDraft();
    });
    canvas.addEventListener('keydown', (event) => {
      if (event.key === 'Enter') { this.closeDraft(); event.preventDefault(); }
      if (event.key === 'Escape') { this.draft = []; this.draw(); }
      if (event.key === 'Backspace') { this.undo(); event.preventDefault(); }
    });
    canvas.addEventListener('pointerleave', () => { this.hover = null; this.draw(); });
    new ResizeObserver(() => this.fit()).observe(canvas);
  }

  /// The corner or point under the pointer, if any.
  pick(px, py) {
    for (const feature of this.features) {
      for (const point of feature.points) {
        const [sx, sy] = this.toScreen(point);
        if (Math.hypot(sx - px, sy - py) <= PICK_PX) return { feature, point, moved: false };
      }
    }
    return null;
  }

  click(point) {
    if (TOOLS[this.tool].polygon) {
      const n = this.draft.length;
      if (n > 0 && same(this.draft[n - 1], point)) return;
      this.draft.push(point);
      this.draw();
      return;
    }
    if (this.tool === 'outlet') {
      this.features.push({ role: 'outlet', ...this.pointProperties('outlet'), points: [point] });
    } else {
      this.features.push({ role: 'level', ...this.pointProperties('level'), points: [point] });
    }
    this.emit();
  }

  emit() {
    this.draw();
    this.changed(this.features);
  }

  // ---- drawing ---------------------------------------------------------------------------

  draw() {
    const canvas = this.canvas;
    const ratio = window.devicePixelRatio || 1;
    const { width, height } = this.size();
    if (canvas.width !== Math.round(width * ratio) || canvas.height !== Math.round(height * ratio)) {
      canvas.width = Math.round(width * ratio);
      canvas.height = Math.round(height * ratio);
    }
    const g = canvas.getContext('2d');
    g.setTransform(ratio, 0, 0, ratio, 0, 0);
    g.fillStyle = '#fffdf8';
    g.fillRect(0, 0, width, height);
    this.drawGrid(g, width, height);
    const order = ['zone', 'outline', 'obstacle', 'level', 'outlet'];
    for (const role of order) {
      for (const feature of this.features.filter((f) => f.role === role)) this.drawFeature(g, feature);
    }
    this.drawDraft(g);
    this.drawScale(g, width, height);
    this.drawNorth(g, width);
  }

  drawGrid(g, width, height) {
    // A line every tenth of the view, rounded to 1, 2 or 5 times a power of ten.
    const step = niceStep(width / this.view.scale / 10);
    g.strokeStyle = '#ece6d8';
    g.lineWidth = 1;
    const [x0] = this.toSite(0, 0);
    const [x1] = this.toSite(width, 0);
    const [, y1] = this.toSite(0, 0);
    const [, y0] = this.toSite(0, height);
    g.beginPath();
    for (let x = Math.ceil(x0 / step) * step; x <= x1; x += step) {
      const [sx] = this.toScreen([x, 0]);
      g.moveTo(sx, 0); g.lineTo(sx, height);
    }
    for (let y = Math.ceil(y0 / step) * step; y <= y1; y += step) {
      const [, sy] = this.toScreen([0, y]);
      g.moveTo(0, sy); g.lineTo(width, sy);
    }
    g.stroke();
  }

  drawFeature(g, feature) {
    g.font = '12px system-ui, sans-serif';
    if (TOOLS[feature.role].polygon) {
      const style = ROLE_STYLE[feature.role];
      g.beginPath();
      feature.points.forEach((point, i) => {
        const [sx, sy] = this.toScreen(point);
        if (i === 0) g.moveTo(sx, sy); else g.lineTo(sx, sy);
      });
      g.closePath();
      g.fillStyle = style.fill;
      g.fill();
      g.strokeStyle = style.stroke;
      g.lineWidth = style.width;
      g.stroke();
      for (const point of feature.points) {
        const [sx, sy] = this.toScreen(point);
        g.fillStyle = style.stroke;
        g.fillRect(sx - 2.5, sy - 2.5, 5, 5);
      }
      const label = featureLabel(feature);
      if (label) {
        const [cx, cy] = this.toScreen(centroid(feature.points));
        g.fillStyle = '#1b1b1b';
        g.textAlign = 'center';
        g.fillText(label, cx, cy);
        g.textAlign = 'start';
      }
      return;
    }
    const [sx, sy] = this.toScreen(feature.points[0]);
    if (feature.role === 'outlet') {
      g.fillStyle = '#0a4d8c';
      g.beginPath(); g.arc(sx, sy, 7, 0, 2 * Math.PI); g.fill();
      g.strokeStyle = '#ffffff'; g.lineWidth = 2;
      g.beginPath(); g.arc(sx, sy, 4, 0, 2 * Math.PI); g.stroke();
      g.fillStyle = '#0a4d8c';
      g.fillText(feature.name || 'outlet', sx + 10, sy - 8);
    } else {
      g.strokeStyle = '#7a3e00'; g.lineWidth = 1.5;
      g.beginPath(); g.moveTo(sx - 5, sy - 5); g.lineTo(sx + 5, sy + 5); g.moveTo(sx - 5, sy + 5); g.lineTo(sx + 5, sy - 5); g.stroke();
      g.fillStyle = '#7a3e00';
      g.fillText(`${formatLevel(feature.elevation)} ${this.units}`, sx + 7, sy - 6);
    }
  }

  drawDraft(g) {
    if (this.draft.length === 0) return;
    const style = ROLE_STYLE[this.tool] ?? ROLE_STYLE.outline;
    g.strokeStyle = style.stroke;
    g.setLineDash([5, 4]);
    g.lineWidth = 1.5;
    g.beginPath();
    this.draft.forEach((point, i) => {
      const [sx, sy] = this.toScreen(point);
      if (i === 0) g.moveTo(sx, sy); else g.lineTo(sx, sy);
    });
    if (this.hover) {
      const [hx, hy] = this.toScreen(this.hover);
      g.lineTo(hx, hy);
    }
    g.stroke();
    g.setLineDash([]);
    for (const point of this.draft) {
      const [sx, sy] = this.toScreen(point);
      g.fillStyle = style.stroke;
      g.fillRect(sx - 3, sy - 3, 6, 6);
    }
  }

  drawScale(g, width, height) {
    const length = niceStep(width / this.view.scale / 5);
    const px = length * this.view.scale;
    const x = 12; const y = height - 14;
    g.strokeStyle = '#1b1b1b'; g.lineWidth = 2;
    g.beginPath(); g.moveTo(x, y); g.lineTo(x + px, y); g.moveTo(x, y - 4); g.lineTo(x, y + 4); g.moveTo(x + px, y - 4); g.lineTo(x + px, y + 4); g.stroke();
    g.fillStyle = '#1b1b1b';
    g.font = '12px system-ui, sans-serif';
    g.fillText(`${length} ${this.units}`, x + px + 6, y + 4);
  }

  drawNorth(g, width) {
    const x = width - 22; const y = 16;
    g.fillStyle = '#1b1b1b';
    g.beginPath(); g.moveTo(x, y); g.lineTo(x - 6, y + 16); g.lineTo(x, y + 12); g.lineTo(x + 6, y + 16); g.closePath(); g.fill();
    g.font = '11px system-ui, sans-serif';
    g.textAlign = 'center';
    g.fillText('N', x, y + 28);
    g.textAlign = 'start';
  }
}

/// Reads a site file's features into the sketch's shapes (outer rings only; the core checks
/// the file itself and names what is wrong).
export function shapesFromGeojson(collection) {
  const units = collection?.properties?.units === 'ft' ? 'ft' : 'm';
  const groundRunoff = Number(collection?.properties?.runoff_coefficient ?? NaN);
  const shapes = [];
  for (const feature of collection?.features ?? []) {
    const role = feature?.properties?.role;
    const geometry = feature?.geometry;
    if (!TOOLS[role] || !geometry) continue;
    const { role: _role, ...properties } = feature.properties;
    if (geometry.type === 'Polygon' && Array.isArray(geometry.coordinates?.[0])) {
      const ring = geometry.coordinates[0].map(([x, y]) => [Number(x), Number(y)]);
      if (ring.length > 1 && same(ring[0], ring[ring.length - 1])) ring.pop();
      shapes.push({ role, ...properties, points: ring });
    } else if (geometry.type === 'Point' && Array.isArray(geometry.coordinates)) {
      shapes.push({ role, ...properties, points: [[Number(geometry.coordinates[0]), Number(geometry.coordinates[1])]] });
    }
  }
  return { units, shapes, groundRunoff };
}

function featureLabel(feature) {
  if (feature.role === 'zone') {
    const c = Number(feature.runoff_coefficient);
    return `${feature.surface || 'zone'} (C ${Number.isFinite(c) ? c.toFixed(2) : '?'})`;
  }
  if (feature.role === 'obstacle') return feature.name || 'kept clear';
  return '';
}

function centroid(points) {
  const n = points.length;
  return [points.reduce((s, p) => s + p[0], 0) / n, points.reduce((s, p) => s + p[1], 0) / n];
}

function niceStep(raw) {
  if (!(raw > 0)) return 1;
  const power = 10 ** Math.floor(Math.log10(raw));
  const unit = raw / power;
  return (unit < 1.5 ? 1 : unit < 3.5 ? 2 : unit < 7.5 ? 5 : 10) * power;
}

function formatLevel(value) {
  const number = Number(value);
  return Number.isFinite(number) ? number.toFixed(2) : '?';
}

function same(a, b) {
  return a[0] === b[0] && a[1] === b[1];
}

function round(value) {
  return Math.round(value * 1000) / 1000;
}
