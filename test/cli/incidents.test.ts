// Known incidents: rows marked in the config (time ranges) or by a column are left out of fitting,
// backtests and residual checks, never judged, and still listed and drawn.
import { mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { resultsSchema, type Results } from '../../src/results.js';
import { cli } from './helpers.js';

/** A weekly pattern (the same weekday, the same value) over 10 weeks, with a spike on day 64. */
const PATTERN = [100, 120, 130, 125, 110, 60, 50];
const SPIKE = 64;
function csv(mark: boolean, spikeAt = SPIKE): string {
  const rows = ['date,latency,note,commit'];
  for (let i = 0; i < 70; i++) {
    const day = new Date(Date.UTC(2026, 0, 1 + i)).toISOString().slice(0, 10);
    const v = PATTERN[i % 7]! + (i === spikeAt ? 200 : 0) + (((i * 37) % 11) - 5) * 0.5;
    rows.push(
      `${day},${v.toFixed(1)},${mark && i === spikeAt ? 'database failover' : ''},c${i.toString(16).padStart(6, '0')}`,
    );
  }
  return rows.join('\n') + '\n';
}

function scenario(config: string, data: string): string {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'leadline-incidents-'));
  mkdirSync(path.join(dir, 'm'));
  writeFileSync(path.join(dir, 'm', 'a.csv'), data);
  writeFileSync(path.join(dir, 'leadline.yml'), config);
  return dir;
}

const METRIC = `version: 1
metrics:
  - name: api
    file: m/a.csv
    time: date
    value: latency
    season: 7
    methods: [seasonal-naive]
`;

async function run(dir: string, extra: string[] = []) {
  const r = await cli(
    ['run', '--config', 'leadline.yml', '--json', 'r.json', '--fail-on', 'never', ...extra],
    dir,
  );
  const results =
    r.code === 2 && r.err
      ? null
      : resultsSchema.parse(JSON.parse(readFileSync(path.join(dir, 'r.json'), 'utf8')));
  return { ...r, results };
}

describe('known incidents', () => {
  // Day 64 is weekday position 64 mod 7 = 1; the series ends at day 69, so forecast step 2 (day 71,
  // position 1) is seasonal naive's copy of the latest observed value in position 1.
  const step2 = (r: Results) => r.series[0]!.forecast[1]!.mean;

  it("keep a seasonal method from echoing last week's incident into next week's forecast", async () => {
    const unmarked = await run(scenario(METRIC, csv(false)));
    // Unmarked, the spike (120 + 200 + ((64·37 mod 11) − 5)/2 = 319) is copied one season ahead.
    expect(step2(unmarked.results!)).toBeCloseTo(319, 6);
    const byColumn = await run(scenario(`${METRIC}    incidentColumn: note\n`, csv(true)));
    // Marked, the copy comes from two weeks back (day 57: 120 + ((57·37 mod 11) − 5)/2 = 121.5).
    expect(step2(byColumn.results!)).toBeCloseTo(121.5, 6);
    const byRange = await run(
      scenario(
        `${METRIC}    incidents:\n      - { from: 2026-03-06, reason: database failover }\n`,
        csv(false),
      ),
    );
    expect(step2(byRange.results!)).toBeCloseTo(121.5, 6);
    for (const r of [byColumn.results!, byRange.results!]) {
      const s = r.series[0]!;
      expect(s.incidents).toEqual([
        expect.objectContaining({
          index: SPIKE,
          row: SPIKE + 2,
          time: '2026-03-06T00:00:00.000Z',
          reason: 'database failover',
        }),
      ]);
      expect(s.history.find((h) => h.index === SPIKE)).toMatchObject({ value: 319, incident: true });
      // Its residual is left out, like a gap's.
      const at = s.history.findIndex((h) => h.index === SPIKE);
      expect(s.residuals[at]).toBeNull();
    }
  });

  it('are never alarms themselves: an incident among the checked rows is not judged', async () => {
    const dir = scenario(`${METRIC}    incidentColumn: note\n    check: { last: 1 }\n`, csv(true, 69));
    const { results, out } = await run(dir, ['--markdown', 'r.md']);
    const s = results!.series[0]!;
    expect(s.checked).toEqual([]);
    expect(s.verdict).not.toBe('alarm');
    expect(s.notes.join(' ')).toContain('is a known incident: it is not judged, never an alarm');
    expect(out).not.toContain('out of line');
    // Unmarked, the same row is an alarm.
    const plain = await run(scenario(METRIC, csv(false, 69)));
    expect(plain.results!.series[0]!.verdict).toBe('alarm');
  });

  it('say so when a range matches no row', async () => {
    const dir = scenario(
      `${METRIC}    incidents:\n      - { from: 2025-05-01, to: 2025-05-02 }\n`,
      csv(false),
    );
    const s = (await run(dir)).results!.series[0]!;
    expect(s.incidents ?? []).toEqual([]);
    expect(s.notes).toContain(
      'The known incident 2025-05-01 to 2025-05-02 (metrics[0].incidents[0]) matches no row of this series; check its times.',
    );
  });

  it('cover a whole day when "to" is a date, and refuse bad config naming the key', async () => {
    const whole = await run(
      scenario(
        `${METRIC}    incidents:\n      - { from: 2026-03-05T12:00:00Z, to: 2026-03-06 }\n`,
        csv(false),
      ),
    );
    expect(whole.results!.series[0]!.incidents!.map((x) => x.index)).toEqual([SPIKE]);

    const bad = [
      [`${METRIC}    incidents:\n      - { from: yesterday }\n`, 'metrics[0].incidents[0].from', 'ISO 8601'],
      [
        `${METRIC}    incidents:\n      - { from: 2026-03-06, to: 2026-03-01 }\n`,
        'metrics[0].incidents[0].to',
        'before it starts',
      ],
      [
        `${METRIC}    incidents:\n      - { from: 2026-03-06, reson: x }\n`,
        'metrics[0].incidents[0].reson',
        'did you mean "reason"',
      ],
      [
        `${METRIC.replace('    time: date\n', '')}    incidents:\n      - { from: 2026-03-06 }\n`,
        'metrics[0].incidents',
        'incidentColumn',
      ],
      [`${METRIC}    incidentColumn: latency\n`, 'metrics[0].incidentColumn', 'must differ'],
    ] as const;
    for (const [config, key, words] of bad) {
      const r = await cli(
        ['run', '--config', 'leadline.yml', '--fail-on', 'never'],
        scenario(config, csv(false)),
      );
      expect(r.code, config).toBe(2);
      expect(r.err, config).toContain(key);
      expect(r.err, config).toContain(words);
    }
    // A column that is not in the file is a data error naming the file and the header.
    const missing = await cli(
      ['run', '--config', 'leadline.yml', '--fail-on', 'never'],
      scenario(`${METRIC}    incidentColumn: notes\n`, csv(false)),
    );
    expect(missing.code).toBe(2);
    expect(missing.out + missing.err).toMatch(
      /incident column "notes" is not in the header.*Did you mean "note"/s,
    );
  });
});

