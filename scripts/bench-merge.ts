// Merge benchmark: N series (default 50,000) in 4 shard files, merged by the command as it ships
// (dist/cli.js: run `npm run bundle` first). The shard files are made from the demo scenario's real
// series results, renamed and spread over the shards as `run --shard` would; only the merge is timed.
// Prints the merge's wall time and peak RSS (GNU time), with reading the same files line by line
// (JSON.parse per line, nothing else) as the floor, both measured in this run.
// Usage: node scripts/run-bundled.mjs scripts/bench-merge.ts [SERIES] [--markdown]
import { execFileSync, spawnSync } from 'node:child_process';
import { createReadStream, existsSync, mkdtempSync, rmSync, statSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { createInterface } from 'node:readline';
import { InputGuard, resultsJson, writeOutput } from '../src/files.js';
import { runJob } from '../src/job.js';
import type { Results, SeriesResult } from '../src/results.js';
import { shardOf } from '../src/shard.js';

// Run from the repository's root (the script is bundled into a temporary folder first).
const root = process.cwd();
const cli = path.join(root, 'dist', 'cli.js');
if (!existsSync(cli)) throw new Error('dist/cli.js is missing: run `npm run bundle` first.');
const total = Number(process.argv.find((a) => /^\d+$/.test(a)) ?? 50_000);
const markdown = process.argv.includes('--markdown');
const SHARDS = 4;

const dir = mkdtempSync(path.join(os.tmpdir(), 'leadline-bench-merge-'));
try {
  const demo = await runJob({
    cwd: path.join(root, 'fixtures', 'demo'),
    configPath: 'leadline.yml',
    failOn: 'both',
    jobs: 1,
  });
  const templates = demo.series.filter((s) => s.method !== null);
  const parts: SeriesResult[][] = Array.from({ length: SHARDS }, () => []);
  for (let i = 0; i < total; i++) {
    const t = templates[i % templates.length]!;
    const name = `fleet-${String(i).padStart(6, '0')} ${t.name}`;
    parts[shardOf(name, SHARDS) - 1]!.push({ ...t, name, position: i });
  }
  const files: string[] = [];
  for (const [k, series] of parts.entries()) {
    const file = path.join(dir, `shard-${k + 1}.json`);
    const shard: Results = {
      ...demo,
      origin: { ...demo.origin, shard: { index: k + 1, count: SHARDS, series: total } },
      summary: { ...demo.summary, series: series.length },
      problems: [],
      series,
    };
    await writeOutput(file, resultsJson(shard), new InputGuard(dir, 'none.yml'), 'shard');
    files.push(file);
  }
  const bytes = files.reduce((n, f) => n + statSync(f).size, 0);

  // The floor: every line of every file read and parsed, nothing kept.
  const t0 = process.hrtime.bigint();
  for (const f of files)
    for await (const line of createInterface({ input: createReadStream(f), crlfDelay: Infinity }))
      if (line.startsWith('    {')) JSON.parse(line.slice(4).replace(/,$/, ''));
  const floor = Number(process.hrtime.bigint() - t0) / 1e9;

  const args = [
    'merge',
    ...files,
    '--json',
    path.join(dir, 'merged.json'),
    '--print',
    'none',
    '--fail-on',
    'never',
  ];
  if (markdown) args.push('--markdown', path.join(dir, 'merged.md'));
  const t1 = process.hrtime.bigint();
  const run = spawnSync('/usr/bin/time', ['-f', '%M', process.execPath, cli, ...args], { encoding: 'utf8' });
  const wall = Number(process.hrtime.bigint() - t1) / 1e9;
  if (run.status !== 0) throw new Error(`merge failed: ${run.stderr}`);
  const peakKiB = Number(run.stderr.trim().split('\n').at(-1));
  const merged = statSync(path.join(dir, 'merged.json')).size;
  console.log(
    [
      `series: ${total} in ${SHARDS} shard files, ${(bytes / 2 ** 20).toFixed(0)} MiB (${Math.round(bytes / total)} bytes per series)`,
      `merge${markdown ? ' + markdown report' : ''}: ${wall.toFixed(1)} s, peak RSS ${(peakKiB / 1024).toFixed(0)} MiB; merged file ${(merged / 2 ** 20).toFixed(0)} MiB`,
      `reading and parsing the same files line by line: ${floor.toFixed(1)} s (merge / floor: ${(wall / floor).toFixed(1)}×)`,
      `load: ${execFileSync('uptime', { encoding: 'utf8' }).trim()}`,
    ].join('\n'),
  );
} finally {
  rmSync(dir, { recursive: true, force: true });
}
