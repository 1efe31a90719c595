// A loopback GitHub REST server for the end-to-end tests: the endpoints the Action uses, with state,
// pagination (Link headers), injectable failures, and a record of every call.
import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';

export interface Call {
  method: string;
  path: string;
  query: Record<string, string>;
  body: unknown;
  authorization: string | undefined;
  status: number;
}

interface StoredComment {
  id: number;
  issue: number;
  body: string;
  created_at: string;
  author: string;
}
interface StoredIssue {
  number: number;
  title: string;
  body: string;
  state: 'open' | 'closed';
  state_reason: string | null;
  labels: string[];
  created_at: string;
  pull_request?: object;
}

/** A failure rule: answer `status` to matching calls, `times` times. */
export interface Failure {
  method: string;
  path: RegExp;
  status: number;
  times: number;
  message?: string;
  headers?: Record<string, string>;
  /** Answer with this text as the body instead of a JSON error (e.g. a malformed JSON reply). */
  raw?: string;
  /** Wait this long before answering (a stalled API). */
  delayMs?: number;
}

export class FakeGitHubServer {
  calls: Call[] = [];
  comments: StoredComment[] = [];
  issues: StoredIssue[] = [];
  labels = new Set<string>();
  /** Open pull requests, by head label ("owner:branch"), for GET /pulls?head=. */
  pulls: { number: number; head: string; sha: string }[] = [];
  failures: Failure[] = [];
  /** Holds the first `count` matching calls until all have arrived (see handle). */
  barrier: { method: string; path: RegExp; count: number; waiting: (() => void)[] } | null = null;
  private nextComment = 5000;
  private clock = Date.parse('2026-03-01T00:00:00Z');
  private server: Server | null = null;
  url = '';

  constructor(
    readonly owner = 'fernhill-labs',
    readonly repo = 'capacity',
  ) {}

  async start(): Promise<string> {
    this.server = createServer((req, res) => void this.handle(req, res));
    await new Promise<void>((resolve) => this.server!.listen(0, '127.0.0.1', resolve));
    this.url = `http://127.0.0.1:${(this.server.address() as AddressInfo).port}`;
    return this.url;
  }

  async stop(): Promise<void> {
    this.server?.closeAllConnections();
    await new Promise<void>((resolve) => this.server?.close(() => resolve()));
  }

  private stamp(): string {
    this.clock += 60_000;
    return new Date(this.clock).toISOString();
  }

  addComment(issue: number, body: string, author = 'github-actions[bot]'): StoredComment {
    const c = { id: this.nextComment++, issue, body, created_at: this.stamp(), author };
    this.comments.push(c);
    return c;
  }

  addIssue(
    title: string,
    body: string,
    labels: string[],
    state: 'open' | 'closed' = 'open',
    pr = false,
  ): StoredIssue {
    const i: StoredIssue = {
      number: this.issues.length + 1,
      title,
      body,
      state,
      state_reason: null,
      labels,
      created_at: this.stamp(),
      ...(pr ? { pull_request: {} } : {}),
    };
    this.issues.push(i);
    return i;
  }

  commentsOn(issue: number): StoredComment[] {
    return this.comments.filter((c) => c.issue === issue);
  }

  /** Calls other than reads, as "METHOD path". */
  writes(): string[] {
    return this.calls.filter((c) => c.method !== 'GET').map((c) => `${c.method} ${c.path}`);
  }

  private commentJson(c: StoredComment) {
    return {
      id: c.id,
      body: c.body,
      created_at: c.created_at,
      updated_at: c.created_at,
      html_url: `https://github.test/${this.owner}/${this.repo}/issues/${c.issue}#issuecomment-${c.id}`,
      user: { login: c.author, type: c.author.endsWith('[bot]') ? 'Bot' : 'User' },
    };
  }

  private issueJson(i: StoredIssue) {
    return {
      number: i.number,
      title: i.title,
      body: i.body,
      state: i.state,
      state_reason: i.state_reason,
      labels: i.labels.map((name) => ({ name })),
      created_at: i.created_at,
      html_url: `https://github.test/${this.owner}/${this.repo}/issues/${i.number}`,
      user: { login: 'github-actions[bot]', type: 'Bot' },
      ...(i.pull_request ? { pull_request: i.pull_request } : {}),
    };
  }

