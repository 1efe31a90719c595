// Hostile file names and a hostile conversation: a file name with a newline must not shift the
// pull-request comparison nor reach the log as a workflow command; only Leadline's own comments and
// issues are ever touched.
import { appendFileSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { compareWithBase, systemGit } from '../../src/action/git.js';
import { marker, syncTrackingIssue, upsertComment } from '../../src/action/publish.js';
import { logSafe, safeStream, visible } from '../../src/text/index.js';
import { FakeGitHub, git } from './helpers.js';

const dirs: string[] = [];
afterAll(() => {
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

const rows = (n: number, from = 1) =>
  Array.from({ length: n }, (_, i) => `2026-01-${String(from + i).padStart(2, '0')},${10 + i}`).join('\n') +
  '\n';

describe('the pull-request comparison with a newline in a file name', () => {
  it('counts every file by its own lines: the added file cannot shift the others', async () => {
    const root = mkdtempSync(path.join(os.tmpdir(), 'leadline-hostile-git-'));
    dirs.push(root);
    git(root, 'init', '-q', '-b', 'main');
    mkdirSync(path.join(root, 'm'));
    writeFileSync(path.join(root, 'm', 'a.csv'), `day,v\n${rows(5)}`);
    writeFileSync(path.join(root, 'm', 'b.csv'), `day,v\n${rows(9)}`);
    git(root, 'add', '.');
    git(root, 'commit', '-q', '-m', 'base');
    const base = git(root, 'rev-parse', 'HEAD');
    // The added file's name holds a newline and sorts first, so its lines would shift the others.
    const evil = `0\n::stop-commands::x.csv`;
    writeFileSync(path.join(root, 'm', evil), `day,v\n${rows(3)}`);
    appendFileSync(path.join(root, 'm', 'a.csv'), rows(2, 6));
    appendFileSync(path.join(root, 'm', 'b.csv'), rows(1, 10));
    git(root, 'add', '.');
    git(root, 'commit', '-q', '-m', 'pr');
    const cmp = await compareWithBase(systemGit, path.join(root, 'm'), base);
    expect(cmp).toEqual({
      ok: true,
      newRows: { 'a.csv': 6, 'b.csv': 10, [evil]: 3 },
      added: [evil],
    });
  });
});

describe('workflow commands in untrusted text', () => {
  it('neutralises "::" at the start of every line, after blanks too, and only there', () => {
    const name = 'x.csv\n::stop-commands::pwned\n  ::add-mask::y\r::error::z';
    const out = logSafe(`${name} is new`);
    for (const line of out.split(/\r\n|\r|\n/)) expect(line.trimStart().startsWith('::')).toBe(false);
    expect(out).toContain('\\::stop-commands::pwned');
    expect(logSafe('ratio 1::2 stays')).toBe('ratio 1::2 stays');
    expect(logSafe('::x', false)).toBe('::x'); // continues a line already started
  });

  it('tracks line starts across writes of a stream', () => {
    let out = '';
    const s = safeStream({ write: (t: string) => (out += t) });
    s.write('a');
    s.write('::not a line start\n');
    s.write('::set-output name=x::1\n');
    expect(out).toBe('a::not a line start\n\\::set-output name=x::1\n');
  });

  it('shows invisible and direction-changing characters escaped', () => {
    expect(visible('evil\u202Etxt.csv')).toBe('evil\\u202Etxt.csv');
    expect(visible('a\nb\u200Bc\u0007')).toBe('a\\nb\\u200Bc\\u0007');
    expect(visible('line one\nline two', true)).toBe('line one\nline two');
    expect(visible('naïve 👩‍💻')).toBe('naïve 👩‍💻'); // joiners inside emoji stay
  });
});

const MARK = marker('report', '.github/leadline.yml');

describe('only comments and issues written by this token are touched', () => {
  it('ignores a marked comment by someone else and notes it', async () => {
    const gh = new FakeGitHub();
    const theirs = gh.addComment(7, `${MARK}\nI can write the marker too`, 'mallory');
    const out = await upsertComment(gh, 7, MARK, 'the report');
    expect(out.action).toBe('created');
    const list = gh.comments.get(7)!;
    expect(list.find((c) => c.id === theirs.id)!.body).toBe(`${MARK}\nI can write the marker too`);
    expect(list.filter((c) => c.author === 'github-actions[bot]').map((c) => c.body)).toEqual([
      `${MARK}\nthe report`,
    ]);
    expect(gh.calls.some((c) => c.startsWith('updateComment') || c.startsWith('deleteComment'))).toBe(false);
    expect(out.notes.join(' ')).toMatch(
      /Ignored 1 comment carrying Leadline's marker but written by mallory/,
    );
  });

  it('never deletes a newer marked comment by someone else as a duplicate', async () => {
    const gh = new FakeGitHub();
    const ours = gh.addComment(7, `${MARK}\nold report`);
    gh.addComment(7, `${MARK}\nnewer, by someone else`, 'mallory');
    const out = await upsertComment(gh, 7, MARK, 'new report');
    expect(out).toMatchObject({ action: 'updated', url: ours.url, removed: 0 });
    expect(gh.comments.get(7)!).toHaveLength(2);
  });

  it('neither updates nor closes a marked tracking issue opened by someone else', async () => {
    const gh = new FakeGitHub();
    gh.labels.add('leadline');
    gh.author = 'mallory';
    await gh.createIssue('fake tracking issue', `${MARK}\nclose me`, ['leadline']);
    gh.author = 'github-actions[bot]';
    const out = await syncTrackingIssue(gh, {
      mark: MARK,
      label: 'leadline',
      labelColor: 'c2410c',
      labelDescription: 'd',
      attention: false,
      title: 't',
      body: 'all clear',
      closeNote: 'closing',
      reopenNote: 'reopening',
    });
    expect(out.action).toBe('none');
    expect(gh.issues[0]).toMatchObject({ state: 'open', body: `${MARK}\nclose me` });
    expect(out.notes.join(' ')).toMatch(/Ignored 1 issue .* written by mallory/);
  });
});

describe('a duplicate that cannot be deleted', () => {
  it('is reported as just that: the report itself was updated', async () => {
    const gh = new FakeGitHub();
    const ours = gh.addComment(7, `${MARK}\nold`);
    const dup = gh.addComment(7, `${MARK}\nduplicate`);
    gh.failWith = { call: 'deleteComment', status: 403 };
    const out = await upsertComment(gh, 7, MARK, 'fresh');
    expect(out).toMatchObject({ action: 'updated', url: ours.url, removed: 0 });
    expect(gh.comments.get(7)![0]!.body).toBe(`${MARK}\nfresh`);
    expect(out.notes).toEqual([
      `Could not delete the duplicate report comment ${dup.url} (HTTP 403: fake 403); the report itself is posted, so only the older copy remains.`,
    ]);
  });
});
