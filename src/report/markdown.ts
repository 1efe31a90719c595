// The markdown report: a handlebars template over the view model, cut to fit a size limit with what
// needs attention kept first.
import Handlebars from 'handlebars';
import { LeadlineError } from '../errors.js';
import type { Results } from '../results.js';
import { template as briefTemplate } from './templates/brief.hbs';
import { template as reportTemplate } from './templates/report.hbs';
import { template as seriesTemplate } from './templates/series.hbs';
import { buildView, DEFAULT_CHARTS, type ReportView } from './view.js';
import { needsAttention } from '../verdict.js';
import { plural } from '../text/index.js';

export interface MarkdownOptions {
  /** Handlebars source a user supplies, rendered over the same view (partial `series` available). */
  template?: string;
  /** Longest result in characters (UTF-16 code units). Default 65536, a comment's limit. */
  maxChars?: number;
  /** Most Mermaid charts. Default 5. */
  maxCharts?: number;
  /** Where the full report is (results JSON, markdown file, artifact), said when the report is cut. */
  fullReportNote?: string;
  /** A hidden HTML comment placed first, e.g. for finding the comment again. */
  marker?: string;
  /**
   * `brief`: what a pull-request comment or tracking issue needs (verdict, what was checked, what
   * needs attention with its charts, one line on the rest) and where the full report is. `full`
   * (default): every series' details as well, for the job summary and the markdown file.
   */
  detail?: 'brief' | 'full';
}

export const DEFAULT_MAX_CHARS = 65_536;
/** A lower bound on one metric section's length (an error section with a short name is about 180). */
const MIN_SECTION = 150;
/**
 * A lower bound on one row of the attention table: eight pipes, fourteen spaces and the newline, and
 * at least a character in each of the icon, name, why, sparkline, latest value and place cells.
 */
const MIN_ROW = 29;

type Render = (view: ReportView) => string;

// An isolated Handlebars environment so helpers and partials never leak into other users of the package.
const hb = Handlebars.create();
// The built-in templates come compiled (scripts/hbs-module.mjs, with the options compile() uses).
hb.registerPartial('series', hb.template(seriesTemplate));
const builtIn = hb.template<ReportView>(reportTemplate);
const builtInBrief = hb.template<ReportView>(briefTemplate);

/** Most charts in a brief report: the first few series needing attention. */
export const BRIEF_CHARTS = 3;

function chartsWanted(opts: MarkdownOptions): number {
  return opts.maxCharts ?? (opts.detail === 'brief' ? BRIEF_CHARTS : DEFAULT_CHARTS);
}

/**
 * How many series, from the first in report order (view.ts `reportOrder`), a markdown report can
 * show in detail within its size limit: its charts, the attention rows (at least MIN_ROW characters
 * each; attention items come first in that order) and, in a full report, the metric sections (at
 * least MIN_SECTION each). Series beyond can never fit, so the report neither builds nor needs them
 * in full: a run hands over only these with their charts and tables (`reportNeeds`).
 */
export function detailWanted(results: Pick<Results, 'series'>, opts: MarkdownOptions = {}): number {
  const maxChars = Math.floor(opts.maxChars ?? DEFAULT_MAX_CHARS);
  const attention = results.series.filter(needsAttention).length;
  const rows = Math.min(attention, Math.ceil(maxChars / MIN_ROW));
  const sections = opts.detail === 'brief' ? 0 : Math.ceil(maxChars / MIN_SECTION);
  return Math.min(results.series.length, Math.max(chartsWanted(opts), rows, sections));
}

function compile(source: string): Render {
  let fn: HandlebarsTemplateDelegate;
  try {
    // Every string in the view is escaped already (see view.ts), so Handlebars' HTML escaping is off:
    // it would double-escape entities and does not know markdown anyway.
    fn = hb.compile(source, { noEscape: true, strict: false });
  } catch (e) {
    throw new LeadlineError('usage', `the markdown template does not compile: ${(e as Error).message}`);
  }
  return (view) => {
    try {
      return fn(view);
    } catch (e) {
      throw new LeadlineError('usage', `the markdown template failed to render: ${(e as Error).message}`);
    }
  };
}

function tidy(text: string): string {
  return (
    text
      .replace(/[ \t]+\n/g, '\n')
      .replace(/\n{3,}/g, '\n\n')
      .trim() + '\n'
  );
}

interface Unit {
  chart: number | null;
  section: number | null;
}

/** What to keep, in order of importance: each attention chart and section, then every other section. */
function units(view: ReportView): Unit[] {
  const out: Unit[] = [];
  const chartBySection = new Map<number, number>();
  view.charts.forEach((c, i) => chartBySection.set(c.section, i));
  const usedCharts = new Set<number>();
  view.series.forEach((s, i) => {
    if (s.attention) {
      const c = chartBySection.get(s.section);
      if (c !== undefined && !usedCharts.has(c)) {
        usedCharts.add(c);
        out.push({ chart: c, section: null });
      }
    }
    out.push({ chart: null, section: i });
  });
  view.charts.forEach((_, i) => {
    if (!usedCharts.has(i)) out.push({ chart: i, section: null });
  });
  return out;
}

