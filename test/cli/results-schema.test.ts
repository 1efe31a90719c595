import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { RESULTS_SCHEMA_FILE, resultsSchemaFileText } from '../../scripts/schema.js';
import { resultsJson } from '../../src/files.js';
import { runJob } from '../../src/job.js';
import { RESULTS_SCHEMA_ID, resultsSchema } from '../../src/results.js';

const demo = path.resolve(import.meta.dirname, '..', '..', 'fixtures', 'demo');

describe('leadline-results.schema.json', () => {
  it('is up to date with the zod schema in src/results.ts (regenerate: npm run docs)', async () => {
    expect(await readFile(RESULTS_SCHEMA_FILE, 'utf8')).toBe(await resultsSchemaFileText());
  });

  it('names itself, requires the run fields and allows no others', async () => {
    const schema = JSON.parse(await readFile(RESULTS_SCHEMA_FILE, 'utf8')) as {
      $id: string;
      required: string[];
      additionalProperties: boolean;
      properties: { series: { items: { required: string[] } } };
    };
    expect(schema.$id).toBe(RESULTS_SCHEMA_ID);
    expect(schema.additionalProperties).toBe(false);
    expect(schema.required).toEqual(
      expect.arrayContaining(['$schema', 'version', 'verdict', 'gate', 'summary', 'series', 'problems']),
    );
    expect(schema.properties.series.items.required).toEqual(
      expect.arrayContaining(['name', 'checked', 'verdict', 'alarmLevel', 'direction']),
    );
  });
});

describe('a results file', () => {
  it('starts with its $schema and reads back, through the schema, to the results written', async () => {
    const results = await runJob({ cwd: demo, configPath: 'leadline.yml', failOn: 'both', now: new Date(0) });
    const text = [...resultsJson(results)].join('');
    expect(text.startsWith(`{\n  "$schema": "${RESULTS_SCHEMA_ID}",`)).toBe(true);
    const read = resultsSchema.parse(JSON.parse(text));
    // Non-finite numbers are null in the file and NaN once read: compare the files.
    expect([...resultsJson(read)].join('')).toBe(text);
  });

  it('is refused when a field has the wrong type, an unknown key or an oversized text', async () => {
    const results = await runJob({ cwd: demo, configPath: 'leadline.yml', failOn: 'both', now: new Date(0) });
    const good = JSON.parse([...resultsJson(results)].join('')) as Record<string, unknown> & {
      series: Record<string, unknown>[];
    };
    const bad = (mutate: (r: typeof good) => void) => {
      const r = structuredClone(good);
      mutate(r);
      return resultsSchema.safeParse(r).success;
    };
    expect(bad(() => {})).toBe(true);
    expect(bad((r) => (r.series[0]!.verdict = 'fine'))).toBe(false);
    expect(bad((r) => (r.series[0]!.extra = 1))).toBe(false);
    expect(bad((r) => (r.series[0]!.name = 'x'.repeat(5000)))).toBe(false);
    expect(bad((r) => (r.$schema = 'urn:other'))).toBe(false);
    expect(bad((r) => delete r.$schema)).toBe(false);
  });
});
