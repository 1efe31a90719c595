// Fuzzing: mutated and generated CSVs and configs through config loading, ingestion and the whole job,
// in-process. Each input ends as a clean result, a located error (every problem names a file and
// line or a config key), something else thrown (a crash), or a hang (no answer within the time
// limit). Prints the counts and the peak memory.
//   npm run fuzz -- --count 100000 [--seed 1]
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { createRandom, type Random } from '../src/engine/random.js';
import { isLeadlineError } from '../src/errors.js';
import { runJob } from '../src/job.js';

export interface FuzzCounts {
  inputs: number;
  clean: number;
  located: number;
  crashes: number;
  hangs: number;
  peakRssMiB: number;
  /** The first few crashes and hangs, for reproducing them. */
  examples: { kind: 'crash' | 'hang'; csv: string; config: string; error: string }[];
}

const HOSTILE = [
  ',',
  ';',
  '"',
  '""',
  '\n',
  '\r\n',
  '\r',
  '\uFEFF',
  '\u202E',
  '\u200B',
  '\0',
  ' ',
  '',
  '1e308',
  '-1.7e308',
  '1,5',
  'NaN',
  'Infinity',
  '20251231',
  '0024-01-01',
  '9999-12-31',
  '275760-09-13',
  '8639999999999999',
  '1e11',
  '::stop-commands::x',
  '2025-02-30',
  '2025-01-01T25:00',
  '2025-01-01T10:00+14:00',
  '-',
  '.',
  'x'.repeat(300),
];
const CONFIG_VALUES: Record<string, string[]> = {
  within: ['0d', '1', '180d', '90m', '2q', '1y', '0.5d', '100000'],
  timeFormat: ['auto', 'iso', 'yyyymmdd', 'year', 'epoch-seconds', 'epoch-milliseconds'],
  duplicates: ['error', 'first', 'last', 'mean'],
  blanks: ['error', 'missing'],
  season: ['auto', '1', '7', '24', '100000'],
  horizon: ['1', '14', '500'],
};

const pick = <T>(r: Random, xs: readonly T[]): T => xs[Math.floor(r.uniform() * xs.length)]!;

function baseCsv(r: Random): string {
  const n = 3 + Math.floor(r.uniform() * 60);
  const step = pick(r, [60_000, 3_600_000, 86_400_000, 30 * 86_400_000]);
  const start = Date.UTC(2024, 0, 1);
  const rows = ['day,v,host'];
  for (let i = 0; i < n; i++) {
    const t = new Date(start + i * step).toISOString();
    rows.push(
      `${r.uniform() < 0.5 ? t.slice(0, 10) : t},${(100 + 10 * r.uniform()).toFixed(2)},${pick(r, ['a', 'b'])}`,
    );
  }
  return rows.join('\n') + '\n';
}

function mutate(r: Random, text: string): string {
  let s = text;
  const edits = Math.floor(r.uniform() * 6);
  for (let k = 0; k < edits; k++) {
    const at = Math.floor(r.uniform() * (s.length + 1));
    const op = r.uniform();
    if (op < 0.4) s = s.slice(0, at) + pick(r, HOSTILE) + s.slice(at);
    else if (op < 0.6) s = s.slice(0, at) + s.slice(at + 1 + Math.floor(r.uniform() * 5));
    else if (op < 0.8) {
      const lines = s.split('\n');
      const i = Math.floor(r.uniform() * lines.length);
      lines.splice(Math.floor(r.uniform() * lines.length), 0, lines[i]!);
      s = lines.join('\n');
    } else s = s.slice(0, at) + String.fromCharCode(Math.floor(r.uniform() * 0x3000)) + s.slice(at);
  }
  return s;
}

