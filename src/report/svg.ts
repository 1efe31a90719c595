// SVG charts for the HTML report, drawn server-side with d3-scale (domains, ranges, nice ticks, UTC
// time ticks) and d3-shape (line and area paths that skip missing values). Both are pure functions
// over numbers with no DOM, so the output is a deterministic string.
//
// Every chart is an <svg role="img"> with a <title> and <desc>; colours come from CSS classes so the
// page's light and dark palettes apply. The plot group carries its scales as data-* attributes
// (domain and range on each axis) so tests can recompute positions from the results values.
import { scaleLinear, scaleUtc, type ScaleLinear, type ScaleTime } from 'd3-scale';
import { area, line } from 'd3-shape';
import type { SeriesResult } from '../results.js';
import { escapeHtml as h } from './escape.js';
import { METHOD_LABEL, num, when } from './format.js';

const W = 760;
const M = { top: 14, right: 18, bottom: 30, left: 64 };

type XScale = ScaleLinear<number, number> | ScaleTime<number, number>;

/** Numbers in SVG attributes: two decimals, no exponent. */
const f = (x: number): string => (Math.round(x * 100) / 100).toString();

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

function plotGroup(x: XScale, y: ScaleLinear<number, number>, timeAxis: boolean): string {
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

function xAxis(x: XScale, timeAxis: boolean, y0: number, spacing: SeriesResult['spacing']): string {
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
      const label = timeAxis ? timeTick(+t, spacing, multiYear) : `#${+t + 1}`;
      // Labels near either edge are anchored inwards so they are not cut off.
      const px = x(t as number & Date);
      const anchor = px > W - M.right - 40 ? 'end' : px < M.left + 20 ? 'start' : 'middle';
      return `<line class="axis" x1="${xx}" x2="${xx}" y1="${y0}" y2="${y0 + 4}"/><text class="tick" x="${xx}" y="${y0 + 16}" text-anchor="${anchor}">${h(label)}</text>`;
    })
    .join('');
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
export function fanChart(s: SeriesResult, id: string): string {
  const height = 300;
  const tl = timeline(s);
  let from = Math.max(0, s.history.length - FAN_HISTORY);
  const firstChecked = s.checked.length > 0 ? Math.min(...s.checked.map((c) => c.index)) : Infinity;
  const pos = s.history.findIndex((p) => p.index === firstChecked);
  if (pos >= 0) from = Math.min(from, Math.max(0, pos - 10));
  const hist = s.history.slice(from);
  const levels = [...s.levels].sort((a, b) => b - a);
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
    for (const l of levels) ys.push(q.p.lower[String(l)]!, q.p.upper[String(l)]!);
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
  const title = `${s.name}: history and forecast`;
  if (!xe || !ye) {
    return `${svgOpen(id, 60, title, 'No values to draw.', 'fan')}<text class="empty" x="${W / 2}" y="34" text-anchor="middle">No values to draw.</text></svg>`;
  }
  const { x, y, X } = planeScales(tl.timeAxis, xe, ye, height);

  const out: string[] = [];
  const desc =
    `Observed values${hist.length ? ` (${hist.length} most recent)` : ''}, the ${s.method ? (METHOD_LABEL[s.method] ?? s.method) : ''} forecast ` +
    `over ${s.forecast.length} steps with ${levels.map((l) => `${l}%`).join(' and ')} prediction intervals` +
    (checked.length
      ? `, ${checked.length} checked observations (${checked.filter((q) => q.c.alarm).length} alarms)`
      : '') +
    (lim ? `, and the limit ${num(lim.value, 6)}` : '') +
    '.';
  out.push(svgOpen(id, height, title, desc, 'fan'));
  out.push(plotGroup(x, y, tl.timeAxis));
  out.push(yAxis(y, M.left, W - M.right));
  out.push(xAxis(x, tl.timeAxis, height - M.bottom, s.spacing));

  // Bands, widest first so narrower ones sit on top. Anchored at the last observation.
  const origin = lastObs ? { x: tl.ofIndex(lastObs.index, lastObs.time), v: lastObs.value! } : null;
  levels.forEach((l, k) => {
    const key = String(l);
    const pts = fc
      .filter((q) => isNum(q.p.lower[key]) && isNum(q.p.upper[key]))
      .map((q) => ({ x: q.x, lo: q.p.lower[key]!, hi: q.p.upper[key]! }));
    if (origin && origin.x !== null) pts.unshift({ x: origin.x, lo: origin.v, hi: origin.v });
    const d = area<{ x: number; lo: number; hi: number }>()
      .x((p) => X(p.x))
      .y0((p) => y(p.lo))
      .y1((p) => y(p.hi))(pts);
    if (d)
      out.push(
        `<path class="band band-${Math.min(k, 3)}" data-level="${l}" d="${d}"><title>${l}% interval</title></path>`,
      );
  });

  const histLine = line<{ x: number | null; y: number | null }>()
    .defined((p) => p.x !== null && isNum(p.y))
    .x((p) => X(p.x!))
    .y((p) => y(p.y!))(histPts);
  if (histLine) out.push(`<path class="history" d="${histLine}"/>`);
  const meanPts = fc.map((q) => ({ x: q.x, y: q.p.mean }));
  if (origin && origin.x !== null) meanPts.unshift({ x: origin.x, y: origin.v });
  const meanLine = line<{ x: number; y: number }>()
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
        `<text class="limit-label" x="${M.left + 4}" y="${ly}" dy="${lim.side === 'above' ? '-0.4em' : '1.1em'}">limit ${h(num(lim.value, 6))}</text>`,
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

  // Checked observations: the interval each was judged against, then the point itself.
  for (const { c, x: cxv } of checked) {
    const cx = f(X(cxv));
    const cy = f(y(c.value));
    const tip = `${when(c.time, s.spacing) ?? `point ${c.index + 1}`}: ${num(c.value, 6)}, interval ${num(c.lower)} to ${num(c.upper)} (${c.level}%)${c.alarm ? ', alarm' : c.outside ? ', outside' : ''}`;
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

/** Residuals of the chosen method over time, with the zero line. */
export function residualChart(s: SeriesResult, id: string): string {
  const height = 180;
  const tl = timeline(s);
  const pts = s.history
    .map((p, i) => ({ x: tl.ofIndex(p.index, p.time), r: s.residuals[i] }))
    .filter((p): p is { x: number; r: number } => p.x !== null && isNum(p.r));
  const title = `${s.name}: residuals over time`;
  const xe = extent(pts.map((p) => p.x));
  const ye = extent([0, ...pts.map((p) => p.r)]);
  if (!xe || !ye || pts.length === 0)
    return `${svgOpen(id, 60, title, 'No residuals to draw.', 'resid')}<text class="empty" x="${W / 2}" y="34" text-anchor="middle">No residuals to draw.</text></svg>`;
  const { x, y, X } = planeScales(tl.timeAxis, xe, ye, height);
  const zero = f(y(0));
  const path = line<{ x: number; r: number }>()
    .x((p) => X(p.x))
    .y((p) => y(p.r))(pts);
  return (
    svgOpen(
      id,
      height,
      title,
      `${pts.length} residuals (actual minus fitted) of the chosen method, in time order, with the zero line.`,
      'resid',
    ) +
    plotGroup(x, y, tl.timeAxis) +
    yAxis(y, M.left, W - M.right) +
    xAxis(x, tl.timeAxis, height - M.bottom, s.spacing) +
    `<line class="zero" x1="${M.left}" x2="${W - M.right}" y1="${zero}" y2="${zero}"/>` +
    (path ? `<path class="resid-line" d="${path}"/>` : '') +
    // Dots only while they stay readable; a long series is clearer (and lighter) as a line.
    (pts.length <= 150
      ? pts.map((p) => `<circle class="resid-dot" cx="${f(X(p.x))}" cy="${f(y(p.r))}" r="1.8"/>`).join('')
      : '') +
    '</g></svg>'
  );
}

const HALF = 370;

/** Residual autocorrelation by lag with the approximate 95% bounds ±1.96/√n. */
export function acfChart(s: SeriesResult, id: string): string {
  const height = 200;
  const c = s.residualChecks;
  const acf = (c?.acf ?? []).filter(isNum);
  const title = `${s.name}: residual autocorrelation`;
  if (!c || acf.length === 0)
    return `${svgOpenHalf(id, 60, title, 'No autocorrelations to draw.', 'acf')}<text class="empty" x="${HALF / 2}" y="34" text-anchor="middle">No autocorrelations.</text></svg>`;
  const bound = isNum(c.acfBound) ? c.acfBound : 0;
  const m = { ...M, left: 44 };
  const lim = Math.max(bound * 1.2, ...acf.map((r) => Math.abs(r)), 0.1);
  const x = scaleLinear()
    .domain([0.5, acf.length + 0.5])
    .range([m.left, HALF - m.right]);
  const y = scaleLinear()
    .domain([-lim, lim])
    .nice()
    .range([height - m.bottom, m.top]);
  const bw = Math.max(2, Math.min(16, ((HALF - m.left - m.right) / acf.length) * 0.6));
  const outside = acf.filter((r) => Math.abs(r) > bound).length;
  const desc = `Autocorrelation of the residuals at lags 1 to ${acf.length}; dashed lines at ±${num(bound)} (±1.96/√n). ${outside} of ${acf.length} lags outside.`;
  const bars = acf
    .map((r, i) => {
      const y0 = y(Math.max(0, r));
      const y1 = y(Math.min(0, r));
      return `<rect class="acf-bar${Math.abs(r) > bound ? ' beyond' : ''}" data-lag="${i + 1}" data-r="${r}" x="${f(x(i + 1) - bw / 2)}" y="${f(y0)}" width="${f(bw)}" height="${f(Math.max(0.5, y1 - y0))}"><title>lag ${i + 1}: ${h(num(r))}</title></rect>`;
    })
    .join('');
  const ticks = x
    .ticks(Math.min(acf.length, 10))
    .filter((t) => Number.isInteger(t) && t >= 1)
    .map(
      (t) =>
        `<text class="tick" x="${f(x(t))}" y="${height - m.bottom + 16}" text-anchor="middle">${t}</text>`,
    )
    .join('');
  return (
    svgOpenHalf(id, height, title, desc, 'acf') +
    plotGroup(x, y, false) +
    yAxis(y, m.left, HALF - m.right) +
    ticks +
    `<line class="zero" x1="${m.left}" x2="${HALF - m.right}" y1="${f(y(0))}" y2="${f(y(0))}"/>` +
    [bound, -bound]
      .map(
        (b) =>
          `<line class="acf-bound" x1="${m.left}" x2="${HALF - m.right}" y1="${f(y(b))}" y2="${f(y(b))}" data-bound="${b}"/>`,
      )
      .join('') +
    bars +
    `<text class="tick" x="${HALF - m.right}" y="${height - 2}" text-anchor="end">lag</text>` +
    '</g></svg>'
  );
}

function svgOpenHalf(id: string, height: number, title: string, desc: string, cls: string): string {
  return (
    `<svg class="chart half ${cls}" viewBox="0 0 ${HALF} ${height}" width="${HALF}" height="${height}" role="img" ` +
    `aria-labelledby="${id}-t ${id}-d"><title id="${id}-t">${h(title)}</title><desc id="${id}-d">${h(desc)}</desc>`
  );
}

/** Residual histogram (Sturges' bin count) with the normal density of the same mean and sd, scaled to counts. */
export function histogramChart(s: SeriesResult, id: string): string {
  const height = 200;
  const r = s.residuals.filter(isNum);
  const title = `${s.name}: residual histogram`;
  if (r.length < 2)
    return `${svgOpenHalf(id, 60, title, 'Too few residuals for a histogram.', 'hist')}<text class="empty" x="${HALF / 2}" y="34" text-anchor="middle">Too few residuals.</text></svg>`;
  const n = r.length;
  const mean = r.reduce((a, b) => a + b, 0) / n;
  const sd = Math.sqrt(r.reduce((a, b) => a + (b - mean) ** 2, 0) / (n - 1));
  const bins = Math.ceil(Math.log2(n) + 1);
  const [lo0, hi0] = extent(r)!;
  const lo = Math.min(lo0, mean - 3 * sd);
  const hi = Math.max(hi0, mean + 3 * sd);
  const width = (hi - lo) / bins;
  const counts = new Array<number>(bins).fill(0);
  for (const v of r) counts[Math.min(bins - 1, Math.max(0, Math.floor((v - lo) / width)))]!++;
  const density = (v: number) =>
    sd > 0 ? (n * width * Math.exp(-0.5 * ((v - mean) / sd) ** 2)) / (sd * Math.sqrt(2 * Math.PI)) : 0;
  const m = { ...M, left: 44 };
  const x = scaleLinear()
    .domain([lo, hi])
    .range([m.left, HALF - m.right]);
  const peak = Math.max(...counts, density(mean));
  const y = scaleLinear()
    .domain([0, peak])
    .nice()
    .range([height - m.bottom, m.top]);
  const bars = counts
    .map(
      (c, i) =>
        `<rect class="hist-bar" data-count="${c}" x="${f(x(lo + i * width) + 0.5)}" y="${f(y(c))}" width="${f(Math.max(0.5, x(lo + width) - x(lo) - 1))}" height="${f(y(0) - y(c))}"><title>${h(num(lo + i * width))} to ${h(num(lo + (i + 1) * width))}: ${c}</title></rect>`,
    )
    .join('');
  const curvePts = Array.from({ length: 81 }, (_, i) => lo + ((hi - lo) * i) / 80);
  const curve = line<number>()
    .x((v) => x(v))
    .y((v) => y(density(v)))(curvePts);
  const ticks = x
    .ticks(5)
    .map(
      (t) =>
        `<text class="tick" x="${f(x(t))}" y="${height - m.bottom + 16}" text-anchor="middle">${h(num(t))}</text>`,
    )
    .join('');
  const desc = `Histogram of ${n} residuals in ${bins} bins, with the normal curve of mean ${num(mean)} and standard deviation ${num(sd)}.`;
  return (
    svgOpenHalf(id, height, title, desc, 'hist') +
    plotGroup(x, y, false) +
    yAxis(y, m.left, HALF - m.right) +
    ticks +
    bars +
    (curve ? `<path class="normal-curve" d="${curve}"/>` : '') +
    '</g></svg>'
  );
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
  const title = `${s.name}: backtest comparison`;
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
