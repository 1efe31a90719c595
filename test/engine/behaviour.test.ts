// Selection, interval kinds, tail probabilities, residual findings and the whole analysis.
import stdTCdf from '@stdlib/stats-base-dists-t-cdf';
import { describe, expect, it } from 'vitest';
import {
  analyse,
  runResidualTests,
  chooseIntervalKind,
  createRandom,
  defaultLags,
  fitMethod,
  isFit,
  makeForecast,
  quantileAt,
  runBacktest,
  selectMethod,
  tailProbability,
  type Backtest,
  type EngineOptions,
  type Fit,
  type MethodName,
  type ResidualChecks,
} from '../../src/engine/index.js';

function fit(method: MethodName, y: Float64Array | number[], season = 1): Fit {
  const f = fitMethod(method, y instanceof Float64Array ? y : Float64Array.from(y), season);
  if (!isFit(f)) throw new Error(f.reason);
  return f;
}
function randomWalk(n: number, seed: number, drift = 0, sd = 1): Float64Array {
  const r = createRandom(seed);
  const y = new Float64Array(n);
  let v = 100;
  for (let i = 0; i < n; i++) y[i] = v += drift + sd * r.normal();
  return y;
}
const OPTIONS: EngineOptions = {
  season: 1,
  methods: ['mean', 'naive', 'drift'],
  horizon: 7,
  levels: [80, 95],
  intervals: 'auto',
  backtest: { minTrain: 10, horizon: 7 },
  score: 'mase',
  paths: 500,
  seed: 1,
};

describe('selection', () => {
  const bt = (scores: Partial<Record<MethodName, number[]>>): Backtest => ({
    minTrain: 10,
    horizon: 2,
    notes: [],
    methods: Object.fromEntries(
      Object.entries(scores).map(([m, v]) => [
        m,
        {
          method: m as MethodName,
          origins: 5,
          me: v[0]!,
          rmse: 1,
          mae: 1,
          mpe: v[0]!,
          mape: 1,
          mase: v[0]!,
          steps: v.map((x, i) => ({
            step: i + 1,
            origins: 5,
            me: x,
            rmse: 1,
            mae: 1,
            mpe: x,
            mape: 1,
            mase: x,
          })),
          coverage: {},
          errors: [],
          notes: [],
        },
      ]),
    ),
  });

  it('takes the lowest mean over steps and names every score in the reason', () => {
    const s = selectMethod(
      bt({ naive: [1, 3], drift: [1.5, 2], mean: [4, 4] }),
      ['naive', 'drift', 'mean'],
      'mase',
    );
    expect(s.method).toBe('drift'); // 1.75 < 2 < 4
    expect(s.scores).toEqual({ naive: 2, drift: 1.75, mean: 4 });
    expect(s.reason).toMatch(/drift has the lowest backtest MASE/);
    expect(s.reason).toMatch(/naive 2, mean 4, drift 1\.75/);
  });

  it('breaks ties towards the simpler method', () => {
    const s = selectMethod(
      bt({ drift: [2, 2], 'seasonal-naive': [2, 2] }),
      ['drift', 'seasonal-naive'],
      'mase',
    );
    expect(s.method).toBe('seasonal-naive');
    expect(s.reason).toMatch(/tied with drift and preferred as simpler/);
  });

  it('scores ME and MPE by their absolute value', () => {
    const s = selectMethod(bt({ naive: [-3, -3], mean: [1, 1] }), ['naive', 'mean'], 'me');
    expect(s.scores.naive).toBe(3);
    expect(s.method).toBe('mean');
  });

  it('makes no selection with one candidate', () => {
    const s = selectMethod(bt({ naive: [5, 5] }), ['naive'], 'mase');
    expect(s.method).toBe('naive');
    expect(s.reason).toMatch(/Only one method was a candidate/);
  });
});

