// Hand-built Results for the report tests: small, typed, and internally consistent. Forecasts follow
// the docs/design.md conventions (naive and drift, analytic Student-t intervals), so the numbers a report
// shows are the kind the engine produces; the data are invented for these tests only.
import jStatModule from 'jstat';
import type {
  CheckedObservation,
  ForecastPoint,
  HistoryPoint,
  MethodBacktestSummary,
  Results,
  SeriesResult,
  Verdict,
} from '../../src/results.js';

const { jStat } = jStatModule;
const DAY = 86_400_000;

/** A small seeded generator (LCG, Numerical Recipes constants) with Box–Muller normals. */
export function rng(seed: number): () => number {
  let s = seed >>> 0;
  const u = () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return (s + 0.5) / 2 ** 32;
  };
  return () => Math.sqrt(-2 * Math.log(u())) * Math.cos(2 * Math.PI * u());
}

export interface SeriesSpec {
  name: string;
  file?: string;
  column?: string;
  n?: number;
  start?: number;
  slope?: number;
  noise?: number;
  seed?: number;
  method?: 'naive' | 'drift';
  /** Replace the last observation by this value (the checked one). */
  lastValue?: number;
  limit?: number;
  levels?: number[];
  daily?: boolean;
  horizon?: number;
}

function sd(xs: number[], df: number): number {
  const m = xs.reduce((a, b) => a + b, 0) / xs.length;
  return Math.sqrt(xs.reduce((a, b) => a + (b - m) ** 2, 0) / df);
}

function acf(xs: number[], lags: number): number[] {
  const n = xs.length;
  const m = xs.reduce((a, b) => a + b, 0) / n;
  const d = xs.map((x) => x - m);
  const c0 = d.reduce((a, b) => a + b * b, 0);
  return Array.from({ length: lags }, (_, k) => {
    let c = 0;
    for (let t = k + 1; t < n; t++) c += d[t]! * d[t - k - 1]!;
    return c / c0;
  });
}

