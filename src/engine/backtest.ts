// Rolling-origin backtest (docs/design.md) in O(T·H) per method.
//
// Origins are the training sizes n = minTrain..T-1: the method is fitted to y_1..y_n and forecasts
// steps h = 1..H (while n + h <= T); error = actual - forecast. Each origin's fit comes from running
// state updated in O(1) as n grows (never a refit): Welford's running mean and sum of squared
// deviations of the values (mean method), of the one-step differences (naive, drift) and of the
// seasonal differences (seasonal naive), plus the first and last observed index and the latest
// observed index in each season position. The fits are identical to fitMethod on the prefix, so
// missing values are handled the same way (test/engine/property.test.ts compares the two).
// Origins where the method cannot be fitted yet, and missing actuals, are skipped.
//
// Measures per step: ME, RMSE, MAE, MPE and MAPE (percent, over non-zero actuals), MASE (MAE over
// the in-sample MAE of the one-step naive differences, or seasonal differences when m > 1, over the
// whole series), and the number of origins. Coverage is pooled over all steps and origins:
// - analytic: at every origin, with that origin's sigma and df;
// - empirical: at an origin, the errors known by then (actuals at or before the origin), from the
//   first origin with at least minErrors of them, kept in a Fenwick tree of ranks (the ranks come
//   from the errors' sort, numeric.ts sortedRanks) so each origin costs O(log T), with their
//   running mean and squares and errorspread.ts's sums (O(h) each);
// - bootstrap: at most BOOTSTRAP_ORIGINS origins spread evenly, BOOTSTRAP_PATHS paths each, to keep
//   the cost bounded; the paths resample that origin's own centred residuals (simulate.ts).
// Both judge against the interval a forecast would have had there: the spliced distribution of
// forecast.ts (splicedCovers: definition-6 quantiles in the body, the Student-t tail beyond).
//
// Parts: RunningFit and one subclass per method hold the running state (fitOrigins feeds it);
// scoreSteps turns the origins' fits into errors and measures, counting analytic coverage on the
// way; empiricalCoverage and bootstrapCoverage measure the other two kinds.
import { tQuantileFrom, tQuantileTable } from './dist.js';
import { ErrorSpreadSums, sharedShocks } from './errorspread.js';
import { DEFAULT_MIN_ERRORS, def6Quantile, splicedCovers, type SplicedSample } from './forecast.js';
import { levelKey, levelTail } from './levels.js';
import { methodLabel } from './methods.js';
import {
  extremeUnit,
  Fenwick,
  inUnits,
  lowerBound,
  meanAndSquares,
  present,
  rememberSorted,
  sortedIfKnown,
  sortedRanks,
  type Squares,
} from './numeric.js';
import { createRandom } from './random.js';
import { simulateInto, type SimSpec } from './simulate.js';
import type { Backtest, IntervalKind, MethodBacktest, MethodName, StepMeasures } from './types.js';
import { scratch } from './workspace.js';

export const BOOTSTRAP_ORIGINS = 40;
export const BOOTSTRAP_PATHS = 200;
/** Errors judged per step by the empirical coverage check, at most (about). */
export const EMPIRICAL_COVERAGE_POINTS = 100;

export interface BacktestOptions {
  season: number;
  minTrain: number;
  horizon: number;
  levels: number[];
  /** Seed for the bootstrap coverage paths (default 1). */
  seed?: number;
  /** Interval kinds whose coverage is measured (default all three). */
  coverage?: IntervalKind[];
  /** Minimum errors before empirical coverage is counted (default 20). */
  minErrors?: number;
}

