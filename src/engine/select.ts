// Choosing among the candidates by their backtest.
import { methodLabel } from './methods.js';
import { fmt } from './numeric.js';
import type { Backtest, MethodName, ScoreName, Selection } from './types.js';
import { SIMPLICITY } from './types.js';

const MEASURE_LABEL: Record<ScoreName, string> = {
  me: '|ME|',
  rmse: 'RMSE',
  mae: 'MAE',
  mpe: '|MPE|',
  mape: 'MAPE',
  mase: 'MASE',
};

/**
 * Score of a method's backtest: the mean over steps 1..H of the measure (absolute value for ME and
 * MPE, whose sign only says the direction of the bias). Steps without a value are left out; NaN when
 * no step has one.
 */
export function backtestScore(bt: Backtest, method: MethodName, score: ScoreName): number {
  const mb = bt.methods[method];
  if (!mb) return NaN;
  let s = 0;
  let n = 0;
  for (const st of mb.steps) {
    const v = st[score];
    if (!Number.isFinite(v)) continue;
    s += score === 'me' || score === 'mpe' ? Math.abs(v) : v;
    n++;
  }
  return n > 0 ? s / n : NaN;
}

/**
 * The candidate with the lowest score; ties (equal to 1e-12 relative) go to the simpler method
 * (SIMPLICITY). A single candidate is taken without selection. Candidates without a score lose to
 * any with one; when none has a score the simplest candidate is taken and the reason says so.
 */
export function selectMethod(bt: Backtest, candidates: MethodName[], score: ScoreName): Selection {
  const scores: Partial<Record<MethodName, number>> = {};
  for (const c of candidates) scores[c] = backtestScore(bt, c, score);
  const label = MEASURE_LABEL[score];
  if (candidates.length === 0) throw new RangeError('selectMethod needs at least one candidate');
  if (candidates.length === 1) {
    const only = candidates[0]!;
    return {
      method: only,
      score,
      scores,
      reason: `Only one method was a candidate: ${methodLabel(only)}${Number.isFinite(scores[only]!) ? ` (backtest mean ${label} ${fmt(scores[only]!)})` : ''}.`,
    };
  }
  const bySimplicity = [...candidates].sort((a, b) => SIMPLICITY[a] - SIMPLICITY[b]);
  let best: MethodName | null = null;
  for (const c of bySimplicity) {
    const v = scores[c]!;
    if (!Number.isFinite(v)) continue;
    if (best === null) {
      best = c;
      continue;
    }
    const b = scores[best]!;
    if (v < b && !(Math.abs(v - b) <= 1e-12 * Math.max(Math.abs(v), Math.abs(b)))) best = c;
  }
  const list = bySimplicity
    .map((c) => `${methodLabel(c)} ${Number.isFinite(scores[c]!) ? fmt(scores[c]!) : 'no score'}`)
    .join(', ');
  if (best === null) {
    const simplest = bySimplicity[0]!;
    return {
      method: simplest,
      score,
      scores,
      reason: `No candidate has a backtest ${label} (${list}), so the simplest, ${methodLabel(simplest)}, is used.`,
    };
  }
  const ties = bySimplicity.filter(
    (c) =>
      c !== best &&
      Number.isFinite(scores[c]!) &&
      Math.abs(scores[c]! - scores[best]!) <= 1e-12 * Math.max(Math.abs(scores[c]!), Math.abs(scores[best]!)),
  );
  return {
    method: best,
    score,
    scores,
    reason:
      `${methodLabel(best)} has the lowest backtest ${label} averaged over steps 1–${bt.horizon}` +
      (ties.length > 0 ? `, tied with ${ties.map(methodLabel).join(', ')} and preferred as simpler` : '') +
      ` (${list}).`,
  };
}
