import { describe, expect, it } from 'vitest';
import { oneLine, planAnnotations } from '../../src/action/annotations.js';
import {
  COMMENT_MAX_BYTES,
  COMMENT_MAX_CHARS,
  cutTo,
  fitRendering,
  needsAttention,
  trackingTitle,
} from '../../src/action/texts.js';
import type { LimitResult } from '../../src/results.js';
import { checked, results, series } from './helpers.js';

const where = { cwd: '/ws/ops', workspace: '/ws' };

const limit = (atRisk: boolean): LimitResult => ({
  side: 'above',
  value: 2000,
  within: 30,
  withinLabel: '30d',
  risk: 0.05,
  pointCrossing: { step: 12, time: '2026-02-12T00:00:00.000Z' },
  boundCrossing: null,
  probability: atRisk ? 0.4 : 0.01,
  paths: 2000,
  atRisk,
  alreadyCrossed: false,
});

describe('planAnnotations', () => {
  it('puts each alarm on its CSV line, path relative to the checkout root', () => {
    const r = results(
      [series('queue depth', 'metrics/queue.csv', { checked: [checked(41, false), checked(42, true)] })],
      {
        gate: { failOn: 'limit', passed: true, reason: '' },
      },
    );
    const { shown, overflow } = planAnnotations(r, where);
    expect(overflow).toBeNull();
    expect(shown).toHaveLength(1);
    expect(shown[0]).toMatchObject({ level: 'warning', file: 'ops/metrics/queue.csv', startLine: 42 });
    expect(shown[0]!.message).toContain('150 is above the 95% prediction interval [90, 110]');
  });

  it('makes alarms errors when they fail the gate, and limits errors under fail-on limit', () => {
    const s = [
      series('a', 'a.csv', { checked: [checked(42, true)] }),
      series('storage', 'storage.csv', { limit: limit(true) }),
      series('calm', 'calm.csv', { limit: limit(false) }),
    ];
    const byAlarm = planAnnotations(
      results(s, { gate: { failOn: 'alarm', passed: false, reason: '' } }),
      where,
    ).shown;
    expect(byAlarm.map((a) => [a.level, a.file, a.startLine])).toEqual([
      ['error', 'ops/a.csv', 42],
      ['warning', 'ops/storage.csv', 41],
    ]);
    const byLimit = planAnnotations(
      results(s, { gate: { failOn: 'limit', passed: false, reason: '' } }),
      where,
    ).shown;
    expect(byLimit.find((a) => a.file === 'ops/storage.csv')?.level).toBe('error');
    expect(byLimit.find((a) => a.file === 'ops/storage.csv')?.message).toMatch(
      /40.0% chance of going above 2000 within 30 days/,
    );
    const never = planAnnotations(
      results(s, { gate: { failOn: 'never', passed: true, reason: '' } }),
      where,
    ).shown;
    expect(never.every((a) => a.level === 'warning')).toBe(true);
  });

  it('keeps within 10 warnings and 10 errors per step, most significant first, and counts the rest', () => {
    const rows = Array.from({ length: 25 }, (_, i) => checked(100 + i, true, { adjustedP: (i + 1) / 1000 }));
    const s = [series('many', 'm.csv', { checked: rows, limit: limit(true) })];
    const plan = planAnnotations(
      results(s, { gate: { failOn: 'alarm', passed: false, reason: '' } }),
      where,
      {
        error: 1,
        warning: 2,
      },
    );
    const errors = plan.shown.filter((a) => a.level === 'error');
    const warnings = plan.shown.filter((a) => a.level === 'warning');
    expect(errors).toHaveLength(9); // one error slot is taken by the gate's own line
    expect(errors.map((a) => a.startLine)).toEqual([100, 101, 102, 103, 104, 105, 106, 107, 108]);
    expect(warnings).toHaveLength(1); // the limit
    expect(plan.overflow?.level).toBe('notice');
    expect(plan.overflow?.message).toMatch(/^16 more findings \(16 errors, 0 warnings\)/);
  });

  it('annotates config and data problems where they are, and leaves out files outside the checkout', () => {
    const r = results([], {
      gate: { failOn: 'limit', passed: false, reason: '' },
      problems: [
        {
          kind: 'data',
          message: 'not a number: "abc"',
          file: 'm.csv',
          line: 7,
          column: 2,
          keyPath: null,
          metric: 'm',
        },
        {
          kind: 'config',
          message: 'bad',
          file: '../../elsewhere.yml',
          line: 3,
          column: 1,
          keyPath: 'metrics[0]',
          metric: null,
        },
      ],
    });
    const shown = planAnnotations(r, where).shown;
    expect(shown[0]).toMatchObject({ level: 'error', file: 'ops/m.csv', startLine: 7 });
    expect(shown[1]!.file).toBeUndefined();
  });

  it('flattens untrusted names to one line', () => {
    expect(oneLine('a\nb\r\n\tc\u0007d')).toBe('a b c d');
    expect(oneLine('x'.repeat(400), 10)).toHaveLength(10);
  });
});

describe('size limits', () => {
  it('cuts on a character boundary within both the character and the byte limit', () => {
    const text = '€'.repeat(100_000); // 3 bytes each
    const cut = cutTo(text, COMMENT_MAX_CHARS, COMMENT_MAX_BYTES);
    expect(cut.length).toBeLessThanOrEqual(COMMENT_MAX_CHARS);
    expect(Buffer.byteLength(cut)).toBeLessThanOrEqual(COMMENT_MAX_BYTES);
    expect(cut).not.toContain('\uFFFD');
    const emoji = cutTo('😀'.repeat(40), 21, 1000);
    expect(emoji).not.toMatch(/[\uD800-\uDBFF](?![\uDC00-\uDFFF])/);
  });

  it('renders again at a smaller size when multi-byte text exceeds the byte limit', () => {
    const asked: number[] = [];
    // A renderer that fills its budget with 4-byte characters.
    const render = (max: number) => {
      asked.push(max);
      return '😀'.repeat(Math.floor(max / 2));
    };
    const out = fitRendering(render, 1_000_000, 1024 * 1024, '\nfooter');
    expect(Buffer.byteLength(out)).toBeLessThanOrEqual(1024 * 1024);
    expect(out.endsWith('\nfooter')).toBe(true);
    expect(asked.length).toBeGreaterThan(1);
    expect(asked[1]!).toBeLessThan(asked[0]!);
  });

  it('returns the first rendering untouched when it fits', () => {
    expect(fitRendering(() => 'small', 100, 100)).toBe('small');
  });
});

describe('tracking texts', () => {
  it('titles the issue by what needs attention and keeps it open for errors', () => {
    const r = results([series('a', 'a.csv', { verdict: 'alarm', checked: [checked(2, true)] })]);
    expect(trackingTitle(r, '.github/leadline.yml')).toBe(
      'Leadline: 1 metric needs attention (.github/leadline.yml)',
    );
    expect(needsAttention(r)).toBe(true);
    expect(needsAttention(results([series('a', 'a.csv')]))).toBe(false);
    expect(needsAttention(results([], { verdict: 'error' }))).toBe(true);
  });
});
