// The terminal summary: one line for the run, one per series (attention first), then what chance
// alone would do and the gate. Words are the reports' own (VERDICT_LABEL), never upper-cased.
import { VERDICT_LABEL } from '../report/format.js';
import { chanceSentence, needsAttention, placement, reportOrder } from '../report/view.js';
import type { Results, SeriesResult, Verdict } from '../results.js';
import { levelLabel, numsApart, plural, shorten, visible, withUnit } from '../text/index.js';

const CODES = { red: 31, green: 32, yellow: 33, blue: 34, dim: 2, bold: 1 } as const;
type Paint = (c: keyof typeof CODES, s: string) => string;

const COLOUR: Record<Verdict, keyof typeof CODES> = {
  ok: 'green',
  alarm: 'red',
  'at-risk': 'yellow',
  'too-short': 'dim',
  error: 'red',
};

/** Widest verdict word, for the column. */
const WORD_WIDTH = Math.max(...Object.values(VERDICT_LABEL).map((w) => w.length));

/** Untrusted text on one terminal line: invisible characters escaped, long names shortened. */
function clean(s: string): string {
  return visible(shorten(s, 200));
}

function line(s: SeriesResult, paint: Paint): string {
  const tag = paint(COLOUR[s.verdict], VERDICT_LABEL[s.verdict].padEnd(WORD_WIDTH));
  const last = s.checked.at(-1);
  const shown = last ? numsApart([last.value, last.lower, last.upper], 5, { grouping: false }) : [];
  const judged = last
    ? ` ${clean(withUnit(shown[0]!, s.unit))} vs ${levelLabel(last.level)} interval ${clean(withUnit(`${shown[1]} … ${shown[2]}`, s.unit))}: ${placement(s, last)}`
    : '';
  const method = s.method ? paint('dim', ` [${s.method}, ${s.intervalKind}]`) : '';
  const why = s.reason && (s.verdict !== 'ok' || !last) ? paint('dim', ` — ${clean(s.reason)}`) : '';
  return `  ${tag}  ${clean(s.name)}${method}${judged}${why}`;
}

export function renderSummary(r: Results, color: boolean): string {
  const paint: Paint = (c, s) => (color ? `\u001b[${CODES[c]}m${s}\u001b[0m` : s);
  const out: string[] = [];
  const s = r.summary;
  out.push(
    `${paint('bold', 'Leadline')}: ${paint(COLOUR[r.verdict], VERDICT_LABEL[r.verdict])} — ${s.series} series, ` +
      `${plural(s.checkedObservations, 'observation')} checked, ` +
      `${plural(s.alarms, 'alarm')}, ${plural(s.atRisk, 'limit')} at risk`,
  );
  const sorted = reportOrder(r);
  const shown = sorted.length > 40 ? sorted.filter((x) => needsAttention(x)) : sorted;
  for (const x of shown) out.push(line(x, paint));
  if (shown.length < sorted.length)
    out.push(paint('dim', `  … and ${sorted.length - shown.length} more series needing no attention`));
  for (const p of r.problems) {
    const where = [p.file, p.line, p.column].filter((v) => v !== null).join(':');
    out.push(`  ${paint('red', 'problem')} ${clean(where ? `${where}: ` : '')}${clean(p.message)}`);
  }
  for (const n of r.notes ?? []) out.push(`  ${paint('blue', 'note')} ${clean(n)}`);
  out.push(paint('dim', chanceSentence(r)));
  out.push(paint(r.gate.passed ? 'green' : 'red', r.gate.reason));
  out.push(paint('dim', 'Forecasts are estimates with stated uncertainty, not guarantees.'));
  return out.join('\n') + '\n';
}
