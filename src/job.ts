// The one pipeline both entries call: config + files -> Results.
// Reading the config and the CSVs happens here (through src/config and src/ingest); everything
// after ingestion is pure and goes through buildResults, which tests call directly.
import { createHash } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { adoptDefaults, backtestFor, defaultsOf, durationToSteps, loadPlan } from './config/index.js';
import type { MetricPlan, Plan } from './config/types.js';
import {
  analyse,
  type Analysis,
  type EngineOptions,
  type MethodBacktest,
  type ResidualChecks,
  type TestResult,
  significant,
  toScale,
} from './engine/index.js';
import { autoSeason, ingest, type IngestOutcome } from './ingest/index.js';
import type { Series } from './ingest/types.js';
import { adjustAlarms, assessLimit, checkObservations, checkedIndices, sideAlpha } from './alarms/index.js';
import type {
  Origin,
  FalseAlarmControl,
  BacktestSummary,
  CheckedObservation,
  FailOn,
  ForecastPoint,
  HistoryPoint,
  LevelMap,
  MeasureSet,
  Problem,
  ResidualCheckSummary,
  Results,
  SeriesResult,
  Verdict,
} from './results.js';
import { RESULTS_SCHEMA_ID } from './results.js';

import { defaultJobs, defineTask, runPool } from './pool.js';
import { shardOf, type Shard } from './shard.js';
import { timeAfterLast, timeAtIndex } from './time.js';
import { VERSION } from './version.js';

export interface JobOptions {
  /** Working directory: config paths and metric files are relative to it. */
  cwd: string;
  /** Config path relative to cwd (or absolute). */
  configPath: string;
  failOn: FailOn;
  /**
   * Pull-request mode: CSV path (relative to cwd, forward slashes) -> number of lines the file had at
   * the base commit. Rows after that are the checked observations; files not listed are not checked.
   */
  newRows?: Record<string, number>;
  /** A note for the whole run, e.g. that the base commit was missing. */
  baseNote?: string;
  /** Called after each series, for progress reporting. */
  onProgress?: (done: number, total: number) => void;
  /** Fixed clock for reproducible output. */
  now?: Date;
  /** Judge only this shard's series (see src/shard.ts); the results then record their places in the run. */
  shard?: Shard | null;
  /** The commit the files were read at, when known. */
  commit?: string | null;
  /** The workflow event, when run by the Action. */
  event?: Origin['event'];
  /** Worker threads for the analysis (default: one per core); the output does not depend on it. */
  jobs?: number;
  /** Every point of history and the per-step backtest measures in the results (default: what charts need). */
  fullHistory?: boolean;
}

const SPACING_WORD: Record<Series['spacing'], string> = {
  minute: 'minute spacing',
  hour: 'hourly spacing',
  day: 'daily spacing',
  week: 'weekly spacing',
  month: 'monthly spacing',
  quarter: 'quarterly spacing',
  year: 'yearly spacing',
  row: 'row order',
};

/**
 * Points of history (and residuals) kept per series in the results by default: what the charts draw
 * (the comment's chart shows 30, more when checked rows reach further back). `fullHistory` keeps all.
 */
export const HISTORY_CAP = 60;

export async function runJob(o: JobOptions): Promise<Results> {
  const plan = await loadPlan(o.configPath, o.cwd);
  const configHash = await fileHash(path.resolve(o.cwd, o.configPath));
  const outcome = await ingest(plan, o.cwd);
  const analysed = await analyseFleet(plan, outcome, o);
  return finishResults(plan, outcome, analysed, { ...o, configHash });
}

/** "sha256:<hex>" of a file's bytes, or null when it cannot be read. */
async function fileHash(file: string): Promise<string | null> {
  try {
    return `sha256:${createHash('sha256')
      .update(await readFile(file))
      .digest('hex')}`;
  } catch {
    return null;
  }
}

type BuildOptions = Pick<
  JobOptions,
  'failOn' | 'newRows' | 'baseNote' | 'onProgress' | 'now' | 'shard' | 'commit' | 'event' | 'fullHistory'
> & { configHash?: string | null };

/** Pure: the plan and what ingestion produced -> Results, on this thread. */
export function buildResults(plan: Plan, outcome: IngestOutcome, o: BuildOptions): Results {
  const init = analyseInit(plan, o);
  const todo = toAnalyse(plan, outcome, o.shard);
  const analysed = todo.map((item, done) => {
    const r = analyseTask.run(init, item);
    o.onProgress?.(done + 1, todo.length);
    return r;
  });
  return finishResults(plan, outcome, analysed, o);
}

