// Residual checks changed for honest alarms: Ljung–Box df, Brown–Forsythe spread, Holm family control;
// and the sigma uncertainty of simulated paths.
import stdChiCdf from '@stdlib/stats-base-dists-chisquare-cdf';
import stdFCdf from '@stdlib/stats-base-dists-f-cdf';
import stdTCdf from '@stdlib/stats-base-dists-t-cdf';
import stdTQuantile from '@stdlib/stats-base-dists-t-quantile';
import { describe, expect, it } from 'vitest';
import { brownForsythe } from '../../src/engine/checks.js';
import { chiSquareDraw } from '../../src/engine/simulate.js';
import {
  createRandom,
  fitMethod,
  isFit,
  runResidualTests,
  simulatePaths,
  type Fit,
  type MethodName,
} from '../../src/engine/index.js';

function fit(method: MethodName, y: number[] | Float64Array, season = 1): Fit {
  const f = fitMethod(method, y instanceof Float64Array ? y : Float64Array.from(y), season);
  if (!isFit(f)) throw new Error(f.reason);
  return f;
}

describe('Brown–Forsythe spread test (Brown & Forsythe 1974: Levene’s test centred on the median)', () => {
  it('matches scipy.stats.levene(center="median") on two groups', () => {
    const a = [2.1, -0.4, 3.3, 0.8, -1.9, 0.2, 1.1];
    const b = [4.5, -3.2, 6.1, -5.0, 0.7, 2.9, -4.4];
    const bf = brownForsythe(a, b);
    // scipy 1.17.1: stats.levene(a, b, center='median') -> statistic 8.362916439104312, p 0.013529043578401352
    expect(bf.statistic).toBeCloseTo(8.362916439104312, 12);
    expect(1 - stdFCdf(bf.statistic, 1, 12)).toBeCloseTo(0.013529043578401352, 10);
    expect(bf.last).toBeGreaterThan(bf.first);
  });

  it('equals a one-way ANOVA of absolute deviations from the medians, written out (odd and even groups)', () => {
    const a = [1, 4, 2, 8, 5, 7];
    const b = [3, 9, 0, 12, 6];
    const med = (x: number[]) => {
      const s = [...x].sort((p, q) => p - q);
      const m = s.length >> 1;
      return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
    };
    const za = a.map((x) => Math.abs(x - med(a)));
    const zb = b.map((x) => Math.abs(x - med(b)));
    const mean = (x: number[]) => x.reduce((p, q) => p + q, 0) / x.length;
    const all = [...za, ...zb];
    const ssb = za.length * (mean(za) - mean(all)) ** 2 + zb.length * (mean(zb) - mean(all)) ** 2;
    const ssw =
      za.reduce((p, z) => p + (z - mean(za)) ** 2, 0) + zb.reduce((p, z) => p + (z - mean(zb)) ** 2, 0);
    const F = ssb / 1 / (ssw / (all.length - 2));
    expect(brownForsythe(a, b).statistic).toBeCloseTo(F, 12);
  });

  it('runs on the first and last thirds of the residuals, with df (1, N - 2)', () => {
    const y = [3.1, 2.4, 3.8, 2.9, 3.3, 2.7, 3.0, 2.2, 4.1, 1.5, 4.9, 0.8, 5.6, 1.2, 4.4];
    const c = runResidualTests(fit('mean', y));
    // scipy 1.17.1: e = y - mean(y); stats.levene(e[:5], e[10:], center='median')
    // -> statistic 3.3092517508293393, p 0.10639290123984527
    expect(c.spread.name).toBe('Brown–Forsythe');
    expect(c.spread.statistic).toBeCloseTo(3.3092517508293393, 12);
    expect(c.spread.pValue).toBeCloseTo(0.10639290123984527, 8); // jstat F CDF: about 1e-9
    expect(c.spread.df).toBe(8);
  });

  it('is not fooled by heavy tails: constant-spread Student-t(3) noise is flagged near 5% (raw p)', () => {
    const r = createRandom(404);
    const t3 = () => r.normal() / Math.sqrt(chiSquareDraw(r, 3) / 3);
    let rejected = 0;
    const N = 400;
    for (let k = 0; k < N; k++) {
      const y = Float64Array.from({ length: 120 }, t3);
      if (runResidualTests(fit('mean', y)).spread.pValue < 0.05) rejected++;
    }
    // 5% of 400 = 20; binomial 99.9% band about 7..36 (the normal-theory F test rejects ~40% here).
    expect(rejected).toBeLessThan(40);
  });
});

describe('Ljung–Box degrees of freedom', () => {
  it('uses df = L for all four baselines (no ARMA coefficient estimated)', () => {
    const r = createRandom(3);
    const y = Float64Array.from({ length: 60 }, () => 10 + r.normal());
    for (const m of ['mean', 'naive', 'seasonal-naive', 'drift'] as const) {
      const c = runResidualTests(fit(m, y, m === 'seasonal-naive' ? 4 : 1), 5);
      expect(c.ljungBox.lags).toBe(5);
      expect(c.ljungBox.df).toBe(5);
      expect(c.ljungBox.pValue).toBeCloseTo(1 - stdChiCdf(c.ljungBox.statistic, 5), 10);
    }
  });
});

