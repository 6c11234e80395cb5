// Exports (SVG from the core, PNG from the canvas drawing, run record, metrics CSV), opening a
// run record, and keeping the last opened record in local storage across reloads.
import { NetworkView } from './draw.js';

const STORE_KEY = 'ramulus.kept-record.v1';
const PNG_LONG_SIDE = 2400;

/// Offers `text` or a Blob as a file download.
export function download(name, content, type) {
  const blob = content instanceof Blob ? content : new Blob([content], { type });
  const url = URL.createObjectURL(blob);
  const anchor = document.createElement('a');
  anchor.href = url;
  anchor.download = name;
  document.body.append(anchor);
  anchor.click();
  anchor.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10000);
}

/// Draws the whole lattice at a fixed size on a white page, with the caution for sites, and
/// resolves to a PNG Blob.
export function renderPng(geometry, frame, colours, colouring, caution) {
  const aspect = frame.height / Math.max(frame.width, 1e-12);
  const width = aspect > 1 ? Math.round(PNG_LONG_SIDE / aspect) : PNG_LONG_SIDE;
  const drawingHeight = aspect > 1 ? PNG_LONG_SIDE : Math.round(PNG_LONG_SIDE * aspect);
  const band = caution ? 160 : 0;
  const canvas = document.createElement('canvas');
  canvas.width = width;
  canvas.height = drawingHeight + band;
  const drawing = document.createElement('canvas');
  drawing.width = width;
  drawing.height = drawingHeight;
  const view = new NetworkView(drawing, colours);
  view.pixelRatio = 2.5;
  view.colouring = colouring;
  view.setFrame(frame);
  view.fit();
  view.setGeometry(geometry);
  view.draw();
  const ctx = canvas.getContext('2d');
  ctx.fillStyle = '#ffffff';
  ctx.fillRect(0, 0, canvas.width, canvas.height);
  ctx.drawImage(drawing, 0, 0);
  if (caution) {
    ctx.fillStyle = '#7a2e00';
    ctx.font = '26px system-ui, sans-serif';
    wrapText(ctx, `CAUTION: ${caution}`, 24, drawingHeight + 40, width - 48, 32);
  }
  return new Promise((resolve, reject) => {
    canvas.toBlob((blob) => (blob ? resolve(blob) : reject(new Error('PNG encoding failed'))), 'image/png');
  });
}

function wrapText(ctx, text, x, y, maxWidth, lineHeight) {
  let line = '';
  for (const word of text.split(' ')) {
    const trial = line ? `${line} ${word}` : word;
    if (ctx.measureText(trial).width > maxWidth && line) {
      ctx.fillText(line, x, y);
      line = word;
      y += lineHeight;
    } else {
      line = trial;
    }
  }
  if (line) ctx.fillText(line, x, y);
}

/// Keeps a record's text; returns an error message, or '' when kept.
export function keepRecord(text, summary) {
  try {
    localStorage.setItem(STORE_KEY, JSON.stringify({ text, summary, kept: new Date().toISOString() }));
    return '';
  } catch (error) {
    return `The record is open but too large to keep across reloads (${error.name}).`;
  }
}

/// The kept record `{text, summary, kept}`, or null.
export function keptRecord() {
  try {
    const raw = localStorage.getItem(STORE_KEY);
    if (!raw) return null;
    const kept = JSON.parse(raw);
    return typeof kept.text === 'string' ? kept : null;
  } catch {
    return null;
  }
}

export function forgetRecord() {
  try {
    localStorage.removeItem(STORE_KEY);
  } catch {
    // Storage may be disabled; there is then nothing to forget.
  }
}
