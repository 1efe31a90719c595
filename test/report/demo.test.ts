// End to end through the real pipeline: config and CSVs -> runJob -> Results -> markdown and HTML,
// read back in Chromium. Uses the demo scenario (fixtures/demo) when it is there, otherwise a small
// seeded scenario written to a temp folder here. Needs the engine (src/engine/index.ts).
import { existsSync, mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { escapeMarkdown, renderHtml, renderMarkdown } from '../../src/report/index.js';
import type { FailOn, Results } from '../../src/results.js';
import { launch } from './browser.js';
import { mermaidBlocks } from './helpers.js';

/** src/job.ts's entry, imported only when the engine exists. */
type RunJob = (o: { cwd: string; configPath: string; failOn: FailOn; now?: Date }) => Promise<Results>;

const root = path.resolve(import.meta.dirname, '..', '..');
const demo = path.join(root, 'fixtures', 'demo');
const demoThere = () => existsSync(path.join(demo, 'leadline.yml'));
const ready = existsSync(path.join(root, 'src', 'engine', 'index.ts'));
const require = createRequire(import.meta.url);

/** A small scenario of our own: storage growing towards a limit, a latency spike, a row-order benchmark, a file too short. */
function writeScenario(dir: string): void {
  let seed = 20261201;
  const normal = () => {
    seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0;
    const u = (seed + 0.5) / 2 ** 32;
    seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0;
    const v = (seed + 0.5) / 2 ** 32;
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
  };
  mkdirSync(path.join(dir, 'metrics'), { recursive: true });
  const day = (i: number) => new Date(Date.UTC(2026, 5, 1) + i * 86_400_000).toISOString().slice(0, 10);
  let gb = 1500;
  const rows = ['date,used_gb,p95_ms'];
  for (let i = 0; i < 150; i++) {
    gb += 3 + 4 * normal();
    const p95 = i === 149 ? 320 : 200 + 5 * normal();
    rows.push(`${day(i)},${gb.toFixed(1)},${p95.toFixed(1)}`);
  }
  writeFileSync(path.join(dir, 'metrics', 'storage.csv'), rows.join('\n') + '\n');
  const bench = ['seconds', ...Array.from({ length: 80 }, () => (12 + 0.3 * normal()).toFixed(3))];
  writeFileSync(path.join(dir, 'metrics', 'bench.csv'), bench.join('\n') + '\n');
  writeFileSync(path.join(dir, 'metrics', 'short.csv'), 'date,x\n2026-01-01,1\n2026-01-02,2\n');
  writeFileSync(
    path.join(dir, 'leadline.yml'),
    [
      'version: 1',
      'defaults:',
      '  levels: [80, 95]',
      'metrics:',
      '  - { name: orders-db-storage, file: metrics/storage.csv, time: date, value: used_gb, direction: above,',
      '      limit: { above: 2000, within: 30d, risk: 0.05 } }',
      "  - { name: 'checkout p95 | <b>ms</b>', file: metrics/storage.csv, time: date, value: p95_ms, direction: above }",
      '  - { name: solver-benchmark, file: metrics/bench.csv, value: seconds, direction: above }',
      '  - { name: short one, file: metrics/short.csv, time: date, value: x }',
      '',
    ].join('\n'),
  );
}

describe.skipIf(!ready)(
  'the demo scenario (or a small one of our own) through the real pipeline, rendered',
  () => {
    let browser: Browser;
    let results: Results;
    const dir = mkdtempSync(path.join(tmpdir(), 'leadline-demo-'));

    beforeAll(async () => {
      const { runJob } = (await import('../../src/job.js')) as { runJob: RunJob };
      const haveDemo = demoThere();
      const cwd = haveDemo ? demo : path.join(dir, 'scenario');
      if (!haveDemo) writeScenario(cwd);
      results = await runJob({
        cwd,
        configPath: 'leadline.yml',
        failOn: 'never',
        now: new Date('2026-12-01T06:00:00Z'),
      });
      // What our own scenario was built to show.
      if (!haveDemo)
        expect(results.series.map((s) => s.verdict)).toEqual(['at-risk', 'alarm', 'ok', 'too-short']);
      browser = await launch();
    });
    afterAll(async () => {
      await browser?.close();
    });

    it('fits a comment, names every series and puts the verdict first', () => {
      const md = renderMarkdown(results, { fullReportNote: 'The full report is in the artifact.' });
      writeFileSync(path.join(dir, 'demo.md'), md);
      expect(md.length).toBeLessThanOrEqual(65_536);
      expect(md.startsWith(`## `)).toBe(true);
      expect(md).toContain('Forecasts are estimates with stated uncertainty, not guarantees');
      if (!md.includes('cut to fit'))
        for (const s of results.series) expect(md).toContain(escapeMarkdown(s.name));
    });

    it('gives Mermaid blocks that mermaid parses', async () => {
      const page = await browser.newPage();
      await page.route('**/*', (r) => r.abort());
      await page.setContent('<!doctype html><body></body>');
      await page.addScriptTag({
        path: path.join(path.dirname(require.resolve('mermaid/package.json')), 'dist', 'mermaid.min.js'),
      });
      const blocks = mermaidBlocks(renderMarkdown(results));
      expect(blocks.length).toBeGreaterThan(0);
      for (const b of blocks) {
        const ok = await page.evaluate(async (src) => {
          const m = (window as unknown as { mermaid: { parse(t: string): Promise<unknown> } }).mermaid;
          try {
            await m.parse(src);
            return '';
          } catch (e) {
            return String(e);
          }
        }, b);
        expect(ok, b).toBe('');
      }
      await page.close();
    });

    it('gives an HTML page that loads cleanly with one fan chart per series', async () => {
      const html = renderHtml(results);
      const file = path.join(dir, 'demo.html');
      writeFileSync(file, html);
      const page = await browser.newPage({ viewport: { width: 1100, height: 900 } });
      const errors: string[] = [];
      page.on('console', (m) => {
        if (m.type() === 'error') errors.push(m.text());
      });
      page.on('pageerror', (e) => errors.push(e.message));
      await page.goto(`file://${file}`);
      expect(errors).toEqual([]);
      expect(await page.locator('svg.fan').count()).toBe(results.series.length);
      const text = (await page.textContent('body'))!;
      for (const s of results.series) expect(text).toContain(s.name);
      await page.screenshot({ path: path.join(dir, 'demo.png'), fullPage: true });
      console.log(
        `demo HTML: ${(html.length / 1024).toFixed(0)} KiB for ${results.series.length} series (${file})`,
      );
      await page.close();
    });
  },
);
