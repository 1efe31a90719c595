// SVG charts for the HTML report, drawn server-side with d3-scale (domains, ranges, nice ticks, UTC
// time ticks) and d3-shape (line and area paths that skip missing values). Both are pure functions
// over numbers with no DOM, so the output is a deterministic string.
//
// Every chart is an <svg role="img"> with a <title> and <desc>; colours come from CSS classes so the
// page's light and dark palettes apply. The plot group carries its scales as data-* attributes
// (domain and range on each axis) so tests can recompute positions from the results values.
import {
  scaleLinear,
  scaleLog,
  scaleUtc,
  type ScaleLinear,
  type ScaleLogarithmic,
  type ScaleTime,
} from 'd3-scale';
import { chiSquareCdf, normalQuantile } from '../engine/dist.js';
import { area, line } from 'd3-shape';
import type { SeriesResult } from '../results.js';
import { escapeHtml as h, levelLabel, num, pval, rowRef, withUnit } from '../text/index.js';
import type { LevelView } from './view.js';
import { METHOD_LABEL, reportName, when } from './format.js';

const W = 760;
const M = { top: 14, right: 18, bottom: 30, left: 64 };

type XScale = ScaleLinear<number, number> | ScaleTime<number, number>;

/** Numbers in SVG attributes: two decimals, no exponent. */
const f = (x: number): string => (Math.round(x * 100) / 100).toString();

/**
 * Many plain dots (no tooltip of their own) as one path per class: each dot a zero-length segment
 * drawn with a round cap of diameter 2r, which looks exactly like a circle of radius r at a quarter
 * of the bytes of one <circle> each. `data-dots` says how many a path holds. Dots keep their order
 * within a class; a class's path is drawn where its first dot falls.
 */
function dots(pts: readonly { cls: string; x: number; y: number }[], r: number): string {
  const byClass = new Map<string, string[]>();
  for (const p of pts) {
    if (!Number.isFinite(p.x) || !Number.isFinite(p.y)) continue;
    const list = byClass.get(p.cls) ?? [];
    list.push(`M${f1(p.x)} ${f1(p.y)}h0`);
    byClass.set(p.cls, list);
  }
  return [...byClass.entries()]
    .map(
      ([cls, segs]) =>
        `<path class="dots ${cls}" data-dots="${segs.length}" stroke-width="${2 * r}" d="${segs.join('')}"/>`,
    )
    .join('');
}

/** A coordinate to a tenth of a pixel (dots: finer is invisible). */
const f1 = (x: number): string => (Math.round(x * 10) / 10).toString();

function isNum(x: unknown): x is number {
  return typeof x === 'number' && Number.isFinite(x);
}

function extent(values: Iterable<number | null | undefined>): [number, number] | null {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) {
    if (!isNum(v)) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  if (lo === Infinity) return null;
  if (lo === hi) {
    const pad = Math.abs(lo) * 0.05 || 1;
    return [lo - pad, hi + pad];
  }
  return [lo, hi];
}

function svgOpen(id: string, height: number, title: string, desc: string, cls: string): string {
  return (
    `<svg class="chart ${cls}" viewBox="0 0 ${W} ${height}" width="${W}" height="${height}" role="img" ` +
    `aria-labelledby="${id}-t ${id}-d" preserveAspectRatio="xMidYMid meet">` +
    `<title id="${id}-t">${h(title)}</title><desc id="${id}-d">${h(desc)}</desc>`
  );
}

function plotGroup(
  x: XScale,
  y: ScaleLinear<number, number> | ScaleLogarithmic<number, number>,
  timeAxis: boolean,
): string {
  const xd = x.domain().map((d) => +d);
  return (
    `<g class="plot" data-x-kind="${timeAxis ? 'time' : 'index'}" data-x-domain="${xd.join(',')}" ` +
    `data-x-range="${x.range().join(',')}" data-y-domain="${y.domain().join(',')}" data-y-range="${y.range().join(',')}">`
  );
}

function yAxis(y: ScaleLinear<number, number>, x0: number, x1: number): string {
  return y
    .ticks(5)
    .map((t) => {
      const yy = f(y(t));
      return `<line class="grid" x1="${x0}" x2="${x1}" y1="${yy}" y2="${yy}"/><text class="tick" x="${x0 - 6}" y="${yy}" dy="0.32em" text-anchor="end">${h(num(t))}</text>`;
    })
    .join('');
}

