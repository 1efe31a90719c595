// The config schema: the single source for validation (zod) and for the committed JSON Schema
// (leadline.schema.json, written by scripts/schema.ts). Every key is optional here except the ones a
// metric cannot do without; defaults are applied afterwards (defaults.ts), in this order: the metric's
// own value, then `defaults:`, then the built-in DEFAULTS. The `default` shown in the JSON Schema is
// the built-in one.
import * as z from 'zod';
import { METHOD_NAMES } from '../engine/types.js';
import { TIME_FORMATS } from '../ingest/times.js';
import { DIRECTIONS, FALSE_ALARM_CONTROLS } from '../terms.js';
import { DURATION_PATTERN } from '../text/numbers.js';

/** A duration such as `30d`: a positive number and one of m (minutes), h, d, w, mo (months), q, y. */
export { DURATION_PATTERN };

const wholeNumber = (min: number, max: number) => z.number().int().min(min).max(max);

const season = z
  .union([z.literal('auto'), wholeNumber(1, 100_000)], {
    error: 'expected a whole number of at least 1, or "auto"',
  })
  .meta({
    description:
      'Season length in steps. "auto" chooses it from the time spacing (hourly 24, daily 7, weekly 52 with at least two years of data, monthly 12, quarterly 4, otherwise none); 1 means no season.',
    default: 'auto',
  });

const methods = z
  .array(z.enum(METHOD_NAMES as [string, ...string[]]))
  .min(1)
  .meta({
    description:
      'Candidate forecasting methods; the rolling-origin backtest picks among them. One entry fixes the method.',
    default: [...METHOD_NAMES],
  });

const horizon = wholeNumber(1, 100_000).meta({
  description: 'How many steps ahead to forecast.',
  default: 14,
});

const levels = z
  .array(z.number().gt(0).lt(100))
  .min(1)
  .meta({ description: 'Prediction interval levels in percent.', default: [80, 95] });

const intervals = z.enum(['analytic', 'bootstrap', 'empirical', 'auto']).meta({
  description:
    'How prediction intervals are computed: analytic (Student-t), bootstrap (simulated from the residuals), empirical (from backtest errors), or "auto" (the engine chooses for each series; the kind used is reported).',
  default: 'auto',
});

const backtest = z
  .strictObject({
    minTrain: wholeNumber(2, 1_000_000).optional().meta({
      description:
        'Smallest training size of the rolling-origin backtest. Default: max(10, 2 × season), the season being the one in use.',
    }),
    horizon: wholeNumber(1, 100_000)
      .optional()
      .meta({ description: 'Steps ahead scored by the backtest. Default: the metric\'s "horizon".' }),
  })
  .meta({ description: 'Rolling-origin backtest used to choose the method.' });

const score = z.enum(['me', 'rmse', 'mae', 'mpe', 'mape', 'mase']).meta({
  description: 'Backtest accuracy measure that chooses the method (lower absolute value wins).',
  default: 'mase',
});

const paths = wholeNumber(100, 1_000_000).meta({
  description: 'Simulated future paths for bootstrap intervals and limit probabilities.',
  default: 1000,
});

const seed = z
  .number()
  .int()
  .min(0)
  .max(2 ** 32 - 1)
  .meta({ description: 'Seed of the random number generator, so runs are reproducible.', default: 1 });

const check = z
  .strictObject({
    last: wholeNumber(1, 100_000)
      .optional()
      .meta({ description: 'How many of the newest observations are checked.', default: 1 }),
  })
  .meta({ description: 'Which observations are judged against the forecast made before them.' });

const direction = z.enum(DIRECTIONS).meta({
  description:
    'The side that is bad: an alarm is raised only for observations outside the interval on this side.',
  default: 'both',
});

const alarmLevel = z.number().gt(0).lt(100).meta({
  description:
    'The interval level (one of "levels") an observation must leave to raise an alarm. Default: the highest level.',
});

const falseAlarms = z.enum(FALSE_ALARM_CONTROLS).meta({
  description:
    'Run-wide control of chance alarms across every checked observation: none, bonferroni, or fdr (Benjamini–Hochberg). Set it under "defaults".',
  default: 'none',
});

const WITHIN_EXPECTED =
  'expected a number of steps (e.g. 14) or a duration such as 30d (units m, h, d, w, mo, q, y)';

const within = z
  .union([wholeNumber(1, 100_000), z.string().regex(DURATION_PATTERN, { error: WITHIN_EXPECTED })], {
    error: WITHIN_EXPECTED,
  })
  .meta({
    description:
      'Window in which a crossing is forecast: a number of steps, or a duration like 30d, 12h, 6w, 3mo, 1q, 1y. Default: the metric\'s "horizon" in steps.',
  });

const limit = z
  .strictObject({
    above: z.number().optional().meta({ description: 'Capacity threshold that must not be exceeded.' }),
    below: z.number().optional().meta({ description: 'Threshold the series must not fall under.' }),
    within: within.optional(),
    risk: z
      .number()
      .gt(0)
      .lt(1)
      .optional()
      .meta({ description: 'Largest acceptable probability of crossing within the window.', default: 0.05 }),
  })
  .meta({ description: 'A capacity limit whose crossing is forecast. Give exactly one of above or below.' });

const blanks = z.enum(['error', 'missing']).meta({
  description: 'A blank value cell is an error, or a missing value.',
  default: 'error',
});