export function runBacktest(y: Float64Array, methods: MethodName[], o: BacktestOptions): Backtest {
  if (!Number.isInteger(o.minTrain) || o.minTrain < 1)
    throw new RangeError(`minTrain must be a whole number of at least 1; got ${o.minTrain}`);
  if (!Number.isInteger(o.horizon) || o.horizon < 1)
    throw new RangeError(`backtest horizon must be a whole number of at least 1; got ${o.horizon}`);
  const series = prepare(y, o.season);
  const { ys, m } = series;
  const T = ys.length;
  const notes: string[] = [];
  const kinds = o.coverage ?? ['analytic', 'empirical', 'bootstrap'];
  const minErrors = o.minErrors ?? DEFAULT_MIN_ERRORS;

  const scoring = scoringOf(ys, m);
  if (!(scoring.scale > 0))
    notes.push(
      `MASE is undefined: the series has no ${m > 1 ? 'seasonal' : 'one-step'} changes to scale the errors by.`,
    );
  if (T - 1 < o.minTrain)
    notes.push(
      `The backtest has no origin: it trains on at least ${o.minTrain} observations and the series has ${T}.`,
    );

  const out: Backtest = { minTrain: o.minTrain, horizon: o.horizon, methods: {}, notes };
  for (const method of methods) {
    const scored = scoreSteps(series, method, scoring, {
      minTrain: o.minTrain,
      horizon: o.horizon,
      levels: o.levels,
      analytic: kinds.includes('analytic'),
    });
    const coverage: MethodBacktest['coverage'] = {};
    if (scored.analytic) coverage.analytic = scored.analytic;
    if (kinds.includes('empirical'))
      coverage.empirical = empiricalCoverage({
        method,
        season: o.season,
        errors: scored.errors,
        observed: observedIndices(ys),
        levels: o.levels,
        minErrors,
      });
    if (kinds.includes('bootstrap'))
      coverage.bootstrap = bootstrapCoverage(series, method, {
        minTrain: o.minTrain,
        horizon: o.horizon,
        levels: o.levels,
        seed: o.seed ?? 1,
      });
    out.methods[method] = methodBacktest(method, scored.steps, scored.errors, coverage);
  }
  if (kinds.includes('empirical')) notes.push(EMPIRICAL_COVERAGE_NOTE(minErrors));
  if (kinds.includes('bootstrap')) notes.push(BOOTSTRAP_COVERAGE_NOTE);
  return out;
}

/** What the backtest's notes say about how empirical coverage is counted. */
export const EMPIRICAL_COVERAGE_NOTE = (minErrors: number): string =>
  `Empirical coverage counts, at each origin, only errors whose actuals were known by then (out of sample), from the first origin with at least ${minErrors} of them; at most about ${EMPIRICAL_COVERAGE_POINTS} errors per step are judged, evenly spread over the origins.`;

/** What the backtest's notes say about how bootstrap coverage is measured. */
export const BOOTSTRAP_COVERAGE_NOTE = `Bootstrap coverage is measured at up to ${BOOTSTRAP_ORIGINS} origins spread evenly over the backtest, with ${BOOTSTRAP_PATHS} paths each, to keep its cost bounded.`;

/**
 * Coverage of one more interval kind for a method already backtested (with the same options):
 * empirical from its errors, bootstrap by a pass over the origins without the measures. Used by
 * analyse() to measure the kind a forecast uses for the chosen method only.
 */
export function measureCoverage(
  y: Float64Array,
  mb: MethodBacktest,
  kind: 'empirical' | 'bootstrap',
  o: BacktestOptions,
): Record<string, number> {
  if (kind === 'bootstrap')
    return bootstrapCoverage(prepare(y, o.season), mb.method, {
      minTrain: o.minTrain,
      horizon: o.horizon,
      levels: o.levels,
      seed: o.seed ?? 1,
    });
  return empiricalCoverage({
    method: mb.method,
    season: o.season,
    errors: mb.errors,
    observed: observedIndices(y),
    levels: o.levels,
    minErrors: o.minErrors ?? DEFAULT_MIN_ERRORS,
  });
}

/**
 * The indices of the observed (present) values of y, ascending (workspace scratch, `count` of them).
 * Step h's errors are those of the actuals at the last observed indices, in order (origins run to
 * T - 1 - h and a missing actual leaves no error), so error j of N has its origin at
 * at[count - N + j] - h.
 */
function observedIndices(y: Float64Array): { at: Int32Array; count: number } {
  const at = scratch.i32('backtest.observed', y.length);
  let count = 0;
  for (let i = 0; i < y.length; i++) if (present(y[i]!)) at[count++] = i;
  return { at, count };
}

/**
 * The backtest of the prefix y[0..P-1] for one method, from `full`, that method's backtest of the
 * whole series y with the same season, minTrain and horizon: the same as
 * runBacktest(y.subarray(0, P), [method], { ...o, coverage: [] }).methods[method], bit for bit
 * (test/engine/property.test.ts), without a second pass. A fit at origin i depends on y[0..i] only,
 * so the prefix's step-h errors are the whole series' errors from origins i <= P - 1 - h: the first
 * ones in origin order. The measures are summed again over those errors in the same order (MASE
 * with the prefix's own scale), and where the whole series' errors of a step are already sorted, the
 * prefix's sorted copy is that minus the errors dropped (no sort). An extreme series (rescaled,
 * numeric.ts extremeUnit) gets the plain backtest of its prefix instead.
 */
