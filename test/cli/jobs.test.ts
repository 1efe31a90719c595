// Worker threads change nothing in the output: the same fleet run with 1, 2 and 3 workers gives the
// same results file and the same markdown report, byte for byte (each series is analysed alone, with
// its own seed, and results are written in input order).
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { main } from '../../src/cli/main.js';
import { createRandom } from '../../src/engine/random.js';

/** A small seeded fleet: 3 metrics x 24 daily series, with gaps, a limit and run-wide FDR control. */
function fleet(): string {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'leadline-jobs-'));
  const rnd = createRandom(11);
  const metrics: string[] = [];
  for (let f = 0; f < 3; f++) {
    const names = Array.from({ length: 24 }, (_, c) => `s${c}`);
    const level = names.map(() => 100 + 900 * rnd.uniform());
    const lines = [['date', ...names].join(',')];
    for (let t = 0; t < 150; t++) {
      const row = [new Date(Date.UTC(2025, 0, 1) + t * 86_400_000).toISOString().slice(0, 10)];
      names.forEach((_, c) => {
        level[c]! += rnd.normal() * (1 + c / 4) + (f === 1 ? 0.5 : 0);
        const spike = t === 149 && c % 5 === 0 ? 40 : 0;
        row.push(t % 37 === c ? '' : (level[c]! + spike + 4 * Math.sin(t)).toFixed(2));
      });
      lines.push(row.join(','));
    }
    writeFileSync(path.join(dir, `m${f}.csv`), lines.join('\n') + '\n');
    metrics.push(
      `  - name: m${f}\n    file: m${f}.csv\n    time: date\n    value: [${names.join(', ')}]` +
        (f === 1 ? '\n    limit: { above: 1200, within: 30d }' : '') +
        (f === 2 ? '\n    intervals: bootstrap\n    check: { last: 3 }' : ''),
    );
  }
  writeFileSync(
    path.join(dir, 'leadline.yml'),
    `version: 1\ndefaults:\n  blanks: missing\n  falseAlarms: fdr\nmetrics:\n${metrics.join('\n')}\n`,
  );
  return dir;
}

async function run(dir: string, jobs: number): Promise<{ json: string; markdown: string; code: number }> {
  const json = path.join(dir, 'results.json');
  const md = path.join(dir, 'report.md');
  const code = await main(
    [
      'run',
      '--cwd',
      dir,
      '--config',
      'leadline.yml',
      '--jobs',
      String(jobs),
      '--json',
      json,
      '--markdown',
      md,
    ],
    { stdout: { write: () => true }, stderr: { write: () => true }, env: {}, cwd: dir },
  );
  // The clock (generatedAt, the report's footer) is all that may differ.
  const text = readFileSync(json, 'utf8').replace(/"generatedAt": "[^"]*"/, '"generatedAt": ""');
  const markdown = readFileSync(md, 'utf8').replace(/\d{4}-\d\d-\d\d \d\d:\d\d UTC/g, 'TIME');
  return { json: text, markdown, code };
}

describe('--jobs', () => {
  it('gives byte-identical results and reports with 1, 2 and 3 worker threads', async () => {
    const dir = fleet();
    const one = await run(dir, 1);
    const results = JSON.parse(one.json) as { series: { verdict: string }[] };
    expect(results.series).toHaveLength(72);
    // The fleet exercises alarms and limits, so the comparison covers them.
    expect(results.series.some((s) => s.verdict === 'alarm')).toBe(true);
    for (const jobs of [2, 3]) {
      const other = await run(dir, jobs);
      expect(other.code).toBe(one.code);
      expect(other.json === one.json).toBe(true);
      expect(other.markdown === one.markdown).toBe(true);
    }
  }, 120_000);
});
