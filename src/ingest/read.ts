// Streaming one CSV file into compact typed columns. The file is read once, through createReadStream
// piped into csv-parse; only the columns some metric needs are kept, already parsed (numbers as
// Float64Array, times as epoch ms, keys as small integers), so a large file never sits in memory
// as text. The file is never written.
import { createReadStream } from 'node:fs';
import { Readable } from 'node:stream';
import { CsvError, parse } from 'csv-parse';
import { LeadlineError } from '../errors.js';
import { parseTimeCell, TimeKind } from './times.js';
import { plural } from '../text/index.js';

/** What a metric wants from a column. */
export interface ColumnRoles {
  value: boolean;
  time: boolean;
  key: boolean;
  /** Kept as text (a row label or an incident mark): read like a key column. */
  text?: boolean;
}

export const CellStatus = { Ok: 0, Blank: 1, Invalid: 2, TooLarge: 3 } as const;

/**
 * Largest magnitude of a value: beyond it sums of squares overflow and the statistics turn to NaN
 * (real metrics stay far below; a byte count of a zettabyte is 1e21).
 */
export const MAX_MAGNITUDE = 1e100;

export interface ValueColumn {
  numbers: Float64Array;
  status: Uint8Array;
  /** Text of invalid cells by row index (the first few thousand), for messages. */
  invalidText: Map<number, string>;
}

export interface TimeColumn {
  /** Epoch ms for ISO cells, the number as written for number cells, NaN otherwise. */
  raw: Float64Array;
  kind: Uint8Array;
  invalidText: Map<number, string>;
}

export interface KeyColumn {
  ids: Int32Array;
  /** Key text by id, in order of first appearance. */
  names: string[];
}

export interface Table {
  /** Path relative to the working directory, forward slashes. */
  file: string;
  /** Header names (trimmed); null when the file has no header (empty file). */
  header: string[] | null;
  delimiter: string;
  rowCount: number;
  /** 1-based line where each data row starts (header is line 1 unless blank lines precede it). */
  lines: Int32Array;
  headerLine: number;
  values: Map<number, ValueColumn>;
  times: Map<number, TimeColumn>;
  keys: Map<number, KeyColumn>;
  /** Header names needed by some metric but present twice: name -> both 1-based column numbers. */
  ambiguous: Map<string, [number, number]>;
}

const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const HEAD_LIMIT = 64 * 1024;
const MAX_RECORD = 1024 * 1024;
const INVALID_TEXTS = 5000;

