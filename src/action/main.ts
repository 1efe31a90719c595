// The Action: read the settings, run the same job as the command, then publish. Order matters only in
// that nothing after the job can lose the report: the results file, outputs and job summary are
// written whatever happens to the comment, and the gate decides the exit code last.
import { appendFile } from 'node:fs/promises';
import * as core from '@actions/core';
import { glob } from 'tinyglobby';
import { isLeadlineError, LeadlineError } from '../errors.js';
import { mergeResults, type ExpectedEvent } from '../merge.js';
import { shardLabel } from '../shard.js';
import { filesRead, outputProblems, inputGuard, InputGuard, resultsJsonOf, writeOutput } from '../files.js';
import { escapeMessage as escapeText, logSafe, plural, visible } from '../text/index.js';
import { startJob, type JobOptions } from '../job.js';
import { VERDICT_LABEL } from '../report/format.js';
import { renderHtml, renderMarkdown, reportDetail, type ReportRequest } from '../report/index.js';
import { heldRun, RESULTS_SCHEMA_ID, type Results, type RunOutput } from '../results.js';
import { VERSION } from '../version.js';
import { planAnnotations, type Annotation } from './annotations.js';
import {
  PR_EVENT_NAMES,
  destination,
  isPullRequestEvent,
  readEvent,
  type Destination,
  type EventFacts,
} from './event.js';
import { compareWithBase, headCommit, isTracked, systemGit, type GitRunner } from './git.js';
import { limitText, octokitApi, type IssueApi, type OctokitSettings } from './github.js';
import {
  describeError,
  marker,
  publishWarning,
  syncTrackingIssue,
  upsertComment,
  withMarker,
  workflowRunPullRequest,
} from './publish.js';
import { configKey, envInputs, readSettings, type Settings } from './settings.js';
import {
  COMMENT_MAX_BYTES,
  COMMENT_MAX_CHARS,
  SUMMARY_MAX_BYTES,
  closeNote,
  cutTo,
  fitRendering,
  fullReportNote,
  needsAttention,
  reopenNote,
  runLink,
  trackingTitle,
} from './texts.js';

/** The outside world, replaceable in tests. */
export interface ActionDeps {
  env: NodeJS.ProcessEnv;
  git: GitRunner;
  github: (s: OctokitSettings) => IssueApi;
  job: (o: JobOptions) => Promise<RunOutput>;
  renderMarkdown: typeof renderMarkdown;
  renderHtml: typeof renderHtml;
}

const LABEL_COLOR = 'c2410c';
const LABEL_DESCRIPTION = 'Kept up to date by Leadline: metrics that need attention';

/** Runs the Action. Never throws: failures end in core.setFailed with one line saying why. */
export async function run(deps: Partial<ActionDeps> = {}): Promise<void> {
  const d: ActionDeps = {
    env: process.env,
    git: systemGit,
    github: octokitApi,
    job: startJob,
    renderMarkdown,
    renderHtml,
    ...deps,
  };
  try {
    await runAction(d);
  } catch (e) {
    core.setFailed(
      isLeadlineError(e)
        ? `Leadline: ${e.describe()}`
        : `Leadline stopped on an unexpected error (please report it): ${(e as Error)?.stack ?? String(e)}`,
    );
  }
}

/** Warnings and errors emitted so far: they share GitHub's per-step annotation limits. */
const used = { warning: 0, error: 0 };
function warn(message: string): void {
  used.warning++;
  core.warning(message);
}
/** A log line: untrusted text in it cannot act as a workflow command (see logSafe). */
function info(message: string): void {
  core.info(logSafe(message));
}

