// The documents a reader of the repository follows lead somewhere: every relative link in README.md,
// DEVELOPERS.md and docs/ names a file that exists, and a #section in a markdown file names one of
// its headings (GitHub's anchors: lower case, punctuation dropped, spaces to hyphens).
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

const root = path.resolve(import.meta.dirname, '..', '..');
const docs = [
  'README.md',
  'DEVELOPERS.md',
  ...readdirSync(path.join(root, 'docs')).map((f) => `docs/${f}`),
].filter((f) => f.endsWith('.md'));

/** GitHub's anchor for a heading (common practice, as GitHub renders them). */
function anchor(heading: string): string {
  return heading
    .trim()
    .toLowerCase()
    .replace(/[`*_]/g, '')
    .replace(/[^\p{L}\p{N}\s-]/gu, '')
    .replace(/\s/g, '-');
}

function anchorsOf(file: string): Set<string> {
  const text = readFileSync(path.join(root, file), 'utf8').replace(/^```[\s\S]*?^```/gm, '');
  return new Set([...text.matchAll(/^#{1,6}\s+(.+)$/gm)].map((m) => anchor(m[1]!)));
}

/** Relative links outside code blocks and inline code: [text](target). */
function linksOf(file: string): string[] {
  const text = readFileSync(path.join(root, file), 'utf8')
    .replace(/^```[\s\S]*?^```/gm, '')
    .replace(/`[^`\n]*`/g, '');
  return [...text.matchAll(/\]\(([^)\s]+)\)/g)].map((m) => m[1]!).filter((t) => !/^[a-z]+:/i.test(t));
}

describe('links between the documents', () => {
  it('GitHub anchors, as the checks below compute them', () => {
    expect(anchor('Decisions made so far')).toBe('decisions-made-so-far');
    expect(anchor('Results JSON (version 1, stable; add fields, never rename)')).toBe(
      'results-json-version-1-stable-add-fields-never-rename',
    );
  });

  it.each(docs)('every relative link in %s resolves', (file) => {
    const links = linksOf(file);
    for (const link of links) {
      const [target, hash] = link.split('#') as [string, string | undefined];
      const resolved = target === '' ? file : path.normalize(path.join(path.dirname(file), target));
      expect(existsSync(path.join(root, resolved)), `${file}: ${link}`).toBe(true);
      if (hash && resolved.endsWith('.md'))
        expect([...anchorsOf(resolved)], `${file}: ${link}`).toContain(hash);
    }
  });

  it('DEVELOPERS.md leads to the design map', () => {
    expect(linksOf('DEVELOPERS.md')).toContain('docs/design.md');
  });
});
