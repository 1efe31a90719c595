// Writing Leadline's own output files. Whole or not at all: a temporary file in the same folder,
// then a rename, so a failed run never leaves half a report. Inputs are never written.
import { mkdir, open, rename, rm, writeFile } from 'node:fs/promises';
import { realpathSync } from 'node:fs';
import path from 'node:path';
import { LeadlineError } from './errors.js';
import type { Results } from './results.js';

/** Resolves a path and follows symlinks as far as they exist (the file itself may not exist yet). */
function canonical(p: string): string {
  const abs = path.resolve(p);
  try {
    return realpathSync(abs);
  } catch {
    try {
      return path.join(realpathSync(path.dirname(abs)), path.basename(abs));
    } catch {
      return abs;
    }
  }
}

/**
 * Writes `text` to `target` atomically. Refuses when `target` is one of `inputs` (the config and the
 * metric CSVs, absolute paths), so a mistyped flag cannot overwrite the data.
 */
export async function writeOutput(
  target: string,
  text: string | Iterable<string>,
  inputs: string[],
  label: string,
): Promise<string> {
  const abs = path.resolve(target);
  const real = canonical(abs);
  if (inputs.some((i) => canonical(i) === real)) {
    throw new LeadlineError(
      'usage',
      `${label}: refusing to write to ${target}: it is one of Leadline's inputs.`,
    );
  }
  await mkdir(path.dirname(abs), { recursive: true });
  const tmp = `${abs}.${process.pid}.${Date.now()}.tmp`;
  try {
    if (typeof text === 'string') await writeFile(tmp, text, 'utf8');
    else {
      const handle = await open(tmp, 'w');
      try {
        for (const piece of text) await handle.write(piece);
      } finally {
        await handle.close();
      }
    }
    await rename(tmp, abs);
  } catch (e) {
    await rm(tmp, { force: true });
    throw new LeadlineError('usage', `${label}: cannot write ${target}: ${(e as Error).message}`);
  }
  return abs;
}

/** The files a run read: the config and every distinct metric file (absolute paths). */
export function inputFiles(cwd: string, results: Results | null, configPath: string): string[] {
  const files = new Set<string>([path.resolve(cwd, configPath)]);
  for (const s of results?.series ?? []) files.add(path.resolve(cwd, s.file));
  return [...files];
}

/**
 * The results JSON, in pieces: the run's fields pretty-printed, then one series per line inside the
 * `series` array. Parses to exactly the same value as JSON.stringify(results). Built piece by piece
 * so that a fleet of thousands of series never needs one giant string (V8 caps a string at about
 * 512 MiB), and a diff of two runs stays readable line by line.
 */
export function* resultsJson(results: Results): Generator<string> {
  const { series, ...head } = results;
  const start = JSON.stringify(head, null, 2);
  yield start.slice(0, start.length - 2) + ',\n  "series": [';
  for (let i = 0; i < series.length; i++) yield (i === 0 ? '\n    ' : ',\n    ') + JSON.stringify(series[i]);
  yield series.length > 0 ? '\n  ]\n}\n' : ']\n}\n';
}
