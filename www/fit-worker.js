// A fit worker (a module Web Worker): loads its own wasm instance (from the compiled module
// the pool sends, or the file) and runs batches of fit jobs, each grown and measured by the
// core exactly as `ramulus fit` runs them; also measures a specimen file and draws the best
// run and the specimen. The pool
// (fit-pool.js) hands out the batches; this worker keeps no state but the plan.
import init, {
  FitWorker, fit_run_svg, fit_specimen_metrics, fit_specimen_svg,
} from './pkg/ramulus_web.js';

let ready = null;
let runner = null;

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
