// Splitting a run into shards: which series a shard judges. A series belongs to shard
// 1 + (h mod n), where h is the first 48 bits of the SHA-256 of its name's UTF-8 bytes: the same on
// every machine and Node version, whatever the order of files or rows, and even in expectation
// (each shard gets about 1/n of the series).
import { createHash } from 'node:crypto';
import { LeadlineError } from './errors.js';

/** Shard `index` (1-based) of `count`. */
export interface Shard {
  index: number;
  count: number;
}

/** Most shards a run can be split into (an Actions matrix holds at most 256 jobs). */
export const MAX_SHARDS = 256;

/** Parses "i/n" (e.g. "2/4"); `what` names the flag or input in the error. */
export function parseShard(text: string, what: string): Shard {
  const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(text);
  const index = m ? Number(m[1]) : NaN;
  const count = m ? Number(m[2]) : NaN;
  if (!m || count < 1 || count > MAX_SHARDS || index < 1 || index > count)
    throw new LeadlineError(
      'usage',
      `${what}: "${text}" is not a shard; expected i/n with 1 ≤ i ≤ n ≤ ${MAX_SHARDS}, e.g. 2/4 for the second of four.`,
    );
  return { index, count };
}

/** The shard (1-based) a series of this name belongs to when a run is split into `count`. */
export function shardOf(name: string, count: number): number {
  if (count <= 1) return 1;
  const digest = createHash('sha256').update(name, 'utf8').digest();
  return 1 + (digest.readUIntBE(0, 6) % count);
}

/** "2/4". */
export function shardLabel(s: Shard): string {
  return `${s.index}/${s.count}`;
}
