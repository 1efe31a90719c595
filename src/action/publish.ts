// Publishing the report: one sticky comment per pull request (or issue) per config, and one tracking
// issue per config. Pure logic over IssueApi; the markers make Leadline's own comments and issues
// findable again, so nothing is ever duplicated.
import { LeadlineError } from '../errors.js';
import type { EventFacts } from './event.js';
import type { Issue, IssueApi, IssueComment } from './github.js';
import { ApiFault, httpStatus } from './github.js';
import { plural, visible } from '../text/index.js';

/**
 * The hidden marker for a config's report, e.g. `<!-- leadline:report:.github/leadline.yml -->`.
 * The path is percent-encoded outside a safe set so it can never end the HTML comment early.
 */
export function marker(kind: 'report' | 'tracking', configKey: string): string {
  const safe = configKey.replace(/[^A-Za-z0-9._/@+]/g, (c) =>
    [...Buffer.from(c, 'utf8')].map((b) => `%${b.toString(16).toUpperCase().padStart(2, '0')}`).join(''),
  );
  return `<!-- leadline:${kind}:${safe} -->`;
}

/** A body is ours when it starts with the marker: a person quoting it ("> <!-- ...") does not count. */
export function isMarked(body: string, mark: string): boolean {
  return body.trimStart().startsWith(mark);
}

/** Puts the marker first when the rendered body does not already start with it. */
export function withMarker(body: string, mark: string): string {
  return isMarked(body, mark) ? body : `${mark}\n${body}`;
}

function oldestFirst<T extends { createdAt: string }>(key: (x: T) => number) {
  return (a: T, b: T) => a.createdAt.localeCompare(b.createdAt) || key(a) - key(b);
}

/**
 * Deletes a duplicate of the report. Never throws: the report itself is already posted, so a failed
 * delete is a note saying just that.
 */
async function deleteDuplicate(api: IssueApi, c: IssueComment, notes: string[]): Promise<boolean> {
  try {
    await api.deleteComment(c.id);
    return true;
  } catch (e) {
    // A racing run may have removed it already.
    if (httpStatus(e) === 404) return false;
    notes.push(
      `Could not delete the duplicate report comment ${c.url} (${describeError(e)}); the report itself is posted, so only the older copy remains.`,
    );
    return false;
  }
}

/** Marked items written by someone else: ignored, and said once. */
function ignoredNote<T extends { author: string | null; url: string }>(
  foreign: T[],
  me: string,
  what: string,
): string[] {
  if (foreign.length === 0) return [];
  const by = [...new Set(foreign.map((f) => visible(f.author ?? 'an unknown author')))].join(', ');
  return [
    `Ignored ${plural(foreign.length, what)} carrying Leadline's marker but written by ${by}, not by ${visible(me)} (this token): Leadline edits, deletes and closes only its own (${foreign
      .slice(0, 3)
      .map((f) => f.url)
      .join(', ')}).`,
  ];
}

/** Splits marked items into this token's own and others'. */
function byIdentity<T extends { body: string; author: string | null }>(items: T[], mark: string, me: string) {
  const marked = items.filter((i) => isMarked(i.body, mark));
  return { own: marked.filter((i) => i.author === me), foreign: marked.filter((i) => i.author !== me) };
}

export interface CommentOutcome {
  action: 'created' | 'updated';
  url: string;
  /** Duplicate marked comments removed (left by earlier races). */
  removed: number;
  /** What else happened: marked comments of others ignored, duplicates that could not be deleted. */
  notes: string[];
}

/**
 * Creates or updates the one marked comment on `issue`. When several marked comments exist (two runs
 * raced and both created one), the oldest is kept and updated and the newer ones are deleted.
 */
