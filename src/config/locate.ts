// Where a key path sits in the YAML text, for messages that name the line and column.
import type { LineCounter } from 'yaml';
import { isMap, isScalar, type Document } from 'yaml';

export type KeyPath = readonly (string | number)[];

export interface Position {
  line: number;
  column: number;
}

/** `metrics[2].limit.within`; keys that are not plain identifiers are quoted: `defaults["my key"]`. */
export function formatKeyPath(path: KeyPath): string {
  let out = '';
  for (const seg of path) {
    if (typeof seg === 'number') out += `[${seg}]`;
    else if (/^[A-Za-z_$][\w$-]*$/.test(seg)) out += out ? `.${seg}` : seg;
    else out += `[${JSON.stringify(seg)}]`;
  }
  return out;
}

interface Ranged {
  range?: [number, number, number] | null;
}

function start(lc: LineCounter, node: unknown): Position | null {
  const range = (node as Ranged | null)?.range;
  if (!range) return null;
  const pos = lc.linePos(range[0]);
  return { line: pos.line, column: pos.col };
}

/**
 * Position of the value at `path`, or of its nearest existing ancestor (a missing key is reported at
 * the mapping that lacks it). With `key: true`, the position of the key itself (for unknown keys).
 */
export function locate(
  doc: Document,
  lc: LineCounter,
  path: KeyPath,
  opts: { key?: boolean } = {},
): Position | null {
  if (opts.key && path.length > 0) {
    const parent = doc.getIn(path.slice(0, -1), true);
    const name = path[path.length - 1];
    if (isMap(parent)) {
      for (const pair of parent.items) {
        if (isScalar(pair.key) && pair.key.value === name) return start(lc, pair.key);
      }
    }
  }
  for (let n = path.length; n >= 0; n--) {
    const node = n === 0 ? doc.contents : doc.getIn(path.slice(0, n), true);
    const pos = start(lc, node);
    if (pos) return pos;
  }
  return { line: 1, column: 1 };
}
