// An interrupted run leaves neither a temporary file nor a half-written output behind.
import { spawn } from 'node:child_process';
import { mkdtemp, readdir, readFile, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

const script = path.join(import.meta.dirname, 'interrupted-writer.ts');

async function interrupt(signal: 'SIGTERM' | 'SIGINT', dir: string, target: string) {
  const child = spawn(process.execPath, ['--import', 'tsx', script, target], {
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let out = '';
  let err = '';
  child.stderr.on('data', (b: Buffer) => (err += b.toString()));
  await new Promise<void>((resolve, reject) => {
    child.stdout.on('data', (b: Buffer) => {
      out += b.toString();
      if (out.includes('writing')) resolve();
    });
    child.on('exit', () => reject(new Error(`writer ended early: ${err}`)));
  });
  // The temporary file exists while the write is under way.
  expect((await readdir(dir)).some((f) => f.endsWith('.tmp'))).toBe(true);
  const ended = new Promise<NodeJS.Signals | null>((resolve) =>
    child.on('exit', (_code, sig) => resolve(sig)),
  );
  child.kill(signal);
  return ended;
}

describe('interrupted writes', () => {
  for (const signal of ['SIGTERM', 'SIGINT'] as const) {
    it(`removes the temporary file on ${signal} and leaves the previous output whole`, async () => {
      const dir = await mkdtemp(path.join(tmpdir(), 'leadline-interrupt-'));
      const target = path.join(dir, 'results.json');
      await writeFile(target, '{"previous":true}\n');
      const sig = await interrupt(signal, dir, target);
      expect(sig).toBe(signal);
      expect((await readdir(dir)).filter((f) => f.endsWith('.tmp'))).toEqual([]);
      expect(await readFile(target, 'utf8')).toBe('{"previous":true}\n');
    }, 30_000);
  }
});
