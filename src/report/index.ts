// Leadline's reports: markdown (handlebars templates, Mermaid charts) and a self-contained HTML page.
// Renderers take only a Results object, so a results file alone renders the whole report. A large
// run hands them its series lean (results.ts withoutDetail) except those they can show in detail:
// `reportDetail` says which.
import { detailWanted, type MarkdownOptions } from './markdown.js';
import { HTML_SECTIONS } from './html.js';
import { firstInReportOrder } from './view.js';
import type { Results } from '../results.js';

export { renderMarkdown, DEFAULT_MAX_CHARS, detailWanted, type MarkdownOptions } from './markdown.js';
export { renderHtml, HTML_SECTIONS } from './html.js';
export { escapeMarkdown, escapeHtml, mermaidLabel } from '../text/index.js';
export {
  buildView,
  firstInReportOrder,
  needsAttention,
  reportOrder,
  type ReportView,
  type SeriesView,
  type ViewOptions,
  type AttentionRow,
  type LimitRow,
  type ChartView,
} from './view.js';

/** A report to render: markdown with its options, or the HTML page. */
export type ReportRequest = { markdown: MarkdownOptions } | 'html';

/** The places (indices in results.series) of the series these reports show in detail, all together. */
export function reportDetail(
  results: Pick<Results, 'series'>,
  reports: readonly ReportRequest[],
): Set<number> {
  const count = Math.max(
    0,
    ...reports.map((r) =>
      r === 'html' ? Math.min(results.series.length, HTML_SECTIONS) : detailWanted(results, r.markdown),
    ),
  );
  return firstInReportOrder(results, count);
}
