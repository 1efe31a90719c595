import { describe, expect, it } from 'vitest';
import { LeadlineError } from '../../src/errors.js';
import { buildView, DEFAULT_MAX_CHARS, renderMarkdown } from '../../src/report/index.js';
import { mermaidChart, mermaidNumber } from '../../src/report/mermaid.js';
import { sparkline } from '../../src/report/sparkline.js';
import { calibrationWords } from '../../src/report/view.js';
import type { Results } from '../../src/results.js';
import briefTemplate from '../../src/report/templates/brief.hbs';
import reportTemplate from '../../src/report/templates/report.hbs';
import { mermaidBlocks } from './helpers.js';
import { mixedRun, results, series, shortSeries } from './results.js';

describe('renderMarkdown', () => {
  const run = mixedRun();
  const text = renderMarkdown(run);

  it('puts the run verdict first, then attention, charts, limits and one section per metric', () => {
    expect(text.startsWith('## 🔴 Leadline: out of line\n')).toBe(true);
    const at = (s: string) => text.indexOf(s);
    expect(at('### Needs attention')).toBeGreaterThan(0);
    expect(at('### Needs attention')).toBeLessThan(at('### Charts'));
    expect(at('### Charts')).toBeLessThan(at('### Limits'));
    expect(at('### Limits')).toBeLessThan(at('### Every metric'));
    expect(text.match(/<details>/g)).toHaveLength(run.series.length);
    expect(text.match(/<\/details>/g)).toHaveLength(run.series.length);
  });

  it('lists the alarm and the limit at risk as needing attention, alarms first, with a sparkline', () => {
    const table = text.slice(text.indexOf('### Needs attention'), text.indexOf('### Charts'));
    const rows = table.split('\n').filter((l) => l.startsWith('| 🔴') || l.startsWith('| 🟠'));
    expect(rows).toHaveLength(2);
    expect(rows[0]).toContain('checkout p95 latency');
    expect(rows[1]).toContain('events db storage');
    expect(table).not.toContain('bundle size');
    const spark = sparkline(run.series[0]!.history.map((h) => h.value));
    expect(spark).toHaveLength(20);
    expect(rows[0]).toContain(spark);
    // The checked value and the interval it left.
    const c = run.series[0]!.checked[0]!;
    expect(rows[0]).toContain('| 290 |');
    expect(rows[0]).toContain(`${c.lower.toFixed(1)} to ${c.upper.toFixed(1)}`);
  });

  it('states the expected number of false alarms and the caution', () => {
    expect(run.summary.expectedFalseAlarms).toBeCloseTo(0.15, 12); // 3 checks at 95%: 3 × 0.05
    // Chance of at least one alarm among 3 independent checks at 5% each: 1 − 0.95³ = 0.142625
    // (derivation here), said as a rounded share of runs, never as "0.15 of the 3".
    expect(text).toContain(
      'Even if nothing had changed, a run checking 3 observations like this one would raise at least one alarm about 14% of the time by chance alone',
    );
    expect(text).not.toMatch(/about 0\.\d+ of the/);
    expect(text).toContain('Forecasts are estimates with stated uncertainty, not guarantees');
  });

  it('shows the limit with its crossing dates and the chance of crossing', () => {
    const lim = run.series[1]!.limit!;
    expect(lim.pointCrossing).not.toBeNull();
    const row = text.split('\n').find((l) => l.startsWith('| 🟠 | events db storage | above 1,950'))!;
    expect(row).toContain('62.0%');
    expect(row).toContain(`${lim.pointCrossing!.time!.slice(0, 10)} (in ${lim.pointCrossing!.step} days)`);
  });

  it('gives each metric its forecast, backtest with the winner, residual checks, calibration and notes', () => {
    const sec = text.slice(text.indexOf('<summary>🔴 <b>checkout p95 latency'), text.indexOf('</details>'));
    for (const h of [
      '**Checked observations**',
      '**Forecast**',
      '**Backtest of the candidates**',
      '**Residual checks**',
      '**Calibration**',
      '**Notes**',
    ])
      expect(sec).toContain(h);
    expect(sec).toMatch(/\| naive \| ✅ chosen \| 1\.6 \|/);
    expect(sec).toContain('Why this method: naive has the lowest mean MASE');
    expect(sec).toContain('| analytic (used) | 95% | 93.0% | about as stated |');
    const f1 = run.series[0]!.forecast[0]!;
    expect(sec).toContain(`| 1 | 2026-11-30 | 290 |`);
    expect(sec).toContain(`${f1.lower['95']!.toPrecision(4)} to ${f1.upper['95']!.toPrecision(4)}`);
  });

  it('draws charts for the attention items first, then others inside their sections, up to maxCharts', () => {
    expect(mermaidBlocks(text)).toHaveLength(3);
    const one = renderMarkdown(run, { maxCharts: 1 });
    const blocks = mermaidBlocks(one);
    expect(blocks).toHaveLength(1);
    expect(blocks[0]).toContain('title "checkout p95 latency"');
    expect(mermaidBlocks(renderMarkdown(run, { maxCharts: 0 }))).toHaveLength(0);
  });

  it('says which line is which, since XY charts have no legend', () => {
    expect(text).toContain(
      'Blue: the observed values up to 2026-11-29 (0 on the x axis), then the point forecast',
    );
    expect(text).toContain('orange: the 95% interval the checked observation was judged against');
    expect(text).toContain('grey: the limit, 1,950');
  });

  it('places the marker first when given', () => {
    const m = '<!-- leadline:report:.github/leadline.yml -->';
    const out = renderMarkdown(run, { marker: m });
    expect(out.startsWith(`${m}\n## `)).toBe(true);
  });

  it('renders the same from a results file as from the object (the artifact case)', () => {
    const fromFile = JSON.parse(JSON.stringify(run)) as Results;
    expect(renderMarkdown(fromFile)).toBe(text);
  });

  it('handles a series without enough data, an error and a problem', () => {
    const r = results([series({ name: 'a' }), shortSeries('too short')], {
      problems: [
        {
          kind: 'data',
          message: 'column "p95" not found; columns are: date, p50',
          file: 'metrics/x.csv',
          line: 1,
          column: 7,
          keyPath: null,
          metric: 'x',
        },
      ],
    });
    const out = renderMarkdown(r);
    expect(out).toContain('### Problems');
    expect(out).toContain('| metrics/x.csv:1:7 | column &#34;p95&#34; not found; columns are: date, p50 |');
    expect(out).toContain('⚪ <b>too short</b>: too short. Only 6 observations; at least 10 are needed.');
    expect(out).toContain('· 1 too short');
    // The same word wherever the state is named: the section, the counts and the terminal.
    expect(out).not.toMatch(/not enough data|without enough data|too little data|insufficient/i);
  });

  it('says so when nothing needs attention', () => {
    const out = renderMarkdown(results([series({ name: 'quiet', seed: 9 })]));
    expect(out.startsWith('## 🟢 Leadline: steady')).toBe(true);
    expect(out).toContain('Nothing needs attention.');
  });
});

