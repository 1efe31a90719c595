// Mermaid XY charts (`xychart-beta`, the keyword older renderers know) for the markdown report.
// Built only from finite numbers written as plain decimals (Mermaid's grammar has no exponents) and
// labels Leadline makes itself or passes through mermaidLabel; a chart that cannot be built from
// valid numbers is left out rather than drawn wrong.
import type { SeriesResult } from '../results.js';
import { mermaidLabel } from './escape.js';
import { num, shortWhen, when } from './format.js';

/** Points of history before the forecast. */
export const CHART_HISTORY = 30;
/** Forecast steps drawn. */
export const CHART_FORECAST = 14;

/** Colours of the lines in order: observed/forecast, upper bound, lower bound, limit. */
const PALETTE = ['#2563eb', '#d97706', '#d97706', '#6b7280'];

/**
 * A finite number as a plain decimal with at most 6 significant digits, or null when it cannot be
 * written that way (not finite, or too large for plain notation).
 */
export function mermaidNumber(x: number | null | undefined): string | null {
  if (x === null || x === undefined || !Number.isFinite(x) || Math.abs(x) >= 1e15) return null;
  if (x === 0 || Math.abs(x) < 1e-9) return '0';
  const digits = Math.max(0, Math.min(12, 5 - Math.floor(Math.log10(Math.abs(x)))));
  const s = x.toFixed(digits);
  const t = s.includes('.') ? s.replace(/0+$/, '').replace(/\.$/, '') : s;
  return t === '-0' ? '0' : t;
}

export interface MermaidChart {
  source: string;
  legend: string;
}

/** The chart for one series, or null when it has no forecast or its numbers are not all finite. */
export function mermaidChart(s: SeriesResult): MermaidChart | null {
  if (s.forecast.length === 0 || s.history.length === 0) return null;
  const level = String(s.alarmLevel);
  const firstChecked = s.checked.length > 0 ? Math.min(...s.checked.map((c) => c.index)) : Infinity;
  // Enough history to show every checked observation and a little before it.
  let from = Math.max(0, s.history.length - CHART_HISTORY);
  const firstCheckedPos = s.history.findIndex((h) => h.index === firstChecked);
  if (firstCheckedPos >= 0) from = Math.max(0, Math.min(from, firstCheckedPos - 5));
  from = Math.max(from, s.history.length - 2 * CHART_HISTORY);
  const hist = s.history.slice(from);
  const fc = s.forecast.slice(0, CHART_FORECAST);
  const checked = new Map(s.checked.map((c) => [c.index, c]));

  // Missing observations are drawn at the previous value (XY charts have no gaps).
  let carried: number | null = hist.find((h) => h.value !== null && Number.isFinite(h.value))?.value ?? null;
  if (carried === null) return null;
  let filled = 0;
  const observed: number[] = [];
  for (const h of hist) {
    if (h.value !== null && Number.isFinite(h.value)) carried = h.value;
    else filled++;
    observed.push(carried);
  }
  const main = [...observed, ...fc.map((f) => f.mean)];
  const upper = [
    ...hist.map((h, i) => checked.get(h.index)?.upper ?? observed[i]!),
    ...fc.map((f) => f.upper[level]!),
  ];
  const lower = [
    ...hist.map((h, i) => checked.get(h.index)?.lower ?? observed[i]!),
    ...fc.map((f) => f.lower[level]!),
  ];
  const lines = [main, upper, lower];
  if (s.limit && Number.isFinite(s.limit.value)) lines.push(main.map(() => s.limit!.value));

  const written = lines.map((l) => l.map(mermaidNumber));
  if (written.some((l) => l.some((x) => x === null))) return null;

  let lo = Infinity;
  let hi = -Infinity;
  for (const l of lines)
    for (const x of l) {
      lo = Math.min(lo, x);
      hi = Math.max(hi, x);
    }
  const pad = hi > lo ? (hi - lo) * 0.05 : Math.abs(hi) * 0.05 || 1;
  const yMin = mermaidNumber(lo - pad);
  const yMax = mermaidNumber(hi + pad);
  if (yMin === null || yMax === null) return null;

  const labels = [
    ...hist.map((h) => shortWhen(h.time, s.spacing, h.index) + (checked.has(h.index) ? ' ●' : '')),
    ...fc.map((f, i) => (f.time ? shortWhen(f.time, s.spacing, 0) : `+${f.step || i + 1}`)),
  ].map((l) => `"${l.replace(/[^0-9A-Za-z #:+./●-]/g, '')}"`);

  const title = mermaidLabel(s.name, 60, 'metric');
  const axis = mermaidLabel(s.column, 30, 'value');
  const names = ['1 observed then forecast', `2 upper ${level}% bound`, `3 lower ${level}% bound`];
  if (lines.length === 4) names.push('4 limit');
  const source = [
    `%%{init: {"themeVariables": {"xyChart": {"plotColorPalette": "${PALETTE.slice(0, lines.length).join(', ')}"}}}}%%`,
    'xychart-beta',
    `  title "${title}"`,
    `  accTitle: ${title}`,
    `  accDescr: Lines in order, ${names.join(', ')}`,
    `  x-axis [${labels.join(', ')}]`,
    `  y-axis "${axis}" ${yMin} --> ${yMax}`,
    ...written.map((l) => `  line [${l.join(', ')}]`),
  ].join('\n');

  const lastObs = hist.at(-1)!;
  const start = when(lastObs.time, s.spacing);
  const legendParts = [
    `Blue: observed values, then the point forecast${start ? ` after ${start}` : ''}`,
    `orange: the ${level}% interval bounds around the checked observations (marked ● on the axis) and the forecast`,
  ];
  if (lines.length === 4) legendParts.push(`grey: the limit, ${num(s.limit!.value, 6)}`);
  let legend = legendParts.join('; ') + '.';
  if (filled > 0)
    legend += ` ${filled} missing value${filled === 1 ? ' is' : 's are'} drawn at the previous value.`;
  return { source, legend };
}
