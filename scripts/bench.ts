// Engine benchmark: 1,000 seeded synthetic series x 2,000 points through the whole engine — all four
// methods, rolling-origin backtest over steps 1–14, analytic and bootstrap (1,000 paths x 14 steps)
// intervals, residual checks. Prints series per second, total seconds and peak memory.
// Usage: npm run bench [-- SERIES POINTS]
import { analyse, createRandom, isFit, makeForecast, type EngineOptions } from '../src/engine/index.js';

const SERIES = Number(process.argv[2] ?? 1000);
const POINTS = Number(process.argv[3] ?? 2000);
const SEASON = 7;
const HORIZON = 14;

// Four kinds of series in turn, each the model of one method, plus noise of varying scale.
function makeSeries(k: number, rnd: ReturnType<typeof createRandom>): Float64Array {
  const y = new Float64Array(POINTS);
  const kind = k % 4;
  const scale = 0.5 + 10 * rnd.uniform();
  const drift = (rnd.uniform() - 0.5) * 0.2;
  let level = 100 + 900 * rnd.uniform();
  const pattern = Array.from({ length: SEASON }, () => 20 * rnd.normal());
  for (let t = 0; t < POINTS; t++) {
    const e = scale * rnd.normal();
    if (kind === 0) y[t] = level + e;
    else if (kind === 1) y[t] = level += e;
    else if (kind === 2) y[t] = level += drift * scale + e;
    else y[t] = t < SEASON ? level + pattern[t]! + e : y[t - SEASON]! + e;
  }
  return y;
}

const rnd = createRandom(2024);
const data: Float64Array[] = [];
for (let k = 0; k < SERIES; k++) data.push(makeSeries(k, rnd));

const options: EngineOptions = {
  season: SEASON,
  methods: ['mean', 'naive', 'seasonal-naive', 'drift'],
  horizon: HORIZON,
  levels: [80, 95],
  intervals: 'bootstrap',
  backtest: { minTrain: 2 * SEASON, horizon: HORIZON },
  score: 'mase',
  paths: 1000,
  seed: 1,
};

globalThis.gc?.();
let peakRss = process.memoryUsage.rss();
let peakHeap = process.memoryUsage().heapUsed;
const chosen: Record<string, number> = {};
let failures = 0;
const t0 = performance.now();
for (let k = 0; k < SERIES; k++) {
  const a = analyse(data[k]!, options);
  if (!a.ok) {
    failures++;
    continue;
  }
  // The analytic intervals as well, from the same fit.
  const analytic = makeForecast(a.chosen, {
    horizon: HORIZON,
    levels: options.levels,
    kind: 'analytic',
    paths: 1,
    seed: 1,
  });
  if (!isFit(a.chosen) || analytic.bands.length !== 2) throw new Error('unexpected forecast');
  chosen[a.chosen.method] = (chosen[a.chosen.method] ?? 0) + 1;
  if (k % 16 === 0) {
    peakRss = Math.max(peakRss, process.memoryUsage.rss());
    peakHeap = Math.max(peakHeap, process.memoryUsage().heapUsed);
  }
}
const seconds = (performance.now() - t0) / 1000;
peakRss = Math.max(peakRss, process.memoryUsage.rss());

console.log(
  `engine: ${SERIES} series x ${POINTS} points, 4 methods, backtest steps 1-${HORIZON}, analytic + bootstrap (1000 paths) intervals, residual checks`,
);
console.log(
  `total ${seconds.toFixed(2)} s; ${(SERIES / seconds).toFixed(0)} series/s; ${((seconds / SERIES) * 1000).toFixed(2)} ms per series`,
);
console.log(
  `peak RSS ${(peakRss / 2 ** 20).toFixed(0)} MiB; peak heap used ${(peakHeap / 2 ** 20).toFixed(0)} MiB`,
);
console.log(
  `chosen: ${Object.entries(chosen)
    .map(([m, n]) => `${m} ${n}`)
    .join(', ')}${failures ? `; ${failures} failed` : ''}`,
);
