// End-to-end: the command on the committed demo scenario (fixtures/demo), in-process through main()
// and once through the committed bundle dist/cli.js in a child process.
import { execFile } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync, mkdirSync, copyFileSync, existsSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { describe, expect, it } from 'vitest';
import { cli as runCli } from './helpers.js';
import type { Results } from '../../src/results.js';

const repo = path.resolve(import.meta.dirname, '..', '..');
const demo = path.join(repo, 'fixtures', 'demo');
const run = promisify(execFile);
/** The command's arguments for a run on the demo scenario. */
const DEMO = ['run', '--cwd', demo, '--config', 'leadline.yml'];

/** The command in-process (test/cli/helpers.ts), from the repository root unless told otherwise. */
const cli = (argv: string[], cwd = repo) => runCli(argv, cwd);

function tmp(): string {
  return mkdtempSync(path.join(os.tmpdir(), 'leadline-cli-'));
}

describe('the command on the demo scenario', () => {
  it('gives each demo series the verdict its scenario was built for', async () => {
    const dir = tmp();
    const json = path.join(dir, 'results.json');
    const r = await cli([...DEMO, '--json', json, '--fail-on', 'never', '--print', 'none']);
    expect(r.code).toBe(0);
    const results = JSON.parse(readFileSync(json, 'utf8')) as Results;
    const verdicts = Object.fromEntries(results.series.map((s) => [s.name, s.verdict]));
    expect(verdicts).toEqual({
      'tracking-api/p95_ms': 'ok',
      'tracking-api/requests': 'ok',
      'dispatch-queue': 'ok',
      'events-db-storage': 'at-risk', // grows ~3 GB/day towards its 2,000 GB volume
      'route-solver-bench': 'ok',
      'label-render': 'alarm', // the newest day carries an injected +46 ms regression
      'harbour-region-signups': 'too-short', // two rows only
      'web-bundle[tracker-web]': 'ok',
      'web-bundle[driver-app]': 'ok',
      'web-bundle[returns-portal]': 'ok',
    });
    expect(results.verdict).toBe('alarm');
    const byName = new Map(results.series.map((s) => [s.name, s]));
    expect(byName.get('tracking-api/p95_ms')!.season).toBe(7);
    expect(byName.get('dispatch-queue')!.season).toBe(24);
    expect(byName.get('route-solver-bench')!.spacing).toBe('row');
    expect(byName.get('route-solver-bench')!.checked).toHaveLength(3);
    const alarm = byName.get('label-render')!.checked[0]!;
    expect(alarm).toMatchObject({ alarm: true, side: 'above', row: 91 });
    // The regression is judged with the interval kind the history before it supports (analytic: its
    // residuals pass the checks), not the one the regression itself pushes the full series to.
    expect(alarm.intervalKind).toBe('analytic');
    expect(alarm.pValue).toBeLessThan(1e-6);
  });

  it('gives a comment within budget whose attention list holds only what to act on', async () => {
    const dir = tmp();
    const r = await cli([
      ...DEMO,
      '--comment',
      path.join(dir, 'c.md'),
      '--fail-on',
      'never',
      '--print',
      'none',
    ]);
    expect(r.code).toBe(0);
    const comment = readFileSync(path.join(dir, 'c.md'), 'utf8');
    // The budget: at most 12 KB for the demo's 10 series, attention first.
    expect(Buffer.byteLength(comment)).toBeLessThanOrEqual(12 * 1024);
    const table = comment.slice(comment.indexOf('### Needs attention'), comment.indexOf('```mermaid'));
    const rows = table.split('\n').filter((l) => /^\| [^|]+ \| [a-z]/.test(l));
    // The alarm and the limit at risk; not the steady series whose residual checks flag a caveat.
    expect(rows.map((l) => l.split(' | ')[1])).toEqual(['label-render', 'events-db-storage']);
    expect(comment).toMatch(
      /^Residual checks flagged 3 series \(.*\): their intervals may be less trustworthy/m,
    );
    expect(comment).toContain('8 other series: 7 steady, 1 too short (harbour-region-signups).');
    expect(comment).toMatch(
      /^Known incidents: 4 rows of label-render, tracking-api\/p95&#95;ms, tracking-api\/requests left out/m,
    );
    expect(comment).toContain('166 ms');
    expect(comment).toContain('within 30 days');
  });

  it('exits 1 when the gate fails and 0 when it passes or is off', async () => {
    const args = [...DEMO, '--print', 'none'];
    expect((await cli([...args, '--fail-on', 'alarm'])).code).toBe(1);
    expect((await cli([...args, '--fail-on', 'limit'])).code).toBe(1);
    expect((await cli([...args, '--fail-on', 'alarm,limit'])).code).toBe(1);
    expect((await cli([...args, '--fail-on', 'never'])).code).toBe(0);
  });

  it('prints a terminal summary that names the alarm and says forecasts are not guarantees', async () => {
    const r = await cli([...DEMO, '--fail-on', 'alarm']);
    expect(r.code).toBe(1);
    // Leadline's own words, the same as the reports', never upper-cased.
    expect(r.out).toMatch(/^ {2}out of line\s+label-render .*: outside, above: alarm/m);
    expect(r.out).toMatch(/^ {2}limit at risk\s+events-db-storage/m);
    expect(r.out).toMatch(/^ {2}too short\s+harbour-region-signups/m);
    expect(r.out).toMatch(/^ {2}steady\s+route-solver-bench/m);
    expect(r.out).not.toMatch(/\b(ALARM|AT RISK|OK|too little data|not enough data)\b/);
    expect(r.out).toMatch(/Gate failed \(fail-on: alarm\): 1 alarm/);
    expect(r.out).toMatch(/not guarantees/);
    expect(r.out).not.toContain('\u001b['); // not a terminal: no colour codes
    const coloured = await cli([...DEMO, '--fail-on', 'never', '--color']);
    expect(coloured.out).toContain('\u001b[31mout of line');
  });

  it('exits 2 with file, line and column for a non-numeric cell, and still writes the results', async () => {
    const dir = tmp();
    writeFileSync(
      path.join(dir, 'l.yml'),
      'version: 1\nmetrics:\n  - name: m\n    file: m.csv\n    value: v\n  - name: n\n    file: n.csv\n    value: v\n',
    );
    writeFileSync(path.join(dir, 'm.csv'), 'v\n1\n2\nabc\n4\n');
    writeFileSync(
      path.join(dir, 'n.csv'),
      'v\n' + Array.from({ length: 30 }, (_, i) => 10 + (i % 3)).join('\n') + '\n',
    );
    const r = await cli(
      ['run', '--cwd', dir, '--config', 'l.yml', '--json', 'out.json', '--print', 'summary'],
      dir,
    ); // output paths are relative to where the command runs, not to --cwd
    expect(r.code).toBe(2);
    expect(r.out).toMatch(/m\.csv:4:1/);
    const results = JSON.parse(readFileSync(path.join(dir, 'out.json'), 'utf8')) as Results;
    expect(results.series.find((s) => s.name === 'n')!.verdict).toBe('ok');
    expect(results.series.find((s) => s.name === 'm')!.verdict).toBe('error');
  });

  it('exits 2 for config and data errors under --fail-on never too', async () => {
    const dir = tmp();
    writeFileSync(
      path.join(dir, 'l.yml'),
      'version: 1\nmetrics:\n  - name: m\n    file: m.csv\n    value: v\n',
    );
    writeFileSync(path.join(dir, 'm.csv'), 'v\n1\n2\nabc\n4\n');
    const data = await cli([
      'run',
      '--cwd',
      dir,
      '--config',
      'l.yml',
      '--fail-on',
      'never',
      '--print',
      'json',
    ]);
    expect(data.code).toBe(2);
    expect((JSON.parse(data.out) as Results).gate).toEqual({
      failOn: 'never',
      passed: false,
      reason: 'Gate failed (fail-on: never): 1 series could not be analysed.',
    });
    writeFileSync(
      path.join(dir, 'bad.yml'),
      'version: 1\nmetrics:\n  - name: m\n    file: m.csv\n    valeu: v\n',
    );
    expect((await cli(['run', '--cwd', dir, '--config', 'bad.yml', '--fail-on', 'never'])).code).toBe(2);
  });

  it('suggests the flag meant when one is mistyped', async () => {
    const r = await cli(['run', '--colour']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/Unknown option "--colour"\. Did you mean "--color"\?/);
    expect((await cli(['run', '--fail-on=alarms'])).err).toMatch(/Did you mean "alarm"\?/);
    expect((await cli(['run', '--mark', 'x.md'])).err).toMatch(/Did you mean "--markdown"\?/);
  });

  it('exits 2 naming the key path and line for a config typo', async () => {
    const dir = tmp();
    writeFileSync(
      path.join(dir, 'l.yml'),
      'version: 1\nmetrics:\n  - name: m\n    file: m.csv\n    valeu: v\n',
    );
    const r = await cli(['run', '--cwd', dir, '--config', 'l.yml']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/l\.yml:5/);
    expect(r.err).toMatch(/valeu/);
    expect(r.err).toMatch(/value/);
  });

  it('exits 2 for usage errors and refuses to write a report over an input CSV', async () => {
    expect((await cli(['run', '--bogus'])).code).toBe(2);
    const dir = tmp();
    mkdirSync(path.join(dir, 'metrics'));
    copyFileSync(path.join(demo, 'metrics', 'label-render-daily.csv'), path.join(dir, 'metrics', 'm.csv'));
    writeFileSync(
      path.join(dir, 'l.yml'),
      'version: 1\nmetrics:\n  - name: m\n    file: metrics/m.csv\n    time: date\n    value: median_ms\n',
    );
    const before = readFileSync(path.join(dir, 'metrics', 'm.csv'), 'utf8');
    const r = await cli([
      'run',
      '--cwd',
      dir,
      '--config',
      'l.yml',
      '--markdown',
      path.join(dir, 'metrics', 'm.csv'),
    ]);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/refusing to write/);
    expect(readFileSync(path.join(dir, 'metrics', 'm.csv'), 'utf8')).toBe(before);
  });

  it("writes the HTML report and renders the markdown with a template of the user's own", async () => {
    const dir = tmp();
    writeFileSync(path.join(dir, 'mine.hbs'), 'Run verdict: {{verdict.label}} ({{verdict.code}})\n');
    const html = path.join(dir, 'report.html');
    const r = await cli([
      ...DEMO,
      '--fail-on',
      'never',
      '--template',
      path.join(dir, 'mine.hbs'),
      '--print',
      'markdown',
      '--html',
      html,
    ]);
    expect(r.code).toBe(0);
    expect(r.out).toBe('Run verdict: out of line (alarm)\n');
    const page = readFileSync(html, 'utf8');
    expect(page).toMatch(/^<!doctype html>/i);
    expect(page).toContain('label-render');
    const missing = await cli([...DEMO, '--template', path.join(dir, 'none.hbs')]);
    expect(missing.code).toBe(2);
    expect(missing.err).toMatch(/--template: cannot read .*none\.hbs/);
  });

  it('reports progress on stderr when there are many series, and keeps stdout for the result', async () => {
    const dir = tmp();
    const cols = Array.from({ length: 220 }, (_, c) => `c${c}`);
    const rows = Array.from({ length: 40 }, (_, t) =>
      cols.map((_, c) => (100 + c + ((t * 7 + c) % 5)).toString()).join(','),
    );
    writeFileSync(path.join(dir, 'wide.csv'), [cols.join(','), ...rows].join('\n') + '\n');
    writeFileSync(
      path.join(dir, 'l.yml'),
      `version: 1\nmetrics:\n  - name: wide\n    file: wide.csv\n    value: [${cols.join(', ')}]\n`,
    );
    const r = await cli(['run', '--cwd', dir, '--config', 'l.yml', '--fail-on', 'never', '--print', 'json']);
    expect(r.code).toBe(0);
    expect(r.err).toMatch(/leadline: analysed 220 of 220 series/);
    expect((JSON.parse(r.out) as Results).series).toHaveLength(220);
    const quiet = await cli([
      'run',
      '--cwd',
      dir,
      '--config',
      'l.yml',
      '--fail-on',
      'never',
      '--print',
      'none',
      '--quiet',
    ]);
    expect(quiet.err).toBe('');
  });

  it('runs from the committed bundle and prints the markdown report', async () => {
    const bundle = path.join(repo, 'dist', 'cli.js');
    expect(existsSync(bundle)).toBe(true);
    const { stdout } = await run(process.execPath, [
      bundle,
      'run',
      '--cwd',
      demo,
      '--config',
      'leadline.yml',
      '--fail-on',
      'never',
      '--print',
      'markdown',
    ]);
    expect(stdout).toContain('label-render');
    expect(stdout).toMatch(/not guarantees/);
    const help = await run(process.execPath, [bundle, '--help']);
    expect(help.stdout).toMatch(/Exit codes/);
  });
});
