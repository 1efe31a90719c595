// The results stage: what the engine and the alarm stage found, shaped into the results contract
// (src/results.ts), and the run assembled: each series' verdict, the summary, the run's verdict and
// the gate (both decided by src/verdict.ts). Pure.
import type { MetricPlan } from './config/types.js';
import { settleRunAlarms } from './alarms/scope.js';
import {
  levelKey,
  levelRecord,
  significant,
  toScale,
  type Analysis,
  type Fit,
  type MethodBacktest,
  type ResidualChecks,
  type StepMeasures,
  type TestResult,
} from './engine/index.js';
import type { IngestFailure } from './ingest/index.js';
import type { Series } from './ingest/types.js';
import type {
  BacktestSummary,
  CheckedObservation,
  FailOn,
  FalseAlarmControl,
  ForecastPoint,
  HistoryPoint,
  IncidentRow,
  LevelMap,
  LimitResult,
  MeasureSet,
  Problem,
  ResidualCheckSummary,
  Results,
  SeriesResult,
} from './results.js';
import { keepDetailMark, withoutDetail } from './results.js';
import { plural } from './text/index.js';
import { timeAfterLast, timeAtIndex } from './time.js';
import { decideGate, isJudged, runVerdict, seriesVerdict, type SeriesFindings } from './verdict.js';

/**
 * Points of history (and residuals) kept per series in the results by default: what the charts draw
 * (the comment's chart shows 30, more when checked rows reach further back). `fullHistory` keeps all.
 */
export const HISTORY_CAP = 60;

/**
 * A series on its way to the results: its findings, and its verdict when ingestion or the engine
 * already decided it (an error, or too little data). Analysed series get theirs from src/verdict.ts
 * once the run's alarms are final.
 */
export interface SeriesDraft {
  findings: SeriesFindings;
  decided: Pick<SeriesResult, 'verdict' | 'reason'> | null;
  /** Only in a shard: the series' place in the whole run (see SeriesResult.position). */
  position?: number;
}

/** A series read back from a results file (a shard's, for merge) as a draft: errors and too little data keep their verdict. */
export function draftOf(r: SeriesResult): SeriesDraft {
  const { verdict, reason, position, ...findings } = r;
  keepDetailMark(r, findings);
  const decided = verdict === 'error' || verdict === 'too-short' ? { verdict, reason } : null;
  return { findings, decided, ...(position !== undefined ? { position } : {}) };
}

/** The display name of a series that could not be read (ingest names the ones it reads the same way). */
export function seriesName(m: MetricPlan, column: string | null, key: string | null): string {
  return [m.name, column && m.values.length > 1 ? `/${column}` : '', key !== null ? `[${key}]` : ''].join('');
}

/** The series' facts and settings, with nothing analysed yet. */
export function baseFindings(
  s: Series,
  m: MetricPlan,
  season: { season: number; source: 'config' | 'auto' },
  notes: string[],
  cap: number,
): SeriesFindings {
  const observations = countObserved(s.values);
  const incidents = incidentRows(s);
  if (incidents.length > 0)
    notes.push(
      `${plural(incidents.length, 'row is a known incident: it is', 'rows are known incidents: they are')} left out of fitting, backtests and residual checks (as missing values), drawn and listed, and never an alarm.`,
    );
  return blankFindings(m, {
    name: s.name,
    file: s.file,
    column: s.column,
    key: s.key,
    ...(m.unit !== null ? { unit: m.unit } : {}),
    observations,
    missing: s.values.length - observations,
    spacing: s.spacing,
    season: season.season,
    seasonSource: season.source,
    history: historyFrom(s, Math.max(0, s.values.length - cap)),
    ...(incidents.length > 0 ? { incidents } : {}),
    notes,
  });
}

