// Results JSON, version 1 (docs/design.md). Stable: add fields, never rename.
// The report renderers and the GitHub publishers read only this, so the results file alone
// (e.g. an artifact handed to a workflow_run job) is enough to render the whole report.
//
// The contract is defined once, here, as a zod schema: the TypeScript types below are inferred from
// it, `leadline merge` validates every results file it reads with it (files from forks are untrusted),
// and scripts/schema.ts writes leadline-results.schema.json from it (a test fails when that is stale).
// In the file, a number that is not finite (NaN, ±Infinity) is written as null, as JSON.stringify
// does; reading turns such a null back into NaN, so a results file read back renders as it was written.
// String and list caps bound what an untrusted file can make Leadline hold; real runs stay far below.
import * as z from 'zod';
import { METHOD_NAMES, type IntervalKind, type MethodName, type ScoreName } from './engine/types.js';
import { DIRECTIONS, FAIL_ON_VALUES, FALSE_ALARM_CONTROLS, SPACINGS, VERDICTS } from './terms.js';

/** The `$schema` of every results file and the `$id` of leadline-results.schema.json. */
export const RESULTS_SCHEMA_ID = 'urn:leadline:results:1';

const INTERVAL_KINDS = ['analytic', 'bootstrap', 'empirical'] as const satisfies readonly IntervalKind[];
const SCORE_NAMES = ['me', 'rmse', 'mae', 'mpe', 'mape', 'mase'] as const satisfies readonly ScoreName[];
const methodName = z.enum(METHOD_NAMES as [MethodName, ...MethodName[]]);
const intervalKind = z.enum(INTERVAL_KINDS);

/** Longest text field (names, messages, reasons); a list of notes holds at most MAX_NOTES of them. */
export const MAX_TEXT = 4000;
const MAX_NOTES = 200;
/** Most points in a per-series list (history, forecast, checked observations, per-step measures). */
const MAX_POINTS = 1_000_000;

const text = (max = MAX_TEXT) => z.string().max(max);
const int = z.number().int();
const count = z.number().int().min(0);
/** A number that may be non-finite in memory: null in the file, NaN once read. */
const real = z.union([z.number(), z.null().transform(() => Number.NaN)]);
const notes = z.array(text()).max(MAX_NOTES);
const time = text(64)
  .nullable()
  .meta({ description: 'ISO 8601 UTC when the series has times, otherwise null.' });

export const verdictSchema = z.enum(VERDICTS);
export const directionSchema = z.enum(DIRECTIONS);
export const falseAlarmSchema = z.enum(FALSE_ALARM_CONTROLS);
export const spacingSchema = z.enum(SPACINGS);
export const failOnSchema = z.enum(FAIL_ON_VALUES);

/** Bounds keyed by level in percent, e.g. { "80": 12.5, "95": 14.1 }. */
const levelMap = z.record(text(16), real);

const forecastPoint = z.strictObject({
  step: int,
  time,
  mean: real,
  lower: levelMap,
  upper: levelMap,
});

const testSummary = {
  statistic: real,
  df: z.number().nullable(),
  pValue: real,
  /** Holm-adjusted over the series' family of residual checks; `ok` means it is at least 0.05. */
  adjustedP: real.optional(),
  ok: z.boolean(),
  finding: text(),
};

