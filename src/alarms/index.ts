// Which observations are checked, which of them raise alarms, and which limits are at risk.
// Pure: takes a series' values and the engine's analysis, returns plain data.
import {
  bandAt,
  levelOutside,
  levelTail,
  prefixBacktest,
  runResidualTests,
  chooseIntervalKind,
  fitMethod,
  isFit,
  makeForecast,
  quantileAt,
  simulatePaths,
  tailProbability,
  type Analysis,
  type Fit,
  type Forecast,
  type MethodBacktest,
  type ResidualChecks,
} from '../engine/index.js';
import type { MetricOptions } from '../config/types.js';
import type { CheckedObservation, Direction, FalseAlarmControl, LimitResult } from '../results.js';

/**
 * The indices (0-based) of the observations to check.
 * - With `newFromLine` (a pull request's base line count), every non-missing point whose CSV line
 *   comes after it.
 * - Otherwise the last `last` non-missing points.
 * Gap-filled (missing) points are never checked: there is nothing to judge.
 */
export function checkedIndices(
  values: Float64Array,
  rows: Int32Array,
  last: number,
  newFromLine?: number,
): number[] {
  const out: number[] = [];
  if (newFromLine !== undefined) {
    for (let i = 0; i < values.length; i++)
      if (rows[i]! > newFromLine && !Number.isNaN(values[i]!)) out.push(i);
    return out;
  }
  for (let i = values.length - 1; i >= 0 && out.length < last; i--)
    if (!Number.isNaN(values[i]!)) out.unshift(i);
  return out;
}

/** The chance alarm rate per checked observation: the interval's tail mass on the side(s) watched. */
export function sideAlpha(level: number, direction: Direction): number {
  return direction === 'both' ? levelOutside(level) : levelTail(level);
}

export interface CheckContext {
  values: Float64Array;
  rows: Int32Array;
  /** ISO time per index, or null for row order. */
  timeAt: (index: number) => string | null;
  analysis: Analysis;
  options: MetricOptions;
  season: number;
  indices: number[];
}

export interface CheckOutcome {
  checked: CheckedObservation[];
  notes: string[];
  /**
   * The model that judged the checked rows (fitted to the history before the first of them) and its
   * residual checks; null when nothing was checked.
   */
  judge: { fit: Fit; checks: ResidualChecks } | null;
}

/**
 * Judges each checked observation against the forecast made from the origin just before the first
 * of them, with the chosen method fitted to the observations up to that origin only (so several new
 * rows are judged against what was forecast before any of them arrived). Everything the judgement
 * uses comes from that history alone: the residual checks, the `auto` interval kind, and the
 * backtest errors of empirical intervals (a backtest of the history before the origin, so every
 * error's actual came before it). A checked observation's interval therefore cannot depend on its
 * own value. `alarm` here is before any run-wide false-alarm adjustment.
 */
export function checkObservations(c: CheckContext): CheckOutcome {
  const notes: string[] = [];
  if (c.indices.length === 0) return { checked: [], notes, judge: null };
  const origin = c.indices[0]!; // forecasts are made from y_1..y_origin (0-based prefix length)
  const prefix = c.values.subarray(0, origin);
  const fit = fitMethod(c.analysis.chosen.method, prefix, c.season);
  if (!isFit(fit)) {
    notes.push(
      `No observation was checked: the ${c.analysis.chosen.method} method needs more history before the checked rows (${fit.reason}).`,
    );
    return { checked: [], notes, judge: null };
  }
  const horizon = c.indices[c.indices.length - 1]! - origin + 1;
  const checks = runResidualTests(fit);
  const auto = c.options.intervals === 'auto';
  // The backtest of the prefix, only when empirical intervals may be used (it is their sample).
  const mayBeEmpirical =
    c.options.intervals === 'empirical' ||
    (auto && !(checks.ljungBox.ok && checks.bias.ok && checks.spread.ok));
  // It is taken from the whole series' backtest of that method (the same numbers, no second pass).
  let mb: MethodBacktest | undefined;
  if (mayBeEmpirical) {
    const full = c.analysis.backtest;
    mb = prefixBacktest(c.values, origin, full.methods[fit.method]!, {
      season: c.season,
      minTrain: full.minTrain,
      horizon: full.horizon,
    });
  }
  // With `intervals: auto` the kind is chosen from the residuals known at the origin, so an anomaly
  // among the checked rows cannot widen (or reshape) the interval it is judged against.
  let kind = auto ? c.analysis.forecast.kind : c.options.intervals;
  if (auto) {
    const prior = chooseIntervalKind(checks, mb);
    kind = prior.kind;
    if (prior.kind !== c.analysis.forecast.kind)
      notes.push(
        `Checked rows were judged with ${prior.kind} intervals, chosen from the history before them: ${prior.reason}`,
      );
  }
  const fc = makeForecast(fit, {
    horizon,
    levels: [c.options.alarmLevel],
    kind,
    paths: c.options.paths,
    seed: c.options.seed,
    ...(mb ? { backtest: mb } : {}),
    checks,
  });
  for (const n of fc.notes) if (!notes.includes(n)) notes.push(n);
  const band = bandAt(fc.bands, c.options.alarmLevel);
  const checked = c.indices.map((index): CheckedObservation => {
    const step = index - origin + 1;
    const value = c.values[index]!;
    const mean = fc.mean[step - 1]!;
    const lower = band.lower[step - 1]!;
    const upper = band.upper[step - 1]!;
    const side = value > upper ? 'above' : value < lower ? 'below' : null;
    const { p, z, basis, bound } = tailProbability(fc, step, value, c.options.direction);
    const onBadSide = side !== null && (c.options.direction === 'both' || c.options.direction === side);
    return {
      index,
      row: c.rows[index]! > 0 ? c.rows[index]! : null,
      time: c.timeAt(index),
      value,
      step,
      mean,
      lower,
      upper,
      level: c.options.alarmLevel,
      intervalKind: fc.kind,
      outside: side !== null,
      side,
      pValue: p,
      pValueBasis: basis,
      pValueBound: bound,
      adjustedP: p,
      z,
      // Without run-wide control an alarm is exactly "outside the interval on the watched side".
      alarm: onBadSide,
    };
  });
  return { checked, notes, judge: { fit, checks } };
}

