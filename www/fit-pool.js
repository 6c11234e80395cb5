// The fit's worker pool: one module Web Worker per core the browser reports (fit-worker.js,
// each with its own wasm instance, compiled once here and shared), fed with chunks of the
// current batch of a FitSession that lives in the page's wasm. Outcomes come back in any order
// and are put into the session by job index; the session absorbs a batch only when it is
// whole, in job order, so the result does not depend on how many workers ran or how fast.
// Pause stops handing out chunks (chunks already running finish); cancel ends every worker.

const CHUNK_MILLISECONDS = 250; // aim of one chunk's run time: fewer messages, a fair tail
const MOST_JOBS_PER_CHUNK = 64;

let compiledModule = null;

/// The page's wasm module, compiled once and handed to every worker.
function wasmModule() {
  compiledModule ??= WebAssembly.compileStreaming(fetch(new URL('./pkg/ramulus_web_bg.wasm', import.meta.url)))
    .catch(() => null); // workers then load the file themselves
  return compiledModule;
}

/// Thrown into a running `FitPool.run` by `cancel`.
export class FitCancelled extends Error {
  constructor() {
    super('the fit was cancelled');
  }
}

export class FitPool {
  /// Starts `count` workers and loads wasm in each; resolves once all are ready.
  static async open(count) {
    const module = await wasmModule();
    const pool = new FitPool();
    pool.workers = Array.from({ length: count }, () => new Worker(new URL('./fit-worker.js', import.meta.url), { type: 'module', name: 'ramulus-fit' }));
    await Promise.all(pool.workers.map((worker) => pool.request(worker, { type: 'load', module }, 'loaded')));
    return pool;
  }

  constructor() {
    this.workers = [];
    this.pending = new Map(); // worker -> its last request
    this.paused = false;
    this.cancelled = false;
    this.wake = null; // resumes dispatching after a pause
    this.fail = null; // rejects the running batch
    this.activeMilliseconds = 0; // time spent running, pauses excluded
    this.jobsDone = 0; // jobs finished in this pool's life
    this.replicateRuns = 0;
    this.msPerJob = 0;
    this.longestCall = 0; // ms, see `timed`
  }

  /// Sends one message and waits for the reply of type `wanted`; requests to one worker
  /// wait for each other.
  request(worker, message, wanted) {
    const previous = this.pending.get(worker) ?? Promise.resolve();
    const next = previous.catch(() => {}).then(() => this.exchange(worker, message, wanted));
    this.pending.set(worker, next);
    return next;
  }

  exchange(worker, message, wanted) {
    return new Promise((resolve, reject) => {
      worker.onmessage = (event) => {
        if (event.data.type === wanted) resolve(event.data);
        else if (event.data.type === 'failed') reject(new Error(event.data.message));
      };
      worker.onerror = (event) => reject(new Error(event.message || 'a fit worker failed to start'));
      worker.postMessage(message);
    });
  }

  /// Hands the session's plan to every worker (once per fit).
  setPlan(session) {
    const plan = session.plan_json();
    for (const worker of this.workers) worker.postMessage({ type: 'plan', plan });
  }

  /// Runs batches until the session is done or `stopAt(phase)` says stop; `progress(done,
  /// total, secondsLeft, phase)` after every chunk. Rejects with FitCancelled on cancel.
  async run(session, { progress = () => {}, stopAt = () => false } = {}) {
    while (session.phase() !== 'done' && !stopAt(session.phase())) {
      await this.runBatch(session, progress);
      if (this.cancelled) throw new FitCancelled();
      this.timed(() => session.absorb());
    }
  }

