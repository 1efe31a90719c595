import { readFileSync } from 'node:fs';
import { configDefaults, defineConfig } from 'vitest/config';
import { hbsModule } from './scripts/hbs-module.mjs';
import { browserPlan } from './test/chromium.js';

const pkg = JSON.parse(readFileSync(new URL('./package.json', import.meta.url), 'utf8')) as {
  version: string;
};

// Chromium for the browser tests, found once per run; without one those files are left out and the
// run ends with one line saying how to bring them back (an error under LEADLINE_REQUIRE_BROWSER=1).
const browser = (() => {
  try {
    return browserPlan(new URL('./test', import.meta.url).pathname);
  } catch (e) {
    console.error((e as Error).message);
    process.exit(1);
  }
})();
if (browser.chromium) process.env.LEADLINE_CHROMIUM = browser.chromium;

export default defineConfig({
  define: { __LEADLINE_VERSION__: JSON.stringify(pkg.version) },
  plugins: [
    {
      // As in the bundles: a .hbs import is its text and its compiled template (scripts/hbs-module.mjs).
      name: 'leadline-hbs',
      transform(code, id) {
        if (id.endsWith('.hbs')) return { code: hbsModule(code), map: null };
        return null;
      },
    },
  ],
  test: {
    include: ['test/**/*.test.ts'],
    exclude: [...configDefaults.exclude, ...browser.skip],
    reporters: [
      'default',
      {
        onTestRunEnd() {
          if (browser.notice) console.log(`\n${browser.notice}`);
        },
      },
    ],
    testTimeout: 60_000,
    hookTimeout: 60_000,
    pool: 'forks',
  },
});
