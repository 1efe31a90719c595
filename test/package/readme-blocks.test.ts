// README.md's examples cannot drift: every ```yaml block parses; every config example (and the demo's
// config) is valid against leadline.schema.json by a general JSON Schema validator (Ajv, draft
// 2020-12, the schema's own $schema); every workflow step that uses Leadline passes only inputs
// action.yml declares and reads only outputs it declares.
import { readFileSync } from 'node:fs';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { describe, expect, it } from 'vitest';
import { parseAllDocuments, parse as parseYaml } from 'yaml';
import { parseCli } from '../../src/cli/args.js';
import { codeBlocks, type CodeBlock } from './readme.js';

const yamlBlocks = codeBlocks().filter((b) => b.lang === 'yaml' || b.lang === 'yml');
const where = (b: CodeBlock) => `README.md:${b.line} (under "${b.heading}")`;

function parseBlock(b: CodeBlock): unknown {
  const docs = parseAllDocuments(b.code, { uniqueKeys: true, prettyErrors: true });
  if (!Array.isArray(docs)) return null; // an empty block
  const problems = docs.flatMap((d) => [...d.errors, ...d.warnings]).map((e) => e.message);
  expect(problems, `${where(b)}\n${b.code}`).toEqual([]);
  expect(docs.length, `${where(b)}: one YAML document`).toBe(1);
  return docs[0]!.toJS();
}

const schema = JSON.parse(
  readFileSync(new URL('../../leadline.schema.json', import.meta.url), 'utf8'),
) as object;
const ajv = new Ajv2020({ allErrors: true, strict: true });
const validConfig = ajv.compile(schema);

const action = parseYaml(readFileSync(new URL('../../action.yml', import.meta.url), 'utf8')) as {
  inputs: Record<string, unknown>;
  outputs: Record<string, unknown>;
};

interface Step {
  id?: string;
  uses?: string;
  with?: Record<string, unknown>;
}

/** Steps of a workflow (every job's), or of a fragment that is itself a list of steps. */
function stepsOf(doc: unknown): Step[] {
  if (Array.isArray(doc)) return doc as Step[];
  const jobs = (doc as { jobs?: Record<string, { steps?: Step[] }> }).jobs ?? {};
  return Object.values(jobs).flatMap((j) => j.steps ?? []);
}

const isLeadline = (s: Step) => typeof s.uses === 'string' && /(^|\/)leadline@/.test(s.uses);

describe('README.md YAML blocks', () => {
  it('there are config examples and workflow examples', () => {
    expect(yamlBlocks.some((b) => /^version: 1$/m.test(b.code))).toBe(true);
    expect(yamlBlocks.some((b) => b.code.includes('/leadline@'))).toBe(true);
  });

  it.each(yamlBlocks.map((b) => [where(b), b] as const))('%s parses as YAML', (_, b) => {
    parseBlock(b);
  });
});

describe("the README's set-up commands", () => {
  const setup = codeBlocks()
    .filter((b) => b.heading === 'Set-up' && b.lang === 'sh')
    .map((b) => b.code.trim());

  it('are one command for the demo and one for the tests', () => {
    expect(setup).toEqual(['npm ci && npm run demo', 'npm ci && npm test']);
  });

  it('.ci/run runs the test command exactly as the README gives it', () => {
    const ci = readFileSync(new URL('../../.ci/run', import.meta.url), 'utf8');
    expect(ci.split('\n')).toContain(setup[1]);
  });
});

describe("the README's command lines", () => {
  const commands = codeBlocks()
    .filter((b) => b.lang === 'sh')
    .flatMap((b) => b.code.split('\n').map((l) => [where(b), l.trim()] as const))
    .filter(([, l]) => /^(leadline|node dist\/cli\.js) /.test(l));

  it('there are some', () => {
    expect(commands.length).toBeGreaterThan(2);
  });

  it.each(commands)("%s: `%s` is read by the command's own parser", (_, line) => {
    const argv = line.replace(/^(leadline|node dist\/cli\.js) /, '').split(/\s+/);
    expect(() => parseCli(argv, {}, '/repo', false)).not.toThrow();
  });
});

describe('config examples against leadline.schema.json (Ajv)', () => {
  const configs = yamlBlocks.filter((b) => /^version: 1$/m.test(b.code));
  it.each(configs.map((b) => [where(b), b] as const))('%s is valid', (_, b) => {
    const ok = validConfig(parseBlock(b));
    expect(validConfig.errors ?? [], where(b)).toEqual([]);
    expect(ok).toBe(true);
  });

  it('the demo config is valid', () => {
    const demo = parseYaml(
      readFileSync(new URL('../../fixtures/demo/leadline.yml', import.meta.url), 'utf8'),
    );
    expect(validConfig(demo), JSON.stringify(validConfig.errors)).toBe(true);
  });

  it('the validator is not a pushover: a mistyped key and a wrong type are refused', () => {
    const base = { version: 1, metrics: [{ name: 'm', file: 'm.csv', value: 'v' }] };
    expect(validConfig(base)).toBe(true);
    expect(validConfig({ ...base, metrics: [{ ...base.metrics[0], horizn: 3 }] })).toBe(false);
    expect(validConfig({ ...base, metrics: [{ ...base.metrics[0], horizon: 'soon' }] })).toBe(false);
  });
});

describe('workflow examples against action.yml', () => {
  const workflows = yamlBlocks.filter((b) => b.code.includes('/leadline@'));
  it.each(workflows.map((b) => [where(b), b] as const))(
    '%s uses only declared inputs and outputs',
    (_, b) => {
      const doc = parseBlock(b);
      const steps = stepsOf(doc);
      const ours = steps.filter(isLeadline);
      expect(ours.length, where(b)).toBeGreaterThan(0);
      for (const s of ours)
        for (const key of Object.keys(s.with ?? {}))
          expect(Object.keys(action.inputs), `${where(b)}: input`).toContain(key);
      const ids = new Set(ours.map((s) => s.id).filter((id): id is string => !!id));
      for (const m of b.code.matchAll(/steps\.([\w-]+)\.outputs\.([\w-]+)/g))
        if (ids.has(m[1]!)) expect(Object.keys(action.outputs), `${where(b)}: output`).toContain(m[2]);
    },
  );
});