/** A series to analyse: the series, its metric's place in the plan, its place in the run. */
interface AnalyseItem {
  series: Series;
  metric: number;
  position: number;
}

/** The series this run (or shard) analyses, in the run's order. */
function toAnalyse(plan: Plan, outcome: IngestOutcome, shard: Shard | null | undefined): AnalyseItem[] {
  const mine = ownShard(shard);
  const byName = new Map(plan.metrics.map((m, k) => [m.name, k]));
  const items: AnalyseItem[] = [];
  outcome.series.forEach((s, position) => {
    if (!mine(s.name)) return;
    const metric = byName.get(s.metric);
    if (metric === undefined) throw new Error(`internal: series ${s.name} has no metric in the plan`);
    items.push({ series: s, metric, position });
  });
  return items;
}

/** Whether a series (by name) belongs to this shard; every series when the run is not sharded. */
function ownShard(shard: Shard | null | undefined): (name: string) => boolean {
  const s = shard && shard.count > 1 ? shard : null;
  return (name) => !s || shardOf(name, s.count) === s.index;
}

/** What every analysis worker is given once. */
interface AnalyseInit {
  plan: Plan;
  /** defaultsOf(plan): marks that a worker's copy of the plan cannot carry. */
  defaulted: boolean[];
  newRows: Record<string, number> | undefined;
  fullHistory: boolean;
}

function analyseInit(plan: Plan, o: Pick<JobOptions, 'newRows' | 'fullHistory'>): AnalyseInit {
  return { plan, defaulted: defaultsOf(plan), newRows: o.newRows, fullHistory: o.fullHistory ?? false };
}

const adopted = new WeakSet<AnalyseInit>();

/** One series' analysis, on this thread or in a worker thread (this module is the worker's script). */
const analyseTask = defineTask(
  'analyse',
  new URL(import.meta.url),
  (init: AnalyseInit, item: AnalyseItem): SeriesResult => {
    if (!adopted.has(init)) {
      adoptDefaults(init.plan, init.defaulted);
      adopted.add(init);
    }
    return analyseOne(item.series, init.plan.metrics[item.metric]!, init);
  },
);

/** Series fewer than this per worker thread are not worth a thread's start-up. */
export const SERIES_PER_WORKER = 20;

/**
 * The series this run (or shard) analyses, in the run's order, by `jobs` worker threads (fewer for
 * a small fleet; none for one). The same results whatever the number: each series is analysed alone,
 * with its own seed, and results are handed back in input order.
 */
export async function analyseFleet(
  plan: Plan,
  outcome: IngestOutcome,
  o: Pick<JobOptions, 'newRows' | 'onProgress' | 'jobs' | 'shard' | 'fullHistory'>,
): Promise<SeriesResult[]> {
  const todo = toAnalyse(plan, outcome, o.shard);
  const jobs = Math.min(o.jobs ?? defaultJobs(), Math.floor(todo.length / SERIES_PER_WORKER));
  const analysed: SeriesResult[] = [];
  await runPool(analyseTask, todo, { jobs, init: analyseInit(plan, o) }, (r, i) => {
    analysed.push(r);
    o.onProgress?.(i + 1, todo.length);
  });
  return analysed;
}

/**
 * The analysed series (analyseFleet's, in its order) and ingestion's failures -> Results: run-wide
 * alarm control, verdicts, summary and gate (concludeRun), and for a shard each series' place.
 */
