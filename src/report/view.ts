// The view model the markdown templates render. Every string in a ReportView is already escaped for
// markdown and HTML (escapeMarkdown) or built by Leadline from validated numbers, so templates are
// compiled without Handlebars' own escaping and a user's template cannot let raw untrusted text through:
// the raw text is never in the view.
import type {
  CheckedObservation,
  MethodBacktestSummary,
  Results,
  SeriesResult,
  TestSummary,
  Verdict,
} from '../results.js';
import { hasDetail } from '../results.js';
import { sideAlpha } from '../alarms/index.js';
import { levelKey, levelOutside, levelShare, normaliseLevels } from '../engine/levels.js';
import {
  chance,
  agree,
  escapeMarkdown as md,
  levelLabel,
  num,
  numsApart,
  pct,
  plural,
  pval,
  rowRef,
  shorten,
  windowWords,
  withUnit,
} from '../text/index.js';
import { failedCheckKeys, isJudged, needsAttention, severityRank } from '../verdict.js';
import {
  METHOD_LABEL,
  reportName,
  SPACING_WORD,
  STEP_UNIT,
  VERDICT_ICON,
  VERDICT_LABEL,
  when,
} from './format.js';
import { mermaidChart } from './mermaid.js';
import { sparkline } from './sparkline.js';

export interface VerdictView {
  code: Verdict;
  label: string;
  icon: string;
}

export interface AttentionRow {
  /** Anchor-free reference: the series' position in `series` (1-based), for "see section n". */
  section: number;
  name: string;
  verdict: VerdictView;
  why: string;
  spark: string;
  latest: string;
  expected: string;
  where: string;
}

export interface LimitRow {
  name: string;
  verdict: VerdictView;
  limit: string;
  within: string;
  chance: string;
  allowed: string;
  pointCrossing: string;
  boundCrossing: string;
  status: string;
}

export interface ChartView {
  /** The series' section number (1-based, report order). */
  section: number;
  name: string;
  /** Mermaid source (xychart-beta), built from finite numbers and sanitised labels only. */
  source: string;
  /** Which line is which (XY charts have no legend). */
  legend: string;
}

export interface CheckedRow {
  alarm: boolean;
  where: string;
  value: string;
  expected: string;
  interval: string;
  result: string;
  p: string;
  z: string;
}

export interface ForecastRow {
  step: number;
  time: string;
  mean: string;
  bands: string[];
}

export interface BacktestRow {
  method: string;
  chosen: boolean;
  origins: string;
  score: string;
  rmse: string;
  mae: string;
  mase: string;
  mape: string;
  me: string;
}

export interface CheckRow {
  /** Which check: ljungBox, bias, normality or spread. */
  key: string;
  ok: boolean;
  /** passed, flagged, or not-computed (too few residuals, or none that vary). */
  state: 'passed' | 'flagged' | 'not-computed';
  /** "⚠️ " before a flagged check's result, else "". */
  mark: string;
  name: string;
  result: string;
  statistic: string;
  p: string;
  finding: string;
}

export interface CalibrationRow {
  kind: string;
  used: boolean;
  level: string;
  coverage: string;
  judgement: string;
}

/** An interval level as the report shows it: its number, its key in per-level records, its label. */
export interface LevelView {
  value: number;
  key: string;
  label: string;
}

/** The levels in the one order every table, chart and key uses (ascending, each once). */
export function levelViews(levels: readonly number[]): LevelView[] {
  return normaliseLevels(levels).map((value) => ({ value, key: levelKey(value), label: levelLabel(value) }));
}

export interface SeriesView {
  section: number;
  name: string;
  verdict: VerdictView;
  reason: string;
  attention: boolean;
  facts: string;
  checked: CheckedRow[];
  forecast: ForecastRow[];
  /** The series' interval levels, ascending: what the forecast columns, charts and keys show. */
  levels: LevelView[];
  forecastNote: string | null;
  backtest: BacktestRow[];
  backtestScore: string;
  backtestReason: string;
  backtestNote: string | null;
  checks: CheckRow[];
  checksNote: string | null;
  calibration: CalibrationRow[];
  calibrationNote: string | null;
  limit: string | null;
  notes: string[];
  chart: ChartView | null;
  /** The metric's unit, escaped, or null. */
  unit: string | null;
  /** Known incidents: rows left out of the statistics and never judged, with why. */
  incidents: IncidentView[];
}

