// `leadline run … | head`: the reader closes the pipe after one line. The command must not crash
// with an unhandled EPIPE; it finishes the run, writes its files and exits with the gate's code.
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';

const root = resolve(__dirname, '../..');
const out = mkdtempSync(join(tmpdir(), 'leadline-pipe-'));
afterAll(() => rmSync(out, { recursive: true, force: true }));

describe('a reader that closes the pipe early', () => {
  it('does not crash the command, and the results file is still written', async () => {
    const json = join(out, 'results.json');
    const child = spawn(
      process.execPath,
      [
        '--import',
        'tsx',
        '--import',
        './scripts/register-hbs.mjs',
        join(root, 'src/cli/index.ts'),
        'run',
        '--cwd',
        join(root, 'fixtures/demo'),
        '--config',
        'leadline.yml',
        '--fail-on',
        'never',
        '--json',
        json,
        '--print',
        'markdown',
      ],
      { cwd: root, stdio: ['ignore', 'pipe', 'pipe'] },
    );
    let stderr = '';
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
    // Like `head` that has read all it wants before the report is printed: our end closes at once.
    child.stdout.destroy();
    const code = await new Promise<number | null>((done) => child.on('close', done));
    expect(stderr).not.toMatch(/EPIPE|internal error|Unhandled/);
    expect(code).toBe(0);
    const results = JSON.parse(readFileSync(json, 'utf8')) as { series: unknown[] };
    expect(results.series.length).toBeGreaterThan(0);
  }, 120_000);
});
