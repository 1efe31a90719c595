// YAML text -> Plan. Pure: no file access. Every problem becomes one LeadlineError('config') that names
// the config file, the line and column, and the key path; when there are several, the first (in
// reading order) is the error's location and the others are listed in its message.
import { isCollection, isSeq, LineCounter, parseDocument, visit, type Document } from 'yaml';
import type { z } from 'zod';
import { normaliseLevels } from '../engine/levels.js';
import { LeadlineError } from '../errors.js';
import { nearest, plural } from '../text/index.js';

import type { DurationUnit, LimitOptions, MetricOptions, MetricPlan, Plan } from './types.js';
import { DEFAULT_RISK, DEFAULTS, defaultMinTrain } from './defaults.js';
import { buildIncidents } from './incidents.js';
import { parseDuration } from './duration.js';
import { formatKeyPath, locate, type KeyPath, type Position } from './locate.js';
import { configSchema, KEYS, type RawMetric, type RawOptions } from './schema.js';

interface Problem {
  path: KeyPath;
  message: string;
  /** Point at the key rather than its value (unknown keys). */
  atKey?: boolean;
  /** For an unknown key: the valid key suggested. For a missing required key: its name. */
  suggested?: string;
  missing?: string;
}

/** A required key reported missing is dropped when a typo in the same mapping already explains it. */
function dropExplained(problems: Problem[]): Problem[] {
  const explained = new Set(
    problems.filter((p) => p.suggested).map((p) => `${formatKeyPath(p.path.slice(0, -1))}|${p.suggested}`),
  );
  return problems.filter(
    (p) => !p.missing || !explained.has(`${formatKeyPath(p.path.slice(0, -1))}|${p.missing}`),
  );
}

/** Metrics whose backtest.minTrain was defaulted (so it can follow the season chosen later). */
const defaultedMinTrain = new WeakSet<MetricPlan>();

/**
 * The backtest settings for a metric once its season is known: `backtest.minTrain` as configured,
 * or, when the config left it out, max(10, 2 × season).
 */
export function backtestFor(metric: MetricPlan, season: number): { minTrain: number; horizon: number } {
  if (!defaultedMinTrain.has(metric)) return { ...metric.backtest };
  return { minTrain: defaultMinTrain(season), horizon: metric.backtest.horizon };
}

/**
 * Which metrics of a plan had backtest.minTrain defaulted, for a copy of the plan made elsewhere
 * (a worker thread's structured clone keeps the data but not this mark): pass the list to
 * `adoptDefaults` on the copy.
 */
export function defaultsOf(plan: Plan): boolean[] {
  return plan.metrics.map((m) => defaultedMinTrain.has(m));
}

/** Marks the metrics of a copied plan as `defaultsOf` found them on the original. */
export function adoptDefaults(plan: Plan, defaulted: boolean[]): void {
  plan.metrics.forEach((m, i) => {
    if (defaulted[i]) defaultedMinTrain.add(m);
  });
}

