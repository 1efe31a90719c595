// Node module hooks: a .hbs import is its text, as in the bundle (esbuild's 'text' loader) and under
// vitest. Lets scripts run straight from src with tsx (see scripts/register-hbs.mjs).
import { readFile } from 'node:fs/promises';

export async function load(url, context, nextLoad) {
  if (url.endsWith('.hbs')) {
    const text = await readFile(new URL(url), 'utf8');
    return { format: 'module', source: `export default ${JSON.stringify(text)};`, shortCircuit: true };
  }
  return nextLoad(url, context);
}