describe('what intervals: auto decides', () => {
  // Real checks of a random walk's naive residuals, with every test then set to pass.
  const real = runResidualTests(fit('naive', randomWalk(200, 3)));
  const pass = <T extends { ok: boolean }>(t: T): T => ({ ...t, ok: true });
  const base: ResidualChecks = {
    ...real,
    ljungBox: pass(real.ljungBox),
    bias: pass(real.bias),
    normality: pass(real.normality),
    spread: pass(real.spread),
  };
  const bt = (n: number) => ({
    ...runBacktest(randomWalk(200, 3), ['naive'], { season: 1, minTrain: 10, horizon: 3, levels: [80] })
      .methods.naive!,
    errors: [new Float64Array(n), new Float64Array(n), new Float64Array(n)],
  });
  const failing = (k: keyof ResidualChecks): ResidualChecks => ({
    ...base,
    [k]: { ...(base[k] as object), ok: false, pValue: 0.001 },
  });

  it('keeps analytic intervals when the residuals pass the checks', () => {
    const c = {
      ...base,
      normality: { ...base.normality, ok: true },
      ljungBox: { ...base.ljungBox, ok: true },
    };
    expect(chooseIntervalKind(c, bt(100)).kind).toBe('analytic');
  });
  it('uses empirical intervals for autocorrelated residuals when the backtest has enough errors', () => {
    const r = chooseIntervalKind(failing('ljungBox'), bt(100));
    expect(r.kind).toBe('empirical');
    expect(r.reason).toMatch(/autocorrelated/);
  });
  it('falls back to analytic, saying so, with fewer errors than the minimum', () => {
    const r = chooseIntervalKind(failing('ljungBox'), bt(12), 20);
    expect(r.kind).toBe('analytic');
    expect(r.reason).toMatch(/need 20 backtest errors per step and the thinnest step has 12/);
  });
  it('uses bootstrap intervals for non-normal residuals', () => {
    expect(chooseIntervalKind(failing('normality'), bt(100)).kind).toBe('bootstrap');
  });
});

describe('empirical intervals', () => {
  const y = randomWalk(120, 8);
  const f = fit('naive', y);
  const mb = runBacktest(y, ['naive'], { season: 1, minTrain: 10, horizon: 3, levels: [80] }).methods.naive!;
  const empirical = { levels: [80], kind: 'empirical' as const, paths: 1, seed: 1, backtest: mb };

  it('add the quantiles of the backtest errors to the point forecast', () => {
    const out = makeForecast(f, {
      horizon: 3,
      ...empirical,
    });
    expect(out.kind).toBe('empirical');
    const sorted = Float64Array.from(mb.errors[1]!).sort();
    const n = sorted.length;
    // Hyndman & Fan (1996) definition 6: position p (n + 1) among the 1-based order statistics.
    const q = (p: number) => {
      const pos = p * (n + 1);
      const j = Math.floor(pos);
      return sorted[j - 1]! + (pos - j) * (sorted[j]! - sorted[j - 1]!);
    };
    // 80% lies within the sample's body (u = max(0.8, 1 - 5 / (n / 2)) for step 2), so both bounds
    // are the sample's own quantiles.
    expect(out.bands[0]!.lower[1]).toBeCloseTo(out.mean[1]! + q(0.1), 12);
    expect(out.bands[0]!.upper[1]).toBeCloseTo(out.mean[1]! + q(0.9), 12);
  });

  it('fall back to analytic with a note naming the numbers when there are too few errors', () => {
    const out = makeForecast(f, {
      horizon: 3,
      ...empirical,
      minErrors: 500,
    });
    expect(out.kind).toBe('analytic');
    expect(out.notes.join(' ')).toMatch(/at least 500 backtest errors per step; step 1 has 110/);
  });

  it('beyond the body, the Student-t prediction distribution of a new error (step 1: independent errors)', () => {
    // Naive step-1 errors on a random walk are n independent draws. Beyond u the tail is the
    // Student-t prediction distribution of a new draw (Hahn & Meeker 1991, Statistical Intervals,
    // sec. 4.7): centred on the errors' mean, scale sd sqrt(1 + 1/n), n - 1 df, scaled to the mass
    // 1 - u the sample leaves beyond its definition-6 quantile Q(u). Written out with @stdlib's t CDF.
    const out = makeForecast(f, { horizon: 3, ...empirical, levels: [95] });
    const e = Float64Array.from(mb.errors[0]!).sort();
    const n = e.length;
    const u = Math.max(0.8, 1 - 5 / n);
    const pos = u * (n + 1);
    const j = Math.floor(pos);
    const qu = out.mean[0]! + e[j - 1]! + (pos - j) * (e[j]! - e[j - 1]!);
    const m = out.mean[0]! + e.reduce((a, x) => a + x, 0) / n;
    const sd = Math.sqrt(e.reduce((a, x) => a + (out.mean[0]! + x - m) ** 2, 0) / (n - 1));
    const s = sd * Math.sqrt(1 + 1 / n);
    const S = (x: number) => 1 - stdTCdf((x - m) / s, n - 1);
    const far = m + 4 * s;
    const tail = tailProbability(out, 1, far, 'above');
    expect(tail.basis).toBe('tail-model');
    expect(tail.p).toBeCloseTo(((1 - u) * S(far)) / S(qu), 10);
    expect(((1 - u) * S(out.bands[0]!.upper[0]!)) / S(qu)).toBeCloseTo(0.025, 7); // t quantile: about 1e-9
  });

  it('use analytic bands beyond the backtest horizon and say so', () => {
    const out = makeForecast(f, {
      horizon: 5,
      ...empirical,
    });
    expect(out.kind).toBe('empirical');
    expect(out.notes.join(' ')).toMatch(/steps 4–5 have fewer than 20 backtest errors/);
  });
});

