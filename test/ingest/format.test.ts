import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { ingest } from '../../src/ingest/index.js';
import { ingestOne, iso, planOf, removeDir, tempDir, writeFiles } from './helpers.js';

let dir: string;
beforeEach(async () => {
  dir = await tempDir();
});
afterEach(async () => {
  await removeDir(dir);
});

const DAY = 86_400_000;

async function only(csv: string | Uint8Array, metric: string) {
  const out = await ingestOne(dir, csv, metric);
  expect(out.failures.map((f) => f.error.describe())).toEqual([]);
  expect(out.series).toHaveLength(1);
  return out.series[0]!;
}

describe('CSV format', () => {
  it('reads comma, semicolon and tab delimited files, detected from the header line', async () => {
    for (const d of [',', ';', '\t']) {
      const s = await only(
        `date${d}v\n2024-01-01${d}1.5\n2024-01-02${d}-2\n2024-01-03${d}3e2\n`,
        'time: date, value: v',
      );
      expect(Array.from(s.values)).toEqual([1.5, -2, 300]);
    }
  });

  it('picks the delimiter that occurs most in the header, ignoring quoted ones', async () => {
    const s = await only('"a,b";"c,d";v\n1;2;10\n3;4;11\n5;6;12\n', 'value: v');
    expect(Array.from(s.values)).toEqual([10, 11, 12]);
  });

  it('strips a UTF-8 byte order mark from the first header name', async () => {
    const s = await only('\uFEFFdate,v\n2024-01-01,1\n2024-01-02,2\n2024-01-03,3\n', 'time: date, value: v');
    expect(s.times).not.toBeNull();
  });

  it('handles CRLF, quoted fields with delimiters and newlines, and keeps line numbers right', async () => {
    const csv = 'run,note,v\r\n1,"a, b",10\r\n2,"two\r\nlines",11\r\n\r\n3,"say ""hi""",12\r\n';
    const s = await only(csv, 'value: v');
    expect(Array.from(s.values)).toEqual([10, 11, 12]);
    // header 1; row 2; row 3-4 (a quoted newline); blank line 5; row 6.
    expect(Array.from(s.rows)).toEqual([2, 3, 6]);
  });

  it('accepts bare CR line endings and a last line without newline', async () => {
    const s = await only('v\r1\r2\r3', 'value: v');
    expect(Array.from(s.values)).toEqual([1, 2, 3]);
    expect(Array.from(s.rows)).toEqual([2, 3, 4]);
  });

  it('trims spaces around header names and numbers', async () => {
    const s = await only(
      ' date , v \n2024-01-01, 1 \n2024-01-02,2\n2024-01-03,  3\n',
      'time: date, value: v',
    );
    expect(Array.from(s.values)).toEqual([1, 2, 3]);
  });
});

describe('times', () => {
  it('normalises ISO 8601 offsets to UTC', async () => {
    const s = await only(
      't,v\n2024-03-01T02:00:00+02:00,1\n2024-03-01T01:00Z,2\n2024-03-01 04:00:00.000+0200,3\n',
      'time: t, value: v',
    );
    expect(s.spacing).toBe('hour');
    expect(s.stepMs).toBe(3_600_000);
    expect(Array.from(s.times!, iso)).toEqual([
      '2024-03-01T00:00:00.000Z',
      '2024-03-01T01:00:00.000Z',
      '2024-03-01T02:00:00.000Z',
    ]);
    expect(s.notes.join(' ')).not.toContain('without a UTC offset');
  });

  it('reads datetimes without an offset as UTC, and says so', async () => {
    const s = await only(
      't,v\n2024-03-01T10:00,1\n2024-03-01T11:00,2\n2024-03-01T12:00,3\n',
      'time: t, value: v',
    );
    expect(iso(s.times![0])).toBe('2024-03-01T10:00:00.000Z');
    expect(s.notes).toContain('Times in "t" without a UTC offset were read as UTC.');
  });

  it('reads integer epoch seconds (values below 1e11)', async () => {
    const s = await only('t,v\n1700000000,1\n1700086400,2\n1700172800,3\n', 'time: t, value: v');
    expect(s.spacing).toBe('day');
    expect(iso(s.times![0])).toBe('2023-11-14T22:13:20.000Z');
    expect(s.notes.join(' ')).toContain('epoch seconds');
  });

  it('reads epoch milliseconds (values at or above 1e11)', async () => {
    const s = await only('t,v\n1700000000000,1\n1700000060000,2\n1700000120000,3\n', 'time: t, value: v');
    expect(s.spacing).toBe('minute');
    expect(s.stepMs).toBe(60_000);
    expect(iso(s.times![2])).toBe('2023-11-14T22:15:20.000Z');
    expect(s.notes.join(' ')).toContain('epoch milliseconds');
  });

  it('reads a column of four-digit numbers as years', async () => {
    const s = await only('year,v\n2020,1\n2021,2\n2022,3\n2024,5\n', 'time: year, value: v');
    expect(s.spacing).toBe('year');
    expect(Array.from(s.times!, iso)).toEqual(
      ['2020', '2021', '2022', '2023', '2024'].map((y) => `${y}-01-01T00:00:00.000Z`),
    );
    expect(Array.from(s.values)).toEqual([1, 2, 3, NaN, 5]);
  });

  it('sorts out-of-order rows by time, with a note, keeping each value on its own line', async () => {
    const s = await only(
      'date,v\n2024-01-03,3\n2024-01-01,1\n2024-01-02,2\n2024-01-04,4\n',
      'time: date, value: v',
    );
    expect(Array.from(s.values)).toEqual([1, 2, 3, 4]);
    expect(Array.from(s.rows)).toEqual([3, 4, 2, 5]);
    expect(s.notes).toContain('1 row was out of time order in the file; the series is sorted by time.');
  });
});

