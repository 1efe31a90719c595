// How the backtest's h-step errors are related to one another and to the next error, under each
// method's own model: Gaussian white-noise shocks with sd sigma (mean: level plus noise; naive: a
// random walk; drift: a random walk with drift; seasonal naive: a seasonal random walk), nothing
// missing. Empirical intervals (forecast.ts) use it to scale the Student-t tail beyond their sample.
//
// The backtest of a prefix of T values has its step-h errors at consecutive origins (last training
// index, 0-based) i = T - 1 - h - n + 1 .. T - 1 - h; the next error e* is made at origin T - 1. Each
// error is a linear combination of the shocks, so its covariances follow by counting shared shocks
// (in units of sigma^2, d = j - i >= 0, origins i <= j):
// - mean (training size N_i = i + 1): e_i = y_{i+h} - mean(y_0..y_i); C_ii = 1 + 1/N_i,
//   C_ij = 1/N_j for 0 < d < h (the two means share N_i values; y_{i+h} joins the later mean only
//   when d >= h, and then cancels it), else 0; Var(e*) = 1 + 1/T.
// - naive: e_i = sum of the h shocks i+1..i+h; C_ij = max(0, h - d); Var(e*) = h.
// - drift (slope from y_0 to y_i, span i): e_i = (S_{i+h} - S_i) - (h/i) S_i, S the shock sums;
//   C_ij = max(0, h - d) (1 + h/j) (the slope terms add h^2/j and take h d/j from the overlap);
//   Var(e*) = h (1 + h/(T - 1)).
// - seasonal naive (season m, k = ceil(h/m)): e_i = sum of k shocks m apart ending at i + h;
//   C_ij = max(0, k - d/m) when m divides d, else 0; Var(e*) = k.
// In every case e* is uncorrelated with each e_i (its future shocks are new; for mean and drift the
// covariance through the estimated level or slope works out to zero by the same counting).
// With m the errors' mean and SS their sum of squares about it:
//   E[SS] = sum_i C_ii - (1/n) sum_ij C_ij,  Var(m) = (1/n^2) sum_ij C_ij,
//   E[(e* - m)^2] = Var(e*) + Var(m),
// and the ratio R = E[(e* - m)^2] / E[SS] turns the sample's SS into the variance of the next error
// about the sample's mean: s^2 = R SS. For n independent errors of one variance (naive, h = 1)
// R = (1 + 1/n) / (n - 1): the Student-t prediction interval of a new draw,
// mean ± t_{n-1} sd sqrt(1 + 1/n) (Hahn & Meeker 1991, Statistical Intervals, sec. 4.7).
import type { MethodName } from './types.js';

/**
 * Shocks that neighbouring h-step errors of a method share: h for naive and drift (overlapping
 * windows), ceil(h / m) for seasonal naive, 1 for the mean (whose errors share none).
 */
export function sharedShocks(method: MethodName, season: number, h: number): number {
  if (method === 'mean') return 1;
  if (method === 'seasonal-naive') return Math.ceil(h / Math.max(1, season));
  return h;
}

/** Var(e*) of the next step-h error from a prefix of T values, in units of sigma^2. */
function nextVariance(method: MethodName, m: number, h: number, T: number): number {
  switch (method) {
    case 'mean':
      return 1 + 1 / T;
    case 'naive':
      return h;
    case 'drift':
      return h * (1 + h / (T - 1));
    case 'seasonal-naive':
      return Math.ceil(h / m);
  }
}

/** The tail's variance per unit of SS and its Satterthwaite df (file comment). */
export interface NextErrorSpread {
  ratio: number;
  df: number;
}

/**
 * Answers of spreadAfter kept across series for naive and seasonal naive, one table per (method,
 * season, h) indexed by the error count (emptied when there are many tables).
 */
const spreadTables = new Map<string, NextErrorSpread[]>();
const SPREAD_TABLES = 256;

function spreadTable(method: MethodName, m: number, h: number): NextErrorSpread[] | null {
  if (method !== 'naive' && method !== 'seasonal-naive') return null;
  const key = `${method} ${m} ${h}`;
  let table = spreadTables.get(key);
  if (!table) {
    if (spreadTables.size >= SPREAD_TABLES) spreadTables.clear();
    table = [];
    spreadTables.set(key, table);
  }
  return table;
}

/**
 * The sums behind R and the Satterthwaite df (nextErrorSpread) for errors added one at a time in
 * origin order from origin `first`: each addition costs O(h) (errors are correlated only within a
 * lag of h, or k seasons for seasonal naive), so a backtest can ask after every error
 * (empirical coverage does). C1 (the row sums) changes only for the last few errors.
 */
export class ErrorSpreadSums {
  private n = 0;
  private trace = 0;
  private total = 0;
  private frob = 0;
  private rows2 = 0;
  /** Row sums of the last `reach` errors, error q at q % reach (older rows no longer change). */
  private readonly rows: Float64Array;
  private readonly m: number;
  private readonly k: number;
  private readonly reach: number;
  /** Shared answers by count (spreadAfter), or null where they depend on the origins. */
  private readonly table: NextErrorSpread[] | null;

