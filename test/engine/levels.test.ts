// Levels as one concept (src/engine/levels.ts). Check values by derivation: a two-sided interval at
// level L holds L/100 of the forecast distribution, so (1 − L/100) lies outside it, half beyond each
// bound (the definition of an equal-tailed interval).
import { describe, expect, it } from 'vitest';
import {
  analyse,
  bandAt,
  checkLevels,
  levelRecord,
  levelKey,
  levelOutside,
  levelTail,
  normaliseLevels,
} from '../../src/engine/index.js';
import { parsePlan } from '../../src/config/index.js';

describe('interval levels', () => {
  it('turns a level into the mass outside the interval and beyond each bound', () => {
    // 95%: 0.05 outside, 0.025 each side; 80%: 0.2 and 0.1; 99%: 0.01 and 0.005 (derivation above).
    expect(levelOutside(95)).toBeCloseTo(0.05, 15);
    expect(levelTail(95)).toBeCloseTo(0.025, 15);
    expect(levelTail(80)).toBeCloseTo(0.1, 15);
    expect(levelTail(99)).toBeCloseTo(0.005, 15);
    expect(levelKey(97.5)).toBe('97.5');
  });

  it('sorts and de-duplicates once, ascending', () => {
    expect(normaliseLevels([95, 80, 95, 50])).toEqual([50, 80, 95]);
  });

  it('rejects an empty list and levels outside (0, 100), naming the value', () => {
    expect(() => checkLevels([])).toThrow(/at least one level/);
    expect(() => checkLevels([80, 100])).toThrow(/got 100/);
    expect(() => checkLevels([0])).toThrow(/got 0/);
    expect(() => checkLevels([Number.NaN])).toThrow(/got NaN/);
    expect(() => checkLevels([80, 95])).not.toThrow();
  });

  it('finds a band by level and says which bands exist when it is missing', () => {
    const bands = [{ level: 80 }, { level: 95 }];
    expect(bandAt(bands, 95)).toBe(bands[1]);
    expect(() => bandAt(bands, 99)).toThrow(/no interval band at level 99 \(bands: 80, 95\)/);
  });

  it('a per-level record reads as a plain object keyed by level, in ascending key order', () => {
    const r = levelRecord([80, 95, 99.5], (l, k) => (k === 1 ? NaN : l / 100));
    expect(Object.keys(r)).toEqual(['80', '95', '99.5']);
    expect(r).toEqual({ '80': 0.8, '95': NaN, '99.5': 0.995 });
    expect(JSON.stringify(r)).toBe('{"80":0.8,"95":null,"99.5":0.995}');
    expect(r['1000000']).toBeUndefined();
  });

  it('the config hands the engine its levels sorted and once each', () => {
    const plan = parsePlan(
      'version: 1\nmetrics:\n  - name: storage\n    file: s.csv\n    time: date\n    value: gb\n    levels: [95, 80, 95]\n',
      'leadline.yml',
    );
    expect(plan.metrics[0]).toMatchObject({ levels: [80, 95], alarmLevel: 95 });
  });

  it('the engine refuses a level of 100 at its entry point', () => {
    const y = Float64Array.from({ length: 40 }, (_, i) => i % 7);
    expect(() =>
      analyse(y, {
        methods: ['naive'],
        season: 1,
        horizon: 3,
        levels: [100],
        intervals: 'analytic',
        paths: 10,
        seed: 1,
        backtest: { minTrain: 10, horizon: 2 },
      } as never),
    ).toThrow(/got 100/);
  });
});
