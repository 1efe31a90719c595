// A 100 kB key value is cut for display in the markdown and HTML reports and kept whole in the results file.
import { describe, expect, it } from 'vitest';
import { resultsJson } from '../../src/files.js';
import { renderHtml } from '../../src/report/html.js';
import { renderMarkdown } from '../../src/report/markdown.js';
import { results, series } from './results.js';

describe('very long key values', () => {
  const key = 'k'.repeat(50_000) + 'z'.repeat(50_000);
  const base = series({ name: 'queue depth', lastValue: 1e6 });
  const run = results([{ ...base, key, name: `queue depth / ${key}` }]);

  it('are shortened in the markdown report, which keeps its sections', () => {
    const markdown = renderMarkdown(run);
    expect(markdown.length).toBeLessThan(60_000);
    expect(markdown).not.toContain('k'.repeat(1_000));
    expect(markdown).toContain('100000 characters');
    const plain = renderMarkdown(results([base]));
    const headings = (text: string) => text.split('\n').filter((l) => /^#{1,6} /.test(l)).length;
    expect(headings(markdown)).toBe(headings(plain));
  });

  it('are shortened in the HTML report, its headings, index and chart titles alike', () => {
    const page = renderHtml(run);
    const plain = renderHtml(results([base]));
    // Each place the name appears (heading, index, five chart titles) costs at most about 200 characters more.
    expect(page.length).toBeLessThan(plain.length + 20 * 300);
    expect(page).not.toContain('k'.repeat(1_000));
    expect(page).toContain('100000 characters');
  });

  it('are kept whole in the results file', () => {
    const parsed = JSON.parse([...resultsJson(run)].join('')) as { series: { key: string; name: string }[] };
    expect(parsed.series[0]!.key).toBe(key);
    expect(parsed.series[0]!.name).toBe(`queue depth / ${key}`);
  });
});
