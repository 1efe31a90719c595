// Residual checks and stable sums against published datasets (fixtures/reference, with sources).
import stdChiCdf from '@stdlib/stats-base-dists-chisquare-cdf';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { runResidualTests, fitMethod, isFit, type Fit, type MethodName } from '../../src/engine/index.js';

const anscombe = JSON.parse(
  readFileSync(new URL('../../fixtures/reference/anscombe-1973.json', import.meta.url), 'utf8'),
) as Record<'y1' | 'y2' | 'y3' | 'y4', number[]>;

function fit(method: MethodName, y: number[], season = 1): Fit {
  const f = fitMethod(method, Float64Array.from(y), season);
  if (!isFit(f)) throw new Error(f.reason);
  return f;
}

/** Ljung–Box as published (Ljung & Box 1978), written out plainly on the residual list. */
function ljungBoxReference(e: number[], lags: number, k: number): { q: number; p: number; acf: number[] } {
  const n = e.length;
  const mean = e.reduce((a, b) => a + b, 0) / n;
  const d = e.map((x) => x - mean);
  const c0 = d.reduce((a, x) => a + x * x, 0);
  const acf: number[] = [];
  let q = 0;
  for (let lag = 1; lag <= lags; lag++) {
    let c = 0;
    for (let t = 0; t + lag < n; t++) c += d[t]! * d[t + lag]!;
    acf.push(c / c0);
    q += (c / c0) ** 2 / (n - lag);
  }
  q *= n * (n + 2);
  return { q, p: 1 - stdChiCdf(q, lags - k), acf };
}

/** Jarque–Bera (Jarque & Bera 1980): n/6 (S^2 + (K-3)^2/4), moments with divisor n. */
function jarqueBeraReference(e: number[]): { jb: number; p: number; s: number; k: number } {
  const n = e.length;
  const mean = e.reduce((a, b) => a + b, 0) / n;
  const m = (r: number) => e.reduce((a, x) => a + (x - mean) ** r, 0) / n;
  const s = m(3) / m(2) ** 1.5;
  const k = m(4) / m(2) ** 2;
  const jb = (n / 6) * (s * s + (k - 3) ** 2 / 4);
  return { jb, p: 1 - stdChiCdf(jb, 2), s, k };
}

const finite = (r: Float64Array): number[] => Array.from(r).filter((x) => Number.isFinite(x));

