// Spacing inference and the regular grid.
//
// Spacing comes from the median difference between consecutive distinct times:
// - about a month (27.5–31.5 days), a quarter (88–93 days) or a year (364.5–366.5 days) is a calendar
//   spacing, aligned by calendar month rather than milliseconds — unless every difference is the
//   same whole number of weeks and the times do not keep to one day of the month (4 or 13 weeks);
// - otherwise the step is the median rounded to a whole number of weeks, days, hours or minutes
//   (the largest unit within 2%), or of seconds below a minute; the spacing is named after that unit,
//   and stepMs carries the exact step (e.g. 'minute' with stepMs 300000 for five minutes).
// Each time is placed at the nearest grid point counted from the first time; times that are off
// the grid (a job that ran a few minutes late, a daylight-saving shift in the offsets) are moved to
// it and a note says how far the largest move was. Grid points without a row are gaps (NaN).
import type { Spacing } from '../terms.js';
import { plural } from '../text/index.js';

const SECOND = 1000;
const MINUTE = 60 * SECOND;
const HOUR = 60 * MINUTE;
const DAY = 24 * HOUR;
const WEEK = 7 * DAY;

export interface GridSpec {
  spacing: Spacing;
  /** Fixed step in ms, or null for calendar spacings. */
  stepMs: number | null;
  /** Calendar months per step for calendar spacings. */
  months: number | null;
}

function median(sorted: Float64Array): number {
  const n = sorted.length;
  return n % 2 === 1 ? sorted[(n - 1) / 2]! : (sorted[n / 2 - 1]! + sorted[n / 2]!) / 2;
}

/** Every time on the same day of the month (or every one on a month's last day) and time of day. */
function calendarAligned(times: Float64Array): boolean {
  const parts = (ms: number) => {
    const t = new Date(ms);
    const y = t.getUTCFullYear();
    const m = t.getUTCMonth();
    const day = t.getUTCDate();
    return { day, last: day === lastDayOfMonth(y, m), clock: ms - Date.UTC(y, m, day) };
  };
  const first = parts(times[0]!);
  return Array.from(times).every((ms) => {
    const p = parts(ms);
    return p.clock === first.clock && (p.day === first.day || (p.last && first.last));
  });
}

/** Infers the spacing from ascending distinct times (at least two). */
export function inferSpacing(distinct: Float64Array): GridSpec {
  const diffs = new Float64Array(distinct.length - 1);
  for (let i = 1; i < distinct.length; i++) diffs[i - 1] = distinct[i]! - distinct[i - 1]!;
  const allEqual = diffs.every((d) => d === diffs[0]);
  diffs.sort();
  const d = median(diffs);
  // Equal whole-week steps that do not keep to a day of the month are 4 or 13 weeks, not months.
  const weekly = allEqual && d % WEEK === 0 && !calendarAligned(distinct);
  if (d >= 27.5 * DAY && d <= 31.5 * DAY && !weekly) return { spacing: 'month', stepMs: null, months: 1 };
  if (d >= 88 * DAY && d <= 93 * DAY && !weekly) return { spacing: 'quarter', stepMs: null, months: 3 };
  if (d >= 364.5 * DAY && d <= 366.5 * DAY) return { spacing: 'year', stepMs: null, months: 12 };
  const units: [number, Spacing][] = [
    [WEEK, 'week'],
    [DAY, 'day'],
    [HOUR, 'hour'],
    [MINUTE, 'minute'],
  ];
  for (const [u, name] of units) {
    const k = Math.round(d / u);
    if (k >= 1 && Math.abs(d - k * u) <= 0.02 * k * u) return { spacing: name, stepMs: k * u, months: null };
  }
  return {
    spacing: 'minute',
    stepMs: Math.max(1, Math.round(d / SECOND) * SECOND || Math.round(d)),
    months: null,
  };
}

function monthIndex(ms: number): number {
  const t = new Date(ms);
  return t.getUTCFullYear() * 12 + t.getUTCMonth();
}

function lastDayOfMonth(y: number, m: number): number {
  return new Date(Date.UTC(y, m + 1, 0)).getUTCDate();
}

/**
 * Adds calendar months in UTC keeping the time of day; the day of month is kept where it exists,
 * else the month's last day; a start on a month's last day stays on last days (Jan 31, Feb 29, Mar 31).
 */
export function addMonths(start: number, months: number): number {
  const s = new Date(start);
  const y = s.getUTCFullYear();
  const m = s.getUTCMonth();
  const day = s.getUTCDate();
  const endOfMonth = day === lastDayOfMonth(y, m);
  const ty = Math.floor((y * 12 + m + months) / 12);
  const tm = (((m + months) % 12) + 12) % 12;
  const last = lastDayOfMonth(ty, tm);
  const td = endOfMonth ? last : Math.min(day, last);
  const dayMs = start - Date.UTC(y, m, day);
  return Date.UTC(ty, tm, td) + dayMs;
}

/** Grid index of `t` relative to `t0`, and how far `t` is from that grid point (ms). */
export function gridIndex(spec: GridSpec, t0: number, t: number): { index: number; offset: number } {
  if (spec.months !== null) {
    const months = monthIndex(t) - monthIndex(t0);
    const index = Math.round(months / spec.months);
    return { index, offset: t - addMonths(t0, index * spec.months) };
  }
  const step = spec.stepMs!;
  const index = Math.round((t - t0) / step);
  return { index, offset: t - (t0 + index * step) };
}

export function gridTime(spec: GridSpec, t0: number, index: number): number {
  return spec.months !== null ? addMonths(t0, index * spec.months) : t0 + index * spec.stepMs!;
}

/** "3 hours", "2 days" — for notes about moved times. */
export function describeMs(ms: number): string {
  const a = Math.abs(ms);
  const pick: [number, string][] = [
    [DAY, 'day'],
    [HOUR, 'hour'],
    [MINUTE, 'minute'],
    [SECOND, 'second'],
  ];
  for (const [u, name] of pick) {
    if (a >= u) {
      const v = Math.round((a / u) * 10) / 10;
      return plural(v, name);
    }
  }
  return `${a} ms`;
}

/** Human name of one step, e.g. "day", "5 minutes", "month". */
export function describeStep(spec: GridSpec): string {
  if (spec.months !== null) return spec.spacing;
  const unit: Partial<Record<Spacing, number>> = { week: WEEK, day: DAY, hour: HOUR, minute: MINUTE };
  const u = unit[spec.spacing]!;
  const k = spec.stepMs! / u;
  return Number.isInteger(k) && k !== 1
    ? `${k} ${spec.spacing}s`
    : k === 1
      ? spec.spacing
      : describeMs(spec.stepMs!);
}
