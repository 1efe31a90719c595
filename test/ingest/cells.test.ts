// The per-cell fast paths against the general ones they stand in for: plain decimal cells against
// Number() (the reference: ECMAScript's correctly rounded string-to-number conversion), and ISO
// times against Date.prototype.toISOString.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseNumberCell, plainDecimal } from '../../src/ingest/read.js';
import { isoTime } from '../../src/time.js';

const same = (a: number, b: number): boolean => Object.is(a, b);

describe('plain decimal cells', () => {
  it('equal Number() bit for bit, or are left to the general way', () => {
    const digits = (max: number) => fc.stringMatching(new RegExp(`^[0-9]{0,${max}}$`));
    const cell = fc
      .tuple(fc.constantFrom('', '-', '+'), digits(18), fc.boolean(), digits(25))
      .map(([sign, whole, point, frac]) => `${sign}${whole}${point ? '.' : ''}${point ? frac : ''}`);
    fc.assert(
      fc.property(cell, (s) => {
        const fast = plainDecimal(s);
        if (!Number.isNaN(fast)) expect(same(fast, Number(s))).toBe(true);
        const general = parseNumberCell(s);
        // Whichever way it went, the cell reads as Number() says (or is refused as before).
        if (/[0-9]/.test(s)) expect(same(general.value, Number(s))).toBe(true);
        else expect(general.value).toBeNaN();
      }),
      { numRuns: 3000 },
    );
  });

  it('take the fast way for the usual cells and leave the rest', () => {
    // Values a metric export writes; the doubles are what Number() gives (worked: 0.1 + 0.2 is not 0.3,
    // but the cell "0.3" is the double nearest 3/10).
    for (const [s, v] of [
      ['123.45', 123.45],
      ['-0.5', -0.5],
      ['+7', 7],
      ['5.', 5],
      ['.25', 0.25],
      ['0.3', 0.3],
      ['9007199254740991', 2 ** 53 - 1],
      ['-0', -0],
      ['-0.00', -0],
    ] as const)
      expect(same(plainDecimal(s), v)).toBe(true);
    for (const s of [
      '',
      '-',
      '.',
      '1e5',
      ' 5',
      '5 ',
      '1.2.3',
      '9007199254740992',
      '900719925474099.3',
      `1.${'0'.repeat(23)}`,
      '٣',
      'NaN',
    ])
      expect(plainDecimal(s)).toBeNaN();
    // The general way still reads what the fast way leaves.
    expect(parseNumberCell(' 5 ').value).toBe(5);
    expect(parseNumberCell('1e5').value).toBe(1e5);
    expect(parseNumberCell('9007199254740993').value).toBe(9007199254740992);
  });
});

describe('ISO times', () => {
  it('equal toISOString for every millisecond count, in range or not', () => {
    const ms = fc.oneof(
      fc.integer({ min: 0, max: 253_402_300_799_999 }),
      fc.integer({ min: -8_640_000_000_000_000, max: 8_640_000_000_000_000 }),
      fc.double({ min: -1e15, max: 1e15, noNaN: true }),
    );
    fc.assert(
      fc.property(ms, (t) => {
        expect(isoTime(t)).toBe(new Date(t).toISOString());
      }),
      { numRuns: 5000 },
    );
  });

  it('at the calendar edges: leap days, century years, the ends of the range', () => {
    for (const iso of [
      '1970-01-01T00:00:00.000Z',
      '1999-12-31T23:59:59.999Z',
      '2000-02-29T12:00:00.000Z',
      '2100-02-28T00:00:00.001Z',
      '2100-03-01T00:00:00.000Z',
      '2024-02-29T00:00:00.000Z',
      '2400-02-29T23:59:59.999Z',
      '9999-12-31T23:59:59.999Z',
    ])
      expect(isoTime(Date.parse(iso))).toBe(iso);
    // Days met again (their date part is kept), at other times of day.
    for (const day of [0, 19_723, 2_932_896])
      for (const rest of [0, 1, 999, 59_999, 3_600_000, 86_399_999, 0, 45_296_789]) {
        const t = day * 86_400_000 + rest;
        expect(isoTime(t)).toBe(new Date(t).toISOString());
      }
    expect(isoTime(Date.UTC(10000, 0, 1))).toBe('+010000-01-01T00:00:00.000Z');
    expect(isoTime(-1)).toBe('1969-12-31T23:59:59.999Z');
    expect(() => isoTime(NaN)).toThrow(RangeError);
  });
});
