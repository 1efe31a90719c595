// Mermaid XY charts (`xychart-beta`, the keyword older renderers know) for the markdown report.
// Built only from finite numbers written as plain decimals (Mermaid's grammar has no exponents) and
// labels Leadline makes itself or passes through mermaidLabel; a chart that cannot be built from
// valid numbers is left out rather than drawn wrong.
import type { SeriesResult } from '../results.js';
import { levelKey } from '../engine/levels.js';
import { levelLabel, mermaidLabel, num, plural, rowRef, withUnit } from '../text/index.js';
import { when } from './format.js';

/** Points of history before the forecast. */
export const CHART_HISTORY = 30;
/** Forecast steps drawn. */
export const CHART_FORECAST = 14;

/** Line colours: observed then forecast, interval bounds, limit. */
const MAIN = '#2563eb';
const BOUND = '#d97706';
const LIMIT = '#6b7280';
/** Columns marking known incidents. */
const INCIDENT = '#0f766e40';

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

/** Steps (or rows) between two points of the series, in words: "days", "hours", "rows". */
const AXIS_UNIT: Record<SeriesResult['spacing'], string> = {
  minute: 'minutes',
  hour: 'hours',
  day: 'days',
  week: 'weeks',
  month: 'months',
  quarter: 'quarters',
  year: 'years',
  row: 'rows',
};

/**
 * The chart for one series, or null when it has no forecast or its numbers are not all finite.
 *
 * The x axis is numeric: steps from the last observation (0), negative for history and positive for
 * the forecast, so the renderer picks a handful of round tick labels however many points there are.
 * Lines are drawn in order, each over the one before: the limit, the interval's upper and lower
 * bounds, and last the observed values followed by the point forecast. The bounds mean something
 * only at the checked observations (the interval each was judged against) and over the forecast;
 * before that an XY chart still needs a value, so they repeat the observed values and lie under the
 * observed line, hidden, and the caption says where they start.
 */
export function mermaidChart(s: SeriesResult): MermaidChart | null {
  if (s.forecast.length === 0 || s.history.length === 0) return null;
  const key = levelKey(s.alarmLevel);
  const level = levelLabel(s.alarmLevel);
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
    ...fc.map((f) => f.upper[key]!),
  ];
  const lower = [
    ...hist.map((h, i) => checked.get(h.index)?.lower ?? observed[i]!),
    ...fc.map((f) => f.lower[key]!),
  ];
  const hasLimit = s.limit !== null && Number.isFinite(s.limit.value);
  const lines = hasLimit ? [main.map(() => s.limit!.value), upper, lower, main] : [upper, lower, main];

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

  const lastObs = hist.at(-1)!;
  const start = when(lastObs.time, s.spacing);
  const unit = AXIS_UNIT[s.spacing];
  const zero = start ?? (lastObs.row !== null || lastObs.label ? rowRef(lastObs) : 'the last row');
  const xTitle = mermaidLabel(`${unit} from ${zero}`, 40, unit);
  const xFrom = -(hist.length - 1);
  const xTo = fc.length;

  const title = mermaidLabel(s.name, 60, 'metric');
  const axis = mermaidLabel(s.unit ? `${s.column} (${s.unit})` : s.column, 30, 'value');
  const names = [`upper ${level} bound`, `lower ${level} bound`, 'observed then forecast'];
  if (hasLimit) names.unshift('limit');
  const colours = hasLimit ? [LIMIT, BOUND, BOUND, MAIN] : [BOUND, BOUND, MAIN];
  // Known incidents: a column from the bottom of the plot up to the value, drawn first (behind the
  // lines); zero height elsewhere. XY charts have no point markers.
  const incidentCount = hist.filter((h) => h.incident).length;
  const bars =
    incidentCount > 0
      ? [...hist.map((h, i) => (h.incident ? observed[i]! : null)), ...fc.map(() => null)]
      : null;
  if (bars) {
    names.unshift('columns at known incidents');
    colours.unshift(INCIDENT);
  }
  const source = [
    `%%{init: {"themeVariables": {"xyChart": {"plotColorPalette": "${colours.join(', ')}"}}}}%%`,
    'xychart-beta',
    `  title "${title}"`,
    `  accTitle: ${title}`,
    `  accDescr: Lines in order, ${names.map((n, i) => `${i + 1} ${n}`).join(', ')}`,
    `  x-axis "${xTitle}" ${xFrom} --> ${xTo}`,
    `  y-axis "${axis}" ${yMin} --> ${yMax}`,
    ...(bars ? [`  bar [${bars.map((b) => (b === null ? yMin : mermaidNumber(b)!)).join(', ')}]`] : []),
    ...written.map((l) => `  line [${l.join(', ')}]`),
  ].join('\n');

  const checkedX = hist
    .map((h, i) => (checked.has(h.index) ? i + xFrom : null))
    .filter((x): x is number => x !== null);
  const span = (xs: number[]) =>
    xs.length === 1 ? `at ${signed(xs[0]!)}` : `from ${signed(xs[0]!)} to ${signed(xs.at(-1)!)}`;
  const one = checkedX.length === 1;
  const parts = [
    `Blue: the observed values up to ${zero} (0 on the x axis), then the point forecast for ${plural(fc.length, unit.replace(/s$/, ''))}`,
    checkedX.length > 0
      ? `orange: the ${level} interval the ${one ? 'checked observation was' : `${checkedX.length} checked observations were`} judged against (${span(checkedX)}), then the forecast's; before ${one ? 'it' : 'them'} the orange lines mean nothing and lie hidden under the blue one`
      : `orange: the forecast's ${level} interval, opening from the last observation`,
  ];
  if (hasLimit) parts.push(`grey: the limit, ${withUnit(num(s.limit!.value, 6), s.unit)}`);
  if (bars)
    parts.push(
      `teal columns: ${plural(incidentCount, 'known incident')}, left out of the statistics and never an alarm`,
    );
  let legend = parts.join('; ') + '.';
  if (filled > 0)
    legend += ` ${plural(filled, 'missing value is', 'missing values are')} drawn at the previous value.`;
  return { source, legend };
}

function signed(x: number): string {
  return x > 0 ? `+${x}` : x < 0 ? `−${-x}` : '0';
}
