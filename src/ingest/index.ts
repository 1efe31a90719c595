// CSV files -> Series on a regular grid. Each distinct file is read once (streamed, see read.ts) even
// when several metrics use it. Problems that concern one metric (a missing column, a non-numeric
// cell, too few rows …) become an IngestFailure for that metric, column or key, and every other
// metric still runs; ingest() itself only throws for internal faults.
import path from 'node:path';
import { performance } from 'node:perf_hooks';
import type { MetricPlan, Plan } from '../config/types.js';
import { durationToSteps } from '../config/duration.js';
import { LeadlineError } from '../errors.js';
import type { Series } from './types.js';
import { resolveFiles } from './files.js';
import { describeMs, describeStep, gridIndex, gridTime, inferSpacing, type GridSpec } from './grid.js';
import {
  CellStatus,
  MAX_MAGNITUDE,
  readTable,
  type ColumnRoles,
  type Table,
  type TimeColumn,
} from './read.js';
import {
  MAX_TIME_MS,
  MIN_TIME_MS,
  numberTimeUnit,
  numberToMs,
  TimeKind,
  type NumberTimeUnit,
  type TimeFormat,
} from './times.js';
import { agree, displayName, nearest, plural, shorten, visible } from '../text/index.js';

export { autoSeason, chooseSeason, type SeasonChoice } from './season.js';
export { resolveFiles } from './files.js';

export interface IngestFailure {
  metric: MetricPlan;
  /** The value column concerned, or null when the whole metric failed. */
  column: string | null;
  key: string | null;
  error: LeadlineError;
  verdict: 'too-short' | 'error';
}

export interface IngestOutcome {
  series: Series[];
  failures: IngestFailure[];
  /** Distinct files read. */
  filesRead: number;
  /** Wall time of ingestion in ms: resolving files, reading and parsing them, building the grids. */
  parseMs: number;
}

/** Fewest observations (non-missing values) a series needs; fewer gives "too short". */
export const MIN_OBSERVATIONS = 3;

/** A grid may hold at most this many points per observed row (beyond a floor), so a stray date cannot blow it up. */
const GRID_SLACK = 50;
const GRID_FLOOR = 10_000;

export async function ingest(plan: Plan, cwd: string): Promise<IngestOutcome> {
  const started = performance.now();
  const series: Series[] = [];
  const failures: IngestFailure[] = [];

  const resolved: { metric: MetricPlan; files: string[] }[] = [];
  const wanted = new Map<string, Map<string, ColumnRoles>>();
  for (const metric of plan.metrics) {
    let files: string[];
    try {
      files = await resolveFiles(metric.file, cwd);
    } catch (e) {
      if (!(e instanceof LeadlineError)) throw e;
      failures.push({ metric, column: null, key: null, error: e, verdict: 'error' });
      continue;
    }
    resolved.push({ metric, files });
    for (const f of files) {
      const roles = wanted.get(f) ?? new Map<string, ColumnRoles>();
      wanted.set(f, roles);
      const add = (name: string, role: keyof ColumnRoles) => {
        const r = roles.get(name) ?? { value: false, time: false, key: false, text: false };
        r[role] = true;
        roles.set(name, r);
      };
      if (metric.time !== null) add(metric.time, 'time');
      if (metric.key !== null) add(metric.key, 'key');
      if (metric.label !== null) add(metric.label, 'text');
      if (metric.incidentColumn !== null) add(metric.incidentColumn, 'text');
      for (const v of metric.values) add(v, 'value');
    }
  }

  // Each file is read when a metric first needs it and let go after the last metric using it, so
  // the tables held at once are those still needed (usually one), never every file's.
  const lastUse = new Map<string, number>();
  resolved.forEach(({ files }, k) => files.forEach((f) => lastUse.set(f, k)));
  const tables = new Map<string, Table | LeadlineError>();
  const read = async (file: string): Promise<Table | LeadlineError> => {
    try {
      return await readTable(path.join(path.resolve(cwd), file), file, wanted.get(file)!);
    } catch (e) {
      if (!(e instanceof LeadlineError)) throw e;
      return e;
    }
  };
  let filesRead = 0;
  for (const [k, { metric, files }] of resolved.entries()) {
    for (const file of files) {
      let t = tables.get(file);
      if (t === undefined) {
        tables.set(file, (t = await read(file)));
        filesRead++;
      }
      if (t instanceof LeadlineError)
        failures.push({ metric, column: null, key: null, error: t, verdict: 'error' });
      else buildMetric(metric, t, files.length > 1, series, failures, plan.configPath);
    }
    for (const file of files) if (lastUse.get(file) === k) tables.delete(file);
  }
  return { series, failures, filesRead, parseMs: performance.now() - started };
}

