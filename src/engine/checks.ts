// Residual checks on a fitted method.
//
// The residuals used are the non-missing ones in time order (a gap simply joins the residuals on
// either side). n below is their number.
// - ACF: r_k = sum_{t=1..n-k} (e_t - ebar)(e_{t+k} - ebar) / sum_t (e_t - ebar)^2, k = 1..L.
// - Ljung–Box (Ljung & Box 1978): Q = n(n+2) sum_{k=1..L} r_k^2 / (n-k), df = L - K with K the
//   method's estimated parameters; p = 1 - F_chi2(Q; df). L defaults to defaultLags(T, m) and is
//   cut to n - 1 and raised to K + 1 when needed so that df >= 1.
// - Bias: one-sample t-test of the mean residual, t = ebar / (s / sqrt(n)), n - 1 df, two-sided.
//   The mean method's residuals, and the drift method's when no value is missing, sum to zero
//   exactly (the drift residuals telescope), so bias is reported as zero by construction there.
// - Normality: Jarque–Bera (Jarque & Bera 1980), JB = n/6 (S^2 + (K - 3)^2 / 4) with S = m3/m2^1.5
//   the skewness and K = m4/m2^2 the kurtosis (3 for a normal; central moments with divisor n);
//   p = 1 - F_chi2(JB; 2).
// - Changing spread: a Goldfeld–Quandt-style F test (Goldfeld & Quandt 1965) comparing the sample
//   variance of the last third of the residuals with that of the first third (the middle third left
//   out), F = s_last^2 / s_first^2 with (n3 - 1, n1 - 1) df, two-sided p = 2 min(F_F, 1 - F_F).
// Tests with zero residual variance (a constant series) or too few residuals are not computed:
// statistic and p are NaN, ok is true, and the finding says why.
import { chiSquareCdf, fCdf, tCdf } from './dist.js';
import { fmt, fmtP, meanAndSquares, powerOfTwoBelow } from './numeric.js';
import { methodLabel } from './methods.js';
import type { Fit, ResidualChecks, TestResult } from './types.js';

/** Default Ljung–Box lags (docs/design.md): min(10, floor(T/5)) without a season, min(2m, floor(T/5)) with one; at least 1. */
export function defaultLags(n: number, season: number): number {
  const fifth = Math.floor(n / 5);
  const cap = season > 1 ? 2 * Math.floor(season) : 10;
  return Math.max(1, Math.min(cap, fifth));
}

const ALPHA = 0.05;

function notComputed(name: string, why: string, df: number | null = null): TestResult {
  return { name, statistic: NaN, df, pValue: NaN, ok: true, finding: `${name} not computed: ${why}` };
}

