// Time and verdict wording shared by the markdown and HTML reports. Numbers, p-values and counted
// nouns are formatted by src/text.
import type { Spacing, Verdict } from '../results.js';
import { shorten } from '../text/index.js';

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
 * `too-short`, `error`). `too-short` replaced an earlier code for the same state before any release;
 * otherwise results are version 1, so values are added, never renamed.
 */
export const VERDICT_LABEL: Record<Verdict, string> = {
  ok: 'steady',
  alarm: 'out of line',
  'at-risk': 'limit at risk',
  'too-short': 'too short',
  error: 'error',
};

/** Emoji for the markdown report (GitHub renders them everywhere, in light and dark themes). */
export const VERDICT_ICON: Record<Verdict, string> = {
  ok: '🟢',
  alarm: '🔴',
  'at-risk': '🟠',
  'too-short': '⚪',
  error: '⛔',
};

export const METHOD_LABEL: Record<string, string> = {
  mean: 'mean',
  naive: 'naive',
  'seasonal-naive': 'seasonal naive',
  drift: 'drift',
};

/** Step units for sentences (src/terms.ts). */
export { STEP_UNIT } from '../terms.js';

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

/** Longest series name or key a report shows whole; longer ones are cut (results keep them whole). */
export const REPORT_NAME_MAX = 200;

/** A series' name or key as every report shows it (markdown, HTML, chart titles): cut to REPORT_NAME_MAX characters, not yet escaped. */
export function reportName(text: string): string {
  return shorten(text, REPORT_NAME_MAX);
}
