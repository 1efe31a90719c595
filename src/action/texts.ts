// The texts the Action builds around the rendered report: sizes kept within GitHub's limits, the
// tracking issue's title and notes. Pure; the renderer is passed in.
import type { Results } from '../results.js';
import { VERDICT_LABEL } from '../report/format.js';
import { oneLine, plural } from '../text/index.js';
import { attentionCount, runNeedsAttention } from '../verdict.js';

export { attentionCount };

/** Comment and issue bodies: at most 65,536 characters (and 262,144 UTF-8 bytes). */
export const COMMENT_MAX_CHARS = 65_536;
export const COMMENT_MAX_BYTES = 262_144;
/** Job summary: at most 1 MiB per step. */
export const SUMMARY_MAX_BYTES = 1024 * 1024;

/** Renders the report within `maxChars`; the report renderer puts what needs attention first. */
export type Render = (maxChars: number) => string;

const CUT_NOTE = "\n\n_… cut here to fit GitHub's size limit; the full report is in the results file._\n";

/** Cuts `text` to at most `maxBytes` UTF-8 bytes and `maxChars` characters, without splitting a character. */
export function cutTo(text: string, maxChars: number, maxBytes: number): string {
  if (text.length <= maxChars && Buffer.byteLength(text, 'utf8') <= maxBytes) return text;
  const chars = Math.max(0, maxChars - CUT_NOTE.length);
  let t = text.slice(0, chars);
  const budget = maxBytes - Buffer.byteLength(CUT_NOTE, 'utf8');
  if (Buffer.byteLength(t, 'utf8') > budget) t = Buffer.from(t, 'utf8').subarray(0, budget).toString('utf8');
  // A cut multi-byte character decodes as U+FFFD, and a cut surrogate pair leaves half a pair.
  t = t.replace(/\uFFFD+$/, '').replace(/[\uD800-\uDBFF]$/, '');
  return t + CUT_NOTE;
}

/**
 * The largest rendering within both limits: render at `maxChars`; when multi-byte text makes it too
 * many bytes, render again smaller in proportion; as a last resort cut the text.
 */
export function fitRendering(render: Render, maxChars: number, maxBytes: number, suffix = ''): string {
  let chars = maxChars - suffix.length;
  let text = '';
  for (let attempt = 0; attempt < 4; attempt++) {
    text = render(chars) + suffix;
    const bytes = Buffer.byteLength(text, 'utf8');
    if (bytes <= maxBytes && text.length <= maxChars) return text;
    chars = Math.floor(chars * Math.min(maxBytes / bytes, maxChars / text.length) * 0.97);
  }
  return cutTo(text, maxChars, maxBytes);
}

/** Whether the tracking issue should stay open (the rule is src/verdict.ts's). */
export const needsAttention: (r: Results) => boolean = runNeedsAttention;

export function trackingTitle(r: Results, configKey: string): string {
  const n = attentionCount(r);
  const what = n === 0 ? 'a problem with the run' : `${plural(n, 'metric needs', 'metrics need')} attention`;
  return oneLine(`Leadline: ${what} (${configKey})`, 200);
}

export function runLink(
  serverUrl: string,
  repository: { owner: string; repo: string } | null,
  runId: string | null,
): string | null {
  if (!repository || !runId) return null;
  return `${serverUrl}/${repository.owner}/${repository.repo}/actions/runs/${runId}`;
}

export function closeNote(link: string | null): string {
  return (
    `All clear${link ? ` in [this run](${link})` : ''}: every checked observation is inside its interval, ` +
    'no limit is at risk and the run had no errors. Closing; Leadline reopens this issue when something needs attention again.'
  );
}

export function reopenNote(r: Results, link: string | null): string {
  const n = attentionCount(r);
  return (
    `Reopened${link ? ` by [this run](${link})` : ''}: ${plural(n, 'metric needs', 'metrics need')} attention again ` +
    `(${VERDICT_LABEL[r.verdict]}). The description above has the current report.`
  );
}

/** Where the full report is, for the renderer's note when it has to cut. */
export function fullReportNote(link: string | null): string {
  return (
    `The full report — every series' forecast, backtest and residual checks — is in the job summary of ` +
    `${link ? `[this run](${link})` : 'this run'}, and in its HTML report and results JSON when the workflow ` +
    'uploads them as an artifact (see the README).'
  );
}