export interface IncidentView {
  where: string;
  value: string;
  reason: string;
}

export interface ProblemRow {
  where: string;
  message: string;
}

export interface ReportView {
  title: string;
  verdict: VerdictView;
  headline: string;
  gate: string;
  gatePassed: boolean;
  counts: string;
  falseAlarms: string;
  caution: string;
  generated: string;
  runNotes: string[];
  problems: ProblemRow[];
  attention: AttentionRow[];
  attentionNote: string | null;
  limits: LimitRow[];
  limitsNote: string | null;
  /** Charts for the metrics that need attention, shown outside the collapsed sections. */
  charts: ChartView[];
  /** Metric sections: one per series in report order, or the first `detail` of them (ViewOptions). */
  series: SeriesView[];
  /** How many metric sections and attention rows the whole run has (more than shown when cut). */
  totals: { sections: number; attention: number };
  /** Set when the report was cut to fit: what was left out and where the full report is. */
  omitted: string | null;
  /** One line about the series that need no attention, e.g. "8 other series: 7 steady, 1 too short (x)." */
  others: string | null;
  /** At most one line on residual-check caveats; each series' details say which check and why. */
  caveats: string | null;
  /** One line on known incidents: how many rows of which series are left out of the statistics. */
  incidents: string | null;
  /** What the run checked, e.g. "This pull request adds 3 rows to a.csv." Null when not known. */
  scope: string | null;
  /** In a pull request, the series it leaves alone in one line, e.g. "12 other series unchanged; …". */
  elsewhere: string | null;
  /** Where the full report is (the brief report always says it). */
  fullReport: string;
}

/** Most Mermaid charts in a full report unless asked otherwise. */
export const DEFAULT_CHARTS = 5;

export interface ViewOptions {
  /** Most Mermaid charts in the report (attention items first). Default 5. */
  maxCharts?: number;
  /** Where the full report is, for `fullReport`. */
  fullReportNote?: string;
  /**
   * How many series, from the first in report order, the view may show in detail (sections,
   * attention rows, charts); only those need their charts and tables (results.ts hasDetail). A report
   * that cannot show more (markdown.ts `detailWanted`) builds no more. Default: every series.
   */
  detail?: number;
}

/** The series itself, when it carries its charts and tables; a lean one here is a fault of the caller. */
function detailed(s: SeriesResult): SeriesResult {
  if (!hasDetail(s))
    throw new Error(`internal: the report was given ${s.name} without its charts and tables to show`);
  return s;
}

/** A series' name or key as the markdown report shows it: cut (format.ts `reportName`), then escaped. */
function shownName(text: string): string {
  return md(reportName(text));
}

const FORECAST_ROWS = 24;
const CHECKED_ROWS = 20;

function verdictView(v: Verdict): VerdictView {
  return { code: v, label: VERDICT_LABEL[v], icon: VERDICT_ICON[v] };
}

const CHECK_NAMES: Record<'ljungBox' | 'bias' | 'normality' | 'spread', string> = {
  ljungBox: 'Autocorrelation (Ljung–Box)',
  bias: 'Bias (mean residual zero)',
  normality: 'Normality',
  spread: 'Constant spread',
};

/** Residual checks that did not pass, in plain names. */
export function failedChecks(s: SeriesResult): string[] {
  return failedCheckKeys(s).map((k) => CHECK_NAMES[k]);
}

/** What a reviewer should act on (alarms, limits at risk, errors): the rule is src/verdict.ts's. */
export { needsAttention };

/** Series in report order: attention items first, most severe first (src/verdict.ts), then the rest as given. */
export function reportOrder(results: Pick<Results, 'series'>): SeriesResult[] {
  const indexed = results.series.map((s, i) => ({ s, i, att: needsAttention(s) }));
  indexed.sort((a, b) => {
    if (a.att !== b.att) return a.att ? -1 : 1;
    if (a.att) return severityRank(a.s.verdict) - severityRank(b.s.verdict) || a.i - b.i;
    return a.i - b.i;
  });
  return indexed.map((x) => x.s);
}

/**
 * The places (indices in results.series) of the first `count` series in report order: those a report
 * showing `count` in detail needs with their charts and tables (see ViewOptions.detail).
 */