  private async handle(req: IncomingMessage, res: ServerResponse): Promise<void> {
    const chunks: Buffer[] = [];
    for await (const c of req) chunks.push(c as Buffer);
    const raw = Buffer.concat(chunks).toString('utf8');
    const u = new URL(req.url ?? '/', this.url);
    const call: Call = {
      method: req.method ?? 'GET',
      path: u.pathname,
      query: Object.fromEntries(u.searchParams),
      body: raw ? (JSON.parse(raw) as unknown) : null,
      authorization: req.headers.authorization,
      status: 0,
    };
    this.calls.push(call);
    const send = (status: number, data?: unknown, headers: Record<string, string> = {}) => {
      call.status = status;
      res.writeHead(status, { 'content-type': 'application/json; charset=utf-8', ...headers });
      res.end(data === undefined ? '' : JSON.stringify(data));
    };

    const fail = this.failures.find((f) => f.times > 0 && f.method === call.method && f.path.test(call.path));
    if (fail) {
      fail.times--;
      if (fail.delayMs) await new Promise((r) => setTimeout(r, fail.delayMs));
      if (res.destroyed) return;
      if (fail.raw !== undefined) {
        call.status = fail.status;
        res.writeHead(fail.status, { 'content-type': 'application/json; charset=utf-8', ...fail.headers });
        return void res.end(fail.raw);
      }
      return send(fail.status, { message: fail.message ?? `injected ${fail.status}` }, fail.headers);
    }
    // The workflow token may not read its own user, as on GitHub.
    if (call.path === '/user') return send(403, { message: 'Resource not accessible by integration' });
    if (this.barrier && this.barrier.method === call.method && this.barrier.path.test(call.path)) {
      // Hold matching calls until `count` of them are waiting, then answer all: forces a race.
      const b = this.barrier;
      await new Promise<void>((resolve) => {
        b.waiting.push(resolve);
        if (b.waiting.length >= b.count) {
          this.barrier = null;
          for (const w of b.waiting) w();
        }
      });
    }

    const base = `/repos/${this.owner}/${this.repo}`;
    const p = call.path.startsWith(base) ? call.path.slice(base.length) : null;
    if (p === null) return send(404, { message: 'Not Found' });
    const body = (call.body ?? {}) as Record<string, unknown>;
    let m: RegExpExecArray | null;

    const page = <T>(items: T[]) => {
      const per = Math.min(100, Number(call.query.per_page ?? 30));
      const n = Math.max(1, Number(call.query.page ?? 1));
      const last = Math.max(1, Math.ceil(items.length / per));
      const headers: Record<string, string> = {};
      if (n < last) {
        const next = new URL(u);
        next.searchParams.set('page', String(n + 1));
        const end = new URL(u);
        end.searchParams.set('page', String(last));
        headers.link = `<${next}>; rel="next", <${end}>; rel="last"`;
      }
      return { items: items.slice((n - 1) * per, n * per), headers };
    };

    if ((m = /^\/issues\/(\d+)\/comments$/.exec(p))) {
      const issue = Number(m[1]);
      if (call.method === 'GET') {
        const { items, headers } = page(this.commentsOn(issue));
        return send(
          200,
          items.map((c) => this.commentJson(c)),
          headers,
        );
      }
      if (call.method === 'POST')
        return send(201, this.commentJson(this.addComment(issue, String(body.body))));
    }
    if ((m = /^\/issues\/comments\/(\d+)$/.exec(p))) {
      const c = this.comments.find((x) => x.id === Number(m![1]));
      if (!c) return send(404, { message: 'Not Found' });
      if (call.method === 'PATCH') {
        c.body = String(body.body);
        return send(200, this.commentJson(c));
      }
      if (call.method === 'DELETE') {
        this.comments = this.comments.filter((x) => x !== c);
        return send(204);
      }
    }
    if (p === '/issues') {
      if (call.method === 'GET') {
        const label = call.query.labels;
        const state = call.query.state ?? 'open';
        const list = this.issues
          .filter((i) => !label || i.labels.includes(label))
          .filter((i) => state === 'all' || i.state === state)
          .sort((a, b) => b.number - a.number);
        const { items, headers } = page(list);
        return send(
          200,
          items.map((i) => this.issueJson(i)),
          headers,
        );
      }
      if (call.method === 'POST') {
        const labels = (body.labels as string[] | undefined) ?? [];
        return send(201, this.issueJson(this.addIssue(String(body.title), String(body.body ?? ''), labels)));
      }
    }
    if ((m = /^\/issues\/(\d+)$/.exec(p)) && call.method === 'PATCH') {
      const i = this.issues.find((x) => x.number === Number(m![1]));
      if (!i) return send(404, { message: 'Not Found' });
      if (typeof body.title === 'string') i.title = body.title;
      if (typeof body.body === 'string') i.body = body.body;
      if (body.state === 'open' || body.state === 'closed') i.state = body.state;
      if (typeof body.state_reason === 'string') i.state_reason = body.state_reason;
      return send(200, this.issueJson(i));
    }
    if ((m = /^\/labels\/([^/]+)$/.exec(p)) && call.method === 'GET') {
      const name = decodeURIComponent(m[1]!);
      return this.labels.has(name) ? send(200, { name }) : send(404, { message: 'Not Found' });
    }
    if (p === '/pulls' && call.method === 'GET') {
      const list = this.pulls.filter((x) => !call.query.head || x.head === call.query.head);
      const { items, headers } = page(list);
      return send(
        200,
        items.map((x) => ({ number: x.number, state: 'open', head: { sha: x.sha, label: x.head } })),
        headers,
      );
    }
    if (p === '/labels' && call.method === 'POST') {
      this.labels.add(String(body.name));
      return send(201, { name: body.name });
    }
    return send(404, { message: `fake GitHub has no ${call.method} ${call.path}` });
  }
}
