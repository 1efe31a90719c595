// The four methods against the docs/design.md conventions table, worked by hand on small series.
import { describe, expect, it } from 'vitest';
import {
  fitMethod,
  isFit,
  makeForecast,
  tQuantile,
  type Fit,
  type MethodName,
} from '../../src/engine/index.js';

function fit(method: MethodName, y: number[], season = 1): Fit {
  const f = fitMethod(method, Float64Array.from(y), season);
  if (!isFit(f)) throw new Error(f.reason);
  return f;
}
const sd = (xs: number[]): number => {
  const m = xs.reduce((a, b) => a + b, 0) / xs.length;
  return Math.sqrt(xs.reduce((a, x) => a + (x - m) ** 2, 0) / (xs.length - 1));
};
const y = [3, 5, 4, 8, 7, 9, 12, 10]; // T = 8
const T = y.length;
const diffs = y.slice(1).map((v, i) => v - y[i]!);

describe('mean', () => {
  it('forecasts ybar with sigma the sample sd (T-1 df) and se sigma sqrt(1 + 1/T)', () => {
    const f = fit('mean', y);
    const ybar = 58 / 8;
    expect(f.mean(3)).toEqual(new Float64Array([ybar, ybar, ybar]));
    expect(f.sigma).toBeCloseTo(sd(y), 12);
    expect(f.sigmaDf).toBe(7);
    expect(f.parameters).toBe(1);
    // The mean method's h-step variance is sigma^2 (1 + 1/T) at every h (common practice).
    for (const s of f.standardError(4)) expect(s * s).toBeCloseTo(f.sigma ** 2 * (1 + 1 / T), 12);
    expect(f.residuals[0]).toBeCloseTo(3 - ybar, 12);
    expect(f.residualCount).toBe(8);
  });
});

describe('naive', () => {
  it('forecasts y_T with sigma the sd of the T-1 differences (T-2 df) and h-step variance h sigma^2', () => {
    const f = fit('naive', y);
    expect(Array.from(f.mean(3))).toEqual([10, 10, 10]);
    expect(Number.isNaN(f.residuals[0]!)).toBe(true);
    expect(Array.from(f.residuals.subarray(1))).toEqual(diffs);
    expect(f.sigma).toBeCloseTo(sd(diffs), 12);
    expect(f.sigmaDf).toBe(T - 2);
    expect(f.parameters).toBe(0);
    // The naive h-step variance is h sigma^2 (random walk; common practice).
    f.standardError(5).forEach((s, i) => expect(s * s).toBeCloseTo((i + 1) * f.sigma ** 2, 12));
  });
});

describe('seasonal naive', () => {
  const ys = [10, 20, 30, 12, 21, 33, 11, 24, 31, 14]; // m = 3, T = 10
  it('forecasts y_{T-m+1+((h-1) mod m)} with se sigma sqrt(floor((h-1)/m) + 1)', () => {
    const f = fit('seasonal-naive', ys, 3);
    // T = 10, m = 3: steps 1, 2, 3 come from y_8, y_9, y_10 (1-based), then repeat.
    expect(Array.from(f.mean(7))).toEqual([24, 31, 14, 24, 31, 14, 24]);
    const res = ys.slice(3).map((v, i) => v - ys[i]!);
    expect(Array.from(f.residuals.subarray(3))).toEqual(res);
    expect(f.sigma).toBeCloseTo(sd(res), 12);
    expect(f.sigmaDf).toBe(10 - 3 - 1);
    const k = [1, 1, 1, 2, 2, 2, 3];
    f.standardError(7).forEach((s, i) => expect(s).toBeCloseTo(f.sigma * Math.sqrt(k[i]!), 12));
  });
});

describe('drift', () => {
  it('has slope (y_T - y_1)/(T - 1), forecasts y_T + h slope, sigma sqrt(sum e^2/(T-2))', () => {
    const f = fit('drift', y);
    const slope = (10 - 3) / 7; // the drift slope is (y_T - y_1)/(T - 1) (common practice)
    expect(f.coefficients.slope).toBeCloseTo(slope, 14);
    f.mean(4).forEach((v, i) => expect(v).toBeCloseTo(10 + (i + 1) * slope, 12));
    const e = diffs.map((d) => d - slope);
    expect(f.sigma).toBeCloseTo(Math.sqrt(e.reduce((a, x) => a + x * x, 0) / (T - 2)), 12);
    expect(f.sigmaDf).toBe(T - 2);
    f.standardError(4).forEach((s, i) => {
      const h = i + 1;
      expect(s).toBeCloseTo(f.sigma * Math.sqrt(h * (1 + h / (T - 1))), 12);
    });
    // The residuals sum to zero exactly (they telescope).
    expect(Math.abs(e.reduce((a, b) => a + b, 0))).toBeLessThan(1e-12);
  });
});

