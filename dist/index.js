import { createRequire as __leadlineCreateRequire } from 'node:module';
const require = __leadlineCreateRequire(import.meta.url);
import {
  FAIL_ON_DEFAULT,
  InputGuard,
  LeadlineError,
  RESULTS_SCHEMA_ID,
  STEP_UNIT,
  VERDICT_LABEL,
  VERSION,
  attentionCount,
  chance,
  compareWithBase,
  didYouMean,
  escapeMessage,
  filesRead,
  gateFailsOn,
  glob,
  headCommit,
  heldRun,
  inputGuard,
  isLeadlineError,
  isPoolWorker,
  isTracked,
  levelLabel,
  logSafe,
  mergeResults,
  num,
  numsApart,
  oneLine,
  outputProblems,
  pIs,
  parseFailOn,
  parseJobs,
  parseShard,
  plural,
  renderHtml,
  renderMarkdown,
  reportDetail,
  resultsJsonOf,
  rowRef,
  runNeedsAttention,
  shardLabel,
  startJob,
  systemGit,
  visible,
  windowWords,
  withUnit,
  writeOutput
} from "./chunks/chunk-J3FEWN2H.js";
import "./chunks/chunk-65SWZLSQ.js";

// src/action/main.ts
import { appendFile as appendFile2 } from "node:fs/promises";

// node_modules/@actions/core/lib/command.js
import * as os from "os";

// node_modules/@actions/core/lib/utils.js
function toCommandValue(input) {
  if (input === null || input === void 0) {
    return "";
  } else if (typeof input === "string" || input instanceof String) {
    return input;
  }
  return JSON.stringify(input);
}
function toCommandProperties(annotationProperties) {
  if (!Object.keys(annotationProperties).length) {
    return {};
  }
  return {
    title: annotationProperties.title,
    file: annotationProperties.file,
    line: annotationProperties.startLine,
    endLine: annotationProperties.endLine,
    col: annotationProperties.startColumn,
    endColumn: annotationProperties.endColumn
  };
}

// node_modules/@actions/core/lib/command.js
function issueCommand(command, properties, message) {
  const cmd = new Command(command, properties, message);
  process.stdout.write(cmd.toString() + os.EOL);
}
var CMD_STRING = "::";
var Command = class {
  constructor(command, properties, message) {
    if (!command) {
      command = "missing.command";
    }
    this.command = command;
    this.properties = properties;
    this.message = message;
  }
  toString() {
    let cmdStr = CMD_STRING + this.command;
    if (this.properties && Object.keys(this.properties).length > 0) {
      cmdStr += " ";
      let first = true;
      for (const key in this.properties) {
        if (this.properties.hasOwnProperty(key)) {
          const val = this.properties[key];
          if (val) {
            if (first) {
              first = false;
            } else {
              cmdStr += ",";
            }
            cmdStr += `${key}=${escapeProperty(val)}`;
          }
        }
      }
    }
    cmdStr += `${CMD_STRING}${escapeData(this.message)}`;
    return cmdStr;
  }
};
function escapeData(s) {
  return toCommandValue(s).replace(/%/g, "%25").replace(/\r/g, "%0D").replace(/\n/g, "%0A");
}
function escapeProperty(s) {
  return toCommandValue(s).replace(/%/g, "%25").replace(/\r/g, "%0D").replace(/\n/g, "%0A").replace(/:/g, "%3A").replace(/,/g, "%2C");
}

// node_modules/@actions/core/lib/file-command.js
import * as crypto from "crypto";
import * as fs from "fs";
import * as os2 from "os";
function issueFileCommand(command, message) {
  const filePath = process.env[`GITHUB_${command}`];
  if (!filePath) {
    throw new Error(`Unable to find environment variable for file command ${command}`);
  }
  if (!fs.existsSync(filePath)) {
    throw new Error(`Missing file at path: ${filePath}`);
  }
  fs.appendFileSync(filePath, `${toCommandValue(message)}${os2.EOL}`, {
    encoding: "utf8"
  });
}
function prepareKeyValueMessage(key, value) {
  const delimiter = `ghadelimiter_${crypto.randomUUID()}`;
  const convertedValue = toCommandValue(value);
  if (key.includes(delimiter)) {
    throw new Error(`Unexpected input: name should not contain the delimiter "${delimiter}"`);
  }
  if (convertedValue.includes(delimiter)) {
    throw new Error(`Unexpected input: value should not contain the delimiter "${delimiter}"`);
  }
  return `${key}<<${delimiter}${os2.EOL}${convertedValue}${os2.EOL}${delimiter}`;
}

// node_modules/@actions/core/lib/core.js
import * as os4 from "os";

