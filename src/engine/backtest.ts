// Rolling-origin backtest (DESIGN.md) in O(T·H) per method.
//
// Origins are the training sizes n = minTrain..T-1: the method is fitted to y_1..y_n and forecasts
// steps h = 1..H (while n + h <= T); error = actual - forecast. Each origin's fit comes from running
// state updated in O(1) as n grows (never a refit): Welford's running mean and sum of squared
// deviations of the values (mean method), of the one-step differences (naive, drift) and of the
// seasonal differences (seasonal naive), plus the first and last observed index and the latest
// observed index in each season position. The fits are identical to fitMethod on the prefix, so
// missing values are handled the same way (test/engine/backtest.property.test.ts compares the two).
// Origins where the method cannot be fitted yet, and missing actuals, are skipped.
//
// Measures per step: ME, RMSE, MAE, MPE and MAPE (percent, over non-zero actuals), MASE (MAE over
// the in-sample MAE of the one-step naive differences, or seasonal differences when m > 1, over the
// whole series), and the number of origins. Coverage is pooled over all steps and origins:
// - analytic: at every origin, with that origin's sigma and df;
// - empirical: at an origin, the errors known by then (actuals at or before the origin), from the
//   first origin with at least minErrors of them, kept in a Fenwick tree of ranks so each origin
//   costs O(log T);
// - bootstrap: at most BOOTSTRAP_ORIGINS origins spread evenly, BOOTSTRAP_PATHS paths each, to keep
//   the cost bounded; the paths resample that origin's own centred residuals (simulate.ts).
import { tQuantileFrom, tQuantileTable } from './dist.js';
import { DEFAULT_MIN_ERRORS, sortedCopy } from './forecast.js';
import { methodLabel } from './methods.js';
import { powerOfTwoBelow, present, sortedQuantile } from './numeric.js';
import { createRandom } from './random.js';
import { simulateInto, type SimSpec } from './simulate.js';
import type { Backtest, IntervalKind, MethodBacktest, MethodName, StepMeasures } from './types.js';

export const BOOTSTRAP_ORIGINS = 40;
export const BOOTSTRAP_PATHS = 200;

export interface BacktestOptions {
  season: number;
  minTrain: number;
  horizon: number;
  levels: number[];
  /** Seed for the bootstrap coverage paths (default 1). */
  seed?: number;
  /** Interval kinds whose coverage is measured (default all three). */
  coverage?: IntervalKind[];
  /** Minimum errors before empirical coverage is counted (default 20). */
  minErrors?: number;
}

