// Work spread over worker threads, results in input order.
//
// A task kind is a name and a handler (`defineTask`). The module that defines one is also the
// worker's script: the pool starts `new Worker(script)` with the kind in workerData, and when that
// module is loaded in such a worker, defineTask answers the pool's messages instead of returning
// a local function. Inside the bundles the script is the bundle itself, so the entries start their
// work only on the main thread (`isMainThread`).
//
// Items go out one at a time to whichever worker is free, at most `window` ahead of the oldest
// unanswered one, and results are handed back in input order: the output cannot depend on the
// number of workers or on which finished first, and at most `window` items and results are held.
import { createRequire } from 'node:module';
import os from 'node:os';
import { pathToFileURL } from 'node:url';
import { isMainThread, parentPort, Worker, workerData } from 'node:worker_threads';
import { LeadlineError } from './errors.js';

/** Worker threads used when no number is given: one per core the process may use. */
export function defaultJobs(): number {
  return Math.max(1, os.availableParallelism());
}

export interface TaskKind<I, T, R> {
  name: string;
  /** The module defining the task, loaded as the worker's script (pass `new URL(import.meta.url)`). */
  script: URL;
  /** Runs one item on this thread. */
  run: (init: I, item: T) => R;
}

interface WorkerInput {
  leadlineTask: string;
  init: unknown;
}

/**
 * Defines a task kind. When this module was loaded as the script of a pool worker for `name`, the
 * worker serves it from here on.
 */
export function defineTask<I, T, R>(
  name: string,
  script: URL,
  run: (init: I, item: T) => R,
): TaskKind<I, T, R> {
  const data = workerData as WorkerInput | undefined;
  if (!isMainThread && parentPort && data?.leadlineTask === name) {
    const port = parentPort;
    const init = data.init as I;
    port.on('message', (msg: { id: number; item: T }) => {
      try {
        port.postMessage({ id: msg.id, ok: true, value: run(init, msg.item) });
      } catch (e) {
        port.postMessage({
          id: msg.id,
          ok: false,
          error: e instanceof Error ? (e.stack ?? e.message) : String(e),
        });
      }
    });
  }
  return { name, script, run };
}

/** True on a pool worker thread (the entries start nothing there). */
export function isPoolWorker(): boolean {
  return !isMainThread && (workerData as WorkerInput | undefined)?.leadlineTask !== undefined;
}

export interface PoolOptions<I> {
  /** Worker threads; 1 runs every item on this thread, without workers. */
  jobs: number;
  /** Data every worker receives once (structured-cloned). */
  init: I;
  /** Items in flight or waiting to be handed back, at most (default 8 per worker). */
  window?: number;
}

/**
 * Runs `kind` over `items` with `jobs` worker threads and calls `onResult` with each result in input
 * order. Items are taken from the iterable only as workers become free, so a lazy iterable is never
 * read far ahead.
 */
export async function runPool<I, T, R>(
  kind: TaskKind<I, T, R>,
  items: Iterable<T>,
  o: PoolOptions<I>,
  onResult: (result: R, index: number) => void,
): Promise<void> {
  if (o.jobs <= 1) {
    let i = 0;
    for (const item of items) onResult(kind.run(o.init, item), i++);
    return;
  }
  const window = Math.max(o.jobs, o.window ?? 8 * o.jobs);
  const source = items[Symbol.iterator]();
  const done = new Map<number, R>();
  const workers: Worker[] = [];
  let next = 0; // index of the next item to send
  let handed = 0; // index of the next result to hand back
  let exhausted = false;
  let failure: Error | null = null;

  await new Promise<void>((resolve, reject) => {
    const finish = (e: Error | null): void => {
      if (failure) return;
      if (e) failure = e;
      for (const w of workers) void w.terminate();
      if (e) reject(e);
      else resolve();
    };
    const feed = (w: Worker): boolean => {
      if (exhausted || next - handed >= window) return false;
      const r = source.next();
      if (r.done) {
        exhausted = true;
        return false;
      }
      w.postMessage({ id: next++, item: r.value });
      return true;
    };
    const idle: Worker[] = [];
    const start = (): void => {
      while (idle.length > 0 && feed(idle[idle.length - 1]!)) idle.pop();
      if (exhausted && handed === next) finish(null);
    };
    for (let k = 0; k < o.jobs; k++) {
      const w = startWorker(kind.script, { leadlineTask: kind.name, init: o.init });
      workers.push(w);
      w.on('message', (msg: { id: number; ok: boolean; value?: R; error?: string }) => {
        if (failure) return;
        if (!msg.ok) return finish(new Error(`analysis worker failed: ${msg.error}`));
        done.set(msg.id, msg.value as R);
        try {
          while (done.has(handed)) {
            const value = done.get(handed)!;
            done.delete(handed);
            onResult(value, handed++);
          }
        } catch (e) {
          return finish(e instanceof Error ? e : new Error(String(e)));
        }
        idle.push(w);
        start();
      });
      w.on('error', (e) => finish(e));
      w.on('exit', (code) => {
        if (code !== 0 && !failure) finish(new Error(`an analysis worker stopped (exit code ${code})`));
      });
      idle.push(w);
    }
    start();
  });
}

/**
 * A worker running `script`, with the parent's Node options. A bundle runs as it is; a TypeScript
 * module (tests and benchmarks run the sources) is loaded after registering tsx's loader in the
 * worker, since loader hooks are registered per thread.
 */
function startWorker(script: URL, data: WorkerInput): Worker {
  if (!script.pathname.endsWith('.ts')) return new Worker(script, { workerData: data });
  const tsx = pathToFileURL(createRequire(import.meta.url).resolve('tsx/esm/api')).href.replace(
    /\.cjs$/,
    '.mjs',
  );
  const boot = `import(${JSON.stringify(tsx)}).then((api) => { api.register(); return import(${JSON.stringify(script.href)}); });`;
  return new Worker(boot, { eval: true, workerData: data });
}

/**
 * A number of worker threads as written on the command line (`--jobs`) or as the Action's `jobs`
 * input: a whole number of at least 1, or `auto` (or empty) for one per core.
 */
export function parseJobs(raw: string, label: string): number {
  const v = raw.trim().toLowerCase();
  if (v === '' || v === 'auto') return defaultJobs();
  if (/^\d+$/.test(v) && Number(v) >= 1 && Number(v) <= 1024) return Number(v);
  throw new LeadlineError(
    'usage',
    `${label}: "${raw}" is not a number of worker threads; give a whole number from 1 to 1024, or auto (one per core).`,
  );
}
