// Metric file patterns -> files inside the working directory. Anything that leads outside it, by
// `..`, an absolute path or a symlink, is refused: a config must not make Leadline read (and then
// quote in a public comment) files from elsewhere on the runner.
import type { Stats } from 'node:fs';
import { readdir, realpath, stat } from 'node:fs/promises';
import path from 'node:path';
import { glob, isDynamicPattern } from 'tinyglobby';
import { LeadlineError } from '../errors.js';
import { nearest, visible } from '../text/index.js';

const toPosix = (p: string): string => p.split(path.sep).join('/');

function inside(root: string, target: string): boolean {
  const r = path.relative(root, target);
  return r === '' || (!r.startsWith('..') && !path.isAbsolute(r));
}

/** Lexically normalised relative path (forward slashes); starts with "../" when it escapes. */
function normalise(p: string): string {
  return path.posix.normalize(p.replace(/\\/g, '/'));
}

/**
 * The files `pattern` names: a path, or a glob (tinyglobby syntax: *, **, ?, [..], {a,b}), relative
 * to `cwd`. Returns paths relative to `cwd` with forward slashes, sorted. Hidden files are matched
 * only by patterns that name them; directories never match.
 * Throws LeadlineError: 'config' when the pattern or a match leads outside `cwd` (through `..`, an
 * absolute path, or a symlink), 'data' when nothing matches.
 */
/** Most files one metric's glob may match: past it the run would spend minutes and gigabytes. */
export const MAX_FILES_PER_METRIC = 5000;

/** What a path that is not a regular file is, for messages. */
function kindOf(st: Stats): string {
  if (st.isDirectory()) return 'a directory';
  if (st.isFIFO()) return 'a FIFO';
  if (st.isSocket()) return 'a socket';
  if (st.isCharacterDevice() || st.isBlockDevice()) return 'a device';
  return 'not a file';
}

function notRegular(shown: string, st: Stats): LeadlineError {
  const what = kindOf(st);
  return new LeadlineError(
    'data',
    what === 'a directory'
      ? `"${visible(shown)}" is a directory, not a CSV file.`
      : `"${visible(shown)}" is not a regular file (${what}); Leadline reads only regular files.`,
    { file: shown },
  );
}

export async function resolveFiles(
  pattern: string,
  cwd: string,
  maxFiles = MAX_FILES_PER_METRIC,
): Promise<string[]> {
  const base = path.resolve(cwd);
  let root: string;
  try {
    root = await realpath(base);
  } catch {
    throw new LeadlineError('usage', `The working directory ${base} does not exist.`);
  }
  const given = pattern.trim();
  if (given === '') throw new LeadlineError('config', 'The metric file is empty; give a path or glob.');
  let rel = given;
  if (path.isAbsolute(rel)) {
    const r = path.relative(base, rel);
    if (r.startsWith('..') || path.isAbsolute(r)) {
      throw new LeadlineError(
        'config',
        `Refusing to read "${given}": it is outside the working directory (${base}).`,
        { file: given },
      );
    }
    rel = toPosix(r) || '.';
  }
  const norm = normalise(rel);
  if (norm === '..' || norm.startsWith('../')) {
    throw new LeadlineError(
      'config',
      `Refusing to read "${given}": it leads outside the working directory (${base}).`,
      { file: given },
    );
  }

  let matches: string[];
  if (!isDynamicPattern(norm)) {
    let st: Stats;
    try {
      st = await stat(path.join(base, norm));
    } catch {
      throw new LeadlineError(
        'data',
        `The file "${visible(given)}" does not exist (relative to ${base}).${await nearFile(base, norm)}`,
        { file: given },
      );
    }
    if (!st.isFile()) throw notRegular(given, st);
    matches = [norm];
  } else {
    matches = await glob(norm, {
      cwd: base,
      onlyFiles: true,
      expandDirectories: false,
      dot: false,
      followSymbolicLinks: true,
    });
    if (matches.length === 0) {
      throw new LeadlineError('data', `No file matches "${visible(given)}" (relative to ${base}).`, {
        file: given,
      });
    }
    if (matches.length > maxFiles) {
      throw new LeadlineError(
        'config',
        `"${visible(given)}" matches ${matches.length} files; Leadline reads at most ${maxFiles} per metric. Narrow the pattern, or split the files across metrics.`,
        { file: given },
      );
    }
  }

  const out = new Set<string>();
  for (const m of matches) {
    const rel2 = normalise(m);
    const abs = path.join(base, rel2);
    let real: string;
    try {
      real = await realpath(abs);
    } catch {
      throw new LeadlineError('data', `The file "${rel2}" cannot be opened (a broken symlink?).`, {
        file: rel2,
      });
    }
    if (!inside(root, real)) {
      throw new LeadlineError(
        'config',
        `Refusing to read "${rel2}": it is a symlink leading outside the working directory (to ${real}).`,
        { file: rel2 },
      );
    }
    const st = await stat(real).catch(() => null);
    if (st && !st.isFile()) throw notRegular(rel2, st);
    out.add(rel2);
  }
  return [...out].sort();
}

/** " Did you mean …?" naming the closest file in the folder of a missing one, or "". */
async function nearFile(base: string, rel: string): Promise<string> {
  const folder = path.posix.dirname(rel);
  let names: string[];
  try {
    names = (await readdir(path.join(base, folder), { withFileTypes: true }))
      .filter((d) => d.isFile())
      .map((d) => d.name);
  } catch {
    return '';
  }
  const near = nearest(path.posix.basename(rel), names);
  return near === null ? '' : ` Did you mean "${visible(folder === '.' ? near : `${folder}/${near}`)}"?`;
}