/** Errors that mean "too little data" rather than "bad data". */
const insufficient = new WeakSet<LeadlineError>();

function tooFew(message: string, file: string): LeadlineError {
  const e = new LeadlineError('data', message, { file });
  insufficient.add(e);
  return e;
}

function verdictOf(e: LeadlineError): IngestFailure['verdict'] {
  return insufficient.has(e) ? 'too-short' : 'error';
}

function columnList(header: string[]): string {
  return header.length === 0 ? '(none)' : header.map((h) => visible(JSON.stringify(shorten(h)))).join(', ');
}

function missingColumn(t: Table, role: string, name: string): LeadlineError {
  const header = t.header!;
  const near = nearest(name, header);
  const hint = near !== null ? ` Did you mean "${visible(near)}"?` : '';
  return new LeadlineError(
    'data',
    `The ${role} column "${visible(name)}" is not in the header; the columns are: ${columnList(header)}.${hint}`,
    {
      file: t.file,
      line: t.headerLine,
    },
  );
}

function quoteCell(text: string): string {
  const s = text.length > 40 ? `${text.slice(0, 37)}…` : text;
  return visible(JSON.stringify(s));
}

interface TimeInfo {
  ms: Float64Array;
  notes: string[];
}

const timeCache = new WeakMap<Table, Map<string, TimeInfo | LeadlineError>>();

const FORMAT_WORDS: Record<Exclude<TimeFormat, 'auto'>, string> = {
  iso: 'an ISO 8601 date or datetime',
  yyyymmdd: 'a YYYYMMDD date',
  year: 'a year (four digits)',
  'epoch-seconds': 'a number of epoch seconds',
  'epoch-milliseconds': 'a number of epoch milliseconds',
};
const FORMAT_UNIT: Partial<Record<TimeFormat, NumberTimeUnit>> = {
  yyyymmdd: 'yyyymmdd',
  year: 'years',
  'epoch-seconds': 'seconds',
  'epoch-milliseconds': 'milliseconds',
};

