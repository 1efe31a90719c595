// Future sample paths through each method's own recursion.
//
// Shocks are either resampled residuals ('bootstrap') or Gaussian draws with sd sigma-hat
// ('gaussian'). Bootstrap shocks are drawn from the one-step residuals, centred on their mean and
// rescaled by sqrt(count / df) so that their variance is sigma-hat^2 (the usual correction for the
// degrees of freedom used up by the fit). Recursions, with e* a shock:
// - mean:           y*_{T+h} = level* + e*_h
// - naive:          y*_{T+h} = y*_{T+h-1} + e*_h, from the last observed value
// - drift:          y*_{T+h} = y*_{T+h-1} + slope* + e*_h, from the last observed value
// - seasonal naive: y*_{T+h} = y*_{T+h-m} + e*_h, from the latest observed value in each position
// Missing newest values are simulated over too (the path starts at the last observed value). The
// estimated parameters carry their own uncertainty, as in the analytic standard errors: each path
// draws level* = level + e*_0/sqrt(n) (mean) or slope* = slope + e*_0/sqrt(last - first) (drift) with
// one extra shock, so path variances match sigma^2(1 + 1/T) and sigma^2 h(1 + h/(T-1)).
// sigma-hat carries its own uncertainty too: each path scales all its shocks by one draw of
// sqrt(df / X), X ~ chi-square(df) with df the sigma-hat df (the sampling distribution of
// sigma-hat^2 / sigma^2 for Gaussian errors, inverted), so a Gaussian path's steps are Student-t
// with df degrees of freedom, as the analytic intervals are, and short histories give wider paths.
// The chi-square draw is a gamma(df/2, 2) draw by Marsaglia & Tsang (2000).
import type { Fit } from './types.js';
import { createRandom, type Random } from './random.js';

/** Everything a simulation needs; built from a Fit, or from the backtest's running state. */
export interface SimSpec {
  method: Fit['method'];
  /** Shocks are (pool[j] - shift) * scale for j uniform in 0..poolLength-1. */
  pool: Float64Array;
  poolLength: number;
  shift: number;
  scale: number;
  sigma: number;
  level: number;
  last: number;
  gap: number;
  slope: number;
  paramScale: number;
  /** sigma-hat df for the per-path scale draw (see the file comment); 0 or absent = sigma held fixed. */
  df?: number;
  season: number;
  /** seasonal naive: source value and number of shocks for steps 1..m. */
  base: Float64Array;
  shocks: Int32Array;
}

function specOf(fit: Fit): SimSpec {
  const r = fit.residuals;
  let c = 0;
  let s = 0;
  for (let i = 0; i < r.length; i++) {
    const x = r[i]!;
    if (Number.isFinite(x)) {
      c++;
      s += x;
    }
  }
  const pool = new Float64Array(c);
  let j = 0;
  for (let i = 0; i < r.length; i++) {
    const x = r[i]!;
    if (Number.isFinite(x)) pool[j++] = x;
  }
  const co = fit.coefficients;
  const m = fit.method === 'seasonal-naive' ? fit.season : 1;
  const spec: SimSpec = {
    method: fit.method,
    pool,
    poolLength: c,
    shift: c > 0 ? s / c : 0,
    scale: fit.sigmaDf > 0 && c > 0 ? Math.sqrt(c / fit.sigmaDf) : 1,
    sigma: fit.sigma,
    level: co.level ?? NaN,
    last: co.last ?? NaN,
    gap: co.gap ?? 0,
    slope: co.slope ?? 0,
    paramScale:
      fit.method === 'mean'
        ? 1 / Math.sqrt(co.observations ?? fit.residualCount)
        : fit.method === 'drift'
          ? 1 / Math.sqrt(co.span ?? fit.residualCount)
          : 0,
    df: fit.sigmaDf,
    season: m,
    base: new Float64Array(0),
    shocks: new Int32Array(0),
  };
  if (fit.method === 'seasonal-naive') {
    spec.base = fit.mean(m);
    const se = fit.standardError(m);
    spec.shocks = new Int32Array(m);
    // se_h = sigma sqrt(k_h): recover the number of seasons k_h back to the source value.
    for (let h = 0; h < m; h++)
      spec.shocks[h] = fit.sigma > 0 ? Math.max(1, Math.round((se[h]! / fit.sigma) ** 2)) : 1;
  }
  return spec;
}

/**
 * nPaths simulated futures of `fit` over steps 1..horizon, row-major (path p, step h at
 * p * horizon + h - 1), from a generator seeded with `seed`. Same seed, same paths.
 */
