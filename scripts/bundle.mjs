// Builds the two committed bundles: dist/index.js (the Action) and dist/cli.js (the command).
// ESM because @actions/core 3 and @actions/github 9 are ESM-only; target node20 so the same
// bundle runs on this machine's Node 20 and on the runner's node24.
import { build } from 'esbuild';
import { readFileSync } from 'node:fs';

const pkg = JSON.parse(readFileSync(new URL('../package.json', import.meta.url), 'utf8'));

// Some bundled CommonJS dependencies call require() for Node built-ins; give ESM output one.
const requireShim =
  "import { createRequire as __leadlineCreateRequire } from 'node:module';\nconst require = __leadlineCreateRequire(import.meta.url);";

const common = {
  bundle: true,
  platform: 'node',
  format: 'esm',
  target: 'node20',
  loader: { '.hbs': 'text' },
  define: { __LEADLINE_VERSION__: JSON.stringify(pkg.version) },
  legalComments: 'none',
  logLevel: 'warning',
};

await build({
  ...common,
  entryPoints: ['src/action/index.ts'],
  outfile: 'dist/index.js',
  banner: { js: requireShim },
});
await build({
  ...common,
  entryPoints: ['src/cli/index.ts'],
  outfile: 'dist/cli.js',
  banner: { js: '#!/usr/bin/env node\n' + requireShim },
});
