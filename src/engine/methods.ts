// The four baseline methods, exactly per the conventions table in docs/design.md.
//
// Missing values (NaN; any non-finite value counts as missing):
// - mean: the level, sigma and T in the standard error use the observed values only (n of them);
//   fitted is the level at every time, residuals are NaN where the value is missing.
// - naive and drift: a residual needs the value and the one before it; residuals touching a missing
//   value are NaN and left out of every sum. Forecasts start from the last observed value; when
//   the newest g values are missing the forecast is g + h steps ahead of that value and the standard
//   error counts g + h steps. The drift slope runs from the first to the last observed value,
//   (y_last - y_first) / (last - first), which is the docs/design.md slope when nothing is missing.
// - seasonal naive: a residual needs the value and the one a season before. Each step's forecast is
//   the latest observed value in the same season position; k seasons back gives sigma·sqrt(k).
// sigma-hat always has df = (number of residuals) - 1, which is the docs/design.md df when nothing is
// missing (mean T-1, naive T-2, seasonal naive T-m-1, drift T-2).
//
// Too short: each method needs a sigma with at least 1 degree of freedom, i.e. mean 2 observed
// values, naive and drift 2 one-step differences (3 consecutive values), seasonal naive 2 seasonal
// differences (m + 2 values). Shorter series give a FitFailure with the reason.
import type { Fit, FitFailure, MethodName } from './types.js';
import { fmt, meanAndSquares, present } from './numeric.js';
import { agree, plural } from '../text/index.js';

const LABEL: Record<MethodName, string> = {
  mean: 'mean',
  naive: 'naive',
  'seasonal-naive': 'seasonal naive',
  drift: 'drift',
};

export function methodLabel(m: MethodName): string {
  return LABEL[m];
}

export function isFit(x: Fit | FitFailure): x is Fit {
  return (x as Fit).fitted !== undefined;
}

/** Fits `method` to y (NaN = missing) with season length `season` (1 = none). Never throws. */
export function fitMethod(method: MethodName, y: Float64Array, season: number): Fit | FitFailure {
  const m = Math.floor(season);
  if (!Number.isFinite(season) || season < 1 || m !== season)
    return { method, reason: `The season length must be a whole number of at least 1; got ${season}.` };
  switch (method) {
    case 'mean':
      return fitMean(y, m);
    case 'naive':
      return fitDifference('naive', y, m, 1);
    case 'drift':
      return fitDifference('drift', y, m, 1);
    case 'seasonal-naive':
      return fitDifference('seasonal-naive', y, m, m);
    default:
      return { method, reason: `Unknown method "${String(method)}".` };
  }
}

function countPresent(y: Float64Array): { count: number; first: number; last: number } {
  let count = 0;
  let first = -1;
  let last = -1;
  for (let i = 0; i < y.length; i++) {
    if (present(y[i]!)) {
      count++;
      if (first < 0) first = i;
      last = i;
    }
  }
  return { count, first, last };
}

function missingNote(T: number, count: number, what: string): string[] {
  const miss = T - count;
  return miss > 0 ? [`${miss} of ${T} values are missing: ${what}`] : [];
}

const ZERO_SIGMA =
  'The residuals are all zero (the series does not vary the way this method expects), so sigma is 0 and every interval collapses to the point forecast.';

function fitMean(y: Float64Array, season: number): Fit | FitFailure {
  const T = y.length;
  const { count } = countPresent(y);
  if (count < 2)
    return {
      method: 'mean',
      reason: `The mean method needs at least 2 observed values to estimate sigma; the series has ${count}.`,
    };
  const { mean: level, sd } = meanAndSquares(y);
  const fitted = new Float64Array(T).fill(level);
  const residuals = new Float64Array(T);
  for (let i = 0; i < T; i++) residuals[i] = present(y[i]!) ? y[i]! - level : NaN;
  const df = count - 1;
  const sigma = sd(df);
  const notes = missingNote(
    T,
    count,
    `the mean uses the ${count} observed values (n = ${count} in the standard error).`,
  );
  if (sigma === 0) notes.push(ZERO_SIGMA);
  const se = sigma * Math.sqrt(1 + 1 / count);
  return {
    method: 'mean',
    season,
    n: T,
    fitted,
    residuals,
    residualCount: count,
    sigma,
    sigmaDf: df,
    parameters: 1,
    coefficients: { level, observations: count },
    mean: (h) => new Float64Array(Math.max(0, h)).fill(level),
    standardError: (h) => new Float64Array(Math.max(0, h)).fill(se),
    notes,
  };
}