  /// Runs the session's current batch on every worker; outcomes are put in by job index.
  runBatch(session, progress) {
    const size = session.batch_size();
    const phase = session.phase();
    const [doneBefore] = session.progress();
    let next = 0;
    let running = 0;
    let doneInBatch = 0;
    let lastTick = performance.now();
    const tick = () => {
      const now = performance.now();
      if (!this.paused) this.activeMilliseconds += now - lastTick;
      lastTick = now;
    };
    return new Promise((resolve, reject) => {
      const idle = new Set();
      this.fail = reject;
      const dispatch = (worker) => {
        if (this.cancelled) return;
        if (this.paused || next >= size) {
          idle.add(worker);
          if (next >= size && running === 0) resolve();
          return;
        }
        const left = size - next;
        const aim = this.msPerJob > 0 ? Math.floor(CHUNK_MILLISECONDS / this.msPerJob) : 1;
        const fair = Math.ceil(left / this.workers.length);
        const count = Math.max(1, Math.min(aim, fair, MOST_JOBS_PER_CHUNK));
        const start = next;
        next += count;
        running += 1;
        const jobs = this.timed(() => session.jobs_json(start, start + count));
        worker.postMessage({ type: 'jobs', start, count, jobs });
      };
      for (const worker of this.workers) {
        worker.onmessage = (event) => {
          const message = event.data;
          if (this.cancelled) return;
          if (message.type === 'failed') {
            reject(new Error(message.message));
            return;
          }
          if (message.type !== 'outcomes') return;
          tick();
          running -= 1;
          try {
            this.timed(() => session.put_outcomes(message.start, message.outcomes));
          } catch (error) {
            reject(error);
            return;
          }
          doneInBatch += message.count;
          this.jobsDone += message.count;
          const perJob = message.milliseconds / message.count;
          this.msPerJob = this.msPerJob === 0 ? perJob : 0.8 * this.msPerJob + 0.2 * perJob;
          const [, total] = session.progress();
          const done = doneBefore + doneInBatch;
          const rate = this.jobsDone / Math.max(this.activeMilliseconds, 1);
          progress(done, total, (total - done) / rate / 1000, phase);
          dispatch(worker);
        };
        worker.onerror = (event) => reject(new Error(event.message || 'a fit worker failed'));
      }
      this.wake = () => {
        lastTick = performance.now();
        const waiting = [...idle];
        idle.clear();
        for (const worker of waiting) dispatch(worker);
      };
      for (const worker of this.workers) dispatch(worker);
    }).finally(() => {
      this.fail = null;
    });
  }

  /// Runs `call` (a call into the page's wasm) and keeps the longest time one took, in ms: what
  /// the fit costs the page's thread at most at once.
  timed(call) {
    const started = performance.now();
    const value = call();
    this.longestCall = Math.max(this.longestCall, performance.now() - started);
    return value;
  }

  /// Stops handing out chunks; those running finish and are kept.
  pause() {
    this.paused = true;
  }

  /// Hands out chunks again.
  resume() {
    if (!this.paused) return;
    this.paused = false;
    this.wake?.();
  }

  /// The worker that holds a picture: the best run in the first, the specimen in the last, so
  /// the two grow at once when there are two workers.
  pictureWorker(which) {
    return which === 'best' ? this.workers[0] : this.workers[this.workers.length - 1];
  }

  /// Grows the run `source.link` describes, or reads the specimen file `{bytes, name, base}`,
  /// in a worker and keeps it there as picture `which` ('best' or 'specimen'); resolves to
  /// `{extent: [min_x, min_y, max_x, max_y], units}`.
  picture(which, source) {
    const message = source.bytes
      ? { type: 'picture', id: which, bytes: source.bytes, name: source.name, base: source.link }
      : { type: 'picture', id: which, link: source.link };
    return this.request(this.pictureWorker(which), message, 'pictured');
  }

  /// Draws picture `which` to RGBA pixels in its worker (`{width, height, scale, offsetX,
  /// offsetY, colouring}`); resolves to `{pixels, width, height}`, the buffer transferred.
  paint(which, view) {
    return this.request(this.pictureWorker(which), { type: 'paint', id: which, ...view }, 'painted');
  }

  /// Grows the run a link describes in a worker and resolves to its SVG (for download).
  draw(link, colouring) {
    const worker = this.workers[0];
    return this.request(worker, { type: 'draw', link, colouring }, 'drawn').then((reply) => reply.svg);
  }

  /// Measures a specimen file in a worker; resolves to its metrics as JSON.
  measure({ bytes, name, link }) {
    return this.request(this.workers[0], { type: 'measure', bytes, name, link }, 'measured').then((reply) => reply.metrics);
  }

  /// Draws the specimen (its bytes read as the fit read them) as SVG in the last worker (for
  /// download).
  drawSpecimen({ bytes, name, link }, colouring) {
    const worker = this.workers[this.workers.length - 1];
    return this.request(worker, { type: 'draw-specimen', bytes, name, link, colouring }, 'drawn').then((reply) => reply.svg);
  }

  /// Ends every worker at once (work in flight is lost); a running batch rejects.
  cancel() {
    this.cancelled = true;
    this.close();
    this.fail?.(new FitCancelled());
  }

  /// Ends every worker.
  close() {
    for (const worker of this.workers) worker.terminate();
    this.workers = [];
  }
}
