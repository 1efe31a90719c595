// The GitHub calls Leadline makes, behind a small interface: the publishing logic (publish.ts) takes
// an IssueApi, so tests pass a fake; octokitApi is the real one, with retries and rate-limit handling.
import * as core from '@actions/core';
import type { getOctokit } from '@actions/github';
import { logSafe } from '../text/index.js';

// Octokit (with undici under @actions/github) is most of the Action's code and start-up work, and
// most runs publish nothing: it is imported at the first API call (its own chunk in the bundle).
type Octokit = ReturnType<typeof getOctokit>;

export interface IssueComment {
  id: number;
  body: string;
  /** ISO time; with the id, decides which of two marked comments is the older. */
  createdAt: string;
  url: string;
  /** Login of the comment's author (e.g. "github-actions[bot]"), or null when GitHub gives none. */
  author: string | null;
}

export interface Issue {
  number: number;
  state: 'open' | 'closed';
  title: string;
  body: string;
  createdAt: string;
  url: string;
  /** Login of the issue's author. */
  author: string | null;
}

export interface IssuePatch {
  title?: string;
  body?: string;
  state?: 'open' | 'closed';
  stateReason?: 'completed' | 'not_planned' | 'reopened';
}

/** Issue and pull-request conversation calls (a pull request's comments are issue comments). */
export interface IssueApi {
  /**
   * The login comments and issues written with this token carry: the token's user, or for the
   * workflow token (which may not ask) "github-actions[bot]". Only those are ever edited, deleted or closed.
   */
  identity(): Promise<string>;
  /** Every comment on the issue or pull request, all pages. */
  listComments(issue: number): Promise<IssueComment[]>;
  createComment(issue: number, body: string): Promise<IssueComment>;
  updateComment(id: number, body: string): Promise<IssueComment>;
  deleteComment(id: number): Promise<void>;
  /** Every issue (open and closed, not pull requests) carrying `label`, all pages. */
  listIssues(label: string): Promise<Issue[]>;
  createIssue(title: string, body: string, labels: string[]): Promise<Issue>;
  updateIssue(issue: number, patch: IssuePatch): Promise<Issue>;
  /** Creates the label when the repository lacks it. */
  ensureLabel(name: string, color: string, description: string): Promise<void>;
  /** Open pull requests whose head is `owner:branch` (a fork's too), with their head commits. */
  openPullRequests(head: string): Promise<{ number: number; headSha: string }[]>;
}

/** The HTTP status of a failed API call, or null for other failures (network, bugs). */
export function httpStatus(e: unknown): number | null {
  const s = (e as { status?: unknown } | null)?.status;
  return typeof s === 'number' && s >= 100 ? s : null;
}

/** The author GitHub gives comments and issues written with the workflow token. */
export const WORKFLOW_TOKEN_LOGIN = 'github-actions[bot]';

/**
 * A GitHub call that failed, said exactly: which call, the HTTP status if there was an answer,
 * whether it was retried, and what went wrong (an error answer, a reply that could not be read, no
 * answer in time, no connection).
 */
export class ApiFault extends Error {
  constructor(
    message: string,
    readonly call: string,
    readonly status: number | null,
    readonly kind: 'http' | 'reply' | 'timeout' | 'network',
    /** Whether the call was retried before giving up (server errors, rate limits, lost connections). */
    readonly retried: boolean,
  ) {
    super(message);
    this.name = 'ApiFault';
  }
}

/** A time limit as said in messages: "30 s", or "400 ms" below a second. */
export function limitText(ms: number): string {
  return ms < 1000 ? `${Math.round(ms)} ms` : `${Math.round(ms / 1000)} s`;
}

/** HTTP answers @octokit/plugin-retry gives up on at once; others are retried (3 times). */
const NOT_RETRIED = new Set([400, 401, 403, 404, 410, 422, 451]);

/** Turns whatever a call threw into an ApiFault (a fault already said is passed on). */
export function apiFault(e: unknown, call: string, timeoutMs: number): ApiFault {
  if (e instanceof ApiFault) return e;
  const status = httpStatus(e);
  const err = e as { name?: string; message?: string; response?: unknown } | null;
  const text = String(err?.message ?? e).split('\n')[0]!;
  if (status !== null && err?.response !== undefined)
    return new ApiFault(`HTTP ${status}: ${text}`, call, status, 'http', !NOT_RETRIED.has(status));
  if (/abort|timeout/i.test(`${err?.name} ${text}`))
    return new ApiFault(
      `no answer within ${limitText(timeoutMs)} (Leadline's limit per request)`,
      call,
      null,
      'timeout',
      true,
    );
  if (status !== null)
    return new ApiFault(`no connection to the GitHub API (${text})`, call, null, 'network', true);
  return badReply(call);
}