describe('renderMarkdown size cap', () => {
  // 300 series, every tenth an alarm: far more than a comment holds.
  const many = results(
    Array.from({ length: 300 }, (_, i) =>
      series({
        name: `fleet host ${String(i).padStart(3, '0')} disk`,
        seed: i + 1,
        ...(i % 10 === 0 ? { lastValue: 400 } : {}),
      }),
    ),
  );
  const note = 'The full report is in the leadline-report artifact.';

  it('stays within maxChars, keeps what needs attention first and says where the full report is', () => {
    const full = renderMarkdown(many, { maxChars: 10_000_000 });
    expect(full).not.toContain('cut to fit');
    expect(full.length).toBeGreaterThan(DEFAULT_MAX_CHARS); // the full report is too big…
    for (const maxChars of [DEFAULT_MAX_CHARS, 20_000]) {
      const out = renderMarkdown(many, { maxChars, fullReportNote: note });
      expect(out.length).toBeLessThanOrEqual(maxChars);
      expect(out.length).toBeGreaterThan(maxChars * 0.8); // …and the cut one uses the room it has
      expect(out).toContain(note);
      expect(out).toMatch(/This report was cut to fit: \d+ of 300 metric sections/);
      expect(out.startsWith('## 🔴 Leadline: out of line')).toBe(true);
      // Every alarm is in the attention table (the 30 planted and those that happen by chance);
      // the sections kept are the alarms first.
      const alarms = many.series.filter((s) => s.verdict === 'alarm').length;
      expect(alarms).toBeGreaterThanOrEqual(30);
      const rows = out.split('\n').filter((l) => l.startsWith('| 🔴 | fleet host'));
      expect(rows).toHaveLength(alarms);
      const firstSection = out.match(/<summary>(\S+) <b>/)![1];
      expect(firstSection).toBe('🔴');
      expect(out.match(/<details>/g)?.length ?? 0).toBe(out.match(/<\/details>/g)?.length ?? 0);
    }
  });

  it('cuts attention rows too when even the table does not fit, and never exceeds a tiny limit', () => {
    const out = renderMarkdown(many, { maxChars: 3_000, fullReportNote: note });
    expect(out.length).toBeLessThanOrEqual(3_000);
    expect(out).toContain(note);
    expect(out).toMatch(/more needing attention, not shown here/);
    const tiny = renderMarkdown(many, { maxChars: 120, fullReportNote: note });
    expect(tiny.length).toBeLessThanOrEqual(120);
    expect(tiny.startsWith('## 🔴 Leadline: out of line')).toBe(true);
  });
});

