// The command's output is the job log in a workflow step: untrusted names can neither issue workflow
// commands nor hide behind invisible characters, on stdout and stderr alike.
import { mkdtempSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { main } from '../../src/cli/main.js';
import { escapeHtml, escapeMarkdown } from '../../src/text/index.js';

describe('untrusted text in the log and the reports', () => {
  it('a metric file named like a workflow command reaches stderr neutralised', async () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'leadline-log-'));
    writeFileSync(
      path.join(dir, 'leadline.yml'),
      'version: 1\nmetrics:\n  - { name: m, file: "x\\n::stop-commands::pwn\\u202E.csv", value: v }\n',
    );
    let out = '';
    let err = '';
    const code = await main(['run', '--cwd', dir, '--config', 'leadline.yml', '--print', 'summary'], {
      stdout: { write: (s: string) => (out += s), isTTY: false },
      stderr: { write: (s: string) => (err += s) },
      env: {},
      cwd: dir,
    });
    expect(code).toBe(2);
    const all = `${out}\n${err}`;
    expect(all).toContain('stop-commands');
    for (const line of all.split(/\r\n|\r|\n/)) expect(line.trimStart()).not.toMatch(/^::/);
    expect(all).not.toContain('\u202E');
  });

  it('reports show bidirectional overrides and zero-width characters escaped', () => {
    expect(escapeMarkdown('cost\u202Etxt.exe\u200B')).toBe(
      'cost\\u202Etxt.exe\\u200B'.replace(/\\/g, '&#92;'),
    );
    expect(escapeHtml('a\u2066b')).toBe('a\\u2066b');
  });
});
