// Writes the two committed JSON Schemas, formatted by the repo's Prettier config:
// - leadline.schema.json, the config's (for editors and `$schema` in YAML language servers), from the
//   zod schema in src/config/schema.ts;
// - leadline-results.schema.json, the results file's (for consumers and `leadline merge`), from the
//   zod schema in src/results.ts.
// Run: node --import tsx scripts/schema.ts. test/config/schema-file.test.ts and
// test/cli/results-schema.test.ts fail when a committed file is stale.
import { writeFile } from 'node:fs/promises';
import { fileURLToPath, pathToFileURL } from 'node:url';
import * as prettier from 'prettier';
import { jsonSchema } from '../src/config/schema.js';
import { resultsJsonSchema } from '../src/results.js';

export const SCHEMA_FILE = fileURLToPath(new URL('../leadline.schema.json', import.meta.url));
export const RESULTS_SCHEMA_FILE = fileURLToPath(new URL('../leadline-results.schema.json', import.meta.url));

async function format(value: unknown, file: string): Promise<string> {
  const options = (await prettier.resolveConfig(file)) ?? {};
  return prettier.format(JSON.stringify(value), { ...options, filepath: file });
}

/** The exact text leadline.schema.json should have. */
export async function schemaFileText(): Promise<string> {
  return format(jsonSchema(), SCHEMA_FILE);
}

/** The exact text leadline-results.schema.json should have. */
export async function resultsSchemaFileText(): Promise<string> {
  return format(resultsJsonSchema(), RESULTS_SCHEMA_FILE);
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  await writeFile(SCHEMA_FILE, await schemaFileText());
  await writeFile(RESULTS_SCHEMA_FILE, await resultsSchemaFileText());
  console.log(`wrote ${SCHEMA_FILE} and ${RESULTS_SCHEMA_FILE}`);
}