/**
 * Run-wide false-alarm control over every checked observation of every series.
 * - none: an alarm is an observation outside its interval on the watched side.
 * - bonferroni: p·n compared with the per-observation alpha.
 * - fdr: Benjamini–Hochberg step-up adjusted p-values, compared with the same alpha
 *   (controls the expected share of false alarms among the alarms raised).
 * Mutates `adjustedP` and `alarm` in place; `alphas[i]` is observation i's per-side alpha.
 */
export function adjustAlarms(
  all: { obs: CheckedObservation; alpha: number; direction: Direction }[],
  control: FalseAlarmControl,
): void {
  const n = all.length;
  if (n === 0 || control === 'none') return;
  if (control === 'bonferroni') {
    for (const a of all) a.obs.adjustedP = Math.min(1, a.obs.pValue * n);
  } else {
    // Benjamini–Hochberg: adjusted p_(i) = min_{j>=i} min(1, p_(j) n / j), over sorted p-values.
    const order = all.map((_, i) => i).sort((a, b) => all[a]!.obs.pValue - all[b]!.obs.pValue);
    let running = 1;
    for (let r = n - 1; r >= 0; r--) {
      const a = all[order[r]!]!;
      running = Math.min(running, (a.obs.pValue * n) / (r + 1));
      a.obs.adjustedP = Math.min(1, running);
    }
  }
  for (const a of all) {
    const sideOk = a.obs.side !== null && (a.direction === 'both' || a.direction === a.obs.side);
    a.obs.alarm = sideOk && a.obs.adjustedP <= a.alpha;
  }
}

export interface LimitContext {
  fit: Fit;
  forecast: Forecast;
  lastValue: number;
  limit: NonNullable<MetricOptions['limit']>;
  /** Window in steps (already converted from a duration). */
  within: number;
  paths: number;
  seed: number;
  timeAtStep: (step: number) => string | null;
}

/**
 * When a capacity limit will be crossed. The forecast passed in must reach at least `within` steps.
 * - pointCrossing: first step whose point forecast is at or beyond the limit;
 * - boundCrossing: first step whose predictive quantile at 1 − risk (the side of the limit) is;
 * - probability: share of simulated paths that reach the limit at any step within the window
 *   (first passage, not the share beyond it at the window's end). Paths are resampled residuals
 *   for bootstrap and empirical intervals, Gaussian draws for analytic ones.
 */
export function assessLimit(c: LimitContext): LimitResult {
  const side: 'above' | 'below' = c.limit.above !== null ? 'above' : 'below';
  const value = (side === 'above' ? c.limit.above : c.limit.below)!;
  const beyond = (x: number): boolean => (side === 'above' ? x >= value : x <= value);
  const within = Math.max(1, Math.min(c.within, c.forecast.horizon));
  const alreadyCrossed = beyond(c.lastValue);
  let pointCrossing: LimitResult['pointCrossing'] = null;
  let boundCrossing: LimitResult['boundCrossing'] = null;
  const prob = side === 'above' ? 1 - c.limit.risk : c.limit.risk;
  for (let h = 1; h <= within; h++) {
    if (!pointCrossing && beyond(c.forecast.mean[h - 1]!)) pointCrossing = { step: h, time: c.timeAtStep(h) };
    if (!boundCrossing && beyond(quantileAt(c.forecast, h, prob)))
      boundCrossing = { step: h, time: c.timeAtStep(h) };
    if (pointCrossing && boundCrossing) break;
  }
  let probability = 1;
  let simulated = 0;
  if (!alreadyCrossed) {
    const mode = c.forecast.kind === 'analytic' ? 'gaussian' : 'bootstrap';
    const paths =
      c.forecast.paths && c.forecast.horizon >= within && mode === 'bootstrap'
        ? c.forecast.paths
        : simulatePaths(c.fit, within, c.paths, c.seed, mode);
    const width = paths === c.forecast.paths ? c.forecast.horizon : within;
    const nPaths = Math.floor(paths.length / width);
    let hits = 0;
    for (let p = 0; p < nPaths; p++) {
      const base = p * width;
      for (let h = 0; h < within; h++) {
        if (beyond(paths[base + h]!)) {
          hits++;
          break;
        }
      }
    }
    probability = nPaths > 0 ? hits / nPaths : 0;
    simulated = nPaths;
  }
  return {
    side,
    value,
    within,
    withinLabel: c.limit.withinLabel,
    risk: c.limit.risk,
    pointCrossing,
    boundCrossing,
    probability,
    paths: simulated,
    atRisk: alreadyCrossed || probability > c.limit.risk,
    alreadyCrossed,
  };
}
