// `leadline run --shard i/n` and `leadline merge`: a run split into shards and merged concludes exactly
// as the whole run does, and files that do not belong together are refused with the reason.
import { mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { cli } from './helpers.js';
import type { Results } from '../../src/results.js';
import { shardOf } from '../../src/shard.js';

/** Deterministic noise in [-1, 1) (a linear congruential generator). */
function noise(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 31 - 1;
  };
}

/**
 * A fleet of 24 daily series in 3 long-format files, the newest 4 days checked under
 * Benjamini–Hochberg: some series carry a step in their last days, so some p-values are small and
 * the run-wide adjustment differs from any shard's own.
 */
function makeFleet(dir: string): void {
  mkdirSync(path.join(dir, 'metrics'), { recursive: true });
  const r = noise(3);
  for (let f = 0; f < 3; f++) {
    const rows = ['day,host,ms'];
    for (let d = 0; d < 60; d++)
      for (let h = 0; h < 8; h++) {
        const host = `depot-${f}-${h}`;
        const step = (h + f) % 5 === 0 && d >= 57 ? 4 + h : 0;
        const day = new Date(Date.UTC(2026, 5, 1) + d * 86_400_000).toISOString().slice(0, 10);
        rows.push(`${day},${host},${(100 + 10 * f + step + r()).toFixed(2)}`);
      }
    writeFileSync(path.join(dir, 'metrics', `hosts-${f}.csv`), rows.join('\n') + '\n');
  }
  writeFileSync(
    path.join(dir, 'leadline.yml'),
    `version: 1
defaults:
  intervals: analytic
  falseAlarms: fdr
  check: { last: 4 }
  direction: above
metrics:
  - name: sorting-latency
    file: metrics/hosts-*.csv
    time: day
    key: host
    value: ms
  - name: broken
    file: metrics/missing.csv
    value: ms
`,
  );
}

/** A report or results file apart from its timing lines (and the name of the results file it points to). */
const timing = (s: string) =>
  s
    .replace(/^.*generatedAt.*$/gm, '')
    .replace(/20\d\d-\d\d-\d\dT[\d:.]+Z/g, 'T')
    .replace(/20\d\d-\d\d-\d\d \d\d:\d\d UTC/g, 'T')
    .replace(/\((whole|merged)\.json\)/g, '(results)');

