// Property tests (fast-check): the O(T·H) backtest against a plain refit at every origin written
// here from docs/design.md, intervals nested by level, widths growing with h where the formula says,
// and bootstrap paths reproducible by seed.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  fitMethod,
  isFit,
  makeForecast,
  prefixBacktest,
  runBacktest,
  simulatePaths,
  type MethodName,
} from '../../src/engine/index.js';
import {
  Fenwick,
  lowerBound,
  rememberSorted,
  sortAscending,
  sortedCopy,
  sortedRanks,
} from '../../src/engine/numeric.js';

const METHODS: MethodName[] = ['mean', 'naive', 'seasonal-naive', 'drift'];

/** docs/design.md's table for a series without missing values: point forecasts for steps 1..H. */
function plainForecast(method: MethodName, y: number[], m: number, H: number): number[] | null {
  const T = y.length;
  const out: number[] = [];
  if (method === 'mean') {
    if (T < 2) return null;
    const ybar = y.reduce((a, b) => a + b, 0) / T;
    for (let h = 1; h <= H; h++) out.push(ybar);
  } else if (method === 'naive') {
    if (T < 3) return null;
    for (let h = 1; h <= H; h++) out.push(y[T - 1]!);
  } else if (method === 'drift') {
    if (T < 3) return null;
    const slope = (y[T - 1]! - y[0]!) / (T - 1);
    for (let h = 1; h <= H; h++) out.push(y[T - 1]! + h * slope);
  } else {
    if (T < m + 2) return null;
    // y_{T-m+1+((h-1) mod m)}, 1-based.
    for (let h = 1; h <= H; h++) out.push(y[T - m + ((h - 1) % m)]!);
  }
  return out;
}

/** Refit at every origin: per step, ME, RMSE, MAE, MPE, MAPE, MASE and the origin count. */
function plainBacktest(y: number[], method: MethodName, m: number, minTrain: number, H: number) {
  const T = y.length;
  const lag = m > 1 ? m : 1;
  let sc = 0;
  for (let t = lag; t < T; t++) sc += Math.abs(y[t]! - y[t - lag]!);
  const scale = sc / (T - lag);
  const steps = [];
  for (let h = 1; h <= H; h++) {
    const e: number[] = [];
    const pct: number[] = [];
    for (let n = minTrain; n <= T - 1; n++) {
      if (n + h > T) break;
      const f = plainForecast(method, y.slice(0, n), m, h);
      if (!f) continue;
      const a = y[n + h - 1]!;
      const err = a - f[h - 1]!;
      e.push(err);
      if (a !== 0) pct.push((100 * err) / a);
    }
    const mean = (xs: number[]) => (xs.length ? xs.reduce((p, q) => p + q, 0) / xs.length : NaN);
    const mae = mean(e.map(Math.abs));
    steps.push({
      origins: e.length,
      me: mean(e),
      rmse: Math.sqrt(mean(e.map((x) => x * x))),
      mae,
      mpe: mean(pct),
      mape: mean(pct.map(Math.abs)),
      mase: scale > 0 ? mae / scale : NaN, // undefined without naive changes (documented)
    });
  }
  return steps;
}

const near = (a: number, b: number): boolean =>
  a === b ||
  (Number.isNaN(a) && Number.isNaN(b)) ||
  Math.abs(a - b) <= 1e-7 * Math.max(1, Math.abs(a), Math.abs(b));

// Values in ±1000, those below 0.001 in size set to 0: percentage errors against a near-zero actual
// magnify rounding differences between two correct implementations without bound, and intervals
// of width 1e-300 around 0 decide coverage on the last bit.
const series = (min: number, max: number) =>
  fc.array(
    fc
      .double({ min: -1000, max: 1000, noNaN: true, noDefaultInfinity: true })
      .map((x) => (Math.abs(x) < 1e-3 ? 0 : x)),
    { minLength: min, maxLength: max },
  );