export function prefixBacktest(
  y: Float64Array,
  P: number,
  full: MethodBacktest,
  o: { season: number; minTrain: number; horizon: number },
): MethodBacktest {
  const prefix = y.subarray(0, P);
  if (extremeUnit(y) !== 1 || extremeUnit(prefix) !== 1 || full.errors.length !== o.horizon)
    return runBacktest(prefix, [full.method], { ...o, levels: [], coverage: [] }).methods[full.method]!;
  const scale = maseScale(prefix, Math.max(1, Math.floor(o.season)));
  // Every error whose actual is at or after P is dropped: the last `after` errors of each step.
  let after = 0;
  for (let k = P; k < y.length; k++) if (present(y[k]!)) after++;
  // The kept errors' actuals are the last c observed values before P: `back` lists them from P - 1.
  const most = Math.max(0, ...full.errors.map((e) => e.length - after));
  const back = scratch.i32('prefix.actual', most);
  for (let k = P - 1, j = 0; j < most; k--) if (present(y[k]!)) back[j++] = k;
  const steps: StepMeasures[] = [];
  const errors: Float64Array[] = [];
  for (let h = 1; h <= o.horizon; h++) {
    const all = full.errors[h - 1]!;
    const c = Math.max(0, all.length - after);
    const e = all.subarray(0, c);
    let sE = 0;
    let sE2 = 0;
    let sA = 0;
    let cP = 0;
    let sP = 0;
    let sAP = 0;
    for (let j = 0; j < c; j++) {
      const x = e[j]!;
      sE += x;
      sE2 += x * x;
      sA += Math.abs(x);
      const a = y[back[c - 1 - j]!]!;
      if (a !== 0) {
        const pct = x * (100 / a);
        cP++;
        sP += pct;
        sAP += Math.abs(pct);
      }
    }
    steps.push(stepMeasures(h, { c, sE, sE2, sA, cP, sP, sAP }, scale, 1));
    // Made only if asked for (a forecast sorts the steps it reaches, often step 1 alone).
    const known = sortedIfKnown(all);
    if (known && c > 0) rememberSorted(e, () => withoutValues(known, all.subarray(c)));
    errors.push(e);
  }
  return methodBacktest(full.method, steps, errors, {});
}

/** `sorted` (ascending) without one entry equal (Object.is) to each of `drop`, which it holds. */
function withoutValues(sorted: Float64Array, drop: Float64Array): Float64Array {
  const gone = new Uint8Array(sorted.length);
  for (const x of drop) {
    let k = lowerBound(sorted, x);
    while (gone[k] === 1 || !Object.is(sorted[k], x)) k++;
    gone[k] = 1;
  }
  const out = new Float64Array(sorted.length - drop.length);
  for (let k = 0, j = 0; k < sorted.length; k++) if (gone[k] === 0) out[j++] = sorted[k]!;
  return out;
}

// ---------------------------------------------------------------------------------------------
// The series as the backtest reads it.

interface Prepared {
  /** Values in units of `unit` (numeric.ts extremeUnit: exact power-of-two rescaling). */
  ys: Float64Array;
  unit: number;
  /** Season length, at least 1. */
  m: number;
}

function prepare(y: Float64Array, season: number): Prepared {
  const unit = extremeUnit(y);
  return { ys: inUnits(y, unit), unit, m: Math.max(1, Math.floor(season)) };
}

/** What the measures share across methods: the MASE scale and 100 / actual. */
interface Scoring {
  /** In-sample MAE of the one-step (m = 1) or seasonal differences over the whole series, in units. */
  scale: number;
  /** 100 / actual, NaN where the actual is zero or missing: percentage errors by multiplication. */
  inv100: Float64Array;
}

function scoringOf(ys: Float64Array, m: number): Scoring {
  const T = ys.length;
  const inv100 = scratch.f64('backtest.inv100', T);
  for (let i = 0; i < T; i++) {
    const a = ys[i]!;
    inv100[i] = a !== 0 && Number.isFinite(a) ? 100 / a : NaN;
  }
  return { scale: maseScale(ys, m), inv100 };
}

/** The MASE scale: in-sample MAE of the one-step (m = 1) or seasonal differences, NaN without any. */
function maseScale(ys: Float64Array, m: number): number {
  const lag = m > 1 ? m : 1;
  let sAbs = 0;
  let nAbs = 0;
  for (let i = lag; i < ys.length; i++) {
    const a = ys[i]!;
    const b = ys[i - lag]!;
    if (present(a) && present(b)) {
      sAbs += Math.abs(a - b);
      nAbs++;
    }
  }
  return nAbs > 0 ? sAbs / nAbs : NaN;
}

// ---------------------------------------------------------------------------------------------
// Running fit state, one class per method.

/** Welford's running mean and sum of squared deviations. */
class Welford {
  n = 0;
  mean = 0;
  m2 = 0;