const MONTH_NAMES = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/** A short UTC tick label: "Oct 4", "Oct 4 14:00" for sub-daily series, "Oct 2026" for months and longer. */
function timeTick(ms: number, spacing: SeriesResult['spacing'], multiYear: boolean): string {
  const d = new Date(ms);
  const mon = MONTH_NAMES[d.getUTCMonth()]!;
  if (spacing === 'month' || spacing === 'quarter' || spacing === 'year')
    return `${mon} ${d.getUTCFullYear()}`;
  const day = `${mon} ${d.getUTCDate()}${multiYear ? ` ${d.getUTCFullYear()}` : ''}`;
  if ((spacing === 'hour' || spacing === 'minute') && (d.getUTCHours() !== 0 || d.getUTCMinutes() !== 0))
    return `${String(d.getUTCHours()).padStart(2, '0')}:${String(d.getUTCMinutes()).padStart(2, '0')}`;
  return day;
}

function xAxis(
  x: XScale,
  timeAxis: boolean,
  y0: number,
  spacing: SeriesResult['spacing'],
  labels: ReadonlyMap<number, string> = new Map(),
): string {
  const all = (x.ticks as (n: number) => (number | Date)[])(6);
  // Keep ticks at least 80px apart so labels never overlap.
  const ticks: (number | Date)[] = [];
  for (const t of all) {
    const px = x(t as number & Date);
    if (ticks.length === 0 || px - x(ticks.at(-1) as number & Date) >= 80) ticks.push(t);
  }
  const d = x.domain().map((v) => +v);
  const multiYear = timeAxis && new Date(d[0]!).getUTCFullYear() !== new Date(d[1]!).getUTCFullYear();
  return ticks
    .map((t) => {
      const xx = f(x(t as number & Date));
      const label = timeAxis ? timeTick(+t, spacing, multiYear) : rowTick(+t, labels);
      // Labels near either edge are anchored inwards so they are not cut off.
      const px = x(t as number & Date);
      const anchor = px > W - M.right - 40 ? 'end' : px < M.left + 20 ? 'start' : 'middle';
      return `<line class="axis" x1="${xx}" x2="${xx}" y1="${y0}" y2="${y0 + 4}"/><text class="tick" x="${xx}" y="${y0 + 16}" text-anchor="${anchor}">${h(label)}</text>`;
    })
    .join('');
}

/**
 * A row-order tick: the row's label (cut to 10 characters, as a short commit SHA) or its number; past
 * the last labelled row (the forecast) the steps after it, "+10".
 */
function rowTick(index: number, labels: ReadonlyMap<number, string>): string {
  const label = labels.get(index);
  if (label) return [...label].slice(0, 10).join('');
  const last = Math.max(-1, ...labels.keys());
  return labels.size > 0 && index > last ? `+${index - last}` : `#${index + 1}`;
}

/** The unit along the y axis (left of its tick labels, read bottom to top), when the series has one. */
function unitLabel(s: SeriesResult, height: number): string {
  if (!s.unit) return '';
  const mid = f((M.top + height - M.bottom) / 2);
  return `<text class="unit" transform="translate(12,${mid}) rotate(-90)" text-anchor="middle">${h(s.unit)}</text>`;
}

/** x position of a history point, a checked observation or a forecast step. */
interface Timeline {
  timeAxis: boolean;
  ofIndex: (index: number, time: string | null) => number | null;
  ofStep: (step: number, time: string | null) => number | null;
}

function timeline(s: SeriesResult): Timeline {
  const timeAxis = s.spacing !== 'row' && s.history.some((p) => p.time !== null);
  const last = s.history.at(-1);
  const lastIndex = last ? last.index : 0;
  const parse = (t: string | null) => (t === null ? null : Date.parse(t));
  if (timeAxis)
    return {
      timeAxis,
      ofIndex: (_i, t) => {
        const v = parse(t);
        return v !== null && Number.isFinite(v) ? v : null;
      },
      ofStep: (_h, t) => {
        const v = parse(t);
        return v !== null && Number.isFinite(v) ? v : null;
      },
    };
  return { timeAxis, ofIndex: (i) => i, ofStep: (step) => lastIndex + step };
}

/** Points of history in the fan chart: enough to see the checked observations in context. */
export const FAN_HISTORY = 120;

/**
 * The fan chart: history, the forecast with nested bands for every level (widest drawn first), the
 * checked observations with the interval each was judged against (alarms as red diamonds, others as
 * circles), and the limit as a line with the forecast crossing date.
 */
