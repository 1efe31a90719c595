// Leadline's configuration: YAML (default .github/leadline.yml) validated against the schema in
// schema.ts, defaults applied, resolved into a Plan with one entry per metric.
import { createHash } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { LeadlineError } from '../errors.js';
import type { Plan } from './types.js';
import { parsePlan } from './parse.js';

export { DEFAULTS, DEFAULT_RISK, defaultMinTrain } from './defaults.js';
export { durationToSteps, parseDuration } from './duration.js';
export { adoptDefaults, backtestFor, defaultsOf, parsePlan } from './parse.js';
export { jsonSchema } from './schema.js';

export const DEFAULT_CONFIG_PATH = '.github/leadline.yml';

/** Largest config file read (a config is a few kilobytes; this guards against pointing at data). */
const MAX_CONFIG_BYTES = 4 * 1024 * 1024;

/**
 * Reads and parses the config at `configPath` (relative to `cwd`, or absolute). Messages name the
 * path as given. A missing or unreadable file is a LeadlineError('config') naming it; so is a metric
 * file given as an absolute path outside `cwd`.
 */
export async function loadPlan(configPath: string, cwd: string): Promise<Plan> {
  const abs = path.resolve(cwd, configPath);
  const rel = path.relative(path.resolve(cwd), abs);
  const shown = (rel && !rel.startsWith('..') && !path.isAbsolute(rel) ? rel : abs).split(path.sep).join('/');
  let text: string;
  try {
    const buf = await readFile(abs);
    if (buf.length > MAX_CONFIG_BYTES) {
      throw new LeadlineError(
        'config',
        `The config file is ${buf.length} bytes; a Leadline config is expected to be far smaller.`,
        { file: shown },
      );
    }
    text = buf.toString('utf8');
  } catch (e) {
    if (e instanceof LeadlineError) throw e;
    const code = (e as NodeJS.ErrnoException).code;
    const why =
      code === 'ENOENT'
        ? `The config file ${shown} does not exist (looked in ${path.resolve(cwd)}). Create it, or pass the path of yours.`
        : code === 'EISDIR'
          ? `The config path ${shown} is a directory, not a file.`
          : `The config file ${shown} cannot be read: ${(e as Error).message}`;
    throw new LeadlineError('config', why, { file: shown });
  }
  const plan = parsePlan(text, shown);
  const root = path.resolve(cwd);
  for (const m of plan.metrics) {
    if (!path.isAbsolute(m.file)) continue;
    const r = path.relative(root, path.resolve(m.file));
    if (r.startsWith('..') || path.isAbsolute(r)) {
      throw new LeadlineError(
        'config',
        `"${m.file}" is outside the working directory (${root}); metric files must be inside it.`,
        {
          file: shown,
          line: m.line,
          keyPath: `${m.keyPath}.file`,
        },
      );
    }
  }
  return plan;
}

/** "sha256:<hex>" of a file's bytes (the config, recorded in the results' origin), or null when it cannot be read. */
export async function fileHash(file: string): Promise<string | null> {
  try {
    return `sha256:${createHash('sha256')
      .update(await readFile(file))
      .digest('hex')}`;
  } catch {
    return null;
  }
}