class Grow<T extends Float64Array | Int32Array | Uint8Array> {
  data: T;
  length = 0;
  constructor(private readonly make: (n: number) => T) {
    this.data = make(1024);
  }
  push(v: number): void {
    if (this.length === this.data.length) {
      const next = this.make(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length++] = v;
  }
  done(): T {
    return this.data.subarray(0, this.length) as T;
  }
}

/** Parses a value cell: a finite number, or NaN with the status saying why. */
export function parseNumberCell(text: string): { value: number; status: number } {
  const fast = plainDecimal(text);
  if (fast === fast) return { value: fast, status: CellStatus.Ok }; // (below 2^53 in size)
  const s = text.trim();
  if (s === '') return { value: NaN, status: CellStatus.Blank };
  if (!NUMBER.test(s)) return { value: NaN, status: CellStatus.Invalid };
  const v = Number(s);
  if (!Number.isFinite(v)) return { value: NaN, status: CellStatus.Invalid };
  return Math.abs(v) > MAX_MAGNITUDE
    ? { value: NaN, status: CellStatus.TooLarge }
    : { value: v, status: CellStatus.Ok };
}

/** Exact powers of ten 10^0..10^22 (every one is a double). */
const POW10 = Array.from({ length: 23 }, (_, k) => Number(`1e${k}`));

/**
 * The value of a plain decimal cell (optional sign, digits, optional point and digits, nothing else;
 * at least one digit) whose digits as an integer N stay below 2^53 and that has at most 22 decimals,
 * or NaN for any other text (parseNumberCell then takes the general way). N and 10^k are exact
 * doubles, so N / 10^k is rounded once from the exact quotient: the double nearest the decimal,
 * which is what Number() returns (Clinger 1990, the fast path of correctly rounded decimal input).
 */
export function plainDecimal(s: string): number {
  const len = s.length;
  let i = 0;
  let c = len > 0 ? s.charCodeAt(0) : 0;
  const negative = c === 45; // '-'
  if (negative || c === 43) i++; // '+'
  let n = 0;
  let digits = 0;
  let decimals = -1; // digits after the point, -1 before it
  for (; i < len; i++) {
    c = s.charCodeAt(i);
    if (c >= 48 && c <= 57) {
      n = n * 10 + (c - 48);
      digits++;
      if (decimals >= 0) decimals++;
    } else if (c === 46 && decimals < 0)
      decimals = 0; // '.'
    else return NaN;
  }
  if (digits === 0 || n >= 2 ** 53 || decimals > 22) return NaN;
  const v = decimals > 0 ? n / POW10[decimals]! : n;
  return negative ? -v : v;
}

/** Chooses comma, semicolon or tab: whichever occurs most (outside quotes) in the header line. */
export function detectDelimiter(headerLine: string): string {
  const counts: Record<string, number> = { ',': 0, ';': 0, '\t': 0 };
  let quoted = false;
  for (const ch of headerLine) {
    if (ch === '"') quoted = !quoted;
    else if (!quoted && ch in counts) counts[ch]!++;
  }
  let best = ',';
  for (const d of [';', '\t']) if (counts[d]! > counts[best]!) best = d;
  return best;
}

/** The first non-empty line of `text` (quotes respected), or null when none is complete yet. */
function firstLine(text: string, complete: boolean): string | null {
  let quoted = false;
  let startAt = 0;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (ch === '"') quoted = !quoted;
    else if (!quoted && (ch === '\n' || ch === '\r')) {
      if (i > startAt) return text.slice(startAt, i);
      startAt = i + 1;
    }
  }
  return complete || text.length >= HEAD_LIMIT ? text.slice(startAt) : null;
}

/** Two neighbouring fields that read as one number with a decimal comma ("1", "5" -> "1,5"), or null. */
function decimalComma(record: string[]): string | null {
  for (let i = 0; i + 1 < record.length; i++) {
    const a = record[i]!.trim();
    const b = record[i + 1]!.trim();
    if (/^[+-]?\d+$/.test(a) && /^\d+$/.test(b)) return `${a},${b}`;
  }
  return null;
}

function csvMessage(e: CsvError): { message: string; line: number | null } {
  const line = typeof e.lines === 'number' ? e.lines : null;
  switch (e.code) {
    case 'CSV_QUOTE_NOT_CLOSED':
      return { message: 'A quoted field is never closed (the file ends inside quotes).', line };
    case 'CSV_INVALID_CLOSING_QUOTE':
    case 'CSV_NON_TRIMABLE_CHAR_AFTER_CLOSING_QUOTE':
      return { message: 'A quote inside a field must be doubled ("") and the field itself quoted.', line };
    case 'CSV_MAX_RECORD_SIZE':
      return { message: `A row is longer than ${MAX_RECORD} characters; is this a CSV file?`, line };
    default:
      return { message: `The file is not valid CSV: ${e.message.split('\n')[0]}`, line };
  }
}

/**
 * Reads `abs` (shown as `file`) keeping the columns named in `wanted`.
 * Throws LeadlineError('data') for unreadable files and malformed CSV (with the line).
 */