/** A reply that is not the JSON the call expects: said as such, and not retried. */
function badReply(call: string): ApiFault {
  return new ApiFault(
    `GitHub's reply could not be read (it is not the JSON expected)`,
    call,
    null,
    'reply',
    false,
  );
}

function need<T>(ok: boolean, value: T, call: string): T {
  if (!ok) throw badReply(call);
  return value;
}

export interface OctokitSettings {
  token: string;
  owner: string;
  repo: string;
  apiUrl: string;
  /** Back-off base in ms for retries and rate-limit waits (1000 in production). */
  retryBaseMs: number;
  /** Longest wait for one HTTP request before it is abandoned (and retried). */
  requestTimeoutMs: number;
  /** Aborts every request, in flight or later (the publishing stage's deadline). */
  signal?: AbortSignal;
}

type Raw = {
  id: number;
  body?: string | null;
  created_at: string;
  html_url: string;
  user?: { login?: unknown } | null;
};
type RawIssue = {
  number: number;
  state: string;
  title: string;
  body?: string | null;
  created_at: string;
  html_url: string;
  pull_request?: unknown;
  user?: { login?: unknown } | null;
};

const isObject = (x: unknown): x is Record<string, unknown> => typeof x === 'object' && x !== null;
const login = (u: unknown): string | null => (isObject(u) && typeof u.login === 'string' ? u.login : null);

/** A comment from GitHub's reply; a reply without the fields Leadline relies on is an ApiFault. */
function comment(raw: unknown, call: string): IssueComment {
  const c = raw as Raw;
  need(isObject(raw) && typeof c.id === 'number' && typeof c.html_url === 'string', null, call);
  return {
    id: c.id,
    body: typeof c.body === 'string' ? c.body : '',
    createdAt: String(c.created_at ?? ''),
    url: c.html_url,
    author: login(c.user),
  };
}
function issue(raw: unknown, call: string): Issue {
  const i = raw as RawIssue;
  need(isObject(raw) && typeof i.number === 'number' && typeof i.html_url === 'string', null, call);
  return {
    number: i.number,
    state: i.state === 'closed' ? 'closed' : 'open',
    title: String(i.title ?? ''),
    body: typeof i.body === 'string' ? i.body : '',
    createdAt: String(i.created_at ?? ''),
    url: i.html_url,
    author: login(i.user),
  };
}
function list(raw: unknown, call: string): unknown[] {
  return need(Array.isArray(raw), raw as unknown[], call);
}

/** Rate-limit waits longer than this are not worth holding a runner for: give up and warn. */
const MAX_RATE_WAIT_S = 120;

/** The client for these settings, with its modules loaded now. */
async function loadOctokit(s: OctokitSettings): Promise<Octokit> {
  const [github, { retry }, { throttling }] = await Promise.all([
    import('@actions/github'),
    import('@octokit/plugin-retry'),
    import('@octokit/plugin-throttling'),
  ]);
  return github.getOctokit(
    s.token,
    {
      baseUrl: s.apiUrl,
      // Server errors and network failures are retried (3 times, waits base × 1, 4, 9);
      // 4xx other than rate limits are final.
      retry: { retryAfterBaseValue: s.retryBaseMs },
      throttle: {
        retryAfterBaseValue: s.retryBaseMs,
        onRateLimit: waitOutRateLimit('rate limit reached'),
        onSecondaryRateLimit: waitOutRateLimit('secondary rate limit'),
      },
      // Each request is abandoned after requestTimeoutMs (and then retried like a lost connection).
      request: {
        fetch: (url: string, init: RequestInit = {}) =>
          fetch(url, {
            ...init,
            signal: AbortSignal.any(
              [init.signal, s.signal, AbortSignal.timeout(s.requestTimeoutMs)].filter((x): x is AbortSignal =>
                Boolean(x),
              ),
            ),
          }),
      },
      // Octokit's own messages go to the debug log, never to annotations.
      log: {
        debug: (m: string) => core.debug(m),
        info: (m: string) => core.debug(m),
        warn: (m: string) => core.debug(m),
        error: (m: string) => core.debug(m),
      },
    },
    retry,
    throttling,
  );
}

