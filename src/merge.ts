// `leadline merge`: the results files of a run's shards (or one whole run's file, e.g. a fork's
// artifact) -> the run's Results, concluded exactly as a single run concludes (concludeRun in outcome.ts:
// run-wide false-alarm control over every checked observation of every shard, verdicts, summary,
// gate). Results files are untrusted input: each is read as a stream, size-capped, and every part is
// validated against the results schema (src/results.ts) before anything of it is used.
//
// Memory: the first pass keeps, per series, only what concluding needs (its checked observations and
// limit, not its charts and tables); the second pass streams the full series back in the run's order.
// Writing the merged results file therefore holds one series per file at a time; rendering a report
// needs the whole run in memory, as in a single run.
import { open, readFile, stat } from 'node:fs/promises';
import { LeadlineError } from './errors.js';
import { concludeRun, draftOf, mergedScope } from './outcome.js';
import {
  RESULTS_SCHEMA_ID,
  resultsHeadSchema,
  resultsSchema,
  seriesResultSchema,
  type FailOn,
  type Origin,
  type Problem,
  type Results,
  type SeriesResult,
  withoutDetail,
} from './results.js';
import { MAX_SHARDS, shardLabel } from './shard.js';
import { VERSION } from './version.js';
import type { z } from 'zod';
import { agree, plural } from './text/index.js';

/** Largest results file read (50,000 series at 8 KB each are 400 MB across all shards). */
export const MAX_RESULTS_FILE_BYTES = 1024 ** 3;
/** Longest line (one series, in the layout Leadline writes). */
const MAX_LINE_BYTES = 16 * 1024 ** 2;
/** A file not in Leadline's layout is read whole, and only up to this size. */
const MAX_WHOLE_BYTES = 256 * 1024 ** 2;

type Head = z.output<typeof resultsHeadSchema>;

/** What the trusted side knows about the event, checked against every file's own claim. */
export interface ExpectedEvent {
  pullRequest: number;
  /** The pull request's head commit, from the workflow_run payload. */
  head: string;
}

export interface MergeOptions {
  failOn: FailOn;
  now?: Date;
  /** Refuse files that name another pull request or head commit (fork-safe publishing). */
  expect?: ExpectedEvent;
}

export interface Merged {
  /**
   * The run's results without their series' charts and tables (results.ts withoutDetail): enough for
   * the terminal summary, the outputs and the gate.
   */
  lean: Results;
  /** The full series in the run's order, read again from the files. */
  series: () => AsyncGenerator<SeriesResult>;
  /** The merged Results with the series at these places in full, the others lean (for the reports). */
  detailed: (indices: ReadonlySet<number>) => Promise<Results>;
  /** The whole merged Results in memory. */
  full: () => Promise<Results>;
}

function refuse(file: string, message: string, line?: number): LeadlineError {
  return new LeadlineError('data', message, { file, ...(line ? { line } : {}) });
}

/** Lines of a file as a stream, each at most MAX_LINE_BYTES; yields [lineNumber, text]. */
async function* lines(file: string): AsyncGenerator<[number, string]> {
  const handle = await open(file, 'r');
  try {
    let pending: Buffer[] = [];
    let pendingBytes = 0;
    let n = 0;
    for await (const chunk of handle.createReadStream({ highWaterMark: 1 << 20 }) as AsyncIterable<Buffer>) {
      let start = 0;
      for (let i = chunk.indexOf(10); i >= 0; i = chunk.indexOf(10, start)) {
        const piece = chunk.subarray(start, i);
        const line = pendingBytes > 0 ? Buffer.concat([...pending, piece]) : piece;
        pending = [];
        pendingBytes = 0;
        if (line.length > MAX_LINE_BYTES) throw refuse(file, `line over ${MAX_LINE_BYTES} bytes`, n + 1);
        yield [++n, line.toString('utf8')];
        start = i + 1;
      }
      if (start < chunk.length) {
        pending.push(chunk.subarray(start));
        pendingBytes += chunk.length - start;
        if (pendingBytes > MAX_LINE_BYTES) throw refuse(file, `line over ${MAX_LINE_BYTES} bytes`, n + 1);
      }
    }
    if (pendingBytes > 0) yield [++n, Buffer.concat(pending).toString('utf8')];
  } finally {
    await handle.close();
  }
}

/** Why a value does not fit the schema, in one line naming the first few paths. */
function schemaProblem(error: z.ZodError): string {
  return error.issues
    .slice(0, 3)
    .map((i) => `${i.path.length > 0 ? i.path.join('.') : '(top)'}: ${i.message}`)
    .join('; ');
}

type Piece = { kind: 'head'; head: Head } | { kind: 'series'; series: SeriesResult; line: number };