// node_modules/@actions/core/lib/summary.js
import { EOL as EOL3 } from "os";
import { constants, promises } from "fs";
var __awaiter = function(thisArg, _arguments, P, generator) {
  function adopt(value) {
    return value instanceof P ? value : new P(function(resolve) {
      resolve(value);
    });
  }
  return new (P || (P = Promise))(function(resolve, reject) {
    function fulfilled(value) {
      try {
        step(generator.next(value));
      } catch (e) {
        reject(e);
      }
    }
    function rejected(value) {
      try {
        step(generator["throw"](value));
      } catch (e) {
        reject(e);
      }
    }
    function step(result) {
      result.done ? resolve(result.value) : adopt(result.value).then(fulfilled, rejected);
    }
    step((generator = generator.apply(thisArg, _arguments || [])).next());
  });
};
var { access, appendFile, writeFile } = promises;
var SUMMARY_ENV_VAR = "GITHUB_STEP_SUMMARY";
var Summary = class {
  constructor() {
    this._buffer = "";
  }
  /**
   * Finds the summary file path from the environment, rejects if env var is not found or file does not exist
   * Also checks r/w permissions.
   *
   * @returns step summary file path
   */
  filePath() {
    return __awaiter(this, void 0, void 0, function* () {
      if (this._filePath) {
        return this._filePath;
      }
      const pathFromEnv = process.env[SUMMARY_ENV_VAR];
      if (!pathFromEnv) {
        throw new Error(`Unable to find environment variable for $${SUMMARY_ENV_VAR}. Check if your runtime environment supports job summaries.`);
      }
      try {
        yield access(pathFromEnv, constants.R_OK | constants.W_OK);
      } catch (_a) {
        throw new Error(`Unable to access summary file: '${pathFromEnv}'. Check if the file has correct read/write permissions.`);
      }
      this._filePath = pathFromEnv;
      return this._filePath;
    });
  }
  /**
   * Wraps content in an HTML tag, adding any HTML attributes
   *
   * @param {string} tag HTML tag to wrap
   * @param {string | null} content content within the tag
   * @param {[attribute: string]: string} attrs key-value list of HTML attributes to add
   *
   * @returns {string} content wrapped in HTML element
   */
  wrap(tag, content, attrs = {}) {
    const htmlAttrs = Object.entries(attrs).map(([key, value]) => ` ${key}="${value}"`).join("");
    if (!content) {
      return `<${tag}${htmlAttrs}>`;
    }
    return `<${tag}${htmlAttrs}>${content}</${tag}>`;
  }
  /**
   * Writes text in the buffer to the summary buffer file and empties buffer. Will append by default.
   *
   * @param {SummaryWriteOptions} [options] (optional) options for write operation
   *
   * @returns {Promise<Summary>} summary instance
   */
  write(options) {
    return __awaiter(this, void 0, void 0, function* () {
      const overwrite = !!(options === null || options === void 0 ? void 0 : options.overwrite);
      const filePath = yield this.filePath();
      const writeFunc = overwrite ? writeFile : appendFile;
      yield writeFunc(filePath, this._buffer, { encoding: "utf8" });
      return this.emptyBuffer();
    });
  }
  /**
   * Clears the summary buffer and wipes the summary file
   *
   * @returns {Summary} summary instance
   */
  clear() {
    return __awaiter(this, void 0, void 0, function* () {
      return this.emptyBuffer().write({ overwrite: true });
    });
  }
  /**
   * Returns the current summary buffer as a string
   *
   * @returns {string} string of summary buffer
   */
  stringify() {
    return this._buffer;
  }
  /**
   * If the summary buffer is empty
   *
   * @returns {boolen} true if the buffer is empty
   */
  isEmptyBuffer() {
    return this._buffer.length === 0;
  }
  /**
   * Resets the summary buffer without writing to summary file
   *
   * @returns {Summary} summary instance
   */
  emptyBuffer() {
    this._buffer = "";
    return this;
  }
  /**
   * Adds raw text to the summary buffer
   *
   * @param {string} text content to add
   * @param {boolean} [addEOL=false] (optional) append an EOL to the raw text (default: false)
   *
   * @returns {Summary} summary instance
   */
  addRaw(text, addEOL = false) {
    this._buffer += text;
    return addEOL ? this.addEOL() : this;
  }
  /**
   * Adds the operating system-specific end-of-line marker to the buffer
   *
   * @returns {Summary} summary instance
   */
  addEOL() {
    return this.addRaw(EOL3);
  }
  /**
   * Adds an HTML codeblock to the summary buffer
   *
   * @param {string} code content to render within fenced code block
   * @param {string} lang (optional) language to syntax highlight code
   *
   * @returns {Summary} summary instance
   */
  addCodeBlock(code, lang) {
    const attrs = Object.assign({}, lang && { lang });
    const element = this.wrap("pre", this.wrap("code", code), attrs);
    return this.addRaw(element).addEOL();
  }
  /**
   * Adds an HTML list to the summary buffer
   *
   * @param {string[]} items list of items to render
   * @param {boolean} [ordered=false] (optional) if the rendered list should be ordered or not (default: false)
   *
   * @returns {Summary} summary instance
   */
  addList(items, ordered = false) {
    const tag = ordered ? "ol" : "ul";
    const listItems = items.map((item) => this.wrap("li", item)).join("");
    const element = this.wrap(tag, listItems);
    return this.addRaw(element).addEOL();
  }
  /**
   * Adds an HTML table to the summary buffer
   *
   * @param {SummaryTableCell[]} rows table rows
   *
   * @returns {Summary} summary instance
   */
  addTable(rows) {
    const tableBody = rows.map((row) => {
      const cells = row.map((cell) => {
        if (typeof cell === "string") {
          return this.wrap("td", cell);
        }
        const { header, data, colspan, rowspan } = cell;
        const tag = header ? "th" : "td";
        const attrs = Object.assign(Object.assign({}, colspan && { colspan }), rowspan && { rowspan });
        return this.wrap(tag, data, attrs);
      }).join("");
      return this.wrap("tr", cells);
    }).join("");
    const element = this.wrap("table", tableBody);
    return this.addRaw(element).addEOL();
  }
  /**
   * Adds a collapsable HTML details element to the summary buffer
   *
   * @param {string} label text for the closed state
   * @param {string} content collapsable content
   *
   * @returns {Summary} summary instance
   */
  addDetails(label, content) {
    const element = this.wrap("details", this.wrap("summary", label) + content);
    return this.addRaw(element).addEOL();
  }
  /**
   * Adds an HTML image tag to the summary buffer
   *
   * @param {string} src path to the image you to embed
   * @param {string} alt text description of the image
   * @param {SummaryImageOptions} options (optional) addition image attributes
   *
   * @returns {Summary} summary instance
   */
  addImage(src, alt, options) {
    const { width, height } = options || {};
    const attrs = Object.assign(Object.assign({}, width && { width }), height && { height });
    const element = this.wrap("img", null, Object.assign({ src, alt }, attrs));
    return this.addRaw(element).addEOL();
  }
  /**
   * Adds an HTML section heading element
   *
   * @param {string} text heading text
   * @param {number | string} [level=1] (optional) the heading level, default: 1
   *
   * @returns {Summary} summary instance
   */
  addHeading(text, level) {
    const tag = `h${level}`;
    const allowedTag = ["h1", "h2", "h3", "h4", "h5", "h6"].includes(tag) ? tag : "h1";
    const element = this.wrap(allowedTag, text);
    return this.addRaw(element).addEOL();
  }
  /**
   * Adds an HTML thematic break (<hr>) to the summary buffer
   *
   * @returns {Summary} summary instance
   */
  addSeparator() {
    const element = this.wrap("hr", null);
    return this.addRaw(element).addEOL();
  }
  /**
   * Adds an HTML line break (<br>) to the summary buffer
   *
   * @returns {Summary} summary instance
   */
  addBreak() {
    const element = this.wrap("br", null);
    return this.addRaw(element).addEOL();
  }
  /**
   * Adds an HTML blockquote to the summary buffer
   *
   * @param {string} text quote text
   * @param {string} cite (optional) citation url
   *
   * @returns {Summary} summary instance
   */
  addQuote(text, cite) {
    const attrs = Object.assign({}, cite && { cite });
    const element = this.wrap("blockquote", text, attrs);
    return this.addRaw(element).addEOL();
  }
  /**
   * Adds an HTML anchor tag to the summary buffer
   *
   * @param {string} text link text/content
   * @param {string} href hyperlink
   *
   * @returns {Summary} summary instance
   */
  addLink(text, href) {
    const element = this.wrap("a", text, { href });
    return this.addRaw(element).addEOL();
  }
};
var _summary = new Summary();

// node_modules/@actions/core/lib/platform.js
import os3 from "os";

// node_modules/@actions/io/lib/io-util.js
import * as fs2 from "fs";
var { chmod, copyFile, lstat, mkdir, open, readdir, rename, rm, rmdir, stat, symlink, unlink } = fs2.promises;
var IS_WINDOWS = process.platform === "win32";
var READONLY = fs2.constants.O_RDONLY;

// node_modules/@actions/exec/lib/toolrunner.js
var IS_WINDOWS2 = process.platform === "win32";

// node_modules/@actions/core/lib/platform.js
var platform = os3.platform();
var arch = os3.arch();

// node_modules/@actions/core/lib/core.js
var ExitCode;
(function(ExitCode2) {
  ExitCode2[ExitCode2["Success"] = 0] = "Success";
  ExitCode2[ExitCode2["Failure"] = 1] = "Failure";
})(ExitCode || (ExitCode = {}));
function setSecret(secret) {
  issueCommand("add-mask", {}, secret);
}
function setOutput(name, value) {
  const filePath = process.env["GITHUB_OUTPUT"] || "";
  if (filePath) {
    return issueFileCommand("OUTPUT", prepareKeyValueMessage(name, value));
  }
  process.stdout.write(os4.EOL);
  issueCommand("set-output", { name }, toCommandValue(value));
}
function setFailed(message) {
  process.exitCode = ExitCode.Failure;
  error(message);
}
function debug(message) {
  issueCommand("debug", {}, message);
}
function error(message, properties = {}) {
  issueCommand("error", toCommandProperties(properties), message instanceof Error ? message.toString() : message);
}
function warning(message, properties = {}) {
  issueCommand("warning", toCommandProperties(properties), message instanceof Error ? message.toString() : message);
}
function notice(message, properties = {}) {
  issueCommand("notice", toCommandProperties(properties), message instanceof Error ? message.toString() : message);
}
function info(message) {
  process.stdout.write(message + os4.EOL);
}