export function octokitApi(s: OctokitSettings): IssueApi {
  let client: Promise<Octokit> | null = null;
  const repo = { owner: s.owner, repo: s.repo };
  const call = async <T>(name: string, f: (octokit: Octokit) => Promise<T>): Promise<T> => {
    const octokit = await (client ??= loadOctokit(s));
    try {
      return await f(octokit);
    } catch (e) {
      throw apiFault(e, name, s.requestTimeoutMs);
    }
  };
  let me: Promise<string> | null = null;
  return {
    identity() {
      me ??= call('identify the token', async (octokit) => {
        try {
          const r = await octokit.rest.users.getAuthenticated();
          return login(r.data) ?? WORKFLOW_TOKEN_LOGIN;
        } catch (e) {
          // The workflow token (an installation token) may not read /user: its comments are the bot's.
          const status = httpStatus(e);
          if (status === 401 || status === 403 || status === 404) return WORKFLOW_TOKEN_LOGIN;
          throw e;
        }
      });
      return me;
    },
    listComments: (n) =>
      call('list the comments', async (octokit) => {
        const all = await octokit.paginate(octokit.rest.issues.listComments, {
          ...repo,
          issue_number: n,
          per_page: 100,
        });
        return list(all, 'list the comments').map((c) => comment(c, 'list the comments'));
      }),
    createComment: (n, body) =>
      call('create the comment', async (octokit) => {
        const r = await octokit.rest.issues.createComment({ ...repo, issue_number: n, body });
        return comment(r.data, 'create the comment');
      }),
    updateComment: (id, body) =>
      call('update the comment', async (octokit) => {
        const r = await octokit.rest.issues.updateComment({ ...repo, comment_id: id, body });
        return comment(r.data, 'update the comment');
      }),
    deleteComment: (id) =>
      call('delete a duplicate comment', async (octokit) => {
        await octokit.rest.issues.deleteComment({ ...repo, comment_id: id });
      }),
    listIssues: (label) =>
      call('list the tracking issues', async (octokit) => {
        const all = await octokit.paginate(octokit.rest.issues.listForRepo, {
          ...repo,
          labels: label,
          state: 'all',
          per_page: 100,
        });
        return list(all, 'list the tracking issues')
          .filter((i) => !(i as RawIssue).pull_request)
          .map((i) => issue(i, 'list the tracking issues'));
      }),
    openPullRequests: (head) =>
      call('find the pull request of the workflow run', async (octokit) => {
        const all = await octokit.paginate(octokit.rest.pulls.list, {
          ...repo,
          head,
          state: 'open',
          per_page: 100,
        });
        return (all as { number?: unknown; head?: { sha?: unknown } }[]).flatMap((p) =>
          typeof p.number === 'number' && typeof p.head?.sha === 'string'
            ? [{ number: p.number, headSha: p.head.sha }]
            : [],
        );
      }),
    createIssue: (title, body, labels) =>
      call('create the tracking issue', async (octokit) => {
        const r = await octokit.rest.issues.create({ ...repo, title, body, labels });
        return issue(r.data, 'create the tracking issue');
      }),
    updateIssue: (n, p) =>
      call('update the tracking issue', async (octokit) => {
        const r = await octokit.rest.issues.update({
          ...repo,
          issue_number: n,
          ...(p.title !== undefined ? { title: p.title } : {}),
          ...(p.body !== undefined ? { body: p.body } : {}),
          ...(p.state !== undefined ? { state: p.state } : {}),
          ...(p.stateReason !== undefined ? { state_reason: p.stateReason } : {}),
        });
        return issue(r.data, 'update the tracking issue');
      }),
    ensureLabel: (name, color, description) =>
      call('create the label', async (octokit) => {
        try {
          await octokit.rest.issues.getLabel({ ...repo, name });
          return;
        } catch (e) {
          if (httpStatus(e) !== 404) throw e;
        }
        try {
          await octokit.rest.issues.createLabel({ ...repo, name, color, description });
        } catch (e) {
          // Another run created it meanwhile.
          if (httpStatus(e) !== 422) throw e;
        }
      }),
  };
}

/** A throttling callback: say so, then retry twice at most, and only for a short wait. */
function waitOutRateLimit(what: string) {
  return (after: number, options: { method: string; url: string }, _o: unknown, count: number): boolean => {
    core.info(logSafe(`GitHub API ${what} for ${options.method} ${options.url}; retry in ${after}s.`));
    return count < 2 && after <= MAX_RATE_WAIT_S;
  };
}
