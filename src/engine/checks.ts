// Residual checks on a fitted method.
//
// The residuals used are the non-missing ones in time order (a gap simply joins the residuals on
// either side). n below is their number.
// - ACF: r_k = sum_{t=1..n-k} (e_t - ebar)(e_{t+k} - ebar) / sum_t (e_t - ebar)^2, k = 1..L.
// - Ljung–Box (Ljung & Box 1978): Q = n(n+2) sum_{k=1..L} r_k^2 / (n-k), df = L for all four
//   baselines; p = 1 - F_chi2(Q; df). No ARMA coefficient is estimated: removing a mean (mean) or
//   the mean difference (drift) does not use up a degree of freedom, since r_k is already taken
//   about the residual mean. L defaults to defaultLags(T, m) and is cut to n - 1.
// - Bias: one-sample t-test of the mean residual, t = ebar / (s / sqrt(n)), n - 1 df, two-sided.
//   The mean method's residuals, and the drift method's when no value is missing, sum to zero
//   exactly (the drift residuals telescope), so bias is reported as zero by construction there.
// - Normality: Jarque–Bera (Jarque & Bera 1980), JB = n/6 (S^2 + (K - 3)^2 / 4) with S = m3/m2^1.5
//   the skewness and K = m4/m2^2 the kurtosis (3 for a normal; central moments with divisor n);
//   p = 1 - F_chi2(JB; 2).
// - Changing spread: the Brown–Forsythe test (Brown & Forsythe 1974; Levene's test centred on the
//   median), robust to heavy tails, on the first and last thirds of the residuals (the middle third
//   left out): z = |e - median of its third|, F = (N - 2) n1 n3 (zbar_3 - zbar_1)^2 / (N SSW) with
//   SSW the within-third sum of squares of z (one-way ANOVA of z over the two thirds), df (1, N - 2),
//   N = n1 + n3, p = 1 - F_F(F; 1, N - 2). The direction is the sign of zbar_3 - zbar_1.
// Tests with zero residual variance (a constant series) or too few residuals are not computed (fewer
// than MIN_CHECK_RESIDUALS residuals: no check is computed; common practice, a rule of thumb, not a
// published cut-off: below about ten residuals the tests have almost no power and the Ljung–Box and
// Jarque–Bera p-values, being asymptotic, are not trustworthy):
// statistic and p are NaN, ok is true, and the finding says why. So is a test whose statistic or
// p-value comes out not finite (residuals beyond double-precision range): it is never reported as passed.
//
// The four tests form one family per series: a clean series would fail at least one of four 5%
// tests about 15-19% of the time. Holm's step-down procedure (Holm 1979) controls the chance of any
// false flag at 5%: with the m computed p-values sorted, p_(i) adjusted = max_{j<=i} min(1,
// (m - j + 1) p_(j)); a test is flagged (ok false) when its adjusted p is below 0.05. A flag is a
// caveat about the model (its intervals may be off), not a finding about the newest data.
import { chiSquareCdf, fCdf, tCdf } from './dist.js';
import { fmt, meanAndSquares, powerOfTwoBelow, sortAscending, sortedQuantile } from './numeric.js';
import { methodLabel } from './methods.js';
import type { Fit, ResidualChecks, TestResult } from './types.js';
import { pIs, plural } from '../text/index.js';

/** Default Ljung–Box lags (docs/design.md): min(10, floor(T/5)) without a season, min(2m, floor(T/5)) with one; at least 1. */
export function defaultLags(n: number, season: number): number {
  const fifth = Math.floor(n / 5);
  const cap = season > 1 ? 2 * Math.floor(season) : 10;
  return Math.max(1, Math.min(cap, fifth));
}

const ALPHA = 0.05;

/**
 * Fewest residuals the checks are computed on; with fewer, every check is "not computed" and a series
 * judged on them is too short to call steady (src/verdict.ts).
 */
export const MIN_CHECK_RESIDUALS = 10;

