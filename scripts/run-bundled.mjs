// Runs a TypeScript script as one esbuild bundle, built the way scripts/bundle.mjs builds the shipped
// ones: benchmarks then measure the code as it ships (no TypeScript compiled on the fly), and the
// analysis worker threads load that same bundle. Usage: node scripts/run-bundled.mjs SCRIPT.ts [ARGS]
import { build } from 'esbuild';
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { common, requireShim } from './esbuild-options.mjs';

const [script, ...args] = process.argv.slice(2);
if (!script) throw new Error('usage: node scripts/run-bundled.mjs SCRIPT.ts [ARGS]');
const dir = mkdtempSync(path.join(os.tmpdir(), 'leadline-run-'));
const outfile = path.join(dir, path.basename(script).replace(/\.ts$/, '.mjs'));
await build({ ...common, entryPoints: [script], outfile, banner: { js: requireShim }, metafile: false });
process.argv = [process.argv[0], outfile, ...args];
process.on('exit', () => rmSync(dir, { recursive: true, force: true }));
await import(pathToFileURL(outfile).href);
