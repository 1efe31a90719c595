// GitHub API faults against the loopback stand-in, through the real Octokit client: each is reported
// as exactly what happened (which call, what answer, whether it was retried), and a stalled API can
// cost neither the summary nor more than the time limits.
import { mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { ApiFault, octokitApi, type IssueApi } from '../../src/action/github.js';
import { marker, publishWarning, upsertComment } from '../../src/action/publish.js';
import type { GitRunner } from '../../src/action/git.js';
import { heldRun, type Results } from '../../src/results.js';
import { FakeGitHubServer } from './fake-github.js';
import { results, series, checked } from './helpers.js';

vi.mock('../../src/report/index.js', () => ({
  renderMarkdown: (r: Results, o?: { marker?: string }) => `${o?.marker ?? ''}\n# Report: ${r.verdict}\n`,
  renderHtml: () => '',
  reportDetail: () => new Set(),
}));
const { run } = await import('../../src/action/main.js');

let server: FakeGitHubServer;
let api: IssueApi;
const MARK = marker('report', '.github/leadline.yml');

beforeEach(async () => {
  server = new FakeGitHubServer();
  await server.start();
  api = octokitApi({
    token: 'ghs_test',
    owner: server.owner,
    repo: server.repo,
    apiUrl: server.url,
    retryBaseMs: 1,
    requestTimeoutMs: 2_000,
  });
});
afterEach(async () => {
  vi.restoreAllMocks();
  vi.unstubAllEnvs();
  process.exitCode = undefined;
  await server.stop();
});

async function fault(p: Promise<unknown>): Promise<ApiFault> {
  try {
    await p;
  } catch (e) {
    expect(e).toBeInstanceOf(ApiFault);
    return e as ApiFault;
  }
  throw new Error('expected the call to fail');
}

describe('faults said exactly', () => {
  it('a malformed JSON reply to create is a fault, never "created: undefined"', async () => {
    server.failures.push({
      method: 'POST',
      path: /\/comments$/,
      status: 201,
      times: 1,
      raw: '{"id": 12, "html_',
    });
    const e = await fault(upsertComment(api, 4, MARK, 'report'));
    expect(e).toMatchObject({ call: 'create the comment', kind: 'reply', retried: false });
    const w = publishWarning(e, 'pull request #4', 'pull-requests');
    expect(w).toContain("create the comment: GitHub's reply could not be read");
    expect(w).toContain('GitHub may have carried out the request all the same: look at pull request #4');
    expect(w).not.toMatch(/undefined|Retries|permissions/);
  });

  it('a malformed JSON reply to update is a fault too', async () => {
    server.addComment(4, `${MARK}\nold`);
    server.failures.push({
      method: 'PATCH',
      path: /\/comments\/\d+$/,
      status: 200,
      times: 1,
      raw: 'not json',
    });
    const e = await fault(upsertComment(api, 4, MARK, 'report'));
    expect(e).toMatchObject({ call: 'update the comment', kind: 'reply' });
  });

  it('a list call answered with garbage quotes no internal TypeError and claims no retries', async () => {
    server.failures.push({
      method: 'GET',
      path: /\/comments$/,
      status: 200,
      times: 1,
      raw: '{"message": "x"',
    });
    const e = await fault(api.listComments(4));
    const w = publishWarning(e, 'pull request #4', 'pull-requests');
    expect(w).not.toMatch(/TypeError|undefined|Retries did not help/);
    expect(w).toContain('list the comments');
    expect(server.calls.filter((c) => c.path.endsWith('/comments'))).toHaveLength(1);
  });

  it('a list call failing with 502 is retried, and says so', async () => {
    server.failures.push({ method: 'GET', path: /\/comments$/, status: 502, times: 10 });
    const e = await fault(api.listComments(4));
    expect(e).toMatchObject({ status: 502, retried: true });
    expect(server.calls.filter((c) => c.path.endsWith('/comments')).length).toBeGreaterThan(1);
    expect(publishWarning(e, 'pull request #4', 'pull-requests')).toContain('Retries did not help');
  });

  it('a request that stalls is abandoned after the per-request limit', async () => {
    const quick = octokitApi({
      token: 'ghs_test',
      owner: server.owner,
      repo: server.repo,
      apiUrl: server.url,
      retryBaseMs: 1,
      requestTimeoutMs: 500,
    });
    const stall = { method: 'GET', status: 200, times: 10, raw: '[]', delayMs: 30_000 };
    server.failures.push({ ...stall, path: /\/comments$/ });
    const e = await fault(quick.listComments(4));
    expect(e.kind).toBe('timeout');
    expect(e.message).toBe("no answer within 500 ms (Leadline's limit per request)");
    // Abandoned and retried (the plugin's 3 retries), never waited out.
    expect(server.calls.filter((c) => c.path.endsWith('/comments'))).toHaveLength(4);
  });
});

describe('the Action with a stalled or broken API and job', () => {
  let dir: string;
  let stdout: string;
  const git: GitRunner = { run: async () => ({ code: 1, stdout: Buffer.alloc(0), stderr: '' }) };

  beforeEach(() => {
    dir = mkdtempSync(path.join(os.tmpdir(), 'leadline-faults-'));
    mkdirSync(path.join(dir, 'ws'));
    writeFileSync(path.join(dir, 'out'), '');
    writeFileSync(path.join(dir, 'summary.md'), '');
    writeFileSync(path.join(dir, 'event.json'), JSON.stringify({ pull_request: { number: 4 } }));
    stdout = '';
    vi.spyOn(process.stdout, 'write').mockImplementation((s: string | Uint8Array) => {
      stdout += String(s);
      return true;
    });
    const env: Record<string, string> = {
      GITHUB_WORKSPACE: path.join(dir, 'ws'),
      GITHUB_OUTPUT: path.join(dir, 'out'),
      GITHUB_STEP_SUMMARY: path.join(dir, 'summary.md'),
      GITHUB_EVENT_NAME: 'pull_request',
      GITHUB_EVENT_PATH: path.join(dir, 'event.json'),
      GITHUB_REPOSITORY: `${server.owner}/${server.repo}`,
      GITHUB_API_URL: server.url,
      RUNNER_TEMP: dir,
      INPUT_TOKEN: 'ghs_inprocess',
      'INPUT_FAIL-ON': 'never',
      LEADLINE_RETRY_DELAY_MS: '1',
      LEADLINE_REQUEST_TIMEOUT_MS: '10000',
      LEADLINE_PUBLISH_TIMEOUT_MS: '400',
    };
    for (const [k, v] of Object.entries(env)) vi.stubEnv(k, v);
  });

  const alarm = () =>
    results([series('latency', 'metrics/latency.csv', { verdict: 'alarm', checked: [checked(63, true)] })], {
      gate: { failOn: 'never', passed: true, reason: 'The gate is off (fail-on: never).' },
    });

  it('writes the summary before publishing and stops publishing at the stage limit, naming it', async () => {
    server.failures.push({
      method: 'GET',
      path: /\/comments$/,
      status: 200,
      times: 10,
      raw: '[]',
      delayMs: 1_500,
    });
    let summaryWhilePublishing = '';
    await run({
      git,
      job: async () => heldRun(alarm()),
      github: (s) => {
        const real = octokitApi(s);
        return {
          ...real,
          listComments: (n) => {
            summaryWhilePublishing = readFileSync(path.join(dir, 'summary.md'), 'utf8');
            return real.listComments(n);
          },
        };
      },
    });
    // Still waiting on GitHub when the stage was stopped.
    expect(server.calls.filter((c) => c.path.endsWith('/comments')).every((c) => c.status === 0)).toBe(true);
    expect(summaryWhilePublishing).toContain('# Report: alarm');
    const summary = readFileSync(path.join(dir, 'summary.md'), 'utf8');
    // Leadline's messages reach markdown escaped: the apostrophe is a character reference there.
    expect(summary).toContain('stopped after 400 ms, Leadline&#39;s limit for the publishing stage');
    expect(readFileSync(path.join(dir, 'out'), 'utf8')).toMatch(/^verdict<<.*\nalarm\n/m);
  });

  it('an internal error in the job still leaves the results file, outputs and summary', async () => {
    await run({
      git,
      job: async () => {
        throw new TypeError("Cannot read properties of null (reading 'amount')");
      },
    });
    const out = readFileSync(path.join(dir, 'out'), 'utf8');
    expect(out).toMatch(/^verdict<<.*\nerror\n/m);
    const file = /^results<<(.*)\n(.*)\n/m.exec(out)![2]!;
    const written = JSON.parse(readFileSync(file, 'utf8')) as Results;
    expect(written).toMatchObject({ version: 1, verdict: 'error', problems: [{ kind: 'internal' }] });
    expect(written.problems[0]!.message).toContain("Cannot read properties of null (reading 'amount')");
    expect(readFileSync(path.join(dir, 'summary.md'), 'utf8')).toContain('## Leadline could not run');
    expect(process.exitCode).toBe(1);
    expect(stdout).toMatch(/::error::Leadline stopped on an unexpected error \(please report it\)/);
  });

  it('a file name carrying a workflow command reaches the log neutralised', async () => {
    const evil = '0\n::stop-commands::pwned\n.csv';
    const prGit: GitRunner = {
      async run(args) {
        if (args[0] === 'cat-file' && args[1] === '-e')
          return { code: 0, stdout: Buffer.alloc(0), stderr: '' };
        if (args.includes('diff')) return { code: 0, stdout: Buffer.from(`A\0${evil}\0`), stderr: '' };
        if (args.includes('ls-tree'))
          return { code: 0, stdout: Buffer.from(`100644 blob ${'a'.repeat(40)}\t${evil}\0`), stderr: '' };
        if (args[0] === 'cat-file')
          return { code: 0, stdout: Buffer.from(`${'a'.repeat(40)} blob 4\nh\n1\n\n`), stderr: '' };
        return { code: 1, stdout: Buffer.alloc(0), stderr: '' };
      },
    };
    writeFileSync(
      path.join(dir, 'event.json'),
      JSON.stringify({ pull_request: { number: 4, base: { sha: 'abcdef1' } } }),
    );
    await run({ git: prGit, job: async () => heldRun(alarm()) });
    expect(stdout).toContain('is new in this pull request');
    for (const line of stdout.split(/\r\n|\r|\n/)) expect(line.trimStart()).not.toMatch(/^::stop-commands/);
  });
});