/** One series: history, a forecast from the last point, and the last observation checked. */
export function series(spec: SeriesSpec): SeriesResult {
  const n = spec.n ?? 60;
  const noise = rng(spec.seed ?? 7);
  const levels = spec.levels ?? [80, 95];
  const alarmLevel = Math.max(...levels);
  const method = spec.method ?? 'naive';
  const daily = spec.daily ?? true;
  const t0 = Date.UTC(2026, 9, 1);
  const values: number[] = [];
  let v = spec.start ?? 100;
  for (let i = 0; i < n; i++) {
    v += (spec.slope ?? 0) + (spec.noise ?? 2) * noise();
    values.push(Math.round(v * 10) / 10);
  }
  if (spec.lastValue !== undefined) values[n - 1] = spec.lastValue;
  const time = (i: number) => (daily ? new Date(t0 + i * DAY).toISOString() : null);

  // The checked observation (index n-1) is judged against the forecast from origin n-2.
  const fitOn = values.slice(0, n - 1);
  const T = fitOn.length;
  const diffs = fitOn.slice(1).map((x, i) => x - fitOn[i]!);
  const slope = method === 'drift' ? (fitOn[T - 1]! - fitOn[0]!) / (T - 1) : 0;
  const resid = diffs.map((d) => d - slope);
  const sigma =
    method === 'drift'
      ? Math.sqrt(resid.reduce((a, b) => a + b * b, 0) / (T - 2))
      : sd(diffs, diffs.length - 1);
  const df = T - 2;
  const se = (h: number) =>
    method === 'drift' ? sigma * Math.sqrt(h * (1 + h / (T - 1))) : sigma * Math.sqrt(h);
  const q = (l: number) => jStat.studentt.inv(0.5 + l / 200, df);

  const mean1 = fitOn[T - 1]! + slope;
  const lo = mean1 - q(alarmLevel) * se(1);
  const hi = mean1 + q(alarmLevel) * se(1);
  const value = values[n - 1]!;
  const outside = value < lo || value > hi;
  const z = (value - mean1) / se(1);
  const p = 2 * (1 - jStat.studentt.cdf(Math.abs(z), df));
  const checked: CheckedObservation = {
    index: n - 1,
    row: n + 1,
    time: time(n - 1),
    value,
    step: 1,
    mean: mean1,
    lower: lo,
    upper: hi,
    level: alarmLevel,
    outside,
    side: value > hi ? 'above' : value < lo ? 'below' : null,
    pValue: p,
    adjustedP: p,
    z,
    alarm: outside,
  };

  // Future forecast from the last observation.
  const H = spec.horizon ?? 14;
  const last = values[n - 1]!;
  const forecast: ForecastPoint[] = Array.from({ length: H }, (_, k) => {
    const h = k + 1;
    const mean = last + slope * h;
    const lower: Record<string, number> = {};
    const upper: Record<string, number> = {};
    for (const l of levels) {
      lower[String(l)] = mean - q(l) * se(h);
      upper[String(l)] = mean + q(l) * se(h);
    }
    return {
      step: h,
      time: daily ? new Date(t0 + (n - 1 + h) * DAY).toISOString() : null,
      mean,
      lower,
      upper,
    };
  });

  const history: HistoryPoint[] = values.map((value, index) => ({
    index,
    row: index + 2,
    time: time(index),
    value,
  }));
  const residuals: (number | null)[] = [null, ...values.slice(1).map((x, i) => x - values[i]! - slope)];
  const r = residuals.filter((x): x is number => x !== null);
  const lags = Math.min(10, Math.floor(n / 5));
  const bt = (score: number, cov80: number, cov95: number): MethodBacktestSummary => ({
    origins: n - 20,
    me: score / 10,
    rmse: score * 1.2,
    mae: score,
    mpe: 0.1,
    mape: 1.8,
    mase: score / sigma,
    steps: [
      { step: 1, origins: n - 20, me: 0.1, rmse: score * 1.2, mae: score, mpe: 0.1, mape: 1.8, mase: 0.9 },
    ],
    coverage: { analytic: { '80': cov80, '95': cov95 }, empirical: { '80': 0.8, '95': 0.95 } },
    score,
  });

  const limit =
    spec.limit === undefined
      ? null
      : (() => {
          const step = forecast.find((f) => f.mean >= spec.limit!)?.step ?? null;
          const bstep = forecast.find((f) => f.upper['95']! >= spec.limit!)?.step ?? null;
          return {
            side: 'above' as const,
            value: spec.limit,
            within: H,
            withinLabel: `${H}d`,
            risk: 0.05,
            pointCrossing: step === null ? null : { step, time: forecast[step - 1]!.time },
            boundCrossing: bstep === null ? null : { step: bstep, time: forecast[bstep - 1]!.time },
            probability: bstep === null ? 0.01 : 0.62,
            paths: 2000,
            atRisk: bstep !== null,
            alreadyCrossed: false,
          };
        })();
  const verdict: Verdict = checked.alarm ? 'alarm' : limit?.atRisk ? 'at-risk' : 'ok';
  const a = acf(r, lags);
  // Ljung–Box from those autocorrelations: Q = n(n+2) Σ r_k²/(n−k), df = lags (DESIGN.md).
  const nr = r.length;
  const lbQ = nr * (nr + 2) * a.reduce((acc, rk, i) => acc + (rk * rk) / (nr - i - 1), 0);

  return {
    name: spec.name,
    metric: spec.name,
    file: spec.file ?? 'metrics/service.csv',
    column: spec.column ?? 'value',
    key: null,
    observations: n,
    missing: 0,
    spacing: daily ? 'day' : 'row',
    season: 1,
    seasonSource: 'auto',
    method,
    intervalKind: 'analytic',
    sigma,
    sigmaDf: df,
    levels,
    alarmLevel,
    direction: 'both',
    forecast,
    residualChecks: {
      ljungBox: {
        statistic: lbQ,
        df: lags,
        pValue: 1 - jStat.chisquare.cdf(lbQ, lags),
        ok: true,
        finding: 'No sign of autocorrelation.',
        lags,
      },
      bias: {
        statistic: 0.4,
        df: r.length - 1,
        pValue: 0.69,
        ok: true,
        finding: 'No sign of bias.',
        mean: r.reduce((x, y) => x + y, 0) / r.length,
        zeroByConstruction: method === 'drift',
      },
      normality: {
        statistic: 1.3,
        df: 2,
        pValue: 0.52,
        ok: true,
        finding: 'Consistent with a normal distribution.',
        skewness: 0.1,
        kurtosis: 2.9,
      },
      spread: {
        statistic: 1.1,
        df: null,
        pValue: 0.4,
        ok: true,
        finding: 'The spread looks constant.',
        test: 'Goldfeld–Quandt',
      },
      acf: a,
      acfBound: 1.96 / Math.sqrt(r.length),
    },
    backtest: {
      minTrain: 20,
      horizon: 7,
      score: 'mase',
      methods: {
        naive: bt(method === 'naive' ? 1.6 : 2.1, 0.78, 0.93),
        mean: bt(4.2, 0.55, 0.71),
        drift: bt(method === 'drift' ? 1.5 : 1.9, 0.79, 0.94),
      },
      reason: `${method} has the lowest mean MASE over steps 1 to 7.`,
    },
    checked: [checked],
    limit,
    history,
    residuals,
    verdict,
    reason: checked.alarm
      ? `1 of 1 checked observation outside the ${alarmLevel}% interval`
      : limit?.atRisk
        ? `62.0% chance of crossing ${spec.limit} within ${H}d (risk allowed 5.0%)`
        : `1 checked observation within the ${alarmLevel}% interval`,
    notes: ['Season chosen from the daily spacing: none.'],
  };
}

