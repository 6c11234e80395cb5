// Exports (SVG from the core, PNG from the canvas drawing, run record, metrics CSV), opening a
// run record, and keeping the last opened record in the browser's storage across reloads.
import { NetworkView } from './draw.js';

const DATABASE = 'ramulus';
const STORE = 'kept';
const RECORD_KEY = 'last-opened-record';
const PNG_LONG_SIDE = 2400;

/// Offers `text` or a Blob as a file download; returns its size in bytes.
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
  return blob.size;
}

/// Draws the whole lattice at a fixed size on a white page, with the caution for sites, and
/// resolves to a PNG Blob.
/// `roots`: the [x, y] of each root, ringed as on the canvas; `tissue`: how segments below the
/// conducting threshold are drawn ('faint', 'hidden' or 'veins'), as on the canvas.
export function renderPng(session, frame, colours, colouring, caution, roots = [], tissue = 'faint') {
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
  const view = new NetworkView(drawing, session, colours);
  view.pixelRatio = 2.5;
  view.colouring = colouring;
  view.tissue = tissue;
  view.setFrame(frame);
  view.roots = roots;
  view.fit();
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

/// Keeps a record's text in the browser's IndexedDB (records of large runs exceed the few
/// megabytes that localStorage holds). Resolves to an error message, or '' when kept.
export async function keepRecord(text, summary) {
  try {
    await withStore('readwrite', (store) => store.put({ text, summary, kept: new Date().toISOString() }, RECORD_KEY));
    return '';
  } catch (error) {
    return `The record is open but could not be kept across reloads (${error?.name ?? error}).`;
  }
}

/// The kept record `{text, summary, kept}`, or null.
export async function keptRecord() {
  try {
    const kept = await withStore('readonly', (store) => store.get(RECORD_KEY));
    return kept && typeof kept.text === 'string' ? kept : null;
  } catch {
    return null;
  }
}

export async function forgetRecord() {
  try {
    await withStore('readwrite', (store) => store.delete(RECORD_KEY));
  } catch {
    // Storage may be disabled; there is then nothing to forget.
  }
}

/// Runs one request on the object store and resolves to its result.
function withStore(mode, makeRequest) {
  return new Promise((resolve, reject) => {
    const opening = indexedDB.open(DATABASE, 1);
    opening.onupgradeneeded = () => opening.result.createObjectStore(STORE);
    opening.onerror = () => reject(opening.error);
    opening.onsuccess = () => {
      const database = opening.result;
      const transaction = database.transaction(STORE, mode);
      const request = makeRequest(transaction.objectStore(STORE));
      transaction.oncomplete = () => {
        database.close();
        resolve(request.result);
      };
      transaction.onerror = () => {
        database.close();
        reject(transaction.error);
      };
    };
  });
}
