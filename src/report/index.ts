// Leadline's reports: markdown (handlebars templates, Mermaid charts) and a self-contained HTML page.
// Renderers take only a Results object, so a results file alone renders the whole report.
export { renderMarkdown, DEFAULT_MAX_CHARS, type MarkdownOptions } from './markdown.js';
export { renderHtml } from './html.js';
export { escapeMarkdown, escapeHtml, mermaidLabel } from '../text/index.js';
export {
  buildView,
  needsAttention,
  reportOrder,
  type ReportView,
  type SeriesView,
  type ViewOptions,
  type AttentionRow,
  type LimitRow,
  type ChartView,
} from './view.js';