export function firstInReportOrder(results: Pick<Results, 'series'>, count: number): Set<number> {
  const place = new Map(results.series.map((s, i) => [s, i]));
  return new Set(
    reportOrder(results)
      .slice(0, Math.max(0, count))
      .map((s) => place.get(s)!),
  );
}

function locate(file: string, p: { row: number | null; label?: string }): string {
  return p.row === null && !p.label ? md(file) : `${md(file)} ${md(rowRef(p))}`;
}

/** A printed value with the series' unit (text/numbers.ts `withUnit`), escaped for markdown and HTML. */
function u(s: Pick<SeriesResult, 'unit'>, text: string): string {
  return md(withUnit(text, s.unit));
}

function checkedWhere(s: SeriesResult, c: Pick<CheckedObservation, 'time' | 'row' | 'label'>): string {
  const t = when(c.time, s.spacing);
  const line = md(rowRef(c));
  return t ? `${t} (${line})` : line;
}

/** Where a checked observation fell, said as it is: inside, an alarm, or outside on a side not watched. */
export function placement(s: Pick<SeriesResult, 'direction'>, c: CheckedObservation): string {
  if (c.alarm) return `outside, ${c.side}: alarm`;
  if (!c.outside) return 'inside';
  if (s.direction === 'both' || c.side === s.direction)
    return `outside, ${c.side}, but not an alarm after the false-alarm adjustment`;
  return `outside on the ${c.side === 'above' ? 'high' : 'low'} side, which is not watched`;
}

function checkedRow(s: SeriesResult, c: CheckedObservation): CheckedRow {
  const result = placement(s, c);
  const [value, lower, upper] = valueAndBounds(c);
  return {
    alarm: c.alarm,
    where: checkedWhere(s, c),
    value: u(s, value),
    expected: u(s, num(c.mean)),
    interval: `${u(s, `${lower} to ${upper}`)} (${levelLabel(c.level)})`,
    result,
    p: c.adjustedP !== c.pValue ? `${pval(c.pValue)} (adjusted ${pval(c.adjustedP)})` : pval(c.pValue),
    z: Number.isFinite(c.z) ? `${c.z >= 0 ? '+' : '−'}${Math.abs(c.z).toFixed(2)}` : 'n/a',
  };
}

/** A checked value (six digits) and its interval (four), with digits enough that a value outside never prints as inside. */
function valueAndBounds(c: CheckedObservation): [string, string, string] {
  const [value, lower, upper] = numsApart([c.value, c.lower, c.upper], [6, 4, 4]);
  return [value!, lower!, upper!];
}

function attentionRow(s: SeriesResult, section: number): AttentionRow {
  // "Latest" is the newest value of the series; the range beside it is the interval that newest
  // checked observation was judged against (the reason names an earlier alarm when there is one).
  const last = s.checked.at(-1);
  const lastValue = [...s.history].reverse().find((h) => h.value !== null);
  const lastIsChecked = last !== undefined && lastValue !== undefined && last.index === lastValue.index;
  return {
    section,
    name: shownName(s.name),
    verdict: verdictView(s.verdict),
    why: md(s.reason) || md(VERDICT_LABEL[s.verdict]),
    spark: sparkline(s.history.map((h) => h.value)),
    latest: u(s, lastIsChecked ? valueAndBounds(last)[0] : lastValue ? num(lastValue.value, 6) : 'n/a'),
    expected: lastIsChecked
      ? `${u(s, valueAndBounds(last).slice(1).join(' to '))} (${levelLabel(last.level)})`
      : '',
    where: lastValue ? locate(s.file, lastValue) : md(s.file),
  };
}

function crossing(s: SeriesResult, c: { step: number; time: string | null } | null): string {
  if (!c) return 'not within the window';
  const t = when(c.time, s.spacing);
  const steps = plural(c.step, STEP_UNIT[s.spacing]);
  return t ? `${t} (in ${steps})` : `in ${steps}`;
}

function limitRow(s: SeriesResult): LimitRow | null {
  const l = s.limit;
  if (!l) return null;
  const status = l.alreadyCrossed
    ? `already ${l.side} the limit`
    : l.atRisk
      ? 'at risk'
      : 'within the allowed risk';
  return {
    name: shownName(s.name),
    verdict: verdictView(s.verdict),
    limit: `${l.side} ${u(s, num(l.value, 6))}`,
    within: windowWords(l.withinLabel, l.within, STEP_UNIT[s.spacing]),
    chance: l.alreadyCrossed ? 'already beyond' : chance(l.probability, l.paths),
    allowed: pct(l.risk),
    pointCrossing: crossing(s, l.pointCrossing),
    boundCrossing: crossing(s, l.boundCrossing),
    status,
  };
}

