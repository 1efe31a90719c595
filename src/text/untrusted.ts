// Untrusted text (file names, metric names, column names, key values, CSV cells, config keys) on its
// way to a person: shown with invisible characters escaped, shortened for display, and never able to
// act as a GitHub workflow command in the log.

/**
 * Characters that are invisible or change how the text around them is shown: control characters,
 * bidirectional embeddings, overrides, isolates and marks (the "Trojan Source" characters), zero-width
 * spaces and joiners that are not part of a script, the byte-order mark, line and paragraph separators,
 * soft hyphens, Hangul fillers and interlinear annotation marks. Zero-width (non-)joiners stay: scripts
 * and emoji need them.
 */
const INVISIBLE =
  // eslint-disable-next-line no-control-regex -- matching control characters is the point
  /[\u0000-\u0009\u000b-\u001f\u007f-\u009f\u00ad\u061c\u115f\u1160\u180e\u200b\u200e\u200f\u2028-\u202e\u2060-\u2064\u2066-\u206f\u3164\ufeff\uffa0\ufff9-\ufffb]/g;
const INVISIBLE_WITH_NEWLINE = new RegExp(INVISIBLE.source.replace('\\u000b', '\\u000a\\u000b'), 'g');

const SHORT: Record<string, string> = { '\t': '\\t', '\n': '\\n', '\r': '\\r' };

function escapeOne(c: string): string {
  return SHORT[c] ?? `\\u${c.charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')}`;
}

/**
 * `text` with every invisible or direction-changing character written out as an escape (`\n`, `\t`,
 * `\u202E`), so what a person reads is what the text holds. With `keepNewlines`, line breaks stay
 * (for multi-line messages written by Leadline itself).
 */
export function visible(text: string, keepNewlines = false): string {
  return String(text).replace(keepNewlines ? INVISIBLE : INVISIBLE_WITH_NEWLINE, escapeOne);
}

/** Longest name shown in reports and messages, in characters; longer ones are cut in the middle. */
export const DISPLAY_MAX = 80;

/**
 * `text` cut to at most `max` characters for display, keeping its start and end (so two long key
 * values that differ at the end stay apart) and saying how long it was. Results keep the whole text.
 */
export function shorten(text: string, max = DISPLAY_MAX): string {
  const chars = [...String(text)];
  if (chars.length <= max) return String(text);
  const note = ` (${chars.length} characters)`;
  const room = Math.max(8, max - note.length - 1);
  const head = Math.ceil((room * 2) / 3);
  const tail = room - head;
  return `${chars.slice(0, head).join('')}…${chars.slice(chars.length - tail).join('')}${note}`;
}

/** A name as it is shown: invisible characters escaped, then shortened. */
export function displayName(text: string, max = DISPLAY_MAX): string {
  return shorten(visible(text), max);
}

/**
 * Text for the job log (stdout or stderr). The runner reads any line whose first non-blank characters
 * are `::` as a workflow command (`::stop-commands::`, `::add-mask::`, `::error::` …); such a line gets a
 * backslash in front of its `::`, which a person reads past and markdown hides. `atLineStart` says
 * whether the text begins a line (false when it continues a line already written).
 * Every log line that carries untrusted text goes through here.
 */
export function logSafe(text: string, atLineStart = true): string {
  return String(text).replace(
    /(^|[\r\n])([ \t\f\v\u00a0\u1680\u2000-\u200a\u2028\u2029\u202f\u205f\u3000\ufeff]*)(?=::)/g,
    (m, brk: string, space: string, offset: number) =>
      offset === 0 && brk === '' && !atLineStart ? m : `${brk}${space}\\`,
  );
}

/** A writable stream (stdout, stderr) whose every write goes through logSafe, line starts tracked. */
export function safeStream<T extends { write(s: string): unknown }>(stream: T): T {
  let atLineStart = true;
  const wrapped = Object.create(stream) as T;
  wrapped.write = (s: string) => {
    const text = String(s);
    const out = logSafe(text, atLineStart);
    if (text.length > 0) atLineStart = /[\r\n]$/.test(text);
    return stream.write(out);
  };
  return wrapped;
}