export function fanChart(s: SeriesResult, id: string, ascending: readonly LevelView[]): string {
  const height = 300;
  const tl = timeline(s);
  let from = Math.max(0, s.history.length - FAN_HISTORY);
  const firstChecked = s.checked.length > 0 ? Math.min(...s.checked.map((c) => c.index)) : Infinity;
  const pos = s.history.findIndex((p) => p.index === firstChecked);
  if (pos >= 0) from = Math.min(from, Math.max(0, pos - 10));
  const hist = s.history.slice(from);
  const levels = [...ascending].reverse(); // widest first
  const lastObs = [...hist].reverse().find((p) => isNum(p.value));

  const xs: number[] = [];
  const ys: number[] = [];
  const histPts = hist.map((p) => ({ x: tl.ofIndex(p.index, p.time), y: p.value }));
  for (const p of histPts) if (p.x !== null) xs.push(p.x);
  for (const p of histPts) if (isNum(p.y)) ys.push(p.y);
  const fc = s.forecast
    .map((p) => ({ p, x: tl.ofStep(p.step, p.time) }))
    .filter((q): q is { p: (typeof s.forecast)[number]; x: number } => q.x !== null && isNum(q.p.mean));
  for (const q of fc) {
    xs.push(q.x);
    ys.push(q.p.mean);
    for (const l of levels) ys.push(q.p.lower[l.key]!, q.p.upper[l.key]!);
  }
  const checked = s.checked
    .map((c) => ({ c, x: tl.ofIndex(c.index, c.time) }))
    .filter((q): q is { c: (typeof s.checked)[number]; x: number } => q.x !== null && isNum(q.c.value));
  for (const q of checked) ys.push(q.c.value, q.c.lower, q.c.upper);

  const lim = s.limit && isNum(s.limit.value) ? s.limit : null;
  let crossX: number | null = null;
  if (lim) {
    ys.push(lim.value);
    if (lim.pointCrossing) crossX = tl.ofStep(lim.pointCrossing.step, lim.pointCrossing.time);
    if (crossX !== null) xs.push(crossX);
  }
  const xe = extent(xs);
  const ye = extent(ys);
  const title = `${reportName(s.name)}: history and forecast`;
  if (!xe || !ye) {
    return `${svgOpen(id, 60, title, 'No values to draw.', 'fan')}<text class="empty" x="${W / 2}" y="34" text-anchor="middle">No values to draw.</text></svg>`;
  }
  const { x, y, X } = planeScales(tl.timeAxis, xe, ye, height);

  const out: string[] = [];
  const desc =
    `Observed values${hist.length ? ` (${hist.length} most recent)` : ''}, the ${s.method ? (METHOD_LABEL[s.method] ?? s.method) : ''} forecast ` +
    `over ${s.forecast.length} steps with ${ascending.map((l) => l.label).join(' and ')} prediction intervals` +
    (checked.length
      ? `, ${checked.length} checked observations (${checked.filter((q) => q.c.alarm).length} alarms)`
      : '') +
    (lim ? `, and the limit ${num(lim.value, 6)}` : '') +
    '.';
  out.push(svgOpen(id, height, title, desc, 'fan'));
  out.push(plotGroup(x, y, tl.timeAxis));
  out.push(yAxis(y, M.left, W - M.right));
  const labels = new Map(hist.filter((p) => p.label).map((p) => [p.index, p.label!]));
  out.push(xAxis(x, tl.timeAxis, height - M.bottom, s.spacing, labels));
  out.push(unitLabel(s, height));

  // Bands, widest first so narrower ones sit on top. Anchored at the last observation.
  const origin = lastObs ? { x: tl.ofIndex(lastObs.index, lastObs.time), v: lastObs.value! } : null;
  levels.forEach(({ key, label, value }, k) => {
    const pts = fc
      .filter((q) => isNum(q.p.lower[key]) && isNum(q.p.upper[key]))
      .map((q) => ({ x: q.x, lo: q.p.lower[key]!, hi: q.p.upper[key]! }));
    if (origin && origin.x !== null) pts.unshift({ x: origin.x, lo: origin.v, hi: origin.v });
    const d = area<{ x: number; lo: number; hi: number }>()
      .digits(1)
      .x((p) => X(p.x))
      .y0((p) => y(p.lo))
      .y1((p) => y(p.hi))(pts);
    if (d)
      out.push(
        `<path class="band band-${Math.min(k, 3)}" data-level="${value}" d="${d}"><title>${label} interval</title></path>`,
      );
  });

  const histLine = line<{ x: number | null; y: number | null }>()
    .digits(1)
    .defined((p) => p.x !== null && isNum(p.y))
    .x((p) => X(p.x!))
    .y((p) => y(p.y!))(histPts);
  if (histLine) out.push(`<path class="history" d="${histLine}"/>`);
  const meanPts = fc.map((q) => ({ x: q.x, y: q.p.mean }));
  if (origin && origin.x !== null) meanPts.unshift({ x: origin.x, y: origin.v });
  const meanLine = line<{ x: number; y: number }>()
    .digits(1)
    .x((p) => X(p.x))
    .y((p) => y(p.y))(meanPts);
  if (meanLine) out.push(`<path class="forecast" d="${meanLine}"/>`);
  if (origin && origin.x !== null)
    out.push(
      `<line class="now" x1="${f(X(origin.x))}" x2="${f(X(origin.x))}" y1="${M.top}" y2="${height - M.bottom}"/>`,
    );

  if (lim) {
    const ly = f(y(lim.value));
    out.push(
      `<line class="limit" x1="${M.left}" x2="${W - M.right}" y1="${ly}" y2="${ly}" data-limit="${lim.value}"/>` +
        `<text class="limit-label" x="${M.left + 4}" y="${ly}" dy="${lim.side === 'above' ? '-0.4em' : '1.1em'}">limit ${h(withUnit(num(lim.value, 6), s.unit))}</text>`,
    );
    if (crossX !== null && lim.pointCrossing) {
      const cx = f(X(crossX));
      const label = when(lim.pointCrossing.time, s.spacing) ?? `step ${lim.pointCrossing.step}`;
      out.push(
        `<line class="crossing" x1="${cx}" x2="${cx}" y1="${M.top}" y2="${height - M.bottom}" data-step="${lim.pointCrossing.step}"/>` +
          `<text class="limit-label" x="${cx}" y="${M.top + 10}" text-anchor="end" dx="-4">forecast crosses ${h(label)}</text>`,
      );
    }
  }

  // Known incidents: drawn with their own marker (a hollow square), with why in the tooltip.
  const reasons = new Map((s.incidents ?? []).map((x) => [x.index, x.reason]));
  for (const p of hist) {
    if (!p.incident || !isNum(p.value)) continue;
    const px = tl.ofIndex(p.index, p.time);
    if (px === null) continue;
    const tip = `${when(p.time, s.spacing) ?? rowRef(p)}: ${withUnit(num(p.value, 6), s.unit)}, known incident: ${reasons.get(p.index) ?? 'known incident'} (left out of the statistics)`;
    out.push(
      `<rect class="incident" data-index="${p.index}" x="${f(X(px) - 4.5)}" y="${f(y(p.value) - 4.5)}" width="9" height="9"><title>${h(tip)}</title></rect>`,
    );
  }

  // Checked observations: the interval each was judged against, then the point itself.
  for (const { c, x: cxv } of checked) {
    const cx = f(X(cxv));
    const cy = f(y(c.value));
    const tip = `${when(c.time, s.spacing) ?? rowRef(c)}: ${withUnit(num(c.value, 6), s.unit)}, interval ${withUnit(`${num(c.lower)} to ${num(c.upper)}`, s.unit)} (${levelLabel(c.level)})${c.alarm ? ', alarm' : c.outside ? ', outside' : ''}`;
    out.push(
      `<line class="check-range" x1="${cx}" x2="${cx}" y1="${f(y(c.lower))}" y2="${f(y(c.upper))}"/>` +
        `<line class="check-range" x1="${f(X(cxv) - 4)}" x2="${f(X(cxv) + 4)}" y1="${f(y(c.lower))}" y2="${f(y(c.lower))}"/>` +
        `<line class="check-range" x1="${f(X(cxv) - 4)}" x2="${f(X(cxv) + 4)}" y1="${f(y(c.upper))}" y2="${f(y(c.upper))}"/>`,
    );
    const data = `data-index="${c.index}" data-value="${c.value}" data-alarm="${c.alarm}"`;
    out.push(
      c.alarm
        ? `<path class="checked alarm" ${data} transform="translate(${cx},${cy})" d="M0,-7L7,0L0,7L-7,0Z"><title>${h(tip)}</title></path>`
        : `<circle class="checked${c.outside ? ' outside' : ''}" ${data} cx="${cx}" cy="${cy}" r="4.5"><title>${h(tip)}</title></circle>`,
    );
  }
  out.push('</g></svg>');
  return out.join('');
}

