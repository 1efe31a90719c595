// The spool a run keeps its analysed series in (src/spool.ts): every record comes back exactly as it
// went in (V8's serialiser: NaN, -0, undefined and typed arrays included), in order, as often as
// asked, records larger than a write batch included; close() removes the folder.
import { existsSync, readdirSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fileSpool, memorySpool } from '../../src/spool.js';

const records = [
  { name: 'a', values: [1, NaN, -0, Infinity], missing: undefined, at: new Float64Array([0.1, -2]) },
  { name: 'b', nested: { deep: [null, 'x'.repeat(3_000_000)] } }, // larger than the 1 MiB write batch
  ...Array.from({ length: 2_000 }, (_, i) => ({ name: `s${i}`, value: i / 7 })),
];

describe('fileSpool', () => {
  it('gives every record back exactly and in order, twice, then removes its folder', () => {
    const spool = fileSpool<unknown>();
    for (const r of records) spool.add(r);
    expect(spool.bytes).toBeGreaterThan(3_000_000);
    const folder = spool.folder!;
    expect(readdirSync(folder)).toEqual(['series.bin']);
    for (let pass = 0; pass < 2; pass++) {
      const back = [...spool.read()];
      expect(back).toHaveLength(records.length);
      // toStrictEqual tells -0 from 0, NaN from null and a missing key from one holding undefined.
      expect(back).toStrictEqual(records);
      expect(Object.is((back[0] as { values: number[] }).values[2], -0)).toBe(true);
      expect((back[0] as { at: unknown }).at).toBeInstanceOf(Float64Array);
    }
    expect(() => spool.add({})).toThrow(/closed or being read/);
    spool.close();
    expect(existsSync(folder)).toBe(false);
    expect(() => [...spool.read()]).toThrow(/closed/);
  });

  it('reads only the records asked for, with their places, in order', () => {
    for (const spool of [fileSpool<unknown>(), memorySpool<unknown>()]) {
      records.forEach((r) => spool.add(r));
      const back = [...spool.readSome(new Set([2_001, 1, 7]))];
      expect(back).toStrictEqual([
        [1, records[1]],
        [7, records[7]],
        [2_001, records[2_001]],
      ]);
      expect([...spool.readSome(new Set())]).toEqual([]);
      expect([...spool.readSome(new Set([records.length + 5]))]).toEqual([]);
      spool.close();
    }
  });

  it('is empty when nothing was added', () => {
    const spool = fileSpool<unknown>();
    expect([...spool.read()]).toEqual([]);
    spool.close();
  });
});

describe('memorySpool', () => {
  it('holds the records themselves, in order', () => {
    const spool = memorySpool<object>();
    records.forEach((r) => spool.add(r));
    const back = [...spool.read()];
    expect(back.every((r, i) => r === records[i])).toBe(true);
    expect(spool.folder).toBeNull();
    spool.close();
    expect(() => [...spool.read()]).toThrow(/closed/);
  });
});