/** The results of a run that could not analyse anything: the error as the one problem. */
function failedRun(e: unknown, s: Settings): Results {
  const located = isLeadlineError(e);
  const message = located
    ? e.message
    : `Leadline stopped on an unexpected error: ${(e as Error)?.message ?? String(e)}`;
  return {
    $schema: RESULTS_SCHEMA_ID,
    version: 1,
    generator: { name: 'leadline', version: VERSION },
    generatedAt: new Date().toISOString(),
    config: s.config,
    origin: { configHash: null, commit: null, shard: null, event: null },
    verdict: 'error',
    gate: {
      failOn: s.failOn,
      passed: false,
      reason: located ? `Leadline could not run: ${e.describe()}` : message,
    },
    summary: {
      metrics: 0,
      series: 0,
      alarms: 0,
      atRisk: 0,
      insufficient: 0,
      errors: 0,
      checkedObservations: 0,
      expectedFalseAlarms: 0,
      falseAlarms: 'none',
    },
    series: [],
    problems: [
      {
        kind: located ? (e.kind === 'config' ? 'config' : 'data') : 'internal',
        message,
        file: located ? e.file : null,
        line: located ? e.line : null,
        column: located ? e.column : null,
        keyPath: located ? e.keyPath : null,
        metric: null,
      },
    ],
  };
}

/** Room kept in the job summary for the lines appended after publishing. */
const SUMMARY_FOOTER_ROOM = 8 * 1024;
/** The job summary's first rendering is asked to fit this many characters (fitRendering then shrinks it to the bytes allowed). */
const SUMMARY_FIRST_TRY = 1_000_000;

async function runAction(d: ActionDeps): Promise<void> {
  used.warning = 0;
  used.error = 0;
  const inputs = envInputs(d.env);
  // Registered before anything else runs, so no later log line can show it.
  const token = inputs('token');
  if (token) core.setSecret(token);
  const s = readSettings(inputs, d.env);
  const key = configKey(s);
  const link = runLink(s.run.serverUrl, s.run.repository, s.run.runId);

  const event = await readEvent(s.run.eventPath);
  if (event.problem) warn(event.problem);
  if (s.shard && s.merge.length > 0)
    throw new LeadlineError(
      'usage',
      'Inputs "shard" and "merge" cannot be used together: each shard computes its part, one merge job publishes.',
    );
  let dest = destination(s.comment, s.run.eventName, event.facts);
  // A shard publishes nothing unless told where: its verdict covers its part only.
  if (s.shard && s.comment.kind === 'auto') dest = { kind: 'none', why: null };

  let newRows: Record<string, number> | undefined;
  let addedFiles: string[] = [];
  let baseNote: string | undefined;
  const pr = event.facts.pullRequest;
  if (pr && s.merge.length === 0 && isPullRequestEvent(s.run.eventName, event.facts)) {
    const cmp = await compareWithBase(d.git, s.workingDirectory, pr.baseSha);
    if (cmp.ok) {
      newRows = cmp.newRows;
      addedFiles = cmp.added;
      const files = Object.keys(cmp.newRows);
      info(
        files.length === 0
          ? `Pull request #${pr.number} changes no file under ${s.workingDirectory}: no row is checked.`
          : `Pull request #${pr.number}: checking the rows it adds to ${plural(files.length, 'changed file')}.`,
      );
      for (const f of cmp.added)
        info(`${visible(f)} is new in this pull request: only its last row is checked.`);
    } else {
      baseNote = cmp.note;
      core.notice(cmp.note);
    }
  }

  // Outputs are checked before the job: none may be an input or share a path with another.
  const failures: string[] = [];
  const before = await inputGuard(s.workingDirectory, s.config);
  const wanted = (
    [
      ['results', s.results],
      ['markdown', s.markdown],
      ['html', s.html],
    ] as const
  ).flatMap(([label, file]) => (file ? [{ label, path: file }] : []));
  const blocked = new Set<string>();
  for (const p of outputProblems(wanted, before)) {
    blocked.add(p.label);
    failures.push(p.message);
  }

  // Whatever happens in the job, the results file, outputs and summary are written.
  let source: RunOutput;
  let jobError: unknown = null;
  const mergeFiles: string[] = [];
  try {
    if (s.merge.length > 0) {
      // Results files instead of CSVs: a matrix's shards, or a fork's artifact under workflow_run.
      mergeFiles.push(...(await resultsFiles(s)));
      const trusted = await trustedPullRequest(d, s, event.facts, token);
      if (trusted?.dest) dest = trusted.dest;
      info(`Merging ${plural(mergeFiles.length, 'results file')}.`);
      const merged = await mergeResults(mergeFiles, {
        failOn: s.failOn,
        ...(trusted?.expect ? { expect: trusted.expect } : {}),
      });
      source = merged;
    } else
      source = await d.job({
        cwd: s.workingDirectory,
        configPath: s.config,
        failOn: s.failOn,
        jobs: s.jobs,
        fullHistory: s.fullHistory,
        shard: s.shard,
        commit: await headCommit(d.git, s.workingDirectory),
        event: s.run.eventName
          ? {
              name: s.run.eventName,
              pullRequest: pr?.number ?? null,
              base: pr?.baseSha ?? null,
              head: pr?.headSha ?? null,
            }
          : null,
        ...(newRows ? { newRows, addedFiles } : {}),
        ...(baseNote ? { baseNote } : {}),
      });
  } catch (e) {
    jobError = e;
    source = heldRun(failedRun(e, s));
  }
  try {
    await afterJob(d, s, source, jobError, mergeFiles, { before, blocked, failures, link, dest, key, token });
  } finally {
    source.close?.();
  }
}

