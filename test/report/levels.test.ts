// The report reads interval levels from one place (report/view.ts levelViews): ascending, each once,
// in the forecast tables, the HTML key and the fan chart, whatever order a results file lists them in;
// and the standing caution names the miss rate of the alarm level actually configured.
import { describe, expect, it } from 'vitest';
import { buildView, renderHtml, renderMarkdown } from '../../src/report/index.js';
import { cautionLine, missWords } from '../../src/report/view.js';
import { num } from '../../src/text/index.js';
import { results, series } from './results.js';

describe('levels in the report', () => {
  // A results file (for example one merged from a fork) may list its levels in any order.
  const s = { ...series({ name: 'queue depth', levels: [80, 95] }), levels: [95, 80] };
  const run = results([s]);

  it('the view exposes the levels ascending with their keys and labels', () => {
    const v = buildView(run).series[0]!;
    expect(v.levels).toEqual([
      { value: 80, key: '80', label: '80%' },
      { value: 95, key: '95', label: '95%' },
    ]);
    // Each forecast row's bands follow the same order: the 80% band is inside the 95% one.
    const row = s.forecast[0]!;
    expect(v.forecast[0]!.bands).toEqual([
      `${num(row.lower['80'])} to ${num(row.upper['80'])}`,
      `${num(row.lower['95'])} to ${num(row.upper['95'])}`,
    ]);
  });

  it('markdown and HTML forecast tables put 80% before 95%', () => {
    const md = renderMarkdown(run);
    expect(md).toMatch(/\| Step \| When \| Forecast \| 80% interval \| 95% interval \|/);
    const html = renderHtml(run);
    expect(html.indexOf('<th scope="col">80% interval</th>')).toBeGreaterThan(0);
    expect(html.indexOf('<th scope="col">80% interval</th>')).toBeLessThan(
      html.indexOf('<th scope="col">95% interval</th>'),
    );
    expect(html).toContain('prediction intervals (80%, 95%; darker is narrower)');
  });

  it('the fan chart draws the widest band first, so the narrower one sits on top', () => {
    const html = renderHtml(run);
    const bands = [...html.matchAll(/<path class="band band-(\d)" data-level="([\d.]+)"/g)].map((m) => [
      m[1],
      m[2],
    ]);
    expect(bands).toEqual([
      ['0', '95'],
      ['1', '80'],
    ]);
  });

  it('says how often an interval misses at the configured alarm level', () => {
    // 1 / (1 − 0.95) = 20, 1 / 0.2 = 5, 1 / 0.01 = 100, 1 / 0.025 = 40 (derivation); 85% misses
    // 0.15, which is no "one in N".
    expect(missWords(95)).toBe('one time in 20');
    expect(missWords(80)).toBe('one time in 5');
    expect(missWords(99)).toBe('one time in 100');
    expect(missWords(97.5)).toBe('one time in 40');
    expect(missWords(85)).toBe('15 times in 100');
    const at80 = results([series({ name: 'build minutes', levels: [50, 80] })]);
    expect(cautionLine(at80)).toBe(
      'Forecasts are estimates with stated uncertainty, not guarantees: an interval at 80% is expected to miss about one time in 5.',
    );
    expect(renderMarkdown(at80)).toContain('an interval at 80% is expected to miss about one time in 5.');
    expect(renderMarkdown(at80)).not.toContain('one time in twenty');
    const mixed = results([series({ name: 'a', levels: [80, 99] }), series({ name: 'b', levels: [80, 95] })]);
    expect(cautionLine(mixed)).toBe(
      'Forecasts are estimates with stated uncertainty, not guarantees: an interval at 95% is expected to miss about one time in 20, one at 99% about one time in 100.',
    );
    expect(cautionLine(results([]))).toBe('Forecasts are estimates with stated uncertainty, not guarantees.');
  });
});
