import { readFileSync } from 'node:fs';
import { defineConfig } from 'vitest/config';

const pkg = JSON.parse(readFileSync(new URL('./package.json', import.meta.url), 'utf8')) as {
  version: string;
};

export default defineConfig({
  define: { __LEADLINE_VERSION__: JSON.stringify(pkg.version) },
  plugins: [
    {
      // Same as esbuild's 'text' loader in scripts/bundle.mjs: a .hbs import is its text.
      name: 'leadline-hbs-text',
      transform(code, id) {
        if (id.endsWith('.hbs')) return { code: `export default ${JSON.stringify(code)};`, map: null };
        return null;
      },
    },
  ],
  test: {
    include: ['test/**/*.test.ts'],
    testTimeout: 60_000,
    hookTimeout: 60_000,
    pool: 'forks',
  },
});