export async function upsertComment(
  api: IssueApi,
  issue: number,
  mark: string,
  body: string,
): Promise<CommentOutcome> {
  const text = withMarker(body, mark);
  const order = oldestFirst<IssueComment>((c) => c.id);
  const me = await api.identity();
  const { own, foreign } = byIdentity(await api.listComments(issue), mark, me);
  const notes = ignoredNote(foreign, me, 'comment');
  const mine = own.sort(order);
  if (mine.length > 0) {
    const [keep, ...extra] = mine;
    const updated = keep!.body === text ? keep! : await api.updateComment(keep!.id, text);
    let removed = 0;
    for (const c of extra) if (await deleteDuplicate(api, c, notes)) removed++;
    return { action: 'updated', url: updated.url, removed, notes };
  }
  const created = await api.createComment(issue, text);
  // Two runs for the same pull request (a quick second push) can both see no comment and both
  // create one. Listing again after creating makes every racer see every marked comment; all of them
  // agree on the oldest, so exactly one survives whichever run finishes last, and it carries the body
  // of the last run to write.
  const after = byIdentity(await api.listComments(issue), mark, me).own.sort(order);
  if (after.length <= 1) return { action: 'created', url: created.url, removed: 0, notes };
  const [keep, ...extra] = after;
  let removed = 0;
  if (keep!.id !== created.id) {
    await api.updateComment(keep!.id, text);
  }
  for (const c of extra) if (await deleteDuplicate(api, c, notes)) removed++;
  return { action: keep!.id === created.id ? 'created' : 'updated', url: keep!.url, removed, notes };
}

export interface TrackingRequest {
  mark: string;
  label: string;
  labelColor: string;
  labelDescription: string;
  /** Anything needs attention (alarms, limits at risk, errors). */
  attention: boolean;
  title: string;
  body: string;
  /** Comment posted when the issue is closed because all is clear. */
  closeNote: string;
  /** Comment posted when a closed issue is reopened. */
  reopenNote: string;
}

export interface TrackingOutcome {
  action: 'created' | 'updated' | 'reopened' | 'closed' | 'none';
  url: string | null;
  number: number | null;
  /** Notes about label trouble and duplicate issues, for the log. */
  notes: string[];
}

/**
 * Keeps exactly one open tracking issue per config: update it while anything needs attention, close
 * it with a short note when all is clear, reopen it when something returns; never create one when
 * all is clear and none exists.
 */
export async function syncTrackingIssue(api: IssueApi, r: TrackingRequest): Promise<TrackingOutcome> {
  const notes: string[] = [];
  const body = withMarker(r.body, r.mark);
  const order = oldestFirst<Issue>((i) => i.number);
  const me = await api.identity();
  const list = async () => byIdentity(await api.listIssues(r.label), r.mark, me);
  const first = await list();
  notes.push(...ignoredNote(first.foreign, me, 'issue'));
  const found = first.own;
  const open = found.filter((i) => i.state === 'open').sort(order);
  const closeDuplicates = async (keep: Issue, others: Issue[]) => {
    for (const d of others) {
      await api.updateIssue(d.number, { state: 'closed', stateReason: 'not_planned' });
      notes.push(`Closed #${d.number}: a duplicate of the tracking issue #${keep.number}.`);
    }
  };

  if (open.length > 0) {
    const [keep, ...dups] = open;
    await closeDuplicates(keep!, dups);
    if (!r.attention) {
      await api.updateIssue(keep!.number, { body });
      await api.createComment(keep!.number, r.closeNote);
      const closed = await api.updateIssue(keep!.number, { state: 'closed', stateReason: 'completed' });
      return { action: 'closed', url: closed.url, number: closed.number, notes };
    }
    const updated = await api.updateIssue(keep!.number, { title: r.title, body });
    return { action: 'updated', url: updated.url, number: updated.number, notes };
  }

  if (!r.attention) return { action: 'none', url: null, number: null, notes };

  // Most recently created closed issue first: that is the one the team last saw.
  const closed = found.filter((i) => i.state === 'closed').sort((a, b) => order(b, a));
  if (closed.length > 0) {
    const again = closed[0]!;
    const reopened = await api.updateIssue(again.number, {
      title: r.title,
      body,
      state: 'open',
      stateReason: 'reopened',
    });
    await api.createComment(again.number, r.reopenNote);
    return { action: 'reopened', url: reopened.url, number: reopened.number, notes };
  }

  try {
    await api.ensureLabel(r.label, r.labelColor, r.labelDescription);
  } catch (e) {
    notes.push(
      `Could not create the label "${r.label}" (${describeError(e)}); the issue is created without it and will not be found by later runs until the label is added.`,
    );
  }
  let created: Issue;
  try {
    created = await api.createIssue(r.title, body, [r.label]);
  } catch (e) {
    // Without permission to create labels GitHub refuses the unknown label: create it unlabelled.
    if (httpStatus(e) !== 422) throw e;
    created = await api.createIssue(r.title, body, []);
    notes.push(`The issue was created without the label "${r.label}" (GitHub refused it).`);
  }
  // Same race as for comments: two scheduled runs may both have found nothing.
  const after = (await list()).own.filter((i) => i.state === 'open').sort(order);
  if (after.length > 1) {
    const [keep, ...dups] = after;
    if (keep!.number !== created.number) await api.updateIssue(keep!.number, { title: r.title, body });
    await closeDuplicates(keep!, dups);
    return {
      action: keep!.number === created.number ? 'created' : 'updated',
      url: keep!.url,
      number: keep!.number,
      notes,
    };
  }
  return { action: 'created', url: created.url, number: created.number, notes };
}