export function finishResults(
  plan: Plan,
  outcome: IngestOutcome,
  analysed: SeriesResult[],
  o: BuildOptions,
): Results {
  const problems: Problem[] = [];
  // Every series of the run in the run's order (analysed ones, then the ones that could not be read);
  // a shard keeps its own, remembering each one's place so a merge restores the order.
  const shard = o.shard && o.shard.count > 1 ? o.shard : null;
  const failureNames = outcome.failures.map((f) => seriesName(f.metric, f.column, f.key));
  const whole = outcome.series.length + outcome.failures.length;
  const mine = ownShard(shard);
  const placed = (r: SeriesResult, position: number) => (shard ? { ...r, position } : r);
  const todo = toAnalyse(plan, outcome, shard);
  const results = analysed.map((r, k) => placed(r, todo[k]!.position));

  for (const [j, f] of outcome.failures.entries()) {
    if (!mine(failureNames[j]!)) continue;
    const e = f.error;
    // Too little data is a verdict of its own, not a problem to fix; the rest are config/data errors.
    if (f.verdict === 'error')
      problems.push({
        kind: e.kind === 'config' ? 'config' : 'data',
        message: e.message,
        file: e.file,
        line: e.line,
        column: e.column,
        keyPath: e.keyPath,
        metric: f.metric.name,
        ...(shard ? { position: outcome.series.length + j } : {}),
      });
    results.push(
      placed(failedSeries(f.metric, f.column, f.key, f.verdict, e.describe()), outcome.series.length + j),
    );
  }

  const { verdict, gate, summary } = concludeRun(results, {
    metrics: plan.metrics.length,
    falseAlarms: plan.falseAlarms,
    failOn: o.failOn,
  });
  const out: Results = {
    $schema: RESULTS_SCHEMA_ID,
    version: 1,
    generator: { name: 'leadline', version: VERSION },
    generatedAt: (o.now ?? new Date()).toISOString(),
    config: plan.configPath,
    origin: {
      configHash: o.configHash ?? null,
      commit: o.commit ?? null,
      shard: shard ? { ...shard, series: whole } : null,
      event: o.event ?? null,
    },
    verdict,
    gate,
    summary,
    series: results,
    problems,
  };
  if (o.baseNote) out.notes = [o.baseNote];
  return out;
}

/**
 * What a run concludes once every series is analysed, the same for a single run and for a merge of
 * shards: run-wide false-alarm control over every checked observation of every series (so the
 * adjusted p-values and alarms are those of the whole run), then each series' verdict, the summary,
 * the run's verdict and the gate. Sets `adjustedP` and `alarm` of the checked observations and each
 * series' `verdict` and `reason` in place; a merge passes series without their charts and tables,
 * which none of this reads.
 */
export function concludeRun(
  series: SeriesResult[],
  o: { metrics: number; falseAlarms: FalseAlarmControl; failOn: FailOn },
): Pick<Results, 'verdict' | 'gate' | 'summary'> {
  const everyChecked: { obs: CheckedObservation; alpha: number; direction: SeriesResult['direction'] }[] = [];
  for (const r of series) {
    const alpha = sideAlpha(r.alarmLevel, r.direction);
    for (const obs of r.checked) everyChecked.push({ obs, alpha, direction: r.direction });
  }
  adjustAlarms(everyChecked, o.falseAlarms);
  for (const r of series) settleVerdict(r);

  const summary = {
    metrics: o.metrics,
    series: series.length,
    alarms: everyChecked.filter((c) => c.obs.alarm).length,
    atRisk: series.filter((r) => r.limit?.atRisk).length,
    insufficient: series.filter((r) => r.verdict === 'insufficient-data').length,
    errors: series.filter((r) => r.verdict === 'error').length,
    checkedObservations: everyChecked.length,
    expectedFalseAlarms: everyChecked.reduce((acc, c) => acc + c.alpha, 0),
    falseAlarms: o.falseAlarms,
  };
  return { verdict: runVerdict(series), gate: decideGate(o.failOn, summary), summary };
}