describe('tail probabilities and predictive quantiles', () => {
  const f = fit('drift', randomWalk(60, 4, 0.5));
  it('follow the t distribution for analytic forecasts (checked against @stdlib)', () => {
    const out = makeForecast(f, { horizon: 4, levels: [95], kind: 'analytic', paths: 1, seed: 1 });
    const v = out.mean[2]! + 2.1 * out.se[2]!;
    const { p, z } = tailProbability(out, 3, v, 'above');
    expect(z).toBeCloseTo(2.1, 12);
    expect(p).toBeCloseTo(1 - stdTCdf(2.1, f.sigmaDf), 8);
    expect(tailProbability(out, 3, v, 'both').p).toBeCloseTo(2 * p, 12);
    expect(quantileAt(out, 3, 0.975)).toBeCloseTo(out.bands[0]!.upper[2]!, 10);
  });
  it('count paths for bootstrap forecasts in the body and use a scaled Student-t tail beyond it', () => {
    const out = makeForecast(f, { horizon: 4, levels: [95], kind: 'bootstrap', paths: 999, seed: 2 });
    const col = Array.from({ length: 999 }, (_, i) => out.paths![i * 4 + 1]!).sort((a, b) => a - b);
    const v = quantileAt(out, 2, 0.9);
    const above = col.filter((x) => x >= v).length;
    const body = tailProbability(out, 2, v, 'above');
    expect(body.basis).toBe('sample');
    expect(body.p).toBeCloseTo(above / 999, 12);
    // Beyond u = max(0.8, 1 - 5/min(b, 999)): the Student-t(nu), nu = min(sigma df, b - 1), fitted to
    // the paths' mean m and sd (scale s = sd sqrt((nu - 2)/nu)), scaled to the mass 1 - u the sample
    // leaves beyond its quantile Q(u): P(Y >= x) = (1 - u) S((x - m)/s) / S((Q(u) - m)/s). Written out
    // with @stdlib's t CDF on the definition-6 quantile, mean and sd of the paths.
    const b = f.residualCount;
    const u = Math.max(0.8, 1 - 5 / Math.min(b, 999));
    const nu = Math.min(f.sigmaDf, b - 1);
    const q6 = (p: number) => {
      const pos = p * 1000;
      const j = Math.floor(pos);
      return col[j - 1]! + (pos - j) * (col[j]! - col[j - 1]!);
    };
    const m = col.reduce((a, x) => a + x, 0) / 999;
    const sd = Math.sqrt(col.reduce((a, x) => a + (x - m) ** 2, 0) / 998);
    const sc = sd * Math.sqrt((nu - 2) / nu);
    const S = (x: number) => 1 - stdTCdf((x - m) / sc, nu);
    expect(quantileAt(out, 2, u)).toBeCloseTo(q6(u), 10);
    const far = m + 5 * sc;
    const tail = tailProbability(out, 2, far, 'above');
    expect(tail.basis).toBe('tail-model');
    expect(tail.bound).toBeNull();
    expect(tail.p).toBeCloseTo(((1 - u) * S(far)) / S(q6(u)), 9);
    // The quantile inverts it: P(Y >= Q(0.999)) = 0.001.
    expect(((1 - u) * S(quantileAt(out, 2, 0.999))) / S(q6(u))).toBeCloseTo(0.001, 8);
    // Far beyond every path the p-value keeps falling (no floor at 1/1000).
    expect(tailProbability(out, 2, 1e12, 'above').p).toBeLessThan(1e-9);
    expect(quantileAt(out, 2, 0.975)).toBeCloseTo(out.bands[0]!.upper[1]!, 12);
    expect(quantileAt(out, 2, 0.025)).toBeCloseTo(out.bands[0]!.lower[1]!, 12);
  });
  it('return NaN outside the forecast horizon', () => {
    const out = makeForecast(f, { horizon: 2, levels: [95], kind: 'analytic', paths: 1, seed: 1 });
    expect(tailProbability(out, 3, 1, 'above').p).toBeNaN();
    expect(quantileAt(out, 0, 0.5)).toBeNaN();
  });
});