// src/action/annotations.ts
import path from "node:path";
var PLAIN = { grouping: false };
var PER_STEP = { error: 10, warning: 10 };
function planAnnotations(results, where, used2 = { error: 0, warning: 0 }) {
  const fails = gateFailsOn(results.gate.failOn);
  const rel = (file) => {
    if (!file) return void 0;
    const r = path.relative(where.workspace, path.resolve(where.cwd, file));
    if (r.startsWith("..") || path.isAbsolute(r)) return void 0;
    return r.split(path.sep).join("/");
  };
  const all = [];
  for (const p of results.problems) {
    all.push({
      level: fails.errors ? "error" : "warning",
      title: oneLine(`Leadline: ${p.kind} problem${p.metric ? ` in ${p.metric}` : ""}`, 120),
      message: oneLine(p.message, 1e3),
      ...rel(p.file) ? { file: rel(p.file) } : {},
      ...p.line ? { startLine: p.line } : {},
      rank: -1
    });
  }
  for (const s of results.series) {
    for (const c of s.checked) {
      if (!c.alarm) continue;
      const [value, lower, upper, mean] = numsApart([c.value, c.lower, c.upper, c.mean], 4, PLAIN);
      all.push({
        level: fails.alarms ? "error" : "warning",
        title: oneLine(`Leadline alarm: ${s.name}`, 120),
        message: oneLine(
          `${withUnit(value, s.unit)}${c.label ? ` at ${rowRef(c)}` : ""} is ${c.side ?? "outside"} the ${levelLabel(c.level)} prediction interval [${lower}, ${upper}] (forecast ${mean}, ${num(Math.abs(c.z), 3, PLAIN)} standard errors ${c.side === "below" ? "under" : "over"}, ${pIs(c.adjustedP)}). Bound crossed: ${c.side === "below" ? lower : upper}.`,
          1e3
        ),
        ...rel(s.file) ? { file: rel(s.file) } : {},
        ...c.row ? { startLine: c.row } : {},
        rank: c.adjustedP
      });
    }
    const lim = s.limit;
    if (lim?.atRisk) {
      const lastRow = [...s.history].reverse().find((h) => h.row !== null)?.row ?? null;
      const when = lim.pointCrossing ? ` The point forecast crosses at step ${lim.pointCrossing.step}${lim.pointCrossing.time ? ` (${lim.pointCrossing.time.slice(0, 10)})` : ""}.` : "";
      all.push({
        level: fails.limits ? "error" : "warning",
        title: oneLine(`Leadline limit at risk: ${s.name}`, 120),
        message: oneLine(
          lim.alreadyCrossed ? `Already ${lim.side} the limit ${num(lim.value, 6, PLAIN)} at the last observation.` : `${chance(lim.probability, lim.paths)} chance of going ${lim.side} ${num(lim.value, 6, PLAIN)} within ${windowWords(lim.withinLabel, lim.within, STEP_UNIT[s.spacing])} (risk accepted: ${num(lim.risk * 100, 3, PLAIN)}%).${when} Forecasts are estimates, not guarantees.`,
          1e3
        ),
        ...rel(s.file) ? { file: rel(s.file) } : {},
        ...lastRow ? { startLine: lastRow } : {},
        rank: 1 - lim.probability
      });
    }
  }
  const shown = [];
  const dropped = { error: 0, warning: 0 };
  for (const level of ["error", "warning"]) {
    const room = Math.max(0, PER_STEP[level] - used2[level]);
    const mine = all.filter((a) => a.level === level).sort((a, b) => a.rank - b.rank);
    for (const [i, a] of mine.entries()) {
      if (i < room) {
        const { rank: _rank, ...plain } = a;
        shown.push(plain);
      } else dropped[level]++;
    }
  }
  const more = dropped.error + dropped.warning;
  const overflow = more === 0 ? null : {
    level: "notice",
    title: "Leadline: more findings than annotations",
    message: `${plural(more, "more finding")} (${plural(dropped.error, "error")}, ${plural(dropped.warning, "warning")}) not annotated: GitHub shows at most ${PER_STEP.error} errors and ${PER_STEP.warning} warnings per step. The job summary and the results file list every one.`
  };
  return { shown, overflow };
}

// src/action/event.ts
import { readFile } from "node:fs/promises";
var PR_EVENT_NAMES = /* @__PURE__ */ new Set(["pull_request", "pull_request_target"]);
var PR_EVENTS = PR_EVENT_NAMES;
var TRACKING_EVENTS = /* @__PURE__ */ new Set(["push", "schedule", "workflow_dispatch"]);
async function readEvent(eventPath) {
  if (!eventPath) return { facts: eventFacts({}), problem: null };
  try {
    const payload = JSON.parse(await readFile(eventPath, "utf8"));
    return { facts: eventFacts(payload), problem: null };
  } catch (e) {
    return {
      facts: eventFacts({}),
      problem: `The event payload ${eventPath} could not be read (${e.message}); treating the run as having no pull request.`
    };
  }
}
var sha = (x) => typeof x === "string" && /^[0-9a-f]{7,64}$/i.test(x) ? x : null;
var word = (x, max = 255) => typeof x === "string" && x.length <= max ? x : null;
var prNumber = (x) => typeof x === "number" && Number.isSafeInteger(x) && x > 0 ? x : null;
function eventFacts(payload) {
  const pr = payload?.pull_request;
  const number = prNumber(pr?.number);
  return {
    pullRequest: number === null ? null : { number, baseSha: sha(pr?.base?.sha), headSha: sha(pr?.head?.sha) },
    workflowRun: workflowRunFacts(payload?.workflow_run)
  };
}
function workflowRunFacts(raw) {
  if (!raw || typeof raw !== "object") return null;
  const w = raw;
  const prs = Array.isArray(w.pull_requests) ? w.pull_requests : [];
  return {
    event: word(w.event, 64) ?? "",
    headSha: sha(w.head_sha),
    headOwner: word(w.head_repository?.owner?.login, 100),
    headBranch: word(w.head_branch),
    pullRequests: prs.flatMap((p) => {
      const q = p;
      const n = prNumber(q?.number);
      return n === null ? [] : [{ number: n, headSha: sha(q?.head?.sha) }];
    })
  };
}
function destination(target, eventName, facts) {
  switch (target.kind) {
    case "off":
      return { kind: "none", why: null };
    case "issue":
      return { kind: "comment", issue: target.number, what: "issue" };
    case "tracking-issue":
      return { kind: "tracking-issue" };
    case "pull-request":
      if (facts.pullRequest)
        return { kind: "comment", issue: facts.pullRequest.number, what: "pull request" };
      return {
        kind: "none",
        why: `comment: pull-request, but this ${eventName || "unknown"} event has no pull request; the report was not posted (see the job summary).`
      };
    case "auto":
      if (PR_EVENTS.has(eventName) && facts.pullRequest)
        return { kind: "comment", issue: facts.pullRequest.number, what: "pull request" };
      if (TRACKING_EVENTS.has(eventName)) return { kind: "tracking-issue" };
      return { kind: "none", why: null };
  }
}
function isPullRequestEvent(eventName, facts) {
  return PR_EVENTS.has(eventName) && facts.pullRequest !== null;
}