function analyseOne(s: Series, m: MetricPlan, o: Pick<AnalyseInit, 'newRows' | 'fullHistory'>): SeriesResult {
  const cap = o.fullHistory ? Infinity : HISTORY_CAP;
  const notes = [...s.notes];
  const observations = countObserved(s.values);
  const seasonSource = m.season === 'auto' ? 'auto' : 'config';
  const season = m.season === 'auto' ? autoSeason(s.spacing, observations, s.stepMs) : m.season;
  if (m.season === 'auto')
    notes.push(`Season chosen from the ${SPACING_WORD[s.spacing]}: ${season === 1 ? 'none' : season}.`);
  const methods = season > 1 ? m.methods : m.methods.filter((x) => x !== 'seasonal-naive');
  if (methods.length < m.methods.length)
    notes.push('Seasonal naive left out: the series has no season (season 1), where it equals naive.');
  const base = emptySeries(s, m, season, seasonSource, observations, notes);
  const lastPoints = () => historyFrom(s, Math.max(0, s.values.length - cap));
  if (methods.length === 0)
    return {
      ...base,
      history: lastPoints(),
      verdict: 'error',
      reason: 'No method left to fit: seasonal naive needs a season above 1.',
    };

  let within: number | null = null;
  if (m.limit) {
    within = durationToSteps(m.limit.within, s.spacing, s.stepMs);
    if (within === null)
      notes.push(
        `The limit window "${m.limit.withinLabel}" is a duration but the series is in row order; give it in steps.`,
      );
  }
  const horizon = Math.max(m.horizon, within ?? 0);
  const engine: EngineOptions = {
    season,
    methods,
    horizon,
    levels: m.levels,
    intervals: m.intervals,
    backtest: backtestFor(m, season),
    score: m.score,
    paths: m.paths,
    seed: m.seed,
  };
  const a = analyse(s.values, engine);
  if (!a.ok) {
    return {
      ...base,
      history: lastPoints(),
      notes: [...notes, ...a.notes],
      verdict: 'insufficient-data',
      reason: a.reason,
    };
  }
  notes.push(...a.notes.filter((n) => !notes.includes(n)));

  const newFrom = o.newRows ? o.newRows[s.file] : undefined;
  const indices =
    o.newRows && newFrom === undefined ? [] : checkedIndices(s.values, s.rows, m.check.last, newFrom);
  if (o.newRows && newFrom === undefined)
    notes.push('This file is unchanged in the pull request: no row was checked.');
  if (o.newRows && newFrom !== undefined && indices.length === 0)
    notes.push('The pull request adds no observation to this series.');
  const {
    checked,
    notes: checkNotes,
    judge,
  } = checkObservations({
    values: s.values,
    rows: s.rows,
    timeAt: (i) => timeAtIndex(s, i),
    analysis: a,
    options: m,
    season,
    indices,
  });
  notes.push(...checkNotes);

  const limit =
    m.limit && within !== null
      ? assessLimit({
          fit: a.chosen,
          forecast: a.forecast,
          lastValue: lastObserved(s.values),
          limit: m.limit,
          within,
          paths: m.paths,
          seed: m.seed,
          timeAtStep: (h) => timeAfterLast(s, h),
        })
      : null;

  return {
    ...base,
    method: a.chosen.method,
    intervalKind: a.forecast.kind,
    // One sigma and one set of residual checks: those of the model that judged the checked rows.
    sigma: finiteOrNull(significant((judge?.fit ?? a.chosen).sigma)),
    sigmaDf: (judge?.fit ?? a.chosen).sigmaDf,
    forecast: forecastPoints(a, s, m.horizon),
    residualChecks: summariseChecks(
      judge?.checks ?? a.checks,
      judge ? 'before-checked' : 'all',
      (judge?.fit ?? a.chosen).n,
    ),
    backtest: summariseBacktest(a, o.fullHistory),
    checked,
    limit,
    ...chartData(s, a, checked[0]?.index, notes, cap),
    notes,
  };
}

/** History (and the residuals aligned with it) for charts: the last `cap` points, reaching back to the
 * first checked observation when a pull request adds more rows than that. Residuals are written to
 * the precision sigma gives them (numeric.ts toScale). */
function chartData(
  s: Series,
  a: Analysis,
  firstChecked: number | undefined,
  notes: string[],
  cap: number,
): Pick<SeriesResult, 'history' | 'residuals'> {
  const start = Math.max(0, Math.min(s.values.length - cap, firstChecked ?? Infinity));
  if (start > 0)
    notes.push(
      `Charts show the last ${s.values.length - start} of ${s.values.length} points; the analysis used all of them.`,
    );
  const residuals: (number | null)[] = [];
  for (let i = start; i < s.values.length; i++) {
    const r = a.chosen.residuals[i]!;
    residuals.push(Number.isFinite(r) ? toScale(r, a.chosen.sigma) : null);
  }
  return { history: historyFrom(s, start), residuals };
}

function historyFrom(s: Series, start: number): HistoryPoint[] {
  const history: HistoryPoint[] = [];
  for (let i = start; i < s.values.length; i++) {
    const v = s.values[i]!;
    history.push({
      index: i,
      row: s.rows[i]! > 0 ? s.rows[i]! : null,
      time: timeAtIndex(s, i),
      value: Number.isNaN(v) ? null : v,
    });
  }
  return history;
}

function emptySeries(
  s: Series,
  m: MetricPlan,
  season: number,
  seasonSource: 'config' | 'auto',
  observations: number,
  notes: string[],
): SeriesResult {
  return blankResult(m, {
    name: s.name,
    file: s.file,
    column: s.column,
    key: s.key,
    observations,
    missing: s.values.length - observations,
    spacing: s.spacing,
    season,
    seasonSource,
    notes,
  });
}

