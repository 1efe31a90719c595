import { execFileSync } from 'node:child_process';
// Hand-built results and an in-memory GitHub for the Action's unit tests.
import type { CheckedObservation, Results, SeriesResult } from '../../src/results.js';
import type { Issue, IssueApi, IssueComment, IssuePatch } from '../../src/action/github.js';

export function checked(
  row: number,
  alarm: boolean,
  extra: Partial<CheckedObservation> = {},
): CheckedObservation {
  return {
    index: row - 2,
    row,
    time: null,
    value: alarm ? 150 : 101,
    step: 1,
    mean: 100,
    lower: 90,
    upper: 110,
    level: 95,
    outside: alarm,
    side: alarm ? 'above' : null,
    pValue: alarm ? 0.001 : 0.4,
    adjustedP: alarm ? 0.001 : 0.4,
    z: alarm ? 5 : 0.2,
    alarm,
    ...extra,
  };
}

export function series(name: string, file: string, extra: Partial<SeriesResult> = {}): SeriesResult {
  return {
    name,
    metric: name,
    file,
    column: 'value',
    key: null,
    observations: 40,
    missing: 0,
    spacing: 'day',
    season: 1,
    seasonSource: 'config',
    method: 'naive',
    intervalKind: 'analytic',
    sigma: 5,
    sigmaDf: 38,
    levels: [80, 95],
    alarmLevel: 95,
    direction: 'above',
    forecast: [],
    residualChecks: null,
    backtest: null,
    checked: [],
    limit: null,
    history: [{ index: 39, row: 41, time: null, value: 100 }],
    residuals: [],
    verdict: 'ok',
    reason: '',
    notes: [],
    ...extra,
  };
}

export function results(s: SeriesResult[], extra: Partial<Results> = {}): Results {
  const alarms = s.reduce((n, x) => n + x.checked.filter((c) => c.alarm).length, 0);
  const atRisk = s.filter((x) => x.limit?.atRisk).length;
  const failOn = extra.gate?.failOn ?? 'limit';
  const fails =
    (failOn === 'alarm' || failOn === 'both' ? alarms : 0) +
    (failOn === 'limit' || failOn === 'both' ? atRisk : 0);
  return {
    $schema: 'urn:leadline:results:1',
    version: 1,
    generator: { name: 'leadline', version: '0.0.0-test' },
    generatedAt: '2026-01-01T00:00:00.000Z',
    config: 'leadline.yml',
    origin: { configHash: null, commit: null, shard: null, event: null },
    verdict: alarms > 0 ? 'alarm' : atRisk > 0 ? 'at-risk' : 'ok',
    gate: { failOn, passed: fails === 0, reason: fails === 0 ? 'passes' : 'Gate failed.' },
    summary: {
      metrics: s.length,
      series: s.length,
      alarms,
      atRisk,
      insufficient: 0,
      errors: 0,
      checkedObservations: s.reduce((n, x) => n + x.checked.length, 0),
      expectedFalseAlarms: 0,
      falseAlarms: 'none',
    },
    series: s,
    problems: [],
    ...extra,
  };
}

/** A GitHub that keeps issues and comments in memory and records every call. */
export class FakeGitHub implements IssueApi {
  comments = new Map<number, IssueComment[]>();
  issues: (Issue & { labels: string[] })[] = [];
  labels = new Set<string>();
  calls: string[] = [];
  private nextId = 1000;
  private clock = Date.parse('2026-01-01T00:00:00Z');
  /** Runs inside createComment, before it returns: lets a test simulate a racing run. */
  onCreateComment: ((issue: number) => void) | null = null;
  /** Status to fail the next matching call with. */
  failWith: { call: string; status: number } | null = null;
  labelCreationFails = false;
  /** The token's login; comments and issues are written as `author` (default: the same). */
  me = 'github-actions[bot]';
  author = 'github-actions[bot]';

  async identity() {
    return this.me;
  }

