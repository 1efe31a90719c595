// Every input and every environment variable the Action reads, in one place. Nothing else in
// src/action touches core.getInput or process.env: the rest takes this typed object.
import { existsSync, statSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { LeadlineError } from '../errors.js';
import { parseJobs } from '../pool.js';
import { parseShard, type Shard } from '../shard.js';
import type { FailOn } from '../terms.js';
import { didYouMean } from '../text/index.js';
import { FAIL_ON_DEFAULT, parseFailOn } from '../verdict.js';

/** Where the report goes. */
export type CommentTarget =
  | { kind: 'auto' }
  | { kind: 'pull-request' }
  | { kind: 'issue'; number: number }
  | { kind: 'tracking-issue' }
  | { kind: 'off' };

export interface Settings {
  /** The config path as given (relative to `workingDirectory`, or absolute). */
  config: string;
  /** Absolute working directory: the config, metric files and relative output paths resolve against it. */
  workingDirectory: string;
  /** Absolute checkout root (GITHUB_WORKSPACE, else the process's cwd): annotation paths are relative to it. */
  workspace: string;
  /** The token for the GitHub API (registered as a secret by the caller; never printed). Empty when none. */
  token: string;
  /** Where the report goes, as asked; `auto` is resolved against the event later. */
  comment: CommentTarget;
  /** What fails the step. */
  failOn: FailOn;
  /** Absolute path of the results JSON. */
  results: string;
  /** Absolute path of the HTML report, or null for none. */
  html: string | null;
  /** Absolute path of the full markdown report, or null for none. */
  markdown: string | null;
  /** Label that marks Leadline's tracking issues. */
  issueLabel: string;
  /** Worker threads for the analysis. */
  jobs: number;
  /** Every point of history and the per-step backtest measures in the results file. */
  fullHistory: boolean;
  /** `shard: i/n`: judge only that shard's series and publish nothing (see src/shard.ts). */
  shard: Shard | null;
  /** `merge`: results files (paths or globs, one per line, relative to `workingDirectory`) to merge
   * and publish instead of reading the CSVs. Empty: a normal run. */
  merge: string[];
  /** The runner's facts about this run. */
  run: RunContext;
}

export interface RunContext {
  /** GITHUB_EVENT_NAME, e.g. pull_request, push, schedule; '' when unknown. */
  eventName: string;
  /** GITHUB_EVENT_PATH (the webhook payload), or null. */
  eventPath: string | null;
  /** GITHUB_REPOSITORY split, or null outside a runner. */
  repository: { owner: string; repo: string } | null;
  /** GITHUB_API_URL (default https://api.github.com). */
  apiUrl: string;
  /** GITHUB_SERVER_URL (default https://github.com). */
  serverUrl: string;
  /** GITHUB_RUN_ID, or null. */
  runId: string | null;
  /** GITHUB_STEP_SUMMARY, or null (local runs): the summary is then skipped. */
  summaryPath: string | null;
  /**
   * Base of the API retry back-off in milliseconds (the plugins wait base × (n+1)² after the n-th
   * failure). 1000 normally; LEADLINE_RETRY_DELAY_MS shortens it for Leadline's own tests.
   */
  retryBaseMs: number;
  /**
   * Longest wait for one GitHub API request (30 s) and for the whole publishing stage (3 min), so a
   * stalled API cannot hold the runner. LEADLINE_REQUEST_TIMEOUT_MS and LEADLINE_PUBLISH_TIMEOUT_MS
   * shorten them for Leadline's own tests.
   */
  requestTimeoutMs: number;
  publishTimeoutMs: number;
}

/** Defaults of the two time limits above. */
export const REQUEST_TIMEOUT_MS = 30_000;
export const PUBLISH_TIMEOUT_MS = 180_000;

function positiveMs(text: string | undefined, fallback: number): number {
  const n = Number(text ?? '');
  return text && Number.isFinite(n) && n > 0 ? n : fallback;
}

/** The action.yml defaults, repeated so a run without the runner's INPUT_* defaults behaves the same. */
export const INPUT_DEFAULTS = {
  config: '.github/leadline.yml',
  comment: 'auto',
  'fail-on': FAIL_ON_DEFAULT.action,
  results: '',
  'working-directory': '.',
  html: '',
  markdown: '',
  'issue-label': 'leadline',
  jobs: 'auto',
  'full-history': 'false',
  shard: '',
  merge: '',
} as const;

const COMMENT_WORDS = ['auto', 'pull-request', 'tracking-issue', 'off', 'issue:<number>'];

/** Reads one input as the runner passes it (INPUT_<NAME>, trimmed); '' when absent. */
export type InputReader = (name: string) => string;

/** core.getInput's lookup, without importing @actions/core here (tests pass plain maps). */
export function envInputs(env: NodeJS.ProcessEnv): InputReader {
  return (name) => (env[`INPUT_${name.replace(/ /g, '_').toUpperCase()}`] ?? '').trim();
}

function invalid(input: string, value: string, expected: string): LeadlineError {
  return new LeadlineError('usage', `Input "${input}" is ${JSON.stringify(value)}; expected ${expected}.`, {
    keyPath: input,
  });
}

/** Parses the `comment` input. */
export function parseComment(raw: string): CommentTarget {
  const v = raw.trim().toLowerCase();
  if (v === 'auto' || v === '') return { kind: 'auto' };
  if (v === 'pull-request') return { kind: 'pull-request' };
  if (v === 'tracking-issue') return { kind: 'tracking-issue' };
  if (v === 'off') return { kind: 'off' };
  const m = /^issue:\s*#?(\d+)$/.exec(v);
  if (m) {
    const n = Number(m[1]);
    if (Number.isSafeInteger(n) && n > 0) return { kind: 'issue', number: n };
  }
  throw invalid(
    'comment',
    raw,
    `one of auto, pull-request, tracking-issue, off, or issue:<number> (e.g. issue:42).${didYouMean(v, COMMENT_WORDS)}`,
  );
}

function parseRepository(raw: string | undefined): RunContext['repository'] {
  if (!raw) return null;
  const m = /^([^/\s]+)\/([^/\s]+)$/.exec(raw.trim());
  if (!m)
    throw new LeadlineError('usage', `GITHUB_REPOSITORY is ${JSON.stringify(raw)}; expected owner/name.`);
  return { owner: m[1]!, repo: m[2]! };
}

/** A file name made from the config path, so two steps with different configs keep apart. */
export function configSlug(config: string): string {
  const slug = config
    .replace(/\\/g, '/')
    .replace(/\.(ya?ml)$/i, '')
    .replace(/[^A-Za-z0-9._-]+/g, '-')
    .replace(/^[-.]+|[-.]+$/g, '');
  return slug || 'leadline';
}

function outputPath(input: string, raw: string, workingDirectory: string): string | null {
  if (raw === '') return null;
  if (/[\0\n\r]/.test(raw)) throw invalid(input, raw, 'a file path on one line');
  const abs = path.resolve(workingDirectory, raw);
  if (existsSync(abs) && statSync(abs).isDirectory())
    throw invalid(input, raw, 'a file path, but that is a directory');
  return abs;
}

/**
 * Reads and validates every input and the runner's environment. Throws LeadlineError('usage')
 * quoting the first invalid value and the form expected.
 */
export function readSettings(input: InputReader, env: NodeJS.ProcessEnv, cwd = process.cwd()): Settings {
  const get = (name: keyof typeof INPUT_DEFAULTS) => {
    const v = input(name);
    return v === '' ? INPUT_DEFAULTS[name] : v;
  };
  const workspace = path.resolve(cwd, env.GITHUB_WORKSPACE || '.');

  const wdRaw = get('working-directory');
  const workingDirectory = path.resolve(workspace, wdRaw);
  if (!existsSync(workingDirectory) || !statSync(workingDirectory).isDirectory())
    throw invalid(
      'working-directory',
      wdRaw,
      `a directory in the workspace (${workingDirectory} is not one)`,
    );

  const config = get('config');
  if (/[\0\n\r]/.test(config)) throw invalid('config', config, 'a file path on one line');

  const comment = parseComment(get('comment'));
  const failOn = parseFailOn(get('fail-on'), 'action');

  const label = get('issue-label');
  if (label.length > 50 || /[,\n\r]/.test(label))
    throw invalid('issue-label', label, 'a label name of at most 50 characters without commas');

  const resultsRaw = get('results');
  const tmp = env.RUNNER_TEMP || os.tmpdir();
  const configKey = path.relative(workspace, path.resolve(workingDirectory, config));
  const results =
    resultsRaw === ''
      ? path.join(tmp, 'leadline', `${configSlug(configKey)}.results.json`)
      : outputPath('results', resultsRaw, workingDirectory)!;

  const retry = Number(env.LEADLINE_RETRY_DELAY_MS ?? '');
  return {
    config,
    workingDirectory,
    workspace,
    token: input('token'),
    comment,
    failOn,
    results,
    html: outputPath('html', get('html'), workingDirectory),
    markdown: outputPath('markdown', get('markdown'), workingDirectory),
    issueLabel: label,
    jobs: parseJobs(get('jobs'), 'jobs'),
    fullHistory: parseSwitch('full-history', get('full-history')),
    shard: get('shard') === '' ? null : parseShard(get('shard'), 'shard'),
    merge: mergeList(get('merge')),
    run: {
      eventName: env.GITHUB_EVENT_NAME ?? '',
      eventPath: env.GITHUB_EVENT_PATH || null,
      repository: parseRepository(env.GITHUB_REPOSITORY),
      apiUrl: (env.GITHUB_API_URL || 'https://api.github.com').replace(/\/+$/, ''),
      serverUrl: (env.GITHUB_SERVER_URL || 'https://github.com').replace(/\/+$/, ''),
      runId: env.GITHUB_RUN_ID || null,
      summaryPath: env.GITHUB_STEP_SUMMARY || null,
      retryBaseMs: Number.isFinite(retry) && retry >= 0 && env.LEADLINE_RETRY_DELAY_MS ? retry : 1000,
      requestTimeoutMs: positiveMs(env.LEADLINE_REQUEST_TIMEOUT_MS, REQUEST_TIMEOUT_MS),
      publishTimeoutMs: positiveMs(env.LEADLINE_PUBLISH_TIMEOUT_MS, PUBLISH_TIMEOUT_MS),
    },
  };
}

/** The `merge` input: one path or glob per line (or separated by commas), blank lines ignored. */
function mergeList(raw: string): string[] {
  const items = raw
    .split(/[\n,]/)
    .map((x) => x.trim())
    .filter(Boolean);
  for (const x of items) if (/\0/.test(x)) throw invalid('merge', x, 'file paths or globs');
  return items;
}

/** The config's identity for markers: its path from the checkout root, forward slashes. */
export function configKey(s: Pick<Settings, 'config' | 'workingDirectory' | 'workspace'>): string {
  const abs = path.resolve(s.workingDirectory, s.config);
  const rel = path.relative(s.workspace, abs);
  return (rel && !rel.startsWith('..') && !path.isAbsolute(rel) ? rel : abs).split(path.sep).join('/');
}

/** A yes/no input: `true` or `false` (any case). */
function parseSwitch(input: string, raw: string): boolean {
  const v = raw.trim().toLowerCase();
  if (v === 'true' || v === 'false') return v === 'true';
  throw invalid(input, raw, 'true or false');
}
