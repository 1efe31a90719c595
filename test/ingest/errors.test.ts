import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { LeadlineError } from '../../src/errors.js';
import { ingest, type IngestFailure } from '../../src/ingest/index.js';
import { ingestOne, planOf, removeDir, tempDir, writeFiles } from './helpers.js';

let dir: string;
beforeEach(async () => {
  dir = await tempDir();
});
afterEach(async () => {
  await removeDir(dir);
});

/** Ingests one metric expecting exactly one failure; returns it. */
async function failure(csv: string | Uint8Array, metric: string): Promise<IngestFailure> {
  const out = await ingestOne(dir, csv, metric);
  expect(out.series).toEqual([]);
  expect(out.failures).toHaveLength(1);
  const f = out.failures[0]!;
  expect(f.error).toBeInstanceOf(LeadlineError);
  expect(f.error.file).toBe('data.csv');
  return f;
}

describe('bad cells name the file, line and column', () => {
  it('a non-numeric value cell', async () => {
    const f = await failure(
      'date,host,latency_ms\n2024-01-01,a,12\n2024-01-02,a,fast\n2024-01-03,a,14\n',
      'time: date, value: latency_ms',
    );
    expect(f.verdict).toBe('error');
    expect(f.column).toBe('latency_ms');
    expect([f.error.kind, f.error.line, f.error.column]).toEqual(['data', 3, 3]);
    expect(f.error.describe()).toBe(
      'data.csv:3:3: The cell "fast" in column "latency_ms" is not a number (expected e.g. 12.5 or -3e4, with "." for decimals).',
    );
  });

  it('a decimal comma, an infinity and a hex number are not numbers', async () => {
    for (const cell of ['"1,5"', 'Infinity', '0x10', '1e999']) {
      const f = await failure(`v\n1\n${cell}\n3\n`, 'value: v');
      expect([f.error.line, f.error.column]).toEqual([3, 1]);
    }
  });

  it('a blank value cell unless blanks: missing', async () => {
    const f = await failure('date,v\n2024-01-01,1\n2024-01-02,\n2024-01-03,3\n', 'time: date, value: v');
    expect([f.error.line, f.error.column]).toEqual([3, 2]);
    expect(f.error.message).toContain('blanks: missing');
  });

  it('an unreadable time', async () => {
    const f = await failure('date,v\n2024-01-01,1\n2024-02-30,2\n2024-01-03,3\n', 'time: date, value: v');
    expect([f.error.line, f.error.column, f.column]).toEqual([3, 1, null]);
    expect(f.error.message).toContain('"2024-02-30"');
    expect(f.error.message).toContain('ISO 8601');
  });

  it('a blank time', async () => {
    const f = await failure('v,date\n1,2024-01-01\n2, \n3,2024-01-03\n', 'time: date, value: v');
    expect([f.error.line, f.error.column]).toEqual([3, 2]);
    expect(f.error.message).toContain('blank');
  });

  it('a time column mixing epoch numbers and ISO dates', async () => {
    const f = await failure('t,v\n2024-01-01,1\n2024-01-02,2\n1704240000,3\n', 'time: t, value: v');
    expect([f.error.line, f.error.column]).toEqual([4, 1]);
    expect(f.error.message).toContain('line 2');
  });

  it('duplicate times name both lines', async () => {
    const f = await failure(
      'date,v\n2024-01-01,1\n2024-01-02,2\n2024-01-03,3\n2024-01-02,9\n',
      'time: date, value: v',
    );
    expect([f.error.line, f.error.column]).toEqual([5, 1]);
    expect(f.error.message).toBe(
      'Lines 3 and 5 have the same time; remove one, or set "duplicates" to first, last or mean.',
    );
  });

  it('two rows moved onto the same grid point count as duplicates', async () => {
    const f = await failure(
      't,v\n2024-01-01T00:00Z,1\n2024-01-02T00:00Z,2\n2024-01-02T00:30Z,3\n2024-01-03T00:00Z,4\n2024-01-04T00:00Z,5\n2024-01-05T00:00Z,6\n',
      'time: t, value: v',
    );
    expect(f.error.message).toBe(
      'Lines 3 and 4 fall on the same point of the time grid (one point every day); remove one, or set "duplicates" to first, last or mean.',
    );
  });

  it('a blank key in a long-format file', async () => {
    const f = await failure(
      'date,host,v\n2024-01-01,a,1\n2024-01-01,,2\n',
      'time: date, key: host, value: v',
    );
    expect([f.error.line, f.error.column]).toEqual([3, 2]);
  });

  it('a time far from the rest (a grid that would be mostly gaps)', async () => {
    const f = await failure(
      'date,v\n1970-01-01,0\n2024-01-01,1\n2024-01-02,2\n2024-01-03,3\n',
      'time: date, value: v',
    );
    expect([f.error.line, f.error.column]).toEqual([3, 1]);
    expect(f.error.message).toContain('the gap between line 2 and this line');
  });
});

