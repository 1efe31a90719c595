// The local command: the same pipeline as the Action (src/job.ts), with files and a terminal.
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { isLeadlineError, LeadlineError } from '../errors.js';
import { startJob } from '../job.js';
import {
  renderHtml,
  renderMarkdown,
  reportDetail,
  type MarkdownOptions,
  type ReportRequest,
} from '../report/index.js';
import type { Results, RunOutput } from '../results.js';
import { checkOutputs, filesRead, inputGuard, InputGuard, resultsJsonOf, writeOutput } from '../files.js';
import { mergeResults } from '../merge.js';
import { VERSION } from '../version.js';
import { safeStream } from '../text/index.js';
import { compareWithBase, headCommit, systemGit } from '../action/git.js';
import { shardLabel } from '../shard.js';
import { HELP, parseCli, type CliSettings } from './args.js';
import { renderSummary } from './summary.js';

export interface CliIo {
  stdout: { write(s: string): unknown; isTTY?: boolean };
  stderr: { write(s: string): unknown };
  env: NodeJS.ProcessEnv;
  cwd: string;
}

/** Runs the command; resolves to the exit code (0 gate passed, 1 gate failed, 2 usage/config/data errors). */
export async function main(argv: string[], given: CliIo): Promise<number> {
  // In a workflow step both streams are the job log: no untrusted name may issue a workflow command.
  const io: CliIo = { ...given, stdout: safeStream(given.stdout), stderr: safeStream(given.stderr) };
  let settings: CliSettings;
  try {
    settings = parseCli(argv, io.env, io.cwd, Boolean(io.stdout.isTTY));
  } catch (e) {
    return fail(e, io);
  }
  if (settings.command === 'help') {
    io.stdout.write(HELP);
    return 0;
  }
  if (settings.command === 'version') {
    io.stdout.write(`leadline ${VERSION}\n`);
    return 0;
  }
  let out: Outcome | undefined;
  try {
    const template = settings.template
      ? await readTemplate(path.resolve(io.cwd, settings.template))
      : undefined;
    const outputs = (
      [
        [settings.json, '--json'],
        [settings.markdown, '--markdown'],
        [settings.html, '--html'],
        [settings.comment, '--comment'],
      ] as const
    ).flatMap(([p, label]) => (p ? [{ path: path.resolve(io.cwd, p), label }] : []));
    const done =
      settings.command === 'merge' ? await merge(settings, io, outputs) : await run(settings, io, outputs);
    out = done;
    const results = done.lean;
    // The reports asked for, and the series they show in detail: only those are read back in full.
    const markdownOptions: MarkdownOptions = {
      ...(template ? { template } : {}),
      fullReportNote: fullNote(settings),
    };
    const briefOptions: MarkdownOptions = { detail: 'brief', fullReportNote: fullNote(settings) };
    const requests: ReportRequest[] = [
      ...(settings.markdown || settings.print === 'markdown' ? [{ markdown: markdownOptions }] : []),
      ...(settings.comment ? [{ markdown: briefOptions }] : []),
      ...(settings.html ? (['html'] as const) : []),
    ];
    let shown: Results | null = null;
    const detailed = async () => (shown ??= await done.detailed(reportDetail(results, requests)));
    const markdown = async () => renderMarkdown(await detailed(), markdownOptions);
    if (settings.json)
      await writeOutput(path.resolve(io.cwd, settings.json), resultsJsonOf(out), out.inputs, '--json');
    if (settings.markdown)
      await writeOutput(path.resolve(io.cwd, settings.markdown), await markdown(), out.inputs, '--markdown');
    if (settings.html)
      await writeOutput(
        path.resolve(io.cwd, settings.html),
        renderHtml(await detailed()),
        out.inputs,
        '--html',
      );
    if (settings.comment)
      await writeOutput(
        path.resolve(io.cwd, settings.comment),
        renderMarkdown(await detailed(), briefOptions),
        out.inputs,
        '--comment',
      );
    if (settings.shard && results.origin.shard) {
      // A shard's verdict covers its part only (false-alarm control is run-wide): it reports and gates nothing.
      const sh = results.origin.shard;
      io.stderr.write(
        `leadline: shard ${shardLabel(sh)} judged ${results.series.length} of ${sh.series} series; results in ${settings.json}. ` +
          `"leadline merge" of every shard's file gives the run's verdict and gate.\n`,
      );
      if (settings.print === 'summary') return 0;
    }
    if (settings.print === 'summary') {
      io.stdout.write(renderSummary(results, settings.color));
      for (const [p, what] of [
        [settings.comment, 'Comment (brief markdown)'],
        [settings.markdown, 'Full markdown report'],
        [settings.html, 'HTML report'],
        [settings.json, 'Results JSON'],
      ] as const)
        if (p) io.stdout.write(`${what}: ${p}\n`);
    } else if (settings.print === 'markdown') io.stdout.write(await markdown());
    else if (settings.print === 'json') for await (const piece of resultsJsonOf(out)) io.stdout.write(piece);
  } catch (e) {
    return fail(e, io);
  } finally {
    out?.close?.();
  }
  if (settings.shard) return 0;
  if (out.lean.problems.length > 0) return 2;
  return out.lean.gate.passed ? 0 : 1;
}