/** The time column in epoch ms, or the error that makes it unusable. `format` is the metric's timeFormat. */
function timesOf(
  t: Table,
  index: number,
  name: string,
  format: TimeFormat = 'auto',
): TimeInfo | LeadlineError {
  let cache = timeCache.get(t);
  if (!cache) timeCache.set(t, (cache = new Map()));
  const cacheKey = `${index}:${format}`;
  const hit = cache.get(cacheKey);
  if (hit) return hit;
  const col = t.times.get(index)!;
  const where = (row: number) => ({ file: t.file, line: t.lines[row]!, column: index + 1 });
  const stated = format === 'auto' ? '' : ` (timeFormat: ${format})`;
  const notForm = (r: number) =>
    new LeadlineError(
      'data',
      `The time ${quoteCell(col.invalidText.get(r) ?? cellText(col, r))} in column "${visible(name)}" is not ${FORMAT_WORDS[format as Exclude<TimeFormat, 'auto'>]}${stated}.`,
      where(r),
    );
  let result: TimeInfo | LeadlineError | null = null;
  let firstIso = -1;
  let firstNumber = -1;
  let naive = false;
  for (let r = 0; r < t.rowCount && result === null; r++) {
    const k = col.kind[r]!;
    if (k === TimeKind.Blank) {
      result = new LeadlineError(
        'data',
        `The time in column "${visible(name)}" is blank; every row needs a time.`,
        where(r),
      );
    } else if (k === TimeKind.Invalid) {
      result =
        format === 'auto'
          ? new LeadlineError(
              'data',
              `The time ${quoteCell(col.invalidText.get(r) ?? '')} in column "${visible(name)}" is not an ISO 8601 date or datetime (e.g. 2024-03-01 or 2024-03-01T12:00:00Z) or an epoch number.`,
              where(r),
            )
          : notForm(r);
    } else if (k === TimeKind.Number) {
      if (format === 'iso') result = notForm(r);
      if (firstNumber < 0) firstNumber = r;
    } else {
      if (format !== 'auto' && format !== 'iso') result = notForm(r);
      if (firstIso < 0) firstIso = r;
      if (k === TimeKind.Naive) naive = true;
    }
    if (result === null && firstIso >= 0 && firstNumber >= 0) {
      const [a, b] = firstIso < firstNumber ? [firstIso, firstNumber] : [firstNumber, firstIso];
      result = new LeadlineError(
        'data',
        `Column "${visible(name)}" mixes time forms: line ${t.lines[a]} has ${col.kind[a] === TimeKind.Number ? 'a number' : 'an ISO 8601 time'}, this line ${col.kind[b] === TimeKind.Number ? 'a number' : 'an ISO 8601 time'}; use one form throughout.`,
        where(b),
      );
    }
  }
  if (result === null) {
    const notes: string[] = [];
    let ms = col.raw;
    if (firstNumber >= 0) {
      const unit = FORMAT_UNIT[format] ?? numberTimeUnit(col.raw, t.rowCount);
      ms = new Float64Array(t.rowCount);
      for (let r = 0; r < t.rowCount; r++) ms[r] = numberToMs(col.raw[r]!, unit);
      if (format === 'auto')
        notes.push(
          unit === 'years'
            ? `The times in "${visible(name)}" are four-digit numbers, read as years.`
            : unit === 'yyyymmdd'
              ? `The times in "${visible(name)}" are 8-digit numbers, read as calendar dates (YYYYMMDD); set timeFormat to say otherwise.`
              : `The times in "${visible(name)}" are numbers, read as epoch ${unit} (${unit === 'seconds' ? 'all below' : 'some at or above'} 1e11); set timeFormat to say otherwise.`,
        );
    }
    let early = -1;
    for (let r = 0; r < t.rowCount && result === null; r++) {
      const v = ms[r]!;
      if (Number.isNaN(v)) result = notForm(r);
      else if (!(v >= MIN_TIME_MS && v <= MAX_TIME_MS))
        result = new LeadlineError(
          'data',
          `The time ${quoteCell(cellText(col, r))} in column "${visible(name)}" is outside the years 0001–9999${firstNumber >= 0 ? ' as read (a number in other units? set timeFormat)' : ''}.`,
          where(r),
        );
      else if (early < 0 && v < EARLY_MS) early = r;
    }
    if (result === null) {
      if (early >= 0)
        notes.push(
          `Some times in "${visible(name)}" are before the year 1000 (line ${t.lines[early]}: ${new Date(ms[early]!).toISOString().slice(0, 10)}); they were read as written.`,
        );
      if (naive) notes.push(`Times in "${visible(name)}" without a UTC offset were read as UTC.`);
      result = { ms, notes };
    }
  }
  cache.set(cacheKey, result);
  return result;
}

/** Start of the year 1000: earlier times are read as written, with a note. */
const EARLY_MS = Date.UTC(1000, 0, 1);

/** A time cell as written, for messages (numbers from their parsed value). */
function cellText(col: TimeColumn, r: number): string {
  const text = col.invalidText.get(r);
  if (text !== undefined) return text;
  const k = col.kind[r];
  if (k === TimeKind.Number) return String(col.raw[r]);
  const iso = new Date(col.raw[r]!).toISOString();
  return k === TimeKind.Date ? iso.slice(0, 10) : k === TimeKind.Naive ? iso.slice(0, 19) : iso;
}

