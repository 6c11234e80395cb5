// The readings panel: the core's labelled metric rows in a table, each with its short
// explanation (what it measures, when it says little), the Horton plot and the
// branching-angle histogram (laid out by the core, drawn by plots.js). Text only through
// textContent.
import { drawAngleHistogram, drawHortonPlot } from './plots.js';

// The histogram row is long and shown as a plot instead.
const PLOTTED_ROW = 'branching angles per 10-degree bin';

export function showReadings(session) {
  const rows = JSON.parse(session.simulation.metrics_rows_json());
  const plots = session.plots();
  const body = document.querySelector('#metrics tbody');
  body.replaceChildren();
  for (const [label, value, unit, about = '', saysLittle = false] of rows) {
    if (label.startsWith(PLOTTED_ROW)) continue;
    const row = document.createElement('tr');
    // The core marks readings that follow the cell size here; its note says why.
    if (saysLittle) row.className = 'says-little';
    // The measure's name, and under it the core's short explanation of what it says.
    const name = document.createElement('td');
    const title = document.createElement('span');
    title.className = 'measure';
    title.textContent = label;
    name.append(title);
    if (about) {
      const note = document.createElement('span');
      note.className = 'about';
      note.textContent = about;
      name.append(note);
    }
    row.append(name);
    for (const text of [value, unit === '-' ? '' : unit]) {
      const cell = document.createElement('td');
      cell.textContent = text;
      row.append(cell);
    }
    body.append(row);
  }
  const horton = document.getElementById('horton');
  const angles = document.getElementById('angles');
  drawHortonPlot(horton, plots.horton);
  drawAngleHistogram(angles, plots.angles);
  horton.setAttribute('aria-label', plots.summary);
  angles.setAttribute('aria-label', plots.summary);
  document.getElementById('readings-note').textContent = '';
  return plots;
}

export function clearReadings(note) {
  document.querySelector('#metrics tbody').replaceChildren();
  for (const id of ['horton', 'angles']) {
    const canvas = document.getElementById(id);
    canvas.getContext('2d')?.clearRect(0, 0, canvas.width, canvas.height);
  }
  document.getElementById('readings-note').textContent = note;
}
