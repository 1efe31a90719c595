// Leadline's shared words: the small vocabularies that the config, the stages and the results
// contract all speak. They live here, not in results.ts, so that reading a config does not import the
// results contract; results.ts builds its schema from these lists and re-exports the types.

/** A series' or the run's verdict (docs/design.md glossary). Severity order lives in src/verdict.ts. */
export const VERDICTS = ['ok', 'alarm', 'at-risk', 'too-short', 'error'] as const;
export type Verdict = (typeof VERDICTS)[number];

/** Which side of the interval is bad. */
export const DIRECTIONS = ['above', 'below', 'both'] as const;
export type Direction = (typeof DIRECTIONS)[number];

/** Run-wide adjustment over every checked observation. */
export const FALSE_ALARM_CONTROLS = ['none', 'bonferroni', 'fdr'] as const;
export type FalseAlarmControl = (typeof FALSE_ALARM_CONTROLS)[number];

/** The time grid of a series; `row` when it has no times (row order). */
export const SPACINGS = ['minute', 'hour', 'day', 'week', 'month', 'quarter', 'year', 'row'] as const;
export type Spacing = (typeof SPACINGS)[number];

/** One step of each spacing in a sentence, e.g. "day" for daily series, "step" for row order. */
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

/** What makes the run's gate fail (the `fail-on` setting; parsed and decided in src/verdict.ts). */
export const FAIL_ON_VALUES = ['alarm', 'limit', 'both', 'never'] as const;
export type FailOn = (typeof FAIL_ON_VALUES)[number];
