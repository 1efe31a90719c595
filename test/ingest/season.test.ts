import { describe, expect, it } from 'vitest';
import { autoSeason } from '../../src/ingest/index.js';

const MINUTE = 60_000;
const HOUR = 60 * MINUTE;
const DAY = 24 * HOUR;
const WEEK = 7 * DAY;

describe('autoSeason (issue 3: hourly 24, daily 7, weekly 52 with two years, monthly 12, quarterly 4, row none)', () => {
  it('follows the spacing', () => {
    expect(autoSeason('hour', 10, HOUR)).toBe(24);
    expect(autoSeason('day', 10, DAY)).toBe(7);
    expect(autoSeason('month', 10, null)).toBe(12);
    expect(autoSeason('quarter', 10, null)).toBe(4);
    expect(autoSeason('year', 10, null)).toBe(1);
    expect(autoSeason('row', 1000, null)).toBe(1);
  });
  it('uses a yearly season for weekly data only with at least two years of observations', () => {
    expect(autoSeason('week', 103, WEEK)).toBe(1);
    expect(autoSeason('week', 104, WEEK)).toBe(52);
    expect(autoSeason('week', 52, 2 * WEEK)).toBe(26);
  });
  it('scales the daily cycle to multi-hour steps and has none for steps that do not divide it', () => {
    expect(autoSeason('hour', 10, 2 * HOUR)).toBe(12);
    expect(autoSeason('hour', 10, 5 * HOUR)).toBe(1);
    expect(autoSeason('day', 10, 2 * DAY)).toBe(1);
  });
  it('gives sub-hourly data a daily cycle when two days are observed', () => {
    expect(autoSeason('minute', 576, 5 * MINUTE)).toBe(288);
    expect(autoSeason('minute', 575, 5 * MINUTE)).toBe(1);
  });
});
