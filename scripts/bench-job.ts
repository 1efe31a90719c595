// Whole-job benchmark on a generated fleet of daily series (100 value columns per wide CSV file),
// through the command's own stages: config -> ingest -> analysis (worker threads) -> results file ->
// markdown report. In the same run it parses the same files with csv-parse alone (parse-only), so
// the job's CPU is reported as a ratio to that, which holds on a busy machine where seconds do not.
// Prints one block: series, points, workers, seconds per stage, CPU, parse-only CPU and the ratio,
// series per second, peak RSS, results and spool bytes per series, and the machine's load (uptime).
//
// Usage: npm run bench:job [-- SERIES POINTS [--jobs N]] (runs as a bundle: scripts/run-bundled.mjs)
// The fleet is generated once per size into the system's temp folder and reused.
import { createReadStream, existsSync, mkdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parse } from 'csv-parse';
import { loadPlan } from '../src/config/index.js';
import { createRandom } from '../src/engine/random.js';
import { inputGuard, resultsJsonOf, writeOutput } from '../src/files.js';
import { ingest } from '../src/ingest/index.js';
import { analyseFleet, finishResults } from '../src/job.js';
import { defaultJobs, isPoolWorker } from '../src/pool.js';
import { renderMarkdown, reportDetail } from '../src/report/index.js';

const args = process.argv.slice(2);
const flag = (name: string): string | undefined => {
  const k = args.indexOf(name);
  return k >= 0 ? args.splice(k, 2)[1] : undefined;
};
const jobsArg = flag('--jobs');
const positional = args.filter((a) => !a.startsWith('--'));
const SERIES = Number(positional[0] ?? 10_000);
const POINTS = Number(positional[1] ?? 730);
const JOBS = jobsArg === undefined ? defaultJobs() : Number(jobsArg);
const PER_FILE = 100;

/** The seeded fleet: random walks with a weekly wave, two decimals, like a metric export. */
function fleet(): string {
  const dir = path.join(os.tmpdir(), `leadline-fleet-${SERIES}x${POINTS}`);
  const done = path.join(dir, '.complete');
  if (existsSync(done)) return dir;
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  const rnd = createRandom(7);
  const start = Date.UTC(2024, 0, 1);
  const files = Math.ceil(SERIES / PER_FILE);
  const metrics: string[] = [];
  for (let f = 0; f < files; f++) {
    const cols = Math.min(PER_FILE, SERIES - f * PER_FILE);
    const names = Array.from({ length: cols }, (_, c) => `s${c}`);
    const level = names.map(() => 100 + rnd.uniform() * 900);
    const lines = [['date', ...names].join(',')];
    for (let t = 0; t < POINTS; t++) {
      const row = [new Date(start + t * 86_400_000).toISOString().slice(0, 10)];
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
  writeFileSync(done, '');
  return dir;
}

/** CPU seconds of this process (every thread) since `from`. */
const cpu = (from?: NodeJS.CpuUsage): number => {
  const u = process.cpuUsage(from);
  return (u.user + u.system) / 1e6;
};

/** csv-parse alone over the files, with the options ingest uses; returns the records read. */
async function parseOnly(files: string[]): Promise<number> {
  let records = 0;
  for (const f of files) {
    const parser = createReadStream(f).pipe(
      parse({
        bom: true,
        delimiter: ',',
        record_delimiter: ['\r\n', '\n', '\r'],
        skip_empty_lines: false,
        relax_column_count: true,
        max_record_size: 1024 * 1024,
      }),
    );
    for await (const _record of parser) records++;
  }
  return records;
}

// The bundle is also the analysis workers' script: they run none of this.
if (!isPoolWorker()) await benchmark();

async function benchmark(): Promise<void> {
  const dir = fleet();
  const csvFiles = Array.from({ length: Math.ceil(SERIES / PER_FILE) }, (_, f) =>
    path.join(dir, `fleet-${f}.csv`),
  );
  const csvBytes = csvFiles.reduce((n, f) => n + statSync(f).size, 0);
  const out = path.join(os.tmpdir(), `leadline-bench-${process.pid}`);
  mkdirSync(out, { recursive: true });

  const loadBefore = os.loadavg();
  const p0 = process.cpuUsage();
  const records = await parseOnly(csvFiles);
  const parseCpu = cpu(p0);

  const c0 = process.cpuUsage();
  const t0 = performance.now();
  const plan = await loadPlan('leadline.yml', dir);
  const t1 = performance.now();
  const outcome = await ingest(plan, dir);
  const t2 = performance.now();
  const rss: number[] = [process.memoryUsage().rss];
  const analysed = await analyseFleet(plan, outcome, { jobs: JOBS });
  const t3 = performance.now();
  rss.push(process.memoryUsage().rss);
  // As the command does (src/cli/main.ts): the results file streamed from the spool, and the report
  // from the run with only the series it can show read back in full.
  const run = finishResults(plan, outcome, analysed, { failOn: 'both' });
  const guard = await inputGuard(dir, 'leadline.yml');
  const jsonPath = await writeOutput(path.join(out, 'results.json'), resultsJsonOf(run), guard, 'bench');
  const t4 = performance.now();
  rss.push(process.memoryUsage().rss);
  const shown = await run.detailed(reportDetail(run.lean, [{ markdown: {} }]));
  await writeOutput(path.join(out, 'report.md'), renderMarkdown(shown), guard, 'bench');
  const t5 = performance.now();
  rss.push(process.memoryUsage().rss);
  const spoolBytes = analysed.spool.bytes;
  run.close();
  const results = run.lean;
  const jobCpu = cpu(c0);
  const loadAfter = os.loadavg();

  const jsonBytes = statSync(jsonPath).size;
  const peakRss = process.resourceUsage().maxRSS * 1024;
  rmSync(out, { recursive: true, force: true });

  const s = (ms: number): string => (ms / 1000).toFixed(2);
  const n = (x: number): string => x.toLocaleString('en-US');
  const wall = t5 - t0;
  console.log(
    `series ${n(results.series.length)}, points ${n(POINTS)} (${n(records)} CSV records, ${(csvBytes / 2 ** 20).toFixed(1)} MiB in ${csvFiles.length} files), workers ${JOBS}`,
  );
  console.log(
    `seconds: config ${s(t1 - t0)}, ingest ${s(t2 - t1)}, analysis ${s(t3 - t2)}, results ${s(t4 - t3)}, report ${s(t5 - t4)}; total ${s(wall)} wall`,
  );
  console.log(
    `CPU ${jobCpu.toFixed(2)} s; parse-only CPU ${parseCpu.toFixed(2)} s (csv-parse alone, same files, same run); ratio ${(jobCpu / parseCpu).toFixed(2)}x`,
  );
  console.log(`series per second ${(results.series.length / (wall / 1000)).toFixed(0)}`);
  console.log(
    `peak RSS ${(peakRss / 2 ** 20).toFixed(0)} MiB (RSS after ingest, analysis, results, report: ${rss.map((x) => (x / 2 ** 20).toFixed(0)).join(', ')} MiB); results ${n(Math.round(jsonBytes / results.series.length))} bytes per series (${(jsonBytes / 2 ** 20).toFixed(1)} MiB); spool ${n(Math.round(spoolBytes / results.series.length))} bytes per series`,
  );
  console.log(
    `load (1/5/15 min) before ${loadBefore.map((x) => x.toFixed(2)).join(' ')}, after ${loadAfter.map((x) => x.toFixed(2)).join(' ')}; ${os.availableParallelism()} cores; verdict ${results.verdict}, ${results.summary.alarms} alarms`,
  );
}
