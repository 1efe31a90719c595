// Point forecasts with prediction intervals of three kinds, and probabilities under them.
//
// - analytic: point ± q × se, q the Student-t quantile at 0.5 + L/200 with the sigma-hat df
//   (docs/design.md), exact under Gaussian white-noise errors.
// - bootstrap: quantiles per step of simulated paths (simulate.ts), by linear interpolation
//   between order statistics (Hyndman & Fan definition 7). The paths are kept on the Forecast.
// - empirical: point + quantiles of the backtest's h-step errors (actual - forecast). A step needs at
//   least `minErrors` (default 20) errors; when step 1 has fewer, the whole forecast falls back to
//   analytic; later steps with fewer (or beyond the backtest horizon) use analytic bands. Both say so
//   in a note.
import { runResidualTests } from './checks.js';
import { tCdf, tQuantile } from './dist.js';
import { fmtP, selectQuantiles, sortedQuantile } from './numeric.js';
import { simulatePaths } from './simulate.js';
import type {
  Fit,
  Forecast,
  IntervalBand,
  IntervalChoice,
  IntervalKind,
  MethodBacktest,
  ResidualChecks,
} from './types.js';

/** Default minimum number of backtest errors per step for empirical intervals. */
export const DEFAULT_MIN_ERRORS = 20;
/** Default number of simulated paths for bootstrap intervals. */
export const DEFAULT_PATHS = 1000;

/** Sorted step columns of a forecast's paths, computed once per Forecast. */
const sortedColumns = new WeakMap<Float64Array, Float64Array[]>();

function columnsOf(paths: Float64Array, nPaths: number, horizon: number): Float64Array[] {
  let cols = sortedColumns.get(paths);
  if (!cols) {
    cols = [];
    for (let h = 0; h < horizon; h++) {
      const c = new Float64Array(nPaths);
      for (let p = 0; p < nPaths; p++) c[p] = paths[p * horizon + h]!;
      c.sort();
      cols.push(c);
    }
    sortedColumns.set(paths, cols);
  }
  return cols;
}

const sortedCache = new WeakMap<Float64Array, Float64Array>();

/**
 * An ascending copy of `xs`, computed once per array (the backtest's errors are sorted for the
 * empirical intervals, their coverage and every later tail probability). Callers must not change
 * `xs` afterwards, nor the copy.
 */
export function sortedCopy(xs: Float64Array): Float64Array {
  let s = sortedCache.get(xs);
  if (!s) {
    s = xs.slice().sort();
    sortedCache.set(xs, s);
  }
  return s;
}

/** Fewest backtest errors over the steps 1..H of a method's backtest (0 when there is none). */
export function fewestErrors(bt: MethodBacktest | undefined): number {
  if (!bt || bt.errors.length === 0) return 0;
  let least = Infinity;
  for (const e of bt.errors) least = Math.min(least, e.length);
  return least;
}

/**
 * What `intervals: auto` decides, from the chosen fit's residual checks and its backtest.
 * - Autocorrelated, biased or changing-spread residuals break the assumptions of both analytic and
 *   bootstrap intervals (independent, identically distributed errors); out-of-sample backtest errors
 *   carry those effects, so `empirical` when every backtest step has at least minErrors errors.
 * - Otherwise non-normal residuals: `bootstrap`, which resamples their actual shape.
 * - Otherwise `analytic` (Student-t, exact for Gaussian white noise).
 */
export function chooseIntervalKind(
  checks: ResidualChecks,
  bt: MethodBacktest | undefined,
  minErrors: number = DEFAULT_MIN_ERRORS,
): { kind: IntervalKind; reason: string } {
  const problems: string[] = [];
  if (!checks.ljungBox.ok) problems.push(`autocorrelated (Ljung–Box ${fmtP(checks.ljungBox.pValue)})`);
  if (!checks.bias.ok) problems.push(`biased (t-test ${fmtP(checks.bias.pValue)})`);
  if (!checks.spread.ok) problems.push(`of changing spread (Goldfeld–Quandt ${fmtP(checks.spread.pValue)})`);
  const least = fewestErrors(bt);
  const enough = least >= minErrors;
  if (problems.length > 0 && enough)
    return {
      kind: 'empirical',
      reason: `empirical, because the residuals are ${problems.join(', ')}, which analytic and bootstrap intervals assume away; the backtest has at least ${least} out-of-sample errors at every step (${minErrors} needed).`,
    };
  if (!checks.normality.ok)
    return {
      kind: 'bootstrap',
      reason: `bootstrap, because the residuals are not normal (Jarque–Bera ${fmtP(checks.normality.pValue)}) and bootstrap paths keep their shape${problems.length > 0 ? `; empirical would suit the ${problems.join(', ')} residuals better but the backtest has only ${least} errors at its thinnest step (${minErrors} needed)` : ''}.`,
    };
  if (problems.length > 0)
    return {
      kind: 'analytic',
      reason: `analytic, although the residuals are ${problems.join(', ')}: empirical intervals need ${minErrors} backtest errors per step and the thinnest step has ${least}. Treat the intervals as optimistic.`,
    };
  return { kind: 'analytic', reason: 'analytic (Student-t), because the residuals pass the checks.' };
}

