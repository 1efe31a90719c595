// Annotations on the CSV lines: each alarm as a warning, or an error when it fails the gate; data and
// config problems likewise; limits at risk on the file's last row. GitHub shows at most 10 warnings
// and 10 errors per step and drops the rest silently, so Leadline keeps within that and counts the
// remainder in one notice.
import path from 'node:path';
import type { Results } from '../results.js';
import { STEP_UNIT } from '../terms.js';
import {
  chance,
  levelLabel,
  num,
  numsApart,
  oneLine,
  pIs,
  plural,
  rowRef,
  windowWords,
  withUnit,
} from '../text/index.js';
import { gateFailsOn } from '../verdict.js';

export { oneLine };

/** Annotations are one line of plain text: no thousands separators inside "[lower, upper]". */
const PLAIN = { grouping: false } as const;

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
  const fails = gateFailsOn(results.gate.failOn);
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
      level: fails.errors ? 'error' : 'warning',
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
      const [value, lower, upper, mean] = numsApart([c.value, c.lower, c.upper, c.mean], 4, PLAIN);
      all.push({
        level: fails.alarms ? 'error' : 'warning',
        title: oneLine(`Leadline alarm: ${s.name}`, 120),
        message: oneLine(
          `${withUnit(value, s.unit)}${c.label ? ` at ${rowRef(c)}` : ''} is ${c.side ?? 'outside'} the ${levelLabel(c.level)} prediction interval ` +
            `[${lower}, ${upper}] (forecast ${mean}, ${num(Math.abs(c.z), 3, PLAIN)} standard errors ` +
            `${c.side === 'below' ? 'under' : 'over'}, ${pIs(c.adjustedP)}). Bound crossed: ${c.side === 'below' ? lower : upper}.`,
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
        level: fails.limits ? 'error' : 'warning',
        title: oneLine(`Leadline limit at risk: ${s.name}`, 120),
        message: oneLine(
          lim.alreadyCrossed
            ? `Already ${lim.side} the limit ${num(lim.value, 6, PLAIN)} at the last observation.`
            : `${chance(lim.probability, lim.paths)} chance of going ${lim.side} ${num(lim.value, 6, PLAIN)} within ${windowWords(lim.withinLabel, lim.within, STEP_UNIT[s.spacing])} ` +
                `(risk accepted: ${num(lim.risk * 100, 3, PLAIN)}%).${when} Forecasts are estimates, not guarantees.`,
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
            `${plural(more, 'more finding')} (${plural(dropped.error, 'error')}, ` +
            `${plural(dropped.warning, 'warning')}) not annotated: GitHub shows at most ` +
            `${PER_STEP.error} errors and ${PER_STEP.warning} warnings per step. The job summary and the results file list every one.`,
        };
  return { shown, overflow };
}