  private tick(): string {
    this.clock += 1000;
    return new Date(this.clock).toISOString();
  }
  private check(call: string) {
    this.calls.push(call);
    if (this.failWith && call.startsWith(this.failWith.call)) {
      throw Object.assign(new Error(`fake ${this.failWith.status}`), { status: this.failWith.status });
    }
  }
  addComment(issue: number, body: string, author = this.author): IssueComment {
    const c = {
      id: this.nextId++,
      body,
      createdAt: this.tick(),
      url: `https://example.test/c/${this.nextId - 1}`,
      author,
    };
    this.comments.set(issue, [...(this.comments.get(issue) ?? []), c]);
    return c;
  }
  async listComments(issue: number) {
    this.check(`listComments ${issue}`);
    return (this.comments.get(issue) ?? []).map((c) => ({ ...c }));
  }
  async createComment(issue: number, body: string) {
    this.check(`createComment ${issue}`);
    this.onCreateComment?.(issue);
    return this.addComment(issue, body);
  }
  async updateComment(id: number, body: string) {
    this.check(`updateComment ${id}`);
    for (const list of this.comments.values())
      for (const c of list)
        if (c.id === id) {
          c.body = body;
          return { ...c };
        }
    throw Object.assign(new Error('not found'), { status: 404 });
  }
  async deleteComment(id: number) {
    this.check(`deleteComment ${id}`);
    for (const [k, list] of this.comments) {
      const next = list.filter((c) => c.id !== id);
      if (next.length !== list.length) {
        this.comments.set(k, next);
        return;
      }
    }
    throw Object.assign(new Error('not found'), { status: 404 });
  }
  async listIssues(label: string) {
    this.check(`listIssues ${label}`);
    return this.issues.filter((i) => i.labels.includes(label)).map(({ labels: _l, ...i }) => ({ ...i }));
  }
  async createIssue(title: string, body: string, labels: string[]) {
    this.check(`createIssue`);
    if (labels.some((l) => !this.labels.has(l)))
      throw Object.assign(new Error('invalid label'), { status: 422 });
    const number = this.issues.length + 1;
    const i = {
      number,
      state: 'open' as const,
      title,
      body,
      createdAt: this.tick(),
      url: `https://example.test/i/${number}`,
      author: this.author as string | null,
      labels,
    };
    this.issues.push(i);
    return { ...i };
  }
  async updateIssue(n: number, p: IssuePatch) {
    this.check(`updateIssue ${n} ${Object.keys(p).sort().join(',')}${p.state ? ` ${p.state}` : ''}`);
    const i = this.issues.find((x) => x.number === n);
    if (!i) throw Object.assign(new Error('not found'), { status: 404 });
    if (p.title !== undefined) i.title = p.title;
    if (p.body !== undefined) i.body = p.body;
    if (p.state !== undefined) i.state = p.state;
    const { labels: _l, ...plain } = i;
    return { ...plain };
  }
  /** Open pull requests by head label ("owner:branch"), for openPullRequests. */
  pulls: { number: number; head: string; headSha: string }[] = [];
  async openPullRequests(head: string) {
    this.check(`openPullRequests ${head}`);
    return this.pulls.filter((p) => p.head === head).map(({ number, headSha }) => ({ number, headSha }));
  }
  async ensureLabel(name: string) {
    this.check(`ensureLabel ${name}`);
    if (this.labelCreationFails) throw Object.assign(new Error('forbidden'), { status: 403 });
    this.labels.add(name);
  }
}

/** Runs git in `cwd` as a fixed test identity; returns its trimmed output. */
export function git(cwd: string, ...args: string[]): string {
  return execFileSync('git', args, {
    cwd,
    encoding: 'utf8',
    env: {
      ...process.env,
      GIT_AUTHOR_NAME: 'Leadline Test',
      GIT_AUTHOR_EMAIL: 'test@leadline.invalid',
      GIT_COMMITTER_NAME: 'Leadline Test',
      GIT_COMMITTER_EMAIL: 'test@leadline.invalid',
    },
  }).trim();
}
