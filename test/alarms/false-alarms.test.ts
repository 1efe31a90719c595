import { describe, expect, it } from 'vitest';
import { adjustAlarms, checkedIndices, sideAlpha } from '../../src/alarms/index.js';
import type { CheckedObservation } from '../../src/results.js';

// Benjamini & Hochberg (1995), J. R. Statist. Soc. B 57(1), section 4.1: the 15 p-values of their
// worked example (from memory of the paper). At q = 0.05 the step-up procedure rejects the four
// smallest; Bonferroni (p <= 0.05/15) rejects the three smallest.
const BH_EXAMPLE = [
  0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344, 0.0459, 0.324, 0.4262, 0.5719, 0.6528,
  0.759, 1.0,
];

function obs(p: number): CheckedObservation {
  return {
    index: 0,
    row: 2,
    time: null,
    value: 1,
    step: 1,
    mean: 0,
    lower: -1,
    upper: 0.5,
    level: 95,
    outside: true,
    side: 'above',
    pValue: p,
    adjustedP: p,
    z: 3,
    alarm: true,
  };
}

/** The BH adjusted p-values written out independently: p_adj(i) = min over j >= i of p_(j) * n / j. */
function bhReference(ps: number[]): number[] {
  const n = ps.length;
  const sorted = [...ps].sort((a, b) => a - b);
  return ps.map((p) => {
    let best = 1;
    const rank = sorted.indexOf(p) + 1; // p-values in the example are distinct
    for (let j = rank; j <= n; j++) best = Math.min(best, (sorted[j - 1]! * n) / j);
    return Math.min(1, best);
  });
}

describe('run-wide false-alarm control', () => {
  it('Benjamini–Hochberg raises alarms for exactly the four smallest p-values of the published example', () => {
    const all = BH_EXAMPLE.map((p) => ({ obs: obs(p), alpha: 0.05, direction: 'both' as const }));
    adjustAlarms(all, 'fdr');
    expect(all.map((a) => a.obs.alarm)).toEqual(BH_EXAMPLE.map((_, i) => i < 4));
    const ref = bhReference(BH_EXAMPLE);
    all.forEach((a, i) => expect(a.obs.adjustedP).toBeCloseTo(ref[i]!, 12));
  });

  it('Bonferroni raises alarms for exactly the three p-values at or below 0.05/15', () => {
    const all = BH_EXAMPLE.map((p) => ({ obs: obs(p), alpha: 0.05, direction: 'both' as const }));
    adjustAlarms(all, 'bonferroni');
    expect(all.map((a) => a.obs.alarm)).toEqual(BH_EXAMPLE.map((_, i) => i < 3));
    expect(all[0]!.obs.adjustedP).toBeCloseTo(0.0015, 12);
    expect(all[14]!.obs.adjustedP).toBe(1);
  });

  it('fdr adjustment does not depend on the order observations arrive in', () => {
    const shuffled = [...BH_EXAMPLE].reverse();
    const all = shuffled.map((p) => ({ obs: obs(p), alpha: 0.05, direction: 'both' as const }));
    adjustAlarms(all, 'fdr');
    expect(
      all
        .filter((a) => a.obs.alarm)
        .map((a) => a.obs.pValue)
        .sort(),
    ).toEqual(BH_EXAMPLE.slice(0, 4));
  });

  it('never raises an alarm on the side that is not watched, whatever the p-value', () => {
    const o = obs(1e-9);
    o.side = 'below';
    const all = [{ obs: o, alpha: 0.025, direction: 'above' as const }];
    adjustAlarms(all, 'bonferroni');
    expect(o.alarm).toBe(false);
  });

  it('leaves observations untouched with no control', () => {
    const o = obs(0.2);
    adjustAlarms([{ obs: o, alpha: 0.05, direction: 'both' }], 'none');
    expect(o.alarm).toBe(true);
    expect(o.adjustedP).toBe(0.2);
  });
});

describe('which observations are checked', () => {
  const values = Float64Array.from([1, 2, NaN, 4, 5, NaN]);
  const rows = Int32Array.from([2, 3, 0, 4, 5, 0]);

  it('takes the last N observed points, skipping gap-filled ones', () => {
    expect(checkedIndices(values, rows, 2)).toEqual([3, 4]);
    expect(checkedIndices(values, rows, 1)).toEqual([4]);
  });

  it("takes the rows after a pull request's base line count", () => {
    expect(checkedIndices(values, rows, 1, 3)).toEqual([3, 4]);
    expect(checkedIndices(values, rows, 1, 5)).toEqual([]);
  });

  it('uses the whole tail mass for two-sided watching and half of it for one side', () => {
    expect(sideAlpha(95, 'both')).toBeCloseTo(0.05, 15);
    expect(sideAlpha(95, 'above')).toBeCloseTo(0.025, 15);
    expect(sideAlpha(80, 'below')).toBeCloseTo(0.1, 15);
  });
});
