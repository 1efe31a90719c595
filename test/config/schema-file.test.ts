import { readFile } from 'node:fs/promises';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { SCHEMA_FILE, schemaFileText } from '../../scripts/schema.js';
import { parsePlan } from '../../src/config/index.js';

describe('leadline.schema.json', () => {
  it('is up to date with the zod schema (regenerate: node --import tsx scripts/schema.ts)', async () => {
    const committed = await readFile(SCHEMA_FILE, 'utf8');
    expect(committed).toBe(await schemaFileText());
  });

  it('describes the binding keys and rejects unknown ones', async () => {
    const schema = JSON.parse(await readFile(SCHEMA_FILE, 'utf8')) as {
      required: string[];
      additionalProperties: boolean;
      properties: {
        metrics: { items: { properties: Record<string, { description?: string }>; required: string[] } };
      };
    };
    expect(schema.additionalProperties).toBe(false);
    expect(schema.required).toEqual(['metrics']);
    const metric = schema.properties.metrics.items;
    expect(metric.required.sort()).toEqual(['file', 'name', 'value']);
    for (const key of [
      'name',
      'file',
      'time',
      'value',
      'key',
      'season',
      'methods',
      'horizon',
      'levels',
      'intervals',
      'backtest',
      'check',
      'direction',
      'alarmLevel',
      'falseAlarms',
      'limit',
    ]) {
      expect(metric.properties[key], key).toBeDefined();
      expect(metric.properties[key]!.description, key).toBeTruthy();
    }
  });

  it('agrees with parsePlan on a full example', () => {
    const text = `version: 1
defaults: { levels: [80, 95], falseAlarms: fdr }
metrics:
  - name: disk
    file: metrics/disk.csv
    time: day
    value: [used, free]
    key: host
    season: auto
    methods: [naive, drift]
    horizon: 30
    intervals: bootstrap
    backtest: { minTrain: 20, horizon: 7 }
    check: { last: 2 }
    direction: above
    alarmLevel: 95
    limit: { above: 1000, within: 30d, risk: 0.05 }
    score: rmse
    paths: 2000
    seed: 7
    blanks: missing
    duplicates: last
`;
    expect(() => parsePlan(text, 'x.yml')).not.toThrow();
    expect(parse(text)).toBeTypeOf('object');
  });
});
