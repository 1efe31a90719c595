import { mkdtempSync, mkdirSync, rmSync, writeFileSync, appendFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { git } from './helpers.js';
import {
  compareWithBase,
  countLines,
  isTracked,
  parseBatch,
  systemGit,
  type GitRunner,
} from '../../src/action/git.js';

const dirs: string[] = [];
afterAll(() => {
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

/** A repository with a base commit and a pull-request commit that appends rows. */
function makeRepo() {
  const root = mkdtempSync(path.join(os.tmpdir(), 'leadline-git-'));
  dirs.push(root);
  git(root, 'init', '-q', '-b', 'main');
  mkdirSync(path.join(root, 'ops', 'metrics'), { recursive: true });
  const csv = path.join(root, 'ops', 'metrics', 'queue depth.csv');
  writeFileSync(csv, 'date,depth\n2026-01-01,10\n2026-01-02,11\n2026-01-03,12'); // no final newline
  writeFileSync(path.join(root, 'ops', 'metrics', 'untouched.csv'), 'date,x\n2026-01-01,1\n');
  writeFileSync(path.join(root, 'ops', 'notes.md'), 'notes\n');
  git(root, 'add', '.');
  git(root, 'commit', '-q', '-m', 'base');
  const base = git(root, 'rev-parse', 'HEAD');
  git(root, 'checkout', '-q', '-b', 'pr');
  appendFileSync(csv, '\n2026-01-04,13\n2026-01-05,40\n');
  writeFileSync(path.join(root, 'ops', 'metrics', 'new.csv'), 'run,seconds\n1,5\n2,6\n3,7\n');
  writeFileSync(path.join(root, 'ops', 'notes.md'), 'more notes\n');
  git(root, 'add', '.');
  git(root, 'commit', '-q', '-m', 'pr: append rows');
  return { root, base, cwd: path.join(root, 'ops') };
}

describe('countLines', () => {
  it('counts newline-terminated lines and a last line without one', () => {
    expect(countLines(Buffer.from(''))).toBe(0);
    expect(countLines(Buffer.from('a'))).toBe(1);
    expect(countLines(Buffer.from('a\n'))).toBe(1);
    expect(countLines(Buffer.from('a\r\nb\r\n'))).toBe(2);
    expect(countLines(Buffer.from('a\nb'))).toBe(2);
  });
});

describe('parseBatch', () => {
  it('reads blobs and missing entries in request order, content taken byte for byte', () => {
    const blob = Buffer.from('h\né\n', 'utf8');
    const out = Buffer.concat([
      Buffer.from(`e69de29bb2d1d6434b8b29ae775ad8c2e48c5391 blob ${blob.length}\n`),
      blob,
      Buffer.from('\nHEAD:./x missing\n'),
      Buffer.from('0123456789abcdef0123456789abcdef01234567 blob 0\n\n'),
    ]);
    const r = parseBatch(out, 3);
    expect(r[0]!.toString('utf8')).toBe('h\né\n');
    expect(r[1]).toBeNull();
    expect(r[2]!.length).toBe(0);
  });
});

describe('compareWithBase in a real repository', () => {
  it('gives the base line count of each changed file, relative to the working directory', async () => {
    const { base, cwd } = makeRepo();
    const cmp = await compareWithBase(systemGit, cwd, base);
    expect(cmp.ok).toBe(true);
    if (!cmp.ok) return;
    // Base had header + 3 rows = 4 lines; the PR's rows are lines 5 and 6.
    expect(cmp.newRows['metrics/queue depth.csv']).toBe(4);
    // New in the PR: 4 lines, only the last one counts as new.
    expect(cmp.newRows['metrics/new.csv']).toBe(3);
    expect(cmp.added).toEqual(['metrics/new.csv']);
    expect(cmp.newRows['notes.md']).toBe(1);
    expect(cmp.newRows).not.toHaveProperty('metrics/untouched.csv');
  });

  it('works on the merge commit actions/checkout makes for a pull request', async () => {
    const { root, base, cwd } = makeRepo();
    // The base branch moves on with a change elsewhere; the runner checks out a merge of the two.
    git(root, 'checkout', '-q', 'main');
    writeFileSync(path.join(root, 'ops', 'metrics', 'untouched.csv'), 'date,x\n2026-01-01,1\n2026-01-02,2\n');
    git(root, 'commit', '-q', '-am', 'main moves on');
    const mainTip = git(root, 'rev-parse', 'HEAD');
    git(root, 'merge', '-q', '--no-ff', '-m', 'merge pr', 'pr');
    const cmp = await compareWithBase(systemGit, cwd, mainTip);
    expect(cmp.ok && cmp.newRows).toEqual({
      'metrics/queue depth.csv': 4,
      'metrics/new.csv': 3,
      'notes.md': 1,
    });
    // Against the older base, main's own change shows up too (it is new relative to that base).
    const older = await compareWithBase(systemGit, cwd, base);
    expect(older.ok && older.newRows['metrics/untouched.csv']).toBe(2);
  });

  it('says the base is missing from a shallow clone, with the fetch-depth fix', async () => {
    const { root, base } = makeRepo();
    const shallow = mkdtempSync(path.join(os.tmpdir(), 'leadline-shallow-'));
    dirs.push(shallow);
    git(shallow, 'clone', '-q', '--depth', '1', '--branch', 'pr', `file://${root}`, 'c');
    const cmp = await compareWithBase(systemGit, path.join(shallow, 'c', 'ops'), base);
    expect(cmp.ok).toBe(false);
    if (cmp.ok) return;
    expect(cmp.note).toContain(base.slice(0, 12));
    expect(cmp.note).toContain('fetch-depth: 0');
    expect(cmp.note).toContain('check.last');
  });

  it('says so when the payload has no base commit or git cannot run', async () => {
    const plain = mkdtempSync(path.join(os.tmpdir(), 'leadline-nogit-'));
    dirs.push(plain);
    const notRepo = await compareWithBase(systemGit, plain, 'a'.repeat(40));
    expect(!notRepo.ok && notRepo.note).toContain('not a git checkout');
    const none = await compareWithBase(systemGit, os.tmpdir(), null);
    expect(none.ok).toBe(false);
    const broken: GitRunner = {
      run: async () => ({ code: -1, stdout: Buffer.alloc(0), stderr: 'spawn git ENOENT' }),
    };
    const cmp = await compareWithBase(broken, os.tmpdir(), 'a'.repeat(40));
    expect(!cmp.ok && cmp.note).toContain('git is not available');
  });

  it('falls back to a two-commit diff when the merge base is out of reach', async () => {
    const calls: string[][] = [];
    const fake: GitRunner = {
      async run(args, { input }) {
        calls.push(args);
        if (args[0] === 'cat-file' && args[1] === '-e')
          return { code: 0, stdout: Buffer.alloc(0), stderr: '' };
        if (args.includes('diff') && args.some((a) => a.includes('...')))
          return { code: 128, stdout: Buffer.alloc(0), stderr: 'fatal: no merge base' };
        if (args.includes('diff')) return { code: 0, stdout: Buffer.from('M\0a.csv\0'), stderr: '' };
        if (args.includes('ls-tree')) {
          expect(args).toContain('bbbbbbb');
          return { code: 0, stdout: Buffer.from(`100644 blob ${'1'.repeat(40)}\ta.csv\0`), stderr: '' };
        }
        expect(input).toBe(`${'1'.repeat(40)}\n`);
        return {
          code: 0,
          stdout: Buffer.from('1111111111111111111111111111111111111111 blob 4\nh\n1\n\n'),
          stderr: '',
        };
      },
    };
    const cmp = await compareWithBase(fake, '/x', 'bbbbbbb');
    expect(cmp.ok && cmp.newRows).toEqual({ 'a.csv': 2 });
    expect(calls.filter((a) => a.includes('diff'))).toHaveLength(2);
  });
});

describe('isTracked', () => {
  it('tells the repository files from new ones and from paths outside it', async () => {
    const { root } = makeRepo();
    expect(await isTracked(systemGit, root, path.join(root, 'ops', 'notes.md'))).toBe(true);
    expect(await isTracked(systemGit, root, path.join(root, 'ops', 'report.html'))).toBe(false);
    expect(await isTracked(systemGit, root, path.join(os.tmpdir(), 'elsewhere.json'))).toBe(false);
  });
});