function trimmed(view: ReportView, all: Unit[], keep: number, rows: number, note: string): ReportView {
  const kept = all.slice(0, keep);
  const charts = new Set(kept.filter((u) => u.chart !== null).map((u) => u.chart!));
  const sections = new Set(kept.filter((u) => u.section !== null).map((u) => u.section!));
  const series = view.series.filter((_, i) => sections.has(i));
  const chartCount =
    view.charts.filter((_, i) => charts.has(i)).length + series.filter((s) => s.chart).length;
  const totalCharts = view.charts.length + view.series.filter((s) => s.chart).length;
  const attention = view.attention.slice(0, rows);
  const limits = view.limits.slice(0, rows);
  const { sections: allSections, attention: allAttention } = view.totals;
  const parts = [
    `This report was cut to fit: ${series.length} of ${plural(allSections, 'metric section')}`,
    `${chartCount} of ${plural(totalCharts, 'chart')}`,
  ];
  if (attention.length < allAttention)
    parts.push(`${attention.length} of ${allAttention} rows needing attention`);
  if (limits.length < view.limits.length) parts.push(`${limits.length} of ${view.limits.length} limits`);
  return {
    ...view,
    problems: view.problems.slice(0, Math.max(rows, 5)),
    attention,
    attentionNote:
      attention.length < allAttention
        ? `…and ${allAttention - attention.length} more needing attention, not shown here.`
        : view.attentionNote,
    limits,
    limitsNote:
      limits.length < view.limits.length
        ? `…and ${view.limits.length - limits.length} more limits, not shown here.`
        : view.limitsNote,
    charts: view.charts.filter((_, i) => charts.has(i)),
    series,
    omitted: `${parts.join(', ')} shown, what needs attention first. ${note}`,
  };
}

/**
 * Largest n in [lo, hi] with ok(n), given ok(lo); ok is assumed monotone (true then false). Galloping
 * up from lo first keeps every trial render near the size limit instead of the whole report's size.
 */
function largest(lo: number, hi: number, ok: (n: number) => boolean): number {
  let step = 1;
  while (lo + step <= hi && ok(lo + step)) {
    lo += step;
    step *= 2;
  }
  hi = Math.min(hi, lo + step - 1);
  while (lo < hi) {
    const mid = Math.ceil((lo + hi) / 2);
    if (ok(mid)) lo = mid;
    else hi = mid - 1;
  }
  return lo;
}

/**
 * Renders the markdown report. The result (marker included) is never longer than `maxChars`: when
 * the whole report does not fit, metric sections and charts are dropped from the least important end,
 * then rows of the attention and limit tables, and a note says what was left out and where the full
 * report is.
 */
export function renderMarkdown(results: Results, opts: MarkdownOptions = {}): string {
  const maxChars = Math.floor(opts.maxChars ?? DEFAULT_MAX_CHARS);
  if (!(maxChars > 0)) throw new RangeError(`maxChars must be a positive number, got ${opts.maxChars}`);
  const brief = opts.detail === 'brief';
  const render = opts.template !== undefined ? compile(opts.template) : brief ? builtInBrief : builtIn;
  const head = opts.marker ? `${opts.marker}\n` : '';
  const note = opts.fullReportNote ?? 'The results JSON has every metric in full.';
  const built = buildView(results, {
    maxCharts: chartsWanted(opts),
    fullReportNote: note,
    detail: detailWanted(results, opts),
  });
  // A brief report has no per-series sections; its charts are those of the series needing attention.
  const view = brief ? { ...built, series: [], totals: { ...built.totals, sections: 0 } } : built;
  const out = (v: ReportView) => head + tidy(render(v));

  // Every metric section is well over MIN_SECTION characters, so a big fleet skips the full render;
  // so does a view that left series out (detailWanted: they could never fit).
  const whole =
    view.series.length === view.totals.sections && view.attention.length === view.totals.attention;
  if (whole && view.series.length * MIN_SECTION <= maxChars) {
    const full = out(view);
    if (full.length <= maxChars) return full;
  }

  const all = units(view);
  const rowsMax = Math.max(view.attention.length, view.limits.length);
  const fits = (keep: number, rows: number) => out(trimmed(view, all, keep, rows, note)).length <= maxChars;
  if (fits(0, rowsMax)) {
    const keep = largest(0, all.length, (k) => fits(k, rowsMax));
    return out(trimmed(view, all, keep, rowsMax, note));
  }
  if (fits(0, 0)) {
    const rows = largest(0, rowsMax, (r) => fits(0, r));
    return out(trimmed(view, all, 0, rows, note));
  }
  // Not even the headline and the note fit (a tiny limit or a very long template): the bare verdict.
  const bare = tidy(
    `## ${view.verdict.icon} Leadline: ${view.verdict.label}\n\n${view.headline} ${view.gate}\n\n${note}`,
  );
  return (head + bare).slice(0, maxChars);
}
