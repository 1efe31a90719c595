// Output files never replace an input: every file the config can read (matched by a metric's path or
// glob, whether it parsed or not, whether it exists yet or not), the config itself, and one output
// given twice are refused before anything is written.
import { existsSync, mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { cli } from './helpers.js';

const GOOD = `day,v\n${Array.from({ length: 30 }, (_, i) => `2025-01-${String(i + 1).padStart(2, '0')},${10 + (i % 3)}`).join('\n')}\n`;
const BROKEN = 'day,v\n2025-01-01,"unclosed\n';

function project(): string {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'leadline-outputs-'));
  mkdirSync(path.join(dir, 'data'));
  writeFileSync(path.join(dir, 'data', 'good.csv'), GOOD);
  writeFileSync(path.join(dir, 'data', 'broken.csv'), BROKEN);
  writeFileSync(
    path.join(dir, 'leadline.yml'),
    'version: 1\nmetrics:\n  - { name: m, file: "data/*.csv", time: day, value: v }\n',
  );
  return dir;
}

const RUN = ['run', '--config', 'leadline.yml', '--print', 'none', '--fail-on', 'never'];

describe('outputs never overwrite inputs', () => {
  it('refuses a glob-matched CSV that failed to parse', async () => {
    const dir = project();
    const r = await cli([...RUN, '--cwd', dir, '--json', 'data/broken.csv'], dir);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--json: refusing to write to .*data\/broken\.csv: it matches metrics\[0\]\.file/);
    expect(readFileSync(path.join(dir, 'data', 'broken.csv'), 'utf8')).toBe(BROKEN);
  });

  it('refuses a path the glob would match on the next run, though it does not exist yet', async () => {
    const dir = project();
    const r = await cli([...RUN, '--cwd', dir, '--markdown', 'data/report.csv'], dir);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--markdown: refusing to write to .*data\/report\.csv/);
    expect(existsSync(path.join(dir, 'data', 'report.csv'))).toBe(false);
  });

  it('refuses the config, also through another spelling of its path', async () => {
    const dir = project();
    const r = await cli([...RUN, '--cwd', dir, '--html', './data/../leadline.yml'], dir);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--html: refusing to write to .*the config/);
    expect(readFileSync(path.join(dir, 'leadline.yml'), 'utf8')).toContain('metrics:');
  });

  it('refuses two outputs with the same path, before writing either', async () => {
    const dir = project();
    const r = await cli([...RUN, '--cwd', dir, '--json', 'out/r.txt', '--markdown', 'out/../out/r.txt'], dir);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--json and --markdown name the same file/);
    expect(existsSync(path.join(dir, 'out', 'r.txt'))).toBe(false);
  });

  it('still writes to a free path', async () => {
    const dir = project();
    const r = await cli([...RUN, '--cwd', dir, '--json', 'out/r.json'], dir);
    expect(r.code).toBe(2); // broken.csv is a data error
    expect(JSON.parse(readFileSync(path.join(dir, 'out', 'r.json'), 'utf8')).version).toBe(1);
  });
});