function limitSentence(s: SeriesResult): string | null {
  const l = s.limit;
  if (!l) return null;
  const unit = STEP_UNIT[s.spacing];
  const head = `Limit: ${l.side} ${u(s, num(l.value, 6))} within the next ${windowWords(l.withinLabel, l.within, unit)}.`;
  if (l.alreadyCrossed) return `${head} The last observation is already ${l.side} it.`;
  return (
    `${head} Chance of crossing at any point in the window: ${chance(l.probability, l.paths)} from ${num(l.paths)} simulated paths ` +
    `(allowed ${pct(l.risk)}): ${l.atRisk ? 'at risk' : 'within the allowed risk'}. ` +
    `The point forecast crosses ${crossing(s, l.pointCrossing)}; the ${pct(1 - l.risk, 0)} bound crosses ${crossing(s, l.boundCrossing)}.`
  );
}

function backtestRows(s: SeriesResult): BacktestRow[] {
  const bt = s.backtest;
  if (!bt) return [];
  const rows = (Object.entries(bt.methods) as [string, MethodBacktestSummary][]).map(([m, b]) => ({
    method: METHOD_LABEL[m] ?? md(m),
    chosen: m === s.method,
    origins: num(b.origins),
    score: num(b.score),
    rmse: num(b.rmse),
    mae: num(b.mae),
    mase: num(b.mase),
    mape: b.mape === null ? 'n/a' : `${num(b.mape)}%`,
    me: num(b.me),
    sortKey: b.score === null ? Infinity : Math.abs(b.score),
  }));
  rows.sort((a, b) => (a.chosen !== b.chosen ? (a.chosen ? -1 : 1) : a.sortKey - b.sortKey));
  return rows.map(({ sortKey: _s, ...r }) => r);
}

/** A check with no statistic was not computed (too few residuals, or none that vary): never "passed". */
function checkState(t: TestSummary & { zeroByConstruction?: boolean }): CheckRow['state'] {
  if (t.zeroByConstruction) return 'not-computed';
  if (!Number.isFinite(t.statistic) && !Number.isFinite(t.pValue)) return 'not-computed';
  return t.ok ? 'passed' : 'flagged';
}

const CHECK_STATE_WORD: Record<CheckRow['state'], string> = {
  passed: 'passed',
  flagged: 'flagged',
  'not-computed': 'not computed',
};

function testRow(
  key: string,
  name: string,
  t: (TestSummary & { zeroByConstruction?: boolean }) | undefined,
  statistic: string,
): CheckRow | null {
  if (!t) return null;
  const state = checkState(t);
  return {
    key,
    ok: t.ok,
    state,
    mark: state === 'flagged' ? '⚠️ ' : '',
    name,
    result: CHECK_STATE_WORD[state],
    statistic: state === 'not-computed' && !t.zeroByConstruction ? '' : statistic,
    // A check that was not computed has no p-value to show (a mean's bias is 0 by construction: p = 1 says nothing).
    p: state === 'not-computed' ? 'n/a' : pval(t.pValue),
    finding: md(t.finding ?? ''),
  };
}

function checkRows(s: SeriesResult): CheckRow[] {
  const c = s.residualChecks;
  if (!c) return [];
  const df = (t: TestSummary) => (t.df === null || t.df === undefined ? '' : `, df ${t.df}`);
  const rows = [
    testRow(
      'ljungBox',
      `${CHECK_NAMES.ljungBox}, ${plural(c.ljungBox?.lags ?? 0, 'lag')}`,
      c.ljungBox,
      c.ljungBox ? `Q = ${num(c.ljungBox.statistic)}${df(c.ljungBox)}` : '',
    ),
    testRow(
      'bias',
      CHECK_NAMES.bias,
      c.bias,
      c.bias
        ? c.bias.zeroByConstruction
          ? 'zero by construction'
          : `mean ${num(c.bias.mean)}, t = ${num(c.bias.statistic)}${df(c.bias)}`
        : '',
    ),
    testRow(
      'normality',
      CHECK_NAMES.normality,
      c.normality,
      c.normality
        ? `skewness ${num(c.normality.skewness)}, kurtosis ${num(c.normality.kurtosis)}, statistic ${num(c.normality.statistic)}`
        : '',
    ),
    testRow(
      'spread',
      `${CHECK_NAMES.spread}${c.spread?.test ? ` (${md(c.spread.test)})` : ''}`,
      c.spread,
      c.spread ? `statistic ${num(c.spread.statistic)}${df(c.spread)}` : '',
    ),
  ];
  return rows.filter((r): r is CheckRow => r !== null);
}

