// The engine's public contract. Everything here is plain data; src/engine/index.ts implements it.
// Other stages (alarms, job, report) depend only on these shapes and the functions exported from
// src/engine/index.ts.

/** The published baseline methods. */
export type MethodName = 'mean' | 'naive' | 'seasonal-naive' | 'drift';
export const METHOD_NAMES: readonly MethodName[] = ['mean', 'naive', 'seasonal-naive', 'drift'];
/** Simplicity order used to break ties (fewer assumptions first). */
export const SIMPLICITY: Record<MethodName, number> = { naive: 0, mean: 1, 'seasonal-naive': 2, drift: 3 };

export type IntervalKind = 'analytic' | 'bootstrap' | 'empirical';
/** `auto` is resolved by the engine; see chooseIntervalKind. */
export type IntervalChoice = IntervalKind | 'auto';

/** Backtest accuracy measures (docs/design.md). MPE/MAPE in percent over non-zero actuals. */
export type ScoreName = 'me' | 'rmse' | 'mae' | 'mpe' | 'mape' | 'mase';

/** One method fitted to y_1..y_T (docs/design.md conventions table). */
export interface Fit {
  method: MethodName;
  /** season length m used (1 = none). */
  season: number;
  /** T, the number of observations the fit used (including missing ones). */
  n: number;
  /** Fitted one-step values, NaN where the method defines none. Length T. */
  fitted: Float64Array;
  /** Residuals as in docs/design.md, NaN where undefined or missing. Length T (index t-1 = time t). */
  residuals: Float64Array;
  /** Number of non-NaN residuals. */
  residualCount: number;
  /** sigma-hat and its degrees of freedom (docs/design.md). NaN/0 when not estimable. */
  sigma: number;
  sigmaDf: number;
  /** K: parameters estimated from the data (mean 1, naive 0, seasonal naive 0, drift 1). */
  parameters: number;
  /** Method-specific parameters, e.g. { level } for mean, { slope } for drift. */
  coefficients: Record<string, number>;
  /** Point forecasts for steps 1..H (index h-1). */
  mean: (horizon: number) => Float64Array;
  /** h-step standard errors for steps 1..H (index h-1). */
  standardError: (horizon: number) => Float64Array;
  /** Plain-language notes about edge cases met while fitting (missing values, sigma 0 …). */
  notes: string[];
}

/** Why a method could not be fitted (series too short, all missing …). */
export interface FitFailure {
  method: MethodName;
  reason: string;
}

export interface IntervalBand {
  /** Level in percent, e.g. 80. */
  level: number;
  lower: Float64Array;
  upper: Float64Array;
}

export interface Forecast {
  method: MethodName;
  /** Kind actually used (after fallback). */
  kind: IntervalKind;
  /** Kind asked for. */
  requested: IntervalChoice;
  horizon: number;
  mean: Float64Array;
  se: Float64Array;
  df: number;
  bands: IntervalBand[];
  /** Simulated future paths, row-major nPaths × horizon, when simulated (bootstrap, or for limits). */
  paths: Float64Array | null;
  nPaths: number;
  /** Per-step sorted errors used by the empirical kind (for tail probabilities). */
  empiricalErrors: Float64Array[] | null;
  /**
   * Per step, the independent observations behind a bootstrap or empirical sample (residuals
   * resampled; errors / step): where the sample's body ends and the Student-t tail begins (forecast.ts).
   */
  sampleBase: number[] | null;
  /**
   * Per step of an empirical forecast, how its errors relate to the next one under the method's own
   * model (errorspread.ts): the tail's variance per unit of the errors' sum of squares, and its df;
   * null for bootstrap paths (and each entry null where the step uses analytic bands).
   */
  sampleSpread: ({ ratio: number; df: number } | null)[] | null;
  notes: string[];
}

export interface StepMeasures {
  step: number;
  origins: number;
  me: number;
  rmse: number;
  mae: number;
  mpe: number;
  mape: number;
  mase: number;
}

export interface MethodBacktest {
  method: MethodName;
  /** Step-1 measures at top level (docs/design.md). */
  origins: number;
  me: number;
  rmse: number;
  mae: number;
  mpe: number;
  mape: number;
  mase: number;
  steps: StepMeasures[];
  /** Share of actuals inside each interval kind at each level over the backtest, keyed by level. */
  coverage: Partial<Record<IntervalKind, Record<string, number>>>;
  /** Actual - forecast errors per step (index h-1), for empirical intervals. */
  errors: Float64Array[];
  notes: string[];
}

export interface Backtest {
  minTrain: number;
  horizon: number;
  methods: Partial<Record<MethodName, MethodBacktest>>;
  notes: string[];
}

export interface Selection {
  method: MethodName;
  score: ScoreName;
  /** Score of every candidate (mean over steps 1..H of the chosen measure; lower |score| wins). */
  scores: Partial<Record<MethodName, number>>;
  reason: string;
}

export interface TestResult {
  name: string;
  statistic: number;
  df: number | null;
  pValue: number;
  /** Holm-adjusted p over the series' family of residual checks (checks.ts); NaN when not computed. */
  adjustedP: number;
  /** True when the test is not flagged: Holm-adjusted p at or above 5% (or not computed). */
  ok: boolean;
  /** Plain language: what was found and what it means for the intervals. */
  finding: string;
}

export interface ResidualChecks {
  acf: number[];
  /** Approximate 95% bounds for the ACF: 1.96/sqrt(n). */
  acfBound: number;
  ljungBox: TestResult & { lags: number };
  bias: TestResult & { mean: number; zeroByConstruction: boolean };
  normality: TestResult & { skewness: number; kurtosis: number };
  spread: TestResult;
  /** Number of tests in the Holm family (those computed). */
  family: number;
  /** True when any check is flagged: a caveat about the model's intervals, not a reason for attention. */
  caveat: boolean;
  /** Residuals the checks were computed on (the non-missing ones). */
  residuals: number;
}

export interface EngineOptions {
  season: number;
  methods: MethodName[];
  horizon: number;
  levels: number[];
  intervals: IntervalChoice;
  backtest: { minTrain: number; horizon: number };
  score: ScoreName;
  paths: number;
  seed: number;
}

/** Everything the engine says about one series. */
export interface Analysis {
  ok: true;
  fits: Partial<Record<MethodName, Fit>>;
  failures: FitFailure[];
  backtest: Backtest;
  selection: Selection;
  chosen: Fit;
  forecast: Forecast;
  checks: ResidualChecks;
  notes: string[];
}

export interface AnalysisFailure {
  ok: false;
  reason: string;
  failures: FitFailure[];
  notes: string[];
}
