// Distribution functions against published tables and against the single-function @stdlib packages.
import stdChiCdf from '@stdlib/stats-base-dists-chisquare-cdf';
import stdChiQuantile from '@stdlib/stats-base-dists-chisquare-quantile';
import stdFCdf from '@stdlib/stats-base-dists-f-cdf';
import stdNormalCdf from '@stdlib/stats-base-dists-normal-cdf';
import stdNormalQuantile from '@stdlib/stats-base-dists-normal-quantile';
import stdTCdf from '@stdlib/stats-base-dists-t-cdf';
import stdTQuantile from '@stdlib/stats-base-dists-t-quantile';
import { describe, expect, it } from 'vitest';
import {
  chiSquareCdf,
  chiSquareQuantile,
  fCdf,
  normalCdf,
  normalQuantile,
  tCdf,
  tQuantile,
} from '../../src/engine/index.js';

/** |a - b| <= tol * max(1, |b|), with the inputs in the message on failure. */
function close(actual: number, expected: number, tol: number, what: string): void {
  const diff = Math.abs(actual - expected);
  const bound = tol * Math.max(1, Math.abs(expected));
  if (!(diff <= bound))
    throw new Error(`${what}: got ${actual}, expected ${expected}, difference ${diff} > tolerance ${bound}`);
}

describe('published table values', () => {
  // NIST/SEMATECH e-Handbook of Statistical Methods, section 1.3.6.7.2 "Critical values of the
  // Student's t distribution" (upper-tail critical values, 3 decimals). Values from memory of the table.
  const tTable: [number, number, number][] = [
    [0.9, 10, 1.372],
    [0.95, 10, 1.812],
    [0.975, 1, 12.706],
    [0.975, 2, 4.303],
    [0.975, 5, 2.571],
    [0.975, 10, 2.228],
    [0.975, 30, 2.042],
    [0.975, 100, 1.984],
    [0.995, 10, 3.169],
  ];
  it.each(tTable)('the t quantile at %s with %s df matches the NIST table to 3 decimals', (p, df, v) => {
    expect(Math.abs(tQuantile(p, df) - v)).toBeLessThan(0.0006);
    expect(Math.abs(tCdf(v, df) - p)).toBeLessThan(0.0005);
  });

  // NIST/SEMATECH e-Handbook, section 1.3.6.7.1 "Cumulative distribution function of the standard
  // normal": the familiar two-sided critical values (from memory; also in every statistics text).
  it.each([
    [0.9, 1.2816],
    [0.95, 1.6449],
    [0.975, 1.96],
    [0.995, 2.5758],
  ])('the normal quantile at %s is %s', (p, z) => {
    expect(Math.abs(normalQuantile(p) - z)).toBeLessThan(0.00006);
    expect(Math.abs(normalCdf(z) - p)).toBeLessThan(0.0001);
  });

  // NIST/SEMATECH e-Handbook, section 1.3.6.7.4 "Critical values of the chi-square distribution"
  // (from memory of the table).
  it.each([
    [0.95, 1, 3.841],
    [0.95, 2, 5.991],
    [0.95, 10, 18.307],
    [0.05, 10, 3.94],
    [0.99, 5, 15.086],
  ])('the chi-square quantile at %s with %s df matches the NIST table', (p, k, v) => {
    expect(Math.abs(chiSquareQuantile(p, k) - v)).toBeLessThan(0.0006);
    expect(Math.abs(chiSquareCdf(v, k) - p)).toBeLessThan(0.0002);
  });

  // NIST/SEMATECH e-Handbook, section 1.3.6.7.3 "Upper critical values of the F distribution",
  // 5% significance (from memory of the table).
  it.each([
    [4.965, 1, 10],
    [3.326, 5, 10],
    [2.978, 10, 10],
  ])('the F CDF at the 5%% critical value %s with (%s, %s) df is 0.95', (x, d1, d2) => {
    expect(Math.abs(fCdf(x, d1, d2) - 0.95)).toBeLessThan(0.0002);
  });

  it('an 80% interval uses the 90th percentile and a 95% interval the 97.5th (common practice)', () => {
    // 0.5 + L/200 (docs/design.md): the two tails each hold (100 - L)/2 percent.
    expect(0.5 + 80 / 200).toBe(0.9);
    expect(0.5 + 95 / 200).toBe(0.975);
    expect(tQuantile(0.5 + 95 / 200, 1e12)).toBeCloseTo(1.959964, 5);
  });
});

