#!/usr/bin/env node
import { createRequire as __leadlineCreateRequire } from 'node:module';
const require = __leadlineCreateRequire(import.meta.url);
import {
  FAIL_ON_DEFAULT,
  InputGuard,
  LeadlineError,
  VERDICT_LABEL,
  VERSION,
  chanceSentence,
  checkOutputs,
  compareWithBase,
  didYouMean,
  filesRead,
  headCommit,
  inputGuard,
  isLeadlineError,
  isPoolWorker,
  levelLabel,
  mergeResults,
  needsAttention,
  numsApart,
  parseFailOn,
  parseJobs,
  parseShard,
  placement,
  plural,
  renderHtml,
  renderMarkdown,
  reportDetail,
  reportOrder,
  resultsJsonOf,
  safeStream,
  shardLabel,
  shorten,
  startJob,
  systemGit,
  visible,
  withUnit,
  writeOutput
} from "./chunks/chunk-J3FEWN2H.js";
import "./chunks/chunk-65SWZLSQ.js";

// src/cli/main.ts
import { readFile } from "node:fs/promises";
import path from "node:path";

// src/cli/args.ts
import { parseArgs } from "node:util";
var HELP = `leadline \u2014 judge metric CSVs against their forecasts and warn before limits are crossed

Usage:
  leadline run [options]
  leadline merge RESULTS.json... [output and gate options]
  leadline --help | --version

Options for run:
  --config FILE        config file, relative to --cwd (default .github/leadline.yml)
  --cwd DIR            working directory for the config and metric files (default: current directory)
  --json FILE          write the results JSON (version 1) to FILE
  --markdown FILE      write the markdown report to FILE
  --html FILE          write the self-contained HTML report to FILE
  --template FILE      render the markdown report with this handlebars template instead of the built-in one
  --base REF           judge what changed since REF (a commit or branch), as the Action does for a
                       pull request: only the rows added to metric files since REF, and only their
                       series gate the run
  --comment FILE       write the brief markdown report a pull-request comment shows to FILE
  --fail-on LIST       what fails the run: alarm, limit, alarm,limit (or both), never (default both:
                       any alarm or limit at risk); errors fail it under every value, never included
  --print MODE         what to print on stdout: summary (default), markdown, json, none
  --color / --no-color force colour on or off (default: on for a terminal, off when NO_COLOR is set)
  --quiet              no progress lines on stderr
  --shard I/N          judge only shard I of N (series split by a hash of their names); needs
                       --json; the shard publishes nothing and exits 0 once its file is written
  --jobs N             worker threads for the analysis: a number, or auto (default: one per core);
                       the results are the same whatever the number
  --full-history       keep every point of history and the per-step backtest measures in the
                       results JSON (default: the last 60 points, what the charts draw)
  -h, --help           show this help
  -V, --version        show the version

merge reads the results files of every shard of one run (run --shard I/N --json FILE), checks that
they come from one config and commit and cover every shard once, and concludes the run as a single
run would: run-wide false-alarm control over every checked observation, verdicts and the gate. It
takes --json, --markdown, --html, --template, --print, --fail-on, --color and --quiet as run does.
Given one whole run's results file, it renders and gates it again.

Output files are written whole or not at all (a temporary file renamed into place); the metric
CSVs and the config are never written. An output path that names an input file is refused.

Exit codes:
  0  the gate passed
  1  the gate failed (alarms or limits at risk, per --fail-on)
  2  usage, config or data errors, whatever --fail-on says (results are still written when the
     config could be read)

Forecasts are estimates with stated uncertainty, not guarantees.
`;
function parseCli(argv, env, cwd, isTTY) {
  let parsed;
  try {
    parsed = parseArgs({ args: argv, allowPositionals: true, strict: true, options: OPTIONS });
  } catch (e) {
    throw new LeadlineError(
      "usage",
      `${flagProblem(e)} Run "leadline --help" for the options.`
    );
  }
  const v = parsed.values;
  const base = {
    config: v.config ?? ".github/leadline.yml",
    cwd: v.cwd ?? cwd,
    json: v.json ?? null,
    markdown: v.markdown ?? null,
    html: v.html ?? null,
    template: v.template ?? null,
    failOn: parseFailOn(v["fail-on"] ?? FAIL_ON_DEFAULT.command, "command"),
    base: v.base ?? null,
    comment: v.comment ?? null,
    print: parsePrint(v.print ?? "summary"),
    color: v["no-color"] ? false : v.color ? true : isTTY && !env.NO_COLOR,
    progress: !v.quiet,
    shard: v.shard === void 0 ? null : parseShard(v.shard, "--shard"),
    files: [],
    jobs: parseJobs(v.jobs ?? "auto", "--jobs"),
    fullHistory: v["full-history"] ?? false
  };
  if (v.help) return { ...base, command: "help" };
  if (v.version) return { ...base, command: "version" };
  const [command, ...rest] = parsed.positionals;
  if (command === void 0)
    throw new LeadlineError(
      "usage",
      'No command given. Usage: leadline run [options], or leadline merge FILE...; see "leadline --help".'
    );
  if (command === "merge") {
    for (const only of ["config", "cwd", "shard"])
      if (v[only] !== void 0)
        throw new LeadlineError(
          "usage",
          `--${only} is for "leadline run"; merge reads only the results files it is given.`
        );
    if (rest.length === 0)
      throw new LeadlineError(
        "usage",
        "merge needs the results files of every shard, e.g. leadline merge shard-*.json --markdown report.md."
      );
    return { ...base, command: "merge", files: rest };
  }
  if (command !== "run")
    throw new LeadlineError(
      "usage",
      `Unknown command "${command}". The commands are "run" and "merge"; see "leadline --help".`
    );
  if (rest.length > 0)
    throw new LeadlineError("usage", `Unexpected argument "${rest[0]}". See "leadline --help".`);
  if (base.shard && !base.json)
    throw new LeadlineError(
      "usage",
      `--shard needs --json FILE: a shard's results file is what "leadline merge" reads.`
    );
  return { ...base, command: "run" };
}
function parsePrint(value) {
  if (PRINT_MODES.includes(value)) return value;
  throw new LeadlineError(
    "usage",
    `--print: "${value}" is not valid; expected summary, markdown, json or none.${didYouMean(value, PRINT_MODES)}`
  );
}
var PRINT_MODES = ["summary", "markdown", "json", "none"];
var OPTIONS = {
  config: { type: "string" },
  cwd: { type: "string" },
  json: { type: "string" },
  markdown: { type: "string" },
  html: { type: "string" },
  template: { type: "string" },
  "fail-on": { type: "string" },
  base: { type: "string" },
  comment: { type: "string" },
  print: { type: "string" },
  color: { type: "boolean" },
  "no-color": { type: "boolean" },
  quiet: { type: "boolean" },
  shard: { type: "string" },
  jobs: { type: "string" },
  "full-history": { type: "boolean" },
  help: { type: "boolean", short: "h" },
  version: { type: "boolean", short: "V" }
};
var FLAGS = Object.keys(OPTIONS).map((o) => `--${o}`);
function flagProblem(e) {
  const unknown = /^Unknown option '([^']+)'/.exec(e.message);
  if (e.code === "ERR_PARSE_ARGS_UNKNOWN_OPTION" && unknown) {
    const flag = unknown[1];
    const bare = flag.replace(/=.*$/, "");
    return `Unknown option "${flag}".${didYouMean(bare, FLAGS)}`;
  }
  return `${e.message.replace(/\.$/, "")}.`;
}