  constructor(
    private readonly method: MethodName,
    season: number,
    private readonly h: number,
    private readonly first: number,
  ) {
    this.m = Math.max(1, Math.floor(season));
    this.k = Math.ceil(h / this.m);
    this.reach = method === 'seasonal-naive' ? this.m * this.k : h;
    this.rows = new Float64Array(this.reach);
    this.table = first >= 0 ? spreadTable(method, this.m, h) : null;
  }

  /**
   * Adds the next error (origin first + count so far): its covariances (file comment) with itself
   * and with its earlier neighbours within reach, nearest first.
   * Seasonal-naive errors share shocks only a whole number of seasons apart: the pairs between are 0.
   */
  add(): void {
    const { method, h, k, rows, reach } = this;
    const n = this.n;
    const j = this.first + n;
    // C_jj here, and below C_ij (i = first + q) for the neighbours within reach: every such pair is
    // d = n - q < h apart (s whole seasons, fewer than k, for seasonal naive), so each case of the
    // file comment is its in-range branch.
    const cjj =
      method === 'mean'
        ? 1 + 1 / (j + 1)
        : method === 'naive'
          ? h
          : method === 'drift'
            ? j > 0
              ? h * (1 + h / j)
              : NaN
            : k;
    let rj = cjj;
    this.trace += cjj;
    this.frob += cjj * cjj;
    this.total += cjj;
    // Seasonal-naive errors share shocks only a whole number of seasons apart: the pairs between are 0.
    const stride = method === 'seasonal-naive' ? this.m : 1;
    const stop = Math.max(0, n - reach + 1);
    let slot = n % reach; // rows[slot] is error q's row sum; the slots run down with q
    for (let q = n - stride, s = 1; q >= stop; q -= stride, s++) {
      slot -= stride;
      if (slot < 0) slot += reach;
      const d = n - q;
      const c =
        method === 'mean'
          ? 1 / (j + 1)
          : method === 'naive'
            ? h - d
            : method === 'drift'
              ? j > 0
                ? (h - d) * (1 + h / j)
                : NaN
              : Math.max(0, k - s);
      if (c === 0) continue;
      const r = rows[slot]!;
      this.rows2 += (r + c) * (r + c) - r * r;
      rows[slot] = r + c;
      rj += c;
      this.frob += 2 * c * c;
      this.total += 2 * c;
    }
    rows[n % reach] = rj;
    this.rows2 += rj * rj;
    this.n++;
  }

  /**
   * spread(T) once the first `count` errors are added (adding up to there; counts only grow). For
   * naive and seasonal naive the covariances depend on the origins' distance only, and Var(e*) not
   * on T, so the answer depends on (method, season, h, count) alone: it is kept for the next series
   * that asks (a fleet's series often share a length), and the errors are added only on a miss.
   * `share` false: always from this object's own sums.
   */
  spreadAfter(count: number, T: number, share = true): NextErrorSpread {
    const table = share ? this.table : null;
    const known = table?.[count];
    if (known) return known;
    while (this.n < count) this.add();
    const r = this.spread(T);
    if (table) table[count] = Object.freeze(r);
    return r;
  }

  /** R and the df for the errors added so far, the next error made from a prefix of T values. */
  spread(T: number): NextErrorSpread {
    const { n, total } = this;
    if (!(n >= 2) || this.first < 0) return { ratio: NaN, df: NaN };
    const ss = this.trace - total / n;
    const ss2 = this.frob - (2 * this.rows2) / n + (total * total) / (n * n);
    if (!(ss > 0 && ss2 > 0)) return { ratio: NaN, df: NaN };
    return {
      ratio: (nextVariance(this.method, this.m, this.h, T) + total / (n * n)) / ss,
      df: (ss * ss) / ss2,
    };
  }
}

/**
 * R = E[(e* - m)^2] / E[SS] for the n step-h errors of a backtest of a prefix of T values, and the
 * Satterthwaite (1946) df of SS, 2 E[SS]^2 / Var(SS) = tr(PC)^2 / tr((PC)^2) for Gaussian errors
 * (P = I - 11'/n centres them; tr((PC)^2) = |C|^2 - 2 |C1|^2 / n + (1'C1)^2 / n^2): n - 1 for
 * independent errors, more than n / k - 1 for overlapping ones. NaN for both when undefined (fewer
 * than 2 errors, or origins before the first value).
 */
export function nextErrorSpread(
  method: MethodName,
  season: number,
  h: number,
  n: number,
  T: number,
): NextErrorSpread {
  if (T - h - n < 0) return { ratio: NaN, df: NaN };
  return new ErrorSpreadSums(method, season, h, T - h - n).spreadAfter(n, T);
}
