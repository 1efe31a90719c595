// Probability distributions: thin wrappers over jstat.
//
// Every function takes plain numbers and never throws: a NaN argument, or a parameter outside its
// domain (df <= 0, p outside [0, 1]), returns NaN. Quantiles at p = 0 and p = 1 are -Infinity and
// +Infinity (0 and +Infinity for the chi-square). jstat's own inverses are accurate to about 1e-7
// relative for the t (its CDF to about 3e-8) and much worse for the chi-square at large df (2e-4 at df = 10,000), so the t and
// chi-square quantiles are polished with Newton steps on jstat's CDF and density, which are accurate
// to about 1e-12; test/engine/dist.test.ts checks all of them against the @stdlib packages.
import jstatModule from 'jstat';

const { jStat } = jstatModule;

/** Above this many df the t CDF uses an expansion in 1/df (the quantile above a tenth of it). */
const LARGE_DF = 1e4;

const bad = (...xs: number[]): boolean => xs.some((x) => Number.isNaN(x));

/** Standard (or general) normal CDF. NaN for NaN input or sd <= 0. */
export function normalCdf(x: number, mean = 0, sd = 1): number {
  if (bad(x, mean, sd) || !(sd > 0)) return NaN;
  return jStat.normal.cdf(x, mean, sd);
}

/** Normal quantile. NaN for p outside [0, 1] or sd <= 0; -Infinity at 0, +Infinity at 1. */
export function normalQuantile(p: number, mean = 0, sd = 1): number {
  if (bad(p, mean, sd) || !(sd > 0) || p < 0 || p > 1) return NaN;
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  return jStat.normal.inv(p, mean, sd);
}

/** Student-t CDF with df degrees of freedom (df = Infinity is the standard normal). NaN for df <= 0. */
export function tCdf(x: number, df: number): number {
  if (bad(x, df) || !(df > 0)) return NaN;
  if (x === Infinity) return 1;
  if (x === -Infinity) return 0;
  if (x === 0) return 0.5;
  if (df === Infinity || df > 1e10) return jStat.normal.cdf(x, 0, 1);
  if (df > LARGE_DF) {
    // jstat's t CDF drifts at large df (0.4625 for 0.4602 at x = -0.1, 1e6 df); use the first
    // term of the expansion in 1/df instead: F(x) = Phi(x) - phi(x) (x^3 + x) / (4 df) + O(df^-2)
    // (Abramowitz & Stegun 26.7.7 region; the error is below 1e-9 above 10,000 df).
    const phi = Math.exp(-0.5 * x * x) / Math.sqrt(2 * Math.PI);
    return jStat.normal.cdf(x, 0, 1) - (phi * (x * x * x + x)) / (4 * df);
  }
  // Closed forms at 1 and 2 df (Cauchy, and F(x) = 1/2 + x / (2 sqrt(2 + x^2))).
  if (df === 1) return 0.5 + Math.atan(x) / Math.PI;
  if (df === 2) return 0.5 + x / (2 * Math.sqrt(2 + x * x));
  return jStat.studentt.cdf(x, df);
}

/**
 * Student-t quantile: jstat's inverse, then up to three Newton steps x -= (F(x) - p) / f(x) on
 * jstat's CDF and density (each step roughly squares the relative error of the 1e-7 start).
 */
export function tQuantile(p: number, df: number): number {
  if (bad(p, df) || !(df > 0) || p < 0 || p > 1) return NaN;
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  if (p === 0.5) return 0;
  if (df === Infinity || df > 1e10) return jStat.normal.inv(p, 0, 1);
  if (df > LARGE_DF / 10) {
    // Cornish–Fisher expansion in 1/df (Abramowitz & Stegun 26.7.5), to the 1/df^2 term; the
    // error is of order df^-3, below 1e-9 above 1,000 df.
    const z = jStat.normal.inv(p, 0, 1);
    const z2 = z * z;
    return z + (z * (z2 + 1)) / (4 * df) + (z * ((5 * z2 + 16) * z2 + 3)) / (96 * df * df);
  }
  if (df === 1) return Math.tan(Math.PI * (p - 0.5));
  if (df === 2) return (2 * p - 1) / Math.sqrt(2 * p * (1 - p));
  let x = jStat.studentt.inv(p, df);
  if (!Number.isFinite(x)) return x;
  // In the far tails jstat's CDF has less relative precision than its inverse: keep the start.
  if (p < 1e-3 || p > 1 - 1e-3) return x;
  // A Newton step is kept only when it brings F(x) closer to p (far in the tails of small df the
  // density underflows and the CDF loses relative precision; there jstat's start is kept).
  let err = Math.abs(jStat.studentt.cdf(x, df) - p);
  for (let i = 0; i < 3 && err > 0; i++) {
    const f = jStat.studentt.pdf(x, df);
    if (!(f > 0)) break;
    const nx = x - (jStat.studentt.cdf(x, df) - p) / f;
    const nerr = Number.isFinite(nx) ? Math.abs(jStat.studentt.cdf(nx, df) - p) : Infinity;
    if (!(nerr < err)) break;
    x = nx;
    err = nerr;
  }
  return x;
}