export interface ForecastOptions {
  horizon: number;
  levels: number[];
  kind: IntervalChoice;
  paths: number;
  seed: number;
  backtest?: MethodBacktest;
  checks?: ResidualChecks;
  minErrors?: number;
}

function validate(o: ForecastOptions): void {
  if (!Number.isInteger(o.horizon) || o.horizon < 1)
    throw new RangeError(`horizon must be a whole number of at least 1; got ${o.horizon}`);
  for (const l of o.levels)
    if (!(l > 0 && l < 100)) throw new RangeError(`each level must be between 0 and 100 (percent); got ${l}`);
  if (!Number.isInteger(o.paths) || o.paths < 1)
    throw new RangeError(`paths must be a whole number of at least 1; got ${o.paths}`);
}

/** Point forecasts and intervals of `fit` for steps 1..horizon at every level. */
export function makeForecast(fit: Fit, o: ForecastOptions): Forecast {
  validate(o);
  const H = o.horizon;
  const minErrors = o.minErrors ?? DEFAULT_MIN_ERRORS;
  const mean = fit.mean(H);
  const se = fit.standardError(H);
  const df = fit.sigmaDf;
  const notes: string[] = [];
  let kind: IntervalKind;
  if (o.kind === 'auto') {
    const chosen = chooseIntervalKind(o.checks ?? runResidualTests(fit), o.backtest, minErrors);
    kind = chosen.kind;
    notes.push(`Intervals: ${chosen.reason}`);
  } else kind = o.kind;

  let empiricalErrors: Float64Array[] | null = null;
  if (kind === 'empirical') {
    const bt = o.backtest;
    const have = bt && bt.method === fit.method ? (bt.errors[0]?.length ?? 0) : 0;
    if (!bt || bt.method !== fit.method || have < minErrors) {
      kind = 'analytic';
      notes.push(
        !bt || bt.method !== fit.method
          ? 'Empirical intervals need the backtest of the same method; analytic intervals are used instead.'
          : `Empirical intervals need at least ${minErrors} backtest errors per step; step 1 has ${have}, so analytic intervals are used instead.`,
      );
    } else {
      empiricalErrors = [];
      const thin: number[] = [];
      for (let h = 1; h <= H; h++) {
        const e = bt.errors[h - 1];
        if (e && e.length >= minErrors) empiricalErrors.push(sortedCopy(e));
        else {
          empiricalErrors.push(new Float64Array(0));
          thin.push(h);
        }
      }
      if (thin.length > 0)
        notes.push(
          `Empirical intervals: step${thin.length === 1 ? '' : 's'} ${ranges(thin)} ${thin.length === 1 ? 'has' : 'have'} fewer than ${minErrors} backtest errors (or ${thin.length === 1 ? 'lies' : 'lie'} beyond the backtest horizon of ${bt.errors.length}) and ${thin.length === 1 ? 'uses' : 'use'} analytic bands.`,
        );
    }
  }

  let paths: Float64Array | null = null;
  let nPaths = 0;
  if (kind === 'bootstrap') {
    nPaths = o.paths;
    paths = simulatePaths(fit, H, nPaths, o.seed, 'bootstrap');
  }
  // Bootstrap bands: the quantiles of each step's paths by selection (a full sort of each step is
  // left until a tail probability asks for it).
  let bootQ: Float64Array | null = null;
  const nl = o.levels.length;
  if (paths) {
    const probs = new Float64Array(2 * nl);
    o.levels.forEach((l, k) => {
      probs[2 * k] = (1 - l / 100) / 2;
      probs[2 * k + 1] = 1 - (1 - l / 100) / 2;
    });
    bootQ = new Float64Array(2 * nl * H);
    const work = new Float64Array(nPaths);
    const q = new Float64Array(2 * nl);
    for (let h = 0; h < H; h++) {
      for (let p = 0; p < nPaths; p++) work[p] = paths[p * H + h]!;
      selectQuantiles(work, probs, q);
      bootQ.set(q, h * 2 * nl);
    }
  }

  const bands: IntervalBand[] = [];
  for (const [k, level] of o.levels.entries()) {
    const lower = new Float64Array(H);
    const upper = new Float64Array(H);
    const a = (1 - level / 100) / 2;
    const q = tQuantile(1 - a, df);
    for (let h = 0; h < H; h++) {
      const errs = empiricalErrors?.[h];
      if (bootQ) {
        lower[h] = bootQ[h * 2 * nl + 2 * k]!;
        upper[h] = bootQ[h * 2 * nl + 2 * k + 1]!;
      } else if (errs && errs.length > 0) {
        lower[h] = mean[h]! + sortedQuantile(errs, a);
        upper[h] = mean[h]! + sortedQuantile(errs, 1 - a);
      } else {
        const w = se[h]! === 0 ? 0 : q * se[h]!;
        lower[h] = mean[h]! - w;
        upper[h] = mean[h]! + w;
      }
    }
    bands.push({ level, lower, upper });
  }
  if (fit.sigma === 0) notes.push('sigma is 0: the intervals collapse to the point forecast.');
  return {
    method: fit.method,
    kind,
    requested: o.kind,
    horizon: H,
    mean,
    se,
    df,
    bands,
    paths,
    nPaths,
    empiricalErrors,
    notes,
  };
}