export function runResidualTests(fit: Fit, lags?: number): ResidualChecks {
  const all = fit.residuals;
  let n = 0;
  for (let i = 0; i < all.length; i++) if (Number.isFinite(all[i]!)) n++;
  const e = new Float64Array(n);
  for (let i = 0, j = 0; i < all.length; i++) if (Number.isFinite(all[i]!)) e[j++] = all[i]!;
  const { mean, ss, sd } = meanAndSquares(e);
  // Deviations scaled by a power of two so huge and tiny residuals neither overflow nor underflow.
  let big = 0;
  for (let i = 0; i < n; i++) big = Math.max(big, Math.abs(e[i]! - mean));
  const k = big > 0 && Number.isFinite(big) ? powerOfTwoBelow(big) : 1;
  const d = new Float64Array(n);
  for (let i = 0; i < n; i++) d[i] = (e[i]! - mean) / k;
  const constant = !(ss > 0);
  const label = methodLabel(fit.method);
  const K = fit.parameters;

  // ACF and Ljung–Box.
  let L = Math.floor(lags ?? defaultLags(fit.n, fit.season));
  L = Math.min(Math.max(L, K + 1), n - 1);
  const acf: number[] = [];
  let ljungBox: ResidualChecks['ljungBox'];
  if (constant || L < 1 || L - K < 1) {
    ljungBox = {
      ...notComputed(
        'Ljung–Box',
        constant ? 'the residuals are all equal (sigma 0).' : `too few residuals (${n}) for any lag.`,
        Math.max(0, L - K),
      ),
      lags: Math.max(0, L),
    };
    for (let j = 1; j <= Math.max(0, L); j++) acf.push(NaN);
  } else {
    let c0 = 0;
    for (let i = 0; i < n; i++) c0 += d[i]! * d[i]!;
    let q = 0;
    for (let lag = 1; lag <= L; lag++) {
      let c = 0;
      for (let i = 0; i + lag < n; i++) c += d[i]! * d[i + lag]!;
      const r = c / c0;
      acf.push(r);
      q += (r * r) / (n - lag);
    }
    q *= n * (n + 2);
    const df = L - K;
    const p = 1 - chiSquareCdf(q, df);
    const ok = !(p < ALPHA);
    ljungBox = {
      name: 'Ljung–Box',
      statistic: q,
      df,
      pValue: p,
      ok,
      lags: L,
      finding: ok
        ? `No autocorrelation detected in the residuals (Ljung–Box Q = ${fmt(q)} over ${L} lags, df ${df}, ${fmtP(p)}).`
        : `The residuals are autocorrelated (Ljung–Box Q = ${fmt(q)} over ${L} lags, df ${df}, ${fmtP(p)}): the ${label} method leaves a pattern unexplained, so the intervals are likely too narrow and neighbouring alarms are not independent.`,
    };
  }

  // Bias.
  const zero = fit.method === 'mean' || (fit.method === 'drift' && noInnerGap(fit));
  let bias: ResidualChecks['bias'];
  if (zero) {
    bias = {
      name: 'bias t-test',
      statistic: 0,
      df: n - 1,
      pValue: 1,
      ok: true,
      mean: 0,
      zeroByConstruction: true,
      finding: `The mean residual is zero by construction for the ${label} method, so bias is not tested.`,
    };
  } else if (constant || n < 2) {
    bias = {
      ...notComputed(
        'bias t-test',
        constant ? 'the residuals are all equal (sigma 0).' : 'fewer than 2 residuals.',
        n - 1,
      ),
      mean,
      zeroByConstruction: false,
      finding: constant
        ? `The residuals are all equal to ${fmt(mean)}, so the bias t-test is not computed${mean !== 0 ? `; the forecasts are off by exactly that amount` : ''}.`
        : 'bias t-test not computed: fewer than 2 residuals.',
      ok: mean === 0 || !constant,
    };
  } else {
    const s = sd(n - 1);
    const t = mean / (s / Math.sqrt(n));
    const p = Math.min(1, 2 * tCdf(-Math.abs(t), n - 1));
    const ok = !(p < ALPHA);
    bias = {
      name: 'bias t-test',
      statistic: t,
      df: n - 1,
      pValue: p,
      ok,
      mean,
      zeroByConstruction: false,
      finding: ok
        ? `No bias detected: the mean residual ${fmt(mean)} is consistent with zero (t = ${fmt(t)}, df ${n - 1}, ${fmtP(p)}).`
        : `The residuals average ${fmt(mean)}, not zero (t = ${fmt(t)}, df ${n - 1}, ${fmtP(p)}): the one-step forecasts run ${mean > 0 ? 'low' : 'high'} by about that much${fit.method === 'naive' || fit.method === 'seasonal-naive' ? ', which a trend would explain (the drift method allows for one)' : ''}, and intervals centred on them are off-centre.`,
    };
  }

  // Normality (Jarque–Bera).
  let normality: ResidualChecks['normality'];
  if (constant || n < 3) {
    normality = {
      ...notComputed(
        'Jarque–Bera',
        constant ? 'the residuals are all equal (sigma 0).' : 'fewer than 3 residuals.',
        2,
      ),
      skewness: NaN,
      kurtosis: NaN,
    };
  } else {
    let m2 = 0;
    let m3 = 0;
    let m4 = 0;
    for (let i = 0; i < n; i++) {
      const x = d[i]!;
      const x2 = x * x;
      m2 += x2;
      m3 += x2 * x;
      m4 += x2 * x2;
    }
    m2 /= n;
    m3 /= n;
    m4 /= n;
    const S = m3 / Math.pow(m2, 1.5);
    const Ku = m4 / (m2 * m2);
    const jb = (n / 6) * (S * S + ((Ku - 3) * (Ku - 3)) / 4);
    const p = 1 - chiSquareCdf(jb, 2);
    const ok = !(p < ALPHA);
    normality = {
      name: 'Jarque–Bera',
      statistic: jb,
      df: 2,
      pValue: p,
      ok,
      skewness: S,
      kurtosis: Ku,
      finding: ok
        ? `The residuals are consistent with a normal distribution (Jarque–Bera = ${fmt(jb)}, ${fmtP(p)}; skewness ${fmt(S, 2)}, kurtosis ${fmt(Ku, 3)}).`
        : `The residuals are not normal (Jarque–Bera = ${fmt(jb)}, ${fmtP(p)}; skewness ${fmt(S, 2)}, kurtosis ${fmt(Ku, 3)} against 3 for a normal): Student-t intervals may misstate the tails${Ku > 3 ? ' (heavy tails make extreme values commoner than they allow)' : ''}; bootstrap and empirical intervals do not assume normality.`,
    };
  }

  // Changing spread: Goldfeld–Quandt-style F, last third against first third.
  const third = Math.floor(n / 3);
  const spreadName = 'Goldfeld–Quandt F';
  let spread: TestResult;
  if (constant || third < 3) {
    spread = notComputed(
      spreadName,
      constant
        ? 'the residuals are all equal (sigma 0).'
        : `too few residuals (${n}; at least 9 are needed).`,
    );
  } else {
    const first = meanAndSquares(e.subarray(0, third));
    const last = meanAndSquares(e.subarray(n - third));
    const df1 = third - 1;
    const s1 = first.sd(df1);
    const s3 = last.sd(df1);
    const v1 = s1 * s1;
    const v3 = s3 * s3;
    const F = (s3 / s1) * (s3 / s1);
    if (!(v1 > 0) || !Number.isFinite(F)) {
      spread = {
        ...notComputed(spreadName, 'the first third of the residuals has no spread at all.', df1),
        ok: !(v3 > 0),
        finding:
          v3 > 0
            ? `The residuals do not vary at all in the first third of the series but do in the last: the spread has grown, so intervals built from the whole history are too narrow now.`
            : `${spreadName} not computed: the residuals do not vary in the first and last thirds.`,
      };
    } else {
      const c = fCdf(F, df1, df1);
      const p = Math.min(1, 2 * Math.min(c, 1 - c));
      const ok = !(p < ALPHA);
      spread = {
        name: spreadName,
        statistic: F,
        df: df1,
        pValue: p,
        ok,
        finding: ok
          ? `No change in the spread of the residuals detected (Goldfeld–Quandt F = ${fmt(F)}, variance of the last third over the first, df ${df1} and ${df1}, ${fmtP(p)}).`
          : `The spread of the residuals ${F > 1 ? 'grows' : 'shrinks'} over time (Goldfeld–Quandt F = ${fmt(F)}, variance of the last third over the first, df ${df1} and ${df1}, ${fmtP(p)}): intervals use one sigma for the whole history, so they are likely too ${F > 1 ? 'narrow' : 'wide'} for the next observations.`,
      };
    }
  }

  return { acf, acfBound: n > 0 ? 1.96 / Math.sqrt(n) : NaN, ljungBox, bias, normality, spread };
}

/** True when the drift residuals run without a gap from the first to the last observed value. */
function noInnerGap(fit: Fit): boolean {
  const span = fit.coefficients.span;
  return span !== undefined && fit.residualCount === span;
}
