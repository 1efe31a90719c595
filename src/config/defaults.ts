// The built-in defaults, applied after the metric's own options and the config's `defaults:`.
import { METHOD_NAMES } from '../engine/types.js';
import type { MetricOptions } from './types.js';

/** Smallest backtest training size used when `backtest.minTrain` is not set: max(10, 2 × season). */
export function defaultMinTrain(season: number): number {
  return Math.max(10, 2 * Math.max(1, Math.floor(season)));
}

/**
 * Built-in defaults for every metric option.
 * - season `auto`: chosen from the time spacing by `autoSeason` (src/ingest).
 * - methods: all four baselines (mean, naive, seasonal-naive, drift); the backtest chooses.
 * - horizon 14 steps; levels 80 and 95 percent; intervals `auto` (the engine chooses per series).
 * - backtest.minTrain max(10, 2 × season) — 10 here, because the season is only known after
 *   ingestion with `season: auto` (see `backtestFor`); backtest.horizon = the metric's horizon.
 * - score `mase` (scale-free, so comparable across series); paths 1000; seed 1.
 * - check.last 1 (the newest observation); direction `both`; alarmLevel = the highest level;
 *   falseAlarms `none`; limit none (limit.risk 0.05 and limit.within = horizon once a limit is set).
 * - blanks `error`; duplicates `error`; timeFormat `auto`.
 */
export const DEFAULTS: MetricOptions = deepFreeze<MetricOptions>({
  season: 'auto',
  methods: [...METHOD_NAMES],
  horizon: 14,
  levels: [80, 95],
  intervals: 'auto',
  backtest: { minTrain: defaultMinTrain(1), horizon: 14 },
  score: 'mase',
  paths: 1000,
  seed: 1,
  check: { last: 1 },
  direction: 'both',
  alarmLevel: 95,
  falseAlarms: 'none',
  limit: null,
  blanks: 'error',
  duplicates: 'error',
  timeFormat: 'auto',
});

/** Default risk of a limit. */
export const DEFAULT_RISK = 0.05;

function deepFreeze<T>(o: T): T {
  if (o && typeof o === 'object') {
    for (const v of Object.values(o)) deepFreeze(v);
    Object.freeze(o);
  }
  return o;
}
