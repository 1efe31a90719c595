// Writes the Action's inputs and outputs tables, generated from action.yml, into README.md between
// the markers below, so the documentation cannot drift from the contract.
//   node --import tsx scripts/action-docs.ts          update README.md
//   node --import tsx scripts/action-docs.ts --check  exit 1 when README.md is stale
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { parse } from 'yaml';

export const START = '<!-- leadline:action-inputs:start -->';
export const END = '<!-- leadline:action-inputs:end -->';

interface ActionYml {
  inputs?: Record<string, { description?: string; default?: unknown; required?: boolean }>;
  outputs?: Record<string, { description?: string }>;
}

function cell(s: string): string {
  return s.replace(/\s+/g, ' ').trim().replace(/\|/g, '\\|');
}

function code(s: string): string {
  // A default containing a backtick needs a longer fence.
  return s.includes('`') ? `\`\` ${s} \`\`` : `\`${s}\``;
}

/** The markdown between the markers: an inputs table and an outputs table. */
export function actionTables(actionYml: string): string {
  const doc = parse(actionYml) as ActionYml;
  const lines: string[] = [];
  lines.push('| Input | What it does | Default |', '|---|---|---|');
  for (const [name, i] of Object.entries(doc.inputs ?? {})) {
    const def = i.default === undefined || i.default === '' ? '—' : code(String(i.default));
    lines.push(`| \`${name}\`${i.required ? ' (required)' : ''} | ${cell(i.description ?? '')} | ${def} |`);
  }
  lines.push('', '| Output | What it holds |', '|---|---|');
  for (const [name, o] of Object.entries(doc.outputs ?? {}))
    lines.push(`| \`${name}\` | ${cell(o.description ?? '')} |`);
  return lines.join('\n');
}

/** README text with the tables replaced. Throws with a clear message when the markers are missing. */
export function withTables(readme: string, tables: string): string {
  const a = readme.indexOf(START);
  const b = readme.indexOf(END);
  if (a === -1 || b === -1 || b < a)
    throw new Error(
      `README.md needs the markers ${START} and ${END} (in that order) where the Action's inputs and outputs tables go.`,
    );
  return `${readme.slice(0, a + START.length)}\n${tables}\n${readme.slice(b)}`;
}

/** The tables as they stand in the README, for the check. */
export function currentTables(readme: string): string | null {
  const a = readme.indexOf(START);
  const b = readme.indexOf(END);
  if (a === -1 || b === -1 || b < a) return null;
  return readme.slice(a + START.length, b).trim();
}

function main(argv: string[]): number {
  const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
  const readmePath = path.join(root, 'README.md');
  const tables = actionTables(readFileSync(path.join(root, 'action.yml'), 'utf8'));
  const readme = readFileSync(readmePath, 'utf8');
  let next: string;
  try {
    next = withTables(readme, tables);
  } catch (e) {
    process.stderr.write(`action-docs: ${(e as Error).message}\n`);
    return 1;
  }
  if (argv.includes('--check')) {
    if (next !== readme) {
      process.stderr.write(
        "action-docs: README.md's inputs/outputs tables differ from action.yml: run `node --import tsx scripts/action-docs.ts`.\n",
      );
      return 1;
    }
    process.stdout.write('action-docs: README.md matches action.yml\n');
    return 0;
  }
  if (next !== readme) writeFileSync(readmePath, next);
  process.stdout.write(
    `action-docs: ${next === readme ? 'README.md already up to date' : 'README.md updated'}\n`,
  );
  return 0;
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href)
  process.exitCode = main(process.argv.slice(2));
