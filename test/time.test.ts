import { describe, expect, it } from 'vitest';
import { timeAfterLast } from '../src/time.js';

const at = (iso: string) => new Float64Array([Date.parse(iso)]);
const ahead = (iso: string, spacing: 'month' | 'quarter' | 'year', steps: number[]) =>
  steps.map((h) => timeAfterLast({ times: at(iso), spacing, stepMs: null }, h)!.slice(0, 10));

describe('times after the last observation, on the series’ own grid', () => {
  it('keeps a month-end series on month ends', () => {
    expect(ahead('2025-11-30T00:00:00Z', 'month', [1, 2, 3, 4])).toEqual([
      '2025-12-31',
      '2026-01-31',
      '2026-02-28',
      '2026-03-31',
    ]);
  });

  it('lands on 29 February in a leap year and keeps the day of month otherwise', () => {
    expect(ahead('2024-01-31T00:00:00Z', 'month', [1, 2])).toEqual(['2024-02-29', '2024-03-31']);
    expect(ahead('2024-01-15T00:00:00Z', 'month', [1, 2])).toEqual(['2024-02-15', '2024-03-15']);
    expect(ahead('2024-02-29T00:00:00Z', 'year', [1, 4])).toEqual(['2025-02-28', '2028-02-29']);
  });

  it('keeps a quarter-end series on quarter ends', () => {
    expect(ahead('2025-09-30T00:00:00Z', 'quarter', [1, 2, 3, 4])).toEqual([
      '2025-12-31',
      '2026-03-31',
      '2026-06-30',
      '2026-09-30',
    ]);
  });
});
