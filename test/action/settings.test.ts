import { mkdtempSync, mkdirSync, readFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import {
  INPUT_DEFAULTS,
  configKey,
  configSlug,
  envInputs,
  parseComment,
  readSettings,
} from '../../src/action/settings.js';
import { parseFailOn } from '../../src/verdict.js';
import { destination, eventFacts } from '../../src/action/event.js';

const ws = mkdtempSync(path.join(os.tmpdir(), 'leadline-settings-'));
mkdirSync(path.join(ws, 'perf'));
const env = (inputs: Record<string, string>, extra: Record<string, string> = {}) => ({
  GITHUB_WORKSPACE: ws,
  RUNNER_TEMP: '/runner/tmp',
  ...Object.fromEntries(Object.entries(inputs).map(([k, v]) => [`INPUT_${k.toUpperCase()}`, v])),
  ...extra,
});
const read = (inputs: Record<string, string>, extra: Record<string, string> = {}) => {
  const e = env(inputs, extra);
  return readSettings(envInputs(e), e);
};

describe('readSettings', () => {
  it('applies the same defaults as action.yml when the runner passes none', () => {
    const s = read({});
    expect(s.config).toBe('.github/leadline.yml');
    expect(s.comment).toEqual({ kind: 'auto' });
    expect(s.failOn).toBe('limit');
    expect(s.workingDirectory).toBe(ws);
    expect(s.results).toBe('/runner/tmp/leadline/github-leadline.results.json');
    expect(s.html).toBeNull();
    expect(s.markdown).toBeNull();
    expect(s.issueLabel).toBe('leadline');
    expect(s.run.retryBaseMs).toBe(1000);
    expect(s.run.apiUrl).toBe('https://api.github.com');
  });

  it('keeps its defaults equal to those declared in action.yml', () => {
    const yml = parse(readFileSync(new URL('../../action.yml', import.meta.url), 'utf8')) as {
      inputs: Record<string, { default?: string }>;
    };
    for (const [name, def] of Object.entries(INPUT_DEFAULTS))
      expect(yml.inputs[name]?.default ?? '', name).toBe(def);
    expect(Object.keys(yml.inputs).sort()).toEqual([...Object.keys(INPUT_DEFAULTS), 'token'].sort());
  });

  it('resolves the config, outputs and working directory against the workspace', () => {
    const s = read({
      'working-directory': 'perf',
      config: 'leadline.yml',
      html: 'out/report.html',
      results: '/abs/r.json',
    });
    expect(s.workingDirectory).toBe(path.join(ws, 'perf'));
    expect(s.html).toBe(path.join(ws, 'perf', 'out', 'report.html'));
    expect(s.results).toBe('/abs/r.json');
    expect(configKey(s)).toBe('perf/leadline.yml');
  });

  it('quotes an invalid value and says what was expected', () => {
    expect(() => read({ 'fail-on': 'alarms' })).toThrow(
      'Input "fail-on" is "alarms"; expected one of alarm, limit, both, never (default limit). Did you mean "alarm"?',
    );
    expect(() => read({ comment: 'issue:abc' })).toThrow(
      /Input "comment" is "issue:abc"; expected one of auto/,
    );
    expect(() => read({ 'working-directory': 'nowhere' })).toThrow(/Input "working-directory" is "nowhere"/);
    expect(() => read({ html: 'perf' })).toThrow(
      /Input "html" is "perf"; expected a file path, but that is a directory/,
    );
    expect(() => read({ 'issue-label': 'a,b' })).toThrow(/Input "issue-label" is "a,b"/);
    expect(() => read({}, { GITHUB_REPOSITORY: 'nope' })).toThrow(/GITHUB_REPOSITORY is "nope"/);
  });

  it('takes the token as given and reads the runner context', () => {
    const s = read(
      { token: 'ghs_secret' },
      {
        GITHUB_REPOSITORY: 'acme/metrics',
        GITHUB_API_URL: 'http://127.0.0.1:9/',
        GITHUB_RUN_ID: '42',
        LEADLINE_RETRY_DELAY_MS: '5',
      },
    );
    expect(s.token).toBe('ghs_secret');
    expect(s.run.repository).toEqual({ owner: 'acme', repo: 'metrics' });
    expect(s.run.apiUrl).toBe('http://127.0.0.1:9');
    expect(s.run.runId).toBe('42');
    expect(s.run.retryBaseMs).toBe(5);
  });
});

describe('parseComment and parseFailOn', () => {
  it('accepts every documented form', () => {
    expect(parseComment('AUTO')).toEqual({ kind: 'auto' });
    expect(parseComment('pull-request')).toEqual({ kind: 'pull-request' });
    expect(parseComment('issue:12')).toEqual({ kind: 'issue', number: 12 });
    expect(parseComment('issue:#12')).toEqual({ kind: 'issue', number: 12 });
    expect(parseComment('tracking-issue')).toEqual({ kind: 'tracking-issue' });
    expect(parseComment('off')).toEqual({ kind: 'off' });
    expect(() => parseComment('issue:0')).toThrow(/issue:<number>/);
    expect(() => parseComment('tracking')).toThrow(/Did you mean "tracking-issue"\?/);
    expect(parseFailOn('never')).toBe('never');
    expect(parseFailOn('limit, alarm')).toBe('both');
  });

  it('makes distinct result file names for distinct configs', () => {
    expect(configSlug('.github/leadline.yml')).toBe('github-leadline');
    expect(configSlug('perf/leadline.yml')).not.toBe(configSlug('db/leadline.yml'));
  });
});

describe('destination', () => {
  const pr = eventFacts({
    pull_request: { number: 9, base: { sha: 'a'.repeat(40) }, head: { sha: 'b'.repeat(40) } },
  });
  const none = eventFacts({ ref: 'refs/heads/main' });
  it('resolves auto by event', () => {
    expect(destination({ kind: 'auto' }, 'pull_request', pr)).toEqual({
      kind: 'comment',
      issue: 9,
      what: 'pull request',
    });
    for (const ev of ['push', 'schedule', 'workflow_dispatch'])
      expect(destination({ kind: 'auto' }, ev, none)).toEqual({ kind: 'tracking-issue' });
    expect(destination({ kind: 'auto' }, 'release', none)).toEqual({ kind: 'none', why: null });
  });
  it('explains why pull-request cannot be honoured without a pull request', () => {
    const d = destination({ kind: 'pull-request' }, 'push', none);
    expect(d.kind === 'none' && d.why).toMatch(/push event has no pull request/);
    expect(destination({ kind: 'issue', number: 3 }, 'push', none)).toEqual({
      kind: 'comment',
      issue: 3,
      what: 'issue',
    });
    expect(destination({ kind: 'off' }, 'pull_request', pr)).toEqual({ kind: 'none', why: null });
  });
  it('reads the base commit from the payload and ignores junk', () => {
    expect(pr.pullRequest).toEqual({ number: 9, baseSha: 'a'.repeat(40), headSha: 'b'.repeat(40) });
    expect(eventFacts(null).pullRequest).toBeNull();
    expect(
      eventFacts({ pull_request: { number: 2, base: { sha: '; rm -rf /' } } }).pullRequest?.baseSha,
    ).toBeNull();
  });
});
