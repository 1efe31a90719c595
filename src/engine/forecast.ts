// Point forecasts with prediction intervals of three kinds, and probabilities under them.
//
// - analytic: point ± q × se, q the Student-t quantile at 0.5 + L/200 with the sigma-hat df
//   (docs/design.md), exact under Gaussian white-noise errors.
// - bootstrap: quantiles per step of simulated paths (simulate.ts). The paths are kept on the Forecast.
// - empirical: point + quantiles of the backtest's h-step errors (actual - forecast). A step needs at
//   least `minErrors` (default 20) errors; when step 1 has fewer, the whole forecast falls back to
//   analytic; later steps with fewer (or beyond the backtest horizon) use analytic bands. Both say so
//   in a note.
//
// Bootstrap and empirical kinds share one predictive distribution per step, built from their sample
// (the paths' values, or the point forecast plus the errors):
// - the body, between probabilities 1 - u and u, is the sample's own: quantiles by Hyndman & Fan
//   (1996) definition 6, position p (n + 1), whose expected coverage of a new exchangeable draw is
//   exactly p; tail probabilities are the sample share at or beyond the value;
// - beyond u (and below 1 - u) a Student-t(nu) centred on the sample's mean m with scale s, scaled
//   to the mass the sample leaves beyond its quantile at u:
//   P(Y >= x) = (1 - u) S_nu((x - m) / s) / S_nu((Q(u) - m) / s), S_nu = 1 - F_nu (and the mirror
//   image below). Bootstrap paths are draws from the predictive distribution itself: the t has
//   their sd (s = sd sqrt((nu - 2) / nu)), nu the sigma-hat df, or b - 1 when fewer independent
//   observations stand behind the sample. Empirical errors are observations, and the next error is
//   a new one: the t is its predictive distribution, s^2 = R SS with R = E[(e* - m)^2] / E[SS] under
//   the method's own model and nu the Satterthwaite df of SS (errorspread.ts); for n independent
//   errors that is the Student-t prediction interval mean ± t_{n-1} sd sqrt(1 + 1/n). The tail's
//   shape comes from the sample's mean and spread (far steadier than its extreme quantiles), its
//   mass from the sample; it joins the body continuously at u.
//   u = max(0.8, 1 - 5 / min(b, n)), n the sample size and b the independent observations behind it:
//   the residuals a bootstrap resamples; for empirical h-step errors n / k, k the shocks neighbouring
//   errors share (h for naive and drift, whose windows overlap; ceil(h / m) for seasonal naive; 1 for
//   the mean, whose errors share none). The sample speaks only where at least 5 of its independent
//   observations lie beyond.
// So p-values keep their meaning far beyond the sample (run-wide control can work: a count over
// 1,000 paths could never go below 1/1,001), and a short history (T = 30) or long step (h = 14)
// leans on the Student-t shape with its small-sample df instead of a few extreme order statistics.
// Where the sample has no spread there is no tail to scale: the p-value is then the sample's
// (1 + count) / (1 + b), reported as an upper bound.
import { runResidualTests } from './checks.js';
import { tCdf, tQuantile } from './dist.js';
import { nextErrorSpread, sharedShocks, type NextErrorSpread } from './errorspread.js';
import { checkLevels, levelTail } from './levels.js';
import { meanAndSquares, selectQuantiles, sortedCopy, sortedQuantile, type Squares } from './numeric.js';
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
import { agree, pIs } from '../text/index.js';

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
  const p = (t: ResidualChecks['spread']): string =>
    Number.isFinite(t.adjustedP) ? `, Holm-adjusted ${pIs(t.adjustedP)}` : '';
  if (!checks.ljungBox.ok) problems.push(`autocorrelated (Ljung–Box${p(checks.ljungBox)})`);
  if (!checks.bias.ok) problems.push(`biased (t-test${p(checks.bias)})`);
  if (!checks.spread.ok) problems.push(`of changing spread (${checks.spread.name}${p(checks.spread)})`);
  const least = fewestErrors(bt);
  const enough = least >= minErrors;
  if (problems.length > 0 && enough)
    return {
      kind: 'empirical',
      reason: `empirical, because the residuals are ${problems.join(', ')}, which analytic and bootstrap intervals assume away; the backtest has at least ${least} out-of-sample errors at every step (${minErrors} needed).${!checks.ljungBox.ok ? ' Empirical intervals hold their level on average over autocorrelated errors, not at every moment: they are too narrow just after a large excursion (the next errors follow it) and too wide in quiet spells, so alarms cluster after excursions.' : ''}`,
    };
  if (!checks.normality.ok)
    return {
      kind: 'bootstrap',
      reason: `bootstrap, because the residuals are not normal (Jarque–Bera${p(checks.normality)}) and bootstrap paths keep their shape${problems.length > 0 ? `; empirical would suit the ${problems.join(', ')} residuals better but the backtest has only ${least} errors at its thinnest step (${minErrors} needed)` : ''}.`,
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
  checkLevels(o.levels);
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
          `Empirical intervals: ${agree(thin.length, 'step')} ${ranges(thin)} ${agree(thin.length, 'has', 'have')} fewer than ${minErrors} backtest errors (or ${agree(thin.length, 'lies', 'lie')} beyond the backtest horizon of ${bt.errors.length}) and ${agree(thin.length, 'uses', 'use')} analytic bands.`,
        );
    }
  }

  let paths: Float64Array | null = null;
  let nPaths = 0;
  if (kind === 'bootstrap') {
    nPaths = o.paths;
    paths = simulatePaths(fit, H, nPaths, o.seed, 'bootstrap');
  }
  const base: number[] = [];
  const spread: (NextErrorSpread | null)[] = [];
  for (let h = 1; h <= H; h++) {
    const n = empiricalErrors?.[h - 1]?.length ?? 0;
    base.push(paths ? fit.residualCount : n / sharedShocks(fit.method, fit.season, h));
    spread.push(paths ? null : nextErrorSpread(fit.method, fit.season, h, n, fit.n));
  }
  // Bootstrap: each step's median, body edges and band quantiles by selection (a full sort of a step
  // is left until a tail probability asks for it).
  const work = paths ? new Float64Array(nPaths) : null;
  const bands: IntervalBand[] = o.levels.map((level) => ({
    level,
    lower: new Float64Array(H),
    upper: new Float64Array(H),
  }));
  for (let h = 0; h < H; h++) {
    const errs = empiricalErrors?.[h];
    let q: ((prob: number) => number) | null = null;
    if (paths && work) {
      for (let p = 0; p < nPaths; p++) work[p] = paths[p * H + h]!;
      q = splicedQuantiles(work, 0, base[h]!, df, o.levels, null);
    } else if (errs && errs.length > 0)
      q = splicedQuantiles(errs, mean[h]!, base[h]!, df, o.levels, spread[h] ?? { ratio: NaN, df: NaN });
    o.levels.forEach((level, k) => {
      const a = levelTail(level);
      const band = bands[k]!;
      if (q) {
        band.lower[h] = q(a);
        band.upper[h] = q(1 - a);
      } else {
        const w = se[h]! === 0 ? 0 : tQuantile(1 - a, df) * se[h]!;
        band.lower[h] = mean[h]! - w;
        band.upper[h] = mean[h]! + w;
      }
    });
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
    sampleBase: paths || empiricalErrors ? base : null,
    sampleSpread: empiricalErrors && !paths ? spread : null,
    notes,
  };
}