export function runBacktest(y: Float64Array, methods: MethodName[], o: BacktestOptions): Backtest {
  if (!Number.isInteger(o.minTrain) || o.minTrain < 1)
    throw new RangeError(`minTrain must be a whole number of at least 1; got ${o.minTrain}`);
  if (!Number.isInteger(o.horizon) || o.horizon < 1)
    throw new RangeError(`backtest horizon must be a whole number of at least 1; got ${o.horizon}`);
  const T = y.length;
  const m = Math.max(1, Math.floor(o.season));
  const notes: string[] = [];
  const kinds = o.coverage ?? ['analytic', 'empirical', 'bootstrap'];
  const minErrors = o.minErrors ?? DEFAULT_MIN_ERRORS;

  // At extreme magnitudes (beyond 2^±300) work in units of the largest one, rounded to a power of
  // two so the scaling is exact: squares of errors then neither overflow nor underflow; measures
  // in units are scaled back.
  let big = 0;
  for (let i = 0; i < T; i++) if (present(y[i]!)) big = Math.max(big, Math.abs(y[i]!));
  const unit = big > 2 ** 300 || (big > 0 && big < 2 ** -300) ? powerOfTwoBelow(big) : 1;
  const ys = unit === 1 ? y : y.map((v) => v / unit);

  // MASE scale over the whole series.
  const lag = m > 1 ? m : 1;
  let sAbs = 0;
  let nAbs = 0;
  for (let i = lag; i < T; i++) {
    const a = ys[i]!;
    const b = ys[i - lag]!;
    if (present(a) && present(b)) {
      sAbs += Math.abs(a - b);
      nAbs++;
    }
  }
  const scale = nAbs > 0 ? sAbs / nAbs : NaN;
  if (!(scale > 0))
    notes.push(
      `MASE is undefined: the series has no ${lag > 1 ? 'seasonal' : 'one-step'} changes to scale the errors by.`,
    );
  if (T - 1 < o.minTrain)
    notes.push(
      `The backtest has no origin: it trains on at least ${o.minTrain} observations and the series has ${T}.`,
    );

  // 100 / actual, NaN where the actual is zero or missing: percentage errors by multiplication.
  const inv100 = new Float64Array(T);
  for (let i = 0; i < T; i++) {
    const a = ys[i]!;
    inv100[i] = a !== 0 && Number.isFinite(a) ? 100 / a : NaN;
  }
  const out: Backtest = { minTrain: o.minTrain, horizon: o.horizon, methods: {}, notes };
  const work = workspace(T, o.levels.length); // scratch shared by the methods, one after another
  for (const method of methods) {
    out.methods[method] = backtestMethod(
      ys,
      inv100,
      method,
      m,
      o,
      scale,
      unit,
      kinds,
      minErrors,
      false,
      work,
    ) as MethodBacktest;
  }
  if (kinds.includes('empirical'))
    notes.push(
      `Empirical coverage counts, at each origin, only errors whose actuals were known by then (out of sample), from the first origin with at least ${minErrors} of them; at most about ${EMPIRICAL_COVERAGE_POINTS} errors per step are judged, evenly spread over the origins.`,
    );
  if (kinds.includes('bootstrap'))
    notes.push(
      `Bootstrap coverage is measured at up to ${BOOTSTRAP_ORIGINS} origins spread evenly over the backtest, with ${BOOTSTRAP_PATHS} paths each, to keep its cost bounded.`,
    );
  return out;
}

/** Per-origin scratch arrays; every entry a method reads it has written first. */
interface Workspace {
  base: Float64Array;
  slopes: Float64Array;
  meanFactor: Float64Array;
  halfWidth2: Float64Array;
  fcol: Float64Array;
  vcol: Float64Array;
  e2col: Float64Array;
  gaps: Int32Array;
  spans: Int32Array;
  latestAt: Int32Array;
}

function workspace(T: number, L: number): Workspace {
  return {
    base: new Float64Array(T),
    slopes: new Float64Array(T),
    meanFactor: new Float64Array(T),
    halfWidth2: new Float64Array(L * T),
    fcol: new Float64Array(T),
    vcol: new Float64Array(T),
    e2col: new Float64Array(T),
    gaps: new Int32Array(T),
    spans: new Int32Array(T),
    latestAt: new Int32Array(T),
  };
}

/**
 * Coverage of one more interval kind for a method already backtested (with the same options):
 * empirical from its errors, bootstrap by a pass over the origins without the measures. Used by
 * analyse() to measure the kind a forecast uses for the chosen method only.
 */
