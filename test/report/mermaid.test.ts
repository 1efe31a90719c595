// The markdown report in a browser: every Mermaid block parses and renders with mermaid itself
// (loaded from node_modules, no network), and the markdown, turned into HTML by a GFM parser (marked,
// present through mermaid), has no raw HTML and no broken table even for a hostile metric name.
import { createRequire } from 'node:module';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { renderMarkdown } from '../../src/report/index.js';
import type { Results } from '../../src/results.js';
import { launch } from './browser.js';
import { mermaidBlocks, prose } from './helpers.js';
import { mixedRun, NASTY_NAME, results, series } from './results.js';

const require = createRequire(import.meta.url);
const MERMAID = path.join(path.dirname(require.resolve('mermaid/package.json')), 'dist', 'mermaid.min.js');

let browser: Browser;
let page: Page;
const errors: string[] = [];

beforeAll(async () => {
  browser = await launch();
  page = await browser.newPage();
  page.on('pageerror', (e) => errors.push(e.message));
  await page.route('**/*', (r) => r.abort());
  await page.setContent('<!doctype html><html><body><div id="out"></div></body></html>');
  await page.addScriptTag({ path: MERMAID });
  await page.evaluate(() =>
    (window as unknown as { mermaid: { initialize(o: object): void } }).mermaid.initialize({
      startOnLoad: false,
    }),
  );
});
afterAll(async () => {
  await browser?.close();
});

interface Outcome {
  parsed: boolean;
  type: string;
  svg: number;
  lines: number;
  error: string;
}

async function check(source: string, i: number): Promise<Outcome> {
  return page.evaluate(
    async ([src, id]) => {
      const m = (
        window as unknown as {
          mermaid: {
            parse(t: string): Promise<{ diagramType: string } | false>;
            render(id: string, t: string): Promise<{ svg: string }>;
          };
        }
      ).mermaid;
      try {
        const p = await m.parse(src);
        const { svg } = await m.render(id, src);
        const div = document.createElement('div');
        div.innerHTML = svg;
        return {
          parsed: p !== false,
          type: p ? p.diagramType : '',
          svg: svg.length,
          lines: div.querySelectorAll('.line-plot-0 path, [class*="line-plot"] path').length,
          error: '',
        };
      } catch (e) {
        return { parsed: false, type: '', svg: 0, lines: 0, error: String((e as Error).message ?? e) };
      }
    },
    [source, `chart${i}`] as const,
  );
}

function withNasty(): Results {
  const nasty = series({
    name: NASTY_NAME,
    column: 'p95 | ms"]; x',
    file: 'a|b`<x>.csv',
    lastValue: 250,
    seed: 4,
    limit: 140,
  });
  nasty.notes = ['note with <script>alert(1)</script> and | pipes |', 'line\nbreak'];
  nasty.reason = 'reason with `backticks` and ]]> and <b>bold</b>';
  const row = series({ name: 'row order | "quoted"', daily: false, lastValue: 80, seed: 8 });
  const negative = series({ name: 'clock skew ms', start: -40, noise: 1.5, lastValue: -10, seed: 2 });
  return results([...mixedRun().series, nasty, row, negative]);
}

describe('Mermaid blocks', () => {
  it('parse and render in mermaid itself, for every chart the report draws', async () => {
    const md = renderMarkdown(withNasty(), { maxCharts: 10 });
    const blocks = mermaidBlocks(md);
    // checkout, storage, the hostile one, the row-order one, the negative one (alarms), bundle size
    expect(blocks.length).toBe(6);
    expect(blocks.some((b) => /line \[-\d+(\.\d+)?, -\d/.test(b))).toBe(true);
    for (const [i, b] of blocks.entries()) {
      const r = await check(b, i);
      expect(r.error, b).toBe('');
      expect(r.parsed).toBe(true);
      expect(r.type).toBe('xychart');
      expect(r.svg).toBeGreaterThan(1000);
      const lines = (b.match(/^\s*line \[/gm) ?? []).length;
      expect(lines === 3 || lines === 4).toBe(true);
      expect(r.lines).toBe(lines);
    }
    expect(errors).toEqual([]);
  });

  it('are built from sanitised labels only', () => {
    const md = renderMarkdown(withNasty(), { maxCharts: 10 });
    const hostile = mermaidBlocks(md).find((b) => b.includes('evil'))!;
    // Cut to 60 characters; brackets, colons, pipes, backticks and markup gone.
    expect(hostile).toContain('title "evil script alert(1) /script tick bold x (http //e.x) headin"');
    expect(hostile).toContain('y-axis "p95 ms x"');
    // Only our own quotes: title, y-axis label and x-axis categories.
    for (const line of hostile.split('\n')) {
      if (line.includes('x-axis')) continue;
      expect((line.match(/"/g) ?? []).length % 2).toBe(0);
      expect(line.replace(' --> ', ' ')).not.toMatch(/[<>`|;]/);
    }
  });
});

describe('a hostile metric name in the markdown', () => {
  it('leaves no raw HTML and no backtick outside the chart fences', () => {
    const md = renderMarkdown(withNasty());
    const text = prose(md).join('\n');
    expect(text).not.toMatch(/<script|<img|<\/?i>|<b>bold|\]\]>/i);
    expect(text).not.toContain('`');
    // The only tags are the report's own.
    const tags = new Set([...text.matchAll(/<\/?([a-z]+)/gi)].map((m) => m[1]!.toLowerCase()));
    expect([...tags].sort()).toEqual(['b', 'details', 'sub', 'summary']);
  });

  it('keeps every table whole and the name as literal text, read by a GFM parser in the browser', async () => {
    const { marked } = await import('marked');
    const md = renderMarkdown(withNasty());
    const html = await marked.parse(md, { gfm: true });
    const view = await page.evaluate((h) => {
      const root = document.getElementById('out')!;
      root.innerHTML = h;
      const tables = [...root.querySelectorAll('table')].map((t) => {
        const head = t.querySelectorAll('thead th').length;
        const rows = [...t.querySelectorAll('tbody tr')].map((r) => r.children.length);
        return { head, rows };
      });
      return {
        tables,
        scripts: root.querySelectorAll('script, img, i, a, h1, iframe, strong em').length,
        strongBold: [...root.querySelectorAll('strong, b')].some((b) => b.textContent === 'bold'),
        text: root.textContent ?? '',
      };
    }, html);
    expect(view.scripts).toBe(0);
    expect(view.strongBold).toBe(false);
    expect(view.tables.length).toBeGreaterThan(10);
    for (const t of view.tables) for (const r of t.rows) expect(r).toBe(t.head);
    // The name reads as itself: the line break becomes a space, a mention is defused by a zero-width space.
    const expected = NASTY_NAME.replace('\n', ' ').replace('@octocat', '@\u200boctocat');
    expect(view.text).toContain(expected);
    expect(view.text).toContain('note with <script>alert(1)</script> and | pipes |');
  });
});
