// How the browser tests find Chromium, and the run without one: the browser test files are left out
// with one line saying how to enable them, or the run fails when LEADLINE_REQUIRE_BROWSER=1 (CI).
// The no-browser runs point discovery at a path that does not exist; the machine's browser stays.
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { browserPlan, browserTestFiles, CHROMIUM_CANDIDATES, findChromium } from '../chromium.js';

const root = path.resolve(import.meta.dirname, '..', '..');
const testRoot = path.join(root, 'test');
const MISSING = path.join(root, 'no-such-dir', 'chromium');

describe('findChromium', () => {
  it('takes LEADLINE_CHROMIUM as the only place when it is set', () => {
    const seen: string[] = [];
    const r = findChromium(
      { LEADLINE_CHROMIUM: '/opt/c/chrome', PATH: '/usr/bin' },
      (f) => (seen.push(f), false),
    );
    expect(r).toEqual({ found: null, tried: ['/opt/c/chrome'] });
    expect(seen).toEqual(['/opt/c/chrome']);
    expect(findChromium({ LEADLINE_CHROMIUM: '/opt/c/chrome' }, () => true).found).toBe('/opt/c/chrome');
  });

  it('otherwise tries the well-known paths in order, then the names on PATH', () => {
    const r = findChromium({ PATH: '/a:/b' }, (f) => f === '/b/chromium-browser' || f === '/a/google-chrome');
    expect(r.tried.slice(0, CHROMIUM_CANDIDATES.length)).toEqual(CHROMIUM_CANDIDATES);
    expect(r.found).toBe('/a/google-chrome');
    expect(findChromium({ PATH: '' }, (f) => f === '/usr/bin/google-chrome').found).toBe(
      '/usr/bin/google-chrome',
    );
  });
});

describe('browserPlan', () => {
  it('lists the test files that launch the browser', () => {
    const files = browserTestFiles(testRoot);
    expect(files).toContain('test/report/html.test.ts');
    expect(files).toContain('test/report/mermaid.test.ts');
    expect(files).not.toContain('test/package/browser-discovery.test.ts');
  });

  it('without a browser: leaves those files out, with one line saying how to run them', () => {
    const plan = browserPlan(testRoot, { LEADLINE_CHROMIUM: MISSING });
    expect(plan.chromium).toBeNull();
    expect(plan.skip).toEqual(browserTestFiles(testRoot));
    expect(plan.notice).toContain(`LEADLINE_CHROMIUM=${MISSING} is not an executable`);
    expect(plan.notice).toContain('apt-get install -y chromium');
    expect(plan.notice).not.toContain('\n');
  });

  it('without a browser under LEADLINE_REQUIRE_BROWSER=1: an error', () => {
    expect(() =>
      browserPlan(testRoot, { LEADLINE_CHROMIUM: MISSING, LEADLINE_REQUIRE_BROWSER: '1' }),
    ).toThrow(/LEADLINE_REQUIRE_BROWSER=1 and LEADLINE_CHROMIUM=.* is not an executable/);
  });

  it('with a browser: nothing left out', () => {
    expect(browserPlan(testRoot, { LEADLINE_CHROMIUM: '/x/chromium' }, () => true)).toEqual({
      chromium: '/x/chromium',
      skip: [],
      notice: null,
    });
  });
});

describe('a test run without a browser', () => {
  const vitest = (env: NodeJS.ProcessEnv) => {
    const r = spawnSync(
      process.execPath,
      [
        path.join(root, 'node_modules', 'vitest', 'vitest.mjs'),
        'run',
        'test/config/duration.test.ts',
        'test/report/html.test.ts',
      ],
      {
        cwd: root,
        env: { ...process.env, LEADLINE_REQUIRE_BROWSER: '', ...env, LEADLINE_CHROMIUM: MISSING, CI: 'true' },
        encoding: 'utf8',
        timeout: 120_000,
      },
    );
    return { status: r.status, out: r.stdout + r.stderr };
  };

  it('passes, runs the other tests, and says once how to run the browser tests', () => {
    const r = vitest({});
    expect(r.status, r.out).toBe(0);
    expect(r.out).toMatch(/duration\.test\.ts/);
    expect(r.out).not.toMatch(/html\.test\.ts \(/);
    expect(r.out.match(/Browser tests skipped/g)).toHaveLength(1);
  }, 150_000);

  it('fails under LEADLINE_REQUIRE_BROWSER=1, saying why', () => {
    const r = vitest({ LEADLINE_REQUIRE_BROWSER: '1' });
    expect(r.status).not.toBe(0);
    expect(r.out).toContain('LEADLINE_REQUIRE_BROWSER=1 and LEADLINE_CHROMIUM=');
  }, 150_000);
});
