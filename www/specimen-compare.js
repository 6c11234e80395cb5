// The grown side of the specimen comparison: grows the current settings with SEED_COUNT seeds
// (the run's own seed and the next ones), a slice per frame so the page stays responsive, and
// collects each run's metrics as the core measures them. The comparison itself (mean,
// seed-to-seed standard deviation, difference in deviations, number texts) is the core's
// (`specimen_comparison_json`).

/// How many seeds of the current settings the spread is taken over.
export const SEED_COUNT = 5;

// Milliseconds of growth per slice before the page gets a frame back.
const SLICE_MS = 12;

/// The links of SEED_COUNT seeds of `link`: its own seed, then the following seeds.
export function seedLinks(core, link) {
  const fields = JSON.parse(core.read_link(link)).fields;
  const first = BigInt(fields.seed);
  const candidates = [first];
  for (let k = 1n; k <= BigInt(2 * SEED_COUNT); k += 1n) candidates.push(first + k);
  // Past the seed's upper bound, count down from the run's seed instead.
  for (let k = 1n; k <= BigInt(2 * SEED_COUNT); k += 1n) candidates.push(first - k);
  const links = [];
  for (const seed of candidates) {
    if (links.length === SEED_COUNT) break;
    if (seed < 0n) continue;
    const result = JSON.parse(core.set_link_field(link, 'seed', seed.toString()));
    if (!result.error) links.push({ seed: seed.toString(), link: result.link });
  }
  return links;
}

const nextFrame = () => new Promise((resolve) => { setTimeout(resolve, 0); });

/// Grows each seed's run to its end and returns their metrics JSON texts. `progress(text)`
/// reports each seed; `cancelled()` stops early (the result is then null).
export async function growSeeds(core, links, progress, cancelled) {
  const metrics = [];
  for (const [index, entry] of links.entries()) {
    progress(`growing seed ${entry.seed} (${index + 1} of ${links.length})…`);
    const simulation = new core.Simulation(entry.link);
    try {
      let chunk = 2000;
      while (!simulation.finished()) {
        if (cancelled()) return null;
        const started = performance.now();
        simulation.step(chunk);
        const took = performance.now() - started;
        chunk = Math.max(200, Math.min(2_000_000, Math.round(chunk * (SLICE_MS / Math.max(took, 0.5)))));
        await nextFrame();
      }
      metrics.push(simulation.metrics_json());
    } finally {
      try {
        simulation.free();
      } catch {
        // A trapped instance cannot free; the session replaces it.
      }
    }
  }
  return metrics;
}
