// Results JSON, version 1 (docs/design.md). Stable: add fields, never rename.
// The report renderers and the GitHub publishers read only this, so the results file alone
// (e.g. an artifact handed to a workflow_run job) is enough to render the whole report.
import type { IntervalKind, MethodName, ScoreName } from './engine/types.js';

export type Verdict = 'ok' | 'alarm' | 'at-risk' | 'insufficient-data' | 'error';
export type Direction = 'above' | 'below' | 'both';
export type FalseAlarmControl = 'none' | 'bonferroni' | 'fdr';
export type Spacing = 'minute' | 'hour' | 'day' | 'week' | 'month' | 'quarter' | 'year' | 'row';
/** What makes the run's gate fail. */
export type FailOn = 'alarm' | 'limit' | 'both' | 'never';

/** Bounds keyed by level in percent, e.g. { "80": 12.5, "95": 14.1 }. */
export type LevelMap = Record<string, number>;

export interface ForecastPoint {
  step: number;
  /** ISO 8601 UTC when the series has times, otherwise null. */
  time: string | null;
  mean: number;
  lower: LevelMap;
  upper: LevelMap;
}

export interface TestSummary {
  statistic: number;
  df: number | null;
  pValue: number;
  ok: boolean;
  finding: string;
}

export interface ResidualCheckSummary {
  ljungBox: TestSummary & { lags: number };
  bias: TestSummary & { mean: number; zeroByConstruction: boolean };
  normality: TestSummary & { skewness: number; kurtosis: number };
  spread: TestSummary & { test: string };
  acf: number[];
  acfBound: number;
}

export interface MeasureSet {
  origins: number;
  me: number | null;
  rmse: number | null;
  mae: number | null;
  mpe: number | null;
  mape: number | null;
  mase: number | null;
}

export interface MethodBacktestSummary extends MeasureSet {
  /** Per-step measures, steps 1..H. */
  steps: (MeasureSet & { step: number })[];
  /** Share of backtest actuals inside each interval kind, keyed by kind then level. */
  coverage: Partial<Record<IntervalKind, LevelMap>>;
  /** The selection score (mean over steps of `score`). */
  score: number | null;
}

export interface BacktestSummary {
  minTrain: number;
  horizon: number;
  score: ScoreName;
  methods: Partial<Record<MethodName, MethodBacktestSummary>>;
  /** Why the chosen method won. */
  reason: string;
}

export interface CheckedObservation {
  /** 0-based index into the series. */
  index: number;
  /** 1-based line in the CSV file (header is line 1), null for gap-filled points. */
  row: number | null;
  time: string | null;
  value: number;
  /** Forecast made from the origin just before the first checked observation. */
  step: number;
  mean: number;
  lower: number;
  upper: number;
  level: number;
  /** Interval kind the observation was judged with (chosen from the history before it under \`auto\`). */
  intervalKind?: IntervalKind;
  /** Outside the interval at `level` (either side). */
  outside: boolean;
  /** Which side it left by, if any. */
  side: 'above' | 'below' | null;
  /** Tail probability under the predictive distribution, sided to match `direction`. */
  pValue: number;
  /** p after the run's false-alarm adjustment (equal to pValue for `none`). */
  adjustedP: number;
  /** Standard errors away from the point forecast (signed). */
  z: number;
  /** Outside on the side that matters, after adjustment. */
  alarm: boolean;
}

export interface LimitResult {
  side: 'above' | 'below';
  value: number;
  /** Window in steps, and as configured (e.g. "30d"). */
  within: number;
  withinLabel: string;
  risk: number;
  /** First step where the point forecast crosses, or null within the window. */
  pointCrossing: { step: number; time: string | null } | null;
  /** First step where the bound at 1 - risk crosses. */
  boundCrossing: { step: number; time: string | null } | null;
  /** Probability of crossing at any step within the window (first passage, simulated paths). */
  probability: number;
  paths: number;
  atRisk: boolean;
  /** Already beyond the limit at the last observation. */
  alreadyCrossed: boolean;
}

export interface HistoryPoint {
  index: number;
  row: number | null;
  time: string | null;
  value: number | null;
}

export interface SeriesResult {
  /** Display name: metric name, plus column and key where a metric yields several series. */
  name: string;
  metric: string;
  file: string;
  column: string;
  key: string | null;
  observations: number;
  missing: number;
  spacing: Spacing;
  season: number;
  seasonSource: 'config' | 'auto';
  method: MethodName | null;
  intervalKind: IntervalKind | null;
  sigma: number | null;
  sigmaDf: number | null;
  levels: number[];
  alarmLevel: number;
  direction: Direction;
  forecast: ForecastPoint[];
  residualChecks: ResidualCheckSummary | null;
  backtest: BacktestSummary | null;
  checked: CheckedObservation[];
  limit: LimitResult | null;
  /** The last observations (capped; see notes) for charts. */
  history: HistoryPoint[];
  /** Residuals of the chosen method aligned with `history` (null where undefined). */
  residuals: (number | null)[];
  verdict: Verdict;
  /** One line saying why the verdict is what it is. */
  reason: string;
  notes: string[];
}

export interface Problem {
  /** 'config' | 'data' | 'internal' */
  kind: 'config' | 'data' | 'internal';
  message: string;
  file: string | null;
  line: number | null;
  column: number | null;
  keyPath: string | null;
  metric: string | null;
}

export interface Results {
  version: 1;
  generator: { name: 'leadline'; version: string };
  generatedAt: string;
  config: string | null;
  verdict: Verdict;
  gate: { failOn: FailOn; passed: boolean; reason: string };
  summary: {
    metrics: number;
    series: number;
    alarms: number;
    atRisk: number;
    insufficient: number;
    errors: number;
    checkedObservations: number;
    /** Sum of (1 - level) over checked observations: alarms expected by chance alone. */
    expectedFalseAlarms: number;
    falseAlarms: FalseAlarmControl;
  };
  series: SeriesResult[];
  problems: Problem[];
  /** Run-wide notes, e.g. that a pull request's base commit was not in the clone. */
  notes?: string[];
}