describe('spacing and the regular grid', () => {
  const cases: [string, string[], string, number | null][] = [
    ['minute', ['2024-01-01T00:00Z', '2024-01-01T00:01Z', '2024-01-01T00:02Z'], 'minute', 60_000],
    ['5 minutes', ['2024-01-01T00:00Z', '2024-01-01T00:05Z', '2024-01-01T00:10Z'], 'minute', 300_000],
    ['hour', ['2024-01-01T00:00Z', '2024-01-01T01:00Z', '2024-01-01T02:00Z'], 'hour', 3_600_000],
    ['day', ['2024-01-01', '2024-01-02', '2024-01-03'], 'day', DAY],
    ['week', ['2024-01-01', '2024-01-08', '2024-01-15'], 'week', 7 * DAY],
    ['4 weeks', ['2024-01-01', '2024-01-29', '2024-02-26'], 'week', 28 * DAY],
    ['month', ['2024-01-01', '2024-02-01', '2024-03-01'], 'month', null],
    ['month (YYYY-MM)', ['2024-01', '2024-02', '2024-03'], 'month', null],
    ['quarter', ['2024-01-01', '2024-04-01', '2024-07-01'], 'quarter', null],
    ['year', ['2021-01-01', '2022-01-01', '2023-01-01'], 'year', null],
  ];
  for (const [label, times, spacing, stepMs] of cases) {
    it(`infers ${label} spacing`, async () => {
      const s = await only(`t,v\n${times.map((t, i) => `${t},${i}`).join('\n')}\n`, 'time: t, value: v');
      expect(s.spacing).toBe(spacing);
      expect(s.stepMs).toBe(stepMs);
    });
  }

  it('fills gaps with NaN and row 0 on the grid, with a note', async () => {
    const s = await only(
      'date,v\n2024-01-01,1\n2024-01-02,2\n2024-01-05,5\n2024-01-06,6\n',
      'time: date, value: v',
    );
    expect(Array.from(s.values)).toEqual([1, 2, NaN, NaN, 5, 6]);
    expect(Array.from(s.rows)).toEqual([2, 3, 0, 0, 4, 5]);
    expect(iso(s.times![3])).toBe('2024-01-04T00:00:00.000Z');
    expect(s.notes).toContain('2 missing days in the time grid are treated as missing values.');
  });

  it('aligns month-end data by calendar month, not by milliseconds', async () => {
    const s = await only(
      'd,v\n2024-01-31,1\n2024-02-29,2\n2024-03-31,3\n2024-05-31,5\n',
      'time: d, value: v',
    );
    expect(s.spacing).toBe('month');
    expect(Array.from(s.times!, iso).map((t) => t.slice(0, 10))).toEqual([
      '2024-01-31',
      '2024-02-29',
      '2024-03-31',
      '2024-04-30',
      '2024-05-31',
    ]);
    expect(Array.from(s.values)).toEqual([1, 2, 3, NaN, 5]);
    expect(s.notes.join(' ')).not.toContain('moved');
  });

  it('moves times that are slightly off the grid to the nearest point, with a note', async () => {
    const s = await only(
      't,v\n2024-01-01T06:00Z,1\n2024-01-02T06:03Z,2\n2024-01-03T05:58Z,3\n2024-01-04T06:00Z,4\n',
      'time: t, value: v',
    );
    expect(s.spacing).toBe('day');
    expect(Array.from(s.times!, iso)).toEqual(
      ['01', '02', '03', '04'].map((d) => `2024-01-${d}T06:00:00.000Z`),
    );
    expect(s.notes).toContain(
      '2 times were off the day grid and moved to the nearest grid point (at most 3 minutes).',
    );
  });

  it('uses row order without a time column', async () => {
    const s = await only('commit,ms\nabc,10\ndef,12\n0a1,11\n', 'value: ms');
    expect(s.spacing).toBe('row');
    expect(s.times).toBeNull();
    expect(s.stepMs).toBeNull();
    expect(Array.from(s.rows)).toEqual([2, 3, 4]);
  });
});

