// dist/licenses.txt covers what the committed bundles contain. The bundles name each source file
// they include in a `// node_modules/...` comment (esbuild, unminified); every package found that
// way must have an entry with a licence name and a licence text. scripts/bundle.mjs writes the file
// from esbuild's metafile; this reads the bundles themselves, a second and independent source. A
// bundle is its entry file and every chunk it loads (dist/chunks/, by import or dynamic import()).
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

const root = path.resolve(import.meta.dirname, '..', '..');
const read = (f: string) => readFileSync(path.join(root, f), 'utf8');

interface Entry {
  id: string;
  licence: string;
  bundles: string[];
  text: string;
}

function entries(): Entry[] {
  const parts = read('dist/licenses.txt')
    .split(/^-{80}$/m)
    .slice(1);
  return parts.map((p) => {
    const m = /^\nPackage: (\S+)\nLicence: (.+)\nIn: (.+)\n\n([\s\S]*)$/.exec(p);
    if (!m) throw new Error(`dist/licenses.txt: an entry is not in the expected shape:\n${p.slice(0, 200)}`);
    return { id: m[1]!, licence: m[2]!, bundles: m[3]!.split(', '), text: m[4]!.trim() };
  });
}

/** The entry file and every chunk it loads, transitively, read from their import statements. */
function bundleFiles(entry: string): string[] {
  const files = [entry];
  for (const f of files)
    for (const [, a, b, c] of read(f).matchAll(
      /^(?:import|export)\b[^;]*?\bfrom "(\.\/[^"]+)";$|^import "(\.\/[^"]+)";$|\bimport\("(\.\/[^"]+)"\)/gm,
    )) {
      const rel = a ?? b ?? c;
      const file = path.posix.join(path.posix.dirname(f), rel!);
      if (!files.includes(file)) files.push(file);
    }
  return files;
}

/** package@version of every node_modules package a bundle names in its source comments. */
function bundledPackages(bundle: string): Set<string> {
  const found = new Set<string>();
  const text = bundleFiles(bundle).map(read).join('\n');
  for (const [, file] of text.matchAll(/^\/\/ (\S*node_modules\/\S+)$/gm)) {
    const i = file!.lastIndexOf('node_modules/');
    const [a, b] = file!.slice(i + 'node_modules/'.length).split('/');
    const dir = file!.slice(0, i) + 'node_modules/' + (a!.startsWith('@') ? `${a}/${b}` : a);
    const manifest = JSON.parse(read(path.join(dir, 'package.json'))) as { name: string; version: string };
    found.add(`${manifest.name}@${manifest.version}`);
  }
  return found;
}

describe('dist/licenses.txt', () => {
  const list = entries();
  const byId = new Map(list.map((e) => [e.id, e]));

  it('has one entry per package, each with a licence name and its text', () => {
    expect(list.length).toBeGreaterThan(10);
    expect(byId.size).toBe(list.length);
    for (const e of list) {
      expect(e.licence, e.id).not.toMatch(/^\s*$|not declared \(see/);
      expect(e.text.length, e.id).toBeGreaterThan(200);
      expect(e.text, e.id).toMatch(/copyright|licen[cs]e|permission/i);
    }
  });

  it.each(['index.js', 'cli.js'])('lists every package bundled into dist/%s, and no other', (bundle) => {
    const bundled = bundledPackages(`dist/${bundle}`);
    expect(bundled.size).toBeGreaterThan(5);
    const listed = list.filter((e) => e.bundles.includes(bundle)).map((e) => e.id);
    expect([...bundled].sort()).toEqual(listed.sort());
  });

  it('covers every file in dist/chunks/: each is loaded by a bundle', () => {
    const loaded = new Set([...bundleFiles('dist/index.js'), ...bundleFiles('dist/cli.js')]);
    const chunks = readdirSync(path.join(root, 'dist', 'chunks')).map((f) => `dist/chunks/${f}`);
    expect(chunks.length).toBeGreaterThan(0);
    expect(chunks.filter((f) => !loaded.has(f))).toEqual([]);
  });

  it('says how many packages it lists', () => {
    expect(read('dist/licenses.txt')).toContain(`\n${list.length} packages.`);
  });
});

describe('LICENSE', () => {
  it("is Leadline's MIT licence, as package.json declares", () => {
    const pkg = JSON.parse(read('package.json')) as { license: string };
    expect(pkg.license).toBe('MIT');
    expect(read('LICENSE')).toMatch(/^MIT License\n\nCopyright \(c\) \d{4} Leadline contributors\n/);
  });
});
