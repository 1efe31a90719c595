import { describe, expect, it } from 'vitest';
import { resultsJson } from '../../src/files.js';
import { runJob } from '../../src/job.js';
import { resultsSchema, seriesForFile, seriesResultSchema, type SeriesResult } from '../../src/results.js';
import path from 'node:path';

const demo = path.resolve(import.meta.dirname, '..', '..', 'fixtures', 'demo');

/** Plain JSON values (NaN as null), for comparing results in memory with results read back. */
const plain = (x: unknown): unknown => JSON.parse(JSON.stringify(x));

describe('the results JSON text', () => {
  it('reads back through the schema to exactly the results, one series per line, history in columns', async () => {
    const results = await runJob({ cwd: demo, configPath: 'leadline.yml', failOn: 'both', now: new Date(0) });
    const text = [...resultsJson(results)].join('');
    expect(plain(resultsSchema.parse(JSON.parse(text)))).toEqual(plain(results));
    const seriesLines = text.split('\n').filter((l) => l.startsWith('    {"name":'));
    expect(seriesLines).toHaveLength(results.series.length);
    const inFile = (JSON.parse(text) as { series: Record<string, unknown>[] }).series;
    const daily = inFile.find((s) => s.spacing === 'day' && (s.historyColumns as object | undefined))!;
    expect(daily.history).toEqual([]);
    // A daily series read without gaps: lines and times as an offset and a step.
    expect(daily.historyColumns).toMatchObject({ rowOffset: expect.any(Number), stepMs: 86_400_000 });
  });

  it('keeps lines and times point by point where no offset or step reproduces them', () => {
    const base = {
      index: 0,
      row: 2 as number | null,
      time: '2025-01-31T00:00:00.000Z' as string | null,
      value: 1 as number | null,
    };
    const history = [
      { ...base, index: 5, row: 7, time: '2025-01-31T00:00:00.000Z' },
      { ...base, index: 6, row: null, time: '2025-02-28T00:00:00.000Z', value: null }, // gap-filled
      {
        ...base,
        index: 7,
        row: 8,
        time: '2025-03-31T00:00:00.000Z',
        value: 2.5,
        label: 'v2',
        incident: true,
      },
    ];
    const s = { history, residuals: [0.1, null, -0.2] } as unknown as SeriesResult;
    const file = plain(seriesForFile(s)) as Record<string, unknown>;
    expect(file.history).toEqual([]);
    expect(file.historyColumns).toEqual({
      from: 5,
      values: [1, null, 2.5],
      rows: [7, null, 8],
      times: ['2025-01-31T00:00:00.000Z', '2025-02-28T00:00:00.000Z', '2025-03-31T00:00:00.000Z'],
      labels: [null, null, 'v2'],
      incidentAt: [7],
    });
    // Row order: no times at all.
    const rowOrder = seriesForFile({
      history: history.map((p) => ({ ...p, time: null })),
      residuals: [],
    } as unknown as SeriesResult) as { historyColumns: Record<string, unknown> };
    expect(rowOrder.historyColumns.times).toBeUndefined();
    expect(rowOrder.historyColumns.start).toBeUndefined();
  });

  it('is refused when the columns disagree with each other or with history', async () => {
    const results = await runJob({ cwd: demo, configPath: 'leadline.yml', failOn: 'both', now: new Date(0) });
    const line = plain(seriesForFile(results.series[0]!)) as Record<string, unknown> & {
      historyColumns: Record<string, unknown> & { values: unknown[] };
    };
    expect(seriesResultSchema.safeParse(line).success).toBe(true);
    const bad = (mutate: (r: typeof line) => void) => {
      const r = structuredClone(line);
      mutate(r);
      return seriesResultSchema.safeParse(r).success;
    };
    const marked = {
      ...results.series[0]!,
      history: results.series[0]!.history.map((p, k) =>
        k === 1 ? { ...p, label: 'a', incident: true as const } : p,
      ),
    };
    expect(plain(seriesResultSchema.parse(plain(seriesForFile(marked))))).toEqual(plain(marked));
    expect(bad((r) => (r.historyColumns.incidentAt = [0]))).toBe(false);
    expect(bad((r) => (r.historyColumns.rows = [1]))).toBe(false);
    expect(bad((r) => (r.historyColumns.start = 'yesterday'))).toBe(false);
    expect(bad((r) => (r.history = results.series[0]!.history))).toBe(false);
  });

  it('is valid JSON for a run with no series', async () => {
    const results = await runJob({ cwd: demo, configPath: 'leadline.yml', failOn: 'both', now: new Date(0) });
    const empty = { ...results, series: [] };
    expect(JSON.parse([...resultsJson(empty)].join(''))).toEqual(empty);
  });
});
