// Annotations on the CSV lines: each alarm as a warning, or an error when it fails the gate; data and
// config problems likewise; limits at risk on the file's last row. GitHub shows at most 10 warnings
// and 10 errors per step and drops the rest silently, so Leadline keeps within that and counts the
// remainder in one notice.
import path from 'node:path';
import type { FailOn, Results } from '../results.js';

export type AnnotationLevel = 'error' | 'warning' | 'notice';

export interface Annotation {
  level: AnnotationLevel;
  title: string;
  message: string;
  /** Path from the checkout root, forward slashes. */
  file?: string;
  startLine?: number;
}

/** GitHub's per-step display limits (checked in 2026: 10 warnings, 10 errors; 50 per job). */
export const PER_STEP = { error: 10, warning: 10 } as const;

export interface AnnotationPlan {
  shown: Annotation[];
  /** One notice counting what did not fit, or null. */
  overflow: Annotation | null;
}

/** Text for one line of the annotation UI: control characters and runs of space collapsed. */
export function oneLine(s: string, max = 300): string {
  // eslint-disable-next-line no-control-regex
  const t = s.replace(/[\u0000-\u001f\u007f\s]+/g, ' ').trim();
  return t.length > max ? `${t.slice(0, max - 1)}…` : t;
}

function fmt(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  return Math.abs(x) >= 1e6 || (Math.abs(x) < 1e-3 && x !== 0)
    ? x.toExponential(3)
    : String(Number(x.toPrecision(4)));
}

const alarmsFail = (f: FailOn) => f === 'alarm' || f === 'both';
const limitsFail = (f: FailOn) => f === 'limit' || f === 'both';

/**
 * Every annotation the results call for, most urgent first within each level, cut to what GitHub
 * shows. `cwd` is the working directory the results' file paths are relative to; `workspace` the
 * checkout root annotation paths must be relative to. `used` counts warnings and errors this step
 * has already emitted (e.g. a publishing warning), which share the same limits.
 */
export function planAnnotations(
  results: Results,
  where: { cwd: string; workspace: string },
  used: { error: number; warning: number } = { error: 0, warning: 0 },
): AnnotationPlan {
  const failOn = results.gate.failOn;
  const rel = (file: string | null): string | undefined => {
    if (!file) return undefined;
    const r = path.relative(where.workspace, path.resolve(where.cwd, file));
    if (r.startsWith('..') || path.isAbsolute(r)) return undefined;
    return r.split(path.sep).join('/');
  };
  type Ranked = Annotation & { rank: number };
  const all: Ranked[] = [];

  for (const p of results.problems) {
    all.push({
      level: failOn === 'never' ? 'warning' : 'error',
      title: oneLine(`Leadline: ${p.kind} problem${p.metric ? ` in ${p.metric}` : ''}`, 120),
      message: oneLine(p.message, 1000),
      ...(rel(p.file) ? { file: rel(p.file) } : {}),
      ...(p.line ? { startLine: p.line } : {}),
      rank: -1,
    });
  }
  for (const s of results.series) {
    for (const c of s.checked) {
      if (!c.alarm) continue;
      const bound = c.side === 'below' ? c.lower : c.upper;
      all.push({
        level: alarmsFail(failOn) ? 'error' : 'warning',
        title: oneLine(`Leadline alarm: ${s.name}`, 120),
        message: oneLine(
          `${fmt(c.value)} is ${c.side ?? 'outside'} the ${c.level}% prediction interval ` +
            `[${fmt(c.lower)}, ${fmt(c.upper)}] (forecast ${fmt(c.mean)}, ${fmt(Math.abs(c.z))} standard errors ` +
            `${c.side === 'below' ? 'under' : 'over'}, p = ${fmt(c.adjustedP)}). Bound crossed: ${fmt(bound)}.`,
          1000,
        ),
        ...(rel(s.file) ? { file: rel(s.file) } : {}),
        ...(c.row ? { startLine: c.row } : {}),
        rank: c.adjustedP,
      });
    }
    const lim = s.limit;
    if (lim?.atRisk) {
      const lastRow = [...s.history].reverse().find((h) => h.row !== null)?.row ?? null;
      const when = lim.pointCrossing
        ? ` The point forecast crosses at step ${lim.pointCrossing.step}${lim.pointCrossing.time ? ` (${lim.pointCrossing.time.slice(0, 10)})` : ''}.`
        : '';
      all.push({
        level: limitsFail(failOn) ? 'error' : 'warning',
        title: oneLine(`Leadline limit at risk: ${s.name}`, 120),
        message: oneLine(
          lim.alreadyCrossed
            ? `Already ${lim.side} the limit ${fmt(lim.value)} at the last observation.`
            : `${fmt(lim.probability * 100)}% chance of going ${lim.side} ${fmt(lim.value)} within ${lim.withinLabel} ` +
                `(risk accepted: ${fmt(lim.risk * 100)}%).${when} Forecasts are estimates, not guarantees.`,
          1000,
        ),
        ...(rel(s.file) ? { file: rel(s.file) } : {}),
        ...(lastRow ? { startLine: lastRow } : {}),
        rank: 1 - lim.probability,
      });
    }
  }

  const shown: Annotation[] = [];
  const dropped = { error: 0, warning: 0 };
  for (const level of ['error', 'warning'] as const) {
    const room = Math.max(0, PER_STEP[level] - used[level]);
    const mine = all.filter((a) => a.level === level).sort((a, b) => a.rank - b.rank);
    for (const [i, a] of mine.entries()) {
      if (i < room) {
        const { rank: _rank, ...plain } = a;
        shown.push(plain);
      } else dropped[level]++;
    }
  }
  const more = dropped.error + dropped.warning;
  const overflow: Annotation | null =
    more === 0
      ? null
      : {
          level: 'notice',
          title: 'Leadline: more findings than annotations',
          message:
            `${more} more finding${more === 1 ? '' : 's'} (${dropped.error} error${dropped.error === 1 ? '' : 's'}, ` +
            `${dropped.warning} warning${dropped.warning === 1 ? '' : 's'}) not annotated: GitHub shows at most ` +
            `${PER_STEP.error} errors and ${PER_STEP.warning} warnings per step. The job summary and the results file list every one.`,
        };
  return { shown, overflow };
}