const residualChecks = z.strictObject({
  ljungBox: z.strictObject({ ...testSummary, lags: int }),
  bias: z.strictObject({ ...testSummary, mean: real, zeroByConstruction: z.boolean() }),
  normality: z.strictObject({ ...testSummary, skewness: real, kurtosis: real }),
  spread: z.strictObject({ ...testSummary, test: text(200) }),
  acf: z.array(real).max(MAX_POINTS),
  acfBound: real,
  /**
   * The checks form one family per series, Holm-adjusted (at most a 5% chance that a clean series has
   * any check flagged); `family` counts the checks computed. `caveat`: some check is flagged — a
   * caveat about the model's intervals, not an alarm.
   */
  adjustment: z.literal('holm').optional(),
  family: count.optional(),
  caveat: z.boolean().optional(),
  /**
   * Whose residuals: the model that judged the checked rows ('before-checked': the chosen method fitted
   * to the history before the first of them), or the fit to every observation ('all').
   */
  basis: z.enum(['before-checked', 'all']).optional(),
  /** Length of the history (rows, missing ones included) that model was fitted to. */
  observations: count.optional(),
  /** Residuals the checks were computed on; below the engine's minimum (10) no check is computed. */
  residuals: count.optional(),
});

const measures = {
  origins: count,
  me: z.number().nullable(),
  rmse: z.number().nullable(),
  mae: z.number().nullable(),
  mpe: z.number().nullable(),
  mape: z.number().nullable(),
  mase: z.number().nullable(),
};

const methodBacktest = z.strictObject({
  ...measures,
  /** Per-step measures, steps 1..H. */
  steps: z.array(z.strictObject({ step: int, ...measures })).max(MAX_POINTS),
  /** Share of backtest actuals inside each interval kind, keyed by kind then level. */
  coverage: z.partialRecord(intervalKind, levelMap),
  /** The selection score (mean over steps of `score`). */
  score: z.number().nullable(),
});

const backtestSummary = z.strictObject({
  minTrain: int,
  horizon: int,
  score: z.enum(SCORE_NAMES),
  methods: z.partialRecord(methodName, methodBacktest),
  /** Why the chosen method won. */
  reason: text(),
});

const checkedObservation = z.strictObject({
  /** 0-based index into the series. */
  index: count,
  /** 1-based line in the CSV file (header is line 1), null for gap-filled points. */
  row: count.nullable(),
  time,
  value: real,
  /** Forecast made from the origin just before the first checked observation. */
  step: int,
  mean: real,
  lower: real,
  upper: real,
  level: z.number().gt(0).lt(100),
  /** Interval kind the observation was judged with (chosen from the history before it under `auto`). */
  intervalKind: intervalKind.optional(),
  /** Outside the interval at `level` (either side). */
  outside: z.boolean(),
  /** Which side it left by, if any. */
  side: z.enum(['above', 'below']).nullable(),
  /** Tail probability under the predictive distribution, sided to match `direction`. */
  pValue: real,
  /**
   * Where pValue comes from: the Student-t (analytic), the bootstrap or empirical sample's share, or
   * the Student-t tail scaled to that sample beyond it (src/engine/forecast.ts).
   */
  pValueBasis: z.enum(['student-t', 'sample', 'tail-model']).optional(),
  /** 'upper' when pValue is only an upper bound (a sample with no spread on that side), else null. */
  pValueBound: z.literal('upper').nullable().optional(),
  /** p after the run's false-alarm adjustment (equal to pValue for `none`). */
  adjustedP: real,
  /** Standard errors away from the point forecast (signed). */
  z: real,
  /** Outside on the side that matters, after adjustment. */
  alarm: z.boolean(),
  /** The row's label (the metric's `label` column, e.g. a commit SHA), when it has one. */
  label: text(200).optional(),
});

const crossing = z.strictObject({ step: int, time }).nullable();

const limitResult = z.strictObject({
  side: z.enum(['above', 'below']),
  value: real,
  /** Window in steps, and as configured (e.g. "30d"). */
  within: int,
  withinLabel: text(100),
  risk: real,
  /** First step where the point forecast crosses, or null within the window. */
  pointCrossing: crossing,
  /** First step where the bound at 1 - risk crosses. */
  boundCrossing: crossing,
  /** Probability of crossing at any step within the window (first passage, simulated paths). */
  probability: real,
  paths: count,
  atRisk: z.boolean(),
  /** Already beyond the limit at the last observation. */
  alreadyCrossed: z.boolean(),
});