function notComputed(name: string, why: string, df: number | null = null): TestResult {
  return {
    name,
    statistic: NaN,
    df,
    pValue: NaN,
    adjustedP: NaN,
    ok: true,
    finding: `${name} not computed: ${why}`,
  };
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
  const family: Pending[] = [];

  // ACF and Ljung–Box.
  let L = Math.floor(lags ?? defaultLags(fit.n, fit.season));
  L = Math.min(Math.max(L, 1), n - 1);
  const acf: number[] = [];
  let ljungBox: ResidualChecks['ljungBox'];
  if (constant || L < 1) {
    ljungBox = {
      ...notComputed(
        'Ljung–Box',
        constant ? 'the residuals are all equal (sigma 0).' : `too few residuals (${n}) for any lag.`,
        Math.max(0, L),
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
    const df = L;
    const p = 1 - chiSquareCdf(q, df);
    ljungBox = {
      name: 'Ljung–Box',
      statistic: q,
      df,
      pValue: p,
      adjustedP: p,
      ok: true,
      lags: L,
      finding: '',
    };
    family.push({
      test: ljungBox,
      good: () =>
        `No autocorrelation detected in the residuals (Ljung–Box Q = ${fmt(q)} over ${L} lags, df ${df}, ${pIs(p)})`,
      bad: () =>
        `The residuals are autocorrelated (Ljung–Box Q = ${fmt(q)} over ${L} lags, df ${df}, ${pIs(p)}): the ${label} method leaves a pattern unexplained, so the intervals are likely too narrow and neighbouring alarms are not independent`,
    });
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
      adjustedP: 1,
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
    bias = {
      name: 'bias t-test',
      statistic: t,
      df: n - 1,
      pValue: p,
      adjustedP: p,
      ok: true,
      mean,
      zeroByConstruction: false,
      finding: '',
    };
    family.push({
      test: bias,
      good: () =>
        `No bias detected: the mean residual ${fmt(mean)} is consistent with zero (t = ${fmt(t)}, df ${n - 1}, ${pIs(p)})`,
      bad: () =>
        `The residuals average ${fmt(mean)}, not zero (t = ${fmt(t)}, df ${n - 1}, ${pIs(p)}): the one-step forecasts run ${mean > 0 ? 'low' : 'high'} by about that much${fit.method === 'naive' || fit.method === 'seasonal-naive' ? ', which a trend would explain (the drift method allows for one)' : ''}, and intervals centred on them are off-centre`,
    });
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
    normality = {
      name: 'Jarque–Bera',
      statistic: jb,
      df: 2,
      pValue: p,
      adjustedP: p,
      ok: true,
      skewness: S,
      kurtosis: Ku,
      finding: '',
    };
    family.push({
      test: normality,
      good: () =>
        `The residuals are consistent with a normal distribution (Jarque–Bera = ${fmt(jb)}, ${pIs(p)}; skewness ${fmt(S, 2)}, kurtosis ${fmt(Ku, 3)})`,
      bad: () =>
        `The residuals are not normal (Jarque–Bera = ${fmt(jb)}, ${pIs(p)}; skewness ${fmt(S, 2)}, kurtosis ${fmt(Ku, 3)} against 3 for a normal): Student-t intervals may misstate the tails${Ku > 3 ? ' (heavy tails make extreme values commoner than they allow)' : ''}; bootstrap and empirical intervals do not assume normality`,
    });
  }

  // Changing spread: Brown–Forsythe, last third against first third.
  const third = Math.floor(n / 3);
  const spreadName = 'Brown–Forsythe';
  let spread: TestResult;
  if (constant || third < 3) {
    spread = notComputed(
      spreadName,
      constant
        ? 'the residuals are all equal (sigma 0).'
        : `too few residuals (${n}; at least 9 are needed).`,
    );
  } else {
    const bf = brownForsythe(d.subarray(0, third), d.subarray(n - third));
    const df2 = 2 * third - 2;
    if (!Number.isFinite(bf.first) || !Number.isFinite(bf.last) || !Number.isFinite(bf.ssw)) {
      spread = notComputed(spreadName, NOT_FINITE, df2);
    } else if (!(bf.ssw > 0)) {
      // Every residual of each third sits at the same distance from its third's median.
      const grown = bf.last > bf.first;
      spread = {
        ...notComputed(spreadName, 'the first and last thirds of the residuals do not vary in spread.', df2),
        ok: bf.last === bf.first,
        finding:
          bf.last === bf.first
            ? `${spreadName} not computed: the residuals of the first and last thirds spread exactly alike.`
            : `The residuals of each third sit at one distance from its median, ${fmt(bf.first * k)} in the first third and ${fmt(bf.last * k)} in the last: the spread has ${grown ? 'grown' : 'shrunk'}, so intervals built from the whole history are too ${grown ? 'narrow' : 'wide'} now.`,
      };
    } else {
      const F = bf.statistic;
      const p = 1 - fCdf(F, 1, df2);
      const grows = bf.last > bf.first;
      const words = (): string =>
        `Brown–Forsythe F = ${fmt(F)}, absolute deviations from the median in the last third against the first, df 1 and ${df2}, ${pIs(p)}`;
      spread = { name: spreadName, statistic: F, df: df2, pValue: p, adjustedP: p, ok: true, finding: '' };
      family.push({
        test: spread,
        good: () => `No change in the spread of the residuals detected (${words()})`,
        bad: () =>
          `The spread of the residuals ${grows ? 'grows' : 'shrinks'} over time (${words()}): intervals use one sigma for the whole history, so they are likely too ${grows ? 'narrow' : 'wide'} for the next observations`,
      });
    }
  }

  const computed = n < MIN_CHECK_RESIDUALS ? tooFew(family, n) : finiteOnly(family);
  const flagged = holm(computed);
  return {
    acf,
    acfBound: n > 0 ? 1.96 / Math.sqrt(n) : NaN,
    ljungBox,
    bias,
    normality,
    spread,
    family: computed.length,
    caveat: flagged || [ljungBox, bias, normality, spread].some((t) => !t.ok),
    residuals: n,
  };
}

const NOT_FINITE =
  'the residuals are too large for double-precision arithmetic (the statistic is not finite).';

/** Fewer than MIN_CHECK_RESIDUALS residuals: every test of the family "not computed" (the ACF stays, as a description). */
function tooFew(family: Pending[], n: number): Pending[] {
  const why = `${plural(n, 'residual')}; at least ${MIN_CHECK_RESIDUALS} are needed.`;
  for (const { test } of family) Object.assign(test, notComputed(test.name, why, test.df));
  return [];
}

/** Turns each test whose statistic or p-value is not finite into "not computed"; returns the rest. */
function finiteOnly(family: Pending[]): Pending[] {
  return family.filter(({ test }) => {
    if (Number.isFinite(test.statistic) && Number.isFinite(test.pValue)) return true;
    Object.assign(test, notComputed(test.name, NOT_FINITE, test.df));
    return false;
  });
}

/** A computed test and its finding either way, written only for the way Holm decides. */
interface Pending {
  test: TestResult;
  good: () => string;
  bad: () => string;
}

/**
 * Holm's step-down adjustment over the family's p-values (see the file comment); sets each test's
 * adjustedP, ok and finding. Returns true when any test is flagged.
 */
function holm(family: Pending[]): boolean {
  const m = family.length;
  const order = family.map((_, i) => i).sort((a, b) => family[a]!.test.pValue - family[b]!.test.pValue);
  let running = 0;
  let any = false;
  order.forEach((idx, rank) => {
    const t = family[idx]!;
    running = Math.max(running, Math.min(1, (m - rank) * t.test.pValue));
    t.test.adjustedP = running;
    t.test.ok = !(running < ALPHA);
    any ||= !t.test.ok;
    const adj = m > 1 ? `; Holm-adjusted over the ${m} checks, ${pIs(running)}` : '';
    if (t.test.ok)
      t.test.finding =
        t.test.pValue < ALPHA
          ? `${t.good()}: below 5% on its own, but not once the ${m} checks run on these residuals are allowed for${adj}.`
          : `${t.good()}.`;
    else t.test.finding = `${t.bad()}${adj}. This is a caveat about the model, not about the newest data.`;
  });
  return any;
}

/**
 * Brown–Forsythe statistic for two groups (Brown & Forsythe 1974): one-way ANOVA F of the absolute
 * deviations from each group's median. `first` and `last` are the mean absolute deviations.
 */
export function brownForsythe(
  a: ArrayLike<number>,
  b: ArrayLike<number>,
): { statistic: number; first: number; last: number; ssw: number } {
  const za = absDeviations(a);
  const zb = absDeviations(b);
  const n1 = za.length;
  const n2 = zb.length;
  const N = n1 + n2;
  const m1 = meanAndSquares(za);
  const m2 = meanAndSquares(zb);
  const ssw = m1.ss + m2.ss;
  const diff = m2.mean - m1.mean;
  const ssb = ((n1 * n2) / N) * diff * diff;
  return { statistic: ((N - 2) * ssb) / ssw, first: m1.mean, last: m2.mean, ssw };
}

function absDeviations(x: ArrayLike<number>): Float64Array {
  const s = sortAscending(Float64Array.from(x)); // the built-in sort's order, faster
  const med = sortedQuantile(s, 0.5);
  for (let i = 0; i < s.length; i++) s[i] = Math.abs(s[i]! - med);
  return s;
}

/** True when the drift residuals run without a gap from the first to the last observed value. */
function noInnerGap(fit: Fit): boolean {
  const span = fit.coefficients.span;
  return span !== undefined && fit.residualCount === span;
}