/**
 * Backtest coverage against the nominal level. The tolerance is two binomial standard errors,
 * 2·sqrt(p(1−p)/n), with n the number of step-1 origins (common practice; coverage over several
 * steps is correlated, so this is a rough yardstick, and the wording says so).
 */
export function calibrationWords(coverage: number, level: number, origins: number): string {
  const p = levelShare(level);
  if (!Number.isFinite(coverage) || origins <= 0) return 'not measured';
  const tol = 2 * Math.sqrt((p * (1 - p)) / origins);
  const gap = coverage - p;
  if (Math.abs(gap) <= tol) return 'about as stated';
  return gap < 0
    ? 'too narrow: actuals fell outside more often than stated'
    : 'wider than needed: actuals fell outside less often than stated';
}

function calibrationRows(s: SeriesResult): CalibrationRow[] {
  const bt = s.backtest;
  if (!bt || !s.method) return [];
  const chosen = bt.methods[s.method];
  if (!chosen) return [];
  const rows: CalibrationRow[] = [];
  for (const [kind, levels] of Object.entries(chosen.coverage)) {
    if (!levels) continue;
    for (const level of levelViews(Object.keys(levels).map(Number))) {
      const cov = levels[level.key]!;
      rows.push({
        kind: md(kind),
        used: kind === s.intervalKind,
        level: level.label,
        coverage: pct(cov),
        judgement: calibrationWords(cov, level.value, chosen.origins),
      });
    }
  }
  rows.sort((a, b) => (a.used !== b.used ? (a.used ? -1 : 1) : 0));
  return rows;
}

function facts(s: SeriesResult): string {
  const parts = [`File ${md(s.file)}`, `column ${md(s.column)}`];
  if (s.unit) parts.push(`in ${md(s.unit)}`);
  if (s.key !== null) parts.push(`key ${shownName(s.key)}`);
  parts.push(plural(s.observations, 'observation'));
  if (s.missing > 0) parts.push(`${s.missing} missing`);
  parts.push(SPACING_WORD[s.spacing]);
  parts.push(s.season > 1 ? `season ${s.season} (${s.seasonSource})` : `no season (${s.seasonSource})`);
  if (s.method) parts.push(`method ${METHOD_LABEL[s.method] ?? md(s.method)}`);
  // The forecast's interval kind and the one the checked rows were judged with can differ (under
  // `auto` the checked rows' kind is chosen from the history before them): say both when they do.
  if (s.intervalKind) {
    const judged = [...new Set(s.checked.map((c) => c.intervalKind).filter((k) => k !== undefined))];
    if (judged.length === 0 || (judged.length === 1 && judged[0] === s.intervalKind))
      parts.push(`${md(s.intervalKind)} intervals`);
    else
      parts.push(
        `${md(s.intervalKind)} intervals for the forecast, ${judged.map(md).join(' and ')} for the checked ${agree(s.checked.length, 'row')}`,
      );
  }
  if (s.sigma !== null && s.sigma !== undefined)
    parts.push(`residual sd ${num(s.sigma)}${s.sigmaDf ? ` (df ${s.sigmaDf})` : ''}`);
  parts.push(
    `watching ${s.direction === 'both' ? 'both sides' : s.direction} at ${levelLabel(s.alarmLevel)}`,
  );
  return parts.join(' · ');
}

