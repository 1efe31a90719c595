// How backtest errors relate to one another and to the next error (src/engine/errorspread.ts),
// checked against plain linear algebra on the real backtest: every error is linear in the shocks,
// so the backtest of a series made by one unit shock gives that shock's coefficient in every error.
import { describe, expect, it } from 'vitest';
import { ErrorSpreadSums, nextErrorSpread, sharedShocks } from '../../src/engine/errorspread.js';
import { fitMethod, isFit, runBacktest, type MethodName } from '../../src/engine/index.js';

/** The series a single unit shock at time s makes under the method's own model (all else zero). */
function impulse(method: MethodName, season: number, length: number, s: number): Float64Array {
  const y = new Float64Array(length);
  for (let t = 0; t < length; t++) {
    const shock = t === s ? 1 : 0;
    if (method === 'mean') y[t] = shock;
    else if (method === 'seasonal-naive') y[t] = (t >= season ? y[t - season]! : 0) + shock;
    else y[t] = (t > 0 ? y[t - 1]! : 0) + shock; // naive and drift (a drift adds nothing to errors)
  }
  return y;
}

/**
 * Brute force: the coefficient matrix A (errors × shocks) from the backtest of each impulse series
 * and the next error's coefficients from the method fitted to each impulse's first T values; then
 * C = A A', E[SS] = tr(PC), Var(m) = 1'C1 / n^2, Cov(e*, m) = a*' A' 1 / n, E[(e* - m)^2] =
 * |a*|^2 + Var(m) - 2 Cov(e*, m), Satterthwaite df = tr(PC)^2 / tr(PCPC), P = I - 11'/n.
 */
function bruteForce(method: MethodName, season: number, h: number, T: number, minTrain: number) {
  const shocks = T + h;
  const cols: Float64Array[] = [];
  const next: number[] = [];
  for (let s = 0; s < shocks; s++) {
    const y = impulse(method, season, shocks, s);
    const prefix = y.subarray(0, T);
    const bt = runBacktest(prefix, [method], { season, minTrain, horizon: h, levels: [95], coverage: [] });
    cols.push(bt.methods[method]!.errors[h - 1]!);
    const f = fitMethod(method, prefix, season);
    if (!isFit(f)) throw new Error(f.reason);
    next.push(y[T - 1 + h]! - f.mean(h)[h - 1]!);
  }
  const n = cols[0]!.length;
  const C = Array.from({ length: n }, (_, i) =>
    Array.from({ length: n }, (_, j) => cols.reduce((a, c) => a + c[i]! * c[j]!, 0)),
  );
  const covNext = Array.from({ length: n }, (_, i) => cols.reduce((a, c, s) => a + c[i]! * next[s]!, 0));
  const varNext = next.reduce((a, x) => a + x * x, 0);
  const PC = C.map((row) => {
    const colMean = row.map((_, j) => C.reduce((a, r) => a + r[j]!, 0) / n);
    return row.map((x, j) => x - colMean[j]!);
  });
  let trPC = 0;
  let trPCPC = 0;
  for (let i = 0; i < n; i++) {
    trPC += PC[i]![i]!;
    for (let j = 0; j < n; j++) trPCPC += PC[i]![j]! * PC[j]![i]!;
  }
  const total = C.flat().reduce((a, x) => a + x, 0);
  const covNextMean = covNext.reduce((a, x) => a + x, 0) / n;
  return {
    n,
    maxCovNext: Math.max(...covNext.map(Math.abs)),
    ratio: (varNext + total / (n * n) - 2 * covNextMean) / trPC,
    df: (trPC * trPC) / trPCPC,
  };
}

describe('next-error spread of backtest errors', () => {
  const cases: [MethodName, number, number][] = [
    ['mean', 1, 1],
    ['mean', 1, 5],
    ['naive', 1, 1],
    ['naive', 1, 4],
    ['naive', 1, 14],
    ['drift', 1, 1],
    ['drift', 1, 6],
    ['seasonal-naive', 4, 3],
    ['seasonal-naive', 4, 9],
  ];
  for (const [method, season, h] of cases)
    it(`${method}, season ${season}, step ${h}: covariances, ratio and df agree with the coefficient matrix`, () => {
      const T = 45;
      const b = bruteForce(method, season, h, T, 10);
      // The next error shares nothing with the backtest's errors (file comment of errorspread.ts).
      expect(b.maxCovNext).toBeLessThan(1e-9);
      const got = nextErrorSpread(method, season, h, b.n, T);
      expect(got.ratio).toBeCloseTo(b.ratio, 10);
      expect(got.df).toBeCloseTo(b.df, 8);
    });

  it('independent errors: the Student-t prediction interval of a new draw', () => {
    // Hahn & Meeker (1991), Statistical Intervals, sec. 4.7: a new draw lies within
    // mean ± t_{n-1} sd sqrt(1 + 1/n), so R = (1 + 1/n) / (n - 1) per unit of SS, with n - 1 df.
    for (const n of [2, 20, 190]) {
      const got = nextErrorSpread('naive', 1, 1, n, n + 30);
      expect(got.ratio).toBeCloseTo((1 + 1 / n) / (n - 1), 14);
      expect(got.df).toBeCloseTo(n - 1, 10);
    }
  });

  it('sums added one at a time equal fresh ones; naive and seasonal naive depend on the count alone', () => {
    // Derivation (file comment of errorspread.ts): their covariances depend on the distance between
    // origins only and Var(e*) not on T, so a series may reuse another's answer for the same count;
    // the mean's and drift's depend on where the origins lie. `count` errors from origin `first`
    // forecast the next from T = first + count + h.
    const same = (a: { ratio: number; df: number }, b: { ratio: number; df: number }): void => {
      expect(Object.is(a.ratio, b.ratio) && Object.is(a.df, b.df)).toBe(true);
    };
    for (const [method, season] of [
      ['naive', 1],
      ['seasonal-naive', 7],
      ['mean', 1],
      ['drift', 1],
    ] as const)
      for (const h of [1, 5, 14]) {
        const growing = new ErrorSpreadSums(method, season, h, 3);
        for (const count of [0, 1, 2, 3, 20, 21, 60, 200]) {
          const own = growing.spreadAfter(count, 3 + count + h, false);
          same(own, new ErrorSpreadSums(method, season, h, 3).spreadAfter(count, 3 + count + h, false));
          same(own, new ErrorSpreadSums(method, season, h, 3).spreadAfter(count, 3 + count + h));
          same(own, nextErrorSpread(method, season, h, count, 3 + count + h));
          const elsewhere = new ErrorSpreadSums(method, season, h, 40).spreadAfter(
            count,
            40 + count + h,
            false,
          );
          same(elsewhere, new ErrorSpreadSums(method, season, h, 40).spreadAfter(count, 40 + count + h));
          if (method === 'naive' || method === 'seasonal-naive') same(elsewhere, own);
          else if (count >= 2) expect(elsewhere.ratio).not.toBe(own.ratio);
        }
      }
  });

  it('overlapping errors: more df than n / k - 1 independent blocks, and undefined below 2 errors', () => {
    const got = nextErrorSpread('naive', 1, 14, 177, 200);
    expect(got.df).toBeGreaterThan(177 / 14 - 1);
    expect(nextErrorSpread('naive', 1, 1, 1, 30).ratio).toBeNaN();
    expect(sharedShocks('seasonal-naive', 7, 8)).toBe(2);
    expect(sharedShocks('drift', 1, 5)).toBe(5);
    expect(sharedShocks('mean', 1, 5)).toBe(1);
  });
});