function failedSeries(
  m: MetricPlan,
  column: string | null,
  key: string | null,
  verdict: Verdict,
  reason: string,
): SeriesResult {
  return blankResult(m, {
    name: seriesName(m, column, key),
    file: m.file,
    column: column ?? m.values.join(', '),
    key,
    season: m.season === 'auto' ? 1 : m.season,
    seasonSource: m.season === 'auto' ? 'auto' : 'config',
    verdict,
    reason,
  });
}

/** The display name of a series that could not be read (ingest names the ones it reads the same way). */
function seriesName(m: MetricPlan, column: string | null, key: string | null): string {
  return [m.name, column && m.values.length > 1 ? `/${column}` : '', key !== null ? `[${key}]` : ''].join('');
}

/** A series result with nothing analysed yet: the metric's settings, the given fields, empty findings. */
function blankResult(
  m: MetricPlan,
  fields: Pick<SeriesResult, 'name' | 'file' | 'column' | 'key' | 'season' | 'seasonSource'> &
    Partial<SeriesResult>,
): SeriesResult {
  // Field order as in DESIGN.md's results format; `rest` fills in the others.
  const { name, file, column, key, season, seasonSource, ...rest } = fields;
  return {
    name,
    metric: m.name,
    file,
    column,
    key,
    observations: 0,
    missing: 0,
    spacing: 'row',
    season,
    seasonSource,
    method: null,
    intervalKind: null,
    sigma: null,
    sigmaDf: null,
    levels: m.levels,
    alarmLevel: m.alarmLevel,
    direction: m.direction,
    forecast: [],
    residualChecks: null,
    backtest: null,
    checked: [],
    limit: null,
    history: [],
    residuals: [],
    verdict: 'ok',
    reason: '',
    notes: [],
    ...rest,
  };
}

/** Sets verdict and reason once alarms are final. Insufficient data and errors keep theirs. */
function settleVerdict(r: SeriesResult): void {
  if (r.verdict === 'insufficient-data' || r.verdict === 'error') return;
  const alarms = r.checked.filter((c) => c.alarm);
  const parts: string[] = [];
  if (alarms.length > 0) {
    const first = alarms[0]!;
    parts.push(
      `${alarms.length} of ${r.checked.length} checked observation${r.checked.length === 1 ? '' : 's'} outside the ${first.level}% interval` +
        ` (${first.value} ${first.side} ${first.side === 'above' ? first.upper.toPrecision(4) : first.lower.toPrecision(4)}${first.row ? `, line ${first.row}` : ''})`,
    );
  }
  if (r.limit?.atRisk) {
    parts.push(
      r.limit.alreadyCrossed
        ? `already ${r.limit.side} the limit ${r.limit.value}`
        : `${(r.limit.probability * 100).toFixed(1)}% chance of crossing ${r.limit.value} within ${r.limit.withinLabel} (risk allowed ${(r.limit.risk * 100).toFixed(1)}%)`,
    );
  }
  r.verdict = alarms.length > 0 ? 'alarm' : r.limit?.atRisk ? 'at-risk' : 'ok';
  if (parts.length > 0) r.reason = parts.join('; ');
  else if (r.checked.length > 0)
    r.reason = `${r.checked.length} checked observation${r.checked.length === 1 ? '' : 's'} within the ${r.alarmLevel}% interval`;
  else r.reason = 'No observation was checked.';
}

const SEVERITY: Verdict[] = ['error', 'alarm', 'at-risk', 'ok', 'insufficient-data'];

/** The run's verdict: the most severe series verdict; insufficient data only when nothing else ran. */
export function runVerdict(series: SeriesResult[]): Verdict {
  if (series.length === 0) return 'ok';
  for (const v of SEVERITY) if (series.some((s) => s.verdict === v)) return v;
  return 'ok';
}

/** Whether the gate passes under `failOn`, with one line saying why. Data errors fail any gate but `never`. */
export function decideGate(failOn: FailOn, s: Results['summary']): Results['gate'] {
  if (failOn === 'never') return { failOn, passed: true, reason: 'The gate is off (fail-on: never).' };
  const why: string[] = [];
  if (s.errors > 0) why.push(`${s.errors} series could not be analysed`);
  if ((failOn === 'alarm' || failOn === 'both') && s.alarms > 0)
    why.push(`${s.alarms} alarm${s.alarms === 1 ? '' : 's'}`);
  if ((failOn === 'limit' || failOn === 'both') && s.atRisk > 0)
    why.push(`${s.atRisk} limit${s.atRisk === 1 ? '' : 's'} at risk`);
  if (why.length === 0)
    return { failOn, passed: true, reason: `Nothing fails the gate (fail-on: ${failOn}).` };
  return { failOn, passed: false, reason: `Gate failed (fail-on: ${failOn}): ${why.join(', ')}.` };
}

