import { mkdir, mkdtemp, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEFAULT_CONFIG_PATH, loadPlan } from '../../src/config/index.js';
import { LeadlineError } from '../../src/errors.js';

let dir: string;
beforeAll(async () => {
  dir = await mkdtemp(path.join(os.tmpdir(), 'leadline-config-'));
  await mkdir(path.join(dir, '.github'));
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

describe('loadPlan', () => {
  it('reads the default config path relative to the working directory', async () => {
    expect(DEFAULT_CONFIG_PATH).toBe('.github/leadline.yml');
    await writeFile(
      path.join(dir, DEFAULT_CONFIG_PATH),
      'version: 1\nmetrics:\n  - { name: a, file: a.csv, value: x }\n',
    );
    const plan = await loadPlan(DEFAULT_CONFIG_PATH, dir);
    expect(plan.configPath).toBe('.github/leadline.yml');
    expect(plan.metrics.map((m) => m.name)).toEqual(['a']);
  });

  it('names the config path relative to the working directory even when given absolute', async () => {
    const plan = await loadPlan(path.join(dir, DEFAULT_CONFIG_PATH), dir);
    expect(plan.configPath).toBe('.github/leadline.yml');
  });

  it('names a missing config file and where it looked', async () => {
    const err = await loadPlan('nope.yml', dir).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(LeadlineError);
    const e = err as LeadlineError;
    expect(e.kind).toBe('config');
    expect(e.file).toBe('nope.yml');
    expect(e.message).toContain('does not exist');
    expect(e.message).toContain(dir);
  });

  it('says so when the config path is a directory', async () => {
    const e = (await loadPlan('.github', dir).catch((x: unknown) => x)) as LeadlineError;
    expect(e).toBeInstanceOf(LeadlineError);
    expect(e.message).toContain('is a directory');
  });

  it('refuses an absolute metric file outside the working directory, naming the key and line', async () => {
    await writeFile(
      path.join(dir, 'abs.yml'),
      'version: 1\nmetrics:\n  - name: a\n    file: /etc/passwd\n    value: x\n',
    );
    const e = (await loadPlan('abs.yml', dir).catch((x: unknown) => x)) as LeadlineError;
    expect(e).toBeInstanceOf(LeadlineError);
    expect([e.file, e.line, e.keyPath]).toEqual(['abs.yml', 3, 'metrics[0].file']);
    expect(e.message).toContain('outside the working directory');
  });

  it('passes parse errors through with the config path', async () => {
    await writeFile(
      path.join(dir, 'typo.yml'),
      'version: 1\nmetrics:\n  - { name: a, file: a.csv, valeu: x }\n',
    );
    const e = (await loadPlan('typo.yml', dir).catch((x: unknown) => x)) as LeadlineError;
    expect(e.describe()).toMatch(
      /^typo\.yml:3:\d+: metrics\[0\]\.valeu: Unknown key "valeu"; did you mean "value"\?/,
    );
  });
});
