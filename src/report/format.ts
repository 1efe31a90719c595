// Number, time and verdict wording shared by the markdown and HTML reports.
import type { Spacing, Verdict } from '../results.js';

const fmt4 = new Intl.NumberFormat('en-US', { maximumSignificantDigits: 4 });
const fmt6 = new Intl.NumberFormat('en-US', { maximumSignificantDigits: 6 });

/** A value for people: four significant digits with thousands separators; "n/a" when not finite. */
export function num(x: number | null | undefined, digits: 4 | 6 = 4): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return 'n/a';
  if (x !== 0 && Math.abs(x) < 1e-4) return x.toExponential(2);
  return (digits === 6 ? fmt6 : fmt4).format(x === 0 ? 0 : x);
}

/** A p-value: three significant digits, "< 0.001" below that. */
export function pval(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return 'n/a';
  if (p < 0.001) return '< 0.001';
  return String(Number(p.toPrecision(2)));
}

/** A share as a percentage, e.g. 0.934 -> "93.4%". */
export function pct(x: number | null | undefined, decimals = 1): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return 'n/a';
  return `${(x * 100).toFixed(decimals)}%`;
}

/** A time for tables: the date alone for whole days, otherwise date and time in UTC. */
export function when(iso: string | null, spacing?: Spacing): string | null {
  if (iso === null) return null;
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return null;
  const s = d.toISOString();
  const date = s.slice(0, 10);
  if (spacing === 'month' || spacing === 'quarter') return date.slice(0, 7);
  if (spacing === 'year') return date.slice(0, 4);
  if (s.slice(11, 19) === '00:00:00' && spacing !== 'hour' && spacing !== 'minute') return date;
  return `${date} ${s.slice(11, 16)} UTC`;
}

/** A short axis label: "11-29" for days, "29 14:00" for hours, "2026-11" for months, "#12" for rows. */
export function shortWhen(iso: string | null, spacing: Spacing, index: number): string {
  if (iso === null || spacing === 'row') return `#${index + 1}`;
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return `#${index + 1}`;
  const s = d.toISOString();
  switch (spacing) {
    case 'minute':
    case 'hour':
      return `${s.slice(8, 10)} ${s.slice(11, 16)}`;
    case 'month':
    case 'quarter':
      return s.slice(0, 7);
    case 'year':
      return s.slice(0, 4);
    default:
      return s.slice(5, 10);
  }
}

/**
 * The one word for each verdict wherever a person reads it: reports, terminal, counts and the log.
 * The results JSON and the Action's `verdict` output keep the codes (`ok`, `alarm`, `at-risk`,
 * `insufficient-data`, `error`): results are version 1, so values are added, never renamed.
 */
export const VERDICT_LABEL: Record<Verdict, string> = {
  ok: 'steady',
  alarm: 'out of line',
  'at-risk': 'limit at risk',
  'insufficient-data': 'too short',
  error: 'error',
};

/** Emoji for the markdown report (GitHub renders them everywhere, in light and dark themes). */
export const VERDICT_ICON: Record<Verdict, string> = {
  ok: '🟢',
  alarm: '🔴',
  'at-risk': '🟠',
  'insufficient-data': '⚪',
  error: '⛔',
};

export const METHOD_LABEL: Record<string, string> = {
  mean: 'mean',
  naive: 'naive',
  'seasonal-naive': 'seasonal naive',
  drift: 'drift',
};

export function plural(n: number, one: string, many = `${one}s`): string {
  return `${n} ${n === 1 ? one : many}`;
}

/** Step units for sentences, e.g. "day" for daily series, "row" for row order. */
export const STEP_UNIT: Record<Spacing, string> = {
  minute: 'minute',
  hour: 'hour',
  day: 'day',
  week: 'week',
  month: 'month',
  quarter: 'quarter',
  year: 'year',
  row: 'step',
};

export const SPACING_WORD: Record<Spacing, string> = {
  minute: 'every minute',
  hour: 'hourly',
  day: 'daily',
  week: 'weekly',
  month: 'monthly',
  quarter: 'quarterly',
  year: 'yearly',
  row: 'row order',
};
