import { describe, expect, it } from 'vitest';
import {
  agree,
  chance,
  didYouMean,
  nearest,
  num,
  numsApart,
  pct,
  pIs,
  plural,
  pval,
} from '../../src/text/index.js';

describe('numbers for people', () => {
  it('formats values with four significant digits and separators, or plain when asked', () => {
    expect(num(1234.567)).toBe('1,235');
    expect(num(1234.567, 6)).toBe('1,234.57');
    expect(num(1234.567, 6, { grouping: false })).toBe('1234.57');
    expect(num(0.00001234)).toBe('1.23e-5');
    expect(num(-0)).toBe('0');
    expect([num(NaN), num(null), num(Infinity)]).toEqual(['n/a', 'n/a', 'n/a']);
  });

  it('prints p-values as bounds below 0.001 and never as 0', () => {
    expect(pval(0)).toBe('< 0.001');
    expect(pval(4.9e-12)).toBe('< 0.001');
    expect(pval(0.0123)).toBe('0.012');
    expect(pval(0.047619, { atMost: true })).toBe('≤ 0.048');
    expect(pIs(0)).toBe('p < 0.001');
    expect(pIs(0.44)).toBe('p = 0.44');
    expect(pIs(0.047619, { atMost: true })).toBe('p ≤ 0.048');
    expect(pval(NaN)).toBe('n/a');
  });

  it('adds digits until a value outside an interval no longer prints inside it', () => {
    // 656.93 above [655.9, 656.88]: at four digits the value and the upper bound both read 656.9.
    expect(numsApart([656.93, 655.9, 656.88])).toEqual(['656.93', '655.9', '656.88']);
    expect(numsApart([150, 90, 110])).toEqual(['150', '90', '110']);
    // Per-value starting digits: the value keeps six, the bounds four.
    // (at four digits 1234.5 would read 1235, above the value's 1234.57, so all gain one)
    expect(numsApart([1234.5678, 1000, 1234.5], [6, 4, 4], { grouping: false })).toEqual([
      '1234.568',
      '1000',
      '1234.5',
    ]);
    // Equal values stay equal.
    expect(numsApart([2, 2, 3])).toEqual(['2', '2', '3']);
    // A difference in the 12th digit is still shown.
    const [a, b] = numsApart([1.00000000001, 1]);
    expect(a).not.toBe(b);
  });

  it('counts nouns once', () => {
    expect(plural(1, 'alarm')).toBe('1 alarm');
    expect(plural(3, 'alarm')).toBe('3 alarms');
    expect(plural(2, 'series', 'series')).toBe('2 series');
    expect(plural(1, 'row was', 'rows were')).toBe('1 row was');
    expect(agree(2, 'has', 'have')).toBe('have');
    expect(pct(0.934)).toBe('93.4%');
  });
});

describe('num without the locale data', () => {
  it('prints every whole number below 1,000 as Intl.NumberFormat does, at any digits, grouped or not', () => {
    // Oracle: the built-in Intl.NumberFormat('en-US') with the options num uses, for each value.
    const wrong: string[] = [];
    for (const grouping of [true, false])
      for (let d = 1; d <= 6; d++) {
        const intl = new Intl.NumberFormat('en-US', { maximumSignificantDigits: d, useGrouping: grouping });
        for (let x = -1_005; x <= 1_005; x++) {
          const got = num(x, d, { grouping });
          if (got !== intl.format(x))
            wrong.push(`${x} at ${d} digits${grouping ? '' : ' ungrouped'}: ${got}`);
        }
      }
    expect(wrong).toEqual([]);
    expect(num(-0)).toBe('0');
    expect(num(1000)).toBe('1,000');
    expect(num(120, 2)).toBe('120');
    expect(num(123, 2)).toBe('120');
  });
});

describe('did you mean', () => {
  it('suggests a near word, or the one option a word starts or is the start of', () => {
    expect(nearest('valeu', ['value', 'time', 'key'])).toBe('value');
    expect(nearest('latncy', ['date', 'latency'])).toBe('latency');
    expect(nearest('latency', ['date', 'latency_ms'])).toBe('latency_ms');
    expect(nearest('latency', ['latency_ms', 'latency_p95'])).toBeNull(); // two starts: no guess
    expect(nearest('tracking', ['auto', 'tracking-issue', 'off'])).toBe('tracking-issue');
    expect(nearest('zzz', ['alarm', 'limit'])).toBeNull();
    expect(didYouMean('--colr', ['--color', '--config'])).toBe(' Did you mean "--color"?');
    expect(didYouMean('x', [])).toBe('');
  });
});

describe('chance from simulated paths', () => {
  it('never prints certainty or impossibility from a finite number of paths', () => {
    // Rule of three (Hanley & Lippman-Hand 1983, JAMA 249:1743): with 0 events in n trials the 95%
    // upper bound is about 3/n; 1,000 paths all crossing -> at least 1 − 0.003 = 99.7%.
    expect(chance(1, 1000)).toBe('≥ 99.7%');
    expect(chance(0, 1000)).toBe('≤ 0.3%');
    expect(chance(0, 2)).toBe('≤ 100.0%');
    // 9,996 of 10,000 rounds to 100.0% at one decimal: printed as a bound instead.
    expect(chance(0.9996, 10000)).toBe('> 99.9%');
    expect(chance(0.0004, 10000)).toBe('< 0.1%');
    expect(chance(0.62, 1000)).toBe('62.0%');
    // No paths (a limit already crossed): the share as it is.
    expect(chance(1, 0)).toBe('100.0%');
  });
});