function ranges(xs: number[]): string {
  const out: string[] = [];
  for (let i = 0; i < xs.length;) {
    let j = i;
    while (j + 1 < xs.length && xs[j + 1] === xs[j]! + 1) j++;
    out.push(i === j ? `${xs[i]}` : `${xs[i]}–${xs[j]}`);
    i = j + 1;
  }
  return out.join(', ');
}

function stepOk(fc: Forecast, step: number): boolean {
  return Number.isInteger(step) && step >= 1 && step <= fc.horizon;
}

/**
 * Tail probability of `value` at `step` under the forecast's own predictive distribution:
 * - analytic (and empirical steps without enough errors): Student-t with the sigma df,
 *   P(Y >= value) = 1 - F_t((value - mean)/se);
 * - bootstrap: the share of paths at or beyond the value, as (1 + count)/(1 + nPaths) so that a
 *   value beyond every path gets a small positive p rather than 0 (Davison & Hinkley 1997, eq. 4.11);
 * - empirical: the same with the backtest errors added to the point forecast.
 * 'both' is twice the smaller tail, capped at 1. z = (value - mean)/se (0 when value = mean, ±Infinity
 * when se = 0). NaN for a step outside 1..horizon.
 */
export function tailProbability(
  fc: Forecast,
  step: number,
  value: number,
  side: 'above' | 'below' | 'both',
): { p: number; z: number } {
  if (!stepOk(fc, step) || Number.isNaN(value)) return { p: NaN, z: NaN };
  const mu = fc.mean[step - 1]!;
  const s = fc.se[step - 1]!;
  const diff = value - mu;
  const z = diff === 0 ? 0 : s > 0 ? diff / s : diff > 0 ? Infinity : -Infinity;
  let above: number;
  let below: number;
  const errs = fc.empiricalErrors?.[step - 1];
  if (fc.kind === 'bootstrap' && fc.paths) {
    const col = columnsOf(fc.paths, fc.nPaths, fc.horizon)[step - 1]!;
    const n = col.length;
    const lt = lowerBound(col, value); // count < value
    const le = upperBound(col, value); // count <= value
    above = (1 + (n - lt)) / (1 + n);
    below = (1 + le) / (1 + n);
  } else if (fc.kind === 'empirical' && errs && errs.length > 0) {
    const n = errs.length;
    const lt = lowerBound(errs, diff);
    const le = upperBound(errs, diff);
    above = (1 + (n - lt)) / (1 + n);
    below = (1 + le) / (1 + n);
  } else if (s > 0) {
    above = 1 - tCdf(z, fc.df);
    below = tCdf(z, fc.df);
  } else {
    above = diff >= 0 ? 1 : 0;
    below = diff <= 0 ? 1 : 0;
  }
  const p = side === 'above' ? above : side === 'below' ? below : Math.min(1, 2 * Math.min(above, below));
  return { p, z };
}

/**
 * Predictive quantile at `step` for probability `prob` (e.g. 0.95 for a one-sided upper bound), from
 * the forecast's own distribution (t, paths or backtest errors as in tailProbability). NaN for a
 * step outside 1..horizon or prob outside [0, 1].
 */
export function quantileAt(fc: Forecast, step: number, prob: number): number {
  if (!stepOk(fc, step) || !(prob >= 0 && prob <= 1)) return NaN;
  const mu = fc.mean[step - 1]!;
  const s = fc.se[step - 1]!;
  const errs = fc.empiricalErrors?.[step - 1];
  if (fc.kind === 'bootstrap' && fc.paths)
    return sortedQuantile(columnsOf(fc.paths, fc.nPaths, fc.horizon)[step - 1]!, prob);
  if (fc.kind === 'empirical' && errs && errs.length > 0) return mu + sortedQuantile(errs, prob);
  if (!(s > 0)) return mu;
  return mu + tQuantile(prob, fc.df) * s;
}

/** Number of entries < x in an ascending array. */
function lowerBound(a: Float64Array, x: number): number {
  let lo = 0;
  let hi = a.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (a[mid]! < x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Number of entries <= x in an ascending array. */
function upperBound(a: Float64Array, x: number): number {
  let lo = 0;
  let hi = a.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (a[mid]! <= x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}