describe('duplicates', () => {
  const csv = 'date,v\n2024-01-01,1\n2024-01-02,2\n2024-01-02,4\n2024-01-03,3\n';
  it('keeps the first, the last, or the mean when asked', async () => {
    const first = await only(csv, 'time: date, value: v, duplicates: first');
    expect(Array.from(first.values)).toEqual([1, 2, 3]);
    expect(Array.from(first.rows)).toEqual([2, 3, 5]);
    expect(first.notes).toContain(
      '1 row fell on a time already taken; the first row kept (duplicates: first).',
    );
    const last = await only(csv, 'time: date, value: v, duplicates: last');
    expect(Array.from(last.values)).toEqual([1, 4, 3]);
    expect(Array.from(last.rows)).toEqual([2, 4, 5]);
    const mean = await only(csv, 'time: date, value: v, duplicates: mean');
    expect(Array.from(mean.values)).toEqual([1, 3, 3]);
    expect(Array.from(mean.rows)).toEqual([2, 4, 5]);
  });
});

describe('metrics, columns and keys', () => {
  it('names one series per value column and per key, in order of first appearance', async () => {
    await writeFiles(dir, {
      'fleet.csv':
        'date,host,cpu,mem\n2024-01-01,b,1,10\n2024-01-01,a,2,20\n2024-01-02,b,3,30\n2024-01-02,a,4,40\n2024-01-03,b,5,50\n2024-01-03,a,6,60\n',
    });
    const out = await ingest(
      planOf(['{ name: load, file: fleet.csv, time: date, key: host, value: [cpu, mem] }']),
      dir,
    );
    expect(out.failures).toEqual([]);
    expect(out.series.map((s) => s.name)).toEqual([
      'load/cpu[b]',
      'load/mem[b]',
      'load/cpu[a]',
      'load/mem[a]',
    ]);
    const a = out.series[2]!;
    expect([a.metric, a.column, a.key, a.file]).toEqual(['load', 'cpu', 'a', 'fleet.csv']);
    expect(Array.from(a.values)).toEqual([2, 4, 6]);
    expect(Array.from(a.rows)).toEqual([3, 5, 7]);
  });

  it('reads each file once even when several metrics use it', async () => {
    await writeFiles(dir, {
      'm.csv': 'date,a,b\n2024-01-01,1,2\n2024-01-02,3,4\n2024-01-03,5,6\n',
      'n.csv': 'x\n1\n2\n3\n',
    });
    const out = await ingest(
      planOf([
        '{ name: a, file: m.csv, time: date, value: a }',
        '{ name: b, file: m.csv, value: b }',
        '{ name: c, file: n.csv, value: x }',
      ]),
      dir,
    );
    expect(out.series.map((s) => s.name)).toEqual(['a', 'b', 'c']);
    expect(out.filesRead).toBe(2);
    expect(out.parseMs).toBeGreaterThanOrEqual(0);
  });

  it('gives each file of a glob its own series, named after the file', async () => {
    await writeFiles(dir, { 'bench/b.csv': 'ms\n1\n2\n3\n', 'bench/a.csv': 'ms\n4\n5\n6\n' });
    const out = await ingest(planOf(['{ name: bench, file: "bench/*.csv", value: ms }']), dir);
    expect(out.series.map((s) => [s.name, s.file])).toEqual([
      ['bench (bench/a.csv)', 'bench/a.csv'],
      ['bench (bench/b.csv)', 'bench/b.csv'],
    ]);
  });

  it('reads blank cells as missing when blanks: missing', async () => {
    const s = await only(
      'date,v\n2024-01-01,1\n2024-01-02,\n2024-01-03,3\n2024-01-04,4\n',
      'time: date, value: v, blanks: missing',
    );
    expect(Array.from(s.values)).toEqual([1, NaN, 3, 4]);
    expect(Array.from(s.rows)).toEqual([2, 3, 4, 5]);
    expect(s.notes).toContain('1 blank cell was read as missing (blanks: missing).');
  });
});
