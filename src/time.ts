// Times on a series' regular grid, as ISO 8601 UTC strings for results and reports. Calendar steps
// use the grid's own month arithmetic (src/ingest/grid.ts addMonths): a month-end series stays on
// month ends, so forecast times, limit crossings and chart axes keep to the series' grid.
import type { Series } from './ingest/types.js';
import { addMonths } from './ingest/grid.js';
import type { Spacing } from './terms.js';

const MONTHS: Partial<Record<Spacing, number>> = { month: 1, quarter: 3, year: 12 };

/** "00".."99". */
const TWO = Array.from({ length: 100 }, (_, k) => String(k).padStart(2, '0'));
const DAY_MS = 86_400_000;
/** 10000-01-01T00:00:00.000Z: from there on the year needs more than four digits. */
const YEAR_10000 = 253_402_300_800_000;

/** The date part "YYYY-MM-DDT" by day count since 1970 (series of a run share their days). */
const datePart = new Map<number, string>();
const DATE_PARTS = 100_000;

/**
 * `new Date(ms).toISOString()` (an integer ms from 1970 to year 9999 written directly, the rest by
 * Date itself): the civil date from the day count by Hinnant's days-to-civil algorithm
 * (proleptic Gregorian, as ECMAScript's Date), kept per day, then the time of day.
 */
export function isoTime(ms: number): string {
  if (!(ms >= 0 && ms < YEAR_10000) || ms !== Math.floor(ms)) return new Date(ms).toISOString();
  const days = Math.floor(ms / DAY_MS);
  let date = datePart.get(days);
  if (date === undefined) {
    if (datePart.size >= DATE_PARTS) datePart.clear();
    date = civilDate(days);
    datePart.set(days, date);
  }
  let rest = ms - days * DAY_MS;
  if (rest === 0) return `${date}00:00:00.000Z`;
  const hours = Math.floor(rest / 3_600_000);
  rest -= hours * 3_600_000;
  const minutes = Math.floor(rest / 60_000);
  rest -= minutes * 60_000;
  const seconds = Math.floor(rest / 1000);
  const milli = rest - seconds * 1000;
  return `${date}${TWO[hours]}:${TWO[minutes]}:${TWO[seconds]}.${String(milli).padStart(3, '0')}Z`;
}

/** "YYYY-MM-DDT" of a day count since 1970 (0 to the end of year 9999), Hinnant's days-to-civil. */
function civilDate(days: number): string {
  const z = days + 719_468; // days since 0000-03-01
  const era = Math.floor(z / 146_097);
  const doe = z - era * 146_097; // day of the 400-year era
  const yoe = Math.floor(
    (doe - Math.floor(doe / 1460) + Math.floor(doe / 36_524) - Math.floor(doe / 146_096)) / 365,
  );
  const doy = doe - (365 * yoe + Math.floor(yoe / 4) - Math.floor(yoe / 100)); // from March 1
  const mp = Math.floor((5 * doy + 2) / 153); // month from March, 0..11
  const day = doy - Math.floor((153 * mp + 2) / 5) + 1;
  const month = mp < 10 ? mp + 3 : mp - 9;
  const year = yoe + era * 400 + (month <= 2 ? 1 : 0);
  return `${year}-${TWO[month]}-${TWO[day]}T`;
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