/**
 * Reads one results file as a stream: the head (every field but `series`), then each series,
 * validated. Leadline writes the head pretty-printed and one series per line; a file in any other
 * JSON layout is read whole, up to MAX_WHOLE_BYTES.
 */
export async function* readResultsFile(file: string): AsyncGenerator<Piece> {
  let size: number;
  try {
    size = (await stat(file)).size;
  } catch (e) {
    throw refuse(
      file,
      `cannot read the results file: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`,
    );
  }
  if (size > MAX_RESULTS_FILE_BYTES)
    throw refuse(
      file,
      `the file is ${size} bytes; a results file is refused above ${MAX_RESULTS_FILE_BYTES} bytes.`,
    );

  // Leadline's layout: the head pretty-printed, then `  "series": [`, one series per line, `  ]`, `}`.
  // Anything else before the first series is read falls back to reading the file whole.
  const head: string[] = [];
  let pendingHead: Head | null = null;
  let state: 'head' | 'series' | 'closed' = 'head';
  let started = false;
  let layout = true;
  for await (const [n, line] of lines(file)) {
    if (state === 'head') {
      if (line === '  "series": [' || line === '  "series": []') {
        const parsed = parseJson(`${head.join('\n').replace(/,\s*$/, '')}\n}`);
        const r = parsed === undefined ? null : resultsHeadSchema.safeParse(parsed);
        if (!r?.success) {
          layout = false;
          break;
        }
        pendingHead = validHead(file, parsed);
        state = line === '  "series": [' ? 'series' : 'closed';
        if (state === 'closed') {
          started = true;
          yield { kind: 'head', head: pendingHead };
        }
      } else if (head.push(line) > 100_000) {
        layout = false;
        break;
      }
      continue;
    }
    if (state === 'closed') {
      if (line !== '}' && line !== '') throw refuse(file, 'unexpected text after the series', n);
      continue;
    }
    if (line === '  ]') {
      state = 'closed';
      if (!started) {
        started = true;
        yield { kind: 'head', head: pendingHead! };
      }
      continue;
    }
    const value = line.startsWith('    ') ? parseJson(line.slice(4).replace(/,$/, '')) : undefined;
    if (value === undefined || typeof value !== 'object') {
      if (!started) {
        layout = false;
        break;
      }
      throw refuse(file, 'not valid JSON (a series line is cut or altered)', n);
    }
    const series = validSeries(file, value, n);
    if (!started) {
      started = true;
      yield { kind: 'head', head: pendingHead! };
    }
    yield { kind: 'series', series, line: n };
  }
  if (layout && state === 'series') throw refuse(file, 'the file ends inside the series list (cut short?)');
  if (layout && state === 'closed') return;

  // Not Leadline's layout (e.g. reformatted): read whole, within a smaller cap.
  if (size > MAX_WHOLE_BYTES)
    throw refuse(
      file,
      `not in the layout Leadline writes (one series per line) and over ${MAX_WHOLE_BYTES} bytes to read whole.`,
    );
  const whole = parseJson(await readFile(file, 'utf8'));
  if (whole === undefined) throw refuse(file, 'not valid JSON.');
  schemaId(file, whole);
  const checked = resultsSchema.safeParse(whole);
  if (!checked.success) throw refuse(file, `not a Leadline results file: ${schemaProblem(checked.error)}.`);
  const { series, ...rest } = checked.data;
  yield { kind: 'head', head: rest };
  for (const s of series) yield { kind: 'series', series: s, line: 0 };
}

function parseJson(text: string): unknown {
  try {
    return JSON.parse(text) as unknown;
  } catch {
    return undefined;
  }
}

function validHead(file: string, value: unknown): Head {
  schemaId(file, value);
  const r = resultsHeadSchema.safeParse(value);
  if (!r.success) throw refuse(file, `not a valid Leadline results file: ${schemaProblem(r.error)}.`);
  return r.data;
}

/** A file that is not Leadline's results at all gets this plainer message than a list of schema paths. */
function schemaId(file: string, value: unknown): void {
  const schema = (value as { $schema?: unknown } | null)?.$schema;
  if (schema !== RESULTS_SCHEMA_ID)
    throw refuse(
      file,
      `not a Leadline results file: "$schema" is ${JSON.stringify(schema ?? null)?.slice(0, 80)}, expected "${RESULTS_SCHEMA_ID}".`,
    );
}

function validSeries(file: string, value: unknown, line: number): SeriesResult {
  const r = seriesResultSchema.safeParse(value);
  if (!r.success) throw refuse(file, `a series is not valid: ${schemaProblem(r.error)}.`, line);
  return r.data;
}

const short = (x: string | null) => (x === null ? 'none' : x.length > 24 ? `${x.slice(0, 19)}…` : x);