/** naive (lag 1), drift (lag 1, minus the slope) and seasonal naive (lag m). */
function fitDifference(
  method: Exclude<MethodName, 'mean'>,
  y: Float64Array,
  season: number,
  lag: number,
): Fit | FitFailure {
  const T = y.length;
  const { count, first, last } = countPresent(y);
  const fitted = new Float64Array(T).fill(NaN);
  const residuals = new Float64Array(T).fill(NaN);
  let nres = 0;
  for (let i = lag; i < T; i++) {
    const a = y[i]!;
    const b = y[i - lag]!;
    if (present(b)) fitted[i] = b;
    if (present(a) && present(b)) {
      residuals[i] = a - b;
      nres++;
    }
  }
  if (nres < 2) {
    const need =
      method === 'seasonal-naive'
        ? `at least 2 pairs of observed values one season (${season}) apart, i.e. ${season + 2} values without gaps`
        : 'at least 2 pairs of consecutive observed values, i.e. 3 values without gaps';
    return {
      method,
      reason: `The ${LABEL[method]} method needs ${need} to estimate sigma; the series has ${plural(nres, 'such pair', 'such pairs')} (${count} observed of ${T}).`,
    };
  }
  const df = nres - 1;
  const gap = T - 1 - last;
  const notes: string[] = [];
  const coefficients: Record<string, number> = { last: y[last]!, gap };
  let sigma: number;
  let point: (h: number) => Float64Array;
  let stderr: (h: number) => Float64Array;

  if (method === 'drift') {
    const span = last - first;
    const slope = (y[last]! - y[first]!) / span;
    for (let i = 1; i < T; i++) {
      if (present(fitted[i]!)) fitted[i] = fitted[i]! + slope;
      if (present(residuals[i]!)) residuals[i] = residuals[i]! - slope;
    }
    // sqrt(sum e^2 / df): squares about zero, not about the residuals' own mean (docs/design.md).
    sigma = meanAndSquares(residuals, 0).sd(df);
    coefficients.slope = slope;
    coefficients.span = span;
    const s = sigma;
    point = (H) => {
      const out = new Float64Array(Math.max(0, H));
      for (let h = 1; h <= H; h++) out[h - 1] = y[last]! + (h + gap) * slope;
      return out;
    };
    stderr = (H) => {
      const out = new Float64Array(Math.max(0, H));
      for (let h = 1; h <= H; h++) {
        const k = h + gap;
        out[h - 1] = s * Math.sqrt(k * (1 + k / span));
      }
      return out;
    };
    notes.push(
      ...missingNote(
        T,
        count,
        `residuals touching a missing value are left out; the slope runs from the first to the last observed value; forecasts start from the last observed value.`,
      ),
    );
  } else {
    sigma = meanAndSquares(residuals).sd(df);
    const s = sigma;
    if (method === 'naive') {
      point = (H) => new Float64Array(Math.max(0, H)).fill(y[last]!);
      stderr = (H) => {
        const out = new Float64Array(Math.max(0, H));
        for (let h = 1; h <= H; h++) out[h - 1] = s * Math.sqrt(h + gap);
        return out;
      };
      notes.push(
        ...missingNote(
          T,
          count,
          'residuals touching a missing value are left out; forecasts start from the last observed value.',
        ),
      );
    } else {
      // Latest observed index in each season position (phase = index mod m).
      const m = season;
      const latest = new Int32Array(m).fill(-1);
      for (let i = 0; i < T; i++) if (present(y[i]!)) latest[i % m] = i;
      const empty: number[] = [];
      for (let p = 0; p < m; p++) if (latest[p]! < 0) empty.push(p);
      if (empty.length > 0)
        return {
          method,
          reason: `The seasonal naive method needs an observed value in every season position; ${agree(empty.length, 'position')} ${empty.slice(0, 5).join(', ')} ${agree(empty.length, 'has', 'have')} none.`,
        };
      const source = (h: number): { index: number; k: number } => {
        const t = T - 1 + h;
        const s0 = latest[t % m]!;
        return { index: s0, k: (t - s0) / m };
      };
      point = (H) => {
        const out = new Float64Array(Math.max(0, H));
        for (let h = 1; h <= H; h++) out[h - 1] = y[source(h).index]!;
        return out;
      };
      stderr = (H) => {
        const out = new Float64Array(Math.max(0, H));
        for (let h = 1; h <= H; h++) out[h - 1] = s * Math.sqrt(source(h).k);
        return out;
      };
      notes.push(
        ...missingNote(
          T,
          count,
          'residuals touching a missing value are left out; each step is forecast from the latest observed value in its season position.',
        ),
      );
    }
  }
  if (sigma === 0) notes.push(ZERO_SIGMA);
  return {
    method,
    season,
    n: T,
    fitted,
    residuals,
    residualCount: nres,
    sigma,
    sigmaDf: df,
    parameters: method === 'drift' ? 1 : 0,
    coefficients,
    mean: point,
    standardError: stderr,
    notes,
  };
}

/** Plain description of a fitted method, e.g. "drift (slope 0.52 per step)". */
export function describeFit(f: Fit): string {
  if (f.method === 'drift') return `drift (slope ${fmt(f.coefficients.slope!)} per step)`;
  if (f.method === 'mean') return `mean (level ${fmt(f.coefficients.level!)})`;
  if (f.method === 'seasonal-naive') return `seasonal naive (season ${f.season})`;
  return 'naive';
}
