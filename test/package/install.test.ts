// The README's install lines, run as they stand in a shell from the repository root, with npm's
// global prefix pointed at a temporary folder: `npm pack` of the committed dist/, a global install
// of the tarball, `leadline --version` and the demo from the installed command.
import { execFileSync, spawnSync } from 'node:child_process';
import {
  existsSync,
  mkdtempSync,
  readdirSync,
  readFileSync,
  readlinkSync,
  renameSync,
  rmSync,
  statSync,
} from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { codeBlocks } from './readme.js';

const root = path.resolve(import.meta.dirname, '..', '..');
const pkg = JSON.parse(readFileSync(path.join(root, 'package.json'), 'utf8')) as {
  name: string;
  version: string;
  files: string[];
  dependencies?: Record<string, string>;
};
const tarball = path.join(root, `${pkg.name}-${pkg.version}.tgz`);
const prefix = mkdtempSync(path.join(tmpdir(), 'leadline-install-'));
const installed = path.join(prefix, 'lib', 'node_modules', pkg.name);
const aside = path.join(prefix, 'earlier.tgz');

/** The shell block under the README's "Installing the command" heading. */
const installBlock = codeBlocks().find((b) => b.heading === 'Installing the command' && b.lang === 'sh');

let run: { status: number | null; stdout: string; stderr: string };

beforeAll(() => {
  // A tarball the developer packed earlier (as the README says) is set aside and put back after.
  if (existsSync(tarball)) renameSync(tarball, aside);
  const env: NodeJS.ProcessEnv = { ...process.env, npm_config_prefix: prefix };
  // npm run sets these for its child; they would override the prefix above.
  for (const k of Object.keys(env)) if (/^npm_config_(global_prefix|local_prefix)$/i.test(k)) delete env[k];
  env.PATH = `${path.join(prefix, 'bin')}${path.delimiter}${process.env.PATH}`;
  const r = spawnSync('bash', ['-euo', 'pipefail', '-c', installBlock!.code], {
    cwd: root,
    env,
    encoding: 'utf8',
    timeout: 120_000,
  });
  run = { status: r.status, stdout: r.stdout, stderr: r.stderr };
}, 150_000);

afterAll(() => {
  rmSync(tarball, { force: true });
  if (existsSync(aside)) renameSync(aside, tarball);
  rmSync(prefix, { recursive: true, force: true });
});

describe("the README's install lines", () => {
  it('are there: a global install of the packed tarball, the version, the demo', () => {
    expect(installBlock).toBeDefined();
    const lines = installBlock!.code.trim().split('\n');
    expect(lines[0]).toBe('npm install --global "$(npm pack --silent)"');
    expect(lines.slice(1).every((l) => l.startsWith('leadline '))).toBe(true);
  });

  it('run as written and print the version, then the demo verdicts', () => {
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toContain(`leadline ${pkg.version}\n`);
    expect(run.stdout).toMatch(/^Leadline: out of line — \d+ series/m);
    expect(run.stdout).toContain('Forecasts are estimates with stated uncertainty, not guarantees.');
  });

  it('install the command into the prefix as an executable link to the bundle', () => {
    const bin = path.join(prefix, 'bin', 'leadline');
    expect(path.resolve(path.dirname(bin), readlinkSync(bin))).toBe(path.join(installed, 'dist', 'cli.js'));
    expect(statSync(bin).mode & 0o111).not.toBe(0);
    // The installed command alone, outside the repository: the bundle needs nothing beside it.
    const out = execFileSync(bin, ['--version'], { cwd: prefix, encoding: 'utf8' });
    expect(out.trim()).toBe(`leadline ${pkg.version}`);
  });

  it('leave `npx leadline` in the clone working: the committed bundle is executable', () => {
    expect(statSync(path.join(root, 'dist', 'cli.js')).mode & 0o111).not.toBe(0);
    const out = execFileSync('npx', ['--no-install', 'leadline', '--version'], {
      cwd: root,
      encoding: 'utf8',
    });
    expect(out.trim()).toBe(`leadline ${pkg.version}`);
  });

  it('ship only the files list and pull in no dependencies', () => {
    expect(pkg.dependencies ?? {}).toEqual({});
    expect(existsSync(path.join(installed, 'node_modules'))).toBe(false);
    const shipped = walk(installed).sort();
    expect(shipped).toEqual(
      [
        'LICENSE',
        'README.md',
        'action.yml',
        'dist/cli.js',
        'dist/index.js',
        ...readdirSync(path.join(root, 'dist', 'chunks')).map((f) => `dist/chunks/${f}`),
        'dist/licenses.txt',
        ...readdirSync(root).filter((f) => f.endsWith('.schema.json')),
        'package.json',
      ].sort(),
    );
  });
});

function walk(dir: string, base = ''): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) =>
    e.isDirectory() ? walk(path.join(dir, e.name), `${base}${e.name}/`) : [`${base}${e.name}`],
  );
}
