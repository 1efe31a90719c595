// The esbuild options every Leadline bundle is built with: the shipped ones (scripts/bundle.mjs) and
// the benchmarks run as bundles (scripts/run-bundled.mjs), so both measure and ship the same code.
import { readFileSync } from 'node:fs';
import path from 'node:path';

export const root = path.resolve(import.meta.dirname, '..');
export const pkg = JSON.parse(readFileSync(path.join(root, 'package.json'), 'utf8'));

// Some bundled CommonJS dependencies call require() for Node built-ins; give ESM output one.
export const requireShim =
  "import { createRequire as __leadlineCreateRequire } from 'node:module';\nconst require = __leadlineCreateRequire(import.meta.url);";

export const common = {
  absWorkingDir: root,
  bundle: true,
  platform: 'node',
  format: 'esm',
  target: 'node20',
  loader: { '.hbs': 'text' },
  define: { __LEADLINE_VERSION__: JSON.stringify(pkg.version) },
  legalComments: 'none',
  logLevel: 'warning',
  metafile: true,
};
