// End to end on the demo scenario: the real pipeline's results, rendered as markdown and HTML, read
// back in Chromium. Runs once the demo data and the engine are on main (both are other issues' work).
import { existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { escapeMarkdown, renderHtml, renderMarkdown } from '../../src/report/index.js';
import type { FailOn, Results } from '../../src/results.js';

/** src/job.ts's entry, imported only when the engine exists. */
type RunJob = (o: { cwd: string; configPath: string; failOn: FailOn; now?: Date }) => Promise<Results>;
import { launch } from './browser.js';
import { mermaidBlocks } from './helpers.js';

const root = path.resolve(import.meta.dirname, '..', '..');
const demo = path.join(root, 'fixtures', 'demo');
const ready =
  existsSync(path.join(demo, 'leadline.yml')) && existsSync(path.join(root, 'src', 'engine', 'index.ts'));
const require = createRequire(import.meta.url);

describe.skipIf(!ready)('the demo scenario, rendered (needs fixtures/demo and src/engine)', () => {
  let browser: Browser;
  let results: Results;
  const dir = mkdtempSync(path.join(tmpdir(), 'leadline-demo-'));

  beforeAll(async () => {
    const { runJob } = (await import('../../src/job.js')) as { runJob: RunJob };
    results = await runJob({
      cwd: demo,
      configPath: 'leadline.yml',
      failOn: 'never',
      now: new Date('2026-12-01T06:00:00Z'),
    });
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
});