export function parsePlan(text: string, configPath: string): Plan {
  const file = configPath;
  const fail = (message: string, where: Partial<Position> & { keyPath?: string } = {}): never => {
    throw new LeadlineError('config', message, {
      file,
      line: where.line ?? null,
      column: where.column ?? null,
      keyPath: where.keyPath ?? null,
    });
  };
  const body = text.replace(/^\uFEFF/, '');
  if (body.trim() === '')
    fail('The config is empty; expected "version: 1" and a "metrics:" list.', { line: 1, column: 1 });

  const lc = new LineCounter();
  const doc = parseDocument(body, {
    lineCounter: lc,
    keepSourceTokens: true,
    merge: true,
    uniqueKeys: true,
    prettyErrors: false,
  });
  if (doc.errors.length > 0) {
    const e = doc.errors[0]!;
    const pos = e.linePos?.[0] ?? lc.linePos(e.pos[0]);
    const more = doc.errors.length > 1 ? ` (and ${plural(doc.errors.length - 1, 'more YAML problem')})` : '';
    fail(`YAML syntax error: ${firstLine(e.message)}${more}.`, { line: pos.line, column: pos.col });
  }
  // A key that is a list or mapping (`? [a, b]`) has no place in the config; YAML would turn it into
  // text with a warning on the console.
  let collectionKey: { kind: string; at: number } | null = null;
  visit(doc, {
    Pair(_, pair) {
      if (isCollection(pair.key)) {
        collectionKey = { kind: isSeq(pair.key) ? 'a list' : 'a mapping', at: pair.key.range?.[0] ?? 0 };
        return visit.BREAK;
      }
      return undefined;
    },
  });
  if (collectionKey) {
    const { kind, at } = collectionKey as { kind: string; at: number };
    const pos = lc.linePos(at);
    fail(`A key must be plain text, found ${kind}.`, { line: pos.line, column: pos.col });
  }
  let raw: unknown;
  try {
    raw = doc.toJS({ maxAliasCount: 1000 });
  } catch (e) {
    fail(`The config cannot be read: ${(e as Error).message}`, { line: 1, column: 1 });
  }
  if (raw === null || typeof raw !== 'object' || Array.isArray(raw)) {
    fail(`The config must be a mapping with "version" and "metrics", found ${describeValue(raw)}.`, {
      line: 1,
      column: 1,
    });
  }

  const parsed = configSchema.safeParse(raw);
  if (!parsed.success) {
    report(doc, lc, dropExplained(parsed.error.issues.flatMap((i) => fromIssue(i, raw))), file);
  }
  const config = parsed.data!;
  const defaults: RawOptions = config.defaults ?? {};
  const problems: Problem[] = [];
  const falseAlarms = defaults.falseAlarms ?? DEFAULTS.falseAlarms;

  const metrics: MetricPlan[] = [];
  const seen = new Map<string, number>();
  config.metrics.forEach((m, i) => {
    const base: KeyPath = ['metrics', i];
    const metricLine = locate(doc, lc, base)?.line ?? null;
    const previous = seen.get(m.name);
    if (previous !== undefined) {
      const prevLine = locate(doc, lc, ['metrics', previous, 'name'])?.line;
      problems.push({
        path: [...base, 'name'],
        message: `The name "${m.name}" is already used by metrics[${previous}] (line ${prevLine}); metric names must be unique.`,
      });
    } else seen.set(m.name, i);
    const plan = buildMetric(m, defaults, base, metricLine, falseAlarms, problems);
    if (plan) metrics.push(plan);
  });
  if (problems.length > 0) report(doc, lc, problems, file);
  return {
    configPath,
    version: 1,
    metrics,
    falseAlarms,
    pullRequestGate: config.pullRequestGate ?? 'changed',
  };
}