/** Row indices (file order) of each key value, in order of first appearance. */
function groupsOf(t: Table, m: MetricPlan): { key: string | null; rows: Int32Array }[] | LeadlineError {
  if (m.key === null) {
    const all = new Int32Array(t.rowCount);
    for (let i = 0; i < all.length; i++) all[i] = i;
    return [{ key: null, rows: all }];
  }
  const index = t.header!.indexOf(m.key);
  const col = t.keys.get(index)!;
  const counts = new Int32Array(col.names.length);
  for (let r = 0; r < t.rowCount; r++) counts[col.ids[r]!]!++;
  const blank = col.names.indexOf('');
  if (blank >= 0) {
    let r = 0;
    while (col.ids[r] !== blank) r++;
    return new LeadlineError(
      'data',
      `The key in column "${visible(m.key)}" is blank; every row of a long-format file needs a key.`,
      {
        file: t.file,
        line: t.lines[r]!,
        column: index + 1,
      },
    );
  }
  const groups = col.names.map((key, id) => ({ key, rows: new Int32Array(counts[id]!) }));
  const fill = new Int32Array(col.names.length);
  for (let r = 0; r < t.rowCount; r++) {
    const id = col.ids[r]!;
    groups[id]!.rows[fill[id]!++] = r;
  }
  return groups;
}

function seriesName(m: MetricPlan, column: string, key: string | null, file: string, multi: boolean): string {
  return `${m.name}${m.values.length > 1 ? `/${column}` : ''}${key !== null ? `[${key}]` : ''}${multi ? ` (${file})` : ''}`;
}

function buildMetric(
  m: MetricPlan,
  t: Table,
  multi: boolean,
  series: Series[],
  failures: IngestFailure[],
  configPath: string,
): void {
  const fail = (
    error: LeadlineError,
    verdict: IngestFailure['verdict'],
    column: string | null = null,
    key: string | null = null,
  ) => failures.push({ metric: m, column, key, error, verdict });
  if (t.header === null) {
    fail(
      new LeadlineError('data', 'The file is empty: no header row and no data.', { file: t.file, line: 1 }),
      'too-short',
    );
    return;
  }
  const header = t.header;
  const indexOf = (name: string): number | LeadlineError => {
    const both = t.ambiguous.get(name);
    if (both) {
      return new LeadlineError(
        'data',
        `The header has "${visible(name)}" twice (columns ${both[0]} and ${both[1]}); rename one.`,
        {
          file: t.file,
          line: t.headerLine,
          column: both[1],
        },
      );
    }
    return header.indexOf(name);
  };
  let timeIndex = -1;
  const textIndex = { label: -1, incident: -1 };
  for (const [role, name] of [
    ['time', m.time],
    ['key', m.key],
    ['label', m.label],
    ['incident', m.incidentColumn],
  ] as const) {
    if (name === null) continue;
    const i = indexOf(name);
    if (i instanceof LeadlineError) return void fail(i, 'error');
    if (i < 0) return void fail(missingColumn(t, role, name), 'error');
    if (role === 'time') timeIndex = i;
    if (role === 'label' || role === 'incident') textIndex[role] = i;
  }
  const valueIndex = new Map<string, number>();
  for (const v of m.values) {
    const i = indexOf(v);
    if (i instanceof LeadlineError) fail(i, 'error', v);
    else if (i < 0) fail(missingColumn(t, 'value', v), 'error', v);
    else valueIndex.set(v, i);
  }
  if (valueIndex.size === 0) return;
  if (t.rowCount === 0) {
    fail(
      new LeadlineError('data', 'The file has a header but no data rows.', {
        file: t.file,
        line: t.headerLine,
      }),
      'too-short',
    );
    return;
  }

  let times: TimeInfo | null = null;
  if (m.time !== null) {
    const info = timesOf(t, timeIndex, m.time, m.timeFormat);
    if (info instanceof LeadlineError) return void fail(info, 'error');
    times = info;
  }
  const groups = groupsOf(t, m);
  if (groups instanceof LeadlineError) return void fail(groups, 'error');

  for (const g of groups) {
    const layout = times ? layoutTimed(t, m, g.rows, g.key, times, timeIndex) : layoutRowOrder(g.rows);
    if (layout instanceof LeadlineError) {
      fail(layout, verdictOf(layout), null, g.key);
      continue;
    }
    const window = windowTooLong(m, layout, configPath);
    if (window) {
      fail(window, 'error', null, g.key);
      continue;
    }
    for (const [column, ci] of valueIndex) {
      const s = buildSeries(t, m, layout, column, ci, g.key, multi);
      if (s instanceof LeadlineError) {
        fail(s, verdictOf(s), column, g.key);
      } else series.push(markRows(t, m, layout, s, textIndex));
    }
  }
}

