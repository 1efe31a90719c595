import { describe, expect, it } from 'vitest';
import {
  isMarked,
  marker,
  publishWarning,
  syncTrackingIssue,
  upsertComment,
  type TrackingRequest,
} from '../../src/action/publish.js';
import { FakeGitHub } from './helpers.js';

const MARK = marker('report', '.github/leadline.yml');

describe('markers', () => {
  it('names the config and cannot close the HTML comment early', () => {
    expect(MARK).toBe('<!-- leadline:report:.github/leadline.yml -->');
    const odd = marker('report', 'conf--ig/a b-->.yml');
    expect(odd.slice(4, -3)).not.toContain('--');
    expect(odd.slice(4, -3)).not.toContain('>');
    expect(marker('report', 'a.yml')).not.toBe(marker('report', 'b.yml'));
    expect(marker('report', 'a.yml')).not.toBe(marker('tracking', 'a.yml'));
  });

  it('counts a body as ours only when it starts with the marker', () => {
    expect(isMarked(`${MARK}\nbody`, MARK)).toBe(true);
    expect(isMarked(`\n  ${MARK}\nbody`, MARK)).toBe(true);
    expect(isMarked(`> ${MARK}\nquoted by a person`, MARK)).toBe(false);
  });
});

describe('upsertComment', () => {
  it('creates the comment on the first run and updates the same one on the second', async () => {
    const gh = new FakeGitHub();
    gh.addComment(7, 'a person talking');
    const first = await upsertComment(gh, 7, MARK, 'report one');
    expect(first.action).toBe('created');
    const second = await upsertComment(gh, 7, MARK, 'report two');
    expect(second.action).toBe('updated');
    expect(second.url).toBe(first.url);
    const list = gh.comments.get(7)!;
    expect(list).toHaveLength(2);
    expect(list[1]!.body).toBe(`${MARK}\nreport two`);
    expect(list[0]!.body).toBe('a person talking');
  });

  it('does not rewrite a comment whose body is unchanged', async () => {
    const gh = new FakeGitHub();
    await upsertComment(gh, 7, MARK, 'same');
    gh.calls = [];
    await upsertComment(gh, 7, MARK, 'same');
    expect(gh.calls).toEqual(['listComments 7']);
  });

  it('keeps the oldest and deletes newer duplicates left by an earlier race', async () => {
    const gh = new FakeGitHub();
    const old = gh.addComment(7, `${MARK}\nold`);
    gh.addComment(7, `${MARK}\nnewer`);
    gh.addComment(7, `${MARK}\nnewest`);
    const out = await upsertComment(gh, 7, MARK, 'fresh');
    expect(out).toEqual({ action: 'updated', url: old.url, removed: 2, notes: [] });
    expect(gh.comments.get(7)!.map((c) => c.body)).toEqual([`${MARK}\nfresh`]);
  });

  it('resolves a race: a comment created meanwhile by another run is kept, ours is deleted', async () => {
    const gh = new FakeGitHub();
    // The other run creates its comment after our listing and before ours is created.
    gh.onCreateComment = (n) => {
      gh.onCreateComment = null;
      gh.addComment(n, `${MARK}\nfrom the other run`);
    };
    const out = await upsertComment(gh, 7, MARK, 'ours');
    const list = gh.comments.get(7)!;
    expect(list).toHaveLength(1);
    expect(list[0]!.body).toBe(`${MARK}\nours`);
    expect(out.url).toBe(list[0]!.url);
    expect(out.removed).toBe(1);
  });

  it('tolerates the other racer deleting the duplicate first', async () => {
    const gh = new FakeGitHub();
    gh.onCreateComment = (n) => {
      gh.onCreateComment = null;
      gh.addComment(n, `${MARK}\nother`);
    };
    const realDelete = gh.deleteComment.bind(gh);
    gh.deleteComment = async (id) => {
      await realDelete(id); // the other run got there first...
      return realDelete(id); // ...so ours sees a 404
    };
    const out = await upsertComment(gh, 7, MARK, 'ours');
    expect(out.removed).toBe(0);
    expect(gh.comments.get(7)).toHaveLength(1);
  });
});

const request = (attention: boolean, body = 'report'): TrackingRequest => ({
  mark: marker('tracking', 'leadline.yml'),
  label: 'leadline',
  labelColor: 'c2410c',
  labelDescription: 'd',
  attention,
  title: attention ? 'Leadline: 1 metric needs attention' : 'Leadline: all clear',
  body,
  closeNote: 'all clear, closing',
  reopenNote: 'back again',
});