export function simulatePaths(
  fit: Fit,
  horizon: number,
  nPaths: number,
  seed: number,
  mode: 'bootstrap' | 'gaussian',
): Float64Array {
  const H = Math.max(0, Math.floor(horizon));
  const P = Math.max(0, Math.floor(nPaths));
  const out = new Float64Array(P * H);
  if (H === 0 || P === 0) return out;
  simulateInto(out, specOf(fit), H, P, createRandom(seed), mode);
  return out;
}

/** Shocks each path draws: the parameter draw, the missing newest values, and the steps. */
function shocksPerPath(spec: SimSpec, H: number): number {
  if (spec.method === 'mean') return 1 + H;
  if (spec.method === 'naive') return spec.gap + H;
  if (spec.method === 'drift') return 1 + spec.gap + H;
  let n = Math.max(0, H - spec.season);
  for (let h = 0; h < Math.min(H, spec.season); h++) n += spec.shocks[h]!;
  return n;
}

/** Simulates into `out` (row-major P x H) from a spec, drawing from `rnd`. */
export function simulateInto(
  out: Float64Array,
  spec: SimSpec,
  H: number,
  P: number,
  rnd: Random,
  mode: 'bootstrap' | 'gaussian',
): void {
  const { pool, poolLength: len, shift, scale } = spec;
  const boot = mode === 'bootstrap' && len > 0;
  const sigma = Number.isFinite(spec.sigma) ? spec.sigma : 0;
  // Each path's shocks are drawn first, in the order the recursion uses them. Bootstrap: shock j is
  // pool[floor(u_j len / 2^32)] (the value rnd.int(len) would pick), centred and rescaled.
  const per = shocksPerPath(spec, H);
  const u = new Uint32Array(boot ? per : 0);
  const sh = new Float64Array(per);
  const ratio = len / 4294967296;
  const { method, gap, paramScale } = spec;
  const m = spec.season;
  const df = spec.df !== undefined && spec.df > 0 && Number.isFinite(spec.df) ? spec.df : 0;
  for (let p = 0; p < P; p++) {
    const row = p * H;
    const f = df > 0 ? Math.sqrt(df / chiSquareDraw(rnd, df)) : 1;
    if (boot) {
      rnd.fill(u);
      const sc = scale * f;
      for (let k = 0; k < per; k++) sh[k] = (pool[Math.floor(u[k]! * ratio)]! - shift) * sc;
    } else {
      const sd = sigma * f;
      for (let k = 0; k < per; k++) sh[k] = sd * rnd.normal();
    }
    let j = 0;
    if (method === 'mean') {
      const level = spec.level + paramScale * sh[j++]!;
      for (let h = 0; h < H; h++) out[row + h] = level + sh[j++]!;
    } else if (method === 'naive' || method === 'drift') {
      const slope = method === 'drift' ? spec.slope + paramScale * sh[j++]! : 0;
      let v = spec.last;
      for (let g = 0; g < gap; g++) v += slope + sh[j++]!;
      for (let h = 0; h < H; h++) {
        v += slope + sh[j++]!;
        out[row + h] = v;
      }
    } else {
      for (let h = 0; h < H; h++) {
        if (h < m) {
          let v = spec.base[h]!;
          for (let k = spec.shocks[h]!; k > 0; k--) v += sh[j++]!;
          out[row + h] = v;
        } else out[row + h] = out[row + h - m]! + sh[j++]!;
      }
    }
  }
}

/**
 * A chi-square draw with k > 0 degrees of freedom: 2 x gamma(k/2), the gamma draw by Marsaglia &
 * Tsang (2000), "A simple method for generating gamma variables", with the boost
 * gamma(a) = gamma(a + 1) U^(1/a) for shape a < 1.
 */
export function chiSquareDraw(rnd: Random, k: number): number {
  let a = k / 2;
  let boost = 1;
  if (a < 1) {
    boost = Math.pow(1 - rnd.uniform(), 1 / a);
    a += 1;
  }
  const d = a - 1 / 3;
  const c = 1 / Math.sqrt(9 * d);
  for (;;) {
    const x = rnd.normal();
    const t = 1 + c * x;
    if (t <= 0) continue;
    const v = t * t * t;
    const u = 1 - rnd.uniform(); // in (0, 1]
    const x2 = x * x;
    if (u < 1 - 0.0331 * x2 * x2 || Math.log(u) < 0.5 * x2 + d * (1 - v + Math.log(v)))
      return 2 * d * v * boost;
  }
}