/** What a command produced: the run's results, and the files it must not write to. */
interface Outcome extends RunOutput {
  /** What the outputs must not overwrite. */
  inputs: InputGuard;
}

type Outputs = { path: string; label: string }[];

/**
 * --base: the rows each metric file gained since REF, by the comparison the Action makes for a pull
 * request (compareWithBase: merge base of REF and HEAD, line counts at REF).
 */
async function changedSince(
  cwd: string,
  ref: string,
): Promise<{ newRows: Record<string, number>; added: string[] }> {
  if (ref.startsWith('-'))
    throw new LeadlineError('usage', `--base: "${ref}" is not a commit or branch name.`);
  const rev = await systemGit.run(
    ['rev-parse', '--verify', '--quiet', '--end-of-options', `${ref}^{commit}`],
    { cwd },
  );
  const sha = rev.code === 0 ? rev.stdout.toString('utf8').trim() : '';
  if (!/^[0-9a-f]{40,64}$/.test(sha))
    throw new LeadlineError(
      'usage',
      rev.code === -1
        ? `--base: git is not available (${rev.stderr.trim()}).`
        : `--base: "${ref}" is not a commit or branch of the repository at ${cwd}.`,
    );
  const cmp = await compareWithBase(systemGit, cwd, sha);
  if (!cmp.ok) throw new LeadlineError('usage', `--base: ${cmp.note}`);
  return { newRows: cmp.newRows, added: cmp.added };
}

async function run(settings: CliSettings, io: CliIo, outputs: Outputs): Promise<Outcome> {
  const cwd = path.resolve(io.cwd, settings.cwd);
  // Before any work: an output naming an input, or two outputs naming one file, is refused.
  const before = await inputGuard(cwd, settings.config);
  checkOutputs(outputs, before);
  let lastShown = 0;
  const started = Date.now();
  const since = settings.base ? await changedSince(cwd, settings.base) : null;
  const run = await startJob({
    cwd,
    configPath: settings.config,
    failOn: settings.failOn,
    ...(since ? { newRows: since.newRows, addedFiles: since.added } : {}),
    shard: settings.shard,
    jobs: settings.jobs,
    fullHistory: settings.fullHistory,
    commit: await headCommit(systemGit, cwd),
    onProgress: (done, total) => {
      // Progress only when there are many series and it has taken a moment; stderr keeps stdout clean.
      if (!settings.progress || total < 200) return;
      const now = Date.now();
      if (done === total || (now - started > 1000 && now - lastShown > 1000)) {
        lastShown = now;
        io.stderr.write(`leadline: analysed ${done} of ${total} series\n`);
      }
    },
  });
  return { ...run, inputs: new InputGuard(cwd, settings.config, before.patterns, filesRead(run.lean)) };
}

async function merge(settings: CliSettings, io: CliIo, outputs: Outputs): Promise<Outcome> {
  const files = settings.files.map((f) => path.resolve(io.cwd, f));
  const inputs = new InputGuard(io.cwd, files[0]!, [], files);
  checkOutputs(outputs, inputs);
  const merged = await mergeResults(files, { failOn: settings.failOn });
  return { ...merged, inputs };
}

async function readTemplate(file: string): Promise<string> {
  try {
    return await readFile(file, 'utf8');
  } catch (e) {
    throw new LeadlineError(
      'usage',
      `--template: cannot read ${file}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`,
    );
  }
}

function fullNote(s: CliSettings): string {
  const where = [s.json && `the results JSON (${s.json})`, s.html && `the HTML report (${s.html})`].filter(
    Boolean,
  );
  return where.length > 0
    ? `The full report is in ${where.join(' and ')}.`
    : 'Run with --json or --html for the full report.';
}

function fail(e: unknown, io: CliIo): number {
  if (isLeadlineError(e)) {
    io.stderr.write(`leadline: ${e.describe()}\n`);
    return 2;
  }
  throw e;
}