describe('analytic intervals', () => {
  it('are point ± t quantile (sigma df) × se, with 80% at the 90th percentile and 95% at the 97.5th', () => {
    const f = fit('naive', y);
    const fc = makeForecast(f, { horizon: 3, levels: [80, 95], kind: 'analytic', paths: 1, seed: 1 });
    const se = f.standardError(3);
    const [b80, b95] = fc.bands;
    for (let h = 0; h < 3; h++) {
      expect(b80!.upper[h]).toBeCloseTo(10 + tQuantile(0.9, 6) * se[h]!, 12);
      expect(b80!.lower[h]).toBeCloseTo(10 - tQuantile(0.9, 6) * se[h]!, 12);
      expect(b95!.upper[h]).toBeCloseTo(10 + tQuantile(0.975, 6) * se[h]!, 12);
    }
    // t quantile with 6 df at 0.975 is 2.447 (NIST/SEMATECH t table, from memory).
    expect(tQuantile(0.975, 6)).toBeCloseTo(2.447, 3);
  });
});

describe('missing values, short and constant series', () => {
  it('naive leaves residuals touching a missing value out and forecasts from the last observed value', () => {
    const f = fit('naive', [1, 2, NaN, 4, 6, 5, NaN]);
    expect(f.residualCount).toBe(3); // 1->2, 4->6, 6->5; pairs touching a NaN are out
    expect(Array.from(f.mean(2))).toEqual([5, 5]);
    // The newest value is missing, so step 1 is 2 steps from the last observed value.
    expect(f.standardError(1)[0]).toBeCloseTo(f.sigma * Math.sqrt(2), 12);
    expect(f.notes.join(' ')).toMatch(/2 of 7 values are missing/);
  });

  it('the mean uses the observed values only', () => {
    const f = fit('mean', [2, NaN, 4, 6]);
    expect(f.coefficients.level).toBe(4);
    expect(f.sigmaDf).toBe(2);
    expect(f.standardError(1)[0]).toBeCloseTo(2 * Math.sqrt(1 + 1 / 3), 12);
    expect(Number.isNaN(f.residuals[1]!)).toBe(true);
  });

  it('seasonal naive takes each position from its latest observed value, k seasons back', () => {
    const f = fit('seasonal-naive', [1, 2, 3, 4, 5, 6, 7, NaN], 2); // position of t=8 missing
    expect(Array.from(f.mean(2))).toEqual([7, 6]);
    const se = f.standardError(2);
    expect(se[0]).toBeCloseTo(f.sigma, 12);
    expect(se[1]).toBeCloseTo(f.sigma * Math.sqrt(2), 12); // from y_6, two seasons back
  });

  it('refuses series too short for a sigma, with the reason', () => {
    const cases: [MethodName, number[], number, RegExp][] = [
      ['mean', [1], 1, /at least 2 observed values/],
      ['naive', [1, 2], 1, /at least 2 pairs of consecutive/],
      ['drift', [1, NaN, 3, NaN], 1, /at least 2 pairs/],
      ['seasonal-naive', [1, 2, 3, 4, 5], 4, /5 values without gaps|one season \(4\)/],
      ['naive', [1, 2, 3], 0, /whole number of at least 1/],
    ];
    for (const [m, ys, s, re] of cases) {
      const f = fitMethod(m, Float64Array.from(ys), s);
      expect(isFit(f)).toBe(false);
      if (!isFit(f)) expect(f.reason).toMatch(re);
    }
    expect(isFit(fitMethod('naive', Float64Array.from([1, 2, 3]), 1))).toBe(true);
    expect(isFit(fitMethod('seasonal-naive', Float64Array.from([1, 2, 3, 4, 5, 6]), 4))).toBe(true);
  });

  it('a constant series has sigma 0, intervals collapsed to the point and a note, never NaN', () => {
    for (const m of ['mean', 'naive', 'drift', 'seasonal-naive'] as const) {
      const f = fit(m, new Array(12).fill(42), 3);
      expect(f.sigma).toBe(0);
      expect(f.notes.join(' ')).toMatch(/sigma is 0/);
      for (const kind of ['analytic', 'bootstrap'] as const) {
        const fc = makeForecast(f, { horizon: 4, levels: [80, 95], kind, paths: 50, seed: 1 });
        for (const b of fc.bands)
          for (let h = 0; h < 4; h++) {
            expect(b.lower[h]).toBe(42);
            expect(b.upper[h]).toBe(42);
          }
      }
    }
  });

  it('keeps sigma accurate at huge and tiny magnitudes', () => {
    const base = [1, 3, 2, 5, 4, 6, 5, 8];
    for (const scale of [1e-200, 1e-12, 1e12, 1e200]) {
      const f = fit(
        'drift',
        base.map((v) => v * scale),
      );
      const g = fit('drift', base);
      expect(f.sigma / scale).toBeCloseTo(g.sigma, 10);
      const m = fit(
        'mean',
        base.map((v) => 1e15 + v),
      );
      expect(m.sigma).toBeCloseTo(fit('mean', base).sigma, 10);
    }
  });
});