function buildMetric(
  m: RawMetric,
  d: RawOptions,
  base: KeyPath,
  line: number | null,
  falseAlarms: MetricOptions['falseAlarms'],
  problems: Problem[],
): MetricPlan | null {
  const pick = <K extends keyof RawOptions>(k: K): RawOptions[K] => (m[k] !== undefined ? m[k] : d[k]);
  const from = (k: keyof RawOptions): KeyPath => (m[k] !== undefined ? [...base, k] : ['defaults', k]);
  const before = problems.length;

  const file = m.file.trim();
  if (/^\.\.(\/|\\|$)/.test(normalisePosix(file))) {
    problems.push({
      path: [...base, 'file'],
      message: `"${m.file}" leads outside the working directory; metric files must be inside it.`,
    });
  }

  const values = typeof m.value === 'string' ? [m.value] : [...m.value];
  values.forEach((v, j) => {
    const first = values.indexOf(v);
    if (first !== j)
      problems.push({ path: [...base, 'value', j], message: `The column "${v}" is listed twice in value.` });
  });
  const time = m.time ?? null;
  const key = m.key ?? null;
  if (time !== null && values.includes(time)) {
    problems.push({
      path: [...base, 'value'],
      message: `The column "${time}" cannot be both the time column and a value column.`,
    });
  }
  if (key !== null && (key === time || values.includes(key))) {
    problems.push({
      path: [...base, 'key'],
      message: `The key column "${key}" must differ from the time and value columns.`,
    });
  }
  const label = m.label ?? null;
  const incidentColumn = m.incidentColumn ?? null;
  for (const [name, col] of [
    ['label', label],
    ['incidentColumn', incidentColumn],
  ] as const) {
    if (col !== null && (col === time || col === key || values.includes(col)))
      problems.push({
        path: [...base, name],
        message: `The ${name} column "${col}" must differ from the time, key and value columns.`,
      });
  }
  const incidents = buildIncidents(m, base, time, problems);

  const season = pick('season') ?? DEFAULTS.season;
  const horizon = pick('horizon') ?? DEFAULTS.horizon;
  const levels = normaliseLevels(pick('levels') ?? DEFAULTS.levels);
  const methods = [...new Set(pick('methods') ?? DEFAULTS.methods)] as MetricOptions['methods'];

  const alarmLevel = pick('alarmLevel') ?? levels[levels.length - 1]!;
  if (!levels.includes(alarmLevel)) {
    problems.push({
      path: from('alarmLevel'),
      message: `alarmLevel ${alarmLevel} is not one of the levels (${levels.join(', ')}); it must name one of them.`,
    });
  }

  if (m.falseAlarms !== undefined && m.falseAlarms !== falseAlarms) {
    problems.push({
      path: [...base, 'falseAlarms'],
      message:
        `falseAlarms applies to the whole run (it adjusts across every checked observation of every metric), so it cannot differ per metric; ` +
        `set it under defaults (the run uses "${falseAlarms}").`,
    });
  }

  const userMinTrain = m.backtest?.minTrain ?? d.backtest?.minTrain;
  const backtest = {
    minTrain: userMinTrain ?? defaultMinTrain(season === 'auto' ? 1 : season),
    horizon: m.backtest?.horizon ?? d.backtest?.horizon ?? horizon,
  };

  const limit = buildLimit(m, d, base, horizon, problems);

  if (problems.length > before) return null;
  const plan: MetricPlan = {
    name: m.name,
    file,
    time,
    values,
    key,
    label,
    unit: m.unit?.trim() || null,
    incidents,
    incidentColumn,
    keyPath: formatKeyPath(base),
    line,
    season,
    methods,
    horizon,
    levels,
    intervals: pick('intervals') ?? DEFAULTS.intervals,
    backtest,
    score: pick('score') ?? DEFAULTS.score,
    paths: pick('paths') ?? DEFAULTS.paths,
    seed: pick('seed') ?? DEFAULTS.seed,
    check: { last: m.check?.last ?? d.check?.last ?? DEFAULTS.check.last },
    direction: pick('direction') ?? DEFAULTS.direction,
    alarmLevel,
    falseAlarms,
    limit,
    blanks: pick('blanks') ?? DEFAULTS.blanks,
    duplicates: pick('duplicates') ?? DEFAULTS.duplicates,
    timeFormat: pick('timeFormat') ?? DEFAULTS.timeFormat,
  };
  if (userMinTrain === undefined) defaultedMinTrain.add(plan);
  return plan;
}

/**
 * The metric's limit over `defaults.limit`, key by key; a side (above/below) set on the metric
 * replaces the defaults' side. No side after merging: no limit, unless the metric itself has a
 * `limit:` mapping, which then is an error.
 */