const historyPoint = z.strictObject({
  index: count,
  row: count.nullable(),
  time,
  value: z.number().nullable(),
  /** The row's label (the metric's `label` column), when it has one. */
  label: text(200).optional(),
  /** A known incident: drawn, but left out of fitting, backtests and residual checks, never an alarm. */
  incident: z.literal(true).optional(),
});

/** A row marked as a known incident (config `incidents` or the metric's `incidentColumn`). */
const incidentRow = z.strictObject({
  index: count,
  row: count.nullable(),
  time,
  value: real,
  label: text(200).optional(),
  reason: text(),
});

/**
 * `history` in columns, as the file holds it (`history` is then empty): the points are consecutive
 * from index `from`. Each point's CSV line is in `rows` (null for a gap-filled point), or is its index
 * plus `rowOffset` when that holds for every point; its time is in `times`, or is `start` plus k
 * times `stepMs` for the k-th point when that holds for every point; neither for row order.
 */
const historyColumns = z
  .strictObject({
    from: count,
    values: z.array(z.number().nullable()).max(MAX_POINTS),
    rows: z.array(count.nullable()).max(MAX_POINTS).optional(),
    rowOffset: int.optional(),
    times: z.array(time).max(MAX_POINTS).optional(),
    start: text(64).optional(),
    stepMs: z.number().positive().optional(),
    /** Each point's label, when any has one (null for none). */
    labels: z.array(text(200).nullable()).max(MAX_POINTS).optional(),
    /** Indices of the points that are known incidents. */
    incidentAt: z.array(count).max(MAX_POINTS).optional(),
  })
  .meta({ description: 'The history points in columns; `history` is empty when this is present.' });
type HistoryColumns = z.output<typeof historyColumns>;

const seriesFields = z.strictObject({
  /** Display name: metric name, plus column and key where a metric yields several series. */
  name: text(),
  metric: text(),
  file: text(),
  column: text(),
  key: text().nullable(),
  /** Unit of the values (the metric's `unit`), when configured. */
  unit: text(24).optional(),
  observations: count,
  missing: count,
  spacing: spacingSchema,
  season: int,
  seasonSource: z.enum(['config', 'auto']),
  method: methodName.nullable(),
  intervalKind: intervalKind.nullable(),
  /**
   * sigma-hat and its df of the model whose residuals `residualChecks` examine: with checked rows, the
   * chosen method fitted to the history before the first of them (the one sigma behind their z and
   * intervals); otherwise the fit to every observation.
   */
  sigma: z.number().nullable(),
  sigmaDf: z.number().nullable(),
  levels: z.array(z.number()).max(100),
  alarmLevel: z.number().gt(0).lt(100),
  direction: directionSchema,
  forecast: z.array(forecastPoint).max(MAX_POINTS),
  residualChecks: residualChecks.nullable(),
  backtest: backtestSummary.nullable(),
  checked: z.array(checkedObservation).max(MAX_POINTS),
  /**
   * Known incidents: rows left out of fitting, backtests and residual checks (passed to the engine as
   * missing values) and never judged, listed with their reason.
   */
  incidents: z.array(incidentRow).max(MAX_POINTS).optional(),
  limit: limitResult.nullable(),
  /** The last observations (capped; see notes) for charts. */
  history: z.array(historyPoint).max(MAX_POINTS),
  /** Residuals of the chosen method aligned with `history` (null where undefined). */
  residuals: z.array(z.number().nullable()).max(MAX_POINTS),
  historyColumns: historyColumns.optional(),
  verdict: verdictSchema,
  /** One line saying why the verdict is what it is. */
  reason: text(),
  notes,
  /** Only in a shard's file: the series' place (0-based) in the whole run's order, which merge restores. */
  position: count.optional(),
  /**
   * Whether this series is judged (its verdict counts for the run and the gate). False only in a
   * pull request for a series whose file the pull request leaves alone (with `pullRequestGate:
   * changed`); absent in files written before this field, meaning judged.
   */
  judged: z.boolean().optional(),
});

