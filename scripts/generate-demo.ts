// Writes the demo scenario into fixtures/demo: Quillby Parcel Co., an invented parcel-delivery
// company, and the metrics its platform team commits. Seeded, so the files are the same on every
// machine; run `npm run demo:generate` after changing it and commit the result.
import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { createRandom } from '../src/engine/random.js';

const root = path.resolve(import.meta.dirname, '..', 'fixtures', 'demo');
const rnd = createRandom(20261201);
const DAY = 86_400_000;
const HOUR = 3_600_000;
const END = Date.UTC(2026, 10, 30); // the last day of data: 2026-11-30

const date = (ms: number): string => new Date(ms).toISOString().slice(0, 10);
const hour = (ms: number): string => new Date(ms).toISOString().replace('.000Z', 'Z');
const round = (x: number, d = 1): number => Math.round(x * 10 ** d) / 10 ** d;

function write(name: string, header: string[], rows: (string | number)[][]): void {
  const text = [header.join(','), ...rows.map((r) => r.join(','))].join('\n') + '\n';
  writeFileSync(path.join(root, 'metrics', name), text);
}

mkdirSync(path.join(root, 'metrics'), { recursive: true });

// 1. Tracking API: daily p95 latency and request count with a weekly rhythm (weekends quieter).
{
  const days = 182;
  const rows: (string | number)[][] = [];
  const weekly = [1.0, 1.06, 1.04, 1.03, 1.08, 0.82, 0.74];
  let level = 212;
  for (let i = 0; i < days; i++) {
    const t = END - (days - 1 - i) * DAY;
    const dow = (new Date(t).getUTCDay() + 6) % 7;
    level += rnd.normal() * 1.5;
    const p95 = level * weekly[dow]! + rnd.normal() * 6;
    const requests = Math.round(48_000 * weekly[dow]! * (1 + 0.0006 * i) + rnd.normal() * 1500);
    // Six days before the end a carrier's outage doubled the p95 for a day: a known incident, marked
    // in the note column, so next week's seasonal forecast does not repeat it.
    const outage = i === days - 6;
    rows.push([
      date(t),
      round(outage ? p95 + 190 : p95),
      requests,
      outage ? 'carrier outage (Harbour depot)' : '',
    ]);
  }
  write('tracking-api-daily.csv', ['date', 'p95_ms', 'requests', 'note'], rows);
}

// 2. Dispatch queue depth, hourly over three weeks, with a daily cycle.
{
  const hours = 24 * 21;
  const rows: (string | number)[][] = [];
  const endHour = END + 23 * HOUR;
  for (let i = 0; i < hours; i++) {
    const t = endHour - (hours - 1 - i) * HOUR;
    const h = new Date(t).getUTCHours();
    const cycle = 140 + 90 * Math.sin(((h - 8) / 24) * 2 * Math.PI);
    rows.push([hour(t), Math.max(0, Math.round(cycle + rnd.normal() * 12))]);
  }
  write('dispatch-queue-hourly.csv', ['hour', 'depth'], rows);
}

// 3. Parcel-events database storage in GB, growing towards its 2,000 GB volume.
{
  const days = 120;
  const rows: (string | number)[][] = [];
  let gb = 1_600;
  for (let i = 0; i < days; i++) {
    const t = END - (days - 1 - i) * DAY;
    gb += 3.1 + rnd.normal() * 2.2;
    rows.push([date(t), round(gb)]);
  }
  write('events-db-storage.csv', ['day', 'used_gb'], rows);
}

// 4. Route solver benchmark, one row per commit (row order, no time column).
{
  const commits = 90;
  const rows: (string | number)[][] = [];
  for (let i = 0; i < commits; i++) {
    const sha = Math.floor(rnd.uniform() * 0xfffffff)
      .toString(16)
      .padStart(7, '0');
    rows.push([sha, round(41.5 + rnd.normal() * 0.9, 2)]);
  }
  write('route-solver-bench.csv', ['commit', 'seconds'], rows);
}

// 5. Label rendering time, daily, with an injected regression on the newest day.
{
  const days = 90;
  const rows: (string | number)[][] = [];
  for (let i = 0; i < days; i++) {
    const t = END - (days - 1 - i) * DAY;
    const base = 118 + rnd.normal() * 4;
    // Three weeks before the end a font-cache purge slowed rendering for two days: listed as a known
    // incident in the config.
    const purge = i === days - 22 || i === days - 21 ? 38 : 0;
    rows.push([date(t), round(i === days - 1 ? base + 46 : base + purge)]);
  }
  write('label-render-daily.csv', ['date', 'median_ms'], rows);
}

// 6. A region that went live last week: too few rows to forecast yet.
{
  const rows: (string | number)[][] = [];
  for (let i = 0; i < 2; i++) rows.push([date(END - (1 - i) * DAY), 310 + i * 22]);
  write('harbour-region-signups.csv', ['date', 'signups'], rows);
}

// 7. Web bundle sizes in long format: one row per package per day.
{
  const days = 60;
  const rows: (string | number)[][] = [];
  const packages: [string, number, number][] = [
    ['tracker-web', 412, 0.35],
    ['driver-app', 1_830, 1.2],
    ['returns-portal', 268, 0.0],
  ];
  const size = packages.map(([, kb]) => kb);
  for (let i = 0; i < days; i++) {
    const t = END - (days - 1 - i) * DAY;
    packages.forEach(([name, , growth], k) => {
      size[k]! += growth + rnd.normal() * 0.8;
      rows.push([date(t), name, round(size[k]!)]);
    });
  }
  write('web-bundles.csv', ['date', 'package', 'kb'], rows);
}

writeFileSync(
  path.join(root, 'leadline.yml'),
  `# Leadline demo: Quillby Parcel Co. (an invented company), platform team metrics.
# Regenerate the CSVs with \`npm run demo:generate\`; run with \`npm run demo\`.
version: 1
defaults:
  levels: [80, 95]
  horizon: 14
metrics:
  - name: tracking-api
    file: metrics/tracking-api-daily.csv
    time: date
    value: [p95_ms, requests]
    season: auto
    direction: above
    incidentColumn: note
  - name: dispatch-queue
    file: metrics/dispatch-queue-hourly.csv
    time: hour
    value: depth
    unit: parcels
    season: auto
    horizon: 24
    direction: above
  - name: events-db-storage
    file: metrics/events-db-storage.csv
    time: day
    value: used_gb
    unit: GB
    methods: [drift, naive]
    direction: above
    limit:
      above: 2000
      within: 30d
      risk: 0.05
  - name: route-solver-bench
    file: metrics/route-solver-bench.csv
    value: seconds
    unit: s
    label: commit
    direction: above
    check:
      last: 3
  - name: label-render
    file: metrics/label-render-daily.csv
    time: date
    value: median_ms
    unit: ms
    direction: above
    incidents:
      - from: ${date(END - 21 * DAY)}
        to: ${date(END - 20 * DAY)}
        reason: font-cache purge after the label template change
  - name: harbour-region-signups
    file: metrics/harbour-region-signups.csv
    time: date
    value: signups
  - name: web-bundle
    file: metrics/web-bundles.csv
    time: date
    key: package
    value: kb
    unit: kB
    direction: above
    limit:
      above: 2400
      within: 60d
`,
);
console.log(`demo scenario written to ${path.relative(process.cwd(), root)}`);
