// Probability distributions: thin wrappers over jstat.
//
// Every function takes plain numbers and never throws: a NaN argument, or a parameter outside its
// domain (df <= 0, p outside [0, 1]), returns NaN. Quantiles at p = 0 and p = 1 are -Infinity and
// +Infinity (0 and +Infinity for the chi-square). jstat's own inverses are accurate to about 1e-7
// relative for the t and much worse for the chi-square at large df (2e-4 at df = 10,000), so the t and
// chi-square quantiles are polished with Newton steps on jstat's CDF and density, which are accurate
// to about 1e-12; test/engine/dist.test.ts checks all of them against the @stdlib packages.
import jstatModule from 'jstat';

const { jStat } = jstatModule;

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
  if (df === Infinity || df > 1e10) return jStat.normal.cdf(x, 0, 1);
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
  let x = jStat.studentt.inv(p, df);
  if (!Number.isFinite(x)) return x;
  for (let i = 0; i < 3; i++) {
    const f = jStat.studentt.pdf(x, df);
    if (!(f > 0)) break;
    const step = (jStat.studentt.cdf(x, df) - p) / f;
    if (!Number.isFinite(step)) break;
    x -= step;
    if (Math.abs(step) <= 1e-15 * Math.max(1, Math.abs(x))) break;
  }
  return x;
}

/** Chi-square CDF with k degrees of freedom; 0 for x <= 0. NaN for k <= 0. */
export function chiSquareCdf(x: number, k: number): number {
  if (bad(x, k) || !(k > 0)) return NaN;
  if (x <= 0) return 0;
  if (x === Infinity) return 1;
  return jStat.chisquare.cdf(x, k);
}

/** Chi-square quantile: jstat's inverse polished by Newton steps (see the file comment). */
export function chiSquareQuantile(p: number, k: number): number {
  if (bad(p, k) || !(k > 0) || p < 0 || p > 1) return NaN;
  if (p === 0) return 0;
  if (p === 1) return Infinity;
  let x = jStat.chisquare.inv(p, k);
  if (!(x > 0) || !Number.isFinite(x)) return x;
  for (let i = 0; i < 6; i++) {
    const f = jStat.chisquare.pdf(x, k);
    if (!(f > 0)) break;
    const step = (jStat.chisquare.cdf(x, k) - p) / f;
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
