// One series per (metric, value column, key value), on a regular grid. Produced by src/ingest.
import type { Spacing } from '../terms.js';

export interface Series {
  /** Display name: metric, plus "/column" when the metric has several value columns, plus "[key]". */
  name: string;
  metric: string;
  /** File path relative to the working directory, with forward slashes. */
  file: string;
  column: string;
  key: string | null;
  spacing: Spacing;
  /** Epoch milliseconds (UTC) per point on the regular grid, or null for row order. */
  times: Float64Array | null;
  /** Values, NaN where missing (gap-filled or blank). */
  values: Float64Array;
  /** 1-based CSV line of each point (header = line 1); 0 for gap-filled points. */
  rows: Int32Array;
  /** Step between grid points in ms for fixed spacings (minute..week), null for calendar ones. */
  stepMs: number | null;
  notes: string[];
  /** Each point's label from the metric's `label` column ('' for gap-filled points), or null. */
  labels?: string[] | null;
  /** Points that are known incidents (config ranges or the incident column), by index, with why. */
  incidents?: { index: number; reason: string }[];
}