/** The series' known incidents for the results: where, what value, and why. */
function incidentRows(s: Series): IncidentRow[] {
  return (s.incidents ?? []).map(({ index, reason }) => ({
    index,
    row: s.rows[index]! > 0 ? s.rows[index]! : null,
    time: timeAtIndex(s, index),
    value: s.values[index]!,
    ...labelAt(s, index),
    reason,
  }));
}

/** `{ label }` for a point that has one (the metric's label column), else nothing. */
function labelAt(s: Pick<Series, 'labels'>, index: number): { label?: string } {
  const label = s.labels?.[index];
  return label ? { label } : {};
}

/** A series that ingestion could not deliver: the metric's settings and the failure as its verdict. */
export function failedDraft(f: IngestFailure): SeriesDraft {
  const m = f.metric;
  return {
    findings: blankFindings(m, {
      name: seriesName(m, f.column, f.key),
      file: m.file,
      column: f.column ?? m.values.join(', '),
      key: f.key,
      ...(m.unit !== null ? { unit: m.unit } : {}),
      season: m.season === 'auto' ? 1 : m.season,
      seasonSource: m.season === 'auto' ? 'auto' : 'config',
    }),
    decided: { verdict: f.verdict, reason: f.error.describe() },
  };
}

/** The problem a failed series reports; too little data is a verdict of its own, not a problem. */
export function problemOf(f: IngestFailure): Problem | null {
  if (f.verdict !== 'error') return null;
  const e = f.error;
  return {
    kind: e.kind === 'config' ? 'config' : 'data',
    message: e.message,
    file: e.file,
    line: e.line,
    column: e.column,
    keyPath: e.keyPath,
    metric: f.metric.name,
  };
}

/** A series result with nothing analysed yet: the metric's settings, the given fields, empty findings. */
function blankFindings(
  m: MetricPlan,
  fields: Pick<SeriesResult, 'name' | 'file' | 'column' | 'key' | 'season' | 'seasonSource'> &
    Partial<SeriesFindings>,
): SeriesFindings {
  // Field order as in docs/design.md's results format; `rest` fills in the others.
  const { name, file, column, key, unit, season, seasonSource, incidents, ...rest } = fields;
  return {
    name,
    metric: m.name,
    file,
    column,
    key,
    ...(unit !== undefined ? { unit } : {}),
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
    ...(incidents !== undefined ? { incidents } : {}),
    limit: null,
    history: [],
    residuals: [],
    notes: [],
    ...rest,
  };
}

/** An analysed series: the engine's analysis, the checked observations and the limit, for the results. */
export function analysedFindings(
  base: SeriesFindings,
  s: Series,
  a: Analysis,
  found: {
    checked: CheckedObservation[];
    /** The model that judged the checked rows (fitted before them), or null when none were checked. */
    judge: { fit: Fit; checks: ResidualChecks } | null;
    limit: LimitResult | null;
    horizon: number;
    notes: string[];
    /** Points of history kept, and whether per-step backtest measures are (the `fullHistory` option). */
    cap: number;
    full: boolean;
  },
): SeriesFindings {
  const notes = [...found.notes];
  // One sigma and one set of residual checks: those of the model that judged the checked rows.
  const judge = found.judge;
  const fit = judge?.fit ?? a.chosen;
  return {
    ...base,
    method: a.chosen.method,
    intervalKind: a.forecast.kind,
    sigma: finiteOrNull(significant(fit.sigma)),
    sigmaDf: fit.sigmaDf,
    forecast: forecastPoints(a, s, found.horizon),
    residualChecks: summariseChecks(judge?.checks ?? a.checks, judge ? 'before-checked' : 'all', fit.n),
    backtest: summariseBacktest(a, found.full),
    checked: found.checked.map((c) => ({ ...c, ...labelAt(s, c.index) })),
    limit: found.limit,
    ...chartData(s, a, found.checked[0]?.index, notes, found.cap),
    notes,
  };
}

/** A draft and its verdict as a series of the results (key order as in the results format: verdict
 * and reason before notes, position last). */