/** What runAction works out before the job and the rest of it needs after. */
interface Context {
  before: Awaited<ReturnType<typeof inputGuard>>;
  blocked: Set<string>;
  failures: string[];
  link: string | null;
  dest: Destination;
  key: string;
  token: string;
}

/** Outputs, summary, publishing, annotations and the gate, from what the job (or merge) produced. */
async function afterJob(
  d: ActionDeps,
  s: Settings,
  source: RunOutput,
  jobError: unknown,
  mergeFiles: string[],
  { before, blocked, failures, link, dest, key, token }: Context,
): Promise<void> {
  // The series the reports show in detail are read back in full; the results file streams them all.
  const requests: ReportRequest[] = [
    { markdown: { maxChars: s.markdown ? Number.MAX_SAFE_INTEGER : SUMMARY_FIRST_TRY } },
    { markdown: { maxChars: COMMENT_MAX_CHARS, detail: 'brief' } },
    ...(s.html ? (['html'] as const) : []),
  ];
  const results = await source.detailed(reportDetail(source.lean, requests));
  info(`Leadline: ${VERDICT_LABEL[results.verdict]}. ${results.gate.reason}`);

  // Output files. A failure here fails the step after everything else is done.
  const guard = new InputGuard(s.workingDirectory, s.config, before.patterns, [
    ...filesRead(results),
    ...mergeFiles,
  ]);
  const save = async (
    file: string,
    label: string,
    text: () => string | Iterable<string> | AsyncIterable<string>,
  ) => {
    if (blocked.has(label)) return;
    try {
      if (await isTracked(d.git, s.workspace, file))
        throw new Error(
          `refusing to write to ${file}: it is a file of the repository. Choose a path outside it, e.g. under $RUNNER_TEMP.`,
        );
      await writeOutput(file, text(), guard, label);
      info(`Wrote ${label}: ${file}`);
    } catch (e) {
      failures.push(isLeadlineError(e) ? e.describe() : `${label}: ${(e as Error).message}`);
    }
  };
  await save(s.results, 'results', () => resultsJsonOf(source));
  if (s.markdown)
    await save(s.markdown, 'markdown', () =>
      d.renderMarkdown(results, { maxChars: Number.MAX_SAFE_INTEGER, fullReportNote: fullReportNote(link) }),
    );
  if (s.html) await save(s.html, 'html', () => d.renderHtml(results));

  core.setOutput('verdict', results.verdict);
  core.setOutput('alarms', String(results.summary.alarms));
  core.setOutput('at-risk', String(results.summary.atRisk));
  core.setOutput('results', failures.some((f) => f.startsWith('results')) ? '' : s.results);

  // The summary is written before publishing, so a stalled API cannot lose it.
  const footer = failures.map((f) => `❌ ${escapeText(f)}`);
  const suffix = footer.length > 0 ? `\n\n---\n\n${footer.join('\n\n')}\n` : '';
  let summary = '';
  if (s.shard && !jobError) summary = shardSummary(results, s.results, suffix);
  else
    try {
      if (jobError) throw jobError;
      summary = fitRendering(
        (maxChars) => d.renderMarkdown(results, { maxChars, fullReportNote: fullReportNote(link) }),
        SUMMARY_FIRST_TRY,
        SUMMARY_MAX_BYTES - SUMMARY_FOOTER_ROOM,
        suffix,
      );
    } catch (e) {
      // A renderer bug (or a job that never finished) must not cost the summary its verdict.
      const why =
        e === jobError
          ? escapeText(
              isLeadlineError(e)
                ? e.describe()
                : `Leadline stopped on an unexpected error (please report it): ${(e as Error)?.message ?? String(e)}`,
            )
          : `The report could not be rendered (${escapeText((e as Error).message)}); the results file has everything.`;
      summary =
        e === jobError
          ? `## Leadline could not run\n\n${why}\n${suffix}`
          : `## Leadline: ${results.verdict}\n\n${escapeText(results.gate.reason)}\n\n${why}${suffix}`;
      if (e !== jobError) failures.push(`summary: the report could not be rendered: ${(e as Error).message}`);
    }
  await writeSummary(s, summary);

  const published = jobError
    ? { url: null, action: 'skipped', warning: null }
    : await publishWithin(s.run.publishTimeoutMs, (signal) =>
        tryPublish(d, s, dest, results, key, link, token, signal),
      );
  core.setOutput('comment-url', published.url ?? '');
  if (published.warning) warn(published.warning);
  const after: string[] = [];
  if (published.url) after.push(`Report ${published.action}: ${published.url}`);
  if (published.warning) after.push(`⚠️ ${escapeText(published.warning)}`);
  if (after.length > 0) await writeSummary(s, `\n---\n\n${after.join('\n\n')}\n`);

  // A shard's gate and annotations would judge its part alone: the merge job gives the run's.
  const gateFails = !results.gate.passed && !s.shard;
  if (!s.shard)
    try {
      const plan = planAnnotations(
        results,
        { cwd: s.workingDirectory, workspace: s.workspace },
        { warning: used.warning, error: used.error + failures.length + (gateFails ? 1 : 0) },
      );
      for (const a of plan.shown) annotate(a);
      if (plan.overflow) annotate(plan.overflow);
    } catch (e) {
      failures.push(`annotations: ${(e as Error).message}`);
    }

  for (const f of failures) {
    used.error++;
    core.error(`Leadline: ${f}`);
  }
  if (jobError) throw jobError;
  if (gateFails) core.setFailed(results.gate.reason);
  else if (failures.length > 0) core.setFailed(`Leadline could not write ${failures.length} output file(s).`);
}