function buildLimit(
  m: RawMetric,
  d: RawOptions,
  base: KeyPath,
  horizon: number,
  problems: Problem[],
): LimitOptions | null {
  const own = m.limit;
  const dflt = d.limit;
  if (!own && !dflt) return null;
  const ownSide = own && (own.above !== undefined || own.below !== undefined);
  const above = ownSide ? own.above : dflt?.above;
  const below = ownSide ? own.below : dflt?.below;
  const where: KeyPath = own ? [...base, 'limit'] : ['defaults', 'limit'];
  if (above !== undefined && below !== undefined) {
    problems.push({
      path: where,
      message: 'A limit has one side: give either above or below, not both (use two metrics for a band).',
    });
    return null;
  }
  if (above === undefined && below === undefined) {
    if (own)
      problems.push({
        path: where,
        message: 'The limit needs a threshold: add "above: <value>" or "below: <value>".',
      });
    return null;
  }
  const rawWithin = own?.within ?? dflt?.within;
  let within: LimitOptions['within'];
  let withinLabel: string;
  if (rawWithin === undefined) {
    within = { steps: horizon };
    withinLabel = String(horizon);
  } else if (typeof rawWithin === 'number') {
    within = { steps: rawWithin };
    withinLabel = String(rawWithin);
  } else {
    const parsed = parseDuration(rawWithin);
    if (parsed === null) {
      problems.push({
        path: [...(own?.within !== undefined ? [...base, 'limit'] : ['defaults', 'limit']), 'within'],
        message: `Expected a window of more than 0, found ${describeValue(rawWithin)}.`,
      });
      return null;
    }
    within = { amount: parsed.amount, unit: parsed.unit as DurationUnit };
    withinLabel = rawWithin.trim();
  }
  return {
    above: above ?? null,
    below: below ?? null,
    within,
    withinLabel,
    risk: own?.risk ?? dflt?.risk ?? DEFAULT_RISK,
  };
}

function normalisePosix(p: string): string {
  const parts: string[] = [];
  for (const seg of p.replace(/\\/g, '/').split('/')) {
    if (seg === '' || seg === '.') continue;
    if (seg === '..' && parts.length > 0 && parts[parts.length - 1] !== '..') parts.pop();
    else parts.push(seg);
  }
  return parts.join('/');
}

function report(doc: Document, lc: LineCounter, problems: Problem[], file: string): never {
  const placed = problems
    .map((p) => ({ ...p, pos: locate(doc, lc, p.path, { key: p.atKey }) ?? { line: 1, column: 1 } }))
    .sort((a, b) => a.pos.line - b.pos.line || a.pos.column - b.pos.column);
  const [first, ...rest] = placed;
  let message = first!.message;
  if (rest.length > 0) {
    const shown = rest
      .slice(0, 9)
      .map((p) => `\n  line ${p.pos.line}: ${formatKeyPath(p.path) || '(top level)'}: ${p.message}`);
    const hidden = rest.length - shown.length;
    message += `\nAlso:${shown.join('')}${hidden > 0 ? `\n  … and ${hidden} more` : ''}`;
  }
  throw new LeadlineError('config', message, {
    file,
    line: first!.pos.line,
    column: first!.pos.column,
    keyPath: formatKeyPath(first!.path) || null,
  });
}

type Issue = z.core.$ZodIssue;

function valueAt(root: unknown, path: KeyPath): unknown {
  let v: unknown = root;
  for (const seg of path) {
    if (v === null || typeof v !== 'object') return undefined;
    v = (v as Record<string | number, unknown>)[seg];
  }
  return v;
}

/** Which valid keys apply to the mapping at `path`. */
function keysFor(path: KeyPath): readonly string[] {
  if (path.length === 0) return KEYS.root;
  const last = path[path.length - 1];
  if (path.length === 1 && last === 'defaults') return KEYS.defaults;
  if (path.length === 2 && path[0] === 'metrics' && typeof last === 'number') return KEYS.metric;
  if (last === 'backtest') return KEYS.backtest;
  if (last === 'check') return KEYS.check;
  if (last === 'limit') return KEYS.limit;
  if (typeof last === 'number' && path[path.length - 2] === 'incidents') return KEYS.incident;
  return [];
}

const EXPECTED: Record<string, string> = {
  string: 'text',
  number: 'a number',
  int: 'a whole number',
  array: 'a list',
  object: 'a mapping',
  boolean: 'true or false',
};

