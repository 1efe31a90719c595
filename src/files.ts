// Writing Leadline's own output files. Whole or not at all: a temporary file in the same folder,
// then a rename, so a failed run never leaves half a report (and an interrupted one no temporary
// file). Inputs are never written: see InputGuard.
import { mkdir, open, rename, rm, writeFile } from 'node:fs/promises';
import { realpathSync, rmSync } from 'node:fs';
import path from 'node:path';
import picomatch from 'picomatch';
import { isDynamicPattern } from 'tinyglobby';
import { loadPlan } from './config/index.js';
import { LeadlineError } from './errors.js';
import { visible } from './text/index.js';
import { seriesForFile, type Results, type RunOutput, type SeriesResult } from './results.js';

/** Resolves a path and follows symlinks as far as they exist (the file itself may not exist yet). */
function canonical(p: string): string {
  const abs = path.resolve(p);
  try {
    return realpathSync(abs);
  } catch {
    try {
      return path.join(realpathSync(path.dirname(abs)), path.basename(abs));
    } catch {
      return abs;
    }
  }
}

/**
 * What a run may read, so that no output lands on it: the config, every file a metric's path or glob
 * names (whether it exists, matched, parsed or failed), and the files the run actually read.
 */
export class InputGuard {
  private readonly root: string;
  private readonly realRoot: string;
  private readonly config: string;
  private readonly matchers: { keyPath: string; pattern: string; test: (rel: string) => boolean }[];
  private readonly read: Set<string>;

  constructor(
    cwd: string,
    configPath: string,
    /** Each metric's `file` as configured, with its key path (e.g. "metrics[0]"). */
    readonly patterns: { keyPath: string; pattern: string }[] = [],
    read: string[] = [],
  ) {
    this.root = path.resolve(cwd);
    this.realRoot = canonical(this.root);
    this.config = canonical(path.resolve(cwd, configPath));
    this.read = new Set(read.map((f) => canonical(path.resolve(cwd, f))));
    this.matchers = patterns.map(({ keyPath, pattern }) => {
      const p = relativePattern(this.root, pattern);
      if (!isDynamicPattern(p)) return { keyPath, pattern, test: (rel: string) => rel === p };
      const m = picomatch(p, { dot: true });
      return { keyPath, pattern, test: (rel: string) => m(rel) };
    });
  }

  /** Why `target` (absolute) must not be written, or null when it is free. */
  refuses(target: string): string | null {
    const abs = path.resolve(target);
    const real = canonical(abs);
    if (real === this.config) return 'it is the config Leadline reads';
    if (this.read.has(real)) return 'it is a file this run read';
    const rels = new Set<string>();
    for (const [root, p] of [
      [this.root, abs],
      [this.realRoot, real],
    ] as const) {
      const r = path.relative(root, p);
      if (r && !r.startsWith('..') && !path.isAbsolute(r)) rels.add(r.split(path.sep).join('/'));
    }
    for (const rel of rels)
      for (const m of this.matchers)
        if (m.test(rel))
          return `it matches ${m.keyPath}.file (${JSON.stringify(visible(m.pattern))}), so a run reads it as data`;
    return null;
  }
}