/** Chi-square CDF with k degrees of freedom; 0 for x <= 0. NaN for k <= 0. */
export function chiSquareCdf(x: number, k: number): number {
  if (bad(x, k) || !(k > 0)) return NaN;
  if (x <= 0) return 0;
  if (x === Infinity) return 1;
  return k <= JSTAT_GAMMA_MAX_DF ? jStat.chisquare.cdf(x, k) : regularizedGammaP(k / 2, x / 2);
}

/**
 * jstat's regularised incomplete gamma is accurate to about 1e-10 up to 1,000 chi-square df and
 * drifts above (0.5056 instead of 0.5 at the median of 10,000 df); beyond it the chi-square CDF is
 * computed here by the classic series (x < a + 1) and Lentz continued fraction (otherwise) for
 * P(a, x) (Numerical Recipes, 3rd ed., section 6.2), with jstat's log-gamma.
 */
const JSTAT_GAMMA_MAX_DF = 1000;

function regularizedGammaP(a: number, x: number): number {
  if (x <= 0) return 0;
  const lnPre = a * Math.log(x) - x - jStat.gammaln(a);
  if (x < a + 1) {
    let term = 1 / a;
    let sum = term;
    for (let n = 1; n < 100_000; n++) {
      term *= x / (a + n);
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * 1e-16) break;
    }
    return Math.min(1, sum * Math.exp(lnPre));
  }
  const tiny = 1e-300;
  let b = x + 1 - a;
  let c = 1 / tiny;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 100_000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < 1e-16) break;
  }
  return Math.max(0, 1 - Math.exp(lnPre) * h);
}

/** Chi-square quantile: jstat's inverse polished by Newton steps (see the file comment). */
export function chiSquareQuantile(p: number, k: number): number {
  if (bad(p, k) || !(k > 0) || p < 0 || p > 1) return NaN;
  if (p === 0) return 0;
  if (p === 1) return Infinity;
  let x = jStat.chisquare.inv(p, k);
  if (!(x > 0) || !Number.isFinite(x)) return x;
  for (let i = 0; i < 8; i++) {
    const f = jStat.chisquare.pdf(x, k);
    if (!(f > 0)) break;
    const step = (chiSquareCdf(x, k) - p) / f;
    if (!Number.isFinite(step)) break;
    // Keep the iterate positive: at most halve x in one step.
    x = step >= x ? x / 2 : x - step;
    if (Math.abs(step) <= 1e-15 * x) break;
  }
  return x;
}

/** F CDF with (d1, d2) degrees of freedom; 0 for x <= 0. NaN for d1 <= 0 or d2 <= 0. */
export function fCdf(x: number, d1: number, d2: number): number {
  if (bad(x, d1, d2) || !(d1 > 0) || !(d2 > 0)) return NaN;
  if (x <= 0) return 0;
  if (x === Infinity) return 1;
  return jStat.centralF.cdf(x, d1, d2);
}

const tTables = new Map<number, Float64Array>();
const TABLE_DF = 4096;

/**
 * tQuantile for integer df, memoised per probability (df up to 4096; larger df are computed each
 * time). The backtest asks for the quantile at every origin, where df grows by one per origin; the
 * memo makes that a table lookup. Results are identical to tQuantile (the memo holds its values).
 */
export function tQuantileCached(p: number, df: number): number {
  if (!Number.isInteger(df) || df < 1 || df > TABLE_DF) return tQuantile(p, df);
  return tQuantileFrom(tQuantileTable(p), p, df);
}

/**
 * The memo table of tQuantile(p, df) for integer df 1..4096, filled on demand: entry df is NaN until
 * asked for. For hot loops: `tQuantileFrom(table, p, df)` reads it.
 */
export function tQuantileTable(p: number): Float64Array {
  let table = tTables.get(p);
  if (!table) {
    if (tTables.size > 64) tTables.clear();
    table = new Float64Array(TABLE_DF + 1).fill(NaN);
    tTables.set(p, table);
  }
  return table;
}

/** tQuantile(p, df) through a table from tQuantileTable(p). */
export function tQuantileFrom(table: Float64Array, p: number, df: number): number {
  if (df >= 1 && df <= TABLE_DF && Number.isInteger(df)) {
    let q = table[df]!;
    if (q !== q) {
      q = tQuantile(p, df);
      table[df] = q;
    }
    return q;
  }
  return tQuantile(p, df);
}