describe('syncTrackingIssue', () => {
  it('never creates an issue when all is clear and none exists', async () => {
    const gh = new FakeGitHub();
    const out = await syncTrackingIssue(gh, request(false));
    expect(out.action).toBe('none');
    expect(gh.issues).toHaveLength(0);
    expect(gh.calls).toEqual(['listIssues leadline']);
  });

  it('goes open → update → close → reopen on one issue', async () => {
    const gh = new FakeGitHub();
    const opened = await syncTrackingIssue(gh, request(true, 'first'));
    expect(opened.action).toBe('created');
    expect(gh.labels.has('leadline')).toBe(true);
    expect(gh.issues[0]!.labels).toEqual(['leadline']);

    const updated = await syncTrackingIssue(gh, request(true, 'second'));
    expect(updated).toMatchObject({ action: 'updated', number: opened.number });
    expect(gh.issues[0]!.body).toContain('second');

    const closed = await syncTrackingIssue(gh, request(false, 'clear'));
    expect(closed).toMatchObject({ action: 'closed', number: opened.number });
    expect(gh.issues[0]!.state).toBe('closed');
    expect(gh.comments.get(opened.number!)!.map((c) => c.body)).toEqual(['all clear, closing']);

    expect((await syncTrackingIssue(gh, request(false))).action).toBe('none');

    const reopened = await syncTrackingIssue(gh, request(true, 'third'));
    expect(reopened).toMatchObject({ action: 'reopened', number: opened.number });
    expect(gh.issues).toHaveLength(1);
    expect(gh.issues[0]!.state).toBe('open');
    expect(gh.issues[0]!.body).toContain('third');
    expect(gh.comments.get(opened.number!)!.map((c) => c.body)).toEqual(['all clear, closing', 'back again']);
  });

  it('ignores labelled issues of another config and issues quoting the marker', async () => {
    const gh = new FakeGitHub();
    gh.labels.add('leadline');
    await gh.createIssue('other', `${marker('tracking', 'other.yml')}\nx`, ['leadline']);
    await gh.createIssue('quote', `> ${marker('tracking', 'leadline.yml')}`, ['leadline']);
    const out = await syncTrackingIssue(gh, request(true));
    expect(out.action).toBe('created');
    expect(out.number).toBe(3);
  });

  it('closes newer duplicate open issues as not planned', async () => {
    const gh = new FakeGitHub();
    gh.labels.add('leadline');
    const mark = request(true).mark;
    await gh.createIssue('a', `${mark}\na`, ['leadline']);
    await gh.createIssue('b', `${mark}\nb`, ['leadline']);
    const out = await syncTrackingIssue(gh, request(true, 'now'));
    expect(out).toMatchObject({ action: 'updated', number: 1 });
    expect(gh.issues.map((i) => i.state)).toEqual(['open', 'closed']);
    expect(out.notes.join(' ')).toContain('#2');
  });

  it('still creates the issue when the label cannot be created', async () => {
    const gh = new FakeGitHub();
    gh.labelCreationFails = true;
    const out = await syncTrackingIssue(gh, request(true));
    expect(out.action).toBe('created');
    expect(gh.issues[0]!.labels).toEqual([]);
    expect(out.notes.join(' ')).toMatch(/label "leadline"/);
  });
});

describe('publishWarning', () => {
  const e403 = Object.assign(new Error('Resource not accessible by integration'), { status: 403 });
  it('explains the permission fix for pull requests, including forks', () => {
    const w = publishWarning(e403, 'pull request #7', 'pull-requests');
    expect(w).toContain('HTTP 403');
    expect(w).toContain('permissions: pull-requests: write');
    expect(w).toMatch(/fork/i);
  });
  it('names issues: write for tracking issues and 404s', () => {
    const w = publishWarning(
      Object.assign(new Error('Not Found'), { status: 404 }),
      'the tracking issue',
      'issues',
    );
    expect(w).toContain('permissions: issues: write');
  });
  it('does not blame permissions for a server failure', () => {
    const w = publishWarning(
      Object.assign(new Error('Bad gateway'), { status: 502 }),
      'pull request #7',
      'pull-requests',
    );
    expect(w).not.toContain('permissions');
    expect(w).toContain('HTTP 502');
  });
});