describe('user templates', () => {
  const run = mixedRun();

  it('render the same view, with every untrusted string already escaped', () => {
    const r = results([series({ name: 'a|b <i>c</i>' })]);
    const out = renderMarkdown(r, {
      template: '{{verdict.label}}:{{#each series}} {{name}} ({{verdict.label}}){{/each}}',
    });
    expect(out).toBe('steady: a&#124;b &#60;i&#62;c&#60;/i&#62; (steady)\n');
  });

  it('compile as the built-in templates were compiled ahead of time: same options, same text', () => {
    for (const [template, detail] of [
      [reportTemplate, 'full'],
      [briefTemplate, 'brief'],
    ] as const)
      expect(renderMarkdown(run, { template, detail })).toBe(renderMarkdown(run, { detail }));
  });

  it('can use the series partial', () => {
    const out = renderMarkdown(run, { template: '{{#each series}}{{> series}}{{/each}}' });
    expect(out.match(/<details>/g)).toHaveLength(run.series.length);
  });

  it('that do not compile give a usage error saying so', () => {
    let err: unknown;
    try {
      renderMarkdown(run, { template: '{{#each series}} unclosed' });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(LeadlineError);
    expect((err as LeadlineError).kind).toBe('usage');
    expect((err as LeadlineError).message).toMatch(/markdown template/);
  });
});

describe('Mermaid text', () => {
  it('writes numbers as plain decimals with at most 6 significant digits, never exponents', () => {
    expect(mermaidNumber(1234.5678)).toBe('1234.57');
    expect(mermaidNumber(-0.000123456)).toBe('-0.000123456');
    expect(mermaidNumber(1e-7)).toBe('0.0000001');
    expect(mermaidNumber(1e-12)).toBe('0');
    expect(mermaidNumber(123456789)).toBe('123456789');
    expect(mermaidNumber(-0)).toBe('0');
    expect(mermaidNumber(NaN)).toBeNull();
    expect(mermaidNumber(Infinity)).toBeNull();
    expect(mermaidNumber(null)).toBeNull();
    expect(mermaidNumber(1e16)).toBeNull();
    for (const x of [3.14159e-5, 98765.4321, -42, 0.5])
      expect(mermaidNumber(x)).toMatch(/^-?(\d+(\.\d+)?|\.\d+)$/); // Mermaid's number token
  });

  it('leaves a chart out rather than drawing a non-finite value', () => {
    const s = series({ name: 'x' });
    const broken = JSON.parse(
      JSON.stringify({ ...s, forecast: s.forecast.map((f, i) => (i === 3 ? { ...f, mean: NaN } : f)) }),
    );
    expect(mermaidChart(s)).not.toBeNull();
    expect(mermaidChart(broken)).toBeNull();
  });

  it('draws the bounds only at the checked observation and the forecast, under the observed line', () => {
    const s = series({ name: 'x', lastValue: 150 });
    const c = mermaidChart(s)!;
    // Lines in drawing order: upper, lower, then observed-and-forecast last, on top.
    const lines = [...c.source.matchAll(/line \[([^\]]*)\]/g)].map((m) => m[1]!.split(', ').map(Number));
    expect(lines).toHaveLength(3);
    const [upper, lower, main] = lines as [number[], number[], number[]];
    // A numeric x axis from −(history − 1) to the last forecast step: the renderer picks a few ticks.
    const axis = c.source.match(/x-axis "days from 2026-11-29" (-?\d+) --> (\d+)/)!;
    const from = Number(axis[1]);
    const to = Number(axis[2]);
    expect(to).toBe(14);
    expect(main).toHaveLength(to - from + 1);
    const at = -from; // x = 0: the last observation, the checked one
    const obs = s.checked[0]!;
    expect(main[at]).toBeCloseTo(obs.value, 4);
    expect(upper[at]).toBeCloseTo(obs.upper, 2);
    expect(lower[at]).toBeCloseTo(obs.lower, 2);
    // Before the checked observation the bounds repeat the observed values (hidden under them).
    for (let i = 0; i < at; i++) {
      expect(upper[i]).toBe(main[i]);
      expect(lower[i]).toBe(main[i]);
    }
    // After it, the forecast at the alarm level.
    expect(upper.at(-1)).toBeCloseTo(s.forecast[13]!.upper['95']!, 2);
    expect(c.legend).toContain('(at 0)');
  });
});

