// A small fixed-seed run of the calibration benchmark (scripts/calibrate.ts) through the real job.
// The full benchmark is `npm run calibrate`; these tolerances are wide (a few binomial sds at these
// sizes) so they hold for any honest engine, and fail for the defects the benchmark exists to catch
// (a p-value floor that blocks Bonferroni, alarm rates twice nominal).
import { describe, expect, it } from 'vitest';
import jstatModule from 'jstat';
import { binomialBand, binomialCdf, runCalibration, tTestPower } from '../../scripts/calibrate.js';

const { jStat } = jstatModule;

describe('calibration benchmark, small', () => {
  it('binomial CDF and band against the binomial pmf summed in the test', () => {
    // Values from the binomial pmf written out: P(X <= k) = sum_{i<=k} C(100, i) 0.05^i 0.95^(100-i).
    const pmf = (i: number) => {
      let c = 1;
      for (let j = 0; j < i; j++) c = (c * (100 - j)) / (j + 1);
      return c * 0.05 ** i * 0.95 ** (100 - i);
    };
    let s = 0;
    for (let i = 0; i <= 9; i++) {
      s += pmf(i);
      expect(binomialCdf(i, 100, 0.05)).toBeCloseTo(s, 7); // jstat's incomplete beta: about 1e-9
    }
    expect(binomialBand(100, 0.05)).toEqual([0.01, 0.1]);
  });

  it('t-test power: the noncentral t of jStat, and the level of the test at no shift', () => {
    // Two-sided power = 1 - F(q) + F(-q) under the noncentral t(nu, ncp) (jStat.noncentralt).
    for (const [ncp, a, nu] of [
      [5, 0.05 / 1050, 28],
      [5 / Math.sqrt(1.05), 0.05 / 1050, 19],
      [2, 0.05, 10],
    ] as const) {
      const q = jStat.studentt.inv(1 - a / 2, nu);
      const want = 1 - jStat.noncentralt.cdf(q, nu, ncp) + jStat.noncentralt.cdf(-q, nu, ncp);
      expect(tTestPower(ncp, a, nu)).toBeCloseTo(want, 3);
    }
    // No shift: the test rejects with its level (derivation: P(|T| > q) = a for T ~ t(nu)).
    expect(tTestPower(0, 0.05, 12)).toBeCloseTo(0.05, 4);
  });

  it('alarm rates near 5% at steps 1 and 14 for every kind, short and long histories', async () => {
    const rows = await runCalibration({
      series: 40,
      fleets: 1,
      seed: 3,
      sections: ['level'],
      generators: ['mean', 'naive'],
      kinds: ['analytic', 'bootstrap', 'empirical'],
      paths: 200,
    });
    expect(rows.length).toBe(2 * 2 * 3 * 2);
    for (const r of rows) expect(r.rate).toBeLessThan(0.2); // 40 draws at 5%: P(>= 8) < 0.004
    const pooled = rows.reduce((a, r) => a + r.count, 0) / rows.reduce((a, r) => a + r.n, 0);
    expect(pooled).toBeGreaterThan(0.025);
    expect(pooled).toBeLessThan(0.08);
  }, 400_000);

  it('Bonferroni finds 5-sigma shifts with bootstrap and empirical intervals, without false alarms', async () => {
    const rows = await runCalibration({
      series: 40,
      fleets: 1,
      seed: 5,
      sections: ['control'],
      kinds: ['bootstrap', 'empirical'],
      lengths: [200],
      paths: 300,
    });
    const power = rows.filter((r) => r.label.startsWith('Bonferroni power'));
    expect(power.length).toBe(2);
    for (const r of power) expect(r.rate).toBeGreaterThan(0.4); // was 0 with count-based p-values
    const fdr = rows.filter((r) => r.label.startsWith('BH realised FDR'));
    for (const r of fdr) expect(r.rate).toBeLessThan(0.3);
  }, 400_000);
});