/**
 * Longest limit window in steps: a duration on fine data (180d of minutes) would otherwise be
 * hundreds of thousands of forecast steps, minutes of work and gigabytes of memory.
 */
export const MAX_WINDOW_STEPS = 10_000;

/** The error for a limit window longer than MAX_WINDOW_STEPS at this series' spacing, or null. */
function windowTooLong(m: MetricPlan, layout: Layout, configPath: string): LeadlineError | null {
  if (!m.limit) return null;
  const spacing = layout.spec?.spacing ?? 'row';
  const steps = durationToSteps(m.limit.within, spacing, layout.spec?.stepMs ?? null);
  if (steps === null || steps <= MAX_WINDOW_STEPS) return null;
  const step = layout.spec ? describeStep(layout.spec) : 'row';
  return new LeadlineError(
    'config',
    `The limit window ${m.limit.withinLabel} is ${steps} steps of one ${step} for this series; at most ${MAX_WINDOW_STEPS} are forecast. Give a shorter window.`,
    { file: configPath, line: m.line, keyPath: `${m.keyPath}.limit.within` },
  );
}

/** Where each grid point's value comes from. */
interface Layout {
  spec: GridSpec | null;
  /** Grid length. */
  n: number;
  /** Epoch ms per grid point, or null for row order. */
  times: Float64Array | null;
  /** For each occupied grid point: its index and the row indices (file order) that land on it. */
  slots: { index: number; rows: number[] }[];
  /** Rows of this group in file order (for scanning cells). */
  rows: Int32Array;
  notes: string[];
  /**
   * The CSV line each grid point's value comes from (0 for gap-filled points): which row of a slot
   * is picked depends on the slot and `duplicates` only, never on the column, so every value column
   * of the group shares one array (made by the first).
   */
  lines?: Int32Array;
}

function layoutRowOrder(rows: Int32Array): Layout {
  const slots = Array.from(rows, (r, i) => ({ index: i, rows: [r] }));
  return { spec: null, n: rows.length, times: null, slots, rows, notes: [] };
}