function config(r: Random): string {
  const opts: string[] = [];
  for (const [k, vs] of Object.entries(CONFIG_VALUES)) {
    if (r.uniform() > 0.3) continue;
    if (k === 'within')
      opts.push(`limit: { above: ${pick(r, ['100', '1e308', '-5'])}, within: ${pick(r, vs)} }`);
    else opts.push(`${k}: ${pick(r, vs)}`);
  }
  const key = r.uniform() < 0.2 ? ', key: host' : '';
  const value = r.uniform() < 0.1 ? pick(r, ['V', 'value', '"::x::"']) : 'v';
  const time = r.uniform() < 0.1 ? '' : ', time: day';
  let yaml = `version: 1\nmetrics:\n  - { name: m, file: data.csv${time}, value: ${value}${key}${opts.length ? `, ${opts.join(', ')}` : ''} }\n`;
  if (r.uniform() < 0.1) yaml = mutate(r, yaml);
  return yaml;
}

function located(p: { file: string | null; line: number | null; keyPath: string | null }): boolean {
  // A whole-file problem (missing, empty) names the file; the rest also a line or a config key.
  return p.file !== null || p.keyPath !== null;
}

/** Runs `count` inputs from `seed`; each must finish within `hangMs`. */
export async function fuzz(count: number, seed = 1, hangMs = 20_000): Promise<FuzzCounts> {
  const r = createRandom(seed);
  const counts: FuzzCounts = {
    inputs: 0,
    clean: 0,
    located: 0,
    crashes: 0,
    hangs: 0,
    peakRssMiB: 0,
    examples: [],
  };
  const dir = mkdtempSync(path.join(os.tmpdir(), 'leadline-fuzz-'));
  try {
    for (let i = 0; i < count; i++) {
      const csv =
        r.uniform() < 0.9 ? mutate(r, baseCsv(r)) : pick(r, HOSTILE).repeat(1 + Math.floor(r.uniform() * 5));
      const yaml = config(r);
      writeFileSync(path.join(dir, 'data.csv'), csv);
      writeFileSync(path.join(dir, 'leadline.yml'), yaml);
      counts.inputs++;
      /** The first ten hangs and crashes are kept whole, to replay. */
      const keep = (kind: 'hang' | 'crash', error: string) => {
        if (counts.examples.length < 10) counts.examples.push({ kind, csv, config: yaml, error });
      };
      let timer: NodeJS.Timeout | undefined;
      const late = new Promise<'hang'>((resolve) => (timer = setTimeout(() => resolve('hang'), hangMs)));
      try {
        const out = await Promise.race([
          runJob({ cwd: dir, configPath: 'leadline.yml', failOn: 'never', jobs: 0, now: new Date(0) }),
          late,
        ]);
        if (out === 'hang') {
          counts.hangs++;
          keep('hang', '');
        } else if (out.problems.length === 0) counts.clean++;
        else if (out.problems.every(located)) counts.located++;
        else {
          counts.crashes++;
          keep('crash', `unlocated: ${out.problems[0]!.message}`);
        }
      } catch (e) {
        if (isLeadlineError(e) && (e.file !== null || e.keyPath !== null)) counts.located++;
        else {
          counts.crashes++;
          keep('crash', (e as Error)?.stack ?? String(e));
        }
      } finally {
        clearTimeout(timer);
      }
      counts.peakRssMiB = Math.max(counts.peakRssMiB, process.memoryUsage().rss / 2 ** 20);
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  counts.peakRssMiB = Math.round(counts.peakRssMiB);
  return counts;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const arg = (name: string, d: number) => {
    const i = process.argv.indexOf(`--${name}`);
    return i > 0 ? Number(process.argv[i + 1]) : d;
  };
  const started = Date.now();
  const c = await fuzz(arg('count', 1000), arg('seed', 1));
  const { examples, ...rest } = c;
  console.log(JSON.stringify({ ...rest, seconds: Math.round((Date.now() - started) / 1000) }));
  for (const ex of examples) console.log(JSON.stringify(ex));
  process.exitCode = c.crashes + c.hangs > 0 ? 1 : 0;
}