describe('malformed CSV names the line', () => {
  it('a row with more fields than the header', async () => {
    const f = await failure('a,b\n1,2\n3,4,5\n', 'value: b');
    expect(f.verdict).toBe('error');
    expect(f.error.line).toBe(3);
    expect(f.error.message).toContain('3 fields but the header has 2');
  });

  it('an unclosed quote', async () => {
    const f = await failure('a,b\n1,2\n3,"4\n5,6\n', 'value: b');
    expect(f.error.message).toContain('never closed');
  });

  it('a stray quote inside a field', async () => {
    const f = await failure('a,b\n1,2\n3,"4"x\n', 'value: b');
    expect(f.error.line).toBe(3);
    expect(f.error.message).toContain('doubled');
  });

  it('a UTF-16 file', async () => {
    const f = await failure(Buffer.from('\uFEFFa,b\n1,2\n', 'utf16le'), 'value: b');
    expect(f.error.message).toContain('UTF-16');
  });

  it('a binary file', async () => {
    const f = await failure(new Uint8Array([0x50, 0x4b, 0x03, 0x04, 0x00, 0x00, 0x0a]), 'value: b');
    expect(f.error.message).toContain('NUL');
  });
});

describe('missing data gives too short; missing columns an error listing the columns', () => {
  it('an empty file', async () => {
    const f = await failure('', 'value: v');
    expect(f.verdict).toBe('too-short');
    expect(f.error.message).toContain('empty');
    expect(f.error.line).toBe(1);
  });

  it('a header without rows', async () => {
    const f = await failure('date,v\n', 'time: date, value: v');
    expect(f.verdict).toBe('too-short');
    expect(f.error.line).toBe(1);
  });

  it('fewer than three observations', async () => {
    const f = await failure('date,v\n2024-01-01,1\n2024-01-02,2\n', 'time: date, value: v');
    expect(f.verdict).toBe('too-short');
    const g = await failure('v\n1\n\n2\n', 'value: v, blanks: missing');
    expect(g.verdict).toBe('too-short');
    expect(g.error.message).toContain('Only 2 observations in column "v"');
  });

  it('a missing value column, listing the columns that exist and the nearest', async () => {
    const f = await failure('date,latency_ms\n2024-01-01,1\n', 'time: date, value: latency');
    expect(f.verdict).toBe('error');
    expect(f.column).toBe('latency');
    expect(f.error.line).toBe(1);
    expect(f.error.message).toBe(
      'The value column "latency" is not in the header; the columns are: "date", "latency_ms". Did you mean "latency_ms"?',
    );
    const g = await failure('date,latency\n2024-01-01,1\n', 'time: date, value: latncy');
    expect(g.error.message).toContain('Did you mean "latency"?');
  });

  it('a missing time column and a missing key column', async () => {
    const t = await failure('day,v\n2024-01-01,1\n', 'time: date, value: v');
    expect(t.error.message).toContain(
      'The time column "date" is not in the header; the columns are: "day", "v". Did you mean "day"?',
    );
    expect(t.column).toBeNull();
    const k = await failure('day,v\n2024-01-01,1\n', 'time: day, key: host, value: v');
    expect(k.error.message).toContain('The key column "host"');
  });

  it('a header naming a needed column twice', async () => {
    const f = await failure('v,w,v\n1,2,3\n', 'value: v');
    expect([f.error.line, f.error.column]).toEqual([1, 3]);
    expect(f.error.message).toContain('columns 1 and 3');
  });

  it('a missing file, and a glob that matches nothing', async () => {
    const out = await ingest(
      planOf(['{ name: a, file: nope.csv, value: v }', '{ name: b, file: "logs/*.csv", value: v }']),
      dir,
    );
    expect(out.failures.map((f) => [f.metric.name, f.verdict])).toEqual([
      ['a', 'error'],
      ['b', 'error'],
    ]);
    expect(out.failures[0]!.error.describe()).toContain('nope.csv: The file "nope.csv" does not exist');
    expect(out.failures[1]!.error.message).toContain('No file matches "logs/*.csv"');
  });
});

describe('one metric failing does not stop the others', () => {
  it('keeps the good series of the same and other files', async () => {
    await writeFiles(dir, {
      'a.csv': 'date,good,bad\n2024-01-01,1,1\n2024-01-02,2,x\n2024-01-03,3,3\n',
      'b.csv': 'date,host,v\n2024-01-01,h1,1\n2024-01-02,h1,2\n2024-01-03,h1,3\n2024-01-01,h2,9\n',
      'c.csv': '',
    });
    const out = await ingest(
      planOf([
        '{ name: a, file: a.csv, time: date, value: [good, bad, gone] }',
        '{ name: b, file: b.csv, time: date, key: host, value: v }',
        '{ name: c, file: c.csv, value: v }',
      ]),
      dir,
    );
    expect(out.series.map((s) => s.name)).toEqual(['a/good', 'b[h1]']);
    expect(out.failures.map((f) => [f.metric.name, f.column, f.key, f.verdict])).toEqual([
      ['a', 'gone', null, 'error'],
      ['a', 'bad', null, 'error'],
      ['b', null, 'h2', 'too-short'],
      ['c', null, null, 'too-short'],
    ]);
  });
});