describe('a run split into shards and merged', () => {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'leadline-merge-'));
  const run = ['run', '--cwd', dir, '--config', 'leadline.yml', '--fail-on', 'alarm'];
  const shards = [1, 2, 3, 4].map((i) => path.join(dir, `shard-${i}.json`));
  const read = (f: string) => JSON.parse(readFileSync(f, 'utf8')) as Results;

  beforeAll(async () => {
    makeFleet(dir);
    const whole = await cli(
      [...run, '--json', 'whole.json', '--markdown', 'whole.md', '--print', 'none'],
      dir,
    );
    expect(whole.code).toBe(2); // the missing file is a data error
    for (const [i, f] of shards.entries()) {
      const r = await cli([...run, '--shard', `${i + 1}/4`, '--json', f, '--print', 'none'], dir);
      expect(r.err).toContain(`shard ${i + 1}/4 judged`);
      expect(r.code).toBe(0); // a shard gates nothing
    }
  });

  it('splits by the hash of the series name: every series in exactly one shard', () => {
    const whole = read(path.join(dir, 'whole.json'));
    const parts = shards.map(read);
    expect(parts.map((p) => p.origin.shard)).toEqual(
      [1, 2, 3, 4].map((index) => ({ index, count: 4, series: whole.series.length })),
    );
    const names = parts.flatMap((p) => p.series.map((s) => s.name));
    expect(names.sort()).toEqual(whole.series.map((s) => s.name).sort());
    for (const [i, p] of parts.entries()) {
      expect(p.series.length).toBeGreaterThan(0);
      for (const s of p.series) expect(shardOf(s.name, 4)).toBe(i + 1);
    }
    // Each shard knows where its series sit in the whole run.
    for (const p of parts) for (const s of p.series) expect(whole.series[s.position!]!.name).toBe(s.name);
    expect(whole.series.every((s) => s.position === undefined)).toBe(true);
    // The problem (a missing file) goes to the shard of its series, with its place.
    expect(parts.flatMap((p) => p.problems)).toHaveLength(1);
    expect(whole.origin.configHash).toMatch(/^sha256:[0-9a-f]{64}$/);
    for (const p of parts) expect(p.origin.configHash).toBe(whole.origin.configHash);
  });

  it('merges (in any order) to exactly the whole run: verdicts, alarms, adjusted p-values, report', async () => {
    const m = await cli(
      [
        'merge',
        shards[2]!,
        shards[0]!,
        shards[3]!,
        shards[1]!,
        '--fail-on',
        'alarm',
        '--json',
        'merged.json',
        '--markdown',
        'merged.md',
      ],
      dir,
    );
    const wholeText = readFileSync(path.join(dir, 'whole.json'), 'utf8');
    const mergedText = readFileSync(path.join(dir, 'merged.json'), 'utf8');
    expect(timing(mergedText)).toBe(timing(wholeText));
    expect(timing(readFileSync(path.join(dir, 'merged.md'), 'utf8'))).toBe(
      timing(readFileSync(path.join(dir, 'whole.md'), 'utf8')),
    );
    const whole = read(path.join(dir, 'whole.json'));
    expect(whole.summary.alarms).toBeGreaterThan(0);
    expect(m.code).toBe(2); // like the whole run: one data error
    expect(m.out).toContain('Gate failed (fail-on: alarm)');

    // The run-wide adjustment is not the shards' own: Benjamini–Hochberg over 4 × fewer p-values.
    const adjusted = new Map(
      whole.series.flatMap((s) => s.checked.map((c) => [`${s.name}@${c.index}`, c.adjustedP])),
    );
    let differ = 0;
    let total = 0;
    for (const p of shards.map(read))
      for (const s of p.series)
        for (const c of s.checked) {
          total++;
          if (Math.abs(c.adjustedP - adjusted.get(`${s.name}@${c.index}`)!) > 1e-12) differ++;
        }
    expect(total).toBe(whole.summary.checkedObservations);
    expect(differ).toBeGreaterThan(total / 2);
  });

  it('names a missing, a duplicated and a foreign shard', async () => {
    const missing = await cli(['merge', shards[0]!, shards[1]!, shards[3]!], dir);
    expect(missing.code).toBe(2);
    expect(missing.err).toContain('shard 3/4 is missing');

    const twice = await cli(['merge', ...shards, shards[1]!], dir);
    expect(twice.err).toContain(`${shards[1]}: this file is shard 2/4, and so is ${shards[1]}`);

    // The same run with the config changed: its shard 2 comes from another run.
    const other = mkdtempSync(path.join(os.tmpdir(), 'leadline-merge-other-'));
    makeFleet(other);
    writeFileSync(
      path.join(other, 'leadline.yml'),
      readFileSync(path.join(other, 'leadline.yml'), 'utf8') + '# changed\n',
    );
    const foreign = path.join(other, 'shard-2.json');
    await cli(
      ['run', '--cwd', other, '--config', 'leadline.yml', '--shard', '2/4', '--json', foreign],
      other,
    );
    const mixed = await cli(['merge', shards[0]!, foreign, shards[2]!, shards[3]!], dir);
    expect(mixed.code).toBe(2);
    expect(mixed.err).toContain(`${foreign}: this file comes from another run: its config hash`);

    // A split into 3 is not a split into 4.
    const three = path.join(dir, 'three-1.json');
    await cli([...run, '--shard', '1/3', '--json', three], dir);
    expect((await cli(['merge', three, ...shards.slice(1)], dir)).err).toContain('different splits');
  });

  it('refuses a tampered shard file and one in another format', async () => {
    const text = readFileSync(shards[1]!, 'utf8');
    const bad = path.join(dir, 'tampered.json');
    writeFileSync(bad, text.replace('"verdict":"', '"verdict":"x'));
    const r = await cli(['merge', shards[0]!, bad, shards[2]!, shards[3]!], dir);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/tampered\.json:\d+: a series is not valid: verdict/);

    const notOurs = path.join(dir, 'not-ours.json');
    writeFileSync(notOurs, '{"$schema": "https://example.invalid/other", "series": []}');
    expect((await cli(['merge', notOurs], dir)).err).toContain(
      'not a Leadline results file: "$schema" is "https://example.invalid/other"',
    );

    // Reformatted (any JSON layout) is read whole, and merges the same.
    const pretty = path.join(dir, 'pretty.json');
    writeFileSync(pretty, JSON.stringify(read(shards[1]!), null, 1));
    const again = await cli(
      ['merge', shards[0]!, pretty, shards[2]!, shards[3]!, '--fail-on', 'alarm', '--json', 'again.json'],
      dir,
    );
    expect(again.err).toBe('');
    expect(timing(readFileSync(path.join(dir, 'again.json'), 'utf8'))).toBe(
      timing(readFileSync(path.join(dir, 'whole.json'), 'utf8')),
    );
  });

  it('rejects run-only options and a merge with no files', async () => {
    expect((await cli(['merge', '--shard', '1/2', 'a.json'], dir)).err).toContain(
      '--shard is for "leadline run"',
    );
    expect((await cli(['merge'], dir)).err).toContain('merge needs the results files');
    expect((await cli([...run, '--shard', '5/4', '--json', 'x.json'], dir)).err).toContain(
      '"5/4" is not a shard',
    );
    expect((await cli([...run, '--shard', '1/4'], dir)).err).toContain('--shard needs --json');
  });
});
