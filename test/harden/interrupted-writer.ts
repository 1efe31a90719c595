// Started by interrupted-write.test.ts: begins an atomic write of argv[2] through Leadline's writer,
// says so on stdout once part of the text is on disk, then waits to be interrupted.
import path from 'node:path';
import { inputGuard, writeOutput } from '../../src/files.js';

const target = process.argv[2]!;
const dir = path.dirname(target);
const guard = await inputGuard(dir, path.join(dir, 'leadline.yml'));

async function* pieces(): AsyncGenerator<string> {
  yield 'first half of the results\n';
  process.stdout.write('writing\n');
  await new Promise(() => setInterval(() => undefined, 1000));
  yield 'second half\n';
}

await writeOutput(target, pieces(), guard, 'results file');