describe('backtest equals a plain refit at every origin', () => {
  it('for every method, measure and step, on random series', () => {
    fc.assert(
      fc.property(
        series(6, 40),
        fc.integer({ min: 1, max: 4 }),
        fc.integer({ min: 2, max: 8 }),
        fc.integer({ min: 1, max: 5 }),
        (ys, m, minTrain, H) => {
          const y = Float64Array.from(ys);
          const bt = runBacktest(y, METHODS, { season: m, minTrain, horizon: H, levels: [80], coverage: [] });
          for (const method of METHODS) {
            const ref = plainBacktest(ys, method, m, minTrain, H);
            const got = bt.methods[method]!.steps;
            for (let h = 0; h < H; h++) {
              const r = ref[h]!;
              const g = got[h]!;
              expect(g.origins).toBe(r.origins);
              if (r.origins === 0) continue;
              for (const k of ['me', 'rmse', 'mae', 'mpe', 'mape', 'mase'] as const)
                if (!near(g[k], r[k]))
                  throw new Error(`${method} step ${h + 1} ${k}: backtest ${g[k]}, refit ${r[k]}`);
            }
          }
        },
      ),
      { numRuns: 150 },
    );
  });

  it('with missing values, equals fitMethod refitted on each prefix (errors and analytic coverage)', () => {
    const withGaps = fc
      .tuple(series(12, 40), fc.array(fc.integer({ min: 0, max: 39 }), { maxLength: 6 }))
      .map(([ys, holes]) => {
        const y = Float64Array.from(ys);
        for (const i of holes) if (i < y.length) y[i] = NaN;
        return y;
      });
    // Three levels: the analytic count takes two levels per pass and the third alone.
    const LEVELS = [50, 80, 95];
    fc.assert(
      fc.property(withGaps, fc.integer({ min: 1, max: 3 }), (y, m) => {
        const H = 3;
        const minTrain = 5;
        const bt = runBacktest(y, METHODS, {
          season: m,
          minTrain,
          horizon: H,
          levels: LEVELS,
          coverage: ['analytic'],
        });
        for (const method of METHODS) {
          const errs: number[][] = [[], [], []];
          // Per level: inside, and cells within rounding distance of a bound, where two correct sums
          // may disagree.
          const inside = LEVELS.map(() => 0);
          const nearBound = LEVELS.map(() => 0);
          let total = 0;
          for (let n = minTrain; n <= y.length - 1; n++) {
            const f = fitMethod(method, y.subarray(0, n), m);
            if (!isFit(f)) continue;
            const fcst = makeForecast(f, { horizon: H, levels: LEVELS, kind: 'analytic', paths: 1, seed: 1 });
            for (let h = 1; h <= H && n + h <= y.length; h++) {
              const a = y[n + h - 1]!;
              if (!Number.isFinite(a)) continue;
              errs[h - 1]!.push(a - fcst.mean[h - 1]!);
              total++;
              fcst.bands.forEach((band, l) => {
                const lo = band.lower[h - 1]!;
                const hi = band.upper[h - 1]!;
                if (a >= lo && a <= hi) inside[l]!++;
                if (Math.min(Math.abs(a - lo), Math.abs(a - hi)) <= 1e-9 * (1 + Math.abs(a))) nearBound[l]!++;
              });
            }
          }
          const mb = bt.methods[method]!;
          for (let h = 0; h < H; h++) {
            const got = Array.from(mb.errors[h]!);
            expect(got.length).toBe(errs[h]!.length);
            got.forEach((e, i) => {
              if (!near(e, errs[h]![i]!))
                throw new Error(`${method} step ${h + 1} error ${i}: ${e} vs ${errs[h]![i]}`);
            });
          }
          if (total > 0)
            LEVELS.forEach((level, l) =>
              expect(
                Math.abs(mb.coverage.analytic![String(level)]! - inside[l]! / total),
              ).toBeLessThanOrEqual(nearBound[l]! / total + 1e-12),
            );
        }
      }),
      { numRuns: 100 },
    );
  });

  it('of a prefix, taken from the whole series backtest, equals the backtest of the prefix bit for bit', () => {
    // prefixBacktest reuses the whole series' errors (a fit at origin i sees y[0..i] only) and its
    // sorted copies; the reference is the prefix backtested on its own and sorted by the built-in sort.
    const withGaps = fc
      .tuple(
        fc.array(fc.oneof(fc.integer({ min: -5, max: 5 }), fc.double({ min: -1e3, max: 1e3, noNaN: true })), {
          minLength: 12,
          maxLength: 60,
        }),
        fc.array(fc.integer({ min: 0, max: 59 }), { maxLength: 8 }),
      )
      .map(([ys, holes]) => {
        const y = Float64Array.from(ys);
        for (const i of holes) if (i < y.length) y[i] = NaN;
        return y;
      });
    fc.assert(
      fc.property(
        withGaps,
        fc.integer({ min: 1, max: 4 }),
        fc.integer({ min: 1, max: 10 }),
        fc.boolean(),
        (y, m, back, sortFirst) => {
          const P = Math.max(1, y.length - back);
          const o = { season: m, minTrain: 4, horizon: 4 };
          const full = runBacktest(y, METHODS, { ...o, levels: [80], coverage: [] });
          for (const method of METHODS) {
            const whole = full.methods[method]!;
            if (sortFirst) for (const e of whole.errors) sortedCopy(e);
            const got = prefixBacktest(y, P, whole, o);
            const ref = runBacktest(y.slice(0, P), [method], { ...o, levels: [80], coverage: [] }).methods[
              method
            ]!;
            expect(got.steps).toEqual(ref.steps);
            expect(got.notes).toEqual(ref.notes);
            expect(got.origins).toBe(ref.origins);
            got.errors.forEach((e, h) => {
              expect(Array.from(e)).toEqual(Array.from(ref.errors[h]!));
              expect(Array.from(sortedCopy(e))).toEqual(Array.from(ref.errors[h]!.slice().sort()));
            });
          }
        },
      ),
      { numRuns: 200 },
    );
  });
});

