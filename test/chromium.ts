// Where the browser tests find Chromium, and what happens without one. vitest.config.ts asks this
// once per run: with a browser every test runs; without one the test files that launch it are left
// out with one line saying how to bring them back, unless LEADLINE_REQUIRE_BROWSER=1 (CI), which
// makes a missing browser an error.
import { accessSync, constants, readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';

/** Well-known places, tried in order after LEADLINE_CHROMIUM. */
export const CHROMIUM_CANDIDATES = [
  '/usr/bin/chromium',
  '/usr/bin/chromium-browser',
  '/usr/bin/google-chrome-stable',
  '/usr/bin/google-chrome',
];
const PATH_NAMES = ['chromium', 'chromium-browser', 'google-chrome-stable', 'google-chrome'];

function executable(file: string): boolean {
  try {
    accessSync(file, constants.X_OK);
    return true;
  } catch {
    return false;
  }
}

export interface ChromiumSearch {
  /** The browser found, or null. */
  found: string | null;
  /** Every path tried, in order. */
  tried: string[];
}

/**
 * LEADLINE_CHROMIUM, when set, is the only place looked at (so a wrong path is never papered over
 * by another browser); otherwise the well-known paths, then the names on PATH.
 */
export function findChromium(
  env: NodeJS.ProcessEnv = process.env,
  isExecutable = executable,
): ChromiumSearch {
  const chosen = env.LEADLINE_CHROMIUM;
  const tried =
    chosen !== undefined && chosen !== ''
      ? [chosen]
      : [
          ...CHROMIUM_CANDIDATES,
          ...(env.PATH ?? '')
            .split(path.delimiter)
            .filter(Boolean)
            .flatMap((dir) => PATH_NAMES.map((n) => path.join(dir, n))),
        ];
  const unique = [...new Set(tried)];
  return { found: unique.find((f) => isExecutable(f)) ?? null, tried: unique };
}

/** Test files that launch the browser: those importing the launcher in test/report/browser.ts. */
export function browserTestFiles(testRoot: string): string[] {
  const files: string[] = [];
  const walk = (dir: string): void => {
    for (const e of readdirSync(dir, { withFileTypes: true })) {
      const p = path.join(dir, e.name);
      if (e.isDirectory()) walk(p);
      else if (
        e.name.endsWith('.test.ts') &&
        /from ['"](\.\.?\/)+(report\/)?browser\.js['"]/.test(readFileSync(p, 'utf8'))
      )
        files.push(path.relative(path.dirname(testRoot), p).split(path.sep).join('/'));
    }
  };
  walk(testRoot);
  return files.sort();
}

export interface BrowserPlan {
  chromium: string | null;
  /** Test files to leave out (empty when a browser was found). */
  skip: string[];
  /** The one line to print when tests are left out. */
  notice: string | null;
}

/** What this run does about the browser tests; throws when a browser is required and missing. */
export function browserPlan(
  testRoot: string,
  env: NodeJS.ProcessEnv = process.env,
  isExecutable = executable,
): BrowserPlan {
  const { found } = findChromium(env, isExecutable);
  if (found) return { chromium: found, skip: [], notice: null };
  const where = env.LEADLINE_CHROMIUM
    ? `LEADLINE_CHROMIUM=${env.LEADLINE_CHROMIUM} is not an executable`
    : `no Chromium at ${CHROMIUM_CANDIDATES.join(', ')} or on PATH`;
  if (env.LEADLINE_REQUIRE_BROWSER === '1')
    throw new Error(
      `LEADLINE_REQUIRE_BROWSER=1 and ${where}. Install Chromium (Debian: apt-get install -y chromium) or set LEADLINE_CHROMIUM to its path.`,
    );
  const skip = browserTestFiles(testRoot);
  return {
    chromium: null,
    skip,
    notice: `Browser tests skipped (${skip.length} files: ${skip.join(', ')}): ${where}. To run them, install Chromium (Debian: apt-get install -y chromium) or set LEADLINE_CHROMIUM=/path/to/chromium.`,
  };
}