// src/action/github.ts
function httpStatus(e) {
  const s = e?.status;
  return typeof s === "number" && s >= 100 ? s : null;
}
var WORKFLOW_TOKEN_LOGIN = "github-actions[bot]";
var ApiFault = class extends Error {
  constructor(message, call, status, kind, retried) {
    super(message);
    this.call = call;
    this.status = status;
    this.kind = kind;
    this.retried = retried;
    this.name = "ApiFault";
  }
  call;
  status;
  kind;
  retried;
};
function limitText(ms) {
  return ms < 1e3 ? `${Math.round(ms)} ms` : `${Math.round(ms / 1e3)} s`;
}
var NOT_RETRIED = /* @__PURE__ */ new Set([400, 401, 403, 404, 410, 422, 451]);
function apiFault(e, call, timeoutMs) {
  if (e instanceof ApiFault) return e;
  const status = httpStatus(e);
  const err = e;
  const text = String(err?.message ?? e).split("\n")[0];
  if (status !== null && err?.response !== void 0)
    return new ApiFault(`HTTP ${status}: ${text}`, call, status, "http", !NOT_RETRIED.has(status));
  if (/abort|timeout/i.test(`${err?.name} ${text}`))
    return new ApiFault(
      `no answer within ${limitText(timeoutMs)} (Leadline's limit per request)`,
      call,
      null,
      "timeout",
      true
    );
  if (status !== null)
    return new ApiFault(`no connection to the GitHub API (${text})`, call, null, "network", true);
  return badReply(call);
}
function badReply(call) {
  return new ApiFault(
    `GitHub's reply could not be read (it is not the JSON expected)`,
    call,
    null,
    "reply",
    false
  );
}
function need(ok, value, call) {
  if (!ok) throw badReply(call);
  return value;
}
var isObject = (x) => typeof x === "object" && x !== null;
var login = (u) => isObject(u) && typeof u.login === "string" ? u.login : null;
function comment(raw, call) {
  const c = raw;
  need(isObject(raw) && typeof c.id === "number" && typeof c.html_url === "string", null, call);
  return {
    id: c.id,
    body: typeof c.body === "string" ? c.body : "",
    createdAt: String(c.created_at ?? ""),
    url: c.html_url,
    author: login(c.user)
  };
}
function issue2(raw, call) {
  const i = raw;
  need(isObject(raw) && typeof i.number === "number" && typeof i.html_url === "string", null, call);
  return {
    number: i.number,
    state: i.state === "closed" ? "closed" : "open",
    title: String(i.title ?? ""),
    body: typeof i.body === "string" ? i.body : "",
    createdAt: String(i.created_at ?? ""),
    url: i.html_url,
    author: login(i.user)
  };
}
function list(raw, call) {
  return need(Array.isArray(raw), raw, call);
}
var MAX_RATE_WAIT_S = 120;
async function loadOctokit(s) {
  const [github, { retry }, { throttling }] = await Promise.all([
    import("./chunks/github-YVCFJQGX.js"),
    import("./chunks/dist-bundle-DMCPIFLP.js"),
    import("./chunks/dist-bundle-U2F45W5V.js")
  ]);
  return github.getOctokit(
    s.token,
    {
      baseUrl: s.apiUrl,
      // Server errors and network failures are retried (3 times, waits base × 1, 4, 9);
      // 4xx other than rate limits are final.
      retry: { retryAfterBaseValue: s.retryBaseMs },
      throttle: {
        retryAfterBaseValue: s.retryBaseMs,
        onRateLimit: waitOutRateLimit("rate limit reached"),
        onSecondaryRateLimit: waitOutRateLimit("secondary rate limit")
      },
      // Each request is abandoned after requestTimeoutMs (and then retried like a lost connection).
      request: {
        fetch: (url, init = {}) => fetch(url, {
          ...init,
          signal: AbortSignal.any(
            [init.signal, s.signal, AbortSignal.timeout(s.requestTimeoutMs)].filter(
              (x) => Boolean(x)
            )
          )
        })
      },
      // Octokit's own messages go to the debug log, never to annotations.
      log: {
        debug: (m) => debug(m),
        info: (m) => debug(m),
        warn: (m) => debug(m),
        error: (m) => debug(m)
      }
    },
    retry,
    throttling
  );
}
function octokitApi(s) {
  let client = null;
  const repo = { owner: s.owner, repo: s.repo };
  const call = async (name, f) => {
    const octokit = await (client ??= loadOctokit(s));
    try {
      return await f(octokit);
    } catch (e) {
      throw apiFault(e, name, s.requestTimeoutMs);
    }
  };
  let me = null;
  return {
    identity() {
      me ??= call("identify the token", async (octokit) => {
        try {
          const r = await octokit.rest.users.getAuthenticated();
          return login(r.data) ?? WORKFLOW_TOKEN_LOGIN;
        } catch (e) {
          const status = httpStatus(e);
          if (status === 401 || status === 403 || status === 404) return WORKFLOW_TOKEN_LOGIN;
          throw e;
        }
      });
      return me;
    },
    listComments: (n) => call("list the comments", async (octokit) => {
      const all = await octokit.paginate(octokit.rest.issues.listComments, {
        ...repo,
        issue_number: n,
        per_page: 100
      });
      return list(all, "list the comments").map((c) => comment(c, "list the comments"));
    }),
    createComment: (n, body) => call("create the comment", async (octokit) => {
      const r = await octokit.rest.issues.createComment({ ...repo, issue_number: n, body });
      return comment(r.data, "create the comment");
    }),
    updateComment: (id, body) => call("update the comment", async (octokit) => {
      const r = await octokit.rest.issues.updateComment({ ...repo, comment_id: id, body });
      return comment(r.data, "update the comment");
    }),
    deleteComment: (id) => call("delete a duplicate comment", async (octokit) => {
      await octokit.rest.issues.deleteComment({ ...repo, comment_id: id });
    }),
    listIssues: (label) => call("list the tracking issues", async (octokit) => {
      const all = await octokit.paginate(octokit.rest.issues.listForRepo, {
        ...repo,
        labels: label,
        state: "all",
        per_page: 100
      });
      return list(all, "list the tracking issues").filter((i) => !i.pull_request).map((i) => issue2(i, "list the tracking issues"));
    }),
    openPullRequests: (head) => call("find the pull request of the workflow run", async (octokit) => {
      const all = await octokit.paginate(octokit.rest.pulls.list, {
        ...repo,
        head,
        state: "open",
        per_page: 100
      });
      return all.flatMap(
        (p) => typeof p.number === "number" && typeof p.head?.sha === "string" ? [{ number: p.number, headSha: p.head.sha }] : []
      );
    }),
    createIssue: (title, body, labels) => call("create the tracking issue", async (octokit) => {
      const r = await octokit.rest.issues.create({ ...repo, title, body, labels });
      return issue2(r.data, "create the tracking issue");
    }),
    updateIssue: (n, p) => call("update the tracking issue", async (octokit) => {
      const r = await octokit.rest.issues.update({
        ...repo,
        issue_number: n,
        ...p.title !== void 0 ? { title: p.title } : {},
        ...p.body !== void 0 ? { body: p.body } : {},
        ...p.state !== void 0 ? { state: p.state } : {},
        ...p.stateReason !== void 0 ? { state_reason: p.stateReason } : {}
      });
      return issue2(r.data, "update the tracking issue");
    }),
    ensureLabel: (name, color, description) => call("create the label", async (octokit) => {
      try {
        await octokit.rest.issues.getLabel({ ...repo, name });
        return;
      } catch (e) {
        if (httpStatus(e) !== 404) throw e;
      }
      try {
        await octokit.rest.issues.createLabel({ ...repo, name, color, description });
      } catch (e) {
        if (httpStatus(e) !== 422) throw e;
      }
    })
  };
}
function waitOutRateLimit(what) {
  return (after, options, _o, count) => {
    info(logSafe(`GitHub API ${what} for ${options.method} ${options.url}; retry in ${after}s.`));
    return count < 2 && after <= MAX_RATE_WAIT_S;
  };
}

