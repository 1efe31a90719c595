// Limit windows: a number of steps, or a duration converted to steps once the spacing is known.
import type { Spacing } from '../terms.js';
import type { DurationUnit, LimitOptions } from './types.js';
import { DURATION_PATTERN } from './schema.js';

const MINUTE = 60_000;
const DAY = 86_400_000;
/** Mean Gregorian month (365.2425 / 12 days), used only to relate months to fixed-length units. */
const MONTH_MS = (365.2425 / 12) * DAY;

const FIXED_MS: Partial<Record<DurationUnit, number>> = { m: MINUTE, h: 60 * MINUTE, d: DAY, w: 7 * DAY };
const MONTHS: Partial<Record<DurationUnit, number>> = { mo: 1, q: 3, y: 12 };
const SPACING_MONTHS: Partial<Record<Spacing, number>> = { month: 1, quarter: 3, year: 12 };
const SPACING_MS: Partial<Record<Spacing, number>> = {
  minute: MINUTE,
  hour: 60 * MINUTE,
  day: DAY,
  week: 7 * DAY,
};

/** Parses "30d", "12h", "6mo" …; null when the text is not a duration. */
export function parseDuration(text: string): { amount: number; unit: DurationUnit } | null {
  const m = DURATION_PATTERN.exec(text);
  if (!m) return null;
  const amount = Number(m[1]);
  if (!(amount > 0) || !Number.isFinite(amount)) return null;
  return { amount, unit: m[2] as DurationUnit };
}

/**
 * Converts a limit window to a whole number of steps: the fewest steps that cover the duration
 * (rounded up, at least 1). Months, quarters and years against a monthly/quarterly/yearly spacing
 * count calendar months exactly; between calendar and fixed units a month is 365.2425/12 days.
 * Returns null when a duration cannot apply: a row-order series has no time to measure it against.
 */
export function durationToSteps(
  within: LimitOptions['within'],
  spacing: Spacing,
  stepMs: number | null,
): number | null {
  if ('steps' in within) return within.steps;
  if (spacing === 'row') return null;
  const spacingMonths = SPACING_MONTHS[spacing];
  const unitMonths = MONTHS[within.unit];
  let steps: number;
  if (spacingMonths !== undefined && unitMonths !== undefined) {
    steps = (within.amount * unitMonths) / spacingMonths;
  } else {
    const durationMs =
      unitMonths !== undefined
        ? within.amount * unitMonths * MONTH_MS
        : within.amount * FIXED_MS[within.unit]!;
    const step = spacingMonths !== undefined ? spacingMonths * MONTH_MS : (stepMs ?? SPACING_MS[spacing]!);
    steps = durationMs / step;
  }
  // Tolerate floating-point noise so that 30d over a daily spacing is exactly 30 steps.
  return Math.max(1, Math.ceil(steps - 1e-9));
}