describe('residual findings', () => {
  it('finds autocorrelation in AR(1) residuals and says the intervals are likely too narrow', () => {
    const r = createRandom(11);
    const y = new Float64Array(300);
    for (let i = 1; i < 300; i++) y[i] = 0.8 * y[i - 1]! + r.normal();
    const c = runResidualTests(fit('mean', y));
    expect(c.ljungBox.ok).toBe(false);
    expect(c.ljungBox.lags).toBe(defaultLags(300, 1));
    expect(c.ljungBox.df).toBe(defaultLags(300, 1)); // df = L for every baseline (DESIGN.md)
    expect(c.ljungBox.finding).toMatch(/autocorrelated.*intervals are likely too narrow/);
  });
  it('reports bias as zero by construction for mean and drift, and finds the bias of naive on a trend', () => {
    const y = randomWalk(200, 5, 1);
    expect(runResidualTests(fit('mean', y)).bias.zeroByConstruction).toBe(true);
    expect(runResidualTests(fit('drift', y)).bias.zeroByConstruction).toBe(true);
    const naive = runResidualTests(fit('naive', y)).bias;
    expect(naive.zeroByConstruction).toBe(false);
    expect(naive.ok).toBe(false);
    expect(naive.finding).toMatch(/forecasts run low.*drift method/);
  });
  it('finds growing and shrinking spread with the Brown–Forsythe test', () => {
    const r = createRandom(6);
    const y = Float64Array.from({ length: 300 }, (_, i) => (1 + i / 30) * r.normal());
    const c = runResidualTests(fit('mean', y));
    expect(c.spread.name).toBe('Brown–Forsythe');
    expect(c.spread.ok).toBe(false);
    expect(c.spread.finding).toMatch(/grows over time.*too narrow.*caveat about the model/);
    const shrinking = runResidualTests(fit('mean', y.slice().reverse())).spread;
    expect(shrinking.ok).toBe(false);
    expect(shrinking.finding).toMatch(/shrinks over time.*too wide/);
  });
  it('does not compute the tests on a constant series and says why, without NaN bounds', () => {
    const c = runResidualTests(fit('naive', new Array(30).fill(7)));
    for (const t of [c.ljungBox, c.normality, c.spread]) {
      expect(t.ok).toBe(true);
      expect(t.finding).toMatch(/not computed: the residuals are all equal/);
    }
  });
});

