// The `leadline` command's entry: only launches. See main.ts. The bundle is also the script of the
// analysis worker threads (src/pool.ts), which start nothing here.
import { isPoolWorker } from '../pool.js';
import { main } from './main.js';

if (!isPoolWorker()) start();

function start(): void {
  // A reader that stops early (`leadline run … | head`) closes the pipe: the rest of the terminal
  // output has nowhere to go, but the run still finishes and writes its files and exit code.
  process.stdout.on('error', (e: NodeJS.ErrnoException) => {
    if (e.code !== 'EPIPE') throw e;
  });
  main(process.argv.slice(2), {
    stdout: process.stdout,
    stderr: process.stderr,
    env: process.env,
    cwd: process.cwd(),
  }).then(
    (code) => {
      process.exitCode = code;
    },
    (e: unknown) => {
      process.stderr.write(
        `leadline: internal error: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}\n`,
      );
      process.exitCode = 2;
    },
  );
}