/** A series as read: `historyColumns` becomes the `history` points (one form in memory). */
export const seriesResultSchema = seriesFields.transform((s, ctx) => {
  const { historyColumns: cols, ...rest } = s;
  if (!cols) return rest;
  const history = historyFromColumns(cols);
  if (typeof history === 'string' || rest.history.length > 0) {
    ctx.addIssue({
      code: 'custom',
      path: ['historyColumns'],
      message: typeof history === 'string' ? history : 'history and historyColumns cannot both hold points',
    });
    return z.NEVER;
  }
  return { ...rest, history };
});

function historyFromColumns(c: HistoryColumns): HistoryPoint[] | string {
  const n = c.values.length;
  if (c.rows && c.rows.length !== n) return 'rows must have one entry per value';
  if (c.times && c.times.length !== n) return 'times must have one entry per value';
  if (c.labels && c.labels.length !== n) return 'labels must have one entry per value';
  const incidents = new Set(c.incidentAt);
  for (const i of incidents)
    if (i < c.from || i >= c.from + n) return 'incidentAt must name points of the history';
  const t0 = c.start === undefined ? NaN : Date.parse(c.start);
  if (c.start !== undefined && !(Number.isFinite(t0) && new Date(t0).toISOString() === c.start))
    return 'start must be an ISO 8601 UTC time as Leadline writes it';
  const step = c.stepMs ?? 0;
  const out: HistoryPoint[] = [];
  for (let k = 0; k < n; k++) {
    const index = c.from + k;
    const row = c.rows ? c.rows[k]! : c.rowOffset !== undefined ? index + c.rowOffset : null;
    const time = c.times ? c.times[k]! : c.start !== undefined ? new Date(t0 + k * step).toISOString() : null;
    const label = c.labels?.[k];
    out.push({
      index,
      row,
      time,
      value: c.values[k]!,
      ...(label != null ? { label } : {}),
      ...(incidents.has(index) ? { incident: true as const } : {}),
    });
  }
  return out;
}

/**
 * A series as the file holds it: its `history` points in columns (historyColumns, after
 * `residuals`), lines and times written as an offset and a step wherever those reproduce every point
 * exactly. Reading it back (seriesResultSchema) gives the series again.
 */
export function seriesForFile(s: SeriesResult): Record<string, unknown> {
  const h = s.history;
  if (h.length === 0 || !h.every((p, k) => p.index === h[0]!.index + k)) return s;
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(s)) {
    out[k] = k === 'history' ? [] : v;
    if (k === 'residuals') out.historyColumns = historyToColumns(s.history);
  }
  return out;
}

function historyToColumns(h: HistoryPoint[]): HistoryColumns {
  const from = h[0]!.index;
  const cols: HistoryColumns = { from, values: h.map((p) => p.value) };
  const offset = h[0]!.row === null ? null : h[0]!.row - from;
  if (offset !== null && h.every((p) => p.row === p.index + offset)) cols.rowOffset = offset;
  else cols.rows = h.map((p) => p.row);
  if (h.some((p) => p.label !== undefined)) cols.labels = h.map((p) => p.label ?? null);
  if (h.some((p) => p.incident)) cols.incidentAt = h.filter((p) => p.incident).map((p) => p.index);
  if (h.every((p) => p.time === null)) return cols;
  const t0 = h[0]!.time === null ? NaN : Date.parse(h[0]!.time);
  const step = h.length > 1 && h[1]!.time !== null ? Date.parse(h[1]!.time) - t0 : NaN;
  const regular =
    step > 0 &&
    new Date(t0).toISOString() === h[0]!.time &&
    h.every((p, k) => p.time === new Date(t0 + k * step).toISOString());
  if (regular) {
    cols.start = h[0]!.time!;
    cols.stepMs = step;
  } else cols.times = h.map((p) => p.time);
  return cols;
}