export function measureCoverage(
  y: Float64Array,
  mb: MethodBacktest,
  kind: 'empirical' | 'bootstrap',
  o: BacktestOptions,
): Record<string, number> {
  const T = y.length;
  const minErrors = o.minErrors ?? DEFAULT_MIN_ERRORS;
  if (kind === 'bootstrap') {
    let big = 0;
    for (let i = 0; i < T; i++) if (present(y[i]!)) big = Math.max(big, Math.abs(y[i]!));
    const unit = big > 2 ** 300 || (big > 0 && big < 2 ** -300) ? powerOfTwoBelow(big) : 1;
    const ys = unit === 1 ? y : y.map((v) => v / unit);
    const m = Math.max(1, Math.floor(o.season));
    return backtestMethod(ys, ys, mb.method, m, o, NaN, unit, ['bootstrap'], minErrors, true) as Record<
      string,
      number
    >;
  }
  // The origin of each stored error: step h's errors come, in order, from the latest origins whose
  // step-h actual is observed (origins run to T - 1 - h; missing actuals leave no error).
  const maxO = Math.max(0, T - o.minTrain);
  const origin = new Int32Array(mb.errors.length * maxO);
  mb.errors.forEach((e, k) => {
    const h = k + 1;
    let j = e.length - 1;
    for (let i = T - 1 - h; j >= 0 && i >= 0; i--) if (present(y[i + h]!)) origin[k * maxO + j--] = i;
  });
  return empiricalCoverage(mb.errors, origin, maxO, o.levels, minErrors);
}