const HALF = 370;

function svgOpenHalf(id: string, height: number, title: string, desc: string, cls: string): string {
  return (
    `<svg class="chart half ${cls}" viewBox="0 0 ${HALF} ${height}" width="${HALF}" height="${height}" role="img" ` +
    `aria-labelledby="${id}-t ${id}-d"><title id="${id}-t">${h(title)}</title><desc id="${id}-d">${h(desc)}</desc>`
  );
}

function emptyHalf(id: string, title: string, what: string, cls: string): string {
  return `${svgOpenHalf(id, 60, title, what, cls)}<text class="empty" x="${HALF / 2}" y="34" text-anchor="middle">${h(what)}</text></svg>`;
}

/** The residuals shown with the history, in time order, with their x positions. */
function residualPoints(s: SeriesResult): { x: number; r: number }[] {
  const tl = timeline(s);
  return s.history
    .map((p, i) => ({ x: tl.ofIndex(p.index, p.time), r: s.residuals[i] }))
    .filter((p): p is { x: number; r: number } => p.x !== null && isNum(p.r));
}

/**
 * What the spread check (Brown–Forsythe) compares for one third of the residuals: its median and
 * the mean absolute distance from that median.
 */
function spreadOfThird(xs: number[]): { centre: number; spread: number } {
  const sorted = [...xs].sort((a, b) => a - b);
  const n = sorted.length;
  const centre = n % 2 === 1 ? sorted[(n - 1) / 2]! : (sorted[n / 2 - 1]! + sorted[n / 2]!) / 2;
  return { centre, spread: xs.reduce((a, v) => a + Math.abs(v - centre), 0) / n };
}

