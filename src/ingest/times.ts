// Time cells -> epoch milliseconds (UTC).
//
// Accepted forms:
// - ISO 8601 calendar dates and datetimes in extended form: 2024-03-01, 2024-03, 2024-03-01T12:00,
//   2024-03-01T12:00:30.250, with "T" or a space, and an optional offset Z, +02:00, +0200 or +02.
//   Offsets are applied (the result is UTC). A datetime WITHOUT an offset is read as UTC, and a note
//   says so; a date alone is midnight UTC.
// - Numbers (a whole column of them): epoch seconds when every |value| < 1e11, epoch milliseconds
//   otherwise (1e11 s is the year 5138, 1e11 ms is March 1973, so the two ranges do not meet for
//   data from 1973 to 5138). A column of four-digit whole numbers (1000–9999) is read as ISO 8601
//   years instead (2021, 2022 …), since epoch seconds in that range fall within 1970's first 3 hours.

export const TimeKind = {
  /** ISO with an explicit offset (or Z). */
  Offset: 0,
  /** ISO datetime without offset: read as UTC. */
  Naive: 1,
  /** ISO date (or year-month) alone. */
  Date: 2,
  /** A plain number: epoch seconds/ms or a year, decided for the whole column. */
  Number: 3,
  Blank: 4,
  Invalid: 5,
} as const;
export type TimeKind = (typeof TimeKind)[keyof typeof TimeKind];

const ISO =
  /^(\d{4})-(\d{2})(?:-(\d{2})(?:[Tt ](\d{2}):(\d{2})(?::(\d{2})(?:[.,](\d{1,9}))?)?\s*([Zz]|[+-]\d{2}(?::?\d{2})?)?)?)?$/;
const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

function daysInMonth(y: number, m: number): number {
  return new Date(Date.UTC(y, m, 0)).getUTCDate();
}

/** Parses one time cell. For TimeKind.Number, `value` is the number as written (resolved later). */
export function parseTimeCell(text: string): { kind: TimeKind; value: number } {
  const s = text.trim();
  if (s === '') return { kind: TimeKind.Blank, value: NaN };
  if (NUMBER.test(s)) {
    const v = Number(s);
    return Number.isFinite(v) ? { kind: TimeKind.Number, value: v } : { kind: TimeKind.Invalid, value: NaN };
  }
  const m = ISO.exec(s);
  if (!m) return { kind: TimeKind.Invalid, value: NaN };
  const y = Number(m[1]);
  const mo = Number(m[2]);
  const d = m[3] === undefined ? 1 : Number(m[3]);
  if (mo < 1 || mo > 12 || d < 1 || d > daysInMonth(y, mo)) return { kind: TimeKind.Invalid, value: NaN };
  if (m[4] === undefined) return { kind: TimeKind.Date, value: Date.UTC(y, mo - 1, d) };
  const hh = Number(m[4]);
  const mm = Number(m[5]);
  const ss = m[6] === undefined ? 0 : Number(m[6]);
  const frac = m[7] === undefined ? 0 : Number(`0.${m[7]}`);
  if (hh > 23 || mm > 59 || ss > 59) return { kind: TimeKind.Invalid, value: NaN };
  let ms = Date.UTC(y, mo - 1, d, hh, mm, ss) + Math.round(frac * 1000);
  const off = m[8];
  if (off === undefined) return { kind: TimeKind.Naive, value: ms };
  if (off !== 'Z' && off !== 'z') {
    const sign = off[0] === '-' ? -1 : 1;
    const digits = off.slice(1).replace(':', '');
    const oh = Number(digits.slice(0, 2));
    const om = digits.length > 2 ? Number(digits.slice(2, 4)) : 0;
    if (oh > 23 || om > 59) return { kind: TimeKind.Invalid, value: NaN };
    ms -= sign * (oh * 60 + om) * 60_000;
  }
  return { kind: TimeKind.Offset, value: ms };
}

/** How a column of plain numbers is read. */
export type NumberTimeUnit = 'seconds' | 'milliseconds' | 'years';

/** Decides the unit of an all-number time column from its values (see the header comment). */
export function numberTimeUnit(values: ArrayLike<number>, count: number): NumberTimeUnit {
  let years = count > 0;
  let maxAbs = 0;
  for (let i = 0; i < count; i++) {
    const v = values[i]!;
    if (years && !(Number.isInteger(v) && v >= 1000 && v <= 9999)) years = false;
    const a = Math.abs(v);
    if (a > maxAbs) maxAbs = a;
  }
  if (years) return 'years';
  return maxAbs < 1e11 ? 'seconds' : 'milliseconds';
}

export function numberToMs(v: number, unit: NumberTimeUnit): number {
  if (unit === 'years') return Date.UTC(v, 0, 1);
  return unit === 'seconds' ? Math.round(v * 1000) : Math.round(v);
}

export function kindName(kind: TimeKind): string {
  return kind === TimeKind.Number ? 'a number (epoch time or year)' : 'an ISO 8601 date or datetime';
}
