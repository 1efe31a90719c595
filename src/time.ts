// Times on a series' regular grid, as ISO 8601 UTC strings for results and reports.
import type { Series } from './ingest/types.js';
import type { Spacing } from './terms.js';

const MONTHS: Partial<Record<Spacing, number>> = { month: 1, quarter: 3, year: 12 };

/** Adds whole calendar months in UTC, keeping the day of month where it exists (else the month's last day). */
export function addMonthsUtc(ms: number, months: number): number {
  const d = new Date(ms);
  const day = d.getUTCDate();
  const target = new Date(
    Date.UTC(
      d.getUTCFullYear(),
      d.getUTCMonth() + months,
      1,
      d.getUTCHours(),
      d.getUTCMinutes(),
      d.getUTCSeconds(),
      d.getUTCMilliseconds(),
    ),
  );
  const lastDay = new Date(Date.UTC(target.getUTCFullYear(), target.getUTCMonth() + 1, 0)).getUTCDate();
  target.setUTCDate(Math.min(day, lastDay));
  return target.getTime();
}

export function isoTime(ms: number): string {
  return new Date(ms).toISOString();
}

/** ISO time of the point at `index`, or null for row-order series. */
export function timeAtIndex(s: Pick<Series, 'times'>, index: number): string | null {
  if (!s.times) return null;
  const t = s.times[index];
  return t === undefined || Number.isNaN(t) ? null : isoTime(t);
}

/** ISO time `step` grid steps after the last point, or null when the series has no times. */
export function timeAfterLast(s: Pick<Series, 'times' | 'spacing' | 'stepMs'>, step: number): string | null {
  if (!s.times || s.times.length === 0) return null;
  const last = s.times[s.times.length - 1]!;
  const months = MONTHS[s.spacing];
  if (months !== undefined) return isoTime(addMonthsUtc(last, months * step));
  if (s.stepMs === null) return null;
  return isoTime(last + s.stepMs * step);
}