function sampleSd(xs: number[]): { mean: number; sd: number } {
  const n = xs.length;
  const mean = xs.reduce((a, b) => a + b, 0) / n;
  const sd = n > 1 ? Math.sqrt(xs.reduce((a, b) => a + (b - mean) ** 2, 0) / (n - 1)) : NaN;
  return { mean, sd };
}

/**
 * The spread check's picture: the residuals in time order, with the first and the last third marked
 * and a band over each: its median ± the mean distance of its residuals from that median. The
 * spread check (Brown–Forsythe) compares exactly those mean distances, so unequal bands are what it
 * flags; the middle third, which it leaves out, is drawn faint. When
 * the chart shows fewer residuals than the analysis had (long series), the thirds are of the shown
 * ones and the description says so.
 */
export function spreadChart(s: SeriesResult, id: string): string {
  const title = `${reportName(s.name)}: spread of the residuals over time`;
  const pts = residualPoints(s);
  if (pts.length < 6) return emptyHalf(id, title, 'Too few residuals to compare thirds.', 'spread');
  const height = 200;
  const n = pts.length;
  const third = Math.floor(n / 3);
  const first = pts.slice(0, third);
  const last = pts.slice(n - third);
  const s1 = spreadOfThird(first.map((p) => p.r));
  const s3 = spreadOfThird(last.map((p) => p.r));
  const tl = timeline(s);
  const m = { ...M, left: 52, top: 24 };
  const xe = extent(pts.map((p) => p.x))!;
  const lim = Math.max(...pts.map((p) => Math.abs(p.r)));
  const x = (
    tl.timeAxis ? scaleUtc().domain([new Date(xe[0]), new Date(xe[1])]) : scaleLinear().domain(xe)
  ).range([m.left, HALF - m.right]) as XScale;
  const X = (v: number) => x(v as number & Date);
  const y = scaleLinear()
    .domain([-lim || -1, lim || 1])
    .nice()
    .range([height - m.bottom, m.top]);
  const band = (
    part: { x: number }[],
    st: { centre: number; spread: number },
    cls: string,
    label: string,
  ) => {
    if (!isNum(st.spread)) return '';
    const x0 = X(part[0]!.x);
    const x1 = X(part.at(-1)!.x);
    const anchor = cls === 'first' ? `x="${f(x0)}" text-anchor="start"` : `x="${f(x1)}" text-anchor="end"`;
    return (
      `<rect class="spread-band ${cls}" x="${f(x0)}" y="${f(y(st.centre + st.spread))}" width="${f(Math.max(1, x1 - x0))}" ` +
      `height="${f(y(st.centre - st.spread) - y(st.centre + st.spread))}" data-centre="${st.centre}" data-spread="${st.spread}"><title>${h(label)}: median ${h(num(st.centre))}, mean distance from it ${h(num(st.spread))}</title></rect>` +
      `<text class="tick" ${anchor} y="${m.top + 2}">${h(label)}: ±${h(num(st.spread))}</text>` +
      `<line class="third" x1="${f(cls === 'first' ? x1 : x0)}" x2="${f(cls === 'first' ? x1 : x0)}" y1="${m.top + 8}" y2="${height - m.bottom}"/>`
    );
  };
  const ratio = s1.spread > 0 ? s3.spread / s1.spread : NaN;
  const shown = s.observations > n + 1 ? ` (the ${n} residuals shown; the check used all of them)` : '';
  const desc =
    `${n} residuals in time order. Mean distance from the median: ${num(s1.spread)} in the first third, ${num(s3.spread)} in the last` +
    `${isNum(ratio) ? ` (ratio ${num(ratio)})` : ''}${shown}. The middle third is left out, as in the spread check.`;
  const ticks = y
    .ticks(4)
    .map(
      (t) =>
        `<line class="grid" x1="${m.left}" x2="${HALF - m.right}" y1="${f(y(t))}" y2="${f(y(t))}"/><text class="tick" x="${m.left - 6}" y="${f(y(t))}" dy="0.32em" text-anchor="end">${h(num(t))}</text>`,
    )
    .join('');
  return (
    svgOpenHalf(id, height, title, desc, 'spread') +
    plotGroup(x, y, tl.timeAxis) +
    ticks +
    band(first, s1, 'first', 'first third') +
    band(last, s3, 'last', 'last third') +
    `<line class="zero" x1="${m.left}" x2="${HALF - m.right}" y1="${f(y(0))}" y2="${f(y(0))}"/>` +
    dots(
      pts.map((p, i) => ({
        cls: i < third || i >= n - third ? 'resid-dot' : 'resid-dot middle',
        x: X(p.x),
        y: y(p.r),
      })),
      n > 150 ? 1.2 : 1.8,
    ) +
    `<text class="tick" x="${HALF - m.right}" y="${height - 8}" text-anchor="end">time →</text>` +
    '</g></svg>'
  );
}

