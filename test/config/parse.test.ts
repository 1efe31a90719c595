import { describe, expect, it } from 'vitest';
import { backtestFor, DEFAULTS, parsePlan } from '../../src/config/index.js';
import { LeadlineError } from '../../src/errors.js';

const FILE = '.github/leadline.yml';

/** Parses `text` expecting a config error; returns it. */
function configError(text: string): LeadlineError {
  try {
    parsePlan(text, FILE);
  } catch (e) {
    expect(e).toBeInstanceOf(LeadlineError);
    const err = e as LeadlineError;
    expect(err.kind).toBe('config');
    expect(err.file).toBe(FILE);
    return err;
  }
  throw new Error('expected a config error');
}

const one = (extra: string) => `version: 1
metrics:
  - name: storage
    file: data/storage.csv
    time: date
    value: used_gb
${extra}`;

describe('parsePlan: valid configs', () => {
  it('fills every option of a minimal metric from the built-in defaults', () => {
    const plan = parsePlan(one(''), FILE);
    expect(plan.version).toBe(1);
    expect(plan.configPath).toBe(FILE);
    expect(plan.falseAlarms).toBe('none');
    const m = plan.metrics[0]!;
    expect(m).toMatchObject({
      name: 'storage',
      file: 'data/storage.csv',
      time: 'date',
      values: ['used_gb'],
      key: null,
      keyPath: 'metrics[0]',
      line: 3,
      season: 'auto',
      methods: ['mean', 'naive', 'seasonal-naive', 'drift'],
      horizon: 14,
      levels: [80, 95],
      intervals: 'auto',
      backtest: { minTrain: 10, horizon: 14 },
      score: 'mase',
      paths: 1000,
      seed: 1,
      check: { last: 1 },
      direction: 'both',
      alarmLevel: 95,
      falseAlarms: 'none',
      limit: null,
      blanks: 'error',
      duplicates: 'error',
    });
  });

  it('applies defaults: under every metric, and a metric value over them', () => {
    const plan = parsePlan(
      `version: 1
defaults:
  horizon: 30
  levels: [95, 80, 99]
  falseAlarms: fdr
  check: { last: 3 }
  backtest: { minTrain: 20 }
metrics:
  - { name: a, file: a.csv, value: x }
  - { name: b, file: b.csv, value: [x, y], horizon: 7, check: { last: 2 }, backtest: { horizon: 3 }, falseAlarms: fdr }
`,
      FILE,
    );
    const [a, b] = plan.metrics;
    expect(plan.falseAlarms).toBe('fdr');
    expect(a).toMatchObject({
      horizon: 30,
      levels: [80, 95, 99],
      alarmLevel: 99,
      check: { last: 3 },
      backtest: { minTrain: 20, horizon: 30 },
      time: null,
    });
    expect(b).toMatchObject({
      horizon: 7,
      values: ['x', 'y'],
      check: { last: 2 },
      backtest: { minTrain: 20, horizon: 3 },
      falseAlarms: 'fdr',
    });
  });

  it('reads a limit with a duration window and a default risk', () => {
    const m = parsePlan(one('    limit: { above: 900, within: 30d }'), FILE).metrics[0]!;
    expect(m.limit).toEqual({
      above: 900,
      below: null,
      within: { amount: 30, unit: 'd' },
      withinLabel: '30d',
      risk: 0.05,
    });
  });

  it('defaults the limit window to the horizon in steps', () => {
    const m = parsePlan(one('    horizon: 21\n    limit: { below: 5, risk: 0.1 }'), FILE).metrics[0]!;
    expect(m.limit).toEqual({ above: null, below: 5, within: { steps: 21 }, withinLabel: '21', risk: 0.1 });
  });

  it('lets a metric side replace the side of defaults.limit', () => {
    const plan = parsePlan(
      `version: 1
defaults:
  limit: { above: 100, within: 2w, risk: 0.01 }
metrics:
  - { name: a, file: a.csv, value: x }
  - { name: b, file: a.csv, value: y, limit: { below: 3 } }
`,
      FILE,
    );
    expect(plan.metrics[0]!.limit).toMatchObject({ above: 100, below: null, withinLabel: '2w', risk: 0.01 });
    expect(plan.metrics[1]!.limit).toMatchObject({ above: null, below: 3, withinLabel: '2w', risk: 0.01 });
  });

  it('gives no limit to metrics when defaults.limit has no side', () => {
    const plan = parsePlan(
      'version: 1\ndefaults:\n  limit: { risk: 0.2 }\nmetrics:\n  - { name: a, file: a.csv, value: x }\n',
      FILE,
    );
    expect(plan.metrics[0]!.limit).toBeNull();
  });

  it('accepts a config without version, a BOM, and YAML anchors and merge keys', () => {
    const plan = parsePlan(
      `\uFEFFmetrics:
  - &first { name: a, file: a.csv, time: t, value: x }
  - <<: *first
    name: b
`,
      FILE,
    );
    expect(plan.metrics[0]).toMatchObject({ name: 'a', file: 'a.csv', time: 't' });
    expect(plan.metrics[1]).toMatchObject({ name: 'b', file: 'a.csv', time: 't', values: ['x'] });
  });

  it('follows the season for a defaulted backtest.minTrain but keeps a configured one', () => {
    const plan = parsePlan(
      'version: 1\nmetrics:\n  - { name: a, file: a.csv, value: x }\n  - { name: b, file: a.csv, value: y, backtest: { minTrain: 12 } }\n  - { name: c, file: a.csv, value: z, season: 12 }\n',
      FILE,
    );
    const [a, b, c] = plan.metrics;
    expect(backtestFor(a!, 7)).toEqual({ minTrain: 14, horizon: 14 });
    expect(backtestFor(a!, 1)).toEqual({ minTrain: 10, horizon: 14 });
    expect(backtestFor(b!, 24)).toEqual({ minTrain: 12, horizon: 14 });
    expect(c!.backtest.minTrain).toBe(24);
  });

  it('exposes frozen built-in defaults', () => {
    expect(DEFAULTS.horizon).toBe(14);
    expect(Object.isFrozen(DEFAULTS.levels)).toBe(true);
  });
});

