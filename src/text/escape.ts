// Escaping untrusted text (metric names, file names, column and key values, notes, error messages)
// for the reports, the Action's summary and annotations, and the terminal.
//
// Markdown: every character that could start markdown or HTML syntax becomes a numeric character
// reference. CommonMark never reads an entity as structure ("&#42;" is a literal star, "&#124;" a
// literal pipe that cannot split a table cell), and HTML decodes it to the same character, so the
// result is safe both in markdown text and inside the HTML blocks of a comment (<summary>, <td>).
// Backslash escapes would not be: inside an HTML block GitHub shows the backslash.
// Invisible and direction-changing characters are shown as escapes (\u202E), never applied.
import { visible } from './untrusted.js';

// eslint-disable-next-line no-control-regex -- matching control characters is the point
const CONTROL = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f\u2028\u2029]/g;
const NEWLINES = /\r\n|[\r\n\t]/g;

const MARKDOWN_SPECIAL = /[&<>"'`|\\*_~[\]#$]/g;

/**
 * Text made safe for GitHub-flavoured markdown and HTML: one line, no markup, no table breakers.
 * Line breaks and tabs become spaces; other control characters are dropped. A mention-looking `@name`
 * gets a zero-width space after the `@` so a report never pings anyone, and URL-looking text is not
 * turned into a link.
 */
export function escapeMarkdown(text: string): string {
  return (
    visible(String(text).replace(NEWLINES, ' ').replace(CONTROL, ''))
      .replace(MARKDOWN_SPECIAL, (c) => `&#${c.codePointAt(0)!};`)
      // No autolinks: GitHub links bare "scheme://" and "www." text.
      .replace(/:(?=\/\/)/g, '&#58;')
      .replace(/\b(www)\./gi, '$1&#46;')
      .replace(/@(?=\w)/g, '@&#8203;')
  );
}

/**
 * One of Leadline's own messages (an error, a publishing warning) for markdown. It may quote untrusted
 * text, so it is escaped like escapeMarkdown, but its lines stay apart and its "#12" references to
 * pull requests and issues stay links.
 */
export function escapeMessage(text: string): string {
  return String(text)
    .split(/\r\n|\n|\r/)
    .map((line) => escapeMarkdown(line).replace(/&#35;(?=\d)/g, '#'))
    .join('  \n');
}

const HTML_SPECIAL: Record<string, string> = {
  '&': '&amp;',
  '<': '&lt;',
  '>': '&gt;',
  '"': '&quot;',
  "'": '&#39;',
};

/** Text made safe for HTML element content and quoted attribute values. Control characters are dropped. */
export function escapeHtml(text: string): string {
  return visible(String(text).replace(CONTROL, ''), true).replace(/[&<>"']/g, (c) => HTML_SPECIAL[c]!);
}

/**
 * A label for Mermaid source: only letters, digits, spaces and a few harmless punctuation marks survive
 * (no quotes, brackets, semicolons, percent signs or line breaks, which Mermaid could read as syntax),
 * cut to `max` characters. Never empty.
 */
export function mermaidLabel(text: string, max = 60, fallback = 'series'): string {
  const kept = String(text)
    .normalize('NFC')
    .replace(/[^\p{L}\p{N} _.,/()-]+/gu, ' ')
    .replace(/\s+/g, ' ')
    .trim();
  const cut = [...kept].slice(0, max).join('').trim();
  return cut.length > 0 ? cut : fallback;
}

// eslint-disable-next-line no-control-regex -- matching control characters is the point
const SPACE_OR_CONTROL = /[\u0000-\u001f\u007f-\u009f\s]+/g;

/** Text for one line of the annotation UI or a log line: control characters and runs of space collapsed, cut to `max`. */
export function oneLine(s: string, max = 300): string {
  const t = String(s).replace(SPACE_OR_CONTROL, ' ').trim();
  return t.length > max ? `${t.slice(0, max - 1)}…` : t;
}
