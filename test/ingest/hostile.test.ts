// Hostile and unusual input found by fuzzing: every case ends in a located error or a clearly noted
// reading, never in a crash, a silent misreading or a misleading message.
import { mkdirSync } from 'node:fs';
import { execFileSync } from 'node:child_process';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { parsePlan } from '../../src/config/index.js';
import { LeadlineError } from '../../src/errors.js';
import { ingest, resolveFiles } from '../../src/ingest/index.js';
import { parseTimeCell } from '../../src/ingest/times.js';
import { runJob } from '../../src/job.js';
import { ingestOne, iso, planOf, removeDir, tempDir, writeFiles } from './helpers.js';

let dir: string;
beforeEach(async () => {
  dir = await tempDir();
});
afterEach(async () => {
  await removeDir(dir);
});

function configError(yaml: string): LeadlineError {
  try {
    parsePlan(yaml, 'leadline.yml');
  } catch (e) {
    expect(e).toBeInstanceOf(LeadlineError);
    return e as LeadlineError;
  }
  throw new Error('expected a config error');
}

const daily = (n: number, value = (i: number) => 10 + (i % 4)) =>
  `day,v\n${Array.from({ length: n }, (_, i) => `${iso(Date.UTC(2025, 0, 1 + i)).slice(0, 10)},${value(i)}`).join('\n')}\n`;

describe('crashes that became located errors', () => {
  it('limit.within: 0d', () => {
    const e = configError(
      'version: 1\nmetrics:\n  - { name: m, file: a.csv, value: v, limit: { above: 5, within: 0d } }\n',
    );
    expect(e.keyPath).toBe('metrics[0].limit.within');
    expect([e.line, e.column]).toEqual([3, 66]);
    expect(e.message).toMatch(/more than 0/);
  });

  it('epoch milliseconds near and past the end of the date range', async () => {
    for (const start of [8.64e15 - 3 * 86_400_000, 8.64e15 + 86_400_000, -8.64e15 - 5]) {
      const csv = `t,v\n${[0, 1, 2, 3].map((i) => `${start + i * 86_400_000},${i}`).join('\n')}\n`;
      await writeFiles(dir, {
        'data.csv': csv,
        'leadline.yml':
          'version: 1\nmetrics:\n  - { name: m, file: data.csv, time: t, value: v, horizon: 5 }\n',
      });
      const r = await runJob({ cwd: dir, configPath: 'leadline.yml', failOn: 'never' });
      expect(r.series[0]!.verdict).toBe('error');
      expect(r.problems[0]).toMatchObject({ file: 'data.csv', column: 1 });
      expect(r.problems[0]!.line).toBeGreaterThanOrEqual(2);
      expect(r.problems[0]!.message).toMatch(/outside the years 0001–9999/);
    }
  });
});

describe('times read as what they are', () => {
  it('reads 8-digit numbers that are calendar dates as YYYYMMDD, and says so', async () => {
    const out = await ingestOne(
      dir,
      'd,v\n20251230\t,1\n20251231,2\n20260101,3\n20260102,4\n'.replace('\t', ''),
      'time: d, value: v',
    );
    const s = out.series[0]!;
    expect(s.spacing).toBe('day');
    expect(iso(s.times![0])).toBe('2025-12-30T00:00:00.000Z');
    expect(s.notes.join(' ')).toMatch(/8-digit numbers, read as calendar dates \(YYYYMMDD\)/);
  });

  it('timeFormat states the form: epoch seconds though they look like dates', async () => {
    await writeFiles(dir, { 'data.csv': 'd,v\n20250101,1\n20250201,2\n20250301,3\n' });
    const out = await ingest(
      planOf(['{ name: m, file: data.csv, time: d, value: v, timeFormat: epoch-seconds }']),
      dir,
    );
    expect(iso(out.series[0]!.times![0])).toBe(iso(20250101 * 1000));
    expect(out.series[0]!.times).toHaveLength(3);
  });

  it('timeFormat refuses a cell of another form, naming the setting', async () => {
    await writeFiles(dir, { 'data.csv': 'd,v\n2025-12-30,1\n2025-12-31,2\n2026-01-01,3\n' });
    const out = await ingest(
      planOf(['{ name: m, file: data.csv, time: d, value: v, timeFormat: yyyymmdd }']),
      dir,
    );
    expect(out.failures[0]!.error.describe()).toMatch(
      /^data\.csv:2:1: The time "2025-12-30" in column "d" is not a YYYYMMDD date \(timeFormat: yyyymmdd\)/,
    );
  });

  it('never maps years 0000–0099 to 1900–1999', async () => {
    expect(new Date(parseTimeCell('0024-03-01').value).getUTCFullYear()).toBe(24);
    expect(new Date(parseTimeCell('0099-12-31T10:00Z').value).getUTCFullYear()).toBe(99);
    const out = await ingestOne(dir, 'd,v\n0024-01-01,1\n0024-01-02,2\n0024-01-03,3\n', 'time: d, value: v');
    expect(out.series[0]!.notes.join(' ')).toMatch(/before the year 1000 \(line 2: 0024-01-01\)/);
  });
});

