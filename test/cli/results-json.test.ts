import { describe, expect, it } from 'vitest';
import { resultsJson } from '../../src/files.js';
import { runJob } from '../../src/job.js';
import path from 'node:path';

const demo = path.resolve(import.meta.dirname, '..', '..', 'fixtures', 'demo');

describe('the results JSON text', () => {
  it('parses to exactly the results, one series per line', async () => {
    const results = await runJob({ cwd: demo, configPath: 'leadline.yml', failOn: 'both', now: new Date(0) });
    const text = [...resultsJson(results)].join('');
    expect(JSON.parse(text)).toEqual(JSON.parse(JSON.stringify(results)));
    const seriesLines = text.split('\n').filter((l) => l.startsWith('    {"name":'));
    expect(seriesLines).toHaveLength(results.series.length);
  });

  it('is valid JSON for a run with no series', async () => {
    const results = await runJob({ cwd: demo, configPath: 'leadline.yml', failOn: 'both', now: new Date(0) });
    const empty = { ...results, series: [] };
    expect(JSON.parse([...resultsJson(empty)].join(''))).toEqual(empty);
  });
});