function layoutTimed(
  t: Table,
  m: MetricPlan,
  rows: Int32Array,
  key: string | null,
  times: TimeInfo,
  timeIndex: number,
): Layout | LeadlineError {
  const ms = times.ms;
  const notes = [...times.notes];
  const order = Array.from(rows);
  let outOfOrder = 0;
  for (let i = 1; i < order.length; i++) if (ms[order[i]!]! < ms[order[i - 1]!]!) outOfOrder++;
  if (outOfOrder > 0) {
    order.sort((a, b) => ms[a]! - ms[b]! || a - b);
    notes.push(
      `${plural(outOfOrder, 'row was', 'rows were')} out of time order in the file; the series is sorted by time.`,
    );
  }
  const distinct: number[] = [];
  for (const r of order)
    if (distinct.length === 0 || ms[r]! !== distinct[distinct.length - 1]) distinct.push(ms[r]!);
  if (order.length < MIN_OBSERVATIONS) {
    return tooFew(
      `Only ${plural(order.length, 'row')}${key !== null ? ` for key "${displayName(key)}"` : ''}; at least ${MIN_OBSERVATIONS} observations are needed.`,
      t.file,
    );
  }
  if (distinct.length < 2) {
    if (m.duplicates === 'error') return duplicateError(t, order[0]!, order[1]!, timeIndex, true, null);
    return tooFew(
      `All ${order.length} rows${key !== null ? ` for key "${displayName(key)}"` : ''} have the same time, which leaves 1 observation; at least ${MIN_OBSERVATIONS} are needed.`,
      t.file,
    );
  }
  const spec = inferSpacing(Float64Array.from(distinct));
  const t0 = distinct[0]!;
  const slots: { index: number; rows: number[] }[] = [];
  let moved = 0;
  let maxOffset = 0;
  for (const r of order) {
    const { index, offset } = gridIndex(spec, t0, ms[r]!);
    if (offset !== 0) {
      moved++;
      maxOffset = Math.max(maxOffset, Math.abs(offset));
    }
    const last = slots[slots.length - 1];
    if (last && last.index === index) {
      if (m.duplicates === 'error') {
        const prev = Math.min(...last.rows);
        return duplicateError(t, prev, r, timeIndex, ms[prev] === ms[r], spec);
      }
      last.rows.push(r);
    } else slots.push({ index, rows: [r] });
  }
  const n = slots[slots.length - 1]!.index + 1;
  if (n > Math.max(GRID_FLOOR, GRID_SLACK * slots.length)) {
    let gap = 1;
    for (let i = 1; i < slots.length; i++)
      if (slots[i]!.index - slots[i - 1]!.index > slots[gap]!.index - slots[gap - 1]!.index) gap = i;
    const a = Math.max(...slots[gap - 1]!.rows);
    const b = Math.min(...slots[gap]!.rows);
    return new LeadlineError(
      'data',
      `The times span ${n} steps of one ${describeStep(spec)} for only ${slots.length} rows: the gap between line ${t.lines[a]} and this line is ${slots[gap]!.index - slots[gap - 1]!.index} steps. Check the time column.`,
      { file: t.file, line: t.lines[b]!, column: timeIndex + 1 },
    );
  }
  const merged = order.length - slots.length;
  if (merged > 0) {
    const how = m.duplicates === 'mean' ? 'their values averaged' : `the ${m.duplicates} row kept`;
    notes.push(
      `${plural(merged, 'row')} fell on a time already taken; ${how} (duplicates: ${m.duplicates}).`,
    );
  }
  if (moved > 0) {
    notes.push(
      `${plural(moved, 'time was', 'times were')} off the ${describeStep(spec)} grid and moved to the nearest grid point (at most ${describeMs(maxOffset)}).`,
    );
  }
  if (n > slots.length) {
    const gaps = n - slots.length;
    notes.push(
      `${plural(gaps, `missing ${describeStep(spec)}`)} in the time grid ${agree(gaps, 'is', 'are')} treated as missing values.`,
    );
  }
  const grid = new Float64Array(n);
  for (let i = 0; i < n; i++) grid[i] = gridTime(spec, t0, i);
  return { spec, n, times: grid, slots, rows, notes };
}

function duplicateError(
  t: Table,
  a: number,
  b: number,
  timeIndex: number,
  exact: boolean,
  spec: GridSpec | null,
): LeadlineError {
  const [first, second] = a < b ? [a, b] : [b, a];
  const what =
    exact || !spec
      ? 'have the same time'
      : `fall on the same point of the time grid (one point every ${describeStep(spec)})`;
  return new LeadlineError(
    'data',
    `Lines ${t.lines[first]} and ${t.lines[second]} ${what}; remove one, or set "duplicates" to first, last or mean.`,
    { file: t.file, line: t.lines[second]!, column: timeIndex + 1 },
  );
}

