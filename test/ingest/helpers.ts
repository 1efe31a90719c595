// Temp working directories for ingestion tests (never inside the repo).
import { mkdtemp, mkdir, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { parsePlan } from '../../src/config/index.js';
import type { Plan } from '../../src/config/types.js';
import { ingest, type IngestOutcome } from '../../src/ingest/index.js';

export async function tempDir(): Promise<string> {
  return mkdtemp(path.join(os.tmpdir(), 'leadline-ingest-'));
}

export async function removeDir(dir: string): Promise<void> {
  await rm(dir, { recursive: true, force: true });
}

/** Writes files (path -> text or bytes) under `dir`. */
export async function writeFiles(dir: string, files: Record<string, string | Uint8Array>): Promise<void> {
  for (const [name, content] of Object.entries(files)) {
    await mkdir(path.dirname(path.join(dir, name)), { recursive: true });
    await writeFile(path.join(dir, name), content);
  }
}

/** A plan from YAML metric entries (one per line of `metrics`), with `version: 1`. */
export function planOf(metrics: string[], defaults = ''): Plan {
  return parsePlan(
    `version: 1\n${defaults ? `defaults: ${defaults}\n` : ''}metrics:\n${metrics.map((m) => `  - ${m}`).join('\n')}\n`,
    'leadline.yml',
  );
}

/** Writes one CSV as data.csv and ingests it with one metric. */
export async function ingestOne(
  dir: string,
  csv: string | Uint8Array,
  metric: string,
): Promise<IngestOutcome> {
  await writeFiles(dir, { 'data.csv': csv });
  return ingest(planOf([`{ name: m, file: data.csv, ${metric} }`]), dir);
}

export const iso = (ms: number | undefined): string => new Date(ms!).toISOString();