/** One line saying what went wrong with a GitHub call: which call, and what happened to it. */
export function describeError(e: unknown): string {
  if (e instanceof ApiFault) return `${e.call}: ${e.message}${e.retried ? ', also after retries' : ''}`;
  const status = httpStatus(e);
  const msg = (e as Error | null)?.message ?? String(e);
  return status ? `HTTP ${status}: ${msg}` : msg;
}

/** The warning for a publishing failure: what happened and how to fix it. */
export function publishWarning(e: unknown, where: string, permission: 'pull-requests' | 'issues'): string {
  const status = httpStatus(e);
  const head = `Leadline could not publish the report to ${where} (${describeError(e)}).`;
  const tail = ' The verdict, job summary, outputs and results file are unaffected.';
  if (e instanceof ApiFault && e.kind === 'reply') {
    const maybe = /create|update/.test(e.call)
      ? ` GitHub may have carried out the request all the same: look at ${where}.`
      : '';
    return head + maybe + ' The next run will try again.' + tail;
  }
  if (status === 403 || status === 404) {
    return (
      head +
      ` The token may not write there: give the job \`permissions: ${permission}: write\`` +
      (permission === 'pull-requests'
        ? '. Pull requests from forks always get a read-only token: there the report is in the job summary and the results file (upload it with actions/upload-artifact); `comment: off` skips the attempt.'
        : '.') +
      tail
    );
  }
  const retried = e instanceof ApiFault ? e.retried : status !== null && status >= 500;
  return (
    head +
    (retried ? ' Retries did not help; the next run will try again.' : ' The next run will try again.') +
    tail
  );
}

/**
 * The pull request a `workflow_run` publishes for, from what GitHub says about the finished run: its
 * head commit, and its pull requests, or for a fork (where GitHub lists none) the open pull requests
 * whose head is the run's owner:branch at that commit. Never from the uploaded results: those are
 * checked against this. Throws LeadlineError('data') when there is not exactly one.
 */
export async function workflowRunPullRequest(
  run: NonNullable<EventFacts['workflowRun']>,
  api: IssueApi,
): Promise<{ number: number; headSha: string }> {
  const head = run.headSha;
  if (!head)
    throw new LeadlineError('data', 'The workflow_run event names no head commit: nothing is published.');
  const listed = run.pullRequests.filter((p) => p.headSha === null || p.headSha === head);
  let found = listed.map((p) => p.number);
  if (found.length === 0 && run.headOwner && run.headBranch) {
    const open = await api.openPullRequests(`${run.headOwner}:${run.headBranch}`);
    found = open.filter((p) => p.headSha === head).map((p) => p.number);
  }
  found = [...new Set(found)];
  if (found.length === 1) return { number: found[0]!, headSha: head };
  throw new LeadlineError(
    'data',
    found.length === 0
      ? `No open pull request has the workflow run's head commit ${head.slice(0, 12)} (it may have been pushed to since, or closed): nothing is published; the next run publishes.`
      : `Pull requests ${found.map((n) => `#${n}`).join(', ')} all have the workflow run's head commit ${head.slice(0, 12)}: which one to publish on is unclear, so nothing is published.`,
  );
}