describe('the engine sort', () => {
  // Ties, -0 and +0, NaN and any double.
  const value = fc.oneof(
    fc.constantFrom(0, -0, NaN, 1, -1),
    fc.integer({ min: -3, max: 3 }),
    fc.double({ noNaN: false }),
  );

  it('orders exactly as the built-in typed-array sort (ties, -0 and +0, NaN)', () => {
    fc.assert(
      fc.property(fc.array(value, { maxLength: 300 }), (xs) => {
        const a = Float64Array.from(xs);
        const got = Array.from(sortAscending(a.slice()));
        const want = Array.from(a.slice().sort());
        expect(got.length).toBe(want.length);
        got.forEach((x, i) => expect(Object.is(x, want[i])).toBe(true));
      }),
      { numRuns: 300 },
    );
  });

  it('gives each entry the first position of its value among the sorted ones, from the sort itself or by search', () => {
    // The reference: the built-in sort, and the count of entries below each value found by
    // scanning it (ties, and -0 with +0, share a position; NaN is below nothing).
    fc.assert(
      fc.property(fc.array(value, { maxLength: 300 }), fc.boolean(), (xs, told) => {
        const a = Float64Array.from(xs);
        const want = a.slice().sort();
        // Told the sorted copy beforehand (as the prefix backtest does), the ranks come by search.
        if (told) rememberSorted(a, want.slice());
        const { sorted, first } = sortedRanks(a);
        expect(sorted.length).toBe(a.length);
        sorted.forEach((x, i) => expect(Object.is(x, want[i])).toBe(true));
        a.forEach((x, j) => {
          let below = 0;
          for (const w of want) if (w < x) below++;
          expect(first[j]).toBe(below);
          expect(first[j]).toBe(lowerBound(want, x));
        });
        expect(sortedRanks(a).first).toBe(first);
      }),
      { numRuns: 300 },
    );
  });
});

describe('empirical coverage equals a brute-force out-of-sample count', () => {
  // The brute force: at every origin, the forecast the engine would have made there (the method
  // refitted to the prefix, empirical intervals from the prefix's own backtest: makeForecast), and
  // whether each later actual lies inside its band. The coverage check must count the same. Series
  // without gaps: with gaps the forecast and the coverage check place the errors' origins for the
  // tail's scale differently (from the end, from the start), which moves bounds slightly.
  it('on random series with ties', () => {
    const values = fc.array(
      fc.oneof(fc.integer({ min: -5, max: 5 }), fc.double({ min: -50, max: 50, noNaN: true })),
      {
        minLength: 15,
        maxLength: 60,
      },
    );
    fc.assert(
      fc.property(
        values,
        fc.constantFrom(...METHODS),
        fc.integer({ min: 3, max: 8 }),
        (ys, method, minErrors) => {
          const y = Float64Array.from(ys);
          const H = 3;
          const levels = [50, 80, 95];
          const o = { season: 2, minTrain: 5, horizon: H, levels };
          const bt = runBacktest(y, [method], { ...o, coverage: ['empirical'], minErrors });
          const mb = bt.methods[method]!;
          const inside = levels.map(() => 0);
          const nearBound = levels.map(() => 0);
          let total = 0;
          for (let n = 5; n <= y.length - 1; n++) {
            const prefix = y.subarray(0, n);
            const f = fitMethod(method, prefix, 2);
            if (!isFit(f)) continue;
            const pb = runBacktest(prefix, [method], { ...o, coverage: [] }).methods[method]!;
            const fcst = makeForecast(f, {
              horizon: H,
              levels,
              kind: 'empirical',
              paths: 1,
              seed: 1,
              backtest: pb,
              minErrors,
            });
            for (let h = 1; h <= H && n + h <= y.length; h++) {
              if ((pb.errors[h - 1]?.length ?? 0) < minErrors || fcst.kind !== 'empirical') continue;
              const a = y[n + h - 1]!;
              total++;
              levels.forEach((_, k) => {
                const lo = fcst.bands[k]!.lower[h - 1]!;
                const hi = fcst.bands[k]!.upper[h - 1]!;
                if (a >= lo && a <= hi) inside[k]!++;
                if (Math.min(Math.abs(a - lo), Math.abs(a - hi)) <= 1e-9 * (1 + Math.abs(a))) nearBound[k]!++;
              });
            }
          }
          // Exact agreement except where an actual sits within rounding of a bound (the forecast
          // adds the point to the errors' quantile, the check compares the error).
          levels.forEach((l, k) => {
            const got = mb.coverage.empirical![String(l)]!;
            if (total === 0) expect(got).toBeNaN();
            else
              expect(Math.abs(got - inside[k]! / total)).toBeLessThanOrEqual(nearBound[k]! / total + 1e-12);
          });
        },
      ),
      { numRuns: 80 },
    );
  });
});