// src/cli/summary.ts
var CODES = { red: 31, green: 32, yellow: 33, blue: 34, dim: 2, bold: 1 };
var COLOUR = {
  ok: "green",
  alarm: "red",
  "at-risk": "yellow",
  "too-short": "dim",
  error: "red"
};
var WORD_WIDTH = Math.max(...Object.values(VERDICT_LABEL).map((w) => w.length));
function clean(s) {
  return visible(shorten(s, 200));
}
function line(s, paint) {
  const tag = paint(COLOUR[s.verdict], VERDICT_LABEL[s.verdict].padEnd(WORD_WIDTH));
  const last = s.checked.at(-1);
  const shown = last ? numsApart([last.value, last.lower, last.upper], 5, { grouping: false }) : [];
  const judged = last ? ` ${clean(withUnit(shown[0], s.unit))} vs ${levelLabel(last.level)} interval ${clean(withUnit(`${shown[1]} \u2026 ${shown[2]}`, s.unit))}: ${placement(s, last)}` : "";
  const method = s.method ? paint("dim", ` [${s.method}, ${s.intervalKind}]`) : "";
  const why = s.reason && (s.verdict !== "ok" || !last) ? paint("dim", ` \u2014 ${clean(s.reason)}`) : "";
  return `  ${tag}  ${clean(s.name)}${method}${judged}${why}`;
}
function renderSummary(r, color) {
  const paint = (c, s2) => color ? `\x1B[${CODES[c]}m${s2}\x1B[0m` : s2;
  const out = [];
  const s = r.summary;
  out.push(
    `${paint("bold", "Leadline")}: ${paint(COLOUR[r.verdict], VERDICT_LABEL[r.verdict])} \u2014 ${s.series} series, ${plural(s.checkedObservations, "observation")} checked, ${plural(s.alarms, "alarm")}, ${plural(s.atRisk, "limit")} at risk`
  );
  const sorted = reportOrder(r);
  const shown = sorted.length > 40 ? sorted.filter((x) => needsAttention(x)) : sorted;
  for (const x of shown) out.push(line(x, paint));
  if (shown.length < sorted.length)
    out.push(paint("dim", `  \u2026 and ${sorted.length - shown.length} more series needing no attention`));
  for (const p of r.problems) {
    const where = [p.file, p.line, p.column].filter((v) => v !== null).join(":");
    out.push(`  ${paint("red", "problem")} ${clean(where ? `${where}: ` : "")}${clean(p.message)}`);
  }
  for (const n of r.notes ?? []) out.push(`  ${paint("blue", "note")} ${clean(n)}`);
  out.push(paint("dim", chanceSentence(r)));
  out.push(paint(r.gate.passed ? "green" : "red", r.gate.reason));
  out.push(paint("dim", "Forecasts are estimates with stated uncertainty, not guarantees."));
  return out.join("\n") + "\n";
}

