// The webhook event: which pull request (and base commit) a run is for, and where the report goes.
import { readFile } from 'node:fs/promises';
import type { CommentTarget } from './settings.js';

/** The parts of the event payload Leadline uses. */
export interface EventFacts {
  /** The pull request this run is for, when the event carries one. */
  pullRequest: { number: number; baseSha: string | null; headSha: string | null } | null;
  /**
   * On `workflow_run`: the run that finished (and uploaded results). Its head commit and pull
   * requests come from GitHub, not from the workflow that ran: they are what a fork cannot forge.
   * For a fork's pull request GitHub leaves `pullRequests` empty; then the pull request is found by
   * the head repository's owner and branch (see workflowRunPullRequest in publish.ts).
   */
  workflowRun: {
    event: string;
    headSha: string | null;
    headOwner: string | null;
    headBranch: string | null;
    pullRequests: { number: number; headSha: string | null }[];
  } | null;
}

/** Events that carry a pull request. */
export const PR_EVENT_NAMES: ReadonlySet<string> = new Set(['pull_request', 'pull_request_target']);
const PR_EVENTS = PR_EVENT_NAMES;
const TRACKING_EVENTS = new Set(['push', 'schedule', 'workflow_dispatch']);

/** Reads GITHUB_EVENT_PATH; a missing or unreadable payload is treated as empty (local runs). */
export async function readEvent(
  eventPath: string | null,
): Promise<{ facts: EventFacts; problem: string | null }> {
  if (!eventPath) return { facts: eventFacts({}), problem: null };
  try {
    const payload: unknown = JSON.parse(await readFile(eventPath, 'utf8'));
    return { facts: eventFacts(payload), problem: null };
  } catch (e) {
    return {
      facts: eventFacts({}),
      problem: `The event payload ${eventPath} could not be read (${(e as Error).message}); treating the run as having no pull request.`,
    };
  }
}

const sha = (x: unknown) => (typeof x === 'string' && /^[0-9a-f]{7,64}$/i.test(x) ? x : null);
const word = (x: unknown, max = 255) => (typeof x === 'string' && x.length <= max ? x : null);
const prNumber = (x: unknown) => (typeof x === 'number' && Number.isSafeInteger(x) && x > 0 ? x : null);

/** Pure: payload -> facts. Tolerates any shape. */
export function eventFacts(payload: unknown): EventFacts {
  const pr = (payload as { pull_request?: unknown } | null)?.pull_request as
    { number?: unknown; base?: { sha?: unknown }; head?: { sha?: unknown } } | undefined;
  const number = prNumber(pr?.number);
  return {
    pullRequest:
      number === null ? null : { number, baseSha: sha(pr?.base?.sha), headSha: sha(pr?.head?.sha) },
    workflowRun: workflowRunFacts((payload as { workflow_run?: unknown } | null)?.workflow_run),
  };
}

function workflowRunFacts(raw: unknown): EventFacts['workflowRun'] {
  if (!raw || typeof raw !== 'object') return null;
  const w = raw as {
    event?: unknown;
    head_sha?: unknown;
    head_branch?: unknown;
    head_repository?: { owner?: { login?: unknown } };
    pull_requests?: unknown;
  };
  const prs = Array.isArray(w.pull_requests) ? (w.pull_requests as unknown[]) : [];
  return {
    event: word(w.event, 64) ?? '',
    headSha: sha(w.head_sha),
    headOwner: word(w.head_repository?.owner?.login, 100),
    headBranch: word(w.head_branch),
    pullRequests: prs.flatMap((p) => {
      const q = p as { number?: unknown; head?: { sha?: unknown } } | null;
      const n = prNumber(q?.number);
      return n === null ? [] : [{ number: n, headSha: sha(q?.head?.sha) }];
    }),
  };
}

/** Where this run's report goes, once `auto` is resolved against the event. */
export type Destination =
  | { kind: 'comment'; issue: number; what: 'pull request' | 'issue' }
  | { kind: 'tracking-issue' }
  | { kind: 'none'; why: string | null };

/**
 * auto: a pull-request comment on pull_request events, the tracking issue on push, schedule and
 * workflow_dispatch, nothing on other events. `why` is a message worth a warning when the user asked
 * for something the event cannot give.
 */
export function destination(target: CommentTarget, eventName: string, facts: EventFacts): Destination {
  switch (target.kind) {
    case 'off':
      return { kind: 'none', why: null };
    case 'issue':
      return { kind: 'comment', issue: target.number, what: 'issue' };
    case 'tracking-issue':
      return { kind: 'tracking-issue' };
    case 'pull-request':
      if (facts.pullRequest)
        return { kind: 'comment', issue: facts.pullRequest.number, what: 'pull request' };
      return {
        kind: 'none',
        why: `comment: pull-request, but this ${eventName || 'unknown'} event has no pull request; the report was not posted (see the job summary).`,
      };
    case 'auto':
      if (PR_EVENTS.has(eventName) && facts.pullRequest)
        return { kind: 'comment', issue: facts.pullRequest.number, what: 'pull request' };
      if (TRACKING_EVENTS.has(eventName)) return { kind: 'tracking-issue' };
      return { kind: 'none', why: null };
  }
}

/** Whether the event judges the rows a pull request adds. */
export function isPullRequestEvent(eventName: string, facts: EventFacts): boolean {
  return PR_EVENTS.has(eventName) && facts.pullRequest !== null;
}