// src/action/publish.ts
function marker(kind, configKey2) {
  const safe = configKey2.replace(
    /[^A-Za-z0-9._/@+]/g,
    (c) => [...Buffer.from(c, "utf8")].map((b) => `%${b.toString(16).toUpperCase().padStart(2, "0")}`).join("")
  );
  return `<!-- leadline:${kind}:${safe} -->`;
}
function isMarked(body, mark) {
  return body.trimStart().startsWith(mark);
}
function withMarker(body, mark) {
  return isMarked(body, mark) ? body : `${mark}
${body}`;
}
function oldestFirst(key) {
  return (a, b) => a.createdAt.localeCompare(b.createdAt) || key(a) - key(b);
}
async function deleteDuplicate(api, c, notes) {
  try {
    await api.deleteComment(c.id);
    return true;
  } catch (e) {
    if (httpStatus(e) === 404) return false;
    notes.push(
      `Could not delete the duplicate report comment ${c.url} (${describeError(e)}); the report itself is posted, so only the older copy remains.`
    );
    return false;
  }
}
function ignoredNote(foreign, me, what) {
  if (foreign.length === 0) return [];
  const by = [...new Set(foreign.map((f) => visible(f.author ?? "an unknown author")))].join(", ");
  return [
    `Ignored ${plural(foreign.length, what)} carrying Leadline's marker but written by ${by}, not by ${visible(me)} (this token): Leadline edits, deletes and closes only its own (${foreign.slice(0, 3).map((f) => f.url).join(", ")}).`
  ];
}
function byIdentity(items, mark, me) {
  const marked = items.filter((i) => isMarked(i.body, mark));
  return { own: marked.filter((i) => i.author === me), foreign: marked.filter((i) => i.author !== me) };
}
async function upsertComment(api, issue3, mark, body) {
  const text = withMarker(body, mark);
  const order = oldestFirst((c) => c.id);
  const me = await api.identity();
  const { own, foreign } = byIdentity(await api.listComments(issue3), mark, me);
  const notes = ignoredNote(foreign, me, "comment");
  const mine = own.sort(order);
  if (mine.length > 0) {
    const [keep2, ...extra2] = mine;
    const updated = keep2.body === text ? keep2 : await api.updateComment(keep2.id, text);
    let removed2 = 0;
    for (const c of extra2) if (await deleteDuplicate(api, c, notes)) removed2++;
    return { action: "updated", url: updated.url, removed: removed2, notes };
  }
  const created = await api.createComment(issue3, text);
  const after = byIdentity(await api.listComments(issue3), mark, me).own.sort(order);
  if (after.length <= 1) return { action: "created", url: created.url, removed: 0, notes };
  const [keep, ...extra] = after;
  let removed = 0;
  if (keep.id !== created.id) {
    await api.updateComment(keep.id, text);
  }
  for (const c of extra) if (await deleteDuplicate(api, c, notes)) removed++;
  return { action: keep.id === created.id ? "created" : "updated", url: keep.url, removed, notes };
}
async function syncTrackingIssue(api, r) {
  const notes = [];
  const body = withMarker(r.body, r.mark);
  const order = oldestFirst((i) => i.number);
  const me = await api.identity();
  const list2 = async () => byIdentity(await api.listIssues(r.label), r.mark, me);
  const first = await list2();
  notes.push(...ignoredNote(first.foreign, me, "issue"));
  const found = first.own;
  const open2 = found.filter((i) => i.state === "open").sort(order);
  const closeDuplicates = async (keep, others) => {
    for (const d of others) {
      await api.updateIssue(d.number, { state: "closed", stateReason: "not_planned" });
      notes.push(`Closed #${d.number}: a duplicate of the tracking issue #${keep.number}.`);
    }
  };
  if (open2.length > 0) {
    const [keep, ...dups] = open2;
    await closeDuplicates(keep, dups);
    if (!r.attention) {
      await api.updateIssue(keep.number, { body });
      await api.createComment(keep.number, r.closeNote);
      const closed2 = await api.updateIssue(keep.number, { state: "closed", stateReason: "completed" });
      return { action: "closed", url: closed2.url, number: closed2.number, notes };
    }
    const updated = await api.updateIssue(keep.number, { title: r.title, body });
    return { action: "updated", url: updated.url, number: updated.number, notes };
  }
  if (!r.attention) return { action: "none", url: null, number: null, notes };
  const closed = found.filter((i) => i.state === "closed").sort((a, b) => order(b, a));
  if (closed.length > 0) {
    const again = closed[0];
    const reopened = await api.updateIssue(again.number, {
      title: r.title,
      body,
      state: "open",
      stateReason: "reopened"
    });
    await api.createComment(again.number, r.reopenNote);
    return { action: "reopened", url: reopened.url, number: reopened.number, notes };
  }
  try {
    await api.ensureLabel(r.label, r.labelColor, r.labelDescription);
  } catch (e) {
    notes.push(
      `Could not create the label "${r.label}" (${describeError(e)}); the issue is created without it and will not be found by later runs until the label is added.`
    );
  }
  let created;
  try {
    created = await api.createIssue(r.title, body, [r.label]);
  } catch (e) {
    if (httpStatus(e) !== 422) throw e;
    created = await api.createIssue(r.title, body, []);
    notes.push(`The issue was created without the label "${r.label}" (GitHub refused it).`);
  }
  const after = (await list2()).own.filter((i) => i.state === "open").sort(order);
  if (after.length > 1) {
    const [keep, ...dups] = after;
    if (keep.number !== created.number) await api.updateIssue(keep.number, { title: r.title, body });
    await closeDuplicates(keep, dups);
    return {
      action: keep.number === created.number ? "created" : "updated",
      url: keep.url,
      number: keep.number,
      notes
    };
  }
  return { action: "created", url: created.url, number: created.number, notes };
}
function describeError(e) {
  if (e instanceof ApiFault) return `${e.call}: ${e.message}${e.retried ? ", also after retries" : ""}`;
  const status = httpStatus(e);
  const msg = e?.message ?? String(e);
  return status ? `HTTP ${status}: ${msg}` : msg;
}
function publishWarning(e, where, permission) {
  const status = httpStatus(e);
  const head = `Leadline could not publish the report to ${where} (${describeError(e)}).`;
  const tail = " The verdict, job summary, outputs and results file are unaffected.";
  if (e instanceof ApiFault && e.kind === "reply") {
    const maybe = /create|update/.test(e.call) ? ` GitHub may have carried out the request all the same: look at ${where}.` : "";
    return head + maybe + " The next run will try again." + tail;
  }
  if (status === 403 || status === 404) {
    return head + ` The token may not write there: give the job \`permissions: ${permission}: write\`` + (permission === "pull-requests" ? ". Pull requests from forks always get a read-only token: there the report is in the job summary and the results file (upload it with actions/upload-artifact); `comment: off` skips the attempt." : ".") + tail;
  }
  const retried = e instanceof ApiFault ? e.retried : status !== null && status >= 500;
  return head + (retried ? " Retries did not help; the next run will try again." : " The next run will try again.") + tail;
}
async function workflowRunPullRequest(run2, api) {
  const head = run2.headSha;
  if (!head)
    throw new LeadlineError("data", "The workflow_run event names no head commit: nothing is published.");
  const listed = run2.pullRequests.filter((p) => p.headSha === null || p.headSha === head);
  let found = listed.map((p) => p.number);
  if (found.length === 0 && run2.headOwner && run2.headBranch) {
    const open2 = await api.openPullRequests(`${run2.headOwner}:${run2.headBranch}`);
    found = open2.filter((p) => p.headSha === head).map((p) => p.number);
  }
  found = [...new Set(found)];
  if (found.length === 1) return { number: found[0], headSha: head };
  throw new LeadlineError(
    "data",
    found.length === 0 ? `No open pull request has the workflow run's head commit ${head.slice(0, 12)} (it may have been pushed to since, or closed): nothing is published; the next run publishes.` : `Pull requests ${found.map((n) => `#${n}`).join(", ")} all have the workflow run's head commit ${head.slice(0, 12)}: which one to publish on is unclear, so nothing is published.`
  );
}

