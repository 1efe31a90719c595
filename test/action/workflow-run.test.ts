// Which pull request a workflow_run job publishes on: from GitHub's account of the finished run.
import { describe, expect, it } from 'vitest';
import { eventFacts } from '../../src/action/event.js';
import { workflowRunPullRequest } from '../../src/action/publish.js';
import { FakeGitHub } from './helpers.js';

const HEAD = 'c'.repeat(40);
const run = (workflow_run: object) => eventFacts({ workflow_run }).workflowRun!;

describe('the pull request of a workflow run', () => {
  it('is the one the payload lists at the head commit (same-repository pull requests)', async () => {
    const api = new FakeGitHub();
    const wr = run({
      event: 'pull_request',
      head_sha: HEAD,
      pull_requests: [{ number: 8, head: { sha: HEAD } }],
    });
    expect(await workflowRunPullRequest(wr, api)).toEqual({ number: 8, headSha: HEAD });
    expect(api.calls).toEqual([]); // no lookup needed
  });

  it('is looked up by the head owner and branch when the payload lists none (forks)', async () => {
    const api = new FakeGitHub();
    api.pulls = [
      { number: 3, head: 'fan:main', headSha: 'd'.repeat(40) }, // pushed to since: another commit
      { number: 5, head: 'fan:fix', headSha: HEAD },
    ];
    const wr = run({
      event: 'pull_request',
      head_sha: HEAD,
      head_branch: 'fix',
      head_repository: { owner: { login: 'fan' } },
      pull_requests: [],
    });
    expect(await workflowRunPullRequest(wr, api)).toEqual({ number: 5, headSha: HEAD });
    expect(api.calls).toEqual(['openPullRequests fan:fix']);
  });

  it('refuses when none or several have the head commit, or the event has no head commit', async () => {
    const api = new FakeGitHub();
    const fork = {
      event: 'pull_request',
      head_sha: HEAD,
      head_branch: 'fix',
      head_repository: { owner: { login: 'fan' } },
    };
    await expect(workflowRunPullRequest(run(fork), api)).rejects.toThrow(
      /No open pull request has the workflow run's head commit cccccccccccc/,
    );
    const two = run({
      ...fork,
      pull_requests: [
        { number: 1, head: { sha: HEAD } },
        { number: 2, head: { sha: HEAD } },
      ],
    });
    await expect(workflowRunPullRequest(two, api)).rejects.toThrow(/#1, #2 all have/);
    await expect(workflowRunPullRequest(run({ event: 'pull_request' }), api)).rejects.toThrow(
      /names no head commit/,
    );
  });

  it('ignores payload fields of the wrong shape', () => {
    const wr = run({
      event: 7,
      head_sha: 'not a sha',
      pull_requests: [{ number: '9' }, { number: -1 }, null],
    });
    expect(wr).toEqual({ event: '', headSha: null, headOwner: null, headBranch: null, pullRequests: [] });
  });
});