/** The GitHub API for this repository with the run's settings. */
function apiOf(
  d: ActionDeps,
  s: Settings,
  repository: { owner: string; repo: string },
  token: string,
  signal?: AbortSignal,
): IssueApi {
  return d.github({
    token,
    owner: repository.owner,
    repo: repository.repo,
    apiUrl: s.run.apiUrl,
    retryBaseMs: s.run.retryBaseMs,
    requestTimeoutMs: s.run.requestTimeoutMs,
    ...(signal ? { signal } : {}),
  });
}

/** A shard's job summary: what it judged and where the run's report comes from. */
function shardSummary(r: Results, file: string, suffix: string): string {
  const sh = r.origin.shard;
  const part = sh ? `shard ${shardLabel(sh)}: ${r.series.length} of ${sh.series} series` : 'this shard';
  return (
    `## Leadline: ${part} judged\n\nThe results are in \`${escapeText(file)}\`. This shard's verdict and ` +
    'adjusted p-values cover its part only; the job that merges every shard (`merge` input) publishes ' +
    `the run's report and gate.\n${suffix}`
  );
}

/** The `merge` input's files: paths or globs relative to the working directory, each match once, sorted. */
async function resultsFiles(s: Settings): Promise<string[]> {
  const found = await glob(s.merge, { cwd: s.workingDirectory, absolute: true, onlyFiles: true, dot: true });
  if (found.length === 0)
    throw new LeadlineError(
      'usage',
      `merge: no file matches ${s.merge.map((m) => JSON.stringify(visible(m))).join(', ')} under ${s.workingDirectory}. Download the results artifacts there first (actions/download-artifact).`,
    );
  return [...new Set(found)].sort();
}