// src/action/settings.ts
import { existsSync as existsSync2, statSync } from "node:fs";
import os5 from "node:os";
import path2 from "node:path";
var REQUEST_TIMEOUT_MS = 3e4;
var PUBLISH_TIMEOUT_MS = 18e4;
function positiveMs(text, fallback) {
  const n = Number(text ?? "");
  return text && Number.isFinite(n) && n > 0 ? n : fallback;
}
var INPUT_DEFAULTS = {
  config: ".github/leadline.yml",
  comment: "auto",
  "fail-on": FAIL_ON_DEFAULT.action,
  results: "",
  "working-directory": ".",
  html: "",
  markdown: "",
  "issue-label": "leadline",
  jobs: "auto",
  "full-history": "false",
  shard: "",
  merge: ""
};
var COMMENT_WORDS = ["auto", "pull-request", "tracking-issue", "off", "issue:<number>"];
function envInputs(env) {
  return (name) => (env[`INPUT_${name.replace(/ /g, "_").toUpperCase()}`] ?? "").trim();
}
function invalid(input, value, expected) {
  return new LeadlineError("usage", `Input "${input}" is ${JSON.stringify(value)}; expected ${expected}.`, {
    keyPath: input
  });
}
function parseComment(raw) {
  const v = raw.trim().toLowerCase();
  if (v === "auto" || v === "") return { kind: "auto" };
  if (v === "pull-request") return { kind: "pull-request" };
  if (v === "tracking-issue") return { kind: "tracking-issue" };
  if (v === "off") return { kind: "off" };
  const m = /^issue:\s*#?(\d+)$/.exec(v);
  if (m) {
    const n = Number(m[1]);
    if (Number.isSafeInteger(n) && n > 0) return { kind: "issue", number: n };
  }
  throw invalid(
    "comment",
    raw,
    `one of auto, pull-request, tracking-issue, off, or issue:<number> (e.g. issue:42).${didYouMean(v, COMMENT_WORDS)}`
  );
}
function parseRepository(raw) {
  if (!raw) return null;
  const m = /^([^/\s]+)\/([^/\s]+)$/.exec(raw.trim());
  if (!m)
    throw new LeadlineError("usage", `GITHUB_REPOSITORY is ${JSON.stringify(raw)}; expected owner/name.`);
  return { owner: m[1], repo: m[2] };
}
function configSlug(config) {
  const slug = config.replace(/\\/g, "/").replace(/\.(ya?ml)$/i, "").replace(/[^A-Za-z0-9._-]+/g, "-").replace(/^[-.]+|[-.]+$/g, "");
  return slug || "leadline";
}
function outputPath(input, raw, workingDirectory) {
  if (raw === "") return null;
  if (/[\0\n\r]/.test(raw)) throw invalid(input, raw, "a file path on one line");
  const abs = path2.resolve(workingDirectory, raw);
  if (existsSync2(abs) && statSync(abs).isDirectory())
    throw invalid(input, raw, "a file path, but that is a directory");
  return abs;
}
function readSettings(input, env, cwd = process.cwd()) {
  const get = (name) => {
    const v = input(name);
    return v === "" ? INPUT_DEFAULTS[name] : v;
  };
  const workspace = path2.resolve(cwd, env.GITHUB_WORKSPACE || ".");
  const wdRaw = get("working-directory");
  const workingDirectory = path2.resolve(workspace, wdRaw);
  if (!existsSync2(workingDirectory) || !statSync(workingDirectory).isDirectory())
    throw invalid(
      "working-directory",
      wdRaw,
      `a directory in the workspace (${workingDirectory} is not one)`
    );
  const config = get("config");
  if (/[\0\n\r]/.test(config)) throw invalid("config", config, "a file path on one line");
  const comment2 = parseComment(get("comment"));
  const failOn = parseFailOn(get("fail-on"), "action");
  const label = get("issue-label");
  if (label.length > 50 || /[,\n\r]/.test(label))
    throw invalid("issue-label", label, "a label name of at most 50 characters without commas");
  const resultsRaw = get("results");
  const tmp = env.RUNNER_TEMP || os5.tmpdir();
  const configKey2 = path2.relative(workspace, path2.resolve(workingDirectory, config));
  const results = resultsRaw === "" ? path2.join(tmp, "leadline", `${configSlug(configKey2)}.results.json`) : outputPath("results", resultsRaw, workingDirectory);
  const retry = Number(env.LEADLINE_RETRY_DELAY_MS ?? "");
  return {
    config,
    workingDirectory,
    workspace,
    token: input("token"),
    comment: comment2,
    failOn,
    results,
    html: outputPath("html", get("html"), workingDirectory),
    markdown: outputPath("markdown", get("markdown"), workingDirectory),
    issueLabel: label,
    jobs: parseJobs(get("jobs"), "jobs"),
    fullHistory: parseSwitch("full-history", get("full-history")),
    shard: get("shard") === "" ? null : parseShard(get("shard"), "shard"),
    merge: mergeList(get("merge")),
    run: {
      eventName: env.GITHUB_EVENT_NAME ?? "",
      eventPath: env.GITHUB_EVENT_PATH || null,
      repository: parseRepository(env.GITHUB_REPOSITORY),
      apiUrl: (env.GITHUB_API_URL || "https://api.github.com").replace(/\/+$/, ""),
      serverUrl: (env.GITHUB_SERVER_URL || "https://github.com").replace(/\/+$/, ""),
      runId: env.GITHUB_RUN_ID || null,
      summaryPath: env.GITHUB_STEP_SUMMARY || null,
      retryBaseMs: Number.isFinite(retry) && retry >= 0 && env.LEADLINE_RETRY_DELAY_MS ? retry : 1e3,
      requestTimeoutMs: positiveMs(env.LEADLINE_REQUEST_TIMEOUT_MS, REQUEST_TIMEOUT_MS),
      publishTimeoutMs: positiveMs(env.LEADLINE_PUBLISH_TIMEOUT_MS, PUBLISH_TIMEOUT_MS)
    }
  };
}
function mergeList(raw) {
  const items = raw.split(/[\n,]/).map((x) => x.trim()).filter(Boolean);
  for (const x of items) if (/\0/.test(x)) throw invalid("merge", x, "file paths or globs");
  return items;
}
function configKey(s) {
  const abs = path2.resolve(s.workingDirectory, s.config);
  const rel = path2.relative(s.workspace, abs);
  return (rel && !rel.startsWith("..") && !path2.isAbsolute(rel) ? rel : abs).split(path2.sep).join("/");
}
function parseSwitch(input, raw) {
  const v = raw.trim().toLowerCase();
  if (v === "true" || v === "false") return v === "true";
  throw invalid(input, raw, "true or false");
}

// src/action/texts.ts
var COMMENT_MAX_CHARS = 65536;
var COMMENT_MAX_BYTES = 262144;
var SUMMARY_MAX_BYTES = 1024 * 1024;
var CUT_NOTE = "\n\n_\u2026 cut here to fit GitHub's size limit; the full report is in the results file._\n";
function cutTo(text, maxChars, maxBytes) {
  if (text.length <= maxChars && Buffer.byteLength(text, "utf8") <= maxBytes) return text;
  const chars = Math.max(0, maxChars - CUT_NOTE.length);
  let t = text.slice(0, chars);
  const budget = maxBytes - Buffer.byteLength(CUT_NOTE, "utf8");
  if (Buffer.byteLength(t, "utf8") > budget) t = Buffer.from(t, "utf8").subarray(0, budget).toString("utf8");
  t = t.replace(/\uFFFD+$/, "").replace(/[\uD800-\uDBFF]$/, "");
  return t + CUT_NOTE;
}
function fitRendering(render, maxChars, maxBytes, suffix = "") {
  let chars = maxChars - suffix.length;
  let text = "";
  for (let attempt = 0; attempt < 4; attempt++) {
    text = render(chars) + suffix;
    const bytes = Buffer.byteLength(text, "utf8");
    if (bytes <= maxBytes && text.length <= maxChars) return text;
    chars = Math.floor(chars * Math.min(maxBytes / bytes, maxChars / text.length) * 0.97);
  }
  return cutTo(text, maxChars, maxBytes);
}
var needsAttention = runNeedsAttention;
function trackingTitle(r, configKey2) {
  const n = attentionCount(r);
  const what = n === 0 ? "a problem with the run" : `${plural(n, "metric needs", "metrics need")} attention`;
  return oneLine(`Leadline: ${what} (${configKey2})`, 200);
}
function runLink(serverUrl, repository, runId) {
  if (!repository || !runId) return null;
  return `${serverUrl}/${repository.owner}/${repository.repo}/actions/runs/${runId}`;
}
function closeNote(link) {
  return `All clear${link ? ` in [this run](${link})` : ""}: every checked observation is inside its interval, no limit is at risk and the run had no errors. Closing; Leadline reopens this issue when something needs attention again.`;
}
function reopenNote(r, link) {
  const n = attentionCount(r);
  return `Reopened${link ? ` by [this run](${link})` : ""}: ${plural(n, "metric needs", "metrics need")} attention again (${VERDICT_LABEL[r.verdict]}). The description above has the current report.`;
}
function fullReportNote(link) {
  return `The full report \u2014 every series' forecast, backtest and residual checks \u2014 is in the job summary of ${link ? `[this run](${link})` : "this run"}, and in its HTML report and results JSON when the workflow uploads them as an artifact (see the README).`;
}