describe('analyse', () => {
  it('picks drift on a trending random walk and measures the coverage of the kind it uses', () => {
    const a = analyse(randomWalk(400, 21, 0.8), { ...OPTIONS, intervals: 'bootstrap' });
    if (!a.ok) throw new Error(a.reason);
    expect(a.selection.method).toBe('drift');
    expect(a.forecast.kind).toBe('bootstrap');
    expect(a.forecast.paths!.length).toBe(500 * 7);
    const cov = a.backtest.methods.drift!.coverage;
    expect(Object.keys(cov).sort()).toEqual(['analytic', 'bootstrap']);
    // Calibrated on its own model: backtest coverage near nominal (common practice: within a few points).
    expect(Math.abs(cov.analytic!['80']! - 0.8)).toBeLessThan(0.04);
    expect(Math.abs(cov.analytic!['95']! - 0.95)).toBeLessThan(0.03);
    expect(Math.abs(cov.bootstrap!['95']! - 0.95)).toBeLessThan(0.05);
    expect(a.notes.join(' ')).toMatch(/Bootstrap coverage is measured at up to 40 origins/);
    expect(a.backtest.methods.mean!.coverage.bootstrap).toBeUndefined();
  });

  it('measures empirical coverage out of sample near nominal on white noise', () => {
    const r = createRandom(9);
    const y = Float64Array.from({ length: 600 }, () => 10 + r.normal());
    const a = analyse(y, { ...OPTIONS, methods: ['mean'], intervals: 'empirical' });
    if (!a.ok) throw new Error(a.reason);
    expect(a.forecast.kind).toBe('empirical');
    // Against the analytic coverage of the same errors (exact for white noise): one series' shares
    // vary by a few points (here analytic 82.0% at 80%), and the kinds should agree.
    const cov = a.backtest.methods.mean!.coverage.empirical!;
    const exact = a.backtest.methods.mean!.coverage.analytic!;
    expect(Math.abs(cov['80']! - exact['80']!)).toBeLessThan(0.03);
    expect(Math.abs(cov['95']! - exact['95']!)).toBeLessThan(0.03);
    expect(Math.abs(cov['95']! - 0.95)).toBeLessThan(0.03);
  });

  it('leaves out methods that cannot be fitted, with a note, and fails plainly when none can', () => {
    const a = analyse(Float64Array.from([1, 2]), OPTIONS);
    if (!a.ok) throw new Error(a.reason);
    expect(a.chosen.method).toBe('mean');
    expect(a.notes.join(' ')).toMatch(/Naive left out: The naive method needs/);
    const b = analyse(Float64Array.from([NaN, 5, NaN]), OPTIONS);
    expect(b.ok).toBe(false);
    if (!b.ok) expect(b.reason).toMatch(/^No method could be fitted/);
  });

  it('gives finite bounds with missing values and for a constant series', () => {
    const y = randomWalk(80, 2);
    y[10] = NaN;
    y[79] = NaN;
    for (const series of [y, new Float64Array(40).fill(3)]) {
      const a = analyse(series, OPTIONS);
      if (!a.ok) throw new Error(a.reason);
      for (const b of a.forecast.bands)
        for (let h = 0; h < 7; h++) {
          expect(Number.isFinite(b.lower[h]!)).toBe(true);
          expect(Number.isFinite(b.upper[h]!)).toBe(true);
        }
    }
  });

  it('rejects options no config could produce with a RangeError naming the value', () => {
    expect(() => analyse(randomWalk(30, 1), { ...OPTIONS, horizon: 0 })).toThrow(
      /horizon must be a whole number of at least 1; got 0/,
    );
    expect(() => analyse(randomWalk(30, 1), { ...OPTIONS, levels: [100] })).toThrow(
      /between 0 and 100; got 100/,
    );
  });
});