  add(x: number): void {
    this.n++;
    const d = x - this.mean;
    this.mean += d / this.n;
    this.m2 += d * (x - this.mean);
  }
}

/**
 * Each origin's fit as a few numbers, indexed by the last training index i (training size i + 1):
 * base value (level or last observed value), slope, gap to the last observed value, drift span,
 * mean variance factor, latest observed index in i's season position. Workspace scratch: a method
 * writes every entry it reads.
 */
interface OriginTable {
  base: Float64Array;
  slopes: Float64Array;
  meanFactor: Float64Array;
  gaps: Int32Array;
  spans: Int32Array;
  latestAt: Int32Array;
}

function originTable(T: number): OriginTable {
  return {
    base: scratch.f64('backtest.base', T),
    slopes: scratch.f64('backtest.slopes', T),
    meanFactor: scratch.f64('backtest.meanFactor', T),
    gaps: scratch.i32('backtest.gaps', T),
    spans: scratch.i32('backtest.spans', T),
    latestAt: scratch.i32('backtest.latestAt', T),
  };
}

const EMPTY = new Float64Array(0);

/**
 * One method fitted to the growing training window y[0..i], updated in O(1) per observation:
 * push(i) takes in y[i] (i = 0, 1, … in order); fitAt(i) records the fit on y[0..i] in the origin
 * table and returns sigma^2 (its df in `df`), or NaN while the method cannot be fitted; column()
 * writes the step-h point forecasts and variance factors of a range of origins; spec(i) describes
 * the fit at origin i for simulation. `pool`, when given, collects the values (mean) or differences
 * (the others) in order: the bootstrap's resampling pool.
 */
abstract class RunningFit {
  readonly stats = new Welford();
  first = -1;
  last = -1;
  df = 0;

  constructor(
    readonly method: MethodName,
    protected readonly ys: Float64Array,
    protected readonly table: OriginTable,
    protected readonly pool: Float64Array | null,
  ) {}

  push(i: number): void {
    const v = this.ys[i]!;
    const ok = Number.isFinite(v);
    if (ok) {
      this.take(i, v);
      if (this.first < 0) this.first = i;
      this.last = i;
    }
    this.placed(i, ok);
  }

  abstract fitAt(i: number): number;
  abstract column(h: number, from: number, to: number, f: Float64Array, v: Float64Array): void;

  spec(i: number): SimSpec {
    const n = this.stats.n;
    return {
      method: this.method,
      pool: this.pool!,
      poolLength: n,
      shift: this.stats.mean,
      scale: Math.sqrt(n / (n - 1)),
      sigma: NaN, // resampling only: the Gaussian mode is not used here
      level: 0,
      last: this.last >= 0 ? this.ys[this.last]! : NaN,
      gap: i - this.last,
      slope: 0,
      paramScale: 0,
      df: n - 1, // sigma-hat's df at this origin: its uncertainty is drawn per path (simulate.ts)
      season: 1,
      base: EMPTY,
      shocks: new Int32Array(0),
    };
  }

  protected abstract take(i: number, v: number): void;
  protected placed(_i: number, _ok: boolean): void {}

  protected add(x: number): void {
    if (this.pool) this.pool[this.stats.n] = x;
    this.stats.add(x);
  }
}

class RunningMean extends RunningFit {
  protected take(_i: number, v: number): void {
    this.add(v);
  }

  fitAt(i: number): number {
    const w = this.stats;
    if (w.n < 2) return NaN;
    this.df = w.n - 1;
    this.table.base[i] = w.mean;
    this.table.meanFactor[i] = 1 + 1 / w.n;
    return Math.max(0, w.m2) / this.df;
  }

  column(_h: number, from: number, to: number, f: Float64Array, v: Float64Array): void {
    const { base, meanFactor } = this.table;
    for (let i = from; i <= to; i++) {
      f[i] = base[i]!;
      v[i] = meanFactor[i]!;
    }
  }

  override spec(i: number): SimSpec {
    const w = this.stats;
    return { ...super.spec(i), level: w.mean, paramScale: 1 / Math.sqrt(w.n) };
  }
}

/** The methods fitted to differences at a lag: naive and drift (lag 1), seasonal naive (lag m). */
abstract class RunningDifferences extends RunningFit {
  protected lag = 1;

  protected take(i: number, v: number): void {
    if (i < this.lag) return;
    const b = this.ys[i - this.lag]!;
    if (Number.isFinite(b)) this.add(v - b);
  }
}

class RunningNaive extends RunningDifferences {
  fitAt(i: number): number {
    const d = this.stats;
    if (d.n < 2) return NaN;
    this.df = d.n - 1;
    this.table.base[i] = this.ys[this.last]!;
    this.table.gaps[i] = i - this.last;
    return Math.max(0, d.m2) / this.df;
  }

