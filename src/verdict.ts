// Verdicts and the gate: the one owner of verdict severity, each series' verdict and the sentence
// saying why, the run's verdict, the "needs attention" rule, the `fail-on` setting (parser and each
// entry's default) and the gate decision. Everything else (the job, the reports, the terminal summary,
// annotations, the tracking issue) asks here.
import { MIN_CHECK_RESIDUALS } from './engine/checks.js';
import { LeadlineError } from './errors.js';
import type { Results, SeriesResult } from './results.js';
import { FAIL_ON_VALUES, STEP_UNIT, type FailOn, type Verdict } from './terms.js';
import {
  chance,
  didYouMean,
  levelLabel,
  numsApart,
  num,
  pct,
  plural,
  rowRef,
  windowWords,
  withUnit,
} from './text/index.js';

/**
 * Verdicts from most to least severe. `too-short` comes last: too little data is a verdict
 * of its own, not a finding, so the run is "too short" only when nothing else ran.
 */
export const SEVERITY: readonly Verdict[] = ['error', 'alarm', 'at-risk', 'ok', 'too-short'];

/** Sort key: 0 for the most severe verdict. */
export function severityRank(v: Verdict): number {
  return SEVERITY.indexOf(v);
}

/** Series sorted most severe first, keeping their order within a verdict. */
export function bySeverity<T extends Pick<SeriesResult, 'verdict'>>(series: readonly T[]): T[] {
  return series
    .map((s, i) => ({ s, i }))
    .sort((a, b) => severityRank(a.s.verdict) - severityRank(b.s.verdict) || a.i - b.i)
    .map((x) => x.s);
}

/** The run's verdict: the most severe series verdict; too short only when nothing else ran. */
export function runVerdict(series: readonly Pick<SeriesResult, 'verdict'>[]): Verdict {
  for (const v of SEVERITY) if (series.some((s) => s.verdict === v)) return v;
  return 'ok';
}

/** Reasons are plain sentences (also printed in the terminal): no thousands separators. */
const PLAIN = { grouping: false } as const;

/** A series before its verdict: everything analysed, alarms final (after run-wide adjustment). */
export type SeriesFindings = Omit<SeriesResult, 'verdict' | 'reason'>;

/**
 * Whether the residual checks of a series could not be computed for want of history (fewer residuals
 * than the engine's MIN_CHECK_RESIDUALS): such a series is never called steady.
 */
export function tooShortForChecks(r: Pick<SeriesResult, 'residualChecks'>): boolean {
  const n = r.residualChecks?.residuals;
  return n !== undefined && n < MIN_CHECK_RESIDUALS;
}

/**
 * The verdict of an analysed series and one line saying why: alarm when a checked observation raised
 * one, else at-risk when its limit is, else too short when the history is too short for the residual
 * checks (tooShortForChecks), else ok. (Errors and too short for any fit are decided where they
 * happen, in ingestion or the engine, and carry their own reason.)
 */
export function seriesVerdict(r: SeriesFindings): Pick<SeriesResult, 'verdict' | 'reason'> {
  const alarms = r.checked.filter((c) => c.alarm);
  const parts: string[] = [];
  if (alarms.length > 0) {
    const first = alarms[0]!;
    const bound = first.side === 'below' ? first.lower : first.upper;
    const [value, shownBound] = numsApart([first.value, bound], 6, PLAIN);
    parts.push(
      `${alarms.length} of ${plural(r.checked.length, 'checked observation')} outside the ${levelLabel(first.level)} interval` +
        ` (${withUnit(value!, r.unit)} ${first.side} ${withUnit(shownBound!, r.unit)}${first.row !== null || first.label ? `, ${rowRef(first)}` : ''})`,
    );
  }
  if (r.limit?.atRisk) {
    parts.push(
      r.limit.alreadyCrossed
        ? `already ${r.limit.side} the limit ${withUnit(num(r.limit.value, 6, PLAIN), r.unit)}`
        : `${chance(r.limit.probability, r.limit.paths)} chance of crossing ${withUnit(num(r.limit.value, 6, PLAIN), r.unit)} within ${windowWords(r.limit.withinLabel, r.limit.within, STEP_UNIT[r.spacing])} (risk allowed ${pct(r.limit.risk)})`,
    );
  }
  const verdict: Verdict = alarms.length > 0 ? 'alarm' : r.limit?.atRisk ? 'at-risk' : 'ok';
  if (parts.length > 0) return { verdict, reason: parts.join('; ') };
  if (tooShortForChecks(r)) {
    const c = r.residualChecks!;
    const history = c.basis === 'before-checked' ? 'the history before the checked rows' : 'the history';
    return {
      verdict: 'too-short',
      reason: `Too short to judge: the residual checks need at least ${plural(MIN_CHECK_RESIDUALS, 'residual')} and ${history} gives ${c.residuals}.`,
    };
  }
  if (r.checked.length > 0) {
    // Outside on a side that is not watched (or not an alarm after adjustment) is said as such.
    const outside = r.checked.filter((c) => c.outside).length;
    const inside = r.checked.length - outside;
    const said: string[] = [];
    if (inside > 0)
      said.push(`${plural(inside, 'checked observation')} within the ${levelLabel(r.alarmLevel)} interval`);
    if (outside > 0)
      said.push(
        `${outside} outside it on ${r.direction === 'both' ? 'a side, but not an alarm after the false-alarm adjustment' : `the side that is not watched (watching ${r.direction})`}`,
      );
    return { verdict, reason: said.join('; ') };
  }
  return { verdict, reason: 'No observation was checked.' };
}

const CHECK_KEYS = ['ljungBox', 'bias', 'normality', 'spread'] as const;
export type ResidualCheckKey = (typeof CHECK_KEYS)[number];

