// A run keeps each analysed series on disk and only its lean form in memory (src/job.ts, spool.ts);
// the results file streams the full series back, and a report reads back only the series it can
// show in detail (report/index.ts reportDetail). None of that may change a byte of any output: the
// same fleet through the pure in-memory pipeline (buildResults) gives the same results file, and the
// same markdown, brief and HTML reports, as the spooled run with most of its series left lean.
import { mkdtempSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { loadPlan } from '../../src/config/index.js';
import { createRandom } from '../../src/engine/random.js';
import { resultsJson, resultsJsonOf } from '../../src/files.js';
import { ingest } from '../../src/ingest/index.js';
import { buildResults, startJob, type JobRun } from '../../src/job.js';
import {
  buildView,
  HTML_SECTIONS,
  renderHtml,
  renderMarkdown,
  reportDetail,
  type MarkdownOptions,
} from '../../src/report/index.js';
import { concludeRun, draftOf } from '../../src/outcome.js';
import { hasDetail, withoutDetail, type Results } from '../../src/results.js';

const NOW = new Date(Date.UTC(2026, 0, 2));

/** 3 metrics x 90 daily series (270, more than the HTML page's 250 sections), spikes, a limit, a failure. */
function fleet(): string {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'leadline-detail-'));
  const rnd = createRandom(5);
  const metrics: string[] = [];
  for (let f = 0; f < 3; f++) {
    const names = Array.from({ length: 90 }, (_, c) => `s${c}`);
    const level = names.map(() => 100 + 900 * rnd.uniform());
    const lines = [['date', ...names].join(',')];
    for (let t = 0; t < 40; t++) {
      const row = [new Date(Date.UTC(2025, 0, 1) + t * 86_400_000).toISOString().slice(0, 10)];
      names.forEach((_, c) => {
        level[c]! += rnd.normal();
        row.push((level[c]! + (t === 39 && c % 4 === 0 ? 30 : 0)).toFixed(2));
      });
      lines.push(row.join(','));
    }
    writeFileSync(path.join(dir, `m${f}.csv`), lines.join('\n') + '\n');
    metrics.push(
      `  - name: m${f}\n    file: m${f}.csv\n    time: date\n    value: [${names.join(', ')}]` +
        (f === 1 ? '\n    limit: { above: 1100, within: 30d }' : ''),
    );
  }
  metrics.push('  - name: gone\n    file: missing.csv\n    time: date\n    value: v');
  writeFileSync(path.join(dir, 'leadline.yml'), `version: 1\nmetrics:\n${metrics.join('\n')}\n`);
  return dir;
}

async function text(pieces: Iterable<string> | AsyncIterable<string>): Promise<string> {
  let out = '';
  for await (const p of pieces) out += p;
  return out;
}

let dir: string;
let run: JobRun;
let inMemory: Results;
beforeAll(async () => {
  dir = fleet();
  run = await startJob({ cwd: dir, configPath: 'leadline.yml', failOn: 'both', jobs: 1, now: NOW });
  const plan = await loadPlan('leadline.yml', dir);
  inMemory = buildResults(plan, await ingest(plan, dir), { failOn: 'both', now: NOW });
}, 120_000);

describe('a spooled run', () => {
  it('keeps its series lean and writes the same results file as the run held in memory', async () => {
    expect(run.lean.series).toHaveLength(271);
    expect(run.lean.summary.alarms).toBeGreaterThan(10);
    expect(run.lean.series.every((s) => !hasDetail(s) && s.forecast.length === 0)).toBe(true);
    // Where each series ends stays (annotations point at that CSV line): the newest point only.
    const full = run.full().series;
    run.lean.series.forEach((s, k) => expect(s.history).toStrictEqual(full[k]!.history.slice(-1)));
    expect(run.lean.series.filter((s) => s.verdict === 'error')).toHaveLength(1);
    // configHash differs: startJob hashes the config file, buildResults is not given one.
    const spooled = await text(resultsJsonOf(run));
    const held = await text(resultsJson({ ...inMemory, origin: run.lean.origin }));
    expect(spooled).toBe(held);
    expect(run.full().series).toStrictEqual(inMemory.series);
  });

  const cases: [string, MarkdownOptions][] = [
    ['the full markdown report cut to 6,000 characters', { maxChars: 6_000 }],
    ['the brief report', { detail: 'brief', maxChars: 6_000 }],
    ['the full markdown report uncut', {}],
  ];
  for (const [what, options] of cases)
    it(`renders ${what} from only the series it can show in full, as from the whole run`, async () => {
      const wanted = reportDetail(run.lean, [{ markdown: options }]);
      const shown = await run.detailed(wanted);
      expect(shown.series.filter(hasDetail)).toHaveLength(wanted.size);
      if (options.maxChars) expect(wanted.size).toBeLessThan(run.lean.series.length);
      expect(renderMarkdown(shown, options)).toBe(renderMarkdown(inMemory, options));
    });

  it(`renders the HTML page from its first ${HTML_SECTIONS} series in full, as from the whole run`, async () => {
    const wanted = reportDetail(run.lean, ['html']);
    expect(wanted.size).toBe(HTML_SECTIONS);
    expect(renderHtml(await run.detailed(wanted))).toBe(renderHtml(inMemory));
  });

  it('never shows a lean series as if it had no data: the report refuses it', () => {
    expect(() => buildView(run.lean)).toThrow(/internal: the report was given gone without its charts/);
    expect(() => renderMarkdown(run.lean)).toThrow(/without its charts and tables/);
  });

  it('keeps what a verdict is decided on: a series too short for its residual checks stays too short', () => {
    // As a merge re-concludes a shard's series: its alarm is gone after run-wide control, and its
    // residual checks rest on 5 residuals (fewer than the 10 they need), so it is too short to judge.
    const full = run.full().series.find((s) => s.residualChecks && s.verdict === 'ok')!;
    const shard = {
      ...full,
      verdict: 'alarm' as const,
      checked: [],
      residualChecks: { ...full.residualChecks!, residuals: 5 },
    };
    for (const s of [shard, withoutDetail(shard)]) {
      const [settled] = concludeRun([draftOf(s)], {
        metrics: 1,
        falseAlarms: 'bonferroni',
        failOn: 'both',
      }).series;
      expect(settled!.verdict).toBe('too-short');
      expect(settled!.reason).toMatch(
        /need at least 10 residuals and the history before the checked rows gives 5/,
      );
    }
  });

  it('removes its spool when closed', () => {
    const other = run;
    other.close();
    expect(() => [...other.series()]).toThrow(/closed/);
  });
});
