// Command-line arguments -> a typed settings object. Nothing else reads argv.
import { parseArgs } from 'node:util';
import { LeadlineError } from '../errors.js';
import { parseJobs } from '../pool.js';
import { parseShard, type Shard } from '../shard.js';
import type { FailOn } from '../terms.js';
import { didYouMean } from '../text/index.js';
import { FAIL_ON_DEFAULT, parseFailOn } from '../verdict.js';

export type PrintMode = 'summary' | 'markdown' | 'json' | 'none';

export interface CliSettings {
  command: 'run' | 'merge' | 'help' | 'version';
  /** Config path, relative to cwd. */
  config: string;
  /** Working directory for config and metric files. */
  cwd: string;
  /** Where to write the results JSON, or null. */
  json: string | null;
  /** Where to write the markdown report, or null. */
  markdown: string | null;
  /** Where to write the HTML report, or null. */
  html: string | null;
  /** A handlebars template for the markdown report, or null for the built-in one. */
  template: string | null;
  failOn: FailOn;
  /** A commit or branch: judge only the rows added since it, as the Action does in a pull request. */
  base: string | null;
  /** Where to write the brief report (what a pull-request comment shows), or null. */
  comment: string | null;
  /** What goes to stdout. */
  print: PrintMode;
  /** Colour on stdout (TTY and NO_COLOR unset, unless forced). */
  color: boolean;
  /** Progress lines on stderr. */
  progress: boolean;
  /** `run --shard i/n`: judge only that shard's series. */
  shard: Shard | null;
  /** `merge`: the results files to merge, as given. */
  files: string[];
  /** Worker threads for the analysis. */
  jobs: number;
  /** Every point of history and the per-step backtest measures in the results JSON. */
  fullHistory: boolean;
}

export const HELP = `leadline — judge metric CSVs against their forecasts and warn before limits are crossed

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

export function parseCli(argv: string[], env: NodeJS.ProcessEnv, cwd: string, isTTY: boolean): CliSettings {
  let parsed;
  try {
    parsed = parseArgs({ args: argv, allowPositionals: true, strict: true, options: OPTIONS });
  } catch (e) {
    throw new LeadlineError(
      'usage',
      `${flagProblem(e as Error & { code?: string })} Run "leadline --help" for the options.`,
    );
  }
  const v = parsed.values;
  const base = {
    config: v.config ?? '.github/leadline.yml',
    cwd: v.cwd ?? cwd,
    json: v.json ?? null,
    markdown: v.markdown ?? null,
    html: v.html ?? null,
    template: v.template ?? null,
    failOn: parseFailOn(v['fail-on'] ?? FAIL_ON_DEFAULT.command, 'command'),
    base: v.base ?? null,
    comment: v.comment ?? null,
    print: parsePrint(v.print ?? 'summary'),
    color: v['no-color'] ? false : v.color ? true : isTTY && !env.NO_COLOR,
    progress: !v.quiet,
    shard: v.shard === undefined ? null : parseShard(v.shard, '--shard'),
    files: [] as string[],
    jobs: parseJobs(v.jobs ?? 'auto', '--jobs'),
    fullHistory: v['full-history'] ?? false,
  };
  if (v.help) return { ...base, command: 'help' };
  if (v.version) return { ...base, command: 'version' };
  const [command, ...rest] = parsed.positionals;
  if (command === undefined)
    throw new LeadlineError(
      'usage',
      'No command given. Usage: leadline run [options], or leadline merge FILE...; see "leadline --help".',
    );
  if (command === 'merge') {
    for (const only of ['config', 'cwd', 'shard'] as const)
      if (v[only] !== undefined)
        throw new LeadlineError(
          'usage',
          `--${only} is for "leadline run"; merge reads only the results files it is given.`,
        );
    if (rest.length === 0)
      throw new LeadlineError(
        'usage',
        'merge needs the results files of every shard, e.g. leadline merge shard-*.json --markdown report.md.',
      );
    return { ...base, command: 'merge', files: rest };
  }
  if (command !== 'run')
    throw new LeadlineError(
      'usage',
      `Unknown command "${command}". The commands are "run" and "merge"; see "leadline --help".`,
    );
  if (rest.length > 0)
    throw new LeadlineError('usage', `Unexpected argument "${rest[0]}". See "leadline --help".`);
  if (base.shard && !base.json)
    throw new LeadlineError(
      'usage',
      '--shard needs --json FILE: a shard\'s results file is what "leadline merge" reads.',
    );
  return { ...base, command: 'run' };
}

function parsePrint(value: string): PrintMode {
  if ((PRINT_MODES as readonly string[]).includes(value)) return value as PrintMode;
  throw new LeadlineError(
    'usage',
    `--print: "${value}" is not valid; expected summary, markdown, json or none.${didYouMean(value, PRINT_MODES)}`,
  );
}

const PRINT_MODES = ['summary', 'markdown', 'json', 'none'] as const;

const OPTIONS = {
  config: { type: 'string' },
  cwd: { type: 'string' },
  json: { type: 'string' },
  markdown: { type: 'string' },
  html: { type: 'string' },
  template: { type: 'string' },
  'fail-on': { type: 'string' },
  base: { type: 'string' },
  comment: { type: 'string' },
  print: { type: 'string' },
  color: { type: 'boolean' },
  'no-color': { type: 'boolean' },
  quiet: { type: 'boolean' },
  shard: { type: 'string' },
  jobs: { type: 'string' },
  'full-history': { type: 'boolean' },
  help: { type: 'boolean', short: 'h' },
  version: { type: 'boolean', short: 'V' },
} as const;

/** Every long flag, for "did you mean". */
const FLAGS = Object.keys(OPTIONS).map((o) => `--${o}`);

/**
 * node:util's parse error in Leadline's words: an unknown flag is quoted with the nearest real one;
 * other errors (a flag missing its value …) keep node's message.
 */
function flagProblem(e: Error & { code?: string }): string {
  const unknown = /^Unknown option '([^']+)'/.exec(e.message);
  if (e.code === 'ERR_PARSE_ARGS_UNKNOWN_OPTION' && unknown) {
    const flag = unknown[1]!;
    const bare = flag.replace(/=.*$/, '');
    return `Unknown option "${flag}".${didYouMean(bare, FLAGS)}`;
  }
  return `${e.message.replace(/\.$/, '')}.`;
}
