// The configuration examples in README.md and the demo's config are real: they parse as they stand.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parsePlan } from '../../src/config/index.js';

const readme = readFileSync(new URL('../../README.md', import.meta.url), 'utf8');
const examples = [...readme.matchAll(/```yaml\n([\s\S]*?)```/g)]
  .map((m) => m[1]!)
  .filter((y) => /^version: 1$/m.test(y));

describe('configuration examples', () => {
  it('README.md has at least one Leadline config example', () => {
    expect(examples.length).toBeGreaterThan(0);
  });

  it.each(examples.map((y, i) => [i + 1, y] as const))('README example %i parses', (_, yaml) => {
    const plan = parsePlan(yaml, 'README.md');
    expect(plan.metrics.length).toBeGreaterThan(0);
  });

  it('the demo config parses and has the seven scenario metrics', () => {
    const text = readFileSync(new URL('../../fixtures/demo/leadline.yml', import.meta.url), 'utf8');
    const plan = parsePlan(text, 'leadline.yml');
    expect(plan.metrics.map((m) => m.name)).toHaveLength(7);
    expect(plan.metrics.find((m) => m.name === 'events-db-storage')!.limit).toMatchObject({
      above: 2000,
      risk: 0.05,
    });
  });
});
