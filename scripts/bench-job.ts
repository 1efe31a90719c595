// Whole-command benchmark: a generated fleet of daily series, run through the same pipeline as the
// command (config -> ingest -> engine -> alarms -> results -> markdown). Prints total time, time spent
// parsing CSVs, and peak memory. Usage: npm run bench:job [-- SERIES POINTS]
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { loadPlan } from '../src/config/index.js';
import { createRandom } from '../src/engine/random.js';
import { ingest } from '../src/ingest/index.js';
import { buildResults } from '../src/job.js';
import { renderMarkdown } from '../src/report/index.js';
import { resultsJson } from '../src/files.js';

const SERIES = Number(process.argv[2] ?? 10_000);
const POINTS = Number(process.argv[3] ?? 730);
const PER_FILE = 100; // value columns per wide CSV file
const dir = mkdtempSync(path.join(os.tmpdir(), 'leadline-bench-'));
const rnd = createRandom(7);
const DAY = 86_400_000;
const start = Date.UTC(2024, 0, 1);

let peakRss = 0;
const sample = () => {
  peakRss = Math.max(peakRss, process.memoryUsage().rss);
};
const timer = setInterval(sample, 20);

const files = Math.ceil(SERIES / PER_FILE);
const metrics: string[] = [];
for (let f = 0; f < files; f++) {
  const cols = Math.min(PER_FILE, SERIES - f * PER_FILE);
  const names = Array.from({ length: cols }, (_, c) => `s${c}`);
  const level = names.map(() => 100 + rnd.uniform() * 900);
  const lines = [['date', ...names].join(',')];
  for (let t = 0; t < POINTS; t++) {
    const row = [new Date(start + t * DAY).toISOString().slice(0, 10)];
    for (let c = 0; c < cols; c++) {
      level[c]! += rnd.normal();
      row.push((level[c]! + 5 * Math.sin((2 * Math.PI * t) / 7)).toFixed(2));
    }
    lines.push(row.join(','));
  }
  writeFileSync(path.join(dir, `fleet-${f}.csv`), lines.join('\n') + '\n');
  metrics.push(
    `  - name: fleet-${f}\n    file: fleet-${f}.csv\n    time: date\n    value: [${names.join(', ')}]`,
  );
}
writeFileSync(
  path.join(dir, 'leadline.yml'),
  `version: 1\ndefaults:\n  season: auto\nmetrics:\n${metrics.join('\n')}\n`,
);

const t0 = performance.now();
const plan = await loadPlan('leadline.yml', dir);
const t1 = performance.now();
const outcome = await ingest(plan, dir);
const t2 = performance.now();
const results = buildResults(plan, outcome, { failOn: 'both' });
const t3 = performance.now();
const markdown = renderMarkdown(results);
let jsonChars = 0;
for (const piece of resultsJson(results)) jsonChars += piece.length;
const t4 = performance.now();
clearInterval(timer);
sample();

const s = (ms: number) => (ms / 1000).toFixed(2) + ' s';
console.log(`fleet: ${results.series.length} series x ${POINTS} daily points in ${files} files`);
console.log(
  `config ${s(t1 - t0)}, ingest ${s(t2 - t1)} (csv parsing ${s(outcome.parseMs)}), analysis ${s(t3 - t2)}, render ${s(t4 - t3)}`,
);
console.log(`total ${s(t4 - t0)}; ${(results.series.length / ((t4 - t0) / 1000)).toFixed(0)} series/s`);
console.log(
  `peak RSS ${(peakRss / 2 ** 20).toFixed(0)} MiB; results JSON ${(jsonChars / 2 ** 20).toFixed(1)} MiB; markdown ${(markdown.length / 1024).toFixed(0)} KiB`,
);
console.log(
  `verdict ${results.verdict}: ${results.summary.alarms} alarms, ${results.summary.expectedFalseAlarms.toFixed(1)} expected by chance`,
);
rmSync(dir, { recursive: true, force: true });