function shapeSeries(d: SeriesDraft, v: Pick<SeriesResult, 'verdict' | 'reason'>): SeriesResult {
  const { notes, ...rest } = d.findings;
  return keepDetailMark(d.findings, {
    ...rest,
    ...v,
    notes,
    ...(d.position !== undefined ? { position: d.position } : {}),
  });
}

/** A draft without its charts and tables (withoutDetail). */
export function leanDraft(d: SeriesDraft, shared?: Map<string, string>): SeriesDraft {
  return { ...d, findings: withoutDetail(d.findings, shared) };
}

/**
 * A series in full once its run is concluded: its charts and tables from the draft the analysis made
 * (`full`), and what concluding the run decided from the lean series (`settled`, concludeRun's for the
 * same draft made lean): the adjusted checked observations, whether it is judged, verdict and reason.
 * The same result as concluding the full draft itself, key order included.
 */
export function settleFull(full: SeriesDraft, settled: SeriesResult): SeriesResult {
  const f = full.findings;
  f.checked = settled.checked;
  if (settled.judged !== undefined) f.judged = settled.judged;
  return shapeSeries(full, { verdict: settled.verdict, reason: settled.reason });
}

/**
 * What a run concludes once every series is analysed, the same for a single run and for a merge of
 * shards: run-wide false-alarm control over every checked observation of every series (so the
 * adjusted p-values and alarms are those of the whole run; sets `adjustedP` and `alarm` in place),
 * then each series' verdict (decided once, here, unless ingestion or the engine already decided it),
 * the summary, the run's verdict and the gate.
 */
export function concludeRun(
  drafts: readonly SeriesDraft[],
  o: { metrics: number; falseAlarms: FalseAlarmControl; failOn: FailOn },
): Pick<Results, 'verdict' | 'gate' | 'summary' | 'series'> {
  const alarms = settleRunAlarms(
    drafts.map((d) => d.findings),
    o.falseAlarms,
  );
  const series: SeriesResult[] = drafts.map((d) => shapeSeries(d, d.decided ?? seriesVerdict(d.findings)));
  // Series a pull request leaves alone (judged: false) count for neither the verdict nor the gate.
  const judged = series.filter(isJudged);
  const summary: Results['summary'] = {
    metrics: o.metrics,
    series: series.length,
    alarms: alarms.alarms,
    atRisk: judged.filter((r) => r.limit?.atRisk).length,
    insufficient: judged.filter((r) => r.verdict === 'too-short').length,
    errors: judged.filter((r) => r.verdict === 'error').length,
    checkedObservations: alarms.checkedObservations,
    expectedFalseAlarms: alarms.expectedFalseAlarms,
    falseAlarms: o.falseAlarms,
  };
  return { verdict: runVerdict(judged), gate: decideGate(o.failOn, summary), summary, series };
}

type Scope = NonNullable<Results['scope']>;

/**
 * The run's scope. In a pull request (`newRows`: each changed metric file's line count at the base
 * commit) only the series of the files it changes are judged, unless the config asks for all: the
 * others are analysed (a limit at risk elsewhere is still worth a line) but not gated, so this marks
 * them `judged: false` in place. Returns the rows each changed file gained (`added`: files new in the
 * pull request). Outside a pull request every series is judged on its newest observations.
 */
export function pullRequestScope(
  drafts: readonly SeriesDraft[],
  gate: Scope['gate'],
  newRows: Record<string, number> | undefined,
  addedFiles: readonly string[] = [],
): Scope {
  if (!newRows) return { kind: 'latest', files: [], gate: 'all' };
  const lastRow = new Map<string, number>();
  for (const { findings: r } of drafts) {
    const changed = Object.hasOwn(newRows, r.file);
    if (gate === 'changed') r.judged = changed;
    const row = r.history.at(-1)?.row ?? null;
    if (row !== null && changed) lastRow.set(r.file, Math.max(row, lastRow.get(r.file) ?? 0));
  }
  const added = new Set(addedFiles);
  const files = [...lastRow.entries()].map(([file, row]) => ({
    file,
    rows: Math.max(0, row - newRows[file]!),
    added: added.has(file),
  }));
  return { kind: 'pull-request', files: byFile(files), gate };
}

