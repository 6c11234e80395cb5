// The readings panel: the core's labelled metric rows in a table, the Horton plot and the
// branching-angle histogram (drawn by plots.js). Text only through textContent.
import { drawAngleHistogram, drawHortonPlot, plotSummary } from './plots.js';

// The histogram row is long and shown as a plot instead.
const PLOTTED_ROW = 'branching angles per 10-degree bin';

export function showReadings(simulation, units) {
  const rows = JSON.parse(simulation.metrics_rows_json());
  const metrics = JSON.parse(simulation.metrics_json());
  const body = document.querySelector('#metrics tbody');
  body.replaceChildren();
  for (const [label, value, unit] of rows) {
    if (label.startsWith(PLOTTED_ROW)) continue;
    const row = document.createElement('tr');
    for (const text of [label, value, unit === '-' ? '' : unit]) {
      const cell = document.createElement('td');
      cell.textContent = text;
      row.append(cell);
    }
    body.append(row);
  }
  const horton = document.getElementById('horton');
  const angles = document.getElementById('angles');
  drawHortonPlot(horton, metrics, units);
  drawAngleHistogram(angles, metrics);
  const summary = plotSummary(metrics, units);
  horton.setAttribute('aria-label', summary);
  angles.setAttribute('aria-label', summary);
  document.getElementById('readings-note').textContent = '';
  return metrics;
}

export function clearReadings(note) {
  document.querySelector('#metrics tbody').replaceChildren();
  for (const id of ['horton', 'angles']) {
    const canvas = document.getElementById(id);
    canvas.getContext('2d')?.clearRect(0, 0, canvas.width, canvas.height);
  }
  document.getElementById('readings-note').textContent = note;
}