  column(h: number, from: number, to: number, f: Float64Array, v: Float64Array): void {
    const { base, gaps } = this.table;
    for (let i = from; i <= to; i++) {
      f[i] = base[i]!;
      v[i] = h + gaps[i]!;
    }
  }
}

class RunningDrift extends RunningDifferences {
  fitAt(i: number): number {
    const d = this.stats;
    if (d.n < 2) return NaN;
    this.df = d.n - 1;
    const t = this.table;
    t.base[i] = this.ys[this.last]!;
    t.gaps[i] = i - this.last;
    const span = this.last - this.first;
    const slope = (this.ys[this.last]! - this.ys[this.first]!) / span;
    const off = d.mean - slope;
    t.slopes[i] = slope;
    t.spans[i] = span;
    return Math.max(0, d.m2 + d.n * off * off) / this.df;
  }

  column(h: number, from: number, to: number, f: Float64Array, v: Float64Array): void {
    const { base, gaps, slopes, spans } = this.table;
    for (let i = from; i <= to; i++) {
      const k = h + gaps[i]!;
      f[i] = base[i]! + k * slopes[i]!;
      v[i] = k * (1 + k / spans[i]!);
    }
  }

  override spec(i: number): SimSpec {
    const span = this.last - this.first;
    return {
      ...super.spec(i),
      slope: (this.ys[this.last]! - this.ys[this.first]!) / span,
      paramScale: 1 / Math.sqrt(span),
    };
  }
}

class RunningSeasonalNaive extends RunningDifferences {
  /** Latest observed index in each season position, -1 before the first. */
  private readonly latest: Int32Array;
  private phases = 0;

  constructor(
    ys: Float64Array,
    table: OriginTable,
    pool: Float64Array | null,
    private readonly m: number,
  ) {
    super('seasonal-naive', ys, table, pool);
    this.lag = m;
    this.latest = new Int32Array(m).fill(-1);
  }

  protected override placed(i: number, ok: boolean): void {
    const latestAt = this.table.latestAt; // latest observed index <= i in i's season position
    const m = this.m;
    if (ok) {
      const ph = i % m;
      if (this.latest[ph]! < 0) this.phases++;
      this.latest[ph] = i;
      latestAt[i] = i;
    } else latestAt[i] = i >= m ? latestAt[i - m]! : -1;
  }

  fitAt(_i: number): number {
    const d = this.stats;
    if (d.n < 2 || this.phases < this.m) return NaN;
    this.df = d.n - 1;
    return Math.max(0, d.m2) / this.df;
  }

  column(h: number, from: number, to: number, f: Float64Array, v: Float64Array): void {
    const { latestAt } = this.table;
    const m = this.m;
    const back = m * Math.ceil(h / m);
    for (let i = from; i <= to; i++) {
      const s0 = latestAt[i + h - back]!;
      f[i] = this.ys[s0]!;
      v[i] = (i + h - s0) / m;
    }
  }

  override spec(i: number): SimSpec {
    const m = this.m;
    const shocks = new Int32Array(m);
    const base = new Float64Array(m);
    for (let h = 0; h < m; h++) {
      const t = i + h + 1;
      const s0 = this.latest[t % m]!;
      base[h] = this.ys[s0]!;
      shocks[h] = (t - s0) / m;
    }
    return { ...super.spec(i), season: m, base, shocks };
  }
}

function runningFit(method: MethodName, s: Prepared, pool: Float64Array | null): RunningFit {
  const table = originTable(s.ys.length);
  switch (method) {
    case 'mean':
      return new RunningMean(method, s.ys, table, pool);
    case 'naive':
      return new RunningNaive(method, s.ys, table, pool);
    case 'drift':
      return new RunningDrift(method, s.ys, table, pool);
    case 'seasonal-naive':
      return new RunningSeasonalNaive(s.ys, table, pool, s.m);
  }
}

/**
 * Feeds y[0..T-2] to the running fit in time order and fits it at every origin (last training
 * index i >= minTrain - 1); `atOrigin(i, sigma2, df)` is called at each origin with a fit. Returns
 * the first origin with a fit (every later origin has one too), or -1.
 */
function fitOrigins(
  fit: RunningFit,
  T: number,
  minTrain: number,
  atOrigin: (i: number, sigma2: number, df: number) => void,
): number {
  let i0 = -1;
  for (let i = 0; i < T - 1; i++) {
    fit.push(i);
    if (i + 1 < minTrain) continue;
    const sigma2 = fit.fitAt(i);
    if (sigma2 !== sigma2) continue;
    if (i0 < 0) i0 = i;
    atOrigin(i, sigma2, fit.df);
  }
  return i0;
}

