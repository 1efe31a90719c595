// The one pipeline both entries call: config -> ingest -> analyse -> alarms -> results.
// Reading the config and the CSVs happens here (through src/config and src/ingest); everything after
// ingestion is pure and goes through buildResults, which tests call directly. Each step belongs to
// the stage named beside it; this file only calls them in order.
import path from 'node:path';
import { serialize } from 'node:v8';
import { adoptDefaults, backtestFor, defaultsOf, fileHash, loadPlan } from './config/index.js';
import type { MetricPlan, Plan } from './config/types.js';
import { analyse } from './engine/index.js';
import { chooseSeason, ingest, type IngestOutcome } from './ingest/index.js';
import type { Series } from './ingest/types.js';
import { assessLimit, checkObservations } from './alarms/index.js';
import { checkScope, limitWindow, withoutIncidents } from './alarms/scope.js';
import {
  analysedFindings,
  baseFindings,
  compactDraft,
  concludeRun,
  leanDraft,
  settleFull,
  countObserved,
  failedDraft,
  lastObserved,
  problemOf,
  pullRequestScope,
  seriesName,
  type SeriesDraft,
} from './outcome.js';
import type { FailOn, Origin, Problem, Results, RunOutput, SeriesResult } from './results.js';
import { RESULTS_SCHEMA_ID } from './results.js';
import { defaultJobs, defineTask, runPool } from './pool.js';
import { shardOf, type Shard } from './shard.js';
import { fileSpool, memorySpool, type Spool } from './spool.js';
import { timeAfterLast, timeAtIndex } from './time.js';
import { VERSION } from './version.js';

export { HISTORY_CAP } from './outcome.js';
import { HISTORY_CAP } from './outcome.js';

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
  /** Pull-request mode: the files in newRows that the pull request adds (only their last row is new). */
  addedFiles?: string[];
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

/**
 * A run, concluded. Each series went to a spool (src/spool.ts) as soon as it was analysed; the run
 * holds only what concluding needs, so a fleet of any size fits in memory. Call close() when done.
 */
export interface JobRun extends RunOutput {
  /** Every verdict and count; the series without their charts and tables (results.ts withoutDetail). */
  lean: Results;
  /** The full series in the run's order, read again from the spool, with what concluding decided. */
  series: () => Generator<SeriesResult>;
  /** The whole run in memory. */
  full: () => Results;
  /** Removes the spool. */
  close: () => void;
}

/** The whole job: config, ingest, analysis (worker threads), alarms and results. */
export async function startJob(o: JobOptions): Promise<JobRun> {
  const plan = await loadPlan(o.configPath, o.cwd); // config
  const configHash = await fileHash(path.resolve(o.cwd, o.configPath));
  const outcome = await ingest(plan, o.cwd); // ingest
  const analysed = await analyseFleet(plan, outcome, o); // analyse (in worker threads)
  try {
    return finishResults(plan, outcome, analysed, { ...o, configHash }); // alarms, results
  } catch (e) {
    analysed.spool.close();
    throw e;
  }
}

/** The whole job's results in memory (a small run, tests). */
export async function runJob(o: JobOptions): Promise<Results> {
  const run = await startJob(o);
  try {
    return run.full();
  } finally {
    run.close();
  }
}

type BuildOptions = Pick<
  JobOptions,
  | 'failOn'
  | 'newRows'
  | 'addedFiles'
  | 'baseNote'
  | 'onProgress'
  | 'now'
  | 'shard'
  | 'commit'
  | 'event'
  | 'fullHistory'
> & { configHash?: string | null };