/** The scope of a run from its shards': each shard saw the rows added to the files of its own series,
 * so the run's list is their union (a file's count is the same in every shard that has it). */
export function mergedScope(scopes: readonly (Scope | undefined)[]): Scope | undefined {
  const known = scopes.filter((x): x is Scope => x !== undefined);
  if (known.length === 0) return undefined;
  const files = new Map<string, Scope['files'][number]>();
  for (const sc of known)
    for (const f of sc.files) {
      const had = files.get(f.file);
      files.set(f.file, had ? { ...had, rows: Math.max(had.rows, f.rows), added: had.added || f.added } : f);
    }
  return { kind: known[0]!.kind, files: byFile([...files.values()]), gate: known[0]!.gate };
}

function byFile<T extends { file: string }>(files: T[]): T[] {
  return files.sort((a, b) => (a.file < b.file ? -1 : a.file > b.file ? 1 : 0));
}

/** History (and the residuals aligned with it) for charts: the last HISTORY_CAP points, reaching back
 * to the first checked observation when a pull request adds more rows than that. */
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
  const known = new Set((s.incidents ?? []).map((x) => x.index));
  for (let i = start; i < s.values.length; i++) {
    const v = s.values[i]!;
    history.push({
      index: i,
      row: s.rows[i]! > 0 ? s.rows[i]! : null,
      time: timeAtIndex(s, i),
      value: Number.isNaN(v) ? null : v,
      ...labelAt(s, i),
      ...(known.has(i) ? { incident: true as const } : {}),
    });
  }
  return history;
}

/**
 * The draft with its per-level records rebuilt by levelRecord: a draft that crossed from a worker
 * thread was rebuilt by the structured clone, which gives each record V8's large indexed storage
 * again (about 1.2 KB instead of 0.2 KB). The same values.
 */
export function compactDraft(d: SeriesDraft): SeriesDraft {
  const f = d.findings;
  const again = (r: LevelMap): LevelMap => levelRecord(Object.keys(r).map(Number), (l) => r[levelKey(l)]!);
  for (const p of f.forecast) {
    p.lower = again(p.lower);
    p.upper = again(p.upper);
  }
  for (const mb of Object.values(f.backtest?.methods ?? {}))
    for (const kind of Object.keys(mb.coverage) as (keyof typeof mb.coverage)[])
      mb.coverage[kind] = again(mb.coverage[kind]!);
  return d;
}

function forecastPoints(a: Analysis, s: Series, horizon: number): ForecastPoint[] {
  const out: ForecastPoint[] = [];
  const fc = a.forecast;
  for (let h = 1; h <= Math.min(horizon, fc.horizon); h++) {
    // Digits below a ten-thousandth of the standard error carry nothing (numeric.ts toScale).
    const se = fc.se[h - 1]!;
    const levels = fc.bands.map((b) => b.level);
    const lower = levelRecord(levels, (_, k) => toScale(fc.bands[k]!.lower[h - 1]!, se));
    const upper = levelRecord(levels, (_, k) => toScale(fc.bands[k]!.upper[h - 1]!, se));
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
    residuals: c.residuals,
  };
}

function measures(x: Omit<StepMeasures, 'step'>): MeasureSet {
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
      coverage[kind] = levelRecord(Object.keys(levels).map(Number), (l) => significant(levels[levelKey(l)]!));
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

export function countObserved(v: Float64Array): number {
  let n = 0;
  for (let i = 0; i < v.length; i++) if (!Number.isNaN(v[i]!)) n++;
  return n;
}

export function lastObserved(v: Float64Array): number {
  for (let i = v.length - 1; i >= 0; i--) if (!Number.isNaN(v[i]!)) return v[i]!;
  return NaN;
}

function finiteOrNull(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}