function seriesView(s: SeriesResult, section: number, chart: ChartView | null): SeriesView {
  const levels = levelViews(s.levels);
  const forecast = s.forecast.slice(0, FORECAST_ROWS).map((f) => ({
    step: f.step,
    time: when(f.time, s.spacing) ?? `+${f.step}`,
    mean: num(f.mean),
    bands: levels.map((l) => `${num(f.lower[l.key])} to ${num(f.upper[l.key])}`),
  }));
  const bt = s.backtest;
  return {
    section,
    name: shownName(s.name),
    verdict: verdictView(s.verdict),
    reason: md(s.reason),
    attention: needsAttention(s),
    facts: facts(s),
    checked: s.checked.slice(-CHECKED_ROWS).map((c) => checkedRow(s, c)),
    forecast,
    levels,
    forecastNote:
      s.forecast.length > FORECAST_ROWS
        ? `The first ${FORECAST_ROWS} of ${s.forecast.length} steps; the results JSON has all of them.`
        : null,
    backtest: backtestRows(s),
    backtestScore: bt ? md(bt.score.toUpperCase()) : '',
    backtestReason: bt ? md(bt.reason) : '',
    backtestNote: bt
      ? `Rolling origin from ${plural(bt.minTrain, 'observation')} of training, ${plural(bt.horizon, 'step')} ahead; ` +
        `score is the mean over those steps of ${md(bt.score.toUpperCase())} (lower is better); other measures at step 1.`
      : null,
    checks: checkRows(s),
    checksNote: s.residualChecks
      ? `On the residuals of the chosen method${s.residualChecks.basis === 'before-checked' ? ' fitted to the history before the checked rows' : ''}, judged together (Holm-adjusted, at most a 5% chance of any flag on a clean series). A flagged check is a caveat about the model: its intervals may be less trustworthy than stated.`
      : null,
    calibration: calibrationRows(s),
    calibrationNote: bt
      ? 'Share of backtest actuals that fell inside each interval, against the level it claims.'
      : null,
    limit: limitSentence(s),
    notes: s.notes.map(md),
    unit: s.unit ? md(s.unit) : null,
    incidents: (s.incidents ?? []).map((x) => ({
      where: checkedWhere(s, x),
      value: u(s, num(x.value, 6)),
      reason: md(shorten(x.reason, 300)),
    })),
    chart,
  };
}

/**
 * What chance alone would do, said plainly: with no adjustment, how often a run checking these
 * observations would raise at least one alarm if nothing had changed, 1 − Π(1 − αᵢ) over the checked
 * observations (independent checks, each at its per-observation rate αᵢ).
 */
/**
 * How often an interval is expected to miss, at the alarm level(s) the run's series use: 95 -> "about
 * one time in 20", 80 -> "one time in 5"; a level whose miss rate is no whole fraction (85) -> "about
 * 15 times in 100".
 */
export function missWords(level: number): string {
  const miss = levelOutside(level);
  const oneIn = 1 / miss;
  const whole = Math.round(oneIn);
  return Math.abs(oneIn - whole) <= 0.01 * oneIn
    ? `one time in ${num(whole)}`
    : `${num(miss * 100, 3)} times in 100`;
}

/** The report's standing caution, with the miss rate of the alarm level(s) actually configured. */
export function cautionLine(results: Results): string {
  const first = 'Forecasts are estimates with stated uncertainty, not guarantees';
  const levels = levelViews(results.series.map((s) => s.alarmLevel));
  if (levels.length === 0) return `${first}.`;
  const said = levels.map(
    (l, k) =>
      `${k === 0 ? 'an interval' : 'one'} at ${l.label} ${k === 0 ? 'is expected to miss ' : ''}about ${missWords(l.value)}`,
  );
  return `${first}: ${said.join(', ')}.`;
}

export function chanceSentence(results: Results): string {
  const sum = results.summary;
  const adjust =
    sum.falseAlarms === 'none'
      ? 'no adjustment for the number of checks'
      : sum.falseAlarms === 'bonferroni'
        ? 'alarms adjusted across the run (Bonferroni)'
        : 'alarms adjusted across the run (false discovery rate, Benjamini–Hochberg)';
  const n = sum.checkedObservations;
  if (n === 0) return 'No observation was checked in this run.';
  const rates: number[] = [];
  for (const s of results.series) for (const c of s.checked) rates.push(sideAlpha(c.level, s.direction));
  const none = rates.reduce((acc, a) => acc * (1 - a), 1);
  const any = 1 - none;
  const share = any >= 0.995 ? 'almost always' : `about ${Math.round(any * 100) || '<1'}% of the time`;
  if (results.summary.falseAlarms === 'none')
    return (
      `Even if nothing had changed, a run checking ${plural(n, 'observation')} like this one would raise ` +
      `at least one alarm ${share} by chance alone (${adjust}).`
    );
  return `${plural(n, 'observation')} checked; ${adjust}.`;
}

