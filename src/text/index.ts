// Words and numbers: the one place for number and p-value formatting, counted nouns, "did you mean"
// suggestions and escaping untrusted text for markdown, HTML, Mermaid, annotations and the terminal.
export {
  agree,
  chance,
  DURATION_PATTERN,
  levelLabel,
  num,
  numsApart,
  P_FLOOR,
  pct,
  pIs,
  plural,
  pval,
  windowWords,
  withUnit,
} from './numbers.js';
export { rowRef } from './rows.js';
export { didYouMean, nearest } from './suggest.js';
export { escapeHtml, escapeMarkdown, escapeMessage, mermaidLabel, oneLine } from './escape.js';
export { DISPLAY_MAX, displayName, logSafe, safeStream, shorten, visible } from './untrusted.js';
