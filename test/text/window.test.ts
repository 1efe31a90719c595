// A limit window read plainly wherever it is printed (terminal, reports, annotations).
import { describe, expect, it } from 'vitest';
import { windowWords } from '../../src/text/index.js';

describe('windowWords', () => {
  it('reads a configured duration in words, never as the config wrote it', () => {
    expect(windowWords('30d', 30, 'day')).toBe('30 days');
    expect(windowWords('1y', 365, 'day')).toBe('1 year');
    expect(windowWords('6mo', 26, 'week')).toBe('6 months');
    expect(windowWords('90m', 90, 'minute')).toBe('90 minutes');
    expect(windowWords(' 2q ', 6, 'month')).toBe('2 quarters');
  });

  it('reads a window given in steps as steps of the series', () => {
    expect(windowWords('14', 14, 'day')).toBe('14 days');
    expect(windowWords('1', 1, 'step')).toBe('1 step');
  });
});
