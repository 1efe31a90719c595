// The local command: the same pipeline as the Action (src/job.ts), with files and a terminal.
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { isLeadlineError, LeadlineError } from '../errors.js';
import { runJob } from '../job.js';
import { renderHtml, renderMarkdown } from '../report/index.js';
import type { Results } from '../results.js';
import { checkOutputs, filesRead, inputGuard, InputGuard, resultsJson, writeOutput } from '../files.js';
import { VERSION } from '../version.js';
import { HELP, parseCli, type CliSettings } from './args.js';
import { renderSummary } from './summary.js';

export interface CliIo {
  stdout: { write(s: string): unknown; isTTY?: boolean };
  stderr: { write(s: string): unknown };
  env: NodeJS.ProcessEnv;
  cwd: string;
}

/** Runs the command; resolves to the exit code (0 gate passed, 1 gate failed, 2 usage/config/data errors). */
export async function main(argv: string[], io: CliIo): Promise<number> {
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
  const cwd = path.resolve(io.cwd, settings.cwd);
  let results: Results;
  try {
    const template = settings.template
      ? await readTemplate(path.resolve(io.cwd, settings.template))
      : undefined;
    const outputs = (
      [
        [settings.json, '--json'],
        [settings.markdown, '--markdown'],
        [settings.html, '--html'],
      ] as const
    ).flatMap(([p, label]) => (p ? [{ path: path.resolve(io.cwd, p), label }] : []));
    // Before any work: an output naming an input, or two outputs naming one file, is refused.
    const before = await inputGuard(cwd, settings.config);
    checkOutputs(outputs, before);
    let lastShown = 0;
    const started = Date.now();
    results = await runJob({
      cwd,
      configPath: settings.config,
      failOn: settings.failOn,
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
    const inputs = new InputGuard(cwd, settings.config, before.patterns, filesRead(results));
    const markdown = () =>
      renderMarkdown(results, { ...(template ? { template } : {}), fullReportNote: fullNote(settings) });
    if (settings.json)
      await writeOutput(path.resolve(io.cwd, settings.json), resultsJson(results), inputs, '--json');
    if (settings.markdown)
      await writeOutput(path.resolve(io.cwd, settings.markdown), markdown(), inputs, '--markdown');
    if (settings.html)
      await writeOutput(path.resolve(io.cwd, settings.html), renderHtml(results), inputs, '--html');
    if (settings.print === 'summary') io.stdout.write(renderSummary(results, settings.color));
    else if (settings.print === 'markdown') io.stdout.write(markdown());
    else if (settings.print === 'json') for (const piece of resultsJson(results)) io.stdout.write(piece);
  } catch (e) {
    return fail(e, io);
  }
  if (results.problems.length > 0) return 2;
  return results.gate.passed ? 0 : 1;
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