/** Where the sample's body ends (see the file comment): u for `base` independent observations, n draws. */
export function tailStart(base: number, n: number): number {
  return Math.max(0.8, 1 - 5 / Math.min(base, n));
}

/** Definition-7 probability whose quantile is the definition-6 quantile at p (clamped to the sample). */
function def6(p: number, n: number): number {
  return n > 1 ? Math.min(1, Math.max(0, (p * (n + 1) - 1) / (n - 1))) : 0;
}

/** The Student-t tail beyond a sample's body (file comment). */
interface Tail {
  u: number;
  /** Sample quantiles at 1 - u and u (with the offset). */
  lo: number;
  hi: number;
  /** Location, scale and df of the fitted t; s 0 when the sample has no spread. */
  m: number;
  s: number;
  nu: number;
  /** The fitted t's mass beyond hi and below lo. */
  beyondHi: number;
  belowLo: number;
}

/**
 * Scale and df of the tail's Student-t (file comment). `observed` null: the sample is draws from the
 * predictive distribution (bootstrap paths), and the t has the sample's sd, s = sd sqrt((nu - 2) / nu),
 * nu = min(sigma-hat df, b - 1). Otherwise the sample is observed errors, and the t is the predictive
 * distribution of the next error: s = sqrt(R SS), nu the Satterthwaite df of SS (errorspread.ts; for
 * n independent errors R = (1 + 1/n) / (n - 1) and nu = n - 1, the Student-t prediction interval of
 * a new draw; where R is undefined, that). Scaling observed errors' t to their sd as for draws made
 * it too narrow by sqrt((nu - 2) / (nu (1 + 1/n))), 0.92 at n = 20 (6.2% alarms at 5%), and more for
 * overlapping h-step errors, whose sd is biased low.
 */
