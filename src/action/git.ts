// Which rows a pull request adds: each changed file's line count at the base commit, from git in the
// workspace. Git sits behind a one-method interface so the logic is tested with a fake as well as a
// real repository. Only read-only git commands are run.
import { spawn } from 'node:child_process';

export interface GitResult {
  /** Exit code; -1 when git could not be started. */
  code: number;
  stdout: Buffer;
  stderr: string;
}

export interface GitRunner {
  run(args: string[], options: { cwd: string; input?: string }): Promise<GitResult>;
}

/** The system's git. Never prompts; output is bytes (file contents pass through untouched). */
export const systemGit: GitRunner = {
  run(args, { cwd, input }) {
    return new Promise((resolve) => {
      const child = spawn('git', args, {
        cwd,
        env: { ...process.env, GIT_TERMINAL_PROMPT: '0', LC_ALL: 'C' },
        stdio: ['pipe', 'pipe', 'pipe'],
      });
      const out: Buffer[] = [];
      const err: Buffer[] = [];
      child.stdout.on('data', (b: Buffer) => out.push(b));
      child.stderr.on('data', (b: Buffer) => err.push(b));
      child.on('error', (e) => resolve({ code: -1, stdout: Buffer.alloc(0), stderr: e.message }));
      child.on('close', (code) =>
        resolve({
          code: code ?? -1,
          stdout: Buffer.concat(out),
          stderr: Buffer.concat(err).toString('utf8'),
        }),
      );
      child.stdin.on('error', () => undefined);
      child.stdin.end(input ?? '');
    });
  },
};

export type BaseComparison =
  | {
      ok: true;
      /** Changed file (relative to cwd, forward slashes) -> its number of lines at the base commit. */
      newRows: Record<string, number>;
      /** Files the pull request adds (not in the base), included in newRows with only their last line new. */
      added: string[];
    }
  | { ok: false; note: string };

/** The report note when the base commit is not in the clone, with the fix. */
export function missingBaseNote(baseSha: string | null, detail?: string): string {
  const what = baseSha
    ? `The pull request's base commit ${baseSha.slice(0, 12)} is not in this clone`
    : `The event payload names no base commit for the pull request`;
  return (
    `${what}${detail ? ` (${detail})` : ''}, so the rows the pull request adds could not be told apart: ` +
    'the last observations of each series were checked instead (check.last). ' +
    'To check exactly the new rows, fetch the history: `actions/checkout` with `fetch-depth: 0`.'
  );
}

/** Number of lines in a file's bytes: newlines, plus one for a last line without a newline. */
export function countLines(bytes: Buffer): number {
  let n = 0;
  for (let i = bytes.indexOf(10); i !== -1; i = bytes.indexOf(10, i + 1)) n++;
  if (bytes.length > 0 && bytes[bytes.length - 1] !== 10) n++;
  return n;
}

/**
 * Parses `git cat-file --batch` output into one entry per request (object ids, one per line): the
 * object's bytes, or null when git reports it missing (or ambiguous).
 */
export function parseBatch(out: Buffer, requests: number): (Buffer | null)[] {
  const res: (Buffer | null)[] = [];
  let at = 0;
  while (res.length < requests && at < out.length) {
    const eol = out.indexOf(10, at);
    if (eol === -1) break;
    const header = out.subarray(at, eol).toString('utf8');
    at = eol + 1;
    const m = /^[0-9a-f]+ (\S+) (\d+)$/.exec(header);
    if (!m) {
      // "<name> missing" / "<name> ambiguous": no content follows.
      res.push(null);
      continue;
    }
    const size = Number(m[2]);
    res.push(m[1] === 'blob' ? out.subarray(at, at + size) : null);
    at += size + 1; // content, then a newline
  }
  while (res.length < requests) res.push(null);
  return res;
}

function firstLine(s: string): string {
  return s.trim().split('\n')[0] ?? '';
}

/**
 * For a pull request: each file changed between `baseSha` and HEAD under `cwd` (paths relative to
 * it), with its line count at the base. A file the pull request adds gets its HEAD line count less
 * one, so only its last row is checked (it has no earlier version to compare with).
 */
