// run() in-process with fakes for the job, the renderers, git and GitHub: the order of the steps
// and what survives a publishing failure. The bundled Action is covered end to end in e2e.test.ts.
import { mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import type { GitRunner } from '../../src/action/git.js';
import type { ActionDeps } from '../../src/action/main.js';
import { heldRun, type Results } from '../../src/results.js';
import { FakeGitHub, checked, results, series } from './helpers.js';

// The real job and renderers are exercised elsewhere; these keep this test to the Action's logic.
vi.mock('../../src/job.js', () => ({ startJob: () => Promise.reject(new Error('not used')) }));
vi.mock('../../src/report/index.js', () => ({
  renderMarkdown: () => '',
  renderHtml: () => '',
  reportDetail: () => new Set(),
}));
const { run } = await import('../../src/action/main.js');

let dir: string;
let stdout: string;
const git: GitRunner = { run: async () => ({ code: 1, stdout: Buffer.alloc(0), stderr: '' }) };

beforeEach(() => {
  dir = mkdtempSync(path.join(os.tmpdir(), 'leadline-main-'));
  mkdirSync(path.join(dir, 'ws'));
  writeFileSync(path.join(dir, 'out'), '');
  writeFileSync(path.join(dir, 'summary.md'), '');
  stdout = '';
  vi.spyOn(process.stdout, 'write').mockImplementation((s: string | Uint8Array) => {
    stdout += String(s);
    return true;
  });
});
afterEach(() => {
  vi.restoreAllMocks();
  vi.unstubAllEnvs();
  process.exitCode = undefined;
});

function setEnv(inputs: Record<string, string>, event: { name: string; payload: object }) {
  writeFileSync(path.join(dir, 'event.json'), JSON.stringify(event.payload));
  const env: Record<string, string> = {
    GITHUB_WORKSPACE: path.join(dir, 'ws'),
    GITHUB_OUTPUT: path.join(dir, 'out'),
    GITHUB_STEP_SUMMARY: path.join(dir, 'summary.md'),
    GITHUB_EVENT_NAME: event.name,
    GITHUB_EVENT_PATH: path.join(dir, 'event.json'),
    GITHUB_REPOSITORY: 'fernhill-labs/capacity',
    RUNNER_TEMP: dir,
    INPUT_TOKEN: 'ghs_inprocess',
    ...Object.fromEntries(Object.entries(inputs).map(([k, v]) => [`INPUT_${k.toUpperCase()}`, v])),
  };
  for (const [k, v] of Object.entries(env)) vi.stubEnv(k, v);
  return env;
}

function deps(r: Results, gh: FakeGitHub, extra: Partial<ActionDeps> = {}): Partial<ActionDeps> {
  return {
    env: process.env,
    git,
    github: () => gh,
    job: async () => heldRun(r),
    renderMarkdown: (res, o) =>
      `${o?.marker ?? ''}\n# Report: ${res.verdict}\n${'x'.repeat(Math.min(200, o?.maxChars ?? 0))}`,
    renderHtml: (res) => `<html>${res.verdict}</html>`,
    ...extra,
  };
}

const alarmResults = () =>
  results([series('latency', 'metrics/latency.csv', { verdict: 'alarm', checked: [checked(63, true)] })], {
    gate: { failOn: 'alarm', passed: false, reason: 'Gate failed (fail-on: alarm): 1 alarm.' },
  });

describe('run', () => {
  it('writes results, outputs, the summary and the HTML, publishes, then fails the gate last', async () => {
    setEnv(
      { 'fail-on': 'alarm', html: 'report.html' },
      { name: 'pull_request', payload: { pull_request: { number: 4 } } },
    );
    const gh = new FakeGitHub();
    await run(deps(alarmResults(), gh));
    const out = readFileSync(path.join(dir, 'out'), 'utf8');
    expect(out).toMatch(/^verdict<<.*\nalarm\n/m);
    expect(out).toMatch(/^comment-url<<.*\nhttps:\/\/example\.test\/c\/1000\n/m);
    expect(readFileSync(path.join(dir, 'ws', 'report.html'), 'utf8')).toBe('<html>alarm</html>');
    const saved = JSON.parse(
      readFileSync(path.join(dir, 'leadline', 'github-leadline.results.json'), 'utf8'),
    ) as Results;
    expect(saved.verdict).toBe('alarm');
    expect(gh.comments.get(4)![0]!.body.startsWith('<!-- leadline:report:.github/leadline.yml -->')).toBe(
      true,
    );
    const summary = readFileSync(path.join(dir, 'summary.md'), 'utf8');
    expect(summary).toContain('# Report: alarm');
    expect(summary).toContain('Report created: https://example.test/c/1000');
    expect(process.exitCode).toBe(1);
    const lines = stdout.trim().split('\n');
    expect(lines.at(-1)).toBe('::error::Gate failed (fail-on: alarm): 1 alarm.');
    expect(stdout).toContain('::error title=Leadline alarm%3A latency,file=metrics/latency.csv,line=63::');
    expect(stdout).toContain('::add-mask::ghs_inprocess');
  });

  it('keeps the summary, outputs and exit code when publishing fails', async () => {
    setEnv({ 'fail-on': 'never' }, { name: 'pull_request', payload: { pull_request: { number: 4 } } });
    const gh = new FakeGitHub();
    gh.failWith = { call: 'listComments', status: 404 };
    const r = alarmResults();
    r.gate = { failOn: 'never', passed: true, reason: 'The gate is off (fail-on: never).' };
    await run(deps(r, gh));
    expect(process.exitCode).toBeUndefined();
    const summary = readFileSync(path.join(dir, 'summary.md'), 'utf8');
    expect(summary).toContain('# Report: alarm');
    expect(summary).toContain('could not publish the report to pull request #4 (HTTP 404');
    expect(readFileSync(path.join(dir, 'out'), 'utf8')).toMatch(/^comment-url<<.*\n\n/m);
    expect(stdout).toMatch(/::warning::Leadline could not publish.*permissions: pull-requests: write/);
  });

  it('refuses to write an output over a file of the repository', async () => {
    setEnv({ markdown: 'README.md' }, { name: 'push', payload: {} });
    writeFileSync(path.join(dir, 'ws', 'README.md'), 'theirs');
    const tracked: GitRunner = {
      run: async (args) => ({
        code: args[0] === 'ls-files' && args.at(-1)!.endsWith('README.md') ? 0 : 1,
        stdout: Buffer.alloc(0),
        stderr: '',
      }),
    };
    const r = results([series('a', 'a.csv')]);
    await run(deps(r, new FakeGitHub(), { git: tracked }));
    expect(readFileSync(path.join(dir, 'ws', 'README.md'), 'utf8')).toBe('theirs');
    expect(stdout).toMatch(
      /::error::Leadline: markdown: refusing to write to .*README\.md: it is a file of the repository/,
    );
    expect(process.exitCode).toBe(1);
  });

  it('still writes a summary with the verdict when the renderer fails', async () => {
    setEnv({ comment: 'off', 'fail-on': 'never' }, { name: 'push', payload: {} });
    const r = alarmResults();
    r.gate = { failOn: 'never', passed: true, reason: 'The gate is off (fail-on: never).' };
    await run(
      deps(r, new FakeGitHub(), {
        renderMarkdown: () => {
          throw new Error('template exploded');
        },
      }),
    );
    const summary = readFileSync(path.join(dir, 'summary.md'), 'utf8');
    expect(summary).toContain('## Leadline: alarm');
    expect(summary).toContain('template exploded');
    expect(readFileSync(path.join(dir, 'out'), 'utf8')).toMatch(/^verdict<<.*\nalarm\n/m);
  });

  it('skips the summary outside a runner without failing', async () => {
    setEnv({ comment: 'off' }, { name: 'push', payload: {} });
    vi.stubEnv('GITHUB_STEP_SUMMARY', '');
    await run(deps(results([series('a', 'a.csv')]), new FakeGitHub()));
    expect(process.exitCode).toBeUndefined();
    expect(stdout).toContain('GITHUB_STEP_SUMMARY is not set');
  });

  it('passes the rows a pull request adds to the job', async () => {
    setEnv({}, { name: 'pull_request', payload: { pull_request: { number: 4, base: { sha: 'abcdef1' } } } });
    const seen: unknown[] = [];
    const fakeGit: GitRunner = {
      async run(args) {
        if (args[0] === 'cat-file' && args[1] === '-e')
          return { code: 0, stdout: Buffer.alloc(0), stderr: '' };
        if (args.includes('diff'))
          return { code: 0, stdout: Buffer.from('M\0metrics/latency.csv\0'), stderr: '' };
        if (args.includes('ls-tree'))
          return { code: 0, stdout: Buffer.from('100644 blob 1234567\tmetrics/latency.csv\0'), stderr: '' };
        if (args[0] === 'cat-file')
          return { code: 0, stdout: Buffer.from('1234567 blob 6\nh\n1\n2\n\n'), stderr: '' };
        return { code: 1, stdout: Buffer.alloc(0), stderr: '' };
      },
    };
    await run(
      deps(results([series('a', 'a.csv')]), new FakeGitHub(), {
        git: fakeGit,
        job: async (o) => {
          seen.push(o);
          return heldRun(results([series('a', 'a.csv')]));
        },
      }),
    );
    expect(seen[0]).toMatchObject({
      newRows: { 'metrics/latency.csv': 3 },
      failOn: 'limit',
      configPath: '.github/leadline.yml',
    });
  });
});
