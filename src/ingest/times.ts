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
//   years instead (2021, 2022 …), since epoch seconds in that range fall within 1970's first 3 hours,
//   and a column of eight-digit whole numbers that are all calendar dates (20251231) is read as
//   YYYYMMDD dates, since as epoch seconds they would all fall in 1970–1973.
// - `timeFormat` (config) states the form instead of guessing: iso, yyyymmdd, year, epoch-seconds or
//   epoch-milliseconds; a cell of another form is then an error naming the setting.
// - Years are taken as written: 0024-03-01 is the year 24, never 1924. Times must lie within the
//   years 0001–9999 (ingest reports others as located errors).

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

/** 400 Gregorian years, in ms: the calendar repeats exactly after them. */
const GREGORIAN_CYCLE_MS = 146_097 * 86_400_000;

/** Date.UTC without its mapping of the years 0–99 to 1900–1999. */
export function utcMs(y: number, mo: number, d = 1, h = 0, mi = 0, s = 0): number {
  return y >= 0 && y < 100
    ? Date.UTC(y + 400, mo, d, h, mi, s) - GREGORIAN_CYCLE_MS
    : Date.UTC(y, mo, d, h, mi, s);
}

function daysInMonth(y: number, m: number): number {
  return new Date(utcMs(y, m, 0)).getUTCDate();
}

/** Earliest and latest times accepted: 0001-01-01 and the end of 9999 (UTC). */
export const MIN_TIME_MS = utcMs(1, 0, 1);
export const MAX_TIME_MS = Date.UTC(10000, 0, 1) - 1;

/** The forms `timeFormat` can state; `auto` decides from the cells. */
export const TIME_FORMATS = [
  'auto',
  'iso',
  'yyyymmdd',
  'year',
  'epoch-seconds',
  'epoch-milliseconds',
] as const;
export type TimeFormat = (typeof TIME_FORMATS)[number];

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
  if (m[4] === undefined) return { kind: TimeKind.Date, value: utcMs(y, mo - 1, d) };
  const hh = Number(m[4]);
  const mm = Number(m[5]);
  const ss = m[6] === undefined ? 0 : Number(m[6]);
  const frac = m[7] === undefined ? 0 : Number(`0.${m[7]}`);
  if (hh > 23 || mm > 59 || ss > 59) return { kind: TimeKind.Invalid, value: NaN };
  let ms = utcMs(y, mo - 1, d, hh, mm, ss) + Math.round(frac * 1000);
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
export type NumberTimeUnit = 'seconds' | 'milliseconds' | 'years' | 'yyyymmdd';

/** The ms of an 8-digit whole number read as YYYYMMDD, or NaN when it is no calendar date. */
export function yyyymmddToMs(v: number): number {
  if (!Number.isInteger(v) || v < 10_000_101 || v > 99_991_231) return NaN;
  const y = Math.floor(v / 10_000);
  const mo = Math.floor(v / 100) % 100;
  const d = v % 100;
  if (mo < 1 || mo > 12 || d < 1 || d > daysInMonth(y, mo)) return NaN;
  return utcMs(y, mo - 1, d);
}

/** Decides the unit of an all-number time column from its values (see the header comment). */
export function numberTimeUnit(values: ArrayLike<number>, count: number): NumberTimeUnit {
  let years = count > 0;
  let dates = count > 0;
  let maxAbs = 0;
  for (let i = 0; i < count; i++) {
    const v = values[i]!;
    if (years && !(Number.isInteger(v) && v >= 1000 && v <= 9999)) years = false;
    if (dates && Number.isNaN(yyyymmddToMs(v))) dates = false;
    const a = Math.abs(v);
    if (a > maxAbs) maxAbs = a;
  }
  if (years) return 'years';
  if (dates) return 'yyyymmdd';
  return maxAbs < 1e11 ? 'seconds' : 'milliseconds';
}

export function numberToMs(v: number, unit: NumberTimeUnit): number {
  if (unit === 'years') return Number.isInteger(v) ? utcMs(v, 0, 1) : NaN;
  if (unit === 'yyyymmdd') return yyyymmddToMs(v);
  return unit === 'seconds' ? Math.round(v * 1000) : Math.round(v);
}

export function kindName(kind: TimeKind): string {
  return kind === TimeKind.Number ? 'a number (epoch time or year)' : 'an ISO 8601 date or datetime';
}
