// The command in-process, with stdout and stderr captured.
import { main } from '../../src/cli/main.js';

export async function cli(argv: string[], cwd: string) {
  let out = '';
  let err = '';
  const code = await main(argv, {
    stdout: { write: (s: string) => (out += s), isTTY: false },
    stderr: { write: (s: string) => (err += s) },
    env: {},
    cwd,
  });
  return { code, out, err };
}