describe('interval properties', () => {
  const fitted = fc
    .tuple(series(10, 60), fc.constantFrom(...METHODS), fc.integer({ min: 1, max: 4 }))
    .map(([ys, method, m]) => fitMethod(method, Float64Array.from(ys), m))
    .filter(isFit);

  it('nests the bands by level for every kind', () => {
    fc.assert(
      fc.property(
        fitted,
        fc.constantFrom('analytic', 'bootstrap') as fc.Arbitrary<'analytic' | 'bootstrap'>,
        (f, kind) => {
          const out = makeForecast(f, { horizon: 6, levels: [50, 80, 95, 99], kind, paths: 200, seed: 3 });
          for (let k = 1; k < out.bands.length; k++)
            for (let h = 0; h < 6; h++) {
              expect(out.bands[k]!.lower[h]!).toBeLessThanOrEqual(out.bands[k - 1]!.lower[h]!);
              expect(out.bands[k]!.upper[h]!).toBeGreaterThanOrEqual(out.bands[k - 1]!.upper[h]!);
            }
        },
      ),
      { numRuns: 80 },
    );
  });

  it('analytic widths grow with h for naive and drift, grow by season for seasonal naive, stay flat for mean', () => {
    fc.assert(
      fc.property(fitted, (f) => {
        const H = 9;
        const out = makeForecast(f, { horizon: H, levels: [95], kind: 'analytic', paths: 1, seed: 1 });
        const w = Array.from(out.bands[0]!.upper, (u, i) => u - out.bands[0]!.lower[i]!);
        for (let h = 1; h < H; h++) {
          const tol = 1e-9 * Math.max(1, w[h]!);
          if (f.method === 'mean') expect(Math.abs(w[h]! - w[0]!)).toBeLessThanOrEqual(tol);
          else if (f.method === 'seasonal-naive' && h % f.season !== 0)
            expect(Math.abs(w[h]! - w[h - 1]!)).toBeLessThanOrEqual(tol); // same season, same width
          else if (f.sigma > 0) expect(w[h]!).toBeGreaterThan(w[h - 1]!);
        }
      }),
      { numRuns: 150 },
    );
  });

  it('bootstrap paths and bounds are reproducible by seed and differ between seeds', () => {
    fc.assert(
      fc.property(fitted, fc.integer({ min: 0, max: 2 ** 31 }), (f, seed) => {
        const a = simulatePaths(f, 5, 100, seed, 'bootstrap');
        const b = simulatePaths(f, 5, 100, seed, 'bootstrap');
        expect(Array.from(a)).toEqual(Array.from(b));
        const fa = makeForecast(f, { horizon: 5, levels: [80], kind: 'bootstrap', paths: 100, seed });
        const fb = makeForecast(f, { horizon: 5, levels: [80], kind: 'bootstrap', paths: 100, seed });
        expect(Array.from(fa.bands[0]!.upper)).toEqual(Array.from(fb.bands[0]!.upper));
        if (f.sigma > 0) {
          const c = simulatePaths(f, 5, 100, seed + 1, 'bootstrap');
          expect(Array.from(c)).not.toEqual(Array.from(a));
        }
      }),
      { numRuns: 60 },
    );
  });
});

describe('the Fenwick tree of counts', () => {
  it('finds the k-th counted item as a scan of the counts does, asked in order or at random', () => {
    // The reference: the counts per position kept in a plain array and scanned from the left.
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 60 }),
        fc.array(fc.nat(), { maxLength: 120 }),
        fc.array(fc.nat(), { maxLength: 40 }),
        (n, adds, asks) => {
          const tree = new Fenwick(0);
          tree.reset(n);
          const counts = new Array<number>(n).fill(0);
          const kthByScan = (k: number): number => {
            let seen = 0;
            for (let p = 0; p < n; p++) if ((seen += counts[p]!) >= k) return p;
            return n;
          };
          let total = 0;
          adds.forEach((a, i) => {
            const p = a % n;
            tree.add(p);
            counts[p]!++;
            total++;
            if (i % 7 !== 0) return;
            // Every k in order (each after the previous: the step-on path), then some at random.
            for (let k = 1; k <= total + 1; k++) expect(tree.kth(k)).toBe(kthByScan(k));
            for (const q of asks) {
              const k = 1 + (q % (total + 1));
              expect(tree.kth(k)).toBe(kthByScan(k));
            }
            expect(tree.below(n)).toBe(total);
          });
        },
      ),
      { numRuns: 300 },
    );
  });
});