// ---------------------------------------------------------------------------------------------
// Errors and measures (with analytic coverage counted on the way).

interface ScoreOptions {
  minTrain: number;
  horizon: number;
  levels: number[];
  /** Count analytic coverage. */
  analytic: boolean;
}

interface Scored {
  steps: StepMeasures[];
  /** Errors per step in actual units, in origin order. */
  errors: Float64Array[];
  analytic: Record<string, number> | null;
}

function scoreSteps(s: Prepared, method: MethodName, scoring: Scoring, o: ScoreOptions): Scored {
  const { ys, unit } = s;
  const { scale, inv100 } = scoring;
  const T = ys.length;
  const H = o.horizon;
  const maxO = Math.max(0, T - o.minTrain);
  const fit = runningFit(method, s, null);
  const analytic = o.analytic ? new AnalyticCount(o.levels, T) : null;
  const i0 = fitOrigins(fit, T, o.minTrain, (i, sigma2, df) => analytic?.atOrigin(i, sigma2, df));

  // Step by step: each origin's forecast and variance factor for step h, then the error and every
  // running sum in scalars.
  const errBuf = new Float64Array(H * maxO);
  const fcol = scratch.f64('backtest.forecast', T);
  const vcol = scratch.f64('backtest.factor', T);
  const e2col = scratch.f64('backtest.e2', T);
  const steps: StepMeasures[] = [];
  const errors: Float64Array[] = [];
  for (let h = 1; h <= H; h++) {
    const iEnd = T - 1 - h; // last origin whose step-h actual exists
    let c = 0;
    let sE = 0;
    let sE2 = 0;
    let sA = 0;
    let cP = 0;
    let sP = 0;
    let sAP = 0;
    const off = (h - 1) * maxO;
    if (i0 >= 0 && iEnd >= i0) {
      fit.column(h, i0, iEnd, fcol, vcol);
      for (let i = i0; i <= iEnd; i++) {
        const a = ys[i + h]!;
        if (!Number.isFinite(a)) {
          e2col[i] = NaN;
          continue;
        }
        const e = a - fcol[i]!;
        errBuf[off + c] = e;
        c++;
        sE += e;
        const e2 = e * e;
        sE2 += e2;
        sA += Math.abs(e);
        const inv = inv100[i + h]!;
        if (inv === inv) {
          const pct = e * inv;
          cP++;
          sP += pct;
          sAP += Math.abs(pct);
        }
        e2col[i] = e2;
      }
      analytic?.step(i0, iEnd, e2col, vcol, c);
    }
    steps.push(stepMeasures(h, { c, sE, sE2, sA, cP, sP, sAP }, scale, unit));
    const e = errBuf.subarray(off, off + c);
    if (unit !== 1) for (let j = 0; j < c; j++) e[j] = e[j]! * unit;
    errors.push(e);
  }
  return { steps, errors, analytic: analytic?.shares() ?? null };
}

/** A step's running sums over its errors: count, sum, sum of squares and of absolutes, and the same for percentage errors. */
interface StepSums {
  c: number;
  sE: number;
  sE2: number;
  sA: number;
  cP: number;
  sP: number;
  sAP: number;
}

/**
 * A step's measures from its sums; errors in units of `unit` (power-of-two rescaling, so multiplying
 * back is exact), MASE against `scale` in the same units.
 */
function stepMeasures(step: number, t: StepSums, scale: number, unit: number): StepMeasures {
  const { c, sE, sE2, sA, cP, sP, sAP } = t;
  return {
    step,
    origins: c,
    me: c > 0 ? (sE / c) * unit : NaN,
    rmse: c > 0 ? Math.sqrt(sE2 / c) * unit : NaN,
    mae: c > 0 ? (sA / c) * unit : NaN,
    mpe: cP > 0 ? sP / cP : NaN,
    mape: cP > 0 ? sAP / cP : NaN,
    mase: c > 0 && scale > 0 ? sA / c / scale : NaN,
  };
}

function methodBacktest(
  method: MethodName,
  steps: StepMeasures[],
  errors: Float64Array[],
  coverage: MethodBacktest['coverage'],
): MethodBacktest {
  const s1 = steps[0]!;
  const notes: string[] = [];
  if (s1.origins === 0)
    notes.push(`The ${methodLabel(method)} method has no backtest origin it could be fitted at.`);
  return {
    method,
    origins: s1.origins,
    me: s1.me,
    rmse: s1.rmse,
    mae: s1.mae,
    mpe: s1.mpe,
    mape: s1.mape,
    mase: s1.mase,
    steps,
    coverage,
    errors,
    notes,
  };
}