/** A metric's file pattern relative to the working directory, as resolveFiles reads it. */
function relativePattern(root: string, pattern: string): string {
  let p = pattern.trim();
  if (path.isAbsolute(p)) p = path.relative(root, p);
  return path.posix.normalize(p.replace(/\\/g, '/')).replace(/^\.\//, '');
}

/** The guard for a run: the config's metric patterns when the config can be read, else the config alone. */
export async function inputGuard(cwd: string, configPath: string, read: string[] = []): Promise<InputGuard> {
  let patterns: { keyPath: string; pattern: string }[] = [];
  try {
    const plan = await loadPlan(configPath, cwd);
    patterns = plan.metrics.map((m) => ({ keyPath: m.keyPath, pattern: m.file }));
  } catch {
    // An unreadable config fails the run anyway; it is still protected itself.
  }
  return new InputGuard(cwd, configPath, patterns, read);
}

/**
 * What is wrong with each output, checked before any is written: none may be an input, and no two
 * may be the same file (the later one is refused).
 */
export function outputProblems(
  outputs: { path: string; label: string }[],
  guard: InputGuard,
): { label: string; message: string }[] {
  const problems: { label: string; message: string }[] = [];
  const seen = new Map<string, string>();
  for (const o of outputs) {
    const why = guard.refuses(o.path);
    if (why) {
      problems.push({
        label: o.label,
        message: `${o.label}: refusing to write to ${shownPath(o.path)}: ${why}.`,
      });
      continue;
    }
    const real = canonical(o.path);
    const before = seen.get(real);
    if (before)
      problems.push({
        label: o.label,
        message: `${before} and ${o.label} name the same file (${shownPath(o.path)}); give each output its own path.`,
      });
    else seen.set(real, o.label);
  }
  return problems;
}

/** outputProblems, as a LeadlineError('usage') for the first problem. */
export function checkOutputs(outputs: { path: string; label: string }[], guard: InputGuard): void {
  const first = outputProblems(outputs, guard)[0];
  if (first) throw new LeadlineError('usage', first.message);
}

function shownPath(p: string): string {
  const r = path.relative(process.cwd(), p);
  return visible(r && !r.startsWith('..') && !path.isAbsolute(r) ? r.split(path.sep).join('/') : p);
}

/** Temporary files being written; removed if the process is interrupted (SIGINT, SIGTERM). */
const pending = new Set<string>();
let handlersInstalled = false;

function removePending(): void {
  for (const f of pending) {
    try {
      rmSync(f, { force: true });
    } catch {
      // Nothing more can be done while the process ends.
    }
  }
  pending.clear();
}

function installInterruptCleanup(): void {
  if (handlersInstalled) return;
  handlersInstalled = true;
  for (const signal of ['SIGINT', 'SIGTERM'] as const) {
    const onSignal = () => {
      removePending();
      // Leave the way the signal asked: default handling, same signal.
      process.removeListener(signal, onSignal);
      process.kill(process.pid, signal);
    };
    process.on(signal, onSignal);
  }
  process.on('exit', removePending);
}

/**
 * Writes `text` to `target` atomically: to a temporary file beside it, then renamed. Refuses when
 * `guard` says `target` is an input, so a mistyped flag cannot overwrite the data.
 */
export async function writeOutput(
  target: string,
  text: string | Iterable<string> | AsyncIterable<string>,
  guard: InputGuard,
  label: string,
): Promise<string> {
  const abs = path.resolve(target);
  const why = guard.refuses(abs);
  if (why) throw new LeadlineError('usage', `${label}: refusing to write to ${shownPath(abs)}: ${why}.`);
  await mkdir(path.dirname(abs), { recursive: true });
  const tmp = `${abs}.${process.pid}.${Date.now()}.tmp`;
  installInterruptCleanup();
  pending.add(tmp);
  try {
    if (typeof text === 'string') await writeFile(tmp, text, 'utf8');
    else {
      const handle = await open(tmp, 'w');
      try {
        for await (const piece of text) await handle.write(piece);
      } finally {
        await handle.close();
      }
    }
    await rename(tmp, abs);
  } catch (e) {
    await rm(tmp, { force: true });
    throw new LeadlineError('usage', `${label}: cannot write ${shownPath(abs)}: ${(e as Error).message}`);
  } finally {
    pending.delete(tmp);
  }
  return abs;
}

/** The files a run read: every distinct metric file of the results (paths relative to cwd). */
export function filesRead(results: Results | null): string[] {
  return [...new Set((results?.series ?? []).map((s) => s.file))];
}

/**
 * The results JSON, in pieces: the run's fields pretty-printed, then one series per line inside the
 * `series` array. Parses to exactly the same value as JSON.stringify(results). Built piece by piece
 * so that a fleet of thousands of series never needs one giant string (V8 caps a string at about
 * 512 MiB), and a diff of two runs stays readable line by line. `leadline merge` reads this layout
 * line by line (src/merge.ts).
 */
export function* resultsJson(results: Results): Generator<string> {
  const { series, ...head } = results;
  yield resultsJsonHead(head);
  for (let i = 0; i < series.length; i++) yield resultsJsonSeries(series[i]!, i);
  yield resultsJsonEnd(series.length);
}

/**
 * The same text as resultsJson for a run or a merge (RunOutput): its head from the lean results, its
 * series streamed in full (a run reads them back from its spool, a merge from the shards' files), so
 * one series at a time is held.
 */
export async function* resultsJsonOf(run: RunOutput): AsyncGenerator<string> {
  const { series: _series, ...head } = run.lean;
  yield resultsJsonHead(head);
  let i = 0;
  for await (const s of run.series()) yield resultsJsonSeries(s, i++);
  yield resultsJsonEnd(i);
}

function resultsJsonHead(head: Omit<Results, 'series'>): string {
  const start = JSON.stringify(head, null, 2);
  return start.slice(0, start.length - 2) + ',\n  "series": [';
}

function resultsJsonSeries(s: SeriesResult, i: number): string {
  return (i === 0 ? '\n    ' : ',\n    ') + JSON.stringify(seriesForFile(s));
}

function resultsJsonEnd(count: number): string {
  return count > 0 ? '\n  ]\n}\n' : ']\n}\n';
}
