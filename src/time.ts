// Times on a series' regular grid, as ISO 8601 UTC strings for results and reports. Calendar steps
// use the grid's own month arithmetic (src/ingest/grid.ts addMonths): a month-end series stays on
// month ends, so forecast times, limit crossings and chart axes keep to the series' grid.
import type { Series } from './ingest/types.js';
import { addMonths } from './ingest/grid.js';
import type { Spacing } from './terms.js';

const MONTHS: Partial<Record<Spacing, number>> = { month: 1, quarter: 3, year: 12 };

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
  if (months !== undefined) return isoTime(addMonths(last, months * step));
  if (s.stepMs === null) return null;
  return isoTime(last + s.stepMs * step);
}