/** A run from its series, with the summary computed as the job does. */
export function results(list: SeriesResult[], extra: Partial<Results> = {}): Results {
  const checked = list.flatMap((s) => s.checked);
  const alarms = checked.filter((c) => c.alarm).length;
  const atRisk = list.filter((s) => s.limit?.atRisk).length;
  const verdict: Verdict = list.some((s) => s.verdict === 'error')
    ? 'error'
    : alarms > 0
      ? 'alarm'
      : atRisk > 0
        ? 'at-risk'
        : 'ok';
  return {
    $schema: 'urn:leadline:results:1',
    version: 1,
    generator: { name: 'leadline', version: '0.1.0' },
    generatedAt: '2026-12-01T06:00:00.000Z',
    config: '.github/leadline.yml',
    origin: { configHash: null, commit: null, shard: null, event: null },
    verdict,
    gate: {
      failOn: 'alarm',
      passed: alarms === 0,
      reason:
        alarms === 0
          ? 'Nothing fails the gate (fail-on: alarm).'
          : `Gate failed (fail-on: alarm): ${alarms} alarm.`,
    },
    summary: {
      metrics: list.length,
      series: list.length,
      alarms,
      atRisk,
      insufficient: list.filter((s) => s.verdict === 'too-short').length,
      errors: list.filter((s) => s.verdict === 'error').length,
      checkedObservations: checked.length,
      expectedFalseAlarms: checked.reduce((a, c) => a + (1 - c.level / 100), 0),
      falseAlarms: 'none',
    },
    series: list,
    problems: [],
    ...extra,
  };
}

/** A series that could not be analysed: too few observations. */
export function shortSeries(name: string): SeriesResult {
  const s = series({ name, n: 6 });
  return {
    ...s,
    observations: 6,
    method: null,
    intervalKind: null,
    sigma: null,
    sigmaDf: null,
    forecast: [],
    residualChecks: null,
    backtest: null,
    checked: [],
    limit: null,
    residuals: [],
    verdict: 'too-short',
    reason: 'Only 6 observations; at least 10 are needed.',
    notes: [],
  };
}

/** The standard mixed run: an alarm, a limit at risk, a quiet one and a short one. */
export function mixedRun(): Results {
  return results([
    series({
      name: 'checkout p95 latency',
      file: 'metrics/checkout.csv',
      column: 'p95_ms',
      start: 210,
      lastValue: 290,
      seed: 3,
    }),
    series({
      name: 'events db storage',
      file: 'metrics/storage.csv',
      column: 'gb',
      start: 1500,
      slope: 6,
      noise: 3,
      method: 'drift',
      limit: 1950,
      seed: 11,
      horizon: 30,
    }),
    series({
      name: 'bundle size',
      file: 'metrics/bundle.csv',
      column: 'kb',
      start: 480,
      noise: 1,
      daily: false,
      seed: 5,
    }),
    shortSeries('new queue depth'),
  ]);
}

export const NASTY_NAME =
  'evil <script>alert(1)</script> | `tick` ]]> **bold** [x](http://e.x)\n# heading @octocat';
