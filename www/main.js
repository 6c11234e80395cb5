// Ramulus page entry: loads the wasm module, fills the preset list, grows a run to its end and
// shows the core's SVG drawing and digest. Holds no simulation logic.
import init, { Simulation, presets_json } from './pkg/ramulus_web.js';

const byId = (id) => document.getElementById(id);
let lastSvg = null;

function showStatus(text) {
  byId('status').textContent = text;
}

async function start() {
  await init();
  const presets = JSON.parse(presets_json());
  const select = byId('preset');
  for (const preset of presets) {
    const option = document.createElement('option');
    option.value = preset.name;
    option.textContent = preset.name;
    select.append(option);
  }
  const describe = () => {
    const preset = presets.find((p) => p.name === select.value);
    byId('preset-about').textContent = preset.description;
    byId('seed').value = String(preset.params.seed);
  };
  select.addEventListener('change', describe);
  describe();
  byId('grow').addEventListener('click', () => grow(presets));
  byId('save-svg').addEventListener('click', saveSvg);
  grow(presets);
}

function grow(presets) {
  const preset = presets.find((p) => p.name === byId('preset').value);
  const params = { ...preset.params, seed: Number(byId('seed').value) };
  let simulation;
  try {
    simulation = new Simulation(JSON.stringify(params));
  } catch (error) {
    showStatus(`Cannot start: ${error.message ?? error}`);
    return;
  }
  const started = performance.now();
  while (!simulation.finished()) simulation.step(20000);
  const seconds = (performance.now() - started) / 1000;
  lastSvg = simulation.svg('order');
  const url = URL.createObjectURL(new Blob([lastSvg], { type: 'image/svg+xml' }));
  byId('picture').src = url;
  byId('digest').textContent = simulation.digest();
  showStatus(`${simulation.cells()} cells grown in ${seconds.toFixed(2)} s`);
  const caution = byId('caution');
  const isSite = params.units === 'm' || params.units === 'ft';
  caution.hidden = !isSite;
  caution.textContent = isSite
    ? 'Concept layout only: not a drainage design. Check against local codes and have a licensed engineer design the system.'
    : '';
  byId('save-svg').disabled = false;
  simulation.free();
}

function saveSvg() {
  if (!lastSvg) return;
  const link = document.createElement('a');
  link.href = URL.createObjectURL(new Blob([lastSvg], { type: 'image/svg+xml' }));
  link.download = 'ramulus-network.svg';
  link.click();
}

start().catch((error) => showStatus(`The page could not start: ${error.message ?? error}`));
