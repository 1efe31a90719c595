// The resolved plan: one entry per configured metric, every option filled from defaults.
// src/config turns YAML into this; src/job.ts and src/ingest read it.
import type { IntervalChoice, MethodName, ScoreName } from '../engine/types.js';
import type { Direction, FalseAlarmControl } from '../terms.js';
import type { TimeFormat } from '../ingest/times.js';

export type DurationUnit = 'm' | 'h' | 'd' | 'w' | 'mo' | 'q' | 'y';

export interface LimitOptions {
  above: number | null;
  below: number | null;
  /** Either a number of steps, or a duration converted to steps once the spacing is known. */
  within: { steps: number } | { amount: number; unit: DurationUnit };
  /** As written in the config, e.g. "30d" or "14". */
  withinLabel: string;
  risk: number;
}

/** One known incident from the config: a time range (inclusive, epoch ms) and why. */
export interface IncidentRange {
  from: number;
  to: number;
  /** As written, e.g. "2026-03-01 to 2026-03-02", for notes. */
  written: string;
  reason: string;
  /** Where it is in the config, e.g. "metrics[2].incidents[0]". */
  keyPath: string;
}

export interface MetricOptions {
  /** Integer season length, or `auto` (from the time spacing). 1 = none. */
  season: number | 'auto';
  methods: MethodName[];
  horizon: number;
  levels: number[];
  intervals: IntervalChoice;
  backtest: { minTrain: number; horizon: number };
  /** Backtest measure used to choose a method. */
  score: ScoreName;
  /** Simulated paths for bootstrap intervals and limit probabilities. */
  paths: number;
  seed: number;
  check: { last: number };
  direction: Direction;
  alarmLevel: number;
  falseAlarms: FalseAlarmControl;
  limit: LimitOptions | null;
  /** Blank cells: an error, or treated as missing values. */
  blanks: 'error' | 'missing';
  /** Rows sharing a time: an error naming both lines, or keep the first/last, or average. */
  duplicates: 'error' | 'first' | 'last' | 'mean';
  /** The form of the time column, or `auto` to decide from the cells. */
  timeFormat: TimeFormat;
}

export interface MetricPlan extends MetricOptions {
  name: string;
  /** Path or glob relative to the working directory, as configured. */
  file: string;
  /** Time column, or null for row order. */
  time: string | null;
  /** Value columns: one series each. */
  values: string[];
  /** Long-format key column, or null. */
  key: string | null;
  /** Column naming each row in reports (e.g. a commit SHA), or null. */
  label: string | null;
  /** Unit of the values, shown with them (e.g. "ms"), or null. */
  unit: string | null;
  /** Known incidents as time ranges (config `incidents`). */
  incidents: IncidentRange[];
  /** Column whose non-empty cells mark known incidents (the cell is the reason), or null. */
  incidentColumn: string | null;
  /** Where this metric sits in the config, e.g. "metrics[2]", and its line (1-based). */
  keyPath: string;
  line: number | null;
}

export interface Plan {
  /** Config file path relative to the working directory (for messages). */
  configPath: string;
  version: 1;
  metrics: MetricPlan[];
  /** Run-wide false-alarm control (from defaults.falseAlarms). */
  falseAlarms: FalseAlarmControl;
  /** In a pull request: judge and gate the changed files' series only, or all. */
  pullRequestGate: 'changed' | 'all';
}