/**
 * The normality check's picture: a normal Q–Q plot. Each residual, standardised by the residuals'
 * own mean and standard deviation, against the normal quantile of its rank (Blom's plotting
 * positions (i − 3/8)/(n + 1/4)); on the diagonal when the errors are normal, bending away at the
 * ends for heavy or light tails and to one side for skew.
 */
export function qqChart(s: SeriesResult, id: string): string {
  const title = `${reportName(s.name)}: residuals against normal quantiles`;
  const r = s.residuals.filter(isNum);
  if (r.length < 3) return emptyHalf(id, title, 'Too few residuals for a Q–Q plot.', 'qq');
  const { mean, sd } = sampleSd(r);
  if (!(sd > 0)) return emptyHalf(id, title, 'The residuals do not vary.', 'qq');
  const n = r.length;
  const z = [...r].map((v) => (v - mean) / sd).sort((a, b) => a - b);
  const q = z.map((_, i) => normalQuantile((i + 1 - 0.375) / (n + 0.25)));
  const height = 240;
  const m = { ...M, left: 44, bottom: 34 };
  const lim = Math.max(3, ...z.map(Math.abs), ...q.map(Math.abs));
  const x = scaleLinear()
    .domain([-lim, lim])
    .nice()
    .range([m.left, HALF - m.right]);
  const y = scaleLinear()
    .domain([-lim, lim])
    .nice()
    .range([height - m.bottom, m.top]);
  const [d0, d1] = x.domain() as [number, number];
  const ticks =
    y
      .ticks(5)
      .map(
        (t) =>
          `<line class="grid" x1="${m.left}" x2="${HALF - m.right}" y1="${f(y(t))}" y2="${f(y(t))}"/><text class="tick" x="${m.left - 6}" y="${f(y(t))}" dy="0.32em" text-anchor="end">${t}</text>`,
      )
      .join('') +
    x
      .ticks(5)
      .map(
        (t) =>
          `<text class="tick" x="${f(x(t))}" y="${height - m.bottom + 14}" text-anchor="middle">${t}</text>`,
      )
      .join('');
  const beyond = z.filter((v, i) => Math.abs(v - q[i]!) > 1).length;
  const desc =
    `${n} residuals, standardised, against the normal quantiles of their ranks. ` +
    `${beyond === 0 ? 'All lie within one unit of the diagonal.' : `${beyond} lie more than one unit off the diagonal.`}`;
  return (
    svgOpenHalf(id, height, title, desc, 'qq') +
    plotGroup(x, y, false) +
    ticks +
    `<line class="qq-line" x1="${f(x(d0))}" y1="${f(y(d0))}" x2="${f(x(d1))}" y2="${f(y(d1))}"/>` +
    dots(
      z.map((v, i) => ({ cls: Math.abs(v - q[i]!) > 1 ? 'qq-dot off' : 'qq-dot', x: x(q[i]!), y: y(v) })),
      2.2,
    ) +
    `<text class="tick" x="${HALF - m.right}" y="${height - 4}" text-anchor="end">normal quantile</text>` +
    `<text class="tick" x="${m.left + 4}" y="${m.top + 4}">residual (sd units)</text>` +
    '</g></svg>'
  );
}

