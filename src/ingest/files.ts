// Metric file patterns -> files inside the working directory. Anything that leads outside it, by
// `..`, an absolute path or a symlink, is refused: a config must not make Leadline read (and then
// quote in a public comment) files from elsewhere on the runner.
import { realpath, stat } from 'node:fs/promises';
import path from 'node:path';
import { glob, isDynamicPattern } from 'tinyglobby';
import { LeadlineError } from '../errors.js';

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
export async function resolveFiles(pattern: string, cwd: string): Promise<string[]> {
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
    let isFile = false;
    try {
      isFile = (await stat(path.join(base, norm))).isFile();
    } catch {
      throw new LeadlineError('data', `The file "${given}" does not exist (relative to ${base}).`, {
        file: given,
      });
    }
    if (!isFile)
      throw new LeadlineError('data', `"${given}" is a directory, not a CSV file.`, { file: given });
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
      throw new LeadlineError('data', `No file matches "${given}" (relative to ${base}).`, { file: given });
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
    out.add(rel2);
  }
  return [...out].sort();
}
