// "Did you mean …?" for config keys and values, command-line flags, Action inputs, CSV columns and
// files: one rule for when a near word is worth suggesting.
import { closest, distance } from 'fastest-levenshtein';

/**
 * The option nearest to `word` when it is near enough to be a likely slip (case-insensitive edit
 * distance below both lengths and within a third of the word's length, at least 2), or else the one
 * option that starts with it or that it starts with (at least 3 characters each: "tracking" for
 * "tracking-issue", "latency" for "latency_ms"); null otherwise.
 */
export function nearest(word: string, options: readonly string[]): string | null {
  if (options.length === 0 || word === '') return null;
  const w = word.toLowerCase();
  const lower = options.map((o) => o.toLowerCase());
  const best = closest(w, lower);
  const d = distance(w, best);
  if (d < Math.min(w.length, best.length) && d <= Math.max(2, Math.floor(w.length / 3)))
    return options[lower.indexOf(best)]!;
  const prefix = options.filter((_o, i) => {
    const l = lower[i]!;
    return w.length >= 3 && l.length >= 3 && l !== w && (l.startsWith(w) || w.startsWith(l));
  });
  return prefix.length === 1 ? prefix[0]! : null;
}

/** ` Did you mean "x"?` (with a leading space), or '' when nothing is near. */
export function didYouMean(word: string, options: readonly string[]): string {
  const near = nearest(word, options);
  return near === null ? '' : ` Did you mean "${near}"?`;
}
