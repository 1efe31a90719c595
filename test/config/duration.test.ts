import { describe, expect, it } from 'vitest';
import { durationToSteps, parseDuration } from '../../src/config/index.js';

const HOUR = 3_600_000;
const DAY = 24 * HOUR;

describe('parseDuration', () => {
  it('reads each unit', () => {
    expect(parseDuration('30d')).toEqual({ amount: 30, unit: 'd' });
    expect(parseDuration('90m')).toEqual({ amount: 90, unit: 'm' });
    expect(parseDuration('6mo')).toEqual({ amount: 6, unit: 'mo' });
    expect(parseDuration(' 1.5 w ')).toEqual({ amount: 1.5, unit: 'w' });
    expect(parseDuration('2q')).toEqual({ amount: 2, unit: 'q' });
    expect(parseDuration('1y')).toEqual({ amount: 1, unit: 'y' });
  });
  it('rejects anything else', () => {
    for (const bad of ['30', 'd', '30 days', '-3d', '0d', '3x']) expect(parseDuration(bad)).toBeNull();
  });
});

describe('durationToSteps', () => {
  it('passes a step count through, whatever the spacing', () => {
    expect(durationToSteps({ steps: 9 }, 'row', null)).toBe(9);
    expect(durationToSteps({ steps: 9 }, 'month', null)).toBe(9);
  });
  it('is null for a duration on a row-order series', () => {
    expect(durationToSteps({ amount: 30, unit: 'd' }, 'row', null)).toBeNull();
  });
  it('divides by fixed steps, rounding up to cover the duration', () => {
    expect(durationToSteps({ amount: 30, unit: 'd' }, 'day', DAY)).toBe(30);
    expect(durationToSteps({ amount: 30, unit: 'd' }, 'week', 7 * DAY)).toBe(5); // 30/7 = 4.29
    expect(durationToSteps({ amount: 12, unit: 'h' }, 'hour', 2 * HOUR)).toBe(6);
    expect(durationToSteps({ amount: 1, unit: 'd' }, 'minute', 5 * 60_000)).toBe(288);
    expect(durationToSteps({ amount: 1, unit: 'h' }, 'day', DAY)).toBe(1);
  });
  it('counts calendar months exactly between calendar units', () => {
    expect(durationToSteps({ amount: 1, unit: 'y' }, 'month', null)).toBe(12);
    expect(durationToSteps({ amount: 2, unit: 'y' }, 'quarter', null)).toBe(8);
    expect(durationToSteps({ amount: 6, unit: 'mo' }, 'quarter', null)).toBe(2);
    expect(durationToSteps({ amount: 18, unit: 'mo' }, 'year', null)).toBe(2);
  });
  it('relates months and days through the mean Gregorian month (365.2425/12 days)', () => {
    // 90 days / 30.436875 = 2.96 months -> 3 steps; 2 months = 60.87 days -> 61 daily steps.
    expect(durationToSteps({ amount: 90, unit: 'd' }, 'month', null)).toBe(3);
    expect(durationToSteps({ amount: 2, unit: 'mo' }, 'day', DAY)).toBe(61);
  });
});