describe('view details', () => {
  it('judges calibration against two binomial standard errors', () => {
    // 95% over 100 origins: se = sqrt(.95 × .05 / 100) = 0.02179, tolerance 0.0436 (derivation here).
    expect(calibrationWords(0.91, 95, 100)).toBe('about as stated');
    expect(calibrationWords(0.9, 95, 100)).toMatch(/^too narrow/);
    expect(calibrationWords(0.99, 95, 100)).toBe('about as stated');
    expect(calibrationWords(0.995, 95, 100)).toMatch(/^wider than needed/);
    expect(calibrationWords(0.99, 80, 100)).toMatch(/^wider than needed/);
  });

  it('orders attention items first in the view', () => {
    const v = buildView(mixedRun());
    expect(v.series.map((s) => s.verdict.code)).toEqual(['alarm', 'at-risk', 'ok', 'too-short']);
    expect(v.attention.map((a) => a.section)).toEqual([1, 2]);
  });

  it('keeps a failed residual check out of "needs attention": one summary line, the detail in the section', () => {
    const s = series({ name: 'autocorrelated' });
    s.residualChecks!.ljungBox = { ...s.residualChecks!.ljungBox, ok: false, pValue: 0.001 };
    const out = renderMarkdown(results([s]));
    expect(out).toContain('Nothing needs attention.');
    const caveats = out.split('\n').filter((l) => l.startsWith('Residual checks flagged'));
    expect(caveats).toEqual([
      "Residual checks flagged 1 series (autocorrelated): their intervals may be less trustworthy than stated; each series' details say which check and why.",
    ]);
    expect(out).toContain('| ⚠️ flagged |');
    const brief = renderMarkdown(results([s]), { detail: 'brief' });
    expect(brief).toContain('Nothing needs attention.');
    expect(brief.match(/Residual checks flagged/g)).toHaveLength(1);
  });

  it('never says "passed" for a check that was not computed', () => {
    const s = series({ name: 'five rows' });
    s.residualChecks!.normality = {
      ...s.residualChecks!.normality,
      statistic: NaN,
      pValue: NaN,
      ok: true,
      finding: 'Jarque–Bera not computed: too few residuals.',
    };
    const v = buildView(results([s]));
    const row = v.series[0]!.checks.find((c) => c.key === 'normality')!;
    expect(row.state).toBe('not-computed');
    expect(row.result).toBe('not computed');
    expect(row.statistic).toBe('');
    expect(renderMarkdown(results([s]))).toMatch(/\| Normality \| not computed \| {2}\| n\/a \|/);
  });

  it('renders a sparkline from block characters, dots for missing values', () => {
    expect(sparkline([1, 2, 3, 4, 5, 6, 7, 8])).toBe('▁▂▃▄▅▆▇█');
    expect(sparkline([5, null, 5])).toBe('▄·▄');
    expect(sparkline([])).toBe('');
    expect(
      sparkline(
        Array.from({ length: 50 }, (_, i) => i),
        10,
      ),
    ).toHaveLength(10);
  });
});