export const problemSchema = z.strictObject({
  kind: z.enum(['config', 'data', 'internal']),
  message: text(),
  file: text().nullable(),
  line: count.nullable(),
  column: count.nullable(),
  keyPath: text().nullable(),
  metric: text().nullable(),
  /** Only in a shard's file: the place of the problem's series in the whole run, as for series. */
  position: count.optional(),
});

export const summarySchema = z.strictObject({
  metrics: count,
  series: count,
  alarms: count,
  atRisk: count,
  insufficient: count,
  errors: count,
  checkedObservations: count,
  /** Sum of (1 - level) over checked observations: alarms expected by chance alone. */
  expectedFalseAlarms: real,
  falseAlarms: falseAlarmSchema,
});

const commit = z.string().regex(/^[0-9a-f]{7,64}$/i);

/** What a merge checks: which config, commit, shard and event a results file comes from. */
export const originSchema = z.strictObject({
  /** "sha256:" and the hex SHA-256 of the config file's bytes. */
  configHash: z
    .string()
    .regex(/^sha256:[0-9a-f]{64}$/)
    .nullable(),
  /** The commit the metric files were read at (GITHUB_SHA in the Action, HEAD locally), when known. */
  commit: commit.nullable(),
  /** Shard `index` of `count` (1-based), and how many series the whole run has; null when not split. */
  shard: z
    .strictObject({ index: z.number().int().min(1), count: z.number().int().min(1), series: count })
    .nullable(),
  /** The workflow event, with its pull request's number and base and head commits when it has one. */
  event: z
    .strictObject({
      name: text(64),
      pullRequest: z.number().int().min(1).nullable(),
      base: commit.nullable(),
      head: commit.nullable(),
    })
    .nullable(),
});

/** Everything in a results file but its series: what `leadline merge` checks before reading them. */
export const resultsHeadSchema = z.strictObject({
  $schema: z.literal(RESULTS_SCHEMA_ID),
  version: z.literal(1),
  generator: z.strictObject({ name: z.literal('leadline'), version: text(64) }),
  generatedAt: text(64),
  config: text().nullable(),
  origin: originSchema,
  verdict: verdictSchema,
  gate: z.strictObject({ failOn: failOnSchema, passed: z.boolean(), reason: text() }),
  summary: summarySchema,
  problems: z.array(problemSchema).max(MAX_POINTS),
  /** Run-wide notes, e.g. that a pull request's base commit was not in the clone. */
  notes: notes.optional(),
  /**
   * What the run checked. `pull-request`: the rows each changed metric file gained over the base
   * commit (`added` lists files new in the pull request, of which only the last row is checked) and
   * which series the gate judged; `latest`: the newest observations of every series.
   */
  scope: z
    .strictObject({
      kind: z.enum(['pull-request', 'latest']),
      files: z.array(z.strictObject({ file: text(), rows: count, added: z.boolean() })).max(MAX_POINTS),
      gate: z.enum(['changed', 'all']),
    })
    .optional(),
});

export const resultsSchema = resultsHeadSchema
  .extend({ series: z.array(seriesResultSchema).max(10_000_000) })
  .meta({
    $id: RESULTS_SCHEMA_ID,
    title: 'Leadline results',
    description:
      'What one Leadline run found: the run verdict and gate, and for every series its forecast, backtest, residual checks, checked observations and limit. Numbers that are not finite are null.',
  });

