// Where a run keeps its analysed series between the analysis and the outputs. Each series goes out
// of memory as soon as it is analysed (a temporary file, one V8-serialised record after another: the
// same exact copy the worker threads' structured clone makes), and the outputs read them back in the
// run's order, as often as they need. The run itself keeps only what concluding needs (outcome.ts
// `withoutDetail`). A small run, and the pure pipeline the tests call, keep them in memory instead:
// the same interface, so there is one way to conclude and write a run.
import { closeSync, mkdtempSync, openSync, readSync, rmSync, writeSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { deserialize, serialize } from 'node:v8';

export interface Spool<T> {
  /** Appends one record. */
  add(value: T): void;
  /** Appends one record given as v8.serialize made it (e.g. in a worker thread); file spools only. */
  addSerialized(bytes: Uint8Array): void;
  /** Every record in the order added, read again (each call reads from the start). */
  read(): Generator<T>;
  /**
   * The records at these places (0-based, in the order added) with their places, in order; the
   * others are skipped unread (not deserialised), and reading stops after the last one asked for.
   */
  readSome(places: ReadonlySet<number>): Generator<[number, T]>;
  /** Bytes held (on disk or, for the memory spool, 0). */
  readonly bytes: number;
  /** The temporary folder holding the records, or null in memory. */
  readonly folder: string | null;
  /** Removes what the spool holds; nothing can be read afterwards. */
  close(): void;
}

/** Records are written in batches of about this many bytes. */
const BATCH_BYTES = 1 << 20;
/** Each record is its byte length (4 bytes, little-endian) and then the serialised value. */
const HEADER = 4;

/** A spool in memory (the records themselves, not copies). */
export function memorySpool<T>(): Spool<T> {
  let items: T[] | null = [];
  return {
    add: (v) => void items!.push(v),
    addSerialized: () => {
      throw new Error('internal: a memory spool holds values, not serialised records');
    },
    *read() {
      if (!items) throw new Error('internal: the spool is closed');
      yield* items;
    },
    *readSome(places) {
      if (!items) throw new Error('internal: the spool is closed');
      for (const [k, v] of items.entries()) if (places.has(k)) yield [k, v];
    },
    bytes: 0,
    folder: null,
    close: () => void (items = null),
  };
}

/**
 * A spool in a temporary folder of its own under the system's temp folder (os.tmpdir(): TMPDIR,
 * else /tmp), removed by close().
 */
export function fileSpool<T>(): Spool<T> {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'leadline-spool-'));
  const file = path.join(dir, 'series.bin');
  // A process that ends without close() (an error thrown past it) still removes the folder.
  const atExit = (): void => rmSync(dir, { recursive: true, force: true });
  process.once('exit', atExit);
  let fd: number | null = openSync(file, 'w');
  let pending: Uint8Array[] = [];
  let pendingBytes = 0;
  let written = 0;
  let closed = false;
  const flush = (): void => {
    if (pendingBytes === 0 || fd === null) return;
    const chunk = Buffer.concat(pending, pendingBytes);
    for (let at = 0; at < chunk.length;) at += writeSync(fd, chunk, at);
    written += chunk.length;
    pending = [];
    pendingBytes = 0;
  };
  const spool: Spool<T> = {
    add(value) {
      spool.addSerialized(serialize(value));
    },
    addSerialized(body) {
      if (fd === null) throw new Error('internal: the spool is closed or being read');
      const head = Buffer.allocUnsafe(HEADER);
      head.writeUInt32LE(body.length, 0);
      pending.push(head, body);
      pendingBytes += HEADER + body.length;
      if (pendingBytes >= BATCH_BYTES) flush();
    },
    *read() {
      for (const [, v] of records(null)) yield v;
    },
    readSome: (places) => records(places),
    get bytes() {
      return written + pendingBytes;
    },
    folder: dir,
    close() {
      if (closed) return;
      closed = true;
      if (fd !== null) closeSync(fd);
      fd = null;
      process.removeListener('exit', atExit);
      atExit();
    },
  };
  /** The records in order with their places: every one (`places` null) or only those in `places`. */
  function* records(places: ReadonlySet<number> | null): Generator<[number, T]> {
    if (closed) throw new Error('internal: the spool is closed');
    if (fd !== null) {
      flush();
      closeSync(fd);
      fd = null;
    }
    let last = places ? -1 : Infinity;
    for (const p of places ?? []) last = Math.max(last, p);
    if (last < 0) return;
    let k = 0; // place of the next record
    const input = openSync(file, 'r');
    try {
      let buf = Buffer.alloc(BATCH_BYTES);
      let have = 0; // bytes of buf filled
      let at = 0; // start of the next record in buf
      for (;;) {
        const room = buf.length - have;
        const got = room > 0 ? readSync(input, buf, have, room, null) : 0;
        have += got;
        while (have - at >= HEADER) {
          const size = buf.readUInt32LE(at);
          if (have - at - HEADER < size) break;
          if (!places || places.has(k))
            yield [k, deserialize(buf.subarray(at + HEADER, at + HEADER + size)) as T];
          if (++k > last) return;
          at += HEADER + size;
        }
        if (got === 0 && room > 0) break;
        // Keep the unread part at the front; grow the buffer when one record is larger than it.
        const left = have - at;
        const need = left >= HEADER ? HEADER + buf.readUInt32LE(at) : HEADER;
        const next = need > buf.length ? Buffer.alloc(need) : buf;
        buf.copy(next, 0, at, have);
        buf = next;
        have = left;
        at = 0;
      }
      if (have - at > 0) throw new Error(`internal: the spool ${file} ends inside a record`);
    } finally {
      closeSync(input);
    }
  }
  return spool;
}