function backtestMethod(
  ys: Float64Array,
  inv100: Float64Array,
  method: MethodName,
  m: number,
  o: BacktestOptions,
  scale: number,
  unit: number,
  kinds: IntervalKind[],
  minErrors: number,
  bootOnly = false,
  work?: Workspace,
): MethodBacktest | Record<string, number> {
  const T = ys.length;
  const H = o.horizon;
  const minTrain = o.minTrain;
  const maxO = Math.max(0, T - minTrain);
  const L = o.levels.length;
  const probs = o.levels.map((l) => 1 - (1 - l / 100) / 2);
  const alphas = o.levels.map((l) => (1 - l / 100) / 2);
  const tables = probs.map((p) => tQuantileTable(p));
  const wantEmp = kinds.includes('empirical');
  const wantBoot = kinds.includes('bootstrap');
  const code = method === 'mean' ? 0 : method === 'naive' ? 1 : method === 'drift' ? 2 : 3;

  // Pass 1, over the origins in time order: the running state, and from it each origin's fit as
  // a few numbers — base value (level or last observed value), slope, gap to the last observed
  // value, drift span, and per level (q_df sigma)^2, the squared half-width per unit of the
  // standard error's variance factor. Index = last training index i (training size i + 1).
  const ws = work ?? workspace(T, L);
  const base = ws.base;
  const slopes = code === 2 ? ws.slopes : null;
  const gaps = code === 1 || code === 2 ? ws.gaps : null;
  const spans = code === 2 ? ws.spans : null;
  const meanFactor = code === 0 ? ws.meanFactor : null;
  const halfWidth2 = ws.halfWidth2;
  let wN = 0;
  let wMean = 0;
  let wM2 = 0;
  let dN = 0;
  let dMean = 0;
  let dM2 = 0;
  let first = -1;
  let last = -1;
  const latest = code === 3 ? new Int32Array(m).fill(-1) : null;
  // seasonal naive: latestAt[j] = latest observed index <= j in j's season position.
  const latestAt = code === 3 ? ws.latestAt : null;
  let phases = 0;
  const lagD = code === 3 ? m : 1;
  let i0 = -1; // first origin with a fit; every later origin has one too

  // Bootstrap coverage: the origins it is measured at, the observed values (mean) or differences
  // (the others) in order as the resampling pool, and the paths' buffers.
  const boot = wantBoot ? bootstrapPlan(T, minTrain) : null;
  const pool = wantBoot ? new Float64Array(T) : null;
  const bootRnd = createRandom(o.seed ?? 1);
  const bootPaths = wantBoot ? new Float64Array(BOOTSTRAP_PATHS * H) : null;
  const col = new Float64Array(BOOTSTRAP_PATHS);
  const bootInside = new Int32Array(L);
  let bootTotal = 0;

  for (let i = 0; i < T - 1; i++) {
    const v = ys[i]!;
    const ok = Number.isFinite(v);
    if (ok) {
      if (code === 0) {
        if (pool) pool[wN] = v;
        wN++;
        const d = v - wMean;
        wMean += d / wN;
        wM2 += d * (v - wMean);
      } else if (i >= lagD) {
        const b = ys[i - lagD]!;
        if (Number.isFinite(b)) {
          const x = v - b;
          if (pool) pool[dN] = x;
          dN++;
          const d = x - dMean;
          dMean += d / dN;
          dM2 += d * (x - dMean);
        }
      }
      if (first < 0) first = i;
      last = i;
    }
    if (latest) {
      const ph = i % m;
      if (ok) {
        if (latest[ph]! < 0) phases++;
        latest[ph] = i;
        latestAt![i] = i;
      } else latestAt![i] = i >= m ? latestAt![i - m]! : -1;
    }
    if (i + 1 < minTrain) continue;
    let df: number;
    let sigma2: number;
    if (code === 0) {
      if (wN < 2) continue;
      df = wN - 1;
      sigma2 = Math.max(0, wM2) / df;
      base[i] = wMean;
      meanFactor![i] = 1 + 1 / wN;
    } else if (code === 1 || code === 2) {
      if (dN < 2) continue;
      df = dN - 1;
      base[i] = ys[last]!;
      gaps![i] = i - last;
      if (code === 1) sigma2 = Math.max(0, dM2) / df;
      else {
        const span = last - first;
        const slope = (ys[last]! - ys[first]!) / span;
        const off = dMean - slope;
        sigma2 = Math.max(0, dM2 + dN * off * off) / df;
        slopes![i] = slope;
        spans![i] = span;
      }
    } else {
      if (dN < 2 || phases < m) continue;
      df = dN - 1;
      sigma2 = Math.max(0, dM2) / df;
    }
    if (i0 < 0) i0 = i;
    for (let l = 0; l < L; l++) {
      const q = tQuantileFrom(tables[l]!, probs[l]!, df);
      halfWidth2[l * T + i] = q * q * sigma2;
    }
    if (boot && boot[i] === 1) {
      const hMax = Math.min(H, T - 1 - i);
      const spec = originSpec(code, pool!, ys, i, m, wN, wMean, dN, dMean, first, last, latest);
      simulateInto(bootPaths!, spec, hMax, BOOTSTRAP_PATHS, bootRnd, 'bootstrap');
      bootTotal += countInside(bootPaths!, hMax, ys, i, col, alphas, bootInside);
    }
  }

  if (bootOnly) return shares(o.levels, bootInside, bootTotal);

  // Pass 2, step by step: each origin's forecast and variance factor for step h (method by
  // method), then the error and every running sum in scalars.
  const errBuf = new Float64Array(H * maxO);
  const errOrigin = wantEmp ? new Int32Array(H * maxO) : null;
  const { fcol, vcol, e2col } = ws;
  const inside = new Float64Array(L);
  let covered = 0;
  const steps: StepMeasures[] = [];
  const errors: Float64Array[] = [];
  for (let h = 1; h <= H; h++) {
    const iEnd = T - 1 - h; // last origin whose step-h actual exists
    let c = 0;
    let sE = 0;
    let sE2 = 0;
    let sA = 0;
    let cP = 0;
    let sP = 0;
    let sAP = 0;
    const off = (h - 1) * maxO;
    if (i0 >= 0 && iEnd >= i0) {
      if (code === 0) {
        for (let i = i0; i <= iEnd; i++) {
          fcol[i] = base[i]!;
          vcol[i] = meanFactor![i]!;
        }
      } else if (code === 1) {
        for (let i = i0; i <= iEnd; i++) {
          fcol[i] = base[i]!;
          vcol[i] = h + gaps![i]!;
        }
      } else if (code === 2) {
        for (let i = i0; i <= iEnd; i++) {
          const k = h + gaps![i]!;
          fcol[i] = base[i]! + k * slopes![i]!;
          vcol[i] = k * (1 + k / spans![i]!);
        }
      } else {
        const back = m * Math.ceil(h / m);
        for (let i = i0; i <= iEnd; i++) {
          const s0 = latestAt![i + h - back]!;
          fcol[i] = ys[s0]!;
          vcol[i] = (i + h - s0) / m;
        }
      }
      for (let i = i0; i <= iEnd; i++) {
        const a = ys[i + h]!;
        if (!Number.isFinite(a)) {
          e2col[i] = NaN;
          continue;
        }
        const e = a - fcol[i]!;
        errBuf[off + c] = e;
        if (errOrigin) errOrigin[off + c] = i;
        c++;
        sE += e;
        const e2 = e * e;
        sE2 += e2;
        sA += Math.abs(e);
        const inv = inv100[i + h]!;
        if (inv === inv) {
          const pct = e * inv;
          cP++;
          sP += pct;
          sAP += Math.abs(pct);
        }
        e2col[i] = e2;
        covered++;
      }
      // Inside the analytic interval: e^2 <= (q sigma)^2 x factor, level by level in a tight loop
      // (NaN where the actual is missing, which compares false). Branch-free: the outcome is
      // random, so a branch would often be mispredicted.
      for (let l = 0; l < L; l++) {
        const row = l * T;
        let n = 0;
        for (let i = i0; i <= iEnd; i++) n += Number(e2col[i]! <= halfWidth2[row + i]! * vcol[i]!);
        inside[l] += n;
      }
    }
    const mae = (sA / c) * unit;
    steps.push({
      step: h,
      origins: c,
      me: c > 0 ? (sE / c) * unit : NaN,
      rmse: c > 0 ? Math.sqrt(sE2 / c) * unit : NaN,
      mae: c > 0 ? mae : NaN,
      mpe: cP > 0 ? sP / cP : NaN,
      mape: cP > 0 ? sAP / cP : NaN,
      mase: c > 0 && scale > 0 ? sA / c / scale : NaN,
    });
    const e = errBuf.subarray(off, off + c);
    if (unit !== 1) for (let j = 0; j < c; j++) e[j] = e[j]! * unit;
    errors.push(e);
  }

  const notes: string[] = [];
  const coverage: MethodBacktest['coverage'] = {};
  if (kinds.includes('analytic')) coverage.analytic = shares(o.levels, inside, covered);
  if (wantEmp && errOrigin)
    coverage.empirical = empiricalCoverage(errors, errOrigin, maxO, o.levels, minErrors);
  if (wantBoot) coverage.bootstrap = shares(o.levels, bootInside, bootTotal);
  const s1 = steps[0]!;
  if (s1.origins === 0)
    notes.push(`The ${methodLabel(method)} method has no backtest origin it could be fitted at.`);
  return {
    method,
    origins: s1.origins,
    me: s1.me,
    rmse: s1.rmse,
    mae: s1.mae,
    mpe: s1.mpe,
    mape: s1.mape,
    mase: s1.mase,
    steps,
    coverage,
    errors,
    notes,
  };
}

