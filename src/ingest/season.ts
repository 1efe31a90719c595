// `season: auto`: the season length implied by the time spacing.
import type { Spacing } from '../terms.js';

const MINUTE = 60_000;
const HOUR = 60 * MINUTE;
const DAY = 24 * HOUR;
const WEEK = 7 * DAY;

/** Cycle length in steps when `cycleMs` is a whole number (at least 2) of steps, else 1. */
function stepsPer(cycleMs: number, stepMs: number): number {
  const k = cycleMs / stepMs;
  return Number.isInteger(k) && k >= 2 ? k : 1;
}

/**
 * The season for `season: auto` (issue 3's rule), `points` being the number of observations:
 * - hour: a day (24 for hourly steps; 12 for 2-hour steps …);
 * - day: a week (7; steps of several days have none);
 * - week: a year (52 for weekly steps, 26 for fortnightly), only with at least two years of
 *   observations (points ≥ 2 × season), since one year shows no yearly pattern;
 * - month 12, quarter 4;
 * - minute (steps under an hour): a day (e.g. 288 for 5-minute steps) with at least two days of
 *   observations — our choice, the issue names no season for minutes;
 * - year and row order: none (1).
 * `stepMs` null means the spacing's single unit.
 */
export function autoSeason(spacing: Spacing, points: number, stepMs: number | null): number {
  switch (spacing) {
    case 'month':
      return 12;
    case 'quarter':
      return 4;
    case 'hour':
      return stepsPer(DAY, stepMs ?? HOUR);
    case 'day':
      return stepsPer(WEEK, stepMs ?? DAY);
    case 'week': {
      const m = stepsPer(52 * WEEK, stepMs ?? WEEK);
      return m > 1 && points >= 2 * m ? m : 1;
    }
    case 'minute': {
      const m = stepsPer(DAY, stepMs ?? MINUTE);
      return m > 1 && points >= 2 * m ? m : 1;
    }
    default:
      return 1;
  }
}

const SPACING_PHRASE: Record<Spacing, string> = {
  minute: 'minute spacing',
  hour: 'hourly spacing',
  day: 'daily spacing',
  week: 'weekly spacing',
  month: 'monthly spacing',
  quarter: 'quarterly spacing',
  year: 'yearly spacing',
  row: 'row order',
};

export interface SeasonChoice {
  season: number;
  source: 'config' | 'auto';
  /** Says what `auto` chose, or null for a configured season. */
  note: string | null;
}

/** The season of a series: the configured one, or for `auto` the one its spacing implies. */
export function chooseSeason(
  setting: number | 'auto',
  s: { spacing: Spacing; stepMs: number | null },
  observations: number,
): SeasonChoice {
  if (setting !== 'auto') return { season: setting, source: 'config', note: null };
  const season = autoSeason(s.spacing, observations, s.stepMs);
  return {
    season,
    source: 'auto',
    note: `Season chosen from the ${SPACING_PHRASE[s.spacing]}: ${season === 1 ? 'none' : season}.`,
  };
}