function buildSeries(
  t: Table,
  m: MetricPlan,
  layout: Layout,
  column: string,
  ci: number,
  key: string | null,
  multi: boolean,
): Series | LeadlineError {
  const col = t.values.get(ci)!;
  let blanks = 0;
  for (const r of layout.rows) {
    const st = col.status[r]!;
    if (st === CellStatus.TooLarge) {
      return new LeadlineError(
        'data',
        `The value ${quoteCell(col.invalidText.get(r) ?? '')} in column "${visible(column)}" is too large for the statistics (beyond ±${MAX_MAGNITUDE.toExponential()}).`,
        { file: t.file, line: t.lines[r]!, column: ci + 1 },
      );
    }
    if (st === CellStatus.Invalid) {
      const text = col.invalidText.get(r);
      return new LeadlineError(
        'data',
        `The cell ${text === undefined ? '' : `${quoteCell(text)} `}in column "${visible(column)}" is not a number (expected e.g. 12.5 or -3e4, with "." for decimals).`,
        { file: t.file, line: t.lines[r]!, column: ci + 1 },
      );
    }
    if (st === CellStatus.Blank) {
      if (m.blanks === 'error') {
        return new LeadlineError(
          'data',
          `The cell in column "${visible(column)}" is blank; fill it, or set "blanks: missing" to read blanks as missing values.`,
          {
            file: t.file,
            line: t.lines[r]!,
            column: ci + 1,
          },
        );
      }
      blanks++;
    }
  }
  const values = new Float64Array(layout.n).fill(NaN);
  const shared = layout.lines;
  const rows = shared ?? new Int32Array(layout.n);
  for (const slot of layout.slots) {
    let pick: number;
    let v: number;
    if (slot.rows.length === 1) {
      pick = slot.rows[0]!;
      v = col.numbers[pick]!;
    } else if (m.duplicates === 'mean') {
      pick = Math.max(...slot.rows);
      let sum = 0;
      let count = 0;
      for (const r of slot.rows) {
        const x = col.numbers[r]!;
        if (!Number.isNaN(x)) {
          sum += x;
          count++;
        }
      }
      v = count > 0 ? sum / count : NaN;
    } else {
      pick = m.duplicates === 'first' ? Math.min(...slot.rows) : Math.max(...slot.rows);
      v = col.numbers[pick]!;
    }
    values[slot.index] = v;
    if (!shared) rows[slot.index] = t.lines[pick]!;
  }
  let observed = 0;
  for (let i = 0; i < values.length; i++) if (!Number.isNaN(values[i]!)) observed++;
  if (observed < MIN_OBSERVATIONS) {
    return tooFew(
      `Only ${plural(observed, 'observation')} in column "${visible(column)}"${key !== null ? ` for key "${displayName(key)}"` : ''}; at least ${MIN_OBSERVATIONS} are needed.`,
      t.file,
    );
  }
  layout.lines = rows;
  const notes = [...layout.notes];
  if (blanks > 0)
    notes.push(`${plural(blanks, 'blank cell was', 'blank cells were')} read as missing (blanks: missing).`);
  return {
    name: seriesName(m, column, key, t.file, multi),
    metric: m.name,
    file: t.file,
    column,
    key,
    spacing: layout.spec?.spacing ?? 'row',
    times: layout.times,
    values,
    rows,
    stepMs: layout.spec?.stepMs ?? null,
    notes,
  };
}

/**
 * A series with its row labels (the `label` column) and known incidents (the incident column's
 * non-empty cells and the config's ranges), with a note for each range that matches no row.
 */
function markRows(
  t: Table,
  m: MetricPlan,
  layout: Layout,
  s: Series,
  textIndex: { label: number; incident: number },
): Series {
  const text = (col: number, r: number): string => {
    const c = t.keys.get(col)!;
    return c.names[c.ids[r]!]!;
  };
  let labels: string[] | null = null;
  if (textIndex.label >= 0) {
    labels = new Array<string>(layout.n).fill('');
    for (const slot of layout.slots) {
      const row = slot.rows.find((r) => t.lines[r] === s.rows[slot.index]) ?? slot.rows.at(-1)!;
      labels[slot.index] = text(textIndex.label, row);
    }
  }
  const reasons = new Map<number, string>();
  if (textIndex.incident >= 0)
    for (const slot of layout.slots) {
      const marked = slot.rows.find((r) => text(textIndex.incident, r) !== '');
      if (marked !== undefined && !Number.isNaN(s.values[slot.index]!))
        reasons.set(slot.index, text(textIndex.incident, marked));
    }
  const notes = [...s.notes];
  if (layout.times)
    for (const range of m.incidents) {
      let matched = 0;
      for (let i = 0; i < layout.n; i++) {
        const ms = layout.times[i]!;
        if (ms < range.from || ms > range.to || Number.isNaN(s.values[i]!)) continue;
        matched++;
        if (!reasons.has(i)) reasons.set(i, range.reason);
      }
      if (matched === 0)
        notes.push(
          `The known incident ${range.written} (${range.keyPath}) matches no row of this series; check its times.`,
        );
    }
  const incidents = [...reasons.entries()]
    .sort((a, b) => a[0] - b[0])
    .map(([index, reason]) => ({ index, reason }));
  return { ...s, notes, labels, incidents };
}