/** Checks that the heads come from one run and cover every shard exactly once. */
function checkHeads(files: string[], heads: Head[], expect: ExpectedEvent | undefined): void {
  const first = heads[0]!;
  const same = (label: string, get: (h: Head) => unknown, show: (h: Head) => string) => {
    for (let i = 1; i < heads.length; i++)
      if (JSON.stringify(get(heads[i]!)) !== JSON.stringify(get(first)))
        throw refuse(
          files[i]!,
          `this file comes from another run: its ${label} is ${show(heads[i]!)} where ${files[0]} has ${show(first)}. ` +
            'Merge only the files of one run (one config at one commit).',
        );
  };
  same(
    'config',
    (h) => h.config,
    (h) => JSON.stringify(h.config),
  );
  same(
    'config hash',
    (h) => h.origin.configHash,
    (h) => short(h.origin.configHash),
  );
  same(
    'commit',
    (h) => h.origin.commit,
    (h) => short(h.origin.commit),
  );
  same(
    'event',
    (h) => h.origin.event,
    (h) =>
      h.origin.event
        ? `${h.origin.event.name}${h.origin.event.pullRequest ? ` #${h.origin.event.pullRequest}` : ''} at ${short(h.origin.event.head)}`
        : 'none',
  );
  same(
    'Leadline version',
    (h) => h.generator.version,
    (h) => h.generator.version,
  );
  same(
    'false-alarm control',
    (h) => h.summary.falseAlarms,
    (h) => h.summary.falseAlarms,
  );
  same(
    'metric count',
    (h) => h.summary.metrics,
    (h) => String(h.summary.metrics),
  );
  same(
    'run notes',
    (h) => h.notes ?? [],
    () => 'different',
  );

  if (expect) {
    for (const [i, h] of heads.entries()) {
      const ev = h.origin.event;
      if (!ev || ev.pullRequest !== expect.pullRequest)
        throw refuse(
          files[i]!,
          `this file names ${ev?.pullRequest ? `pull request #${ev.pullRequest}` : 'no pull request'}, but the workflow run being published is for pull request #${expect.pullRequest}: refused, nothing is published.`,
        );
      if (!ev.head || ev.head.toLowerCase() !== expect.head.toLowerCase())
        throw refuse(
          files[i]!,
          `this file was computed at head commit ${short(ev.head)}, but the workflow run being published is for ${short(expect.head)}: refused, nothing is published.`,
        );
    }
  }

  const shards = heads.map((h) => h.origin.shard);
  if (shards.every((s) => s === null)) {
    if (heads.length > 1)
      throw refuse(
        files[1]!,
        `this file is a whole run, as is ${files[0]}: only the shards of one run can be merged.`,
      );
    return;
  }
  const whole = shards.findIndex((s) => s === null);
  if (whole >= 0)
    throw refuse(files[whole]!, 'this file is a whole run, not a shard: it cannot be merged with shards.');
  const count = shards[0]!.count;
  const seen = new Map<number, string>();
  for (const [i, s] of shards.entries()) {
    if (s!.count !== count || s!.series !== shards[0]!.series)
      throw refuse(
        files[i]!,
        `this file is shard ${shardLabel(s!)} of a run of ${s!.series} series, but ${files[0]} is shard ${shardLabel(shards[0]!)} of ${shards[0]!.series}: they come from different splits.`,
      );
    if (s!.index > count) throw refuse(files[i]!, `this file names shard ${shardLabel(s!)}.`);
    const before = seen.get(s!.index);
    if (before !== undefined)
      throw refuse(
        files[i]!,
        `this file is shard ${shardLabel(s!)}, and so is ${before}: each shard must be given once.`,
      );
    seen.set(s!.index, files[i]!);
  }
  const missing: string[] = [];
  for (let k = 1; k <= count; k++) if (!seen.has(k)) missing.push(`${k}/${count}`);
  if (missing.length > 0)
    throw new LeadlineError(
      'data',
      `${agree(missing.length, 'shard')} ${missing.slice(0, 10).join(', ')}${missing.length > 10 ? ', …' : ''} ${agree(missing.length, 'is', 'are')} missing: ` +
        `${plural(files.length, 'file')} given for a run split into ${count}. Give every shard's results file.`,
    );
}

/**
 * Reads and checks the files, and concludes the run. Throws LeadlineError('data') naming the file
 * (and line) at the first problem: a file that is not valid results, one from another run, a shard
 * missing or given twice, or (with `expect`) a file naming another pull request or head commit.
 */