/** Series named in a one-line list before "and n more". */
const NAMED = 5;

function names(list: SeriesResult[]): string {
  const shown = list.slice(0, NAMED).map((s) => shownName(s.name));
  return list.length > NAMED ? `${shown.join(', ')} and ${list.length - NAMED} more` : shown.join(', ');
}

/**
 * What the run checked, in one sentence: in a pull request the rows it adds to each metric file
 * ("This pull request adds 3 rows to a.csv and 3 to b.csv."), otherwise the newest observations.
 */
export function scopeLine(results: Results): string | null {
  const sc = results.scope;
  const n = results.summary.checkedObservations;
  if (!sc) return null;
  if (sc.kind === 'latest')
    return n === 0
      ? 'No observation was checked.'
      : `This run checks the newest ${plural(n, 'observation')} of ${plural(results.series.length, 'series', 'series')}.`;
  const grown = sc.files.filter((f) => !f.added && f.rows > 0);
  const added = sc.files.filter((f) => f.added);
  const parts = grown.map((f, i) => `${i === 0 ? plural(f.rows, 'row') : f.rows} to ${md(f.file)}`);
  const list = (xs: string[]) =>
    xs.length <= 1 ? xs.join('') : `${xs.slice(0, -1).join(', ')} and ${xs.at(-1)}`;
  const sentences: string[] = [];
  if (parts.length > 0) sentences.push(`This pull request adds ${list(parts)}.`);
  if (added.length > 0)
    sentences.push(
      `It adds the new metric ${agree(added.length, 'file')} ${list(added.map((f) => md(f.file)))}; only ${agree(added.length, 'its', 'their')} last row is checked.`,
    );
  if (sentences.length === 0) return 'This pull request adds no row to any metric file: nothing was checked.';
  if (sc.gate === 'all') sentences.push('Every series is judged (pullRequestGate: all).');
  return sentences.join(' ');
}

/** In a pull request, the series of files it leaves alone: counted, with what is at risk there named. */
function elsewhereLine(unchanged: SeriesResult[]): string | null {
  if (unchanged.length === 0) return null;
  const atRisk = unchanged.filter((s) => s.limit?.atRisk);
  const errors = unchanged.filter((s) => s.verdict === 'error');
  const parts = [`${plural(unchanged.length, 'other series', 'other series')} unchanged`];
  if (atRisk.length > 0) parts.push(`${plural(atRisk.length, 'limit')} at risk elsewhere: ${names(atRisk)}`);
  if (errors.length > 0) parts.push(`${plural(errors.length, 'error')} elsewhere: ${names(errors)}`);
  return `${parts.join('; ')} (not judged in this pull request).`;
}

/** The series needing no attention in one line: how many of each word, naming all but the steady ones. */
function othersLine(all: SeriesResult[], afterAttention: boolean): string | null {
  const rest = all.filter(isJudged);
  if (rest.length === 0) return null;
  const groups = new Map<Verdict, SeriesResult[]>();
  for (const s of rest) {
    const list = groups.get(s.verdict);
    if (list) list.push(s);
    else groups.set(s.verdict, [s]);
  }
  const parts = [...groups.entries()].map(([v, list]) =>
    v === 'ok' ? `${list.length} ${VERDICT_LABEL[v]}` : `${list.length} ${VERDICT_LABEL[v]} (${names(list)})`,
  );
  const head = plural(
    rest.length,
    afterAttention ? 'other series' : 'series',
    afterAttention ? 'other series' : 'series',
  );
  return `${head}: ${parts.join(', ')}.`;
}

/** One line on residual-check caveats, or null when no check flagged anything. */
function caveatsLine(series: SeriesResult[]): string | null {
  const flagged = series.filter((s) => failedChecks(s).length > 0);
  if (flagged.length === 0) return null;
  return (
    `Residual checks flagged ${plural(flagged.length, 'series', 'series')} (${names(flagged)}): ` +
    `their intervals may be less trustworthy than stated; each series' details say which check and why.`
  );
}