/**
 * The autocorrelation check's picture: the Ljung–Box p-value computed with 1, 2, … lags (from the
 * residual autocorrelations in the results), on a log scale with the 5% line; the lag count the check
 * used is ringed. Points below the line are lag counts at which the residuals look autocorrelated.
 * Each p-value uses df = lags − K, with K (the method's estimated parameters) read off the check's
 * own lags and df, so the ringed point is the check's own p-value.
 */
export function ljungBoxChart(s: SeriesResult, id: string): string {
  const title = `${reportName(s.name)}: Ljung–Box p-value by number of lags`;
  const c = s.residualChecks;
  const lb = c?.ljungBox;
  const acf = c?.acf ?? [];
  if (!c || !lb || !isNum(lb.statistic) || acf.length === 0 || !acf.every(isNum))
    return emptyHalf(id, title, 'The autocorrelation check was not computed.', 'lb');
  const K = lb.df === null ? 0 : Math.max(0, lb.lags - lb.df);
  // The residual count the check used; older results files without it: recovered from Q and the ACF.
  const n = c.residuals ?? residualCount(lb.statistic, acf.slice(0, lb.lags));
  if (n === null) return emptyHalf(id, title, 'The autocorrelation check was not computed.', 'lb');
  const pts: { lag: number; p: number }[] = [];
  let sum = 0;
  acf.forEach((rk, i) => {
    const k = i + 1;
    sum += (rk * rk) / (n - k);
    if (k - K >= 1) pts.push({ lag: k, p: 1 - chiSquareCdf(n * (n + 2) * sum, k - K) });
  });
  if (pts.length === 0) return emptyHalf(id, title, 'The autocorrelation check was not computed.', 'lb');
  const FLOOR = 1e-4;
  const height = 240;
  const m = { ...M, left: 60, bottom: 34 };
  const x = scaleLinear()
    .domain([0.5, acf.length + 0.5])
    .range([m.left, HALF - m.right]);
  const y = scaleLog()
    .domain([FLOOR, 1])
    .range([height - m.bottom, m.top]);
  const Y = (p: number) => y(Math.max(FLOOR, Math.min(1, p)));
  const path = line<{ lag: number; p: number }>()
    .digits(1)
    .x((d) => x(d.lag))
    .y((d) => Y(d.p))(pts);
  const below = pts.filter((d) => d.p < 0.05).length;
  const desc =
    `Ljung–Box p-values for ${pts[0]!.lag} to ${pts.at(-1)!.lag} lags; the check used ${lb.lags} (p ${pval(lb.pValue)}). ` +
    `${below === 0 ? 'None is below 5%.' : `${below} of ${pts.length} are below 5%.`}`;
  const ticks =
    [1, 0.1, 0.01, 0.001, 0.0001]
      .map(
        (t) =>
          `<line class="grid" x1="${m.left}" x2="${HALF - m.right}" y1="${f(y(t))}" y2="${f(y(t))}"/><text class="tick" x="${m.left - 6}" y="${f(y(t))}" dy="0.32em" text-anchor="end">${t === 0.0001 ? '≤0.0001' : t}</text>`,
      )
      .join('') +
    x
      .ticks(Math.min(acf.length, 8))
      .filter((t) => Number.isInteger(t) && t >= 1)
      .map(
        (t) =>
          `<text class="tick" x="${f(x(t))}" y="${height - m.bottom + 14}" text-anchor="middle">${t}</text>`,
      )
      .join('');
  const chosen = pts.find((d) => d.lag === lb.lags);
  return (
    svgOpenHalf(id, height, title, desc, 'lb') +
    plotGroup(x, y, false) +
    ticks +
    `<line class="p-line" x1="${m.left}" x2="${HALF - m.right}" y1="${f(y(0.05))}" y2="${f(y(0.05))}"/>` +
    `<text class="tick" x="${HALF - m.right}" y="${f(y(0.05))}" dy="-0.4em" text-anchor="end">5%</text>` +
    (path ? `<path class="lb-line" d="${path}"/>` : '') +
    pts
      .map(
        (d) =>
          `<circle class="lb-dot${d.p < 0.05 ? ' low' : ''}" data-lags="${d.lag}" data-p="${d.p}" cx="${f(x(d.lag))}" cy="${f(Y(d.p))}" r="3"><title>${d.lag} lags: p ${h(pval(d.p))}</title></circle>`,
      )
      .join('') +
    (chosen
      ? `<circle class="lb-used" cx="${f(x(chosen.lag))}" cy="${f(Y(chosen.p))}" r="7"><title>the check: ${chosen.lag} lags</title></circle>`
      : '') +
    `<text class="tick" x="${HALF - m.right}" y="${height - 4}" text-anchor="end">lags</text>` +
    '</g></svg>'
  );
}

