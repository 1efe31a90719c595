// Property tests (fast-check): ingestion of arbitrary bytes or CSV-like text either succeeds or
// reports Leadline's own error — never another exception, never a hang — and well-formed shuffled
// daily data lands on the right grid points.
import { writeFile } from 'node:fs/promises';
import path from 'node:path';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { LeadlineError } from '../../src/errors.js';
import { ingest, type IngestOutcome } from '../../src/ingest/index.js';
import { planOf, removeDir, tempDir } from './helpers.js';

let dir: string;
beforeAll(async () => {
  dir = await tempDir();
});
afterAll(async () => {
  await removeDir(dir);
});

/** Metrics that look at the same file in every way ingestion supports. */
const PLAN = planOf([
  '{ name: timed, file: data.csv, time: t, value: v }',
  '{ name: rows, file: data.csv, value: [v, w], blanks: missing }',
  '{ name: keyed, file: data.csv, time: t, key: k, value: v, duplicates: mean }',
  '{ name: last, file: data.csv, time: t, value: w, duplicates: last, blanks: missing }',
]);

const HANG_MS = 5000;

async function ingestBounded(content: string | Uint8Array): Promise<IngestOutcome> {
  await writeFile(path.join(dir, 'data.csv'), content);
  let timer: NodeJS.Timeout | undefined;
  const hang = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`ingest did not finish within ${HANG_MS} ms`)), HANG_MS);
  });
  try {
    return await Promise.race([ingest(PLAN, dir), hang]);
  } finally {
    clearTimeout(timer);
  }
}

/** Succeeds, or every problem is a LeadlineError naming the file; series are self-consistent. */
function checkOutcome(out: IngestOutcome): void {
  expect(out.filesRead).toBe(1);
  for (const f of out.failures) {
    expect(f.error).toBeInstanceOf(LeadlineError);
    expect(f.error.file).toBe('data.csv');
    expect(['too-short', 'error']).toContain(f.verdict);
  }
  for (const s of out.series) {
    expect(s.rows.length).toBe(s.values.length);
    if (s.times) {
      expect(s.times.length).toBe(s.values.length);
      for (let i = 1; i < s.times.length; i++) expect(s.times[i]!).toBeGreaterThan(s.times[i - 1]!);
    }
    let observed = 0;
    for (let i = 0; i < s.values.length; i++) {
      if (!Number.isNaN(s.values[i]!)) {
        observed++;
        expect(Number.isFinite(s.values[i]!)).toBe(true);
        expect(s.rows[i]!).toBeGreaterThan(1);
      }
    }
    expect(observed).toBeGreaterThanOrEqual(3);
  }
}

const tally = { series: 0, failures: 0, thrown: 0 };

/** Runs ingestion; anything thrown must be a LeadlineError. */
async function property(content: string | Uint8Array): Promise<void> {
  let out: IngestOutcome;
  try {
    out = await ingestBounded(content);
  } catch (e) {
    expect(e).toBeInstanceOf(LeadlineError);
    tally.thrown++;
    return;
  }
  checkOutcome(out);
  tally.series += out.series.length;
  tally.failures += out.failures.length;
}

const tokens = [
  't',
  'v',
  'w',
  'k',
  '',
  ' ',
  '1',
  '2.5',
  '-3',
  '1e3',
  'x',
  'NaN',
  '"',
  '""',
  '"a,b"',
  '"x\ny"',
  '\uFEFF',
  '2024-01-01',
  '2024-01-02',
  '2024-01-03',
  '2024-01-05',
  '2024-02-30',
  '2024-01-01T10:00Z',
  '2024-01-01T10:00+02:00',
  '1700000000',
  '1700086400',
  '1700000000000',
  '2021',
  'a',
  'b',
  ',',
  ';',
  '\t',
  '\n',
  '\r\n',
  '\r',
  '\u0000',
  'é',
];

const csvLike = fc
  .tuple(
    fc.constantFrom(',', ';', '\t'),
    fc.shuffledSubarray(['t', 'v', 'w', 'k', 'z'], { minLength: 0 }),
    fc.array(fc.array(fc.constantFrom(...tokens), { maxLength: 6 }), { maxLength: 40 }),
    fc.constantFrom('\n', '\r\n'),
  )
  .map(([d, header, rows, eol]) => [header.join(d), ...rows.map((r) => r.join(d))].join(eol));