// src/action/main.ts
var LABEL_COLOR = "c2410c";
var LABEL_DESCRIPTION = "Kept up to date by Leadline: metrics that need attention";
async function run(deps = {}) {
  const d = {
    env: process.env,
    git: systemGit,
    github: octokitApi,
    job: startJob,
    renderMarkdown,
    renderHtml,
    ...deps
  };
  try {
    await runAction(d);
  } catch (e) {
    setFailed(
      isLeadlineError(e) ? `Leadline: ${e.describe()}` : `Leadline stopped on an unexpected error (please report it): ${e?.stack ?? String(e)}`
    );
  }
}
var used = { warning: 0, error: 0 };
function warn(message) {
  used.warning++;
  warning(message);
}
function info2(message) {
  info(logSafe(message));
}
function failedRun(e, s) {
  const located = isLeadlineError(e);
  const message = located ? e.message : `Leadline stopped on an unexpected error: ${e?.message ?? String(e)}`;
  return {
    $schema: RESULTS_SCHEMA_ID,
    version: 1,
    generator: { name: "leadline", version: VERSION },
    generatedAt: (/* @__PURE__ */ new Date()).toISOString(),
    config: s.config,
    origin: { configHash: null, commit: null, shard: null, event: null },
    verdict: "error",
    gate: {
      failOn: s.failOn,
      passed: false,
      reason: located ? `Leadline could not run: ${e.describe()}` : message
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
      falseAlarms: "none"
    },
    series: [],
    problems: [
      {
        kind: located ? e.kind === "config" ? "config" : "data" : "internal",
        message,
        file: located ? e.file : null,
        line: located ? e.line : null,
        column: located ? e.column : null,
        keyPath: located ? e.keyPath : null,
        metric: null
      }
    ]
  };
}
var SUMMARY_FOOTER_ROOM = 8 * 1024;
var SUMMARY_FIRST_TRY = 1e6;
async function runAction(d) {
  used.warning = 0;
  used.error = 0;
  const inputs = envInputs(d.env);
  const token = inputs("token");
  if (token) setSecret(token);
  const s = readSettings(inputs, d.env);
  const key = configKey(s);
  const link = runLink(s.run.serverUrl, s.run.repository, s.run.runId);
  const event = await readEvent(s.run.eventPath);
  if (event.problem) warn(event.problem);
  if (s.shard && s.merge.length > 0)
    throw new LeadlineError(
      "usage",
      'Inputs "shard" and "merge" cannot be used together: each shard computes its part, one merge job publishes.'
    );
  let dest = destination(s.comment, s.run.eventName, event.facts);
  if (s.shard && s.comment.kind === "auto") dest = { kind: "none", why: null };
  let newRows;
  let addedFiles = [];
  let baseNote;
  const pr = event.facts.pullRequest;
  if (pr && s.merge.length === 0 && isPullRequestEvent(s.run.eventName, event.facts)) {
    const cmp = await compareWithBase(d.git, s.workingDirectory, pr.baseSha);
    if (cmp.ok) {
      newRows = cmp.newRows;
      addedFiles = cmp.added;
      const files = Object.keys(cmp.newRows);
      info2(
        files.length === 0 ? `Pull request #${pr.number} changes no file under ${s.workingDirectory}: no row is checked.` : `Pull request #${pr.number}: checking the rows it adds to ${plural(files.length, "changed file")}.`
      );
      for (const f of cmp.added)
        info2(`${visible(f)} is new in this pull request: only its last row is checked.`);
    } else {
      baseNote = cmp.note;
      notice(cmp.note);
    }
  }
  const failures = [];
  const before = await inputGuard(s.workingDirectory, s.config);
  const wanted = [
    ["results", s.results],
    ["markdown", s.markdown],
    ["html", s.html]
  ].flatMap(([label, file]) => file ? [{ label, path: file }] : []);
  const blocked = /* @__PURE__ */ new Set();
  for (const p of outputProblems(wanted, before)) {
    blocked.add(p.label);
    failures.push(p.message);
  }
  let source;
  let jobError = null;
  const mergeFiles = [];
  try {
    if (s.merge.length > 0) {
      mergeFiles.push(...await resultsFiles(s));
      const trusted = await trustedPullRequest(d, s, event.facts, token);
      if (trusted?.dest) dest = trusted.dest;
      info2(`Merging ${plural(mergeFiles.length, "results file")}.`);
      const merged = await mergeResults(mergeFiles, {
        failOn: s.failOn,
        ...trusted?.expect ? { expect: trusted.expect } : {}
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
        event: s.run.eventName ? {
          name: s.run.eventName,
          pullRequest: pr?.number ?? null,
          base: pr?.baseSha ?? null,
          head: pr?.headSha ?? null
        } : null,
        ...newRows ? { newRows, addedFiles } : {},
        ...baseNote ? { baseNote } : {}
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
async function afterJob(d, s, source, jobError, mergeFiles, { before, blocked, failures, link, dest, key, token }) {
  const requests = [
    { markdown: { maxChars: s.markdown ? Number.MAX_SAFE_INTEGER : SUMMARY_FIRST_TRY } },
    { markdown: { maxChars: COMMENT_MAX_CHARS, detail: "brief" } },
    ...s.html ? ["html"] : []
  ];
  const results = await source.detailed(reportDetail(source.lean, requests));
  info2(`Leadline: ${VERDICT_LABEL[results.verdict]}. ${results.gate.reason}`);
  const guard = new InputGuard(s.workingDirectory, s.config, before.patterns, [
    ...filesRead(results),
    ...mergeFiles
  ]);
  const save = async (file, label, text) => {
    if (blocked.has(label)) return;
    try {
      if (await isTracked(d.git, s.workspace, file))
        throw new Error(
          `refusing to write to ${file}: it is a file of the repository. Choose a path outside it, e.g. under $RUNNER_TEMP.`
        );
      await writeOutput(file, text(), guard, label);
      info2(`Wrote ${label}: ${file}`);
    } catch (e) {
      failures.push(isLeadlineError(e) ? e.describe() : `${label}: ${e.message}`);
    }
  };
  await save(s.results, "results", () => resultsJsonOf(source));
  if (s.markdown)
    await save(
      s.markdown,
      "markdown",
      () => d.renderMarkdown(results, { maxChars: Number.MAX_SAFE_INTEGER, fullReportNote: fullReportNote(link) })
    );
  if (s.html) await save(s.html, "html", () => d.renderHtml(results));
  setOutput("verdict", results.verdict);
  setOutput("alarms", String(results.summary.alarms));
  setOutput("at-risk", String(results.summary.atRisk));
  setOutput("results", failures.some((f) => f.startsWith("results")) ? "" : s.results);
  const footer = failures.map((f) => `\u274C ${escapeMessage(f)}`);
  const suffix = footer.length > 0 ? `

---

${footer.join("\n\n")}
` : "";
  let summary2 = "";
  if (s.shard && !jobError) summary2 = shardSummary(results, s.results, suffix);
  else
    try {
      if (jobError) throw jobError;
      summary2 = fitRendering(
        (maxChars) => d.renderMarkdown(results, { maxChars, fullReportNote: fullReportNote(link) }),
        SUMMARY_FIRST_TRY,
        SUMMARY_MAX_BYTES - SUMMARY_FOOTER_ROOM,
        suffix
      );
    } catch (e) {
      const why = e === jobError ? escapeMessage(
        isLeadlineError(e) ? e.describe() : `Leadline stopped on an unexpected error (please report it): ${e?.message ?? String(e)}`
      ) : `The report could not be rendered (${escapeMessage(e.message)}); the results file has everything.`;
      summary2 = e === jobError ? `## Leadline could not run

${why}
${suffix}` : `## Leadline: ${results.verdict}

${escapeMessage(results.gate.reason)}

${why}${suffix}`;
      if (e !== jobError) failures.push(`summary: the report could not be rendered: ${e.message}`);
    }
  await writeSummary(s, summary2);
  const published = jobError ? { url: null, action: "skipped", warning: null } : await publishWithin(
    s.run.publishTimeoutMs,
    (signal) => tryPublish(d, s, dest, results, key, link, token, signal)
  );
  setOutput("comment-url", published.url ?? "");
  if (published.warning) warn(published.warning);
  const after = [];
  if (published.url) after.push(`Report ${published.action}: ${published.url}`);
  if (published.warning) after.push(`\u26A0\uFE0F ${escapeMessage(published.warning)}`);
  if (after.length > 0) await writeSummary(s, `
---

${after.join("\n\n")}
`);
  const gateFails = !results.gate.passed && !s.shard;
  if (!s.shard)
    try {
      const plan = planAnnotations(
        results,
        { cwd: s.workingDirectory, workspace: s.workspace },
        { warning: used.warning, error: used.error + failures.length + (gateFails ? 1 : 0) }
      );
      for (const a of plan.shown) annotate(a);
      if (plan.overflow) annotate(plan.overflow);
    } catch (e) {
      failures.push(`annotations: ${e.message}`);
    }
  for (const f of failures) {
    used.error++;
    error(`Leadline: ${f}`);
  }
  if (jobError) throw jobError;
  if (gateFails) setFailed(results.gate.reason);
  else if (failures.length > 0) setFailed(`Leadline could not write ${failures.length} output file(s).`);
}
function apiOf(d, s, repository, token, signal) {
  return d.github({
    token,
    owner: repository.owner,
    repo: repository.repo,
    apiUrl: s.run.apiUrl,
    retryBaseMs: s.run.retryBaseMs,
    requestTimeoutMs: s.run.requestTimeoutMs,
    ...signal ? { signal } : {}
  });
}
function shardSummary(r, file, suffix) {
  const sh = r.origin.shard;
  const part = sh ? `shard ${shardLabel(sh)}: ${r.series.length} of ${sh.series} series` : "this shard";
  return `## Leadline: ${part} judged

The results are in \`${escapeMessage(file)}\`. This shard's verdict and adjusted p-values cover its part only; the job that merges every shard (\`merge\` input) publishes the run's report and gate.
${suffix}`;
}
async function resultsFiles(s) {
  const found = await glob(s.merge, { cwd: s.workingDirectory, absolute: true, onlyFiles: true, dot: true });
  if (found.length === 0)
    throw new LeadlineError(
      "usage",
      `merge: no file matches ${s.merge.map((m) => JSON.stringify(visible(m))).join(", ")} under ${s.workingDirectory}. Download the results artifacts there first (actions/download-artifact).`
    );
  return [...new Set(found)].sort();
}
async function trustedPullRequest(d, s, facts, token) {
  const wr = facts.workflowRun;
  if (s.run.eventName === "workflow_run" && wr) {
    if (!PR_EVENT_NAMES.has(wr.event))
      return {
        dest: destination(s.comment, wr.event, { pullRequest: null, workflowRun: null }),
        expect: null
      };
    if (!token || !s.run.repository)
      throw new LeadlineError(
        "usage",
        "merge under workflow_run needs the token and GITHUB_REPOSITORY to find the pull request: nothing is published."
      );
    const pr2 = await workflowRunPullRequest(wr, apiOf(d, s, s.run.repository, token));
    info2(
      `Publishing for pull request #${pr2.number} at ${pr2.headSha.slice(0, 12)}, as the workflow_run event says.`
    );
    const dest = s.comment.kind === "auto" || s.comment.kind === "pull-request" ? { kind: "comment", issue: pr2.number, what: "pull request" } : null;
    return { dest, expect: { pullRequest: pr2.number, head: pr2.headSha } };
  }
  const pr = facts.pullRequest;
  return pr?.headSha ? { dest: null, expect: { pullRequest: pr.number, head: pr.headSha } } : null;
}
async function publishWithin(ms, stage) {
  const stop = new AbortController();
  let timer;
  const late = new Promise((resolve) => {
    timer = setTimeout(() => {
      stop.abort();
      resolve({
        url: null,
        action: "failed",
        warning: `Publishing the report stopped after ${limitText(ms)}, Leadline's limit for the publishing stage: the GitHub API did not answer in time. The verdict, job summary, outputs and results file are unaffected; the next run will try again.`
      });
    }, ms);
  });
  try {
    return await Promise.race([stage(stop.signal), late]);
  } finally {
    clearTimeout(timer);
  }
}
async function tryPublish(d, s, dest, results, key, link, token, signal) {
  if (dest.kind === "none") {
    if (dest.why) return { url: null, action: "skipped", warning: dest.why };
    info2("No comment or tracking issue for this event (comment: off, or an event without one).");
    return { url: null, action: "skipped", warning: null };
  }
  const where = dest.kind === "comment" ? `${dest.what} #${dest.issue}` : "the tracking issue";
  if (!token)
    return {
      url: null,
      action: "skipped",
      warning: `No token, so the report was not posted to ${where}: leave the token input at its default (the workflow token) or pass one.`
    };
  if (!s.run.repository)
    return {
      url: null,
      action: "skipped",
      warning: `GITHUB_REPOSITORY is not set, so the report was not posted to ${where}.`
    };
  const api = apiOf(d, s, s.run.repository, token, signal);
  const body = (mark) => cutTo(
    withMarker(
      fitRendering(
        (maxChars) => d.renderMarkdown(results, {
          maxChars,
          fullReportNote: fullReportNote(link),
          marker: mark,
          detail: "brief"
        }),
        COMMENT_MAX_CHARS,
        COMMENT_MAX_BYTES
      ),
      mark
    ),
    COMMENT_MAX_CHARS,
    COMMENT_MAX_BYTES
  );
  try {
    if (dest.kind === "comment") {
      const mark2 = marker("report", key);
      const out2 = await upsertComment(api, dest.issue, mark2, body(mark2));
      info2(
        `Report ${out2.action} on ${where}: ${out2.url}${out2.removed ? ` (${plural(out2.removed, "duplicate")} removed)` : ""}`
      );
      for (const n of out2.notes) info2(n);
      return { url: out2.url, action: out2.action, warning: out2.notes.length > 0 ? out2.notes.join(" ") : null };
    }
    const mark = marker("tracking", key);
    const out = await syncTrackingIssue(api, {
      mark,
      label: s.issueLabel,
      labelColor: LABEL_COLOR,
      labelDescription: LABEL_DESCRIPTION,
      attention: needsAttention(results),
      title: trackingTitle(results, key),
      body: body(mark),
      closeNote: closeNote(link),
      reopenNote: reopenNote(results, link)
    });
    for (const n of out.notes) info2(n);
    info2(
      out.action === "none" ? "All clear and no tracking issue is open: nothing to post." : `Tracking issue ${out.action}: ${out.url}`
    );
    return { url: out.url, action: out.action, warning: null };
  } catch (e) {
    debug(`publishing failed: ${describeError(e)}`);
    return {
      url: null,
      action: "failed",
      warning: publishWarning(
        e,
        where,
        dest.kind === "comment" && dest.what === "pull request" ? "pull-requests" : "issues"
      )
    };
  }
}
function annotate(a) {
  const props = {
    title: a.title,
    ...a.file ? { file: a.file } : {},
    ...a.startLine ? { startLine: a.startLine } : {}
  };
  if (a.level === "error") {
    used.error++;
    error(a.message, props);
  } else if (a.level === "warning") {
    used.warning++;
    warning(a.message, props);
  } else notice(a.message, props);
}
async function writeSummary(s, text) {
  if (!s.run.summaryPath) {
    info2("GITHUB_STEP_SUMMARY is not set (not on a runner): no job summary written.");
    return;
  }
  try {
    await appendFile2(s.run.summaryPath, text.endsWith("\n") ? text : `${text}
`, "utf8");
  } catch (e) {
    warn(`Leadline could not write the job summary: ${e.message}`);
  }
}

// src/action/index.ts
if (!isPoolWorker()) void run();