describe('Holm control of the residual checks (Holm 1979)', () => {
  it('adjusts the family of computed checks step-down, as written out here', () => {
    const r = createRandom(8);
    // A naive fit on a trending AR series: several checks with small p-values.
    const y = new Float64Array(150);
    let e = 0;
    for (let i = 0; i < 150; i++) {
      e = 0.4 * e + r.normal() * (1 + i / 100);
      y[i] = 0.3 * i + e;
    }
    const c = runResidualTests(fit('naive', y));
    const tests = [c.ljungBox, c.bias, c.normality, c.spread];
    expect(c.family).toBe(4);
    // Holm: sort p ascending; adjusted p_(i) = max over j <= i of min(1, (m - j + 1) p_(j)).
    const sorted = [...tests].sort((a, b) => a.pValue - b.pValue);
    let run = 0;
    const want = new Map<object, number>();
    sorted.forEach((t, i) => {
      run = Math.max(run, Math.min(1, (4 - i) * t.pValue));
      want.set(t, run);
    });
    for (const t of tests) {
      expect(t.adjustedP).toBeCloseTo(want.get(t)!, 14);
      expect(t.ok).toBe(want.get(t)! >= 0.05);
    }
    expect(c.caveat).toBe(tests.some((t) => !t.ok));
  });

  it('leaves bias out of the family where it is zero by construction', () => {
    const r = createRandom(9);
    const c = runResidualTests(
      fit(
        'mean',
        Float64Array.from({ length: 50 }, () => r.normal()),
      ),
    );
    expect(c.bias.zeroByConstruction).toBe(true);
    expect(c.family).toBe(3);
  });
});

describe('sigma uncertainty in simulated paths', () => {
  it('draws chi-square variates with the right distribution (Marsaglia & Tsang 2000)', () => {
    const r = createRandom(12);
    for (const k of [1, 3, 29]) {
      const N = 20000;
      const xs = Array.from({ length: N }, () => chiSquareDraw(r, k)).sort((a, b) => a - b);
      // Kolmogorov–Smirnov distance against @stdlib's chi-square CDF; 1.95/sqrt(N) is the 0.1% critical value.
      let d = 0;
      xs.forEach((x, i) => (d = Math.max(d, Math.abs(stdChiCdf(x, k) - (i + 0.5) / N))));
      expect(d).toBeLessThan(1.95 / Math.sqrt(N));
    }
  });

  it('makes Gaussian mean-method paths exactly Student-t with the sigma df (derivation in the test)', () => {
    // Path at step h: level + f sigma (z0 / sqrt(n) + z_h), f = sqrt(df / X), X ~ chi2(df):
    // (path - level) / (sigma sqrt(1 + 1/n)) = Z / sqrt(X / df) ~ t(df), the analytic predictive law.
    const r = createRandom(5);
    const y = Float64Array.from({ length: 12 }, () => 50 + 4 * r.normal());
    const f = fit('mean', y);
    const P = 20000;
    const paths = simulatePaths(f, 1, P, 77, 'gaussian');
    const se = f.standardError(1)[0]!;
    for (const p of [0.025, 0.1, 0.9, 0.975]) {
      const q = f.coefficients.level! + stdTQuantile(p, f.sigmaDf) * se;
      let below = 0;
      for (let i = 0; i < P; i++) if (paths[i]! <= q) below++;
      // Binomial sd of the share is sqrt(p(1-p)/P) <= 0.0036; 4 sd tolerance.
      expect(Math.abs(below / P - p)).toBeLessThan(4 * Math.sqrt((p * (1 - p)) / P));
    }
    // Far tail: a normal with sd se would put 0.0013 beyond 3 se; t(11) puts more.
    const far = f.coefficients.level! + 3 * se;
    let beyond = 0;
    for (let i = 0; i < P; i++) if (paths[i]! > far) beyond++;
    const want = 1 - stdTCdf(3, f.sigmaDf);
    expect(Math.abs(beyond / P - want)).toBeLessThan(4 * Math.sqrt((want * (1 - want)) / P));
  });
});

describe('residual checks with statistics that are not finite', () => {
  it('reports a test as not computed, never as passed, when its statistic or p-value is not finite', () => {
    const f = fit(
      'naive',
      Array.from({ length: 31 }, (_, i) => i),
    );
    // Residuals near the top of the double range: the deviation of -1.7e308 from a mean near
    // +1.6e308 overflows to -Infinity, and before the fix every statistic came out NaN with ok true.
    const res = Array.from({ length: 30 }, (_, i) => (i === 7 ? -1.7e308 : 1.7e308 * (1 - i * 1e-3)));
    const r = runResidualTests({ ...f, residuals: Float64Array.from([NaN, ...res]) });
    for (const t of [r.ljungBox, r.bias, r.normality, r.spread]) {
      expect(t.finding, t.name).toMatch(/not computed: .*not finite/);
      expect(t.finding, t.name).not.toMatch(/NaN|consistent with|No .* detected/);
      expect(t.pValue, t.name).toBeNaN();
    }
    expect(r.family).toBe(0);
    expect(r.caveat).toBe(false);
  });
});
