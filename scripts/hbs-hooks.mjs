// Node module hooks: a .hbs import is its text and its compiled template (scripts/hbs-module.mjs), as
// in the bundle and under vitest. Lets scripts run straight from src with tsx (see
// scripts/register-hbs.mjs).
import { readFile } from 'node:fs/promises';
import { hbsModule } from './hbs-module.mjs';

export async function load(url, context, nextLoad) {
  if (url.endsWith('.hbs')) {
    const text = await readFile(new URL(url), 'utf8');
    return { format: 'module', source: hbsModule(text), shortCircuit: true };
  }
  return nextLoad(url, context);
}