describe('units, row labels and incidents in what people read', () => {
  it('print the unit with values, name rows by their label, and list and draw incidents', async () => {
    const config = `${METRIC}    unit: ms\n    label: commit\n    incidentColumn: note\n`;
    // The newest row is far above the pattern: an alarm, named by its label.
    const data = csv(true).replace(/\n2026-03-11,[^,]+,/, '\n2026-03-11,95,');
    const dir = scenario(config, data);
    const r = await cli(
      [
        'run',
        '--config',
        'leadline.yml',
        '--json',
        'r.json',
        '--markdown',
        'r.md',
        '--html',
        'r.html',
        '--fail-on',
        'never',
      ],
      dir,
    );
    const s = (JSON.parse(readFileSync(path.join(dir, 'r.json'), 'utf8')) as Results).series[0]!;
    expect(s.verdict).toBe('alarm');
    expect(s.checked[0]!.label).toBe('c000045');
    // Terminal: value and interval with the unit; the reason names the row by its label, not its line.
    expect(r.out).toMatch(
      /out of line\s+api .* 95 ms vs 95% interval [\d.]+ … [\d.]+ ms: outside, above: alarm/,
    );
    expect(r.out).toMatch(/\(95 ms above [\d.]+ ms, c000045\)/);
    expect(r.out).not.toContain('line 71');
    const md = readFileSync(path.join(dir, 'r.md'), 'utf8');
    expect(md).toContain('| 2026-03-06 (c000040) | 319 ms | database failover |');
    expect(md).toContain('Known incidents: 1 row of api left out of fitting');
    expect(md).toContain('never alarms');
    expect(md).toContain('| Step | When | Forecast (ms) |');
    expect(md).toMatch(/y-axis "latency \(ms\)"/);
    // The Mermaid chart marks the incident with a column: one bar value above the axis minimum.
    const chart = md.slice(md.indexOf('xychart-beta'));
    const yMin = chart.match(/y-axis "[^"]+" (-?[\d.]+) -->/)![1]!;
    const bar = chart.match(/ {2}bar \[([^\]]+)\]/)![1]!.split(', ');
    expect(bar.filter((b) => b !== yMin)).toEqual(['319']);
    const html = readFileSync(path.join(dir, 'r.html'), 'utf8');
    expect(html.match(/<rect class="incident" data-index="64"/g)).toHaveLength(1);
    expect(html).toContain('known incident: database failover (left out of the statistics)');
    expect(html).toContain('<text class="unit"');
    expect(html).toContain('Forecast (ms)');
  });

  it("label the x axis of a row-order series with the rows' labels", async () => {
    const rows = ['commit,seconds'];
    for (let i = 0; i < 40; i++)
      rows.push(`${(0xabc000 + i).toString(16)}f00d,${(12 + ((i * 7) % 5) * 0.1).toFixed(2)}`);
    const dir = mkdtempSync(path.join(os.tmpdir(), 'leadline-labels-'));
    mkdirSync(path.join(dir, 'b'));
    writeFileSync(path.join(dir, 'b', 'bench.csv'), rows.join('\n') + '\n');
    writeFileSync(
      path.join(dir, 'leadline.yml'),
      'version: 1\nmetrics:\n  - { name: solver, file: b/bench.csv, value: seconds, unit: s, label: commit }\n',
    );
    await cli(
      ['run', '--config', 'leadline.yml', '--html', 'r.html', '--markdown', 'r.md', '--fail-on', 'never'],
      dir,
    );
    const html = readFileSync(path.join(dir, 'r.html'), 'utf8');
    const fan = html.slice(
      html.indexOf('class="chart fan"'),
      html.indexOf('</svg>', html.indexOf('class="chart fan"')),
    );
    const ticks = [
      ...fan.matchAll(/<text class="tick" x="[^"]+" y="[^"]+" text-anchor="[a-z]+">([^<]+)<\/text>/g),
    ].map((m) => m[1]);
    expect(ticks.some((t) => /^abc0[0-9a-f]{2}f00d$/.test(t!))).toBe(true);
    // Rows of the history are named by label; only forecast steps past the last row keep a number.
    expect(ticks.filter((t) => t!.startsWith('#') && Number(t!.slice(1)) <= 40)).toEqual([]);
    const md = readFileSync(path.join(dir, 'r.md'), 'utf8');
    expect(md).toMatch(/\| abc027f00d \| 12\.\d+ s \|/);
  });
});
