// Known incidents as the config gives them (`incidents:` time ranges with a reason): checked and
// turned into millisecond ranges here, matched to a series' rows in ingest. Pure.
import { parseTimeCell, TimeKind } from '../ingest/times.js';
import { formatKeyPath, type KeyPath } from './locate.js';
import type { RawMetric } from './schema.js';
import type { IncidentRange } from './types.js';

/** The reason shown for an incident row when none is given. */
export const DEFAULT_INCIDENT_REASON = 'known incident';

interface Problem {
  path: KeyPath;
  message: string;
}

/** The end (inclusive, ms) of the time written as `text`: a date covers its day, a year-month its month. */
function endOf(text: string, start: number, kind: TimeKind): number {
  if (kind !== TimeKind.Date) return start;
  const d = new Date(start);
  if (/^\s*\d{4}-\d{2}\s*$/.test(text)) d.setUTCMonth(d.getUTCMonth() + 1);
  else d.setUTCDate(d.getUTCDate() + 1);
  return d.getTime() - 1;
}

/** The metric's incident ranges, or problems naming the key (e.g. `metrics[2].incidents[0].to`). */
export function buildIncidents(
  m: RawMetric,
  base: KeyPath,
  time: string | null,
  problems: Problem[],
): IncidentRange[] {
  const list = m.incidents ?? [];
  if (list.length === 0) return [];
  if (time === null) {
    problems.push({
      path: [...base, 'incidents'],
      message:
        'Incident ranges are times, but this metric has no time column (row order); mark the rows with incidentColumn instead.',
    });
    return [];
  }
  const out: IncidentRange[] = [];
  list.forEach((x, j) => {
    const at = (key: string): KeyPath => [...base, 'incidents', j, key];
    const from = parseTimeCell(x.from);
    const to = x.to === undefined ? from : parseTimeCell(x.to);
    const isTime = (t: { kind: TimeKind }) =>
      t.kind === TimeKind.Date || t.kind === TimeKind.Naive || t.kind === TimeKind.Offset;
    let ok = true;
    for (const [key, t, text] of [
      ['from', from, x.from],
      ['to', to, x.to],
    ] as const) {
      if (text === undefined || isTime(t)) continue;
      problems.push({
        path: at(key),
        message: `Expected an ISO 8601 date or datetime (e.g. 2026-03-01 or 2026-03-01T12:00:00Z), found ${JSON.stringify(text)}.`,
      });
      ok = false;
    }
    if (!ok) return;
    const fromMs = from.value;
    const toMs = endOf(x.to ?? x.from, to.value, to.kind);
    if (toMs < fromMs) {
      problems.push({
        path: at('to'),
        message: `The incident ends (${x.to}) before it starts (${x.from}); "to" must not come before "from".`,
      });
      return;
    }
    out.push({
      from: fromMs,
      to: toMs,
      written: x.to === undefined ? x.from.trim() : `${x.from.trim()} to ${x.to.trim()}`,
      reason: x.reason?.trim() || DEFAULT_INCIDENT_REASON,
      keyPath: formatKeyPath([...base, 'incidents', j]),
    });
  });
  return out;
}