describe('parsePlan: bad input names the file, line, column and key path', () => {
  it('suggests the nearest key for a typo in a metric', () => {
    const e = configError(one('    horizn: 7'));
    expect(e.line).toBe(7);
    expect(e.column).toBe(5);
    expect(e.keyPath).toBe('metrics[0].horizn');
    expect(e.message).toContain('did you mean "horizon"?');
    expect(e.describe()).toBe(
      '.github/leadline.yml:7:5: metrics[0].horizn: Unknown key "horizn"; did you mean "horizon"?',
    );
  });

  it('suggests nearest keys at the top level, in defaults and in nested mappings', () => {
    expect(configError('version: 1\nmetric:\n  - {}\n').message).toContain('did you mean "metrics"?');
    const d = configError(
      'version: 1\ndefaults:\n  seasn: 7\nmetrics:\n  - { name: a, file: a.csv, value: x }\n',
    );
    expect([d.line, d.keyPath]).toEqual([3, 'defaults.seasn']);
    expect(d.message).toContain('"season"');
    const c = configError(one('    check: { lst: 2 }'));
    expect([c.line, c.column, c.keyPath]).toEqual([7, 14, 'metrics[0].check.lst']);
    expect(c.message).toContain('did you mean "last"?');
  });

  it('lists the valid keys when nothing is close', () => {
    const e = configError(one('    zzzzzzzz: 1'));
    expect(e.message).toContain('valid keys here: name, file, time, value, key');
  });

  it('names the expected and found value for a wrong type', () => {
    const e = configError(one('    horizon: soon'));
    expect([e.line, e.column, e.keyPath]).toEqual([7, 14, 'metrics[0].horizon']);
    expect(e.message).toBe('Expected a number, found "soon".');
  });

  it('rejects a fractional whole-number option', () => {
    const e = configError(one('    check:\n      last: 1.5'));
    expect([e.line, e.column, e.keyPath]).toEqual([8, 13, 'metrics[0].check.last']);
    expect(e.message).toContain('whole number');
    expect(e.message).toContain('1.5');
  });

  it('suggests the nearest choice for a misspelt enum value', () => {
    const e = configError(one('    intervals: bootsrap'));
    expect(e.keyPath).toBe('metrics[0].intervals');
    expect(e.message).toContain('did you mean "bootstrap"?');
    const m = configError(one('    methods: [naive, seasonal_naive]'));
    expect([m.line, m.keyPath]).toEqual([7, 'metrics[0].methods[1]']);
    expect(m.message).toContain('"seasonal-naive"');
  });

  it('reports a missing required key at the metric that lacks it', () => {
    const e = configError('version: 1\nmetrics:\n  - name: a\n    value: x\n');
    expect(e.line).toBe(3);
    expect(e.keyPath).toBe('metrics[0].file');
    expect(e.message).toContain('"file" is required');
  });

  it('rejects an unsupported version', () => {
    const e = configError('version: 2\nmetrics:\n  - { name: a, file: a.csv, value: x }\n');
    expect([e.line, e.column, e.keyPath]).toEqual([1, 10, 'version']);
    expect(e.message).toContain('found 2');
  });

  it('rejects an empty metrics list and an empty levels list', () => {
    expect(configError('version: 1\nmetrics: []\n').keyPath).toBe('metrics');
    const e = configError(one('    levels: []'));
    expect(e.message).toBe('Expected at least 1 entry, found an empty list.');
  });

  it('rejects an alarmLevel that is not one of the levels', () => {
    const e = configError(one('    levels: [80, 95]\n    alarmLevel: 90'));
    expect([e.line, e.column, e.keyPath]).toEqual([8, 17, 'metrics[0].alarmLevel']);
    expect(e.message).toContain('not one of the levels (80, 95)');
  });

  it('points at defaults when the bad alarmLevel comes from there', () => {
    const e = configError(
      'version: 1\ndefaults:\n  alarmLevel: 99\nmetrics:\n  - { name: a, file: a.csv, value: x }\n',
    );
    expect([e.line, e.keyPath]).toEqual([3, 'defaults.alarmLevel']);
  });

  it('explains that falseAlarms is run-wide when a metric differs', () => {
    const e = configError(one('    falseAlarms: bonferroni'));
    expect([e.line, e.keyPath]).toEqual([7, 'metrics[0].falseAlarms']);
    expect(e.message).toContain('whole run');
    expect(e.message).toContain('set it under defaults');
  });

  it('names both lines of a duplicated metric name', () => {
    const e = configError(
      'version: 1\nmetrics:\n  - name: latency\n    file: a.csv\n    value: x\n  - name: latency\n    file: b.csv\n    value: y\n',
    );
    expect([e.line, e.keyPath]).toEqual([6, 'metrics[1].name']);
    expect(e.message).toContain('metrics[0] (line 3)');
  });

  it('rejects a limit with both sides, or with none', () => {
    const both = configError(one('    limit: { above: 10, below: 1 }'));
    expect([both.line, both.keyPath]).toEqual([7, 'metrics[0].limit']);
    expect(both.message).toContain('either above or below');
    const none = configError(one('    limit: { risk: 0.1 }'));
    expect(none.message).toContain('needs a threshold');
  });

  it('rejects a malformed limit window and an out-of-range risk', () => {
    const w = configError(one('    limit: { above: 10, within: 3 days }'));
    expect([w.line, w.keyPath]).toEqual([7, 'metrics[0].limit.within']);
    expect(w.message).toContain('duration such as 30d');
    expect(w.message).toContain('"3 days"');
    const r = configError(one('    limit: { above: 10, risk: 1.5 }'));
    expect(r.keyPath).toBe('metrics[0].limit.risk');
    expect(r.message).toContain('less than 1');
  });

  it('rejects a file that leads outside the working directory', () => {
    const e = configError(
      'version: 1\nmetrics:\n  - name: a\n    file: data/../../secrets.csv\n    value: x\n',
    );
    expect([e.line, e.column, e.keyPath]).toEqual([4, 11, 'metrics[0].file']);
    expect(e.message).toContain('outside the working directory');
  });

  it('rejects a column used twice', () => {
    expect(configError(one('').replace('value: used_gb', 'value: [a, b, a]')).keyPath).toBe(
      'metrics[0].value[2]',
    );
    expect(configError(one('').replace('value: used_gb', 'value: date')).message).toContain(
      'both the time column and a value column',
    );
    expect(configError(one('    key: used_gb')).keyPath).toBe('metrics[0].key');
  });

  it('asks for quotes around a column name YAML read as a number', () => {
    const e = configError(one('').replace('time: date', 'time: 2024'));
    expect(e.message).toContain('found 2024 (put it in quotes if it is a name)');
  });

  it('reports YAML syntax errors with their position', () => {
    const e = configError('version: 1\nmetrics:\n  - name: a\n   file: b\n');
    expect(e.line).toBe(4);
    expect(e.message).toMatch(/^YAML syntax error/);
    const dup = configError('version: 1\nversion: 1\nmetrics: []\n');
    expect(dup.line).toBe(2);
  });

  it('rejects an empty config and a config that is not a mapping', () => {
    expect(configError('  \n').message).toContain('empty');
    expect(configError('- a\n- b\n').message).toContain('must be a mapping');
  });

  it('lists further problems after the first, in reading order', () => {
    const e = configError(one('    horizon: 0\n    seed: -1'));
    expect(e.line).toBe(7);
    expect(e.message).toContain('Also:');
    expect(e.message).toContain('line 8: metrics[0].seed');
  });
});