export function tailScale(
  sq: Squares,
  base: number,
  df: number,
  observed: NextErrorSpread | null,
): { s: number; nu: number } {
  const n = sq.n;
  if (!(n >= 2)) return { s: NaN, nu: NaN };
  if (observed) {
    const known = observed.ratio > 0 && observed.df > 0;
    return {
      s: sq.sd(known ? 1 / observed.ratio : (n - 1) / (1 + 1 / n)),
      nu: known ? observed.df : n - 1,
    };
  }
  const nu = Math.max(1, Math.min(df > 0 ? df : Infinity, base - 1));
  const sd = sq.sd(n - 1);
  return { s: nu > 2 && Number.isFinite(nu) ? sd * Math.sqrt((nu - 2) / nu) : sd, nu };
}

function tailOf(
  sq: Squares,
  offset: number,
  lo: number,
  hi: number,
  base: number,
  df: number,
  observed: NextErrorSpread | null,
): Tail {
  const u = tailStart(base, sq.n);
  const { s, nu } = tailScale(sq, base, df, observed);
  const m = offset + sq.mean;
  const ok = Number.isFinite(s) && s > 0;
  return {
    u,
    lo,
    hi,
    m,
    s: ok ? s : 0,
    nu,
    beyondHi: ok ? 1 - tCdf((hi - m) / s, nu) : 0,
    belowLo: ok ? tCdf((lo - m) / s, nu) : 0,
  };
}

/**
 * The definition-6 quantile at p of n values known through their k-th smallest (1-based), clamped
 * to the sample: position p (n + 1), interpolated between neighbours.
 */
export function def6Quantile(order: (k: number) => number, n: number, p: number): number {
  const pos = p * (n + 1);
  if (pos <= 1) return order(1);
  if (pos >= n) return order(n);
  const j = Math.floor(pos);
  const g = pos - j;
  const lo = order(j);
  return g === 0 ? lo : lo + g * (order(j + 1) - lo);
}

/**
 * A sample as the spliced distribution reads it: q6 its definition-6 quantile, its mean and squares,
 * values offset + sample, `base` independent observations behind it, the sigma-hat df, and for
 * observed errors how they relate to the next one (null for draws).
 */
export interface SplicedSample {
  q6: (p: number) => number;
  sq: Squares;
  offset: number;
  base: number;
  df: number;
  observed: NextErrorSpread | null;
}

/**
 * The spliced distribution's quantile at prob (file comment). The one rule for forecasts
 * (quantileAt); splicedCovers asks the same of the backtest's coverage.
 */
export function splicedQuantile({ q6, sq, offset, base, df, observed }: SplicedSample, prob: number): number {
  const u = tailStart(base, sq.n);
  if (prob >= 1 - u && prob <= u) return offset + q6(prob);
  return tailQuantile(tailOf(sq, offset, offset + q6(1 - u), offset + q6(u), base, df, observed), prob);
}

/**
 * For each tail mass a of `alphas`, whether x lies within [Q(a), Q(1 - a)] of the spliced
 * distribution (as splicedQuantile), counted into `inside`; no tail quantile is computed:
 * in the body the bounds are the sample's own quantiles, and beyond it x is inside exactly when its
 * tail probability is at least a (the tail is fitted once for all levels). For the backtest's
 * coverage, which asks this for every judged actual.
 */