export async function mergeResults(files: string[], o: MergeOptions): Promise<Merged> {
  if (files.length === 0) throw new LeadlineError('usage', 'merge: no results files given.');
  if (files.length > MAX_SHARDS)
    throw new LeadlineError(
      'usage',
      `merge: ${files.length} files given; at most ${MAX_SHARDS} shards are merged.`,
    );

  // Pass 1: heads first (everything is refused before any series is read when they disagree).
  const heads: Head[] = [];
  for (const file of files) {
    const reader = readResultsFile(file);
    const first = await reader.next();
    await reader.return(undefined); // closes the file
    if (first.done || first.value.kind !== 'head') throw refuse(file, 'this file has no results head.');
    heads.push(first.value.head);
  }
  checkHeads(files, heads, o.expect);
  const sharded = heads[0]!.origin.shard !== null;
  const total = sharded ? heads[0]!.origin.shard!.series : -1;

  // Pass 1, series: validated, kept lean, each with its place in the run.
  const all: { s: SeriesResult; place: number }[] = [];
  const taken = sharded ? new Uint8Array(total) : null;
  const fileOf: number[] = [];
  const notes = new Map<string, string>();
  for (const [f, file] of files.entries()) {
    let last = -1;
    let count = 0;
    for await (const piece of readResultsFile(file)) {
      if (piece.kind !== 'series') continue;
      count++;
      const p = piece.series.position;
      let place = all.length;
      if (taken) {
        if (p === undefined || p >= total || p <= last || taken[p])
          throw refuse(
            file,
            p === undefined
              ? `series "${piece.series.name.slice(0, 100)}" has no position in the run, as a shard's series must.`
              : `series "${piece.series.name.slice(0, 100)}" has position ${p}, ${p >= total ? `beyond the run's ${total} series` : 'out of order or taken by another shard'}.`,
            piece.line,
          );
        taken[p] = 1;
        last = p;
        place = p;
      }
      all.push({ s: withoutDetail(piece.series, notes), place });
      fileOf.push(f);
    }
    if (count !== heads[f]!.summary.series)
      throw refuse(
        file,
        `this file holds ${count} series but its summary counts ${heads[f]!.summary.series}: cut short or altered.`,
      );
  }
  if (taken && all.length !== total)
    throw new LeadlineError(
      'data',
      `the shards hold ${all.length} series but the run has ${total}: a shard's file is incomplete.`,
    );

  // The run's order: by place (sharded) or as read (a single whole file).
  const order = all.map((_, i) => i);
  if (sharded) order.sort((a, b) => all[a]!.place - all[b]!.place);
  const series = order.map((i) => all[i]!.s);
  const sourceFile = order.map((i) => fileOf[i]!);
  for (const s of series) delete s.position;

  const problems: (Problem & { position?: number })[] = heads.flatMap((h) => h.problems);
  if (sharded) problems.sort((a, b) => (a.position ?? 0) - (b.position ?? 0));
  for (const p of problems) delete p.position;

  const first = heads[0]!;
  const { series: settledSeries, ...concluded } = concludeRun(series.map(draftOf), {
    metrics: first.summary.metrics,
    falseAlarms: first.summary.falseAlarms,
    failOn: o.failOn,
  });
  const origin: Origin = { ...first.origin, shard: null };
  const leanResults: Results = {
    $schema: RESULTS_SCHEMA_ID,
    version: 1,
    generator: { name: 'leadline', version: VERSION },
    generatedAt: (o.now ?? new Date()).toISOString(),
    config: first.config,
    origin,
    ...concluded,
    problems,
    ...(first.notes ? { notes: first.notes } : {}),
    ...(first.scope ? { scope: mergedScope(heads.map((h) => h.scope))! } : {}),
    series: settledSeries,
  };

  // Pass 2: the full series, in the run's order, with what concluding decided.
  async function* fullSeries(): AsyncGenerator<SeriesResult> {
    const readers = files.map((file) => seriesOf(file));
    try {
      for (const [k, settled] of settledSeries.entries()) {
        const f = sourceFile[k]!;
        const next = await readers[f]!.next();
        if (next.done || next.value.name !== settled.name)
          throw refuse(files[f]!, 'this file changed while it was being merged.');
        const { position: _p, ...full } = next.value;
        yield { ...full, checked: settled.checked, verdict: settled.verdict, reason: settled.reason };
      }
    } finally {
      for (const r of readers) await r.return(undefined);
    }
  }

  const detailed = async (indices: ReadonlySet<number>): Promise<Results> => {
    const out = [...settledSeries];
    let k = 0;
    for await (const s of fullSeries()) {
      if (indices.has(k)) out[k] = s;
      k++;
    }
    return { ...leanResults, series: out };
  };
  return {
    lean: leanResults,
    series: fullSeries,
    detailed,
    full: () => detailed(new Set(settledSeries.keys())),
  };
}

async function* seriesOf(file: string): AsyncGenerator<SeriesResult> {
  for await (const piece of readResultsFile(file)) if (piece.kind === 'series') yield piece.series;
}
