// The GitHub calls Leadline makes, behind a small interface: the publishing logic (publish.ts) takes
// an IssueApi, so tests pass a fake; octokitApi is the real one, with retries and rate-limit handling.
import * as core from '@actions/core';
import { getOctokit } from '@actions/github';
import { retry } from '@octokit/plugin-retry';
import { throttling } from '@octokit/plugin-throttling';

export interface IssueComment {
  id: number;
  body: string;
  /** ISO time; with the id, decides which of two marked comments is the older. */
  createdAt: string;
  url: string;
}

export interface Issue {
  number: number;
  state: 'open' | 'closed';
  title: string;
  body: string;
  createdAt: string;
  url: string;
}

export interface IssuePatch {
  title?: string;
  body?: string;
  state?: 'open' | 'closed';
  stateReason?: 'completed' | 'not_planned' | 'reopened';
}

/** Issue and pull-request conversation calls (a pull request's comments are issue comments). */
export interface IssueApi {
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
}

/** The HTTP status of a failed API call, or null for other failures (network, bugs). */
export function httpStatus(e: unknown): number | null {
  const s = (e as { status?: unknown } | null)?.status;
  return typeof s === 'number' && s >= 100 ? s : null;
}

export interface OctokitSettings {
  token: string;
  owner: string;
  repo: string;
  apiUrl: string;
  /** Back-off base in ms for retries and rate-limit waits (1000 in production). */
  retryBaseMs: number;
}

type Raw = {
  id: number;
  body?: string | null;
  created_at: string;
  html_url: string;
};
type RawIssue = {
  number: number;
  state: string;
  title: string;
  body?: string | null;
  created_at: string;
  html_url: string;
  pull_request?: unknown;
};

const comment = (c: Raw): IssueComment => ({
  id: c.id,
  body: c.body ?? '',
  createdAt: c.created_at,
  url: c.html_url,
});
const issue = (i: RawIssue): Issue => ({
  number: i.number,
  state: i.state === 'closed' ? 'closed' : 'open',
  title: i.title,
  body: i.body ?? '',
  createdAt: i.created_at,
  url: i.html_url,
});

/** Rate-limit waits longer than this are not worth holding a runner for: give up and warn. */
const MAX_RATE_WAIT_S = 120;

export function octokitApi(s: OctokitSettings): IssueApi {
  const octokit = getOctokit(
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
  const repo = { owner: s.owner, repo: s.repo };
  return {
    async listComments(n) {
      const all = await octokit.paginate(octokit.rest.issues.listComments, {
        ...repo,
        issue_number: n,
        per_page: 100,
      });
      return all.map((c) => comment(c as Raw));
    },
    async createComment(n, body) {
      const r = await octokit.rest.issues.createComment({ ...repo, issue_number: n, body });
      return comment(r.data as Raw);
    },
    async updateComment(id, body) {
      const r = await octokit.rest.issues.updateComment({ ...repo, comment_id: id, body });
      return comment(r.data as Raw);
    },
    async deleteComment(id) {
      await octokit.rest.issues.deleteComment({ ...repo, comment_id: id });
    },
    async listIssues(label) {
      const all = await octokit.paginate(octokit.rest.issues.listForRepo, {
        ...repo,
        labels: label,
        state: 'all',
        per_page: 100,
      });
      return (all as RawIssue[]).filter((i) => !i.pull_request).map(issue);
    },
    async createIssue(title, body, labels) {
      const r = await octokit.rest.issues.create({ ...repo, title, body, labels });
      return issue(r.data as RawIssue);
    },
    async updateIssue(n, p) {
      const r = await octokit.rest.issues.update({
        ...repo,
        issue_number: n,
        ...(p.title !== undefined ? { title: p.title } : {}),
        ...(p.body !== undefined ? { body: p.body } : {}),
        ...(p.state !== undefined ? { state: p.state } : {}),
        ...(p.stateReason !== undefined ? { state_reason: p.stateReason } : {}),
      });
      return issue(r.data as RawIssue);
    },
    async ensureLabel(name, color, description) {
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
    },
  };
}

/** A throttling callback: say so, then retry twice at most, and only for a short wait. */
function waitOutRateLimit(what: string) {
  return (after: number, options: { method: string; url: string }, _o: unknown, count: number): boolean => {
    core.info(`GitHub API ${what} for ${options.method} ${options.url}; retry in ${after}s.`);
    return count < 2 && after <= MAX_RATE_WAIT_S;
  };
}