function forecastPoints(a: Analysis, s: Series, horizon: number): ForecastPoint[] {
  const out: ForecastPoint[] = [];
  const fc = a.forecast;
  for (let h = 1; h <= Math.min(horizon, fc.horizon); h++) {
    // Digits below a ten-thousandth of the standard error carry nothing (numeric.ts toScale).
    const se = fc.se[h - 1]!;
    const lower: LevelMap = {};
    const upper: LevelMap = {};
    for (const b of fc.bands) {
      lower[String(b.level)] = toScale(b.lower[h - 1]!, se);
      upper[String(b.level)] = toScale(b.upper[h - 1]!, se);
    }
    out.push({ step: h, time: timeAfterLast(s, h), mean: toScale(fc.mean[h - 1]!, se), lower, upper });
  }
  return out;
}

function summariseChecks(
  c: ResidualChecks,
  basis: 'before-checked' | 'all',
  observations: number,
): ResidualCheckSummary {
  const t = (x: TestResult) => ({
    statistic: significant(x.statistic),
    df: x.df,
    pValue: x.pValue,
    adjustedP: x.adjustedP,
    ok: x.ok,
    finding: x.finding,
  });
  return {
    ljungBox: { ...t(c.ljungBox), lags: c.ljungBox.lags },
    bias: { ...t(c.bias), mean: significant(c.bias.mean), zeroByConstruction: c.bias.zeroByConstruction },
    normality: {
      ...t(c.normality),
      skewness: significant(c.normality.skewness),
      kurtosis: significant(c.normality.kurtosis),
    },
    spread: { ...t(c.spread), test: c.spread.name },
    acf: c.acf.map((x) => significant(x)),
    acfBound: significant(c.acfBound),
    adjustment: 'holm',
    family: c.family,
    caveat: c.caveat,
    basis,
    observations,
  };
}

function measures(x: {
  origins: number;
  me: number;
  rmse: number;
  mae: number;
  mpe: number;
  mape: number;
  mase: number;
}): MeasureSet {
  return {
    origins: x.origins,
    me: finiteOrNull(significant(x.me)),
    rmse: finiteOrNull(significant(x.rmse)),
    mae: finiteOrNull(significant(x.mae)),
    mpe: finiteOrNull(significant(x.mpe)),
    mape: finiteOrNull(significant(x.mape)),
    mase: finiteOrNull(significant(x.mase)),
  };
}

/** The backtest for the results: measures, coverage and scores to 6 significant digits (the precision
 * a mean over the origins carries, and then some); per-step measures only with `full`. */
function summariseBacktest(a: Analysis, full: boolean): BacktestSummary {
  const methods: BacktestSummary['methods'] = {};
  for (const [name, mb] of Object.entries(a.backtest.methods) as [
    keyof typeof a.backtest.methods,
    MethodBacktest,
  ][]) {
    const coverage: Record<string, LevelMap> = {};
    for (const [kind, levels] of Object.entries(mb.coverage))
      coverage[kind] = Object.fromEntries(Object.entries(levels).map(([l, v]) => [l, significant(v)]));
    methods[name] = {
      ...measures(mb),
      steps: full ? mb.steps.map((st) => ({ step: st.step, ...measures(st) })) : [],
      coverage,
      score: finiteOrNull(significant(a.selection.scores[name] ?? NaN)),
    };
  }
  return {
    minTrain: a.backtest.minTrain,
    horizon: a.backtest.horizon,
    score: a.selection.score,
    methods,
    reason: a.selection.reason,
  };
}

function countObserved(v: Float64Array): number {
  let n = 0;
  for (let i = 0; i < v.length; i++) if (!Number.isNaN(v[i]!)) n++;
  return n;
}

function lastObserved(v: Float64Array): number {
  for (let i = v.length - 1; i >= 0; i--) if (!Number.isNaN(v[i]!)) return v[i]!;
  return NaN;
}

function finiteOrNull(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}
