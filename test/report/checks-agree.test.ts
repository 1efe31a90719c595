// A residual check's caption and its picture tell one story. The demo's label-render has two known
// incidents, so its residuals have gaps: the Ljung–Box check is computed on the 87 residuals that
// exist, and its picture must be drawn from that count (it used to be re-derived from the rounded
// statistic and ACF, failed, and printed "not computed" beside a caption saying "passed"). A check that
// was not computed shows no p-value (the mean method's bias is 0 by construction; "p 1" said nothing).
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { runJob } from '../../src/job.js';
import { renderHtml, renderMarkdown } from '../../src/report/index.js';
import { ljungBoxChart } from '../../src/report/svg.js';

const demo = path.resolve(import.meta.dirname, '..', '..', 'fixtures', 'demo');

describe('residual checks: caption and picture agree', () => {
  it('draws the Ljung–Box picture for every series whose check was computed, gaps or not', async () => {
    const results = await runJob({ cwd: demo, configPath: 'leadline.yml', failOn: 'never' });
    const label = results.series.find((s) => s.name === 'label-render')!;
    expect(label.incidents?.length).toBeGreaterThan(0);
    for (const s of results.series) {
      const lb = s.residualChecks?.ljungBox;
      if (!lb || !Number.isFinite(lb.statistic)) continue;
      expect(ljungBoxChart(s, 'x'), s.name).not.toContain('was not computed');
    }
    const html = renderHtml(results);
    // The bias card of a mean-method series: not computed, and no p-value beside it.
    expect(html).toMatch(
      /Bias \(mean residual zero\)<\/strong> <span class="state">not computed<\/span> · zero by construction<br>/,
    );
    const md = renderMarkdown(results);
    expect(md).not.toMatch(/not computed \| zero by construction \| 1 \|/);
  }, 120_000);
});
