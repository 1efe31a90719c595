// The esbuild options every Leadline bundle is built with: the shipped ones (scripts/bundle.mjs) and
// the benchmarks run as bundles (scripts/run-bundled.mjs), so both measure and ship the same code.
import { readFileSync } from 'node:fs';
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { hbsModule } from './hbs-module.mjs';

export const root = path.resolve(import.meta.dirname, '..');
export const pkg = JSON.parse(readFileSync(path.join(root, 'package.json'), 'utf8'));

// Some bundled CommonJS dependencies call require() for Node built-ins; give ESM output one.
export const requireShim =
  "import { createRequire as __leadlineCreateRequire } from 'node:module';\nconst require = __leadlineCreateRequire(import.meta.url);";

/**
 * @actions/core imports @actions/http-client, and with it undici (the largest package bundled, with
 * much work at load), only for its OIDC token client, which Leadline never calls. The package does
 * not declare itself free of side effects; declared so here, it is bundled only where something of
 * it is used (@actions/github, in the publishing chunk), and a run that publishes nothing never
 * loads it.
 */
const httpClientOnlyWhereUsed = {
  name: 'leadline-http-client-only-where-used',
  setup(b) {
    b.onResolve({ filter: /^@actions\/http-client(\/|$)/ }, async (args) => {
      if (args.pluginData === httpClientOnlyWhereUsed) return undefined;
      const { path, resolveDir, importer, kind } = args;
      const r = await b.resolve(path, { resolveDir, importer, kind, pluginData: httpClientOnlyWhereUsed });
      return r.errors.length > 0 ? { errors: r.errors } : { path: r.path, sideEffects: false };
    });
  },
};

/**
 * Handlebars' code generator uses the source-map package when it finds it, to make source maps of
 * compiled templates (asked for with the `srcName` option, which Leadline never gives), and its own
 * small string builder otherwise. Given an empty module instead, it builds the same template code
 * without the 63 KB of source-map to load, and each template compiles faster.
 */
const noSourceMapForHandlebars = {
  name: 'leadline-no-source-map-for-handlebars',
  setup(b) {
    b.onResolve({ filter: /^source-map$/ }, (args) =>
      /node_modules\/handlebars\//.test(args.importer)
        ? { path: 'source-map', namespace: 'leadline-empty' }
        : undefined,
    );
    b.onLoad({ filter: /.*/, namespace: 'leadline-empty' }, () => ({
      contents: 'module.exports = {};',
      loader: 'js',
    }));
  },
};

/** A .hbs import: the template's text and the template compiled ahead (scripts/hbs-module.mjs). */
const handlebarsTemplates = {
  name: 'leadline-hbs',
  setup(b) {
    b.onLoad({ filter: /\.hbs$/ }, async (args) => ({
      contents: hbsModule(await readFile(args.path, 'utf8')),
      loader: 'js',
    }));
  },
};

export const common = {
  absWorkingDir: root,
  bundle: true,
  platform: 'node',
  format: 'esm',
  target: 'node20',
  define: { __LEADLINE_VERSION__: JSON.stringify(pkg.version) },
  legalComments: 'none',
  logLevel: 'warning',
  metafile: true,
  plugins: [handlebarsTemplates, httpClientOnlyWhereUsed, noSourceMapForHandlebars],
};