/**
 * The number of residuals n behind a Ljung–Box statistic Q = n(n+2) Σ r_k²/(n−k): Q grows with n,
 * so n is the whole number that reproduces Q (found by bisection). Null when none does.
 */
export function residualCount(q: number, acf: number[]): number | null {
  const L = acf.length;
  const Q = (n: number) => n * (n + 2) * acf.reduce((a, r, i) => a + (r * r) / (n - i - 1), 0);
  if (!(q > 0) || L === 0) return null;
  let lo = L + 1;
  let hi = L + 2;
  while (Q(hi) < q && hi < 1e9) hi *= 2;
  while (hi - lo > 1) {
    const mid = Math.floor((lo + hi) / 2);
    if (Q(mid) < q) lo = mid;
    else hi = mid;
  }
  const best = Math.abs(Q(lo) - q) <= Math.abs(Q(hi) - q) ? lo : hi;
  return Math.abs(Q(best) - q) <= 1e-6 * Math.max(1, q) ? best : null;
}

/** The backtest comparison: each candidate's selection score (lower is better), the chosen one marked. */
export function backtestChart(s: SeriesResult, id: string): string {
  const bt = s.backtest;
  const rows = bt
    ? Object.entries(bt.methods)
        .filter(([, b]) => b && isNum(b.score))
        .map(([m, b]) => ({ m, score: Math.abs(b!.score!), chosen: m === s.method }))
        .sort((a, b) => a.score - b.score)
    : [];
  const title = `${reportName(s.name)}: backtest comparison`;
  if (!bt || rows.length === 0)
    return `${svgOpen(id, 60, title, 'No backtest to draw.', 'bt')}<text class="empty" x="${W / 2}" y="34" text-anchor="middle">No backtest scores.</text></svg>`;
  const rowH = 24;
  const height = M.top + rows.length * rowH + M.bottom;
  const left = 130;
  const x = scaleLinear()
    .domain([0, Math.max(...rows.map((r) => r.score)) || 1])
    .nice()
    .range([left, W - M.right - 60]);
  const score = bt.score.toUpperCase();
  const desc = `Mean ${score} over steps 1 to ${bt.horizon} in the rolling-origin backtest for each candidate; lower is better. ${rows
    .map((r) => `${METHOD_LABEL[r.m] ?? r.m} ${num(r.score)}${r.chosen ? ' (chosen)' : ''}`)
    .join(', ')}.`;
  const bars = rows
    .map((r, i) => {
      const yy = M.top + i * rowH;
      return (
        `<text class="bt-label" x="${left - 8}" y="${yy + rowH / 2}" dy="0.32em" text-anchor="end">${h(METHOD_LABEL[r.m] ?? r.m)}${r.chosen ? ' ✓' : ''}</text>` +
        `<rect class="bt-bar${r.chosen ? ' chosen' : ''}" data-method="${h(r.m)}" x="${left}" y="${yy + 4}" width="${f(Math.max(1, x(r.score) - left))}" height="${rowH - 8}"/>` +
        `<text class="tick" x="${f(x(r.score) + 6)}" y="${yy + rowH / 2}" dy="0.32em">${h(num(r.score))}</text>`
      );
    })
    .join('');
  const axisY = M.top + rows.length * rowH;
  const ticks = x
    .ticks(5)
    .map(
      (t) =>
        `<line class="grid" x1="${f(x(t))}" x2="${f(x(t))}" y1="${M.top}" y2="${axisY}"/><text class="tick" x="${f(x(t))}" y="${axisY + 16}" text-anchor="middle">${h(num(t))}</text>`,
    )
    .join('');
  return svgOpen(id, height, title, desc, 'bt') + ticks + bars + '</svg>';
}

/** The x scale (UTC time or step number), the y scale, and X: x as a plain number function. */
function planeScales(timeAxis: boolean, xe: [number, number], ye: [number, number], height: number) {
  const x: XScale = timeAxis
    ? scaleUtc()
        .domain([new Date(xe[0]), new Date(xe[1])])
        .range([M.left, W - M.right])
    : scaleLinear()
        .domain(xe)
        .range([M.left, W - M.right]);
  const y = scaleLinear()
    .domain(ye)
    .nice()
    .range([height - M.bottom, M.top]);
  const X = (v: number) => x(v as number & Date);
  return { x, y, X };
}