/** Pure: the plan and what ingestion produced -> Results, on this thread, in memory. */
export function buildResults(plan: Plan, outcome: IngestOutcome, o: BuildOptions): Results {
  const init = analyseInit(plan, o);
  const todo = toAnalyse(plan, outcome, o.shard);
  const analysed = keepAnalysed(memorySpool<SeriesDraft>(), todo, outcome);
  todo.forEach((item, done) => {
    analysed.add(analyseItem(init, item));
    o.onProgress?.(done + 1, todo.length);
  });
  return finishResults(plan, outcome, analysed, o).full();
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

/** One series' analysis. */
function analyseItem(init: AnalyseInit, item: AnalyseItem): SeriesDraft {
  if (!adopted.has(init)) {
    adoptDefaults(init.plan, init.defaulted);
    adopted.add(init);
  }
  return analyseSeries(item.series, init.plan.metrics[item.metric]!, init);
}

/**
 * An analysed series as the analysis hands it over: its lean form, and the whole draft already
 * serialised for the spool (src/spool.ts), so a worker thread's result crosses to the main thread
 * as bytes plus a small object, and the main thread never rebuilds nor serialises the whole draft.
 */
interface Packed {
  lean: SeriesDraft;
  bytes: Uint8Array;
}

/** One series' analysis, on this thread or in a worker thread (this module is the worker's script). */
const analyseTask = defineTask(
  'analyse',
  new URL(import.meta.url),
  (init: AnalyseInit, item: AnalyseItem): Packed => {
    const draft = analyseItem(init, item);
    return { lean: leanDraft(draft), bytes: serialize(draft) };
  },
);

/** Series fewer than this per worker thread are not worth a thread's start-up. */
export const SERIES_PER_WORKER = 20;

/**
 * What the analysis hands on: each series in full in a spool, and without its charts and tables
 * (outcome.ts leanDraft) in memory, both in the run's order.
 */
export interface Analysed {
  drafts: SeriesDraft[];
  spool: Spool<SeriesDraft>;
  add: (draft: SeriesDraft) => void;
  /** The same for a draft the analysis task packed (its lean form made, the whole serialised). */
  addPacked: (packed: Packed) => void;
  /** Each analysed series' place among the series ingestion read. */
  positions: number[];
  /** How many series ingestion read. */
  seriesRead: number;
}

function keepAnalysed(
  spool: Spool<SeriesDraft>,
  todo: readonly AnalyseItem[],
  outcome: IngestOutcome,
): Analysed {
  const drafts: SeriesDraft[] = [];
  const notes = new Map<string, string>();
  return {
    drafts,
    spool,
    positions: todo.map((t) => t.position),
    seriesRead: outcome.series.length,
    add(d) {
      spool.add(d);
      drafts.push(leanDraft(d, notes));
    },
    addPacked(p) {
      spool.addSerialized(p.bytes);
      // Made lean again here: the mark and the run's shared notes are this thread's.
      drafts.push(leanDraft(p.lean, notes));
    },
  };
}

/**
 * The series this run (or shard) analyses, in the run's order, by `jobs` worker threads (fewer for
 * a small fleet; none for one). The same results whatever the number: each series is analysed alone,
 * with its own seed, and results are handed back in input order. Each goes to a spool on disk as it
 * comes (the caller closes it, through the JobRun finishResults makes). The series are taken out of
 * `outcome` (its list is emptied), so each one's points are let go once it is analysed.
 */
export async function analyseFleet(
  plan: Plan,
  outcome: IngestOutcome,
  o: Pick<JobOptions, 'newRows' | 'onProgress' | 'jobs' | 'shard' | 'fullHistory'>,
): Promise<Analysed> {
  const todo: (AnalyseItem | undefined)[] = toAnalyse(plan, outcome, o.shard);
  const count = todo.length;
  const jobs = Math.min(o.jobs ?? defaultJobs(), Math.floor(count / SERIES_PER_WORKER));
  const analysed = keepAnalysed(fileSpool<SeriesDraft>(), todo as AnalyseItem[], outcome);
  outcome.series.length = 0;
  // Each item is handed out once and forgotten here, so its series can be collected once analysed.
  function* handOut(): Generator<AnalyseItem> {
    for (let k = 0; k < count; k++) {
      const item = todo[k]!;
      todo[k] = undefined;
      yield item;
    }
  }
  try {
    await runPool(analyseTask, handOut(), { jobs, init: analyseInit(plan, o) }, (r, i) => {
      analysed.addPacked(r);
      o.onProgress?.(i + 1, count);
    });
  } catch (e) {
    analysed.spool.close();
    throw e;
  }
  return analysed;
}

/**
 * The analysed series (analyseFleet's, in its order) and ingestion's failures -> the concluded run:
 * run-wide alarm control, verdicts, summary and gate (concludeRun) over the lean series, and for a
 * shard each series' place; the full series are read back from the spool when an output asks.
 */
export function finishResults(
  plan: Plan,
  outcome: IngestOutcome,
  analysed: Analysed,
  o: BuildOptions,
): JobRun {
  // Every series of the run in the run's order (analysed ones, then the ones that could not be read);
  // a shard keeps its own, remembering each one's place so a merge restores the order.
  const shard = o.shard && o.shard.count > 1 ? o.shard : null;
  const mine = ownShard(shard);
  const failed = outcome.failures
    .map((f, j) => ({ f, i: analysed.seriesRead + j }))
    .filter(({ f }) => mine(seriesName(f.metric, f.column, f.key)));
  const placed = (d: SeriesDraft, k: number): SeriesDraft =>
    shard ? { ...d, position: analysed.positions[k]! } : d;
  const failedDrafts = failed.map(({ f, i }) => ({ ...failedDraft(f), ...(shard ? { position: i } : {}) }));
  const drafts: SeriesDraft[] = [...analysed.drafts.map(placed), ...failedDrafts.map((d) => leanDraft(d))];
  const problems = failed
    .map(({ f, i }) => {
      const p = problemOf(f);
      return p && shard ? { ...p, position: i } : p;
    })
    .filter((p): p is Problem => p !== null);

  // pull-request scope: which files' series are judged, and the rows each changed file gained
  const scope = pullRequestScope(drafts, plan.pullRequestGate, o.newRows, o.addedFiles);
  // alarms (run-wide false-alarm control) and results: verdicts, summary, gate
  const { series, verdict, gate, summary } = concludeRun(drafts, {
    metrics: plan.metrics.length,
    falseAlarms: plan.falseAlarms,
    failOn: o.failOn,
  });
  const lean: Results = {
    $schema: RESULTS_SCHEMA_ID,
    version: 1,
    generator: { name: 'leadline', version: VERSION },
    generatedAt: (o.now ?? new Date()).toISOString(),
    config: plan.configPath,
    origin: {
      configHash: o.configHash ?? null,
      commit: o.commit ?? null,
      shard: shard ? { ...shard, series: analysed.seriesRead + outcome.failures.length } : null,
      event: o.event ?? null,
    },
    verdict,
    gate,
    summary,
    series,
    problems,
  };
  if (o.baseNote) lean.notes = [o.baseNote];
  lean.scope = scope;

  // The full series: the analysed ones from the spool, then the failed ones (small, kept here).
  const settled = (d: SeriesDraft, k: number): SeriesResult =>
    settleFull(k < analysed.drafts.length ? placed(d, k) : d, series[k]!);
  const inFull = (wanted: ReadonlySet<number>): Results => {
    const out = [...series];
    // Held, unlike the stream's: per-level records rebuilt small (the deserialiser makes them large).
    const fromSpool = new Set([...wanted].filter((k) => k < analysed.drafts.length));
    for (const [k, d] of analysed.spool.readSome(fromSpool)) out[k] = settled(compactDraft(d), k);
    failedDrafts.forEach((d, j) => {
      const k = analysed.drafts.length + j;
      if (wanted.has(k)) out[k] = settled(d, k);
    });
    return { ...lean, series: out };
  };
  return {
    lean,
    *series() {
      let k = 0;
      for (const d of analysed.spool.read()) yield settled(d, k++);
      for (const d of failedDrafts) yield settled(d, k++);
    },
    detailed: async (wanted) => inFull(wanted),
    full: () => inFull(new Set(series.keys())),
    close: () => analysed.spool.close(),
  };
}

/** One series through the stages: season (ingest), analysis (engine), checks and limit (alarms), shape (results). */
function analyseSeries(
  s: Series,
  m: MetricPlan,
  o: Pick<AnalyseInit, 'newRows' | 'fullHistory'>,
): SeriesDraft {
  const cap = o.fullHistory ? Infinity : HISTORY_CAP;
  const notes = [...s.notes];
  const season = chooseSeason(m.season, s, countObserved(s.values));
  if (season.note) notes.push(season.note);
  const methods = season.season > 1 ? m.methods : m.methods.filter((x) => x !== 'seasonal-naive');
  if (methods.length < m.methods.length)
    notes.push('Seasonal naive left out: the series has no season (season 1), where it equals naive.');
  const base = baseFindings(s, m, season, notes, cap);
  if (methods.length === 0)
    return {
      findings: base,
      decided: { verdict: 'error', reason: 'No method left to fit: seasonal naive needs a season above 1.' },
    };

  const window = limitWindow(m.limit, s);
  if (window.note) notes.push(window.note);
  // Known incidents are missing values to the statistics (and drawn, listed, never judged).
  const y = withoutIncidents(s);
  const a = analyse(y, {
    season: season.season,
    methods,
    horizon: Math.max(m.horizon, window.within ?? 0),
    levels: m.levels,
    intervals: m.intervals,
    backtest: backtestFor(m, season.season),
    score: m.score,
    paths: m.paths,
    seed: m.seed,
  });
  if (!a.ok)
    return {
      findings: { ...base, notes: [...notes, ...a.notes] },
      decided: { verdict: 'too-short', reason: a.reason },
    };
  notes.push(...a.notes.filter((n) => !notes.includes(n)));

  const scope = checkScope(s, m.check.last, o.newRows);
  notes.push(...scope.notes);
  const check = checkObservations({
    values: y,
    rows: s.rows,
    timeAt: (i) => timeAtIndex(s, i),
    analysis: a,
    options: m,
    season: season.season,
    indices: scope.indices,
  });
  notes.push(...check.notes);
  const limit =
    m.limit && window.within !== null
      ? assessLimit({
          fit: a.chosen,
          forecast: a.forecast,
          lastValue: lastObserved(y),
          limit: m.limit,
          within: window.within,
          paths: m.paths,
          seed: m.seed,
          timeAtStep: (h) => timeAfterLast(s, h),
        })
      : null;
  return {
    findings: analysedFindings(base, s, a, {
      checked: check.checked,
      judge: check.judge,
      limit,
      horizon: m.horizon,
      notes,
      cap,
      full: o.fullHistory,
    }),
    decided: null,
  };
}