function shares(levels: number[], inside: ArrayLike<number>, total: number): Record<string, number> {
  const r: Record<string, number> = {};
  levels.forEach((l, k) => (r[String(l)] = total > 0 ? inside[k]! / total : NaN));
  return r;
}

/**
 * Whether x lies within [Q(a), Q(1 - a)] of a sample, Q the definition-7 quantile, given
 * lt = #{sample < x} and le = #{sample <= x}: the order statistics usually settle it; only when x
 * falls between the two order statistics a quantile interpolates does `exact` compute it.
 */
function within(
  x: number,
  c: number,
  a: number,
  lt: number,
  le: number,
  exact: (c: number, p: number) => number,
): boolean {
  // Lower bound Q(a) = x_(j+1) + g (x_(j+2) - x_(j+1)), 1-based order statistics.
  const pl = (c - 1) * a;
  const jl = Math.floor(pl);
  const gl = pl - jl;
  // x >= x_(k) iff le >= k; x > x_(k) iff lt >= k.
  if (le < jl + 1) return false;
  if (!(le >= (gl > 0 ? jl + 2 : jl + 1)) && x < exact(c, a)) return false;
  const pu = (c - 1) * (1 - a);
  const ju = Math.floor(pu);
  const gu = pu - ju;
  if (lt < ju + 1) return true;
  if (lt >= (gu > 0 ? ju + 2 : ju + 1)) return false;
  return x <= exact(c, 1 - a);
}