const noise = fc.constantFrom('', ' ', 'x', '"', '1,5', 'NaN', '2024-02-30', '\u0000');
const cellFor: Record<string, fc.Arbitrary<string>> = {
  t: fc.oneof(
    {
      weight: 12,
      arbitrary: fc
        .integer({ min: 0, max: 40 })
        .map((d) => new Date(Date.UTC(2024, 0, 1 + d)).toISOString().slice(0, 10)),
    },
    { weight: 1, arbitrary: noise },
  ),
  v: fc.oneof(
    { weight: 12, arbitrary: fc.double({ noNaN: true, noDefaultInfinity: true }).map(String) },
    { weight: 1, arbitrary: noise },
  ),
  w: fc.oneof({ weight: 8, arbitrary: fc.integer().map(String) }, { weight: 1, arbitrary: noise }),
  k: fc.constantFrom('a', 'b', '"a"', ''),
  z: fc.string({ maxLength: 5 }),
};

/** Mostly well-formed files with occasional bad cells, so both outcomes are reached. */
const csvStructured = fc
  .tuple(
    fc.constantFrom(',', ';', '\t'),
    fc.constantFrom('\n', '\r\n', '\r'),
    fc.boolean(),
    fc.shuffledSubarray(['t', 'v', 'w', 'k', 'z'], { minLength: 1 }),
  )
  .chain(([d, eol, bom, header]) =>
    fc
      .array(fc.tuple(...header.map((h) => cellFor[h]!)), { maxLength: 30 })
      .map(
        (rows) =>
          `${bom ? '\uFEFF' : ''}${[header.join(d), ...rows.map((r) => r.map((c) => (c.includes(d) ? `"${c}"` : c)).join(d))].join(eol)}${eol}`,
      ),
  );

describe('ingestion never fails with anything but a LeadlineError', () => {
  it('on random bytes', async () => {
    await fc.assert(fc.asyncProperty(fc.uint8Array({ maxLength: 3000 }), property), { numRuns: 150 });
  });

  it('on random text', async () => {
    await fc.assert(fc.asyncProperty(fc.string({ unit: 'binary', maxLength: 2000 }), property), {
      numRuns: 150,
    });
  });

  it('on random CSV-like text', async () => {
    await fc.assert(fc.asyncProperty(csvLike, property), { numRuns: 300 });
  });

  it('on mostly well-formed CSV with occasional bad cells, reaching both outcomes', async () => {
    const before = { ...tally };
    await fc.assert(fc.asyncProperty(csvStructured, property), { numRuns: 300 });
    // The generator is meant to reach the success path and the failure path, not only one.
    expect(tally.series - before.series).toBeGreaterThan(0);
    expect(tally.failures - before.failures).toBeGreaterThan(0);
  });
});

describe('shuffled daily rows with gaps land on the right grid points', () => {
  it('recovers every value at its date, NaN in the gaps', async () => {
    const DAY = 86_400_000;
    const start = Date.UTC(2024, 0, 1);
    const gen = fc.integer({ min: 8, max: 60 }).chain((n) =>
      fc.record({
        n: fc.constant(n),
        drop: fc.uniqueArray(fc.integer({ min: 1, max: n - 2 }), { maxLength: Math.floor(n / 5) }),
        values: fc.array(fc.integer({ min: -1e6, max: 1e6 }), { minLength: n, maxLength: n }),
        seed: fc.integer(),
      }),
    );
    await fc.assert(
      fc.asyncProperty(gen, async ({ n, drop, values, seed }) => {
        const kept = [...Array(n).keys()].filter((d) => !drop.includes(d));
        // Deterministic shuffle from the seed.
        const order = kept.map((d, i) => ({ d, r: Math.sin(seed + i * 7.13) }));
        order.sort((a, b) => a.r - b.r);
        const lines = order.map(
          ({ d }) => `${new Date(start + d * DAY).toISOString().slice(0, 10)},${values[d]}`,
        );
        const out = await ingestBounded(`t,v,w,k\n${lines.map((l) => `${l},1,a`).join('\n')}\n`);
        const s = out.series.find((x) => x.name === 'timed')!;
        expect(s.spacing).toBe('day');
        expect(s.values.length).toBe(n);
        for (let d = 0; d < n; d++) {
          expect(s.times![d]).toBe(start + d * DAY);
          if (drop.includes(d)) {
            expect(s.values[d]).toBeNaN();
            expect(s.rows[d]).toBe(0);
          } else {
            expect(s.values[d]).toBe(values[d]);
            expect(s.rows[d]).toBe(2 + order.findIndex((o) => o.d === d));
          }
        }
      }),
      { numRuns: 100 },
    );
  });
});