export function splicedCovers(
  { q6, sq, offset, base, df, observed }: SplicedSample,
  x: number,
  alphas: readonly number[],
  inside: Int32Array,
): void {
  const u = tailStart(base, sq.n);
  const lo = offset + q6(1 - u);
  const hi = offset + q6(u);
  // Plain loops, no callbacks: the backtest asks this for every judged actual.
  if (x >= lo && x <= hi) {
    for (let l = 0; l < alphas.length; l++) {
      const a = alphas[l]!;
      if (a < 1 - u || (x >= offset + q6(a) && x <= offset + q6(1 - a))) inside[l]!++;
    }
    return;
  }
  let mass = -1;
  for (let l = 0; l < alphas.length; l++) {
    const a = alphas[l]!;
    if (a >= 1 - u) continue; // both bounds lie in the body, and x beyond it
    if (mass < 0) {
      const t = tailOf(sq, offset, lo, hi, base, df, observed);
      mass = t.s > 0 && t.beyondHi > 0 && t.belowLo > 0 ? tailMass(t, x) : 0;
    }
    if (mass >= a) inside[l]!++;
  }
}

/** The tail's quantile at prob beyond the body (prob > u or < 1 - u). */
function tailQuantile(t: Tail, prob: number): number {
  if (!(t.s > 0 && t.beyondHi > 0 && t.belowLo > 0)) return prob > t.u ? t.hi : t.lo;
  if (prob > t.u) return t.m + t.s * tQuantile(1 - ((1 - prob) * t.beyondHi) / (1 - t.u), t.nu);
  return t.m + t.s * tQuantile((prob * t.belowLo) / (1 - t.u), t.nu);
}

/** P(Y >= x) beyond the top of the body, P(Y <= x) below its bottom. */
function tailMass(t: Tail, x: number): number {
  if (x > t.hi) return ((1 - t.u) * (1 - tCdf((x - t.m) / t.s, t.nu))) / t.beyondHi;
  return ((1 - t.u) * tCdf((x - t.m) / t.s, t.nu)) / t.belowLo;
}

/**
 * The spliced quantile function of a sample (file comment) at the probabilities a band needs, by
 * selection: `work` is reordered unless `sorted` (then it is read as ascending). Values are
 * offset + sample.
 */