/** Errors judged per step by the empirical coverage check, at most (about). */
export const EMPIRICAL_COVERAGE_POINTS = 100;

/** Empirical coverage with only errors known at each origin (see the file comment). */
function empiricalCoverage(
  errors: Float64Array[],
  errOrigin: Int32Array,
  maxO: number,
  levels: number[],
  minErrors: number,
): Record<string, number> {
  const L = levels.length;
  const alphas = levels.map((l) => (1 - l / 100) / 2);
  const inside = new Int32Array(L);
  let total = 0;
  for (let h = 0; h < errors.length; h++) {
    const e = errors[h]!;
    const N = e.length;
    if (N <= minErrors) continue;
    const orig = errOrigin.subarray(h * maxO, h * maxO + N);
    const sorted = sortedCopy(e);
    // Each error's range of positions among the sorted errors: [lowerBound, upperBound).
    const lo = new Int32Array(N);
    const hi = new Int32Array(N);
    for (let j = 0; j < N; j++) {
      lo[j] = lowerBound(sorted, e[j]!);
      hi[j] = upperBound(sorted, e[j]!);
    }
    // Fenwick tree over positions in `sorted`: tree index p + 1 counts inserted errors at p.
    const tree = new Int32Array(N + 1);
    let top = 1;
    while (top * 2 <= N) top *= 2;
    const prefix = (k: number): number => {
      let s = 0;
      for (let q = k; q > 0; q -= q & -q) s += tree[q]!;
      return s;
    };
    const kth = (k: number): number => {
      let pos = 0;
      for (let step = top; step > 0; step >>= 1) {
        const nx = pos + step;
        if (nx <= N && tree[nx]! < k) {
          pos = nx;
          k -= tree[nx]!;
        }
      }
      return sorted[pos]!;
    };
    const exact = (c: number, p: number): number => {
      const pos = (c - 1) * p;
      const j = Math.floor(pos);
      const g = pos - j;
      const lo = kth(j + 1);
      return g === 0 || j + 1 >= c ? lo : lo + g * (kth(j + 2) - lo);
    };
    // Judge at most about EMPIRICAL_COVERAGE_POINTS errors per step, evenly spread over the origins
    // (every error of a short series): the share is a calibration check, and this bounds its cost.
    const stride = Math.max(1, Math.floor(N / EMPIRICAL_COVERAGE_POINTS));
    let known = 0;
    for (let j = 0; j < N; j++) {
      const oj = orig[j]!;
      while (known < j && orig[known]! + h + 1 <= oj) {
        for (let k = lo[known]! + 1; k <= N; k += k & -k) tree[k]!++;
        known++;
      }
      if (known < minErrors || j % stride !== 0) continue;
      const x = e[j]!;
      const lt = prefix(lo[j]!);
      const le = prefix(hi[j]!);
      for (let l = 0; l < L; l++) if (within(x, known, alphas[l]!, lt, le, exact)) inside[l]++;
      total++;
    }
  }
  return shares(levels, inside, total);
}

/** Number of entries < x in an ascending array (branch-free halving: the comparisons are random). */
function lowerBound(a: Float64Array, x: number): number {
  let n = a.length;
  if (n === 0) return 0;
  let base = 0;
  while (n > 1) {
    const half = n >>> 1;
    base += Number(a[base + half - 1]! < x) * half;
    n -= half;
  }
  return base + Number(a[base]! < x);
}

