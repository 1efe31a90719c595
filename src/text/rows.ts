// How a row of a metric is named in text: by its label (the metric's `label` column, e.g. a commit
// SHA) when it has one, else by its CSV line. Annotations keep the line for their location.
import { displayName } from './untrusted.js';

/** Longest label shown whole; a commit SHA is 40 characters. */
export const LABEL_MAX = 40;

/** "c0ffee1", "line 151", or "a gap-filled point": not escaped (a label is the user's text). */
export function rowRef(p: { row: number | null; label?: string | undefined }): string {
  if (p.label) return displayName(p.label, LABEL_MAX);
  return p.row !== null ? `line ${p.row}` : 'a gap-filled point';
}