function shares(levels: number[], inside: ArrayLike<number>, total: number): Record<string, number> {
  const r: Record<string, number> = {};
  levels.forEach((l, k) => (r[levelKey(l)] = total > 0 ? inside[k]! / total : NaN));
  return r;
}

// ---------------------------------------------------------------------------------------------
// Coverage, one kind at a time.

/**
 * Analytic coverage: per level, the errors with e^2 <= (q_df sigma)^2 x variance factor, q the
 * Student-t quantile of that origin's df. atOrigin() records each origin's squared half-width per
 * unit of variance factor; step() counts one step's origins.
 */
class AnalyticCount {
  private readonly halfWidth2: Float64Array;
  private readonly probs: number[];
  private readonly tables: Float64Array[];
  private readonly inside: Float64Array;
  private total = 0;

  constructor(
    private readonly levels: number[],
    private readonly T: number,
  ) {
    this.probs = levels.map((l) => 1 - levelTail(l));
    this.tables = this.probs.map((p) => tQuantileTable(p));
    this.halfWidth2 = scratch.f64('backtest.halfWidth2', levels.length * T);
    this.inside = new Float64Array(levels.length);
  }

  atOrigin(i: number, sigma2: number, df: number): void {
    for (let l = 0; l < this.levels.length; l++) {
      const q = tQuantileFrom(this.tables[l]!, this.probs[l]!, df);
      this.halfWidth2[l * this.T + i] = q * q * sigma2;
    }
  }

  /**
   * Origins from..to of one step; e2 is NaN where the actual is missing, which compares false.
   * Two levels per pass over the origins (each error and factor read once for both), counting in a
   * tight, branch-free loop: the outcome is random, so a branch would often be mispredicted.
   */
  step(from: number, to: number, e2: Float64Array, factor: Float64Array, errors: number): void {
    const hw2 = this.halfWidth2;
    const T = this.T;
    const L = this.levels.length;
    let l = 0;
    for (; l + 1 < L; l += 2) {
      const r0 = l * T;
      const r1 = r0 + T;
      let n0 = 0;
      let n1 = 0;
      for (let i = from; i <= to; i++) {
        const a = e2[i]!;
        const f = factor[i]!;
        n0 += a <= hw2[r0 + i]! * f ? 1 : 0;
        n1 += a <= hw2[r1 + i]! * f ? 1 : 0;
      }
      this.inside[l] += n0;
      this.inside[l + 1] += n1;
    }
    if (l < L) {
      const r0 = l * T;
      let n0 = 0;
      for (let i = from; i <= to; i++) n0 += e2[i]! <= hw2[r0 + i]! * factor[i]! ? 1 : 0;
      this.inside[l] += n0;
    }
    this.total += errors;
  }

  shares(): Record<string, number> {
    return shares(this.levels, this.inside, this.total);
  }
}

interface EmpiricalCoverageOptions {
  method: MethodName;
  season: number;
  /** Errors per step, in origin order. */
  errors: Float64Array[];
  /** The series' observed indices (observedIndices): where each error's origin comes from. */
  observed: { at: Int32Array; count: number };
  levels: number[];
  /** Errors that must be known before an origin is judged. */
  minErrors: number;
}

/**
 * Empirical coverage with only errors known at each origin (see the file comment): each judged error
 * against the interval the forecast would have had there, the spliced distribution of the errors
 * known by then (forecast.ts splicedCovers: their definition-6 quantiles in the body, the Student-t
 * prediction tail beyond it, with R and its df from errorspread.ts for the known errors).
 */
