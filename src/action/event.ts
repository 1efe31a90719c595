// The webhook event: which pull request (and base commit) a run is for, and where the report goes.
import { readFile } from 'node:fs/promises';
import type { CommentTarget } from './settings.js';

/** The parts of the event payload Leadline uses. */
export interface EventFacts {
  /** The pull request this run is for, when the event carries one. */
  pullRequest: { number: number; baseSha: string | null; headSha: string | null } | null;
}

const PR_EVENTS = new Set(['pull_request', 'pull_request_target']);
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

/** Pure: payload -> facts. Tolerates any shape. */
export function eventFacts(payload: unknown): EventFacts {
  const pr = (payload as { pull_request?: unknown } | null)?.pull_request as
    { number?: unknown; base?: { sha?: unknown }; head?: { sha?: unknown } } | undefined;
  if (!pr || typeof pr.number !== 'number') return { pullRequest: null };
  const sha = (x: unknown) => (typeof x === 'string' && /^[0-9a-f]{7,64}$/i.test(x) ? x : null);
  return { pullRequest: { number: pr.number, baseSha: sha(pr.base?.sha), headSha: sha(pr.head?.sha) } };
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