/** Number of entries <= x in an ascending array. */
function upperBound(a: Float64Array, x: number): number {
  let n = a.length;
  if (n === 0) return 0;
  let base = 0;
  while (n > 1) {
    const half = n >>> 1;
    base += Number(a[base + half - 1]! <= x) * half;
    n -= half;
  }
  return base + Number(a[base]! <= x);
}

const EMPTY = new Float64Array(0);

/** Marks (by last training index) at most BOOTSTRAP_ORIGINS origins spread evenly over the backtest. */
function bootstrapPlan(T: number, minTrain: number): Uint8Array {
  const marks = new Uint8Array(T);
  const lo = minTrain;
  const hi = T - 1;
  if (hi < lo) return marks;
  const count = Math.min(BOOTSTRAP_ORIGINS, hi - lo + 1);
  for (let k = 0; k < count; k++) {
    const n = count === 1 ? hi : Math.round(lo + (k * (hi - lo)) / (count - 1));
    marks[n - 1] = 1;
  }
  return marks;
}

/** The simulation spec of a method fitted to y[0..i], from the running state (see simulate.ts). */
function originSpec(
  code: number,
  pool: Float64Array,
  ys: Float64Array,
  i: number,
  m: number,
  wN: number,
  wMean: number,
  dN: number,
  dMean: number,
  first: number,
  last: number,
  latest: Int32Array | null,
): SimSpec {
  const n = code === 0 ? wN : dN;
  const spec: SimSpec = {
    method: code === 0 ? 'mean' : code === 1 ? 'naive' : code === 2 ? 'drift' : 'seasonal-naive',
    pool,
    poolLength: n,
    shift: code === 0 ? wMean : dMean,
    scale: Math.sqrt(n / (n - 1)),
    sigma: NaN, // resampling only: the Gaussian mode is not used here
    level: wMean,
    last: last >= 0 ? ys[last]! : NaN,
    gap: i - last,
    slope: code === 2 ? (ys[last]! - ys[first]!) / (last - first) : 0,
    paramScale: code === 0 ? 1 / Math.sqrt(wN) : code === 2 ? 1 / Math.sqrt(last - first) : 0,
    season: code === 3 ? m : 1,
    base: EMPTY,
    shocks: new Int32Array(0),
  };
  if (code === 3 && latest) {
    const k = new Int32Array(m);
    const base = new Float64Array(m);
    for (let h = 0; h < m; h++) {
      const t = i + h + 1;
      const s0 = latest[t % m]!;
      base[h] = ys[s0]!;
      k[h] = (t - s0) / m;
    }
    spec.base = base;
    spec.shocks = k;
  }
  return spec;
}

/** Counts, per level, the steps whose actual lies inside the paths' interval; returns the steps counted. */
function countInside(
  paths: Float64Array,
  hMax: number,
  ys: Float64Array,
  i: number,
  col: Float64Array,
  alphas: number[],
  inside: Int32Array,
): number {
  const P = col.length;
  let sortedCol = false;
  const exact = (_c: number, p: number): number => {
    if (!sortedCol) {
      col.sort();
      sortedCol = true;
    }
    return sortedQuantile(col, p);
  };
  let total = 0;
  for (let h = 0; h < hMax; h++) {
    const a = ys[i + h + 1]!;
    if (!Number.isFinite(a)) continue;
    let lt = 0;
    let le = 0;
    for (let p = 0; p < P; p++) {
      const v = paths[p * hMax + h]!;
      col[p] = v;
      lt += Number(v < a); // branch-free: the outcome is random
      le += Number(v <= a);
    }
    sortedCol = false;
    for (let l = 0; l < alphas.length; l++) if (within(a, P, alphas[l]!, lt, le, exact)) inside[l]++;
    total++;
  }
  return total;
}