/**
 * Under `workflow_run`, the pull request to publish on (from GitHub's account of the finished run,
 * never from the results files) and what every file must then claim. Under a pull_request event (a
 * matrix merge in the same workflow) the event's own pull request is expected of every file.
 */
async function trustedPullRequest(
  d: ActionDeps,
  s: Settings,
  facts: EventFacts,
  token: string,
): Promise<{ dest: Destination | null; expect: ExpectedEvent | null } | null> {
  const wr = facts.workflowRun;
  if (s.run.eventName === 'workflow_run' && wr) {
    if (!PR_EVENT_NAMES.has(wr.event))
      // A run of push or schedule: the comment input resolves as for that event (auto: tracking issue).
      return {
        dest: destination(s.comment, wr.event, { pullRequest: null, workflowRun: null }),
        expect: null,
      };
    if (!token || !s.run.repository)
      throw new LeadlineError(
        'usage',
        'merge under workflow_run needs the token and GITHUB_REPOSITORY to find the pull request: nothing is published.',
      );
    const pr = await workflowRunPullRequest(wr, apiOf(d, s, s.run.repository, token));
    info(
      `Publishing for pull request #${pr.number} at ${pr.headSha.slice(0, 12)}, as the workflow_run event says.`,
    );
    const dest: Destination | null =
      s.comment.kind === 'auto' || s.comment.kind === 'pull-request'
        ? { kind: 'comment', issue: pr.number, what: 'pull request' }
        : null;
    return { dest, expect: { pullRequest: pr.number, head: pr.headSha } };
  }
  const pr = facts.pullRequest;
  return pr?.headSha ? { dest: null, expect: { pullRequest: pr.number, head: pr.headSha } } : null;
}

/**
 * Runs the publishing stage with a deadline: past `ms` its requests are abandoned and the stage
 * reports that it stopped, naming the limit.
 */
async function publishWithin(
  ms: number,
  stage: (signal: AbortSignal) => Promise<Published>,
): Promise<Published> {
  const stop = new AbortController();
  let timer: NodeJS.Timeout | undefined;
  const late = new Promise<Published>((resolve) => {
    timer = setTimeout(() => {
      stop.abort();
      resolve({
        url: null,
        action: 'failed',
        warning: `Publishing the report stopped after ${limitText(ms)}, Leadline's limit for the publishing stage: the GitHub API did not answer in time. The verdict, job summary, outputs and results file are unaffected; the next run will try again.`,
      });
    }, ms);
  });
  try {
    return await Promise.race([stage(stop.signal), late]);
  } finally {
    clearTimeout(timer);
  }
}

interface Published {
  url: string | null;
  action: string;
  warning: string | null;
}