function empiricalCoverage(o: EmpiricalCoverageOptions): Record<string, number> {
  const { errors, levels, minErrors } = o;
  const { at, count } = o.observed;
  const L = levels.length;
  const alphas = levels.map(levelTail);
  const inside = new Int32Array(L);
  let total = 0;
  const tree = new Fenwick(0);
  for (let h = 0; h < errors.length; h++) {
    const e = errors[h]!;
    const N = e.length;
    if (N <= minErrors) continue;
    // Error j's actual is at[first + j], its origin h + 1 steps before.
    const first = count - N;
    const lead = h + 1;
    // Each error's first position among the sorted errors (ties share it), from the sort itself: the
    // tree counts the errors known so far at these positions, so its k-th counted position is their
    // k-th smallest.
    const { sorted, first: lo } = sortedRanks(e);
    tree.reset(N);
    const order = (k: number): number => sorted[tree.kth(k)]!;
    const stats = new Welford();
    const spread = new ErrorSpreadSums(o.method, o.season, lead, at[first]! - lead);
    const shared = sharedShocks(o.method, o.season, lead);
    // One sample, updated before each judgement (its fields are what splicedCovers reads).
    const sq: Squares = { n: 0, mean: 0, ss: 0, sd: (df: number) => Math.sqrt(Math.max(0, stats.m2) / df) };
    const sample: SplicedSample = {
      q6: (p: number): number => def6Quantile(order, sq.n, p),
      sq,
      offset: 0,
      base: 0,
      df: 0,
      observed: null,
    };
    // Judge at most about EMPIRICAL_COVERAGE_POINTS errors per step, evenly spread over the origins
    // (every error of a short series): the share is a calibration check, and this bounds its cost.
    // Only the judged errors need the known ones counted: an error is known at origin i once its
    // actual is at or before i, and origins grow with j.
    const stride = Math.max(1, Math.floor(N / EMPIRICAL_COVERAGE_POINTS));
    let known = 0;
    for (let j = 0; j < N; j += stride) {
      const actual = at[first + j]!; // the judged error's actual; its origin is actual - lead
      while (known < j && at[first + known]! <= actual - lead) {
        tree.add(lo[known]!);
        stats.add(e[known]!);
        known++;
      }
      if (known < minErrors) continue;
      sq.n = known;
      sq.mean = stats.mean;
      sq.ss = stats.m2;
      sample.base = known / shared;
      sample.observed = spread.spreadAfter(known, actual - lead + 1);
      splicedCovers(sample, e[j]!, alphas, inside);
      total++;
    }
  }
  return shares(levels, inside, total);
}

interface BootstrapCoverageOptions {
  minTrain: number;
  horizon: number;
  levels: number[];
  seed: number;
}

/**
 * Bootstrap coverage: at the origins bootstrapPlan marks, BOOTSTRAP_PATHS paths resampling that
 * origin's own centred residuals, and per level the steps whose actual lies inside the paths'
 * interval. A pass of its own over the origins, with its own running fit.
 */
function bootstrapCoverage(
  s: Prepared,
  method: MethodName,
  o: BootstrapCoverageOptions,
): Record<string, number> {
  const { ys } = s;
  const T = ys.length;
  const H = o.horizon;
  const alphas = o.levels.map(levelTail);
  const marks = bootstrapPlan(T, o.minTrain);
  const fit = runningFit(method, s, new Float64Array(T));
  const rnd = createRandom(o.seed);
  const paths = new Float64Array(BOOTSTRAP_PATHS * H);
  const col = new Float64Array(BOOTSTRAP_PATHS);
  const inside = new Int32Array(o.levels.length);
  let total = 0;
  fitOrigins(fit, T, o.minTrain, (i) => {
    if (marks[i] !== 1) return;
    const hMax = Math.min(H, T - 1 - i);
    const spec = fit.spec(i);
    simulateInto(paths, spec, hMax, BOOTSTRAP_PATHS, rnd, 'bootstrap');
    total += countInside(paths, hMax, ys, i, col, alphas, inside, spec.poolLength, spec.df ?? 0);
  });
  return shares(o.levels, inside, total);
}

/** Marks (by last training index) at most BOOTSTRAP_ORIGINS origins spread evenly over the backtest. */
function bootstrapPlan(T: number, minTrain: number): Uint8Array {
  const marks = new Uint8Array(T);
  const lo = minTrain;
  const hi = T - 1;
  if (hi < lo) return marks;
  const count = Math.min(BOOTSTRAP_ORIGINS, hi - lo + 1);
  for (let k = 0; k < count; k++) {
    const n = count === 1 ? hi : Math.round(lo + (k * (hi - lo)) / (count - 1));
    marks[n - 1] = 1;
  }
  return marks;
}

/**
 * Counts, per level, the steps whose actual lies inside the paths' interval, the spliced
 * distribution of the paths as a forecast has it (forecast.ts splicedCovers; `base` residuals
 * resampled, sigma-hat `df`); returns the steps counted.
 */
function countInside(
  paths: Float64Array,
  hMax: number,
  ys: Float64Array,
  i: number,
  col: Float64Array,
  alphas: number[],
  inside: Int32Array,
  base: number,
  df: number,
): number {
  const P = col.length;
  let total = 0;
  for (let h = 0; h < hMax; h++) {
    const a = ys[i + h + 1]!;
    if (!Number.isFinite(a)) continue;
    for (let p = 0; p < P; p++) col[p] = paths[p * hMax + h]!;
    col.sort();
    const q6 = (p: number): number => def6Quantile((k) => col[k - 1]!, P, p);
    const sq = meanAndSquares(col);
    splicedCovers({ q6, sq, offset: 0, base, df, observed: null }, a, alphas, inside);
    total++;
  }
  return total;
}
