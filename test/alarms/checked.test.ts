// Checked observations are judged only with what was known before them.
import { describe, expect, it } from 'vitest';
import { checkObservations } from '../../src/alarms/index.js';
import { DEFAULTS } from '../../src/config/defaults.js';
import type { MetricOptions } from '../../src/config/types.js';
import { analyse, createRandom, type Analysis, type IntervalChoice } from '../../src/engine/index.js';

function options(intervals: IntervalChoice, last = 1): MetricOptions {
  return {
    ...DEFAULTS,
    methods: ['mean', 'naive', 'drift'],
    horizon: 3,
    intervals,
    backtest: { minTrain: 10, horizon: 3 },
    paths: 400,
    check: { last },
  };
}

function judge(y: Float64Array, o: MetricOptions) {
  const a = analyse(y, {
    season: 1,
    methods: o.methods,
    horizon: o.horizon,
    levels: o.levels,
    intervals: o.intervals,
    backtest: o.backtest,
    score: o.score,
    paths: o.paths,
    seed: o.seed,
  }) as Analysis;
  if (!a.ok) throw new Error('analysis failed');
  const indices = Array.from({ length: o.check.last }, (_, k) => y.length - o.check.last + k);
  return checkObservations({
    values: y,
    rows: Int32Array.from(y, (_, i) => i + 2),
    timeAt: () => null,
    analysis: a,
    options: o,
    season: 1,
    indices,
  });
}

describe("a checked observation's interval does not depend on its own value", () => {
  // An AR(1) history (autocorrelated, so `auto` picks empirical intervals) with its last value moved
  // from 0 to 100 sigma: the interval it is judged against must not move at all.
  const r = createRandom(31);
  const base = new Float64Array(160);
  for (let i = 1; i < 160; i++) base[i] = 0.6 * base[i - 1]! + r.normal();
  for (const kind of ['analytic', 'bootstrap', 'empirical', 'auto'] as const) {
    it(`under ${kind} intervals, for one and for several checked rows`, () => {
      for (const last of [1, 3]) {
        const bounds: string[] = [];
        const kinds = new Set<string>();
        for (const shift of [0, 5, 20, 100]) {
          const y = base.slice();
          y[y.length - 1] = shift;
          const out = judge(y, options(kind, last));
          const c = out.checked.at(-1)!;
          kinds.add(c.intervalKind!);
          bounds.push(`${c.lower} ${c.upper} ${c.mean}`);
          // One sigma: the checks examine the residuals of the model that judged the rows.
          expect(out.judge!.fit.n).toBe(y.length - last);
        }
        expect(new Set(bounds).size).toBe(1);
        expect(kinds.size).toBe(1);
        if (kind !== 'auto') expect([...kinds][0]).toBe(kind);
        else expect([...kinds][0]).toBe('empirical');
      }
    });
  }

  it('an anomaly among the checked rows does not flag the residual checks of the judging model', () => {
    const r2 = createRandom(32);
    const y = Float64Array.from({ length: 120 }, () => 50 + r2.normal());
    y[119] = 50 + 40; // a 40-sigma anomaly, the checked row
    const out = judge(y, options('analytic'));
    expect(out.checked[0]!.alarm).toBe(true);
    const c = out.judge!.checks;
    expect(c.normality.ok).toBe(true); // on all 120 residuals the outlier would fail Jarque–Bera
    expect(out.checked[0]!.pValue).toBeLessThan(1e-10);
  });
});

describe('p-values in the tails', () => {
  it('keep falling beyond the sample for bootstrap and empirical intervals, so Bonferroni can act', () => {
    const r = createRandom(41);
    const base = Float64Array.from({ length: 200 }, () => 10 + r.normal());
    for (const kind of ['bootstrap', 'empirical'] as const) {
      const ps: number[] = [];
      for (const shift of [3, 5, 8]) {
        const y = base.slice();
        y[199] = 10 + shift;
        const c = judge(y, options(kind)).checked[0]!;
        expect(c.intervalKind).toBe(kind);
        expect(c.pValueBasis).toBe('tail-model');
        expect(c.pValueBound).toBeNull();
        ps.push(c.pValue);
      }
      expect(ps[0]!).toBeGreaterThan(ps[1]!);
      expect(ps[1]!).toBeGreaterThan(ps[2]!);
      // 5 sigma two-sided is about 6e-7 for a normal; the t tail with 198 df gives 1.3e-6. Either
      // passes a Bonferroni cut of 0.05 / 1,050 = 4.8e-5.
      expect(ps[1]!).toBeLessThan(4.8e-5);
    }
  });
});