/** One line on known incidents, or null when no series has any. */
function incidentsLine(series: SeriesResult[]): string | null {
  const marked = series.filter((s) => (s.incidents ?? []).length > 0);
  if (marked.length === 0) return null;
  const rows = marked.reduce((n, s) => n + s.incidents!.length, 0);
  return (
    `Known incidents: ${plural(rows, 'row')} of ${names(marked)} left out of fitting, backtests and residual checks; ` +
    `they are never alarms themselves, and each series' details list them with their reason.`
  );
}

/** Builds the view the markdown templates render. Pure; every string in it is escaped. */
export function buildView(results: Results, opts: ViewOptions = {}): ReportView {
  const maxCharts = Math.max(0, Math.floor(opts.maxCharts ?? DEFAULT_CHARTS));
  const ordered = reportOrder(results);
  const section = new Map(ordered.map((s, i) => [s, i + 1]));
  const attention = ordered.filter(needsAttention);
  // Attention items come first in report order, so the detailed prefix holds the first of them.
  const shown = ordered.slice(0, Math.max(0, Math.floor(Math.min(opts.detail ?? Infinity, ordered.length))));

  // Charts: attention items first (shown in the open), then other series in their sections.
  const chartFor = new Map<SeriesResult, ChartView>();
  for (const s of shown) {
    if (chartFor.size >= maxCharts) break;
    const c = mermaidChart(detailed(s));
    if (c) chartFor.set(s, { section: section.get(s)!, name: shownName(s.name), ...c });
  }
  const charts = attention.map((s) => chartFor.get(s)).filter((c): c is ChartView => c !== undefined);

  const sum = results.summary;
  const v = verdictView(results.verdict);
  const headline = {
    ok:
      sum.checkedObservations > 0
        ? 'Every checked observation is within its interval and no limit is at risk.'
        : 'No observation was checked and no limit is at risk.',
    alarm: `${plural(sum.alarms, 'observation')} outside what history predicts.`,
    'at-risk': `${plural(sum.atRisk, 'limit')} at risk of being crossed.`,
    'too-short': `Every series is ${VERDICT_LABEL['too-short']} to judge yet.`,
    error: `${plural(sum.errors, 'series', 'series')} could not be analysed.`,
  }[results.verdict];

  const countParts = [
    plural(sum.metrics, 'metric'),
    plural(sum.series, 'series', 'series'),
    plural(sum.checkedObservations, 'checked observation'),
    plural(sum.alarms, 'alarm'),
    `${sum.atRisk} at risk`,
  ];
  if (sum.insufficient > 0) countParts.push(`${sum.insufficient} ${VERDICT_LABEL['too-short']}`);
  if (sum.errors > 0) countParts.push(`${plural(sum.errors, 'error')}`);

  const falseAlarms = chanceSentence(results);

  const limits = ordered.map(limitRow).filter((r): r is LimitRow => r !== null);

  return {
    title: 'Leadline report',
    verdict: v,
    headline,
    gate: md(results.gate.reason),
    gatePassed: results.gate.passed,
    counts: countParts.join(' · '),
    falseAlarms,
    caution: cautionLine(results),
    generated: `Leadline ${md(results.generator.version)}${results.config ? ` · config ${md(results.config)}` : ''} · ${md(when(results.generatedAt, 'minute') ?? results.generatedAt)}`,
    runNotes: (results.notes ?? []).map(md),
    problems: results.problems.map((p) => ({
      where:
        [p.file && md(p.file), p.line, p.column].filter((x) => x !== null && x !== '').join(':') ||
        (p.keyPath ? md(p.keyPath) : p.metric ? md(p.metric) : p.kind),
      message: md(p.message),
    })),
    attention: attention.slice(0, shown.length).map((s) => attentionRow(detailed(s), section.get(s)!)),
    attentionNote: null,
    limits,
    limitsNote: null,
    charts,
    series: shown.map((s) =>
      seriesView(detailed(s), section.get(s)!, needsAttention(s) ? null : (chartFor.get(s) ?? null)),
    ),
    totals: { sections: ordered.length, attention: attention.length },
    omitted: null,
    others: othersLine(
      ordered.filter((s) => !needsAttention(s)),
      attention.length > 0,
    ),
    elsewhere: elsewhereLine(ordered.filter((s) => !isJudged(s))),
    caveats: caveatsLine(ordered),
    incidents: incidentsLine(ordered),
    scope: scopeLine(results),
    fullReport: opts.fullReportNote ?? 'The results JSON has every series in full.',
  };
}