describe("Anscombe's quartet (Anscombe 1973)", () => {
  it('the typed values reproduce the summary statistics the paper states', () => {
    for (const key of ['y1', 'y2', 'y3', 'y4'] as const) {
      const y = anscombe[key];
      const mean = y.reduce((a, b) => a + b, 0) / y.length;
      const variance = y.reduce((a, x) => a + (x - mean) ** 2, 0) / (y.length - 1);
      expect(mean).toBeCloseTo(7.5, 2);
      expect(variance).toBeGreaterThan(4.12);
      expect(variance).toBeLessThan(4.13);
    }
  });

  it.each(['y1', 'y2', 'y3', 'y4'] as const)(
    'Ljung–Box and Jarque–Bera of the mean residuals of %s equal the published formulas',
    (key) => {
      const f = fit('mean', anscombe[key]);
      const c = runResidualTests(f, 3);
      const ref = ljungBoxReference(finite(f.residuals), 3, 0);
      expect(c.ljungBox.lags).toBe(3);
      expect(c.ljungBox.df).toBe(3); // df = L: the mean removed uses no Ljung–Box degree of freedom
      expect(c.ljungBox.statistic).toBeCloseTo(ref.q, 10);
      expect(c.ljungBox.pValue).toBeCloseTo(ref.p, 8);
      c.acf.forEach((r, i) => expect(r).toBeCloseTo(ref.acf[i]!, 12));
      const jb = jarqueBeraReference(finite(f.residuals));
      expect(c.normality.statistic).toBeCloseTo(jb.jb, 10);
      expect(c.normality.pValue).toBeCloseTo(jb.p, 8);
      expect(c.normality.skewness).toBeCloseTo(jb.s, 12);
      expect(c.normality.kurtosis).toBeCloseTo(jb.k, 12);
      expect(c.acfBound).toBeCloseTo(1.96 / Math.sqrt(11), 12);
    },
  );

  it('y3 with its single outlier (12.74) has clearly non-normal mean residuals', () => {
    const c = runResidualTests(fit('mean', anscombe.y3));
    const jb = jarqueBeraReference(finite(fit('mean', anscombe.y3).residuals));
    expect(jb.k).toBeGreaterThan(5); // a lone outlier in 11 values: heavy tail
    expect(c.normality.statistic).toBeCloseTo(jb.jb, 10);
    // Flagged only when its Holm-adjusted p (over the checks computed) is below 5%.
    expect(c.normality.adjustedP).toBeGreaterThanOrEqual(c.normality.pValue);
    expect(c.normality.ok).toBe(c.normality.adjustedP >= 0.05);
  });

  it('Ljung–Box on naive residuals uses df = L (no parameter estimated)', () => {
    const f = fit('naive', anscombe.y1);
    const c = runResidualTests(f, 4);
    const ref = ljungBoxReference(finite(f.residuals), 4, 0);
    expect(c.ljungBox.df).toBe(4);
    expect(c.ljungBox.statistic).toBeCloseTo(ref.q, 10);
    expect(c.ljungBox.pValue).toBeCloseTo(ref.p, 8);
  });
});

describe('NIST StRD univariate datasets (certified values; structure from memory, see fixtures/reference/README.md)', () => {
  const numAcc = (centre: number, n = 1001): number[] => {
    const y = [centre + 0.2];
    for (let i = 0; i < (n - 1) / 2; i++) y.push(centre + 0.1, centre + 0.3);
    return y;
  };

  it('NumAcc1: mean 10000002, sd 1, lag-1 autocorrelation -0.5', () => {
    const f = fit('mean', [10000001, 10000003, 10000002]);
    expect(f.coefficients.level).toBe(10000002);
    expect(f.sigma).toBe(1);
    // The lag-1 autocorrelation of the mean residuals is the series' own.
    const c = runResidualTests(f, 1);
    expect(c.acf[0]).toBeCloseTo(-0.5, 14);
  });

  it('NumAcc2: mean 1.2, sd 0.1, lag-1 autocorrelation -0.999', () => {
    const f = fit('mean', numAcc(1));
    expect(f.coefficients.level).toBeCloseTo(1.2, 14);
    expect(Math.abs(f.sigma - 0.1)).toBeLessThan(1e-14);
    expect(runResidualTests(f, 1).acf[0]).toBeCloseTo(-0.999, 12);
  });

  it('NumAcc4: the same pattern around 10000000.2 keeps mean and sd to 1e-9 (stable sums)', () => {
    const y = numAcc(10000000);
    const f = fit('mean', y);
    expect(Math.abs(f.coefficients.level! - 10000000.2)).toBeLessThan(1e-8);
    expect(Math.abs(f.sigma - 0.1) / 0.1).toBeLessThan(1e-7);
    expect(runResidualTests(f, 1).acf[0]).toBeCloseTo(-0.999, 6);
    // The one-pass textbook formula sqrt((sum y^2 - n ybar^2)/(n-1)) loses every digit here (its
    // variance even comes out negative), which is why the engine uses two passes.
    const n = y.length;
    const s1 = y.reduce((a, b) => a + b, 0);
    const s2 = y.reduce((a, b) => a + b * b, 0);
    const naive = Math.sqrt((s2 - (s1 * s1) / n) / (n - 1));
    expect(Number.isNaN(naive) || Math.abs(naive - 0.1) > Math.abs(f.sigma - 0.1)).toBe(true);
  });
});
