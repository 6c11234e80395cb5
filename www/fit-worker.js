// A fit worker (a module Web Worker): loads its own wasm instance (from the compiled module
// the pool sends, or the file) and runs batches of fit jobs, each grown and measured by the
// core exactly as `ramulus fit` runs them; also measures a specimen file, and grows the best
// run or reads the specimen and draws it to RGBA pixels (FitPicture, the main canvas's raster),
// sent back as a transferred buffer so the page only puts pixels on a canvas; the SVGs are for
// download. The pool
// (fit-pool.js) hands out the batches; this worker keeps no state but the plan.
import init, {
  FitPicture, FitWorker, fit_run_svg, fit_specimen_metrics, fit_specimen_svg,
} from './pkg/ramulus_web.js';

let ready = null;
let runner = null;
// Pictures grown or read, by the pool's id, until drawn.
const pictures = new Map();

self.onmessage = async (event) => {
  const message = event.data;
  try {
    if (message.type === 'load') {
      ready = init(message.module ? { module_or_path: message.module } : undefined);
      await ready;
      self.postMessage({ type: 'loaded' });
      return;
    }
    await ready;
    if (message.type === 'plan') {
      runner?.free();
      runner = new FitWorker(message.plan);
    } else if (message.type === 'jobs') {
      const started = performance.now();
      const outcomes = runner.run(message.jobs);
      self.postMessage({
        type: 'outcomes', start: message.start, count: message.count, outcomes,
        milliseconds: performance.now() - started,
      });
    } else if (message.type === 'draw') {
      self.postMessage({ type: 'drawn', svg: fit_run_svg(message.link, message.colouring) });
    } else if (message.type === 'picture') {
      const { id, link, bytes, name } = message;
      const picture = bytes ? FitPicture.from_specimen(bytes, name, message.base) : FitPicture.from_link(link);
      pictures.get(id)?.free();
      pictures.set(id, picture);
      self.postMessage({ type: 'pictured', extent: [...picture.extent()], units: picture.units() });
    } else if (message.type === 'paint') {
      const { id, width, height, scale, offsetX, offsetY, colouring } = message;
      const picture = pictures.get(id);
      if (!picture) throw new Error('no picture to draw');
      const pixels = picture.pixels(width, height, scale, offsetX, offsetY, colouring);
      picture.free();
      pictures.delete(id);
      self.postMessage({ type: 'painted', pixels, width, height }, [pixels.buffer]);
    } else if (message.type === 'measure') {
      const { bytes, name, link } = message;
      self.postMessage({ type: 'measured', metrics: fit_specimen_metrics(bytes, name, link) });
    } else if (message.type === 'draw-specimen') {
      const { bytes, name, link, colouring } = message;
      self.postMessage({ type: 'drawn', svg: fit_specimen_svg(bytes, name, link, colouring) });
    }
  } catch (error) {
    self.postMessage({ type: 'failed', message: error?.message ?? String(error) });
  }
};