export async function compareWithBase(
  git: GitRunner,
  cwd: string,
  baseSha: string | null,
): Promise<BaseComparison> {
  if (!baseSha) return { ok: false, note: missingBaseNote(null) };
  const exists = await git.run(['cat-file', '-e', `${baseSha}^{commit}`], { cwd });
  if (exists.code === -1)
    return { ok: false, note: missingBaseNote(baseSha, `git is not available: ${exists.stderr}`) };
  if (exists.code !== 0 && /not a git repository/i.test(exists.stderr))
    return {
      ok: false,
      note: missingBaseNote(
        baseSha,
        'the working directory is not a git checkout: run actions/checkout first',
      ),
    };
  if (exists.code !== 0) return { ok: false, note: missingBaseNote(baseSha) };

  // Three dots compare with the merge base (what the pull request changed); with a shallow history
  // the merge base may be out of reach, so fall back to the two commits themselves.
  const diffArgs = (range: string[]) => [
    '-c',
    'core.quotepath=off',
    'diff',
    '--name-status',
    '-z',
    '--no-renames',
    '--diff-filter=AM',
    '--relative',
    ...range,
    '--',
  ];
  let diff = await git.run(diffArgs([`${baseSha}...HEAD`]), { cwd });
  if (diff.code !== 0) diff = await git.run(diffArgs([baseSha, 'HEAD']), { cwd });
  if (diff.code !== 0)
    return { ok: false, note: missingBaseNote(baseSha, `git diff failed: ${firstLine(diff.stderr)}`) };

  const fields = diff.stdout.toString('utf8').split('\0');
  const changed: { status: string; file: string }[] = [];
  for (let i = 0; i + 1 < fields.length; i += 2) {
    const status = fields[i]!;
    const file = fields[i + 1]!;
    if (status && file) changed.push({ status: status[0]!, file });
  }
  if (changed.length === 0) return { ok: true, newRows: {}, added: [] };

  // Object ids come from NUL-delimited tree listings, so no file name (not even one holding a
  // newline) is ever written to a line-based git request; then one git process reads every blob,
  // asked for by id alone.
  const baseIds = await treeIds(git, cwd, baseSha);
  const headIds = changed.some((c) => c.status === 'A') ? await treeIds(git, cwd, 'HEAD') : new Map();
  if (baseIds === null || headIds === null)
    return { ok: false, note: missingBaseNote(baseSha, 'git ls-tree failed') };
  const ids = changed.map((c) => (c.status === 'A' ? headIds : baseIds).get(c.file) ?? null);
  const requests = ids.filter((id): id is string => id !== null);
  const batch =
    requests.length === 0
      ? { code: 0, stdout: Buffer.alloc(0), stderr: '' }
      : await git.run(['cat-file', '--batch'], { cwd, input: requests.join('\n') + '\n' });
  if (batch.code !== 0)
    return { ok: false, note: missingBaseNote(baseSha, `git cat-file failed: ${firstLine(batch.stderr)}`) };
  const blobs = parseBatch(batch.stdout, requests.length);

  const newRows: Record<string, number> = {};
  const added: string[] = [];
  let next = 0;
  changed.forEach((c, i) => {
    if (ids[i] === null) return;
    const blob = blobs[next++];
    if (!blob) return;
    const key = c.file.split('\\').join('/');
    if (c.status === 'A') {
      added.push(key);
      newRows[key] = Math.max(0, countLines(blob) - 1);
    } else newRows[key] = countLines(blob);
  });
  return { ok: true, newRows, added };
}

/**
 * Every file under `cwd` in commit `rev` (paths relative to cwd, as `git diff --relative` gives them)
 * -> its blob id, from `git ls-tree -r -z`: NUL-delimited, so file names are taken byte for byte.
 * Null when git fails.
 */
export async function treeIds(git: GitRunner, cwd: string, rev: string): Promise<Map<string, string> | null> {
  const r = await git.run(['-c', 'core.quotepath=off', 'ls-tree', '-r', '-z', rev, '--', '.'], { cwd });
  if (r.code !== 0) return null;
  const ids = new Map<string, string>();
  for (const entry of r.stdout.toString('utf8').split('\0')) {
    const tab = entry.indexOf('\t');
    if (tab < 0) continue;
    const [, type, id] = entry.slice(0, tab).split(' ');
    if (type === 'blob' && id) ids.set(entry.slice(tab + 1), id);
  }
  return ids;
}

/**
 * Whether `file` (absolute) is tracked by git in `workspace`: the Action writes only its own files,
 * never the repository's. Anything short of a clear "yes" (not a repository, no git) is "no".
 */
export async function isTracked(git: GitRunner, workspace: string, file: string): Promise<boolean> {
  const r = await git.run(['ls-files', '--error-unmatch', '--', file], { cwd: workspace });
  return r.code === 0;
}

/** The commit checked out in `cwd` (full hex), or null outside a git work tree. */
export async function headCommit(git: GitRunner, cwd: string): Promise<string | null> {
  const r = await git.run(['rev-parse', '--verify', '--quiet', 'HEAD^{commit}'], { cwd });
  const sha = r.stdout.toString('utf8').trim();
  return r.code === 0 && /^[0-9a-f]{40,64}$/.test(sha) ? sha : null;
}