export async function readTable(abs: string, file: string, wanted: Map<string, ColumnRoles>): Promise<Table> {
  const table: Table = {
    file,
    header: null,
    delimiter: ',',
    rowCount: 0,
    lines: new Int32Array(0),
    headerLine: 1,
    values: new Map(),
    times: new Map(),
    keys: new Map(),
    ambiguous: new Map(),
  };
  const source = createReadStream(abs);
  const chunks = source[Symbol.asyncIterator]();
  let head = Buffer.alloc(0);
  let ended = false;
  let headerText: string | null = null;
  try {
    while (headerText === null) {
      const r = await chunks.next();
      if (r.done) ended = true;
      else head = Buffer.concat([head, r.value as Buffer]);
      const text = head.toString('utf8').replace(/^\uFEFF/, '');
      headerText = firstLine(text, ended);
    }
  } catch (e) {
    source.destroy();
    throw readError(e, file);
  }
  let boms = 0;
  while (head[boms * 3] === 0xef && head[boms * 3 + 1] === 0xbb && head[boms * 3 + 2] === 0xbf) boms++;
  if (boms > 1) {
    source.destroy();
    throw new LeadlineError(
      'data',
      `The file starts with ${boms} byte-order marks (U+FEFF); an editor added one too many. Remove them (save the file as UTF-8).`,
      { file, line: 1, column: 1 },
    );
  }
  if (
    head.length >= 2 &&
    ((head[0] === 0xff && head[1] === 0xfe) || (head[0] === 0xfe && head[1] === 0xff))
  ) {
    source.destroy();
    throw new LeadlineError('data', 'The file is UTF-16 encoded; save it as UTF-8.', { file, line: 1 });
  }
  if (head.subarray(0, HEAD_LIMIT).includes(0)) {
    source.destroy();
    throw new LeadlineError('data', 'The file contains NUL bytes; it does not look like a text CSV file.', {
      file,
      line: 1,
    });
  }
  if (headerText.trim() === '') {
    source.destroy();
    return table;
  }
  table.delimiter = detectDelimiter(headerText);

  const lines = new Grow((n) => new Int32Array(n));
  const valueCols: {
    index: number;
    numbers: Grow<Float64Array>;
    status: Grow<Uint8Array>;
    col: ValueColumn;
  }[] = [];
  const timeCols: {
    index: number;
    raw: Grow<Float64Array>;
    kind: Grow<Uint8Array>;
    col: TimeColumn;
    lastCell: string | null;
    last: { kind: TimeKind; value: number };
  }[] = [];
  const keyCols: { index: number; ids: Grow<Int32Array>; lookup: Map<string, number>; col: KeyColumn }[] = [];
  let width = 0;
  /** Physical line where the next record starts; CRLF inside a quoted field counts once. */
  let nextLine = 1;
  let crlfInFields = 0;

  async function* rest(): AsyncGenerator<Buffer> {
    yield head;
    if (ended) return;
    for (;;) {
      const r = await chunks.next();
      if (r.done) return;
      yield r.value as Buffer;
    }
  }

  // Empty lines are kept as records (and skipped below) and field counts are checked here, so that
  // every physical line is accounted for: csv-parse's own line counters are slow to request per
  // record and count a CRLF inside quotes twice.
  const parser = parse({
    bom: true,
    delimiter: table.delimiter,
    record_delimiter: ['\r\n', '\n', '\r'],
    skip_empty_lines: false,
    relax_column_count: true,
    max_record_size: MAX_RECORD,
  });

  const onRecord = (record: string[]): void => {
    const startLine = nextLine;
    let span = 1;
    for (const field of record) {
      if (field.indexOf('\n') < 0 && field.indexOf('\r') < 0) continue;
      for (let i = 0; i < field.length; i++) {
        const ch = field.charCodeAt(i);
        if (ch === 10) span++;
        else if (ch === 13) {
          span++;
          if (field.charCodeAt(i + 1) === 10) {
            i++;
            crlfInFields++;
          }
        }
      }
    }
    nextLine += span;
    if (record.length === 1 && record[0]!.trim() === '') return;
    if (table.header !== null && record.length !== width) {
      const comma = table.delimiter === ',' ? decimalComma(record) : null;
      throw new LeadlineError(
        'data',
        comma
          ? `This row has ${record.length} fields but the header has ${width}: "${comma}" looks like a number with a decimal comma. Write it with a point (${comma.replace(',', '.')}), or quote it ("${comma}"), or use ";" as the delimiter.`
          : `This row has ${plural(record.length, 'field')} but the header has ${width}; a value containing the delimiter ${JSON.stringify(table.delimiter)} must be quoted.`,
        { file, line: startLine },
      );
    }
    if (table.header === null) {
      table.header = record.map((h) => h.trim());
      table.headerLine = startLine;
      width = record.length;
      const firstIndex = new Map<string, number>();
      table.header.forEach((name, i) => {
        const roles = wanted.get(name);
        if (!roles) return;
        const prior = firstIndex.get(name);
        if (prior !== undefined) {
          if (!table.ambiguous.has(name)) table.ambiguous.set(name, [prior + 1, i + 1]);
          return;
        }
        firstIndex.set(name, i);
        if (roles.value) {
          const col: ValueColumn = {
            numbers: new Float64Array(0),
            status: new Uint8Array(0),
            invalidText: new Map(),
          };
          valueCols.push({
            index: i,
            numbers: new Grow((n) => new Float64Array(n)),
            status: new Grow((n) => new Uint8Array(n)),
            col,
          });
          table.values.set(i, col);
        }
        if (roles.time) {
          const col: TimeColumn = {
            raw: new Float64Array(0),
            kind: new Uint8Array(0),
            invalidText: new Map(),
          };
          timeCols.push({
            index: i,
            raw: new Grow((n) => new Float64Array(n)),
            kind: new Grow((n) => new Uint8Array(n)),
            col,
            lastCell: null,
            last: { kind: TimeKind.Blank, value: NaN },
          });
          table.times.set(i, col);
        }
        if (roles.key || roles.text) {
          const col: KeyColumn = { ids: new Int32Array(0), names: [] };
          keyCols.push({ index: i, ids: new Grow((n) => new Int32Array(n)), lookup: new Map(), col });
          table.keys.set(i, col);
        }
      });
      return;
    }
    const row = lines.length;
    lines.push(startLine);
    for (const c of valueCols) {
      const cell = record[c.index] ?? '';
      const p = parseNumberCell(cell);
      c.numbers.push(p.value);
      c.status.push(p.status);
      if (p.status >= CellStatus.Invalid && c.col.invalidText.size < INVALID_TEXTS)
        c.col.invalidText.set(row, cell);
    }
    for (const c of timeCols) {
      const cell = record[c.index] ?? '';
      // Long-format files repeat each time once per key: parse a repeated cell once.
      if (cell !== c.lastCell) {
        c.lastCell = cell;
        c.last = parseTimeCell(cell);
      }
      const p = c.last;
      c.raw.push(p.value);
      c.kind.push(p.kind);
      if (p.kind === TimeKind.Invalid && c.col.invalidText.size < INVALID_TEXTS)
        c.col.invalidText.set(row, cell);
    }
    for (const c of keyCols) {
      const cell = (record[c.index] ?? '').trim();
      let id = c.lookup.get(cell);
      if (id === undefined) {
        id = c.col.names.length;
        c.lookup.set(cell, id);
        c.col.names.push(cell);
      }
      c.ids.push(id);
    }
  };

  try {
    await new Promise<void>((resolve, reject) => {
      const input = Readable.from(rest());
      const stop = (e: unknown) => {
        input.destroy();
        parser.destroy();
        reject(e);
      };
      input.on('error', stop);
      parser.on('error', stop);
      parser.on('data', (record: string[]) => {
        try {
          onRecord(record);
        } catch (e) {
          stop(e);
        }
      });
      parser.on('end', resolve);
      input.pipe(parser);
    });
  } catch (e) {
    source.destroy();
    if (e instanceof CsvError) {
      const { message, line } = csvMessage(e);
      throw new LeadlineError('data', message, {
        file,
        line: line === null ? null : Math.max(1, line - crlfInFields),
      });
    }
    throw readError(e, file);
  }

  table.rowCount = lines.length;
  table.lines = lines.done();
  for (const c of valueCols) {
    c.col.numbers = c.numbers.done();
    c.col.status = c.status.done();
  }
  for (const c of timeCols) {
    c.col.raw = c.raw.done();
    c.col.kind = c.kind.done();
  }
  for (const c of keyCols) c.col.ids = c.ids.done();
  return table;
}

function readError(e: unknown, file: string): LeadlineError {
  if (e instanceof LeadlineError) return e;
  const code = (e as NodeJS.ErrnoException)?.code;
  if (code === 'ENOENT') return new LeadlineError('data', 'The file does not exist.', { file });
  if (code === 'EISDIR') return new LeadlineError('data', 'This is a directory, not a CSV file.', { file });
  return new LeadlineError('data', `The file cannot be read: ${(e as Error)?.message ?? String(e)}`, {
    file,
  });
}
