import { describe, expect, it } from 'vitest';
import { LeadlineError } from '../src/errors.js';
import {
  attentionCount,
  bySeverity,
  decideGate,
  FAIL_ON_DEFAULT,
  needsAttention,
  parseFailOn,
  runNeedsAttention,
  runVerdict,
  seriesVerdict,
} from '../src/verdict.js';
import { checked, results, series } from './action/helpers.js';

const v = (verdict: Parameters<typeof runVerdict>[0][number]['verdict']) => ({ verdict });

describe('verdict order', () => {
  it('makes the run as severe as its worst series, and too short only when nothing else ran', () => {
    expect(runVerdict([v('ok'), v('alarm'), v('error'), v('at-risk')])).toBe('error');
    expect(runVerdict([v('ok'), v('at-risk'), v('alarm')])).toBe('alarm');
    expect(runVerdict([v('too-short'), v('ok')])).toBe('ok');
    expect(runVerdict([v('too-short')])).toBe('too-short');
    expect(runVerdict([])).toBe('ok');
  });

  it('sorts every list by the same order, keeping ties in place', () => {
    const list = [
      { n: 1, ...v('ok') },
      { n: 2, ...v('too-short') },
      { n: 3, ...v('alarm') },
      { n: 4, ...v('error') },
      { n: 5, ...v('alarm') },
      { n: 6, ...v('at-risk') },
    ];
    expect(bySeverity(list).map((x) => x.n)).toEqual([4, 3, 5, 6, 1, 2]);
  });
});

describe('a series verdict', () => {
  it('is decided once, from the final alarms and the limit, with the reason beside it', () => {
    const { verdict: _v, reason: _r, ...quiet } = series('a', 'a.csv', { checked: [checked(5, false)] });
    expect(seriesVerdict(quiet)).toEqual({
      verdict: 'ok',
      reason: '1 checked observation within the 95% interval',
    });
    const {
      verdict: _v2,
      reason: _r2,
      ...loud
    } = series('b', 'b.csv', {
      checked: [checked(5, false), checked(6, true)],
    });
    expect(seriesVerdict(loud)).toEqual({
      verdict: 'alarm',
      reason: '1 of 2 checked observations outside the 95% interval (150 above 110, line 6)',
    });
  });

  it('prints a value and the bound it crossed far enough apart to tell them apart', () => {
    const {
      verdict: _v,
      reason: _r,
      ...s
    } = series('c', 'c.csv', {
      checked: [checked(7, true, { value: 656.93, upper: 656.88 })],
    });
    // At four digits both would read 656.9; the reason must show value > bound.
    expect(seriesVerdict(s).reason).toContain('(656.93 above 656.88, line 7)');
  });
});

describe('needs attention', () => {
  it('is one rule for the report and the tracking issue: alarms, limits at risk and errors', () => {
    const ok = series('ok', 'ok.csv');
    const alarm = series('alarm', 'a.csv', { verdict: 'alarm' });
    const error = series('error', 'e.csv', { verdict: 'error' });
    const short = series('short', 's.csv', { verdict: 'too-short' });
    const flagged = series('flagged', 'f.csv');
    flagged.residualChecks = {
      ljungBox: { statistic: 40, df: 10, pValue: 0.00002, ok: false, finding: '', lags: 10 },
    } as unknown as NonNullable<typeof flagged.residualChecks>;
    // A failed residual check is a caveat shown in the series' details, not something to act on.
    expect([ok, alarm, error, short, flagged].map(needsAttention)).toEqual([false, true, true, false, false]);
    const r = results([ok, alarm, error, short]);
    expect(attentionCount(r)).toBe(2);
    expect(runNeedsAttention(r)).toBe(true);
    expect(runNeedsAttention(results([ok, short]))).toBe(false);
  });
});

describe('the gate setting', () => {
  it('has one parser for the Action input and the command flag, and a default chosen per entry', () => {
    expect(FAIL_ON_DEFAULT).toEqual({ action: 'limit', command: 'both' });
    for (const entry of ['action', 'command'] as const) {
      expect(parseFailOn('alarm,limit', entry)).toBe('both');
      expect(parseFailOn('Limit alarm', entry)).toBe('both');
      expect(parseFailOn(' never ', entry)).toBe('never');
      expect(() => parseFailOn('never,alarm', entry)).toThrow(/cannot be combined/);
      expect(() => parseFailOn('', entry)).toThrow(LeadlineError);
    }
    expect(() => parseFailOn('alarms', 'action')).toThrow(
      'Input "fail-on" is "alarms"; expected one of alarm, limit, both, never (default limit). Did you mean "alarm"?',
    );
    expect(() => parseFailOn('alarms', 'command')).toThrow(
      '--fail-on: "alarms" is not valid; expected one of alarm, limit, both, never (default both). Did you mean "alarm"?',
    );
  });

  it('fails on errors under every value, never included, and on findings as fail-on says', () => {
    const none = { errors: 0, alarms: 0, atRisk: 0 };
    const findings = { errors: 0, alarms: 2, atRisk: 1 };
    const broken = { errors: 1, alarms: 0, atRisk: 0 };
    expect(decideGate('never', findings)).toEqual({
      failOn: 'never',
      passed: true,
      reason: 'The gate is off (fail-on: never).',
    });
    expect(decideGate('never', broken)).toEqual({
      failOn: 'never',
      passed: false,
      reason: 'Gate failed (fail-on: never): 1 series could not be analysed.',
    });
    expect(decideGate('alarm', findings).reason).toBe('Gate failed (fail-on: alarm): 2 alarms.');
    expect(decideGate('limit', findings).reason).toBe('Gate failed (fail-on: limit): 1 limit at risk.');
    expect(decideGate('both', { ...findings, errors: 2 }).reason).toBe(
      'Gate failed (fail-on: both): 2 series could not be analysed, 2 alarms, 1 limit at risk.',
    );
    expect(decideGate('both', none)).toEqual({
      failOn: 'both',
      passed: true,
      reason: 'Nothing fails the gate (fail-on: both).',
    });
  });
});