/** Posts the report where it belongs. Never throws: a failure becomes a warning explaining the fix. */
async function tryPublish(
  d: ActionDeps,
  s: Settings,
  dest: Destination,
  results: Results,
  key: string,
  link: string | null,
  token: string,
  signal: AbortSignal,
): Promise<Published> {
  if (dest.kind === 'none') {
    if (dest.why) return { url: null, action: 'skipped', warning: dest.why };
    info('No comment or tracking issue for this event (comment: off, or an event without one).');
    return { url: null, action: 'skipped', warning: null };
  }
  const where = dest.kind === 'comment' ? `${dest.what} #${dest.issue}` : 'the tracking issue';
  if (!token)
    return {
      url: null,
      action: 'skipped',
      warning: `No token, so the report was not posted to ${where}: leave the token input at its default (the workflow token) or pass one.`,
    };
  if (!s.run.repository)
    return {
      url: null,
      action: 'skipped',
      warning: `GITHUB_REPOSITORY is not set, so the report was not posted to ${where}.`,
    };
  const api = apiOf(d, s, s.run.repository, token, signal);
  // The renderer counts the marker within maxChars; withMarker and cutTo only guard a renderer that
  // leaves it out.
  const body = (mark: string) =>
    cutTo(
      withMarker(
        fitRendering(
          (maxChars) =>
            d.renderMarkdown(results, {
              maxChars,
              fullReportNote: fullReportNote(link),
              marker: mark,
              detail: 'brief',
            }),
          COMMENT_MAX_CHARS,
          COMMENT_MAX_BYTES,
        ),
        mark,
      ),
      COMMENT_MAX_CHARS,
      COMMENT_MAX_BYTES,
    );
  try {
    if (dest.kind === 'comment') {
      const mark = marker('report', key);
      const out = await upsertComment(api, dest.issue, mark, body(mark));
      info(
        `Report ${out.action} on ${where}: ${out.url}${out.removed ? ` (${plural(out.removed, 'duplicate')} removed)` : ''}`,
      );
      for (const n of out.notes) info(n);
      return { url: out.url, action: out.action, warning: out.notes.length > 0 ? out.notes.join(' ') : null };
    }
    const mark = marker('tracking', key);
    const out = await syncTrackingIssue(api, {
      mark,
      label: s.issueLabel,
      labelColor: LABEL_COLOR,
      labelDescription: LABEL_DESCRIPTION,
      attention: needsAttention(results),
      title: trackingTitle(results, key),
      body: body(mark),
      closeNote: closeNote(link),
      reopenNote: reopenNote(results, link),
    });
    for (const n of out.notes) info(n);
    info(
      out.action === 'none'
        ? 'All clear and no tracking issue is open: nothing to post.'
        : `Tracking issue ${out.action}: ${out.url}`,
    );
    return { url: out.url, action: out.action, warning: null };
  } catch (e) {
    core.debug(`publishing failed: ${describeError(e)}`);
    return {
      url: null,
      action: 'failed',
      warning: publishWarning(
        e,
        where,
        dest.kind === 'comment' && dest.what === 'pull request' ? 'pull-requests' : 'issues',
      ),
    };
  }
}

function annotate(a: Annotation): void {
  const props = {
    title: a.title,
    ...(a.file ? { file: a.file } : {}),
    ...(a.startLine ? { startLine: a.startLine } : {}),
  };
  if (a.level === 'error') {
    used.error++;
    core.error(a.message, props);
  } else if (a.level === 'warning') {
    used.warning++;
    core.warning(a.message, props);
  } else core.notice(a.message, props);
}

/** Writes the job summary once; skipped (with a log line) outside a runner. Never throws. */
async function writeSummary(s: Settings, text: string): Promise<void> {
  if (!s.run.summaryPath) {
    info('GITHUB_STEP_SUMMARY is not set (not on a runner): no job summary written.');
    return;
  }
  try {
    // What core.summary.write() does (append to the file), with the path read once in settings:
    // core.summary caches the first path it sees, which matters to in-process tests.
    await appendFile(s.run.summaryPath, text.endsWith('\n') ? text : `${text}\n`, 'utf8');
  } catch (e) {
    warn(`Leadline could not write the job summary: ${(e as Error).message}`);
  }
}