const duplicates = z.enum(['error', 'first', 'last', 'mean']).meta({
  description: 'Rows sharing a time: an error naming both lines, or keep the first, the last, or their mean.',
  default: 'error',
});

const timeFormat = z.enum(TIME_FORMATS).meta({
  description:
    'The form of the time column: "auto" decides from the cells (ISO 8601; numbers as YYYYMMDD dates when all are, four-digit years, or epoch seconds below 1e11 and milliseconds above); or state it: iso, yyyymmdd, year, epoch-seconds, epoch-milliseconds.',
  default: 'auto',
});

const incident = z
  .strictObject({
    from: z.string().min(1).meta({
      description:
        'First time of the incident: an ISO 8601 date or datetime (a date alone starts at its midnight, UTC unless an offset is given).',
    }),
    to: z.string().min(1).optional().meta({
      description:
        'Last time of the incident, inclusive (a date alone covers that whole day; a year-month the whole month). Default: the same as from.',
    }),
    reason: z.string().min(1).max(500).optional().meta({
      description: 'Why these rows are not normal, shown where they are listed.',
    }),
  })
  .meta({ description: 'One known incident: a time range of the metric to leave out of the statistics.' });

/** Options a metric may set and `defaults:` may set for every metric. */
export const optionShape = {
  season: season.optional(),
  methods: methods.optional(),
  horizon: horizon.optional(),
  levels: levels.optional(),
  intervals: intervals.optional(),
  backtest: backtest.optional(),
  score: score.optional(),
  paths: paths.optional(),
  seed: seed.optional(),
  check: check.optional(),
  direction: direction.optional(),
  alarmLevel: alarmLevel.optional(),
  falseAlarms: falseAlarms.optional(),
  limit: limit.optional(),
  blanks: blanks.optional(),
  duplicates: duplicates.optional(),
  timeFormat: timeFormat.optional(),
};

const columnName = z.string().min(1);

export const metricSchema = z
  .strictObject({
    name: z.string().min(1).max(200).meta({ description: 'Unique name of the metric, used in reports.' }),
    file: z.string().min(1).meta({
      description:
        'CSV path or glob, relative to the working directory. Paths leading outside it are refused.',
    }),
    time: columnName.nullable().optional().meta({
      description:
        'Time column (ISO 8601 dates or datetimes, or epoch seconds/milliseconds). Omit it for row order (per-commit or per-run series).',
    }),
    value: z
      .union([columnName, z.array(columnName).min(1)], {
        error: 'expected a column name or a list of column names',
      })
      .meta({ description: 'Value column, or a list of columns (one series each).' }),
    key: columnName.optional().meta({
      description: 'Key column of a long-format file: one series per distinct key value.',
    }),
    label: columnName.optional().meta({
      description:
        'Column whose text names each row in reports (for example a commit SHA of a per-commit series), shown instead of its line number.',
    }),
    unit: z.string().min(1).max(24).optional().meta({
      description: 'Unit of the values (for example ms, GB, s), shown with every value and on chart axes.',
    }),
    incidents: z.array(incident).max(1000).optional().meta({
      description:
        'Known incidents: time ranges whose rows are left out of fitting, backtests and residual checks (as missing values), never raise alarms, and are still drawn and listed. Needs a time column.',
    }),
    incidentColumn: columnName.optional().meta({
      description:
        'Column marking known incidents row by row: a non-empty cell marks the row (its text is the reason); such rows are treated like the incidents list.',
    }),
    ...optionShape,
  })
  .meta({ description: 'One metric: a CSV file and the columns to watch.' });

export const defaultsSchema = z
  .strictObject(optionShape)
  .meta({ description: 'Options applied to every metric unless the metric sets its own.' });

export const configSchema = z
  .strictObject({
    version: z.literal(1, { error: 'expected 1 (the only config version)' }).optional().meta({
      description: 'Config format version.',
      default: 1,
    }),
    defaults: defaultsSchema.optional(),
    pullRequestGate: z.enum(['changed', 'all']).optional().meta({
      description:
        'In a pull request, which series are judged and can fail the gate: "changed" (the series of the files the pull request changes; the others are one line of context) or "all". Push, schedule and manual runs judge every series.',
      default: 'changed',
    }),
    metrics: z.array(metricSchema).min(1).meta({ description: 'The metrics to watch.' }),
  })
  .meta({
    title: 'Leadline configuration',
    description: 'Configuration of Leadline (.github/leadline.yml).',
  });

export type RawOptions = z.infer<typeof defaultsSchema>;
export type RawMetric = z.infer<typeof metricSchema>;
export type RawConfig = z.infer<typeof configSchema>;

/** Valid keys of each kind of mapping, for "did you mean" suggestions. */
export const KEYS = {
  root: Object.keys(configSchema.shape),
  defaults: Object.keys(optionShape),
  metric: Object.keys(metricSchema.shape),
  backtest: Object.keys(backtest.shape),
  check: Object.keys(check.shape),
  limit: Object.keys(limit.shape),
  incident: Object.keys(incident.shape),
} as const;

/** The JSON Schema committed as leadline.schema.json. */
export function jsonSchema(): Record<string, unknown> {
  return z.toJSONSchema(configSchema, { io: 'input', target: 'draft-2020-12' }) as Record<string, unknown>;
}