// The shared words (verdict, direction, spacing, gate …) are src/terms.ts's; re-exported for readers.
export type { Direction, FailOn, FalseAlarmControl, Spacing, Verdict } from './terms.js';
/** Bounds keyed by level in percent, e.g. { "80": 12.5, "95": 14.1 }. */
export type LevelMap = Record<string, number>;
export type ForecastPoint = z.output<typeof forecastPoint>;
export type TestSummary = z.output<z.ZodObject<typeof testSummary>>;
export type ResidualCheckSummary = z.output<typeof residualChecks>;
export type MeasureSet = z.output<z.ZodObject<typeof measures>>;
export type MethodBacktestSummary = z.output<typeof methodBacktest>;
export type BacktestSummary = z.output<typeof backtestSummary>;
export type CheckedObservation = z.output<typeof checkedObservation>;
export type LimitResult = z.output<typeof limitResult>;
export type HistoryPoint = z.output<typeof historyPoint>;
export type IncidentRow = z.output<typeof incidentRow>;
export type SeriesResult = z.output<typeof seriesResultSchema>;
export type Problem = z.output<typeof problemSchema>;
export type Origin = z.output<typeof originSchema>;
export type Results = z.output<typeof resultsSchema>;

/** The JSON Schema of a results file (what is in the file: `io: 'input'`, so non-finite numbers are null). */
export function resultsJsonSchema(): Record<string, unknown> {
  return z.toJSONSchema(resultsSchema, { target: 'draft-2020-12', io: 'input' }) as Record<string, unknown>;
}

/** Series and findings made by withoutDetail (and what was copied from them), by identity. */
const detailElsewhere = new WeakSet<object>();

/**
 * A series (or a draft's findings) without its charts and tables: forecast, backtest and residuals
 * emptied, the history cut to its newest point, the residual checks without their wording and
 * autocorrelations; every verdict input is kept. What a run holds of each series while the full ones wait on disk (src/spool.ts),
 * and what concluding a run or a merge reads. hasDetail tells the two apart, so no report shows an
 * emptied chart or check as if the series had no data. With `shared`, equal notes (most are the
 * same sentence for every series) are kept once.
 */
export function withoutDetail<T extends LeanFields>(s: T, shared?: Map<string, string>): T {
  const c = s.residualChecks;
  const out = {
    ...s,
    forecast: [],
    // The checks' outcomes and counts stay (verdicts and caveats read them), their wording goes.
    residualChecks: c && {
      ...c,
      ljungBox: { ...c.ljungBox, finding: '' },
      bias: { ...c.bias, finding: '' },
      normality: { ...c.normality, finding: '' },
      spread: { ...c.spread, finding: '' },
      acf: [],
    },
    backtest: null,
    // The newest point stays: where the series ends (its CSV line, for annotations and the
    // pull-request scope) is a fact about the series, not a chart.
    history: s.history.slice(-1),
    residuals: [],
    notes: shared ? s.notes.map((n) => shared.get(n) ?? (shared.set(n, n), n)) : s.notes,
  };
  detailElsewhere.add(out);
  return out;
}

type LeanFields = Pick<
  SeriesResult,
  'forecast' | 'residualChecks' | 'backtest' | 'history' | 'residuals' | 'notes'
>;

/** False for a series made by withoutDetail (or copied from one): its charts and tables are elsewhere. */
export function hasDetail(s: object): boolean {
  return !detailElsewhere.has(s);
}

/** `to`, copied from `from`, marked as `from` is (see withoutDetail). */
export function keepDetailMark<T extends object>(from: object, to: T): T {
  if (detailElsewhere.has(from)) detailElsewhere.add(to);
  return to;
}

/**
 * What a run (job.ts `startJob`) or a merge hands its outputs: the concluded run with lean series,
 * every full series in order (for the results file), and the run with chosen series in full (for
 * the reports, report/index.ts `reportDetail`).
 */
export interface RunOutput {
  lean: Results;
  series: () => Iterable<SeriesResult> | AsyncIterable<SeriesResult>;
  detailed: (indices: ReadonlySet<number>) => Promise<Results>;
  /** Removes what the run kept on disk, when it kept anything. */
  close?: () => void;
}

/** A RunOutput over results already in memory (a run that failed before analysing, a test's). */
export function heldRun(results: Results): RunOutput {
  return { lean: results, series: () => results.series, detailed: async () => results };
}
