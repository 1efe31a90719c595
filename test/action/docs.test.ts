import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { END, START, actionTables, currentTables, withTables } from '../../scripts/action-docs.js';

const actionYml = readFileSync(new URL('../../action.yml', import.meta.url), 'utf8');
const readme = readFileSync(new URL('../../README.md', import.meta.url), 'utf8');

describe('action.yml', () => {
  it('runs the committed bundle on node24 and declares every input and output the code uses', () => {
    const a = parse(actionYml) as {
      runs: { using: string; main: string };
      inputs: Record<string, { description: string; default?: string }>;
      outputs: Record<string, { description: string }>;
      branding: { icon: string; color: string };
    };
    expect(a.runs).toEqual({ using: 'node24', main: 'dist/index.js' });
    expect(Object.keys(a.outputs).sort()).toEqual(['alarms', 'at-risk', 'comment-url', 'results', 'verdict']);
    expect(a.inputs.token?.default).toBe('${{ github.token }}');
    for (const [name, i] of Object.entries(a.inputs)) expect(i.description.length, name).toBeGreaterThan(20);
  });
});

describe('README inputs and outputs tables', () => {
  it('match action.yml (regenerate with: node --import tsx scripts/action-docs.ts)', () => {
    expect(currentTables(readme), 'README.md lacks the action-inputs markers').not.toBeNull();
    expect(currentTables(readme)).toBe(actionTables(actionYml));
  });

  it('list every input and output, pipes escaped', () => {
    const t = actionTables(actionYml);
    const a = parse(actionYml) as { inputs: object; outputs: object };
    for (const k of [...Object.keys(a.inputs), ...Object.keys(a.outputs)]) expect(t).toContain(`| \`${k}\``);
    expect(actionTables('inputs:\n  x:\n    description: "a | b"\n')).toContain('a \\| b');
  });

  it('are written between the markers only, and missing markers are a clear error', () => {
    const doc = `# T\n\n${START}\nold\n${END}\n\nrest\n`;
    expect(withTables(doc, 'NEW')).toBe(`# T\n\n${START}\nNEW\n${END}\n\nrest\n`);
    expect(() => withTables('# no markers', 'x')).toThrow(/README\.md needs the markers/);
  });
});