function fromIssue(issue: Issue, root: unknown): Problem[] {
  const path = issue.path.map((p) => (typeof p === 'symbol' ? String(p) : p)) as (string | number)[];
  const value = valueAt(root, path);
  const found = describeValue(value);
  if (value === undefined && issue.code !== 'unrecognized_keys' && path.length > 0) {
    const name = String(path[path.length - 1]);
    return [{ path, message: `The key "${name}" is required here${requiredHint(path)}.`, missing: name }];
  }
  switch (issue.code) {
    case 'unrecognized_keys': {
      const valid = keysFor(path);
      return issue.keys.map((k) => {
        const near = nearest(k, valid);
        const hint = near
          ? `did you mean "${near}"?`
          : valid.length > 0
            ? `valid keys here: ${valid.join(', ')}.`
            : '';
        return {
          path: [...path, k],
          atKey: true,
          message: `Unknown key "${k}"; ${hint}`,
          suggested: near ?? undefined,
        };
      });
    }
    case 'invalid_type': {
      if (value === undefined) {
        const name = path[path.length - 1];
        return [
          {
            path,
            message: `The key "${String(name)}" is required here${requiredHint(path)}.`,
            missing: String(name),
          },
        ];
      }
      const expected = EXPECTED[issue.expected] ?? issue.expected;
      const quote =
        issue.expected === 'string' && (typeof value === 'number' || typeof value === 'boolean')
          ? ' (put it in quotes if it is a name)'
          : '';
      return [{ path, message: `Expected ${expected}, found ${found}${quote}.` }];
    }
    case 'invalid_value': {
      const options = issue.values.map((v) => JSON.stringify(v));
      if (issue.values.length === 1)
        return [
          {
            path,
            message: `${issue.message.startsWith('expected') ? capital(issue.message) : `Expected ${options[0]}`}, found ${found}.`,
          },
        ];
      const near = typeof value === 'string' ? nearest(value, issue.values.map(String)) : null;
      return [
        {
          path,
          message: `Expected one of ${options.join(', ')}, found ${found}${near ? `; did you mean "${near}"?` : '.'}`,
        },
      ];
    }
    case 'too_small':
    case 'too_big': {
      const small = issue.code === 'too_small';
      const bound = small
        ? (issue as { minimum: number | bigint }).minimum
        : (issue as { maximum: number | bigint }).maximum;
      const inclusive = issue.inclusive !== false;
      if (issue.origin === 'array') {
        return [
          {
            path,
            message: small
              ? `Expected at least ${plural(Number(bound), 'entry', 'entries')}, found ${found}.`
              : `Expected at most ${bound} entries, found ${found}.`,
          },
        ];
      }
      if (issue.origin === 'string') {
        return [
          {
            path,
            message: small
              ? `Expected non-empty text, found ${found}.`
              : `Expected at most ${bound} characters, found ${String(value).length}.`,
          },
        ];
      }
      const rel = small ? (inclusive ? 'at least' : 'more than') : inclusive ? 'at most' : 'less than';
      return [{ path, message: `Expected a number ${rel} ${bound}, found ${found}.` }];
    }
    case 'invalid_union':
    case 'invalid_format':
    case 'custom':
    default:
      return [{ path, message: `${capital(issue.message)}, found ${found}.` }];
  }
}

function requiredHint(path: KeyPath): string {
  const name = path[path.length - 1];
  if (name === 'metrics') return ' (a list of the metrics to watch)';
  if (name === 'name') return ' (a unique name for the metric)';
  if (name === 'file') return ' (the CSV path or glob)';
  if (name === 'value') return ' (the value column, or a list of them)';
  return '';
}

function capital(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}

function firstLine(s: string): string {
  return s.split('\n')[0]!.replace(/[.:]\s*$/, '');
}

/** The value as a user would recognise it in a message. */
export function describeValue(v: unknown): string {
  if (v === undefined) return 'nothing';
  if (v === null) return 'an empty value';
  if (typeof v === 'string') return v.length > 60 ? `${JSON.stringify(v.slice(0, 57))}…` : JSON.stringify(v);
  if (typeof v === 'number' || typeof v === 'boolean' || typeof v === 'bigint') return String(v);
  if (Array.isArray(v)) return v.length === 0 ? 'an empty list' : `a list of ${v.length}`;
  if (v instanceof Date) return `the date ${v.toISOString()}`;
  return 'a mapping';
}