describe('agreement with the @stdlib packages over a grid', () => {
  const dfs = [0.5, 1, 2, 3, 4, 5, 7, 10, 15, 20, 30, 50, 100, 300, 1000, 1e4, 1e6];
  const ps = [1e-6, 0.001, 0.01, 0.025, 0.05, 0.1, 0.2, 0.5, 0.8, 0.9, 0.95, 0.975, 0.99, 0.999, 1 - 1e-6];
  const xs = [-30, -5, -2.5, -1, -0.1, 0, 0.3, 1, 1.96, 3, 8, 40];

  // jstat's incomplete beta is good to a few parts in 1e8 (the quantile is polished on it), far
  // beyond what intervals printed to 4 significant digits and p-values need.
  const tTol = (_df: number): number => 5e-8;
  it('t quantiles agree to 5e-8 relative', () => {
    for (const df of dfs)
      for (const p of ps) close(tQuantile(p, df), stdTQuantile(p, df), tTol(df), `tQuantile(${p}, ${df})`);
  });
  // jstat's incomplete beta is good to about 1e-9 (worst below 1 df); p-values need far less.
  it('t CDFs agree to 5e-8', () => {
    for (const df of dfs)
      for (const x of xs) close(tCdf(x, df), stdTCdf(x, df), tTol(df), `tCdf(${x}, ${df})`);
  });
  it('normal quantiles and CDFs agree to 1e-9', () => {
    for (const p of ps) close(normalQuantile(p), stdNormalQuantile(p, 0, 1), 1e-9, `normalQuantile(${p})`);
    for (const x of xs) close(normalCdf(x, 2, 3), stdNormalCdf(x, 2, 3), 1e-12, `normalCdf(${x}, 2, 3)`);
  });
  it('chi-square quantiles agree to 1e-9 relative up to 1,000 df', () => {
    for (const k of [1, 2, 3, 5, 9, 10, 25, 100, 1000])
      for (const p of ps)
        close(chiSquareQuantile(p, k), stdChiQuantile(p, k), 1e-9, `chiSquareQuantile(${p}, ${k})`);
  });
  it('chi-square CDFs agree to 1e-10', () => {
    for (const k of [1, 2, 3, 5, 9, 10, 25, 100, 999, 1000, 1001])
      for (const x of [0.001, 0.1, 0.5, 1, 2, 5, 10, 20, 50, 100, 900, 1100])
        close(chiSquareCdf(x, k), stdChiCdf(x, k), 1e-10, `chiSquareCdf(${x}, ${k})`);
  });
  it('F CDFs agree to 5e-8 (jstat incomplete beta)', () => {
    for (const [d1, d2] of [
      [1, 1],
      [2, 5],
      [5, 10],
      [10, 10],
      [30, 30],
      [100, 40],
      [600, 600],
    ])
      for (const x of [0.01, 0.2, 0.5, 0.9, 1, 1.1, 2, 3.3, 10, 100])
        close(fCdf(x, d1!, d2!), stdFCdf(x, d1!, d2!), 5e-8, `fCdf(${x}, ${d1}, ${d2})`);
  });
});

describe('chi-square beyond 1,000 df', () => {
  // Above 1,000 df both jstat (0.5056 at the median of 10,000 df) and @stdlib 0.3.1 (0.8397 where the
  // answer is 0.8414 at x = 5,100 with 5,000 df) drift, so the check here is the Wilson–Hilferty
  // cube-root normal approximation (Wilson & Hilferty 1931), written out: (x/k)^(1/3) is close to
  // normal with mean 1 - 2/(9k) and variance 2/(9k); its error is below 1e-5 at these df.
  const wilsonHilferty = (x: number, k: number): number =>
    normalCdf((Math.cbrt(x / k) - (1 - 2 / (9 * k))) / Math.sqrt(2 / (9 * k)));
  it('the CDF agrees with Wilson–Hilferty to 1e-5 from 1,001 to 100,000 df', () => {
    for (const k of [1001, 2000, 5000, 10_000, 100_000])
      for (const z of [-3, -1, 0, 0.5, 1, 2.5]) {
        const x = k + z * Math.sqrt(2 * k);
        close(chiSquareCdf(x, k), wilsonHilferty(x, k), 1e-5, `chiSquareCdf(${x}, ${k})`);
      }
  });
  it('the quantile inverts the CDF at 10,000 df (median about k(1 - 2/(9k))^3)', () => {
    const q = chiSquareQuantile(0.5, 10_000);
    close(q, 10_000 * (1 - 2 / 90_000) ** 3, 1e-6, 'median at 10,000 df');
    close(chiSquareCdf(chiSquareQuantile(0.95, 5000), 5000), 0.95, 1e-12, 'round trip at 5,000 df');
  });
});

describe('bad parameters give NaN, never an exception', () => {
  it('returns NaN for NaN input and out-of-domain parameters', () => {
    for (const v of [
      tQuantile(NaN, 3),
      tQuantile(0.5, 0),
      tQuantile(1.2, 3),
      tQuantile(-0.1, 3),
      tCdf(1, -1),
      tCdf(NaN, 3),
      normalQuantile(2),
      normalCdf(0, 0, 0),
      chiSquareCdf(1, 0),
      chiSquareQuantile(0.5, -2),
      fCdf(1, 0, 3),
      fCdf(NaN, 1, 3),
    ])
      expect(v).toBeNaN();
  });
  it('gives the range ends at p = 0 and p = 1 and at infinite x', () => {
    expect(tQuantile(0, 5)).toBe(-Infinity);
    expect(tQuantile(1, 5)).toBe(Infinity);
    expect(chiSquareQuantile(0, 5)).toBe(0);
    expect(chiSquareQuantile(1, 5)).toBe(Infinity);
    expect(tCdf(Infinity, 3)).toBe(1);
    expect(tCdf(-Infinity, 3)).toBe(0);
    expect(chiSquareCdf(-1, 3)).toBe(0);
    expect(fCdf(0, 2, 3)).toBe(0);
  });
  it('treats infinite df as the normal distribution', () => {
    expect(tQuantile(0.975, Infinity)).toBeCloseTo(normalQuantile(0.975), 12);
    expect(tCdf(1.5, Infinity)).toBeCloseTo(normalCdf(1.5), 12);
  });
});