describe('unbounded work is capped, naming the setting', () => {
  it('a duration-based limit window on minute data', async () => {
    const rows = Array.from(
      { length: 40 },
      (_, i) => `${new Date(Date.UTC(2025, 0, 1, 0, i)).toISOString()},${i % 5}`,
    );
    await writeFiles(dir, {
      'data.csv': `t,v\n${rows.join('\n')}\n`,
      'leadline.yml':
        'version: 1\nmetrics:\n  - { name: m, file: data.csv, time: t, value: v, limit: { above: 100, within: 180d } }\n',
    });
    const r = await runJob({ cwd: dir, configPath: 'leadline.yml', failOn: 'never' });
    expect(r.series[0]!.verdict).toBe('error');
    expect(r.problems[0]).toMatchObject({
      keyPath: 'metrics[0].limit.within',
      file: 'leadline.yml',
      line: 3,
    });
    expect(r.problems[0]!.message).toMatch(
      /window 180d is 259200 steps of one minute for this series; at most 10000 are forecast/,
    );
  });

  it('a glob matching more files than the cap', async () => {
    await writeFiles(dir, Object.fromEntries(Array.from({ length: 6 }, (_, i) => [`m/${i}.csv`, 'a\n'])));
    await expect(resolveFiles('m/*.csv', dir, 5)).rejects.toThrow(
      /"m\/\*\.csv" matches 6 files; Leadline reads at most 5 per metric/,
    );
  });
});

describe('smaller cases', () => {
  it('a FIFO is not "a directory", and is never opened', async () => {
    mkdirSync(path.join(dir, 'm'));
    execFileSync('mkfifo', [path.join(dir, 'm', 'pipe.csv')]);
    await expect(resolveFiles('m/pipe.csv', dir)).rejects.toThrow(/is not a regular file \(a FIFO\)/);
    await expect(resolveFiles('m/*.csv', dir)).rejects.toThrow(/No file matches "m\/\*\.csv"/);
  });

  it('values near ±1e308 are a located error, not NaN statistics', async () => {
    const csv = daily(30, (i) => (i % 2 === 0 ? 1.7e308 : -1.7e308));
    const out = await ingestOne(dir, csv, 'time: day, value: v');
    const e = out.failures[0]!.error;
    expect([e.line, e.column]).toEqual([2, 2]);
    expect(e.message).toMatch(/too large for the statistics \(beyond ±1e\+100\)/);
  });

  it('a YAML key that is a collection is located at the key', () => {
    const e = configError(
      'version: 1\nmetrics:\n  - name: m\n    file: a.csv\n    value: v\n    ? [a, b]\n    : 1\n',
    );
    expect([e.line, e.column]).toEqual([6, 7]);
    expect(e.message).toMatch(/A key must be plain text, found a list/);
  });

  it('two rows on one grid point say so plainly', async () => {
    const csv = 'd,v\n2025-01-01,1\n2025-01-26,2\n2025-01-27,2\n2025-02-20,3\n2025-03-17,4\n';
    const out = await ingestOne(dir, csv, 'time: d, value: v');
    expect(out.failures[0]!.error.message).toBe(
      'Lines 3 and 4 fall on the same point of the time grid (one point every 25 days); remove one, or set "duplicates" to first, last or mean.',
    );
  });
});

describe('messages a newcomer needs', () => {
  it('an unquoted decimal comma', async () => {
    const out = await ingestOne(dir, 'd,v\n2025-01-01,1,5\n2025-01-02,2\n', 'time: d, value: v');
    expect(out.failures[0]!.error.message).toMatch(
      /This row has 3 fields but the header has 2: "1,5" looks like a number with a decimal comma/,
    );
  });

  it('a missing value column and a missing file get a "did you mean"', async () => {
    await writeFiles(dir, { 'latency.csv': 'day,latency_ms\n2025-01-01,1\n' });
    const col = await ingest(planOf(['{ name: m, file: latency.csv, time: day, value: latency }']), dir);
    expect(col.failures[0]!.error.message).toMatch(/Did you mean "latency_ms"\?/);
    const file = await ingest(planOf(['{ name: m, file: latncy.csv, time: day, value: latency_ms }']), dir);
    expect(file.failures[0]!.error.message).toMatch(/Did you mean "latency\.csv"\?/);
  });

  it('a doubled byte-order mark', async () => {
    const out = await ingestOne(dir, '\uFEFF\uFEFF"d",v\n2025-01-01,1\n', 'time: d, value: v');
    expect(out.failures[0]!.error.describe()).toBe(
      'data.csv:1:1: The file starts with 2 byte-order marks (U+FEFF); an editor added one too many. Remove them (save the file as UTF-8).',
    );
  });
});
