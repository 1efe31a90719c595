import { mkdir, symlink } from 'node:fs/promises';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { LeadlineError } from '../../src/errors.js';
import { resolveFiles } from '../../src/ingest/index.js';
import { removeDir, tempDir, writeFiles } from './helpers.js';

let dir: string;
let outside: string;
beforeEach(async () => {
  dir = await tempDir();
  outside = await tempDir();
  await writeFiles(dir, {
    'metrics/b.csv': 'x\n',
    'metrics/a.csv': 'x\n',
    'metrics/.hidden.csv': 'x\n',
    'metrics/sub/c.csv': 'x\n',
    'top.csv': 'x\n',
  });
  await writeFiles(outside, { 'secret.csv': 'x\n' });
});
afterEach(async () => {
  await removeDir(dir);
  await removeDir(outside);
});

async function refused(pattern: string): Promise<LeadlineError> {
  const e = await resolveFiles(pattern, dir).catch((x: unknown) => x);
  expect(e).toBeInstanceOf(LeadlineError);
  return e as LeadlineError;
}

describe('resolveFiles', () => {
  it('returns a literal path as given, with forward slashes', async () => {
    expect(await resolveFiles('metrics/a.csv', dir)).toEqual(['metrics/a.csv']);
    expect(await resolveFiles('./metrics//a.csv', dir)).toEqual(['metrics/a.csv']);
  });

  it('expands globs, sorted, without hidden files or directories', async () => {
    expect(await resolveFiles('metrics/*.csv', dir)).toEqual(['metrics/a.csv', 'metrics/b.csv']);
    expect(await resolveFiles('metrics/**/*.csv', dir)).toEqual([
      'metrics/a.csv',
      'metrics/b.csv',
      'metrics/sub/c.csv',
    ]);
    expect(await resolveFiles('{top,metrics/a}.csv', dir)).toEqual(['metrics/a.csv', 'top.csv']);
  });

  it('accepts an absolute path inside the working directory', async () => {
    expect(await resolveFiles(path.join(dir, 'top.csv'), dir)).toEqual(['top.csv']);
  });

  it('refuses .. leading outside', async () => {
    const e = await refused(`../${path.basename(outside)}/secret.csv`);
    expect(e.kind).toBe('config');
    expect(e.message).toContain('leads outside the working directory');
    expect((await refused('metrics/../../x/*.csv')).message).toContain('outside');
  });

  it('refuses an absolute path outside', async () => {
    const e = await refused(path.join(outside, 'secret.csv'));
    expect(e.message).toContain('outside the working directory');
  });

  it('refuses a symlink that escapes, literal or through a glob', async () => {
    await symlink(path.join(outside, 'secret.csv'), path.join(dir, 'metrics', 'link.csv'));
    const e = await refused('metrics/link.csv');
    expect(e.message).toContain('symlink leading outside');
    expect(e.file).toBe('metrics/link.csv');
    expect((await refused('metrics/*.csv')).message).toContain('metrics/link.csv');
    await mkdir(path.join(dir, 'linked'));
    await symlink(outside, path.join(dir, 'linked', 'dir'));
    expect((await refused('linked/dir/secret.csv')).message).toContain('symlink leading outside');
  });

  it('follows a symlink that stays inside', async () => {
    await symlink(path.join(dir, 'top.csv'), path.join(dir, 'alias.csv'));
    expect(await resolveFiles('alias.csv', dir)).toEqual(['alias.csv']);
  });

  it('names a missing file, a directory and a glob without matches', async () => {
    expect((await refused('none.csv')).message).toContain('does not exist');
    expect((await refused('metrics')).message).toContain('is a directory');
    expect((await refused('*.tsv')).message).toContain('No file matches "*.tsv"');
  });
});