/** The residual checks of a series that did not pass, in report order. */
export function failedCheckKeys(s: Pick<SeriesResult, 'residualChecks'>): ResidualCheckKey[] {
  const c = s.residualChecks;
  if (!c) return [];
  return CHECK_KEYS.filter((k) => c[k] && c[k].ok === false);
}

/**
 * Whether a series needs a reviewer's attention: an alarm, a limit at risk or an error — something
 * to act on. A residual check that failed is a caveat about the intervals, shown in the series'
 * details, not a finding (with independent noise about one check in twenty fails by chance). A
 * series a pull request leaves alone (not judged) needs none. The report's attention list, the
 * tracking issue and its title all ask this.
 */
export function needsAttention(s: Pick<SeriesResult, 'verdict' | 'judged'>): boolean {
  return isJudged(s) && verdictNeedsAttention(s.verdict);
}

/**
 * Whether a series' verdict counts for the run and the gate: false only in a pull request, for a
 * series whose file the pull request leaves alone (with `pullRequestGate: changed`).
 */
export function isJudged(s: Pick<SeriesResult, 'judged'>): boolean {
  return s.judged !== false;
}

/** The verdicts that need attention by themselves: an alarm, a limit at risk, an error. */
export function verdictNeedsAttention(v: Verdict): boolean {
  return v === 'alarm' || v === 'at-risk' || v === 'error';
}

/** Series needing attention in a run. */
export function attentionCount(r: Pick<Results, 'series'>): number {
  return r.series.filter(needsAttention).length;
}

/**
 * Whether the run as a whole needs attention (keeps the tracking issue open): its verdict does, a
 * series does, or the run had problems.
 */
export function runNeedsAttention(r: Results): boolean {
  return verdictNeedsAttention(r.verdict) || attentionCount(r) > 0 || r.problems.length > 0;
}

// ---- The gate ---------------------------------------------------------------------------------

/**
 * Each entry's default `fail-on`, chosen on purpose:
 * - the Action gates merges and deploys, where a red check stops people; alarms arrive by chance
 *   about (1 − level) of the time per checked observation, so by default only a limit at risk (a
 *   threshold the team set, with the risk it accepts) fails the step; alarms are annotated.
 * - the command is what a person or a script asks "is anything off?", so by default any finding
 *   (an alarm or a limit at risk) makes it exit 1.
 */
export const FAIL_ON_DEFAULT = { action: 'limit', command: 'both' } as const satisfies Record<string, FailOn>;

export type Entry = keyof typeof FAIL_ON_DEFAULT;

/**
 * Parses a `fail-on` setting: one of alarm, limit, both, never, or a list (comma or space separated)
 * of alarm and limit; case does not matter. Throws LeadlineError('usage') quoting the value, phrased
 * for the entry it came from (the Action's input or the command's flag).
 */
export function parseFailOn(raw: string, entry: Entry = 'command'): FailOn {
  const parts = [
    ...new Set(
      raw
        .trim()
        .toLowerCase()
        .split(/[\s,]+/)
        .filter(Boolean),
    ),
  ];
  const bad = parts.find((p) => !(FAIL_ON_VALUES as readonly string[]).includes(p));
  const invalid = (expected: string) =>
    entry === 'action'
      ? new LeadlineError('usage', `Input "fail-on" is ${JSON.stringify(raw)}; expected ${expected}`, {
          keyPath: 'fail-on',
        })
      : new LeadlineError('usage', `--fail-on: ${JSON.stringify(raw)} is not valid; expected ${expected}`);
  if (parts.length === 0 || bad !== undefined)
    throw invalid(
      `one of ${FAIL_ON_VALUES.join(', ')} (default ${FAIL_ON_DEFAULT[entry]}).${didYouMean(bad ?? raw.trim(), FAIL_ON_VALUES)}`,
    );
  if (parts.includes('never')) {
    if (parts.length > 1) throw invalid('"never" alone: it cannot be combined with other values.');
    return 'never';
  }
  if (parts.includes('both') || (parts.includes('alarm') && parts.includes('limit'))) return 'both';
  return parts[0] as FailOn;
}

/** What fails the gate under `failOn`. Errors fail every gate, `never` included. */
export function gateFailsOn(failOn: FailOn): { alarms: boolean; limits: boolean; errors: true } {
  return {
    alarms: failOn === 'alarm' || failOn === 'both',
    limits: failOn === 'limit' || failOn === 'both',
    errors: true,
  };
}

/**
 * Whether the gate passes under `failOn`, with one line saying why. Alarms and limits at risk fail it
 * as `failOn` says; a series that could not be analysed (a config or data error) fails every gate,
 * `never` included: a run that could not judge a metric cannot vouch for it. (The command exits 2 for
 * errors, 1 for a failed gate; the Action's step fails for both.)
 */
export function decideGate(
  failOn: FailOn,
  s: Pick<Results['summary'], 'errors' | 'alarms' | 'atRisk'>,
): Results['gate'] {
  const fails = gateFailsOn(failOn);
  const why: string[] = [];
  if (s.errors > 0) why.push(`${plural(s.errors, 'series', 'series')} could not be analysed`);
  if (fails.alarms && s.alarms > 0) why.push(plural(s.alarms, 'alarm'));
  if (fails.limits && s.atRisk > 0) why.push(`${plural(s.atRisk, 'limit')} at risk`);
  if (why.length > 0)
    return { failOn, passed: false, reason: `Gate failed (fail-on: ${failOn}): ${why.join(', ')}.` };
  if (failOn === 'never') return { failOn, passed: true, reason: 'The gate is off (fail-on: never).' };
  return { failOn, passed: true, reason: `Nothing fails the gate (fail-on: ${failOn}).` };
}