// src/cli/main.ts
async function main(argv, given) {
  const io = { ...given, stdout: safeStream(given.stdout), stderr: safeStream(given.stderr) };
  let settings;
  try {
    settings = parseCli(argv, io.env, io.cwd, Boolean(io.stdout.isTTY));
  } catch (e) {
    return fail(e, io);
  }
  if (settings.command === "help") {
    io.stdout.write(HELP);
    return 0;
  }
  if (settings.command === "version") {
    io.stdout.write(`leadline ${VERSION}
`);
    return 0;
  }
  let out;
  try {
    const template = settings.template ? await readTemplate(path.resolve(io.cwd, settings.template)) : void 0;
    const outputs = [
      [settings.json, "--json"],
      [settings.markdown, "--markdown"],
      [settings.html, "--html"],
      [settings.comment, "--comment"]
    ].flatMap(([p, label]) => p ? [{ path: path.resolve(io.cwd, p), label }] : []);
    const done = settings.command === "merge" ? await merge(settings, io, outputs) : await run(settings, io, outputs);
    out = done;
    const results = done.lean;
    const markdownOptions = {
      ...template ? { template } : {},
      fullReportNote: fullNote(settings)
    };
    const briefOptions = { detail: "brief", fullReportNote: fullNote(settings) };
    const requests = [
      ...settings.markdown || settings.print === "markdown" ? [{ markdown: markdownOptions }] : [],
      ...settings.comment ? [{ markdown: briefOptions }] : [],
      ...settings.html ? ["html"] : []
    ];
    let shown = null;
    const detailed = async () => shown ??= await done.detailed(reportDetail(results, requests));
    const markdown = async () => renderMarkdown(await detailed(), markdownOptions);
    if (settings.json)
      await writeOutput(path.resolve(io.cwd, settings.json), resultsJsonOf(out), out.inputs, "--json");
    if (settings.markdown)
      await writeOutput(path.resolve(io.cwd, settings.markdown), await markdown(), out.inputs, "--markdown");
    if (settings.html)
      await writeOutput(
        path.resolve(io.cwd, settings.html),
        renderHtml(await detailed()),
        out.inputs,
        "--html"
      );
    if (settings.comment)
      await writeOutput(
        path.resolve(io.cwd, settings.comment),
        renderMarkdown(await detailed(), briefOptions),
        out.inputs,
        "--comment"
      );
    if (settings.shard && results.origin.shard) {
      const sh = results.origin.shard;
      io.stderr.write(
        `leadline: shard ${shardLabel(sh)} judged ${results.series.length} of ${sh.series} series; results in ${settings.json}. "leadline merge" of every shard's file gives the run's verdict and gate.
`
      );
      if (settings.print === "summary") return 0;
    }
    if (settings.print === "summary") {
      io.stdout.write(renderSummary(results, settings.color));
      for (const [p, what] of [
        [settings.comment, "Comment (brief markdown)"],
        [settings.markdown, "Full markdown report"],
        [settings.html, "HTML report"],
        [settings.json, "Results JSON"]
      ])
        if (p) io.stdout.write(`${what}: ${p}
`);
    } else if (settings.print === "markdown") io.stdout.write(await markdown());
    else if (settings.print === "json") for await (const piece of resultsJsonOf(out)) io.stdout.write(piece);
  } catch (e) {
    return fail(e, io);
  } finally {
    out?.close?.();
  }
  if (settings.shard) return 0;
  if (out.lean.problems.length > 0) return 2;
  return out.lean.gate.passed ? 0 : 1;
}
async function changedSince(cwd, ref) {
  if (ref.startsWith("-"))
    throw new LeadlineError("usage", `--base: "${ref}" is not a commit or branch name.`);
  const rev = await systemGit.run(
    ["rev-parse", "--verify", "--quiet", "--end-of-options", `${ref}^{commit}`],
    { cwd }
  );
  const sha = rev.code === 0 ? rev.stdout.toString("utf8").trim() : "";
  if (!/^[0-9a-f]{40,64}$/.test(sha))
    throw new LeadlineError(
      "usage",
      rev.code === -1 ? `--base: git is not available (${rev.stderr.trim()}).` : `--base: "${ref}" is not a commit or branch of the repository at ${cwd}.`
    );
  const cmp = await compareWithBase(systemGit, cwd, sha);
  if (!cmp.ok) throw new LeadlineError("usage", `--base: ${cmp.note}`);
  return { newRows: cmp.newRows, added: cmp.added };
}
async function run(settings, io, outputs) {
  const cwd = path.resolve(io.cwd, settings.cwd);
  const before = await inputGuard(cwd, settings.config);
  checkOutputs(outputs, before);
  let lastShown = 0;
  const started = Date.now();
  const since = settings.base ? await changedSince(cwd, settings.base) : null;
  const run2 = await startJob({
    cwd,
    configPath: settings.config,
    failOn: settings.failOn,
    ...since ? { newRows: since.newRows, addedFiles: since.added } : {},
    shard: settings.shard,
    jobs: settings.jobs,
    fullHistory: settings.fullHistory,
    commit: await headCommit(systemGit, cwd),
    onProgress: (done, total) => {
      if (!settings.progress || total < 200) return;
      const now = Date.now();
      if (done === total || now - started > 1e3 && now - lastShown > 1e3) {
        lastShown = now;
        io.stderr.write(`leadline: analysed ${done} of ${total} series
`);
      }
    }
  });
  return { ...run2, inputs: new InputGuard(cwd, settings.config, before.patterns, filesRead(run2.lean)) };
}
async function merge(settings, io, outputs) {
  const files = settings.files.map((f) => path.resolve(io.cwd, f));
  const inputs = new InputGuard(io.cwd, files[0], [], files);
  checkOutputs(outputs, inputs);
  const merged = await mergeResults(files, { failOn: settings.failOn });
  return { ...merged, inputs };
}
async function readTemplate(file) {
  try {
    return await readFile(file, "utf8");
  } catch (e) {
    throw new LeadlineError(
      "usage",
      `--template: cannot read ${file}: ${e.code ?? e.message}`
    );
  }
}
function fullNote(s) {
  const where = [s.json && `the results JSON (${s.json})`, s.html && `the HTML report (${s.html})`].filter(
    Boolean
  );
  return where.length > 0 ? `The full report is in ${where.join(" and ")}.` : "Run with --json or --html for the full report.";
}
function fail(e, io) {
  if (isLeadlineError(e)) {
    io.stderr.write(`leadline: ${e.describe()}
`);
    return 2;
  }
  throw e;
}

// src/cli/index.ts
if (!isPoolWorker()) start();
function start() {
  process.stdout.on("error", (e) => {
    if (e.code !== "EPIPE") throw e;
  });
  main(process.argv.slice(2), {
    stdout: process.stdout,
    stderr: process.stderr,
    env: process.env,
    cwd: process.cwd()
  }).then(
    (code) => {
      process.exitCode = code;
    },
    (e) => {
      process.stderr.write(
        `leadline: internal error: ${e instanceof Error ? e.stack ?? e.message : String(e)}
`
      );
      process.exitCode = 2;
    }
  );
}