function splicedQuantiles(
  work: Float64Array,
  offset: number,
  base: number,
  df: number,
  levels: number[],
  observed: NextErrorSpread | null,
): (prob: number) => number {
  const sorted = observed !== null;
  const n = work.length;
  const u = tailStart(base, n);
  const probs = [1 - u, u];
  for (const l of levels) {
    const a = levelTail(l);
    if (a >= 1 - u) probs.push(a, 1 - a);
  }
  const at = new Map<number, number>();
  if (sorted) for (const p of probs) at.set(p, offset + sortedQuantile(work, def6(p, n)));
  else {
    const out = new Float64Array(probs.length);
    selectQuantiles(
      work,
      probs.map((p) => def6(p, n)),
      out,
    );
    probs.forEach((p, k) => at.set(p, offset + out[k]!));
  }
  const tail = tailOf(meanAndSquares(work), offset, at.get(1 - u)!, at.get(u)!, base, df, observed);
  return (prob) => at.get(prob) ?? tailQuantile(tail, prob);
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

/** The sample behind a step of a bootstrap or empirical forecast (ascending), or null for a t step. */
function sampleAt(
  fc: Forecast,
  step: number,
): { sorted: Float64Array; offset: number; base: number; observed: NextErrorSpread | null } | null {
  const base = fc.sampleBase?.[step - 1] ?? 0;
  if (fc.kind === 'bootstrap' && fc.paths)
    return { sorted: columnsOf(fc.paths, fc.nPaths, fc.horizon)[step - 1]!, offset: 0, base, observed: null };
  const errs = fc.empiricalErrors?.[step - 1];
  if (fc.kind === 'empirical' && errs && errs.length > 0)
    return {
      sorted: errs,
      offset: fc.mean[step - 1]!,
      base,
      observed: fc.sampleSpread?.[step - 1] ?? { ratio: NaN, df: NaN },
    };
  return null;
}

/** How a p-value was obtained: the Student-t, the sample's share, or the t tail beyond the sample. */
export type PValueBasis = 'student-t' | 'sample' | 'tail-model';

/**
 * Tail probability of `value` at `step` under the forecast's own predictive distribution:
 * - analytic (and empirical steps without enough errors): Student-t with the sigma df,
 *   P(Y >= value) = 1 - F_t((value - mean)/se);
 * - bootstrap and empirical: the spliced distribution of the file comment (the sample's share in its
 *   body, the scaled Student-t tail beyond). Where the sample has no spread on the value's side the
 *   share (1 + count) / (1 + b) is returned with `bound: 'upper'`: the p-value is at most that.
 * 'both' is twice the smaller tail, capped at 1. z = (value - mean)/se (0 when value = mean, ±Infinity
 * when se = 0). NaN for a step outside 1..horizon.
 */
export function tailProbability(
  fc: Forecast,
  step: number,
  value: number,
  side: 'above' | 'below' | 'both',
): { p: number; z: number; basis: PValueBasis; bound: 'upper' | null } {
  if (!stepOk(fc, step) || Number.isNaN(value)) return { p: NaN, z: NaN, basis: 'student-t', bound: null };
  const mu = fc.mean[step - 1]!;
  const s = fc.se[step - 1]!;
  const diff = value - mu;
  const z = diff === 0 ? 0 : s > 0 ? diff / s : diff > 0 ? Infinity : -Infinity;
  const sample = sampleAt(fc, step);
  let above: number;
  let below: number;
  let basis: PValueBasis = 'student-t';
  let boundAbove = false;
  let boundBelow = false;
  if (sample) {
    const { sorted, offset, base, observed } = sample;
    const n = sorted.length;
    const x = value - offset;
    const u = tailStart(base, n);
    const t = tailOf(
      meanAndSquares(sorted),
      0,
      sortedQuantile(sorted, def6(1 - u, n)),
      sortedQuantile(sorted, def6(u, n)),
      base,
      fc.df,
      observed,
    );
    const shareAbove = (n - lowerBound(sorted, x)) / n;
    const shareBelow = upperBound(sorted, x) / n;
    basis = 'sample';
    if (x > t.hi || x < t.lo) {
      basis = 'tail-model';
      if (t.s > 0 && t.beyondHi > 0 && t.belowLo > 0) {
        above = x > t.hi ? tailMass(t, x) : 1 - tailMass(t, x);
        below = 1 - above;
      } else {
        above = (1 + shareAbove * base) / (1 + base);
        below = (1 + shareBelow * base) / (1 + base);
        if (x > t.hi) boundAbove = true;
        else boundBelow = true;
      }
    } else {
      above = shareAbove;
      below = shareBelow;
    }
  } else if (s > 0) {
    above = 1 - tCdf(z, fc.df);
    below = tCdf(z, fc.df);
  } else {
    above = diff >= 0 ? 1 : 0;
    below = diff <= 0 ? 1 : 0;
  }
  let p: number;
  let bound: boolean;
  if (side === 'above') [p, bound] = [above, boundAbove];
  else if (side === 'below') [p, bound] = [below, boundBelow];
  else {
    p = Math.min(1, 2 * Math.min(above, below));
    bound = above <= below ? boundAbove : boundBelow;
  }
  return { p, z, basis, bound: bound ? 'upper' : null };
}

/**
 * Predictive quantile at `step` for probability `prob` (e.g. 0.95 for a one-sided upper bound), from
 * the forecast's own distribution (t, or the spliced sample distribution as in tailProbability). NaN
 * for a step outside 1..horizon or prob outside [0, 1].
 */
export function quantileAt(fc: Forecast, step: number, prob: number): number {
  if (!stepOk(fc, step) || !(prob >= 0 && prob <= 1)) return NaN;
  const mu = fc.mean[step - 1]!;
  const s = fc.se[step - 1]!;
  const sample = sampleAt(fc, step);
  if (sample) {
    const { sorted, offset, base, observed } = sample;
    const n = sorted.length;
    const q6 = (p: number): number => sortedQuantile(sorted, def6(p, n));
    return splicedQuantile({ q6, sq: meanAndSquares(sorted), offset, base, df: fc.df, observed }, prob);
  }
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
