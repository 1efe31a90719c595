// Writes leadline.schema.json (the JSON Schema of the config, for editors and for `$schema` in YAML
// language servers) from the zod schema in src/config/schema.ts, formatted by the repo's Prettier
// config. Run: node --import tsx scripts/schema.ts. test/config/schema-file.test.ts fails when the
// committed file is stale.
import { writeFile } from 'node:fs/promises';
import { fileURLToPath, pathToFileURL } from 'node:url';
import * as prettier from 'prettier';
import { jsonSchema } from '../src/config/schema.js';

export const SCHEMA_FILE = fileURLToPath(new URL('../leadline.schema.json', import.meta.url));

/** The exact text leadline.schema.json should have. */
export async function schemaFileText(): Promise<string> {
  const options = (await prettier.resolveConfig(SCHEMA_FILE)) ?? {};
  return prettier.format(JSON.stringify(jsonSchema()), { ...options, filepath: SCHEMA_FILE });
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  await writeFile(SCHEMA_FILE, await schemaFileText());
  console.log(`wrote ${SCHEMA_FILE}`);
}
