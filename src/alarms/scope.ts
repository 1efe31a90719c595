// The alarm stage's run-level parts: which rows a run checks (the last rows, or those a pull request
// adds), the limit window in steps of each series, and the run-wide false-alarm control.
import { durationToSteps } from '../config/index.js';
import type { MetricOptions } from '../config/types.js';
import type { Series } from '../ingest/types.js';
import type { CheckedObservation } from '../results.js';
import type { Direction, FalseAlarmControl } from '../terms.js';
import { adjustAlarms, checkedIndices, sideAlpha } from './index.js';
import { plural } from '../text/index.js';

export interface CheckScope {
  indices: number[];
  notes: string[];
}

/**
 * The observations to check in `s`: in a pull request (`newRows`: file -> its line count at the base
 * commit) the rows the pull request adds, none for a file it leaves alone; otherwise the last
 * `last` non-missing points.
 */
export function checkScope(
  s: Pick<Series, 'file' | 'values' | 'rows' | 'incidents'>,
  last: number,
  newRows: Record<string, number> | undefined,
): CheckScope {
  const scope = rowsToCheck(s, last, newRows);
  // Known incidents are never judged: they are listed with their reason instead.
  const known = new Set((s.incidents ?? []).map((x) => x.index));
  const kept = scope.indices.filter((i) => !known.has(i));
  const left = scope.indices.length - kept.length;
  if (left === 0) return scope;
  return {
    indices: kept,
    notes: [
      ...scope.notes,
      `${plural(left, 'row that would be checked is a known incident: it is', 'rows that would be checked are known incidents: they are')} not judged, never an alarm.`,
    ],
  };
}

/**
 * The values the statistics see: known incidents as missing (NaN), so fitting, backtests, residual
 * checks and the limit leave them out as they leave out gaps; the series itself keeps them to draw.
 */
export function withoutIncidents(s: Pick<Series, 'values' | 'incidents'>): Float64Array {
  if (!s.incidents || s.incidents.length === 0) return s.values;
  const y = Float64Array.from(s.values);
  for (const x of s.incidents) y[x.index] = NaN;
  return y;
}

function rowsToCheck(
  s: Pick<Series, 'file' | 'values' | 'rows'>,
  last: number,
  newRows: Record<string, number> | undefined,
): CheckScope {
  if (!newRows) return { indices: checkedIndices(s.values, s.rows, last), notes: [] };
  const newFrom = newRows[s.file];
  if (newFrom === undefined)
    return { indices: [], notes: ['This file is unchanged in the pull request: no row was checked.'] };
  const indices = checkedIndices(s.values, s.rows, last, newFrom);
  return {
    indices,
    notes: indices.length === 0 ? ['The pull request adds no observation to this series.'] : [],
  };
}

/**
 * The limit window in steps of this series, or null (with a note) when the window is a duration and
 * the series has no times to measure it against.
 */
export function limitWindow(
  limit: MetricOptions['limit'],
  s: Pick<Series, 'spacing' | 'stepMs'>,
): { within: number | null; note: string | null } {
  if (!limit) return { within: null, note: null };
  const within = durationToSteps(limit.within, s.spacing, s.stepMs);
  return within === null
    ? {
        within,
        note: `The limit window "${limit.withinLabel}" is a duration but the series is in row order; give it in steps.`,
      }
    : { within, note: null };
}

/**
 * Run-wide false-alarm control over the checked observations of every series (see adjustAlarms),
 * and what the run's summary says about them: how many were checked, how many raised alarms, and
 * how many alarms chance alone would raise.
 */
export function settleRunAlarms(
  series: readonly { checked: CheckedObservation[]; alarmLevel: number; direction: Direction }[],
  control: FalseAlarmControl,
): { checkedObservations: number; alarms: number; expectedFalseAlarms: number } {
  const every = series.flatMap((r) => {
    const alpha = sideAlpha(r.alarmLevel, r.direction);
    return r.checked.map((obs) => ({ obs, alpha, direction: r.direction }));
  });
  adjustAlarms(every, control);
  return {
    checkedObservations: every.length,
    alarms: every.filter((c) => c.obs.alarm).length,
    expectedFalseAlarms: every.reduce((acc, c) => acc + c.alpha, 0),
  };
}
