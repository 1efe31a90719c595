// Honest short claims in the terminal and the reports: a history too short for the residual checks
// is never "steady", and a limit window reads plainly ("within 30 days", not "within 30d").
import { mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import type { Results } from '../../src/results.js';
import { cli } from './helpers.js';

function scenario(config: string, files: Record<string, string>): string {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'leadline-wording-'));
  writeFileSync(path.join(dir, 'leadline.yml'), config);
  for (const [name, text] of Object.entries(files)) {
    mkdirSync(path.dirname(path.join(dir, name)), { recursive: true });
    writeFileSync(path.join(dir, name), text);
  }
  return dir;
}

const days = (n: number, value: (i: number) => number) =>
  'date,v\n' +
  Array.from({ length: n }, (_, i) => {
    const d = new Date(Date.UTC(2026, 0, 1 + i)).toISOString().slice(0, 10);
    return `${d},${value(i)}`;
  }).join('\n') +
  '\n';

describe('a 5-row metric', () => {
  it('is too short, never steady, and its residual checks say "not computed"', async () => {
    const dir = scenario(
      'version: 1\nmetrics:\n  - name: five\n    file: m/five.csv\n    time: date\n    value: v\n',
      {
        'm/five.csv':
          'date,v\n2026-01-01,10\n2026-01-02,11\n2026-01-03,10.5\n2026-01-04,10.8\n2026-01-05,10.6\n',
      },
    );
    const r = await cli(
      ['run', '--config', 'leadline.yml', '--json', 'r.json', '--markdown', 'r.md', '--fail-on', 'never'],
      dir,
    );
    expect(r.code).toBe(0);
    const results = JSON.parse(readFileSync(path.join(dir, 'r.json'), 'utf8')) as Results;
    const s = results.series[0]!;
    // The value was judged (naive, fitted to the 4 rows before it: 3 residuals) and lies inside.
    expect(s.checked).toHaveLength(1);
    expect(s.checked[0]!.outside).toBe(false);
    expect(s.residualChecks!.residuals).toBe(3);
    expect(s.residualChecks!.family).toBe(0);
    expect(s.verdict).toBe('too-short');
    expect(s.reason).toContain('at least 10 residuals');
    expect(results.verdict).toBe('too-short');
    expect(r.out).toMatch(/too short\s+five/);
    expect(r.out).not.toContain('steady');
    const md = readFileSync(path.join(dir, 'r.md'), 'utf8');
    expect(md).not.toContain('| passed');
    expect(md.match(/not computed/g)!.length).toBeGreaterThanOrEqual(3);
  });

  it('a long enough history of the same data is steady', async () => {
    const dir = scenario(
      'version: 1\nmetrics:\n  - name: forty\n    file: m/forty.csv\n    time: date\n    value: v\n',
      {
        'm/forty.csv': days(40, (i) => (i === 39 ? 10 : Number((10 + 0.5 * Math.sin(i * 2.3)).toFixed(2)))),
      },
    );
    const r = await cli(['run', '--config', 'leadline.yml', '--json', 'r.json', '--fail-on', 'never'], dir);
    const s = (JSON.parse(readFileSync(path.join(dir, 'r.json'), 'utf8')) as Results).series[0]!;
    expect(s.residualChecks!.residuals).toBeGreaterThanOrEqual(10);
    expect(s.verdict).toBe('ok');
    expect(r.out).toMatch(/steady\s+forty/);
  });
});

describe('a limit window', () => {
  it('reads "within 30 days" in the terminal, the markdown and the HTML, never "30d"', async () => {
    const dir = scenario(
      'version: 1\nmetrics:\n  - name: disk\n    file: m/disk.csv\n    time: date\n    value: v\n    methods: [drift]\n    limit: { above: 100, within: 30d }\n',
      { 'm/disk.csv': days(40, (i) => 50 + i + (i % 3) * 0.2) },
    );
    const r = await cli(
      ['run', '--config', 'leadline.yml', '--markdown', 'r.md', '--html', 'r.html', '--fail-on', 'never'],
      dir,
    );
    expect(r.out).toContain('limit at risk');
    expect(r.out).toMatch(/chance of crossing 100 within 30 days/);
    expect(r.out).not.toMatch(/30d\b/);
    for (const file of ['r.md', 'r.html']) {
      const text = readFileSync(path.join(dir, file), 'utf8');
      expect(text).toContain('within 30 days');
      expect(text).not.toMatch(/within 30d\b/);
    }
  });
});
