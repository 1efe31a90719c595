// The HTML report in real headless Chromium: it loads without errors or network, has one fan chart
// per metric, names every metric, draws bands and checked points where the results say, and keeps
// a hostile metric name as plain text.
import { mkdtempSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { HTML_SECTIONS } from '../../src/report/html.js';
import { renderHtml } from '../../src/report/index.js';
import type { Results } from '../../src/results.js';
import { launch } from './browser.js';
import { mixedRun, NASTY_NAME, results, series, shortSeries } from './results.js';

let browser: Browser;
const dir = mkdtempSync(path.join(tmpdir(), 'leadline-html-'));

beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  await browser?.close();
});

interface Loaded {
  page: Page;
  errors: string[];
  requests: string[];
}

/** Loads the page from a file URL, recording console errors, page errors and any request made. */
async function load(html: string, name: string, colorScheme: 'light' | 'dark' = 'light'): Promise<Loaded> {
  const file = path.join(dir, `${name}.html`);
  writeFileSync(file, html);
  const page = await browser.newPage({ viewport: { width: 1100, height: 900 }, colorScheme });
  const errors: string[] = [];
  const requests: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error' || m.type() === 'warning') errors.push(m.text());
  });
  page.on('pageerror', (e) => errors.push(e.message));
  await page.route('**/*', (route) => {
    const url = route.request().url();
    if (url.startsWith('file:')) return route.continue();
    requests.push(url);
    return route.abort();
  });
  await page.goto(`file://${file}`);
  return { page, errors, requests };
}

function withNasty(): Results {
  const run = mixedRun();
  const nasty = series({
    name: NASTY_NAME,
    file: 'metrics/<img src=x onerror=alert(1)>.csv',
    column: 'p95 | ms',
    lastValue: 260,
    seed: 4,
    limit: 130,
  });
  nasty.notes = ['A note with <b>markup</b> and ]]> and `ticks`'];
  return { ...run, series: [...run.series, nasty] };
}

describe('HTML report in Chromium', () => {
  it('loads with no console errors and no network, one fan chart per metric, every name present', async () => {
    const run = withNasty();
    const html = renderHtml(run);
    const { page, errors, requests } = await load(html, 'mixed');
    expect(errors).toEqual([]);
    expect(requests).toEqual([]);
    expect(await page.locator('svg.fan').count()).toBe(run.series.length);
    const text = (await page.textContent('body'))!;
    for (const s of run.series) expect(text).toContain(s.name);
    // The overview links to each metric's section.
    const hrefs = await page.$$eval('table a[href^="#"]', (as) => as.map((a) => a.getAttribute('href')!));
    expect(hrefs).toHaveLength(run.series.length);
    for (const h of hrefs) expect(await page.locator(h).count()).toBe(1);
    const shot = path.join(dir, 'mixed-light.png');
    await page.screenshot({ path: shot, fullPage: true });
    expect(statSync(shot).size).toBeGreaterThan(10_000);
    await page.close();
  });

  it('has a title and a description on every chart', async () => {
    const { page } = await load(renderHtml(mixedRun()), 'a11y');
    const charts = await page.$$eval('svg.chart', (svgs) =>
      svgs.map((s) => {
        const ids = (s.getAttribute('aria-labelledby') ?? '').split(' ');
        return {
          role: s.getAttribute('role'),
          labels: ids.map((id) => document.getElementById(id)?.textContent ?? ''),
          first: s.firstElementChild?.tagName,
        };
      }),
    );
    expect(charts.length).toBeGreaterThan(10);
    for (const c of charts) {
      expect(c.role).toBe('img');
      expect(c.first).toBe('title');
      expect(c.labels).toHaveLength(2);
      expect(c.labels.every((l) => l.length > 10)).toBe(true);
    }
    await page.close();
  });

  it('follows the dark colour scheme', async () => {
    const html = renderHtml(mixedRun());
    const bg = async (scheme: 'light' | 'dark') => {
      const { page } = await load(html, `scheme-${scheme}`, scheme);
      const c = await page.evaluate(() => getComputedStyle(document.body).backgroundColor);
      if (scheme === 'dark') await page.screenshot({ path: path.join(dir, 'mixed-dark.png') });
      await page.close();
      return c;
    };
    expect(await bg('light')).toBe('rgb(251, 250, 247)');
    expect(await bg('dark')).toBe('rgb(20, 23, 28)');
  });

  it('keeps a metric name full of markup as text: no script, no injected elements', async () => {
    const html = renderHtml(withNasty());
    expect(html).not.toMatch(/<script/i);
    expect(html).not.toContain('<img');
    expect(html).not.toContain(']]>');
    const { page, errors } = await load(html, 'nasty');
    expect(errors).toEqual([]);
    expect(await page.locator('script, img, b, i, iframe').count()).toBe(0);
    const heading = await page
      .locator('details.metric h2', { hasText: 'evil' })
      .evaluate((h) => h.firstChild!.textContent);
    expect(heading!.trim()).toBe(NASTY_NAME);
    await page.close();
  });
});

/** Maps a value through a linear scale given as data-* domain and range strings. */
function linear(domain: string, range: string): (v: number) => number {
  const [d0, d1] = domain.split(',').map(Number) as [number, number];
  const [r0, r1] = range.split(',').map(Number) as [number, number];
  return (v) => r0 + ((v - d0) / (d1 - d0)) * (r1 - r0);
}

describe('fan chart geometry', () => {
  it('nests the bands and places the forecast where the results say', async () => {
    const run = mixedRun();
    const { page } = await load(renderHtml(run), 'geometry');
    for (const [i, s] of run.series.entries()) {
      if (s.forecast.length === 0) continue;
      const section = `#metric-${i + 1}`; // mixedRun is already in report order
      expect(await page.locator(`${section} h2`).textContent()).toContain(s.name);
      const g = await page
        .locator(`${section} svg.fan g.plot`)
        .evaluate((el) => ({ ...(el as HTMLElement).dataset }));
      const x = linear(g.xDomain!, g.xRange!);
      const y = linear(g.yDomain!, g.yRange!);
      const xOf = (step: number, time: string | null) =>
        g.xKind === 'time' ? x(Date.parse(time!)) : x(s.history.at(-1)!.index + step);
      const probes = s.forecast.slice(1).flatMap((f) => {
        const px = xOf(f.step, f.time);
        const mid = (a: number, b: number) => (y(a) + y(b)) / 2;
        return [
          // between the 80% and 95% upper bounds: inside the 95% band only
          { px, py: mid(f.upper['80']!, f.upper['95']!), in95: true, in80: false },
          { px, py: mid(f.lower['80']!, f.lower['95']!), in95: true, in80: false },
          // the point forecast: inside both
          { px, py: y(f.mean), in95: true, in80: true },
          // beyond the 95% bound by a few pixels: inside neither
          { px, py: y(f.upper['95']!) - 3, in95: false, in80: false },
        ];
      });
      const got = await page.locator(`${section} svg.fan`).evaluate((svg, pts) => {
        const band = (l: string) => svg.querySelector(`path.band[data-level="${l}"]`) as SVGPathElement;
        const b95 = band('95');
        const b80 = band('80');
        return pts.map((p) => {
          const pt = new DOMPoint(p.px, p.py);
          return { in95: b95.isPointInFill(pt), in80: b80.isPointInFill(pt) };
        });
      }, probes);
      expect(got).toEqual(probes.map((p) => ({ in95: p.in95, in80: p.in80 })));
      // The wider band is drawn first, so the narrower one shows on top of it.
      const order = await page.$$eval(`${section} svg.fan path.band`, (ps) =>
        ps.map((p) => p.getAttribute('data-level')),
      );
      expect(order).toEqual(['95', '80']);
    }
    await page.close();
  });

  it('draws each checked observation at its value and time, alarms as a distinct shape', async () => {
    const run = mixedRun();
    const { page } = await load(renderHtml(run), 'checked');
    // Healthy series start folded; unfold them all to measure.
    await page.evaluate(() => document.querySelectorAll('details').forEach((d) => (d.open = true)));
    for (const [i, s] of run.series.entries()) {
      for (const c of s.checked) {
        const section = `#metric-${i + 1}`;
        const g = await page
          .locator(`${section} svg.fan g.plot`)
          .evaluate((el) => ({ ...(el as HTMLElement).dataset }));
        const x = linear(g.xDomain!, g.xRange!);
        const y = linear(g.yDomain!, g.yRange!);
        const want = { x: g.xKind === 'time' ? x(Date.parse(c.time!)) : x(c.index), y: y(c.value) };
        // Where Chromium actually drew it, mapped back into the chart's own coordinates.
        const got = await page
          .locator(`${section} svg.fan .checked[data-index="${c.index}"]`)
          .evaluate((el) => {
            const svg = (el as SVGGraphicsElement).ownerSVGElement!;
            const r = el.getBoundingClientRect();
            const p = new DOMPoint(r.x + r.width / 2, r.y + r.height / 2).matrixTransform(
              svg.getScreenCTM()!.inverse(),
            );
            return { x: p.x, y: p.y, tag: el.tagName, alarm: el.classList.contains('alarm') };
          });
        expect(got.x).toBeCloseTo(want.x, 0);
        expect(got.y).toBeCloseTo(want.y, 0);
        expect(got.alarm).toBe(c.alarm);
        expect(got.tag).toBe(c.alarm ? 'path' : 'circle');
      }
    }
    await page.close();
  });

  it('draws the limit and the forecast crossing date', async () => {
    const run = mixedRun();
    const s = run.series[1]!;
    const { page } = await load(renderHtml(run), 'limit');
    const g = await page
      .locator('#metric-2 svg.fan g.plot')
      .evaluate((el) => ({ ...(el as HTMLElement).dataset }));
    const y = linear(g.yDomain!, g.yRange!);
    const x = linear(g.xDomain!, g.xRange!);
    const limitY = Number(await page.locator('#metric-2 svg.fan line.limit').getAttribute('y1'));
    expect(limitY).toBeCloseTo(y(s.limit!.value), 1);
    const crossX = Number(await page.locator('#metric-2 svg.fan line.crossing').getAttribute('x1'));
    expect(crossX).toBeCloseTo(x(Date.parse(s.limit!.pointCrossing!.time!)), 1);
    expect(await page.locator('#metric-2 svg.fan').textContent()).toContain(
      `forecast crosses ${s.limit!.pointCrossing!.time!.slice(0, 10)}`,
    );
    await page.close();
  });

  it("draws the Ljung–Box p-value against the number of lags, the check's own ringed", async () => {
    const run = results([series({ name: 'lb' })]);
    const s = run.series[0]!;
    const lb = s.residualChecks!.ljungBox;
    const acf = s.residualChecks!.acf;
    const n = s.residuals.filter((r) => r !== null).length;
    const { page } = await load(renderHtml(run), 'lb');
    const dots = await page.$$eval('svg.lb circle.lb-dot', (cs) =>
      cs.map((c) => ({ lags: Number(c.getAttribute('data-lags')), p: Number(c.getAttribute('data-p')) })),
    );
    expect(dots).toHaveLength(acf.length);
    // Q(L) = n(n+2) Σ_{k≤L} r_k²/(n−k) with df L (naive: no parameter estimated), p from
    // @stdlib/stats-base-dists-chisquare-cdf as the outside oracle.
    const { default: chisqCdf } = await import('@stdlib/stats-base-dists-chisquare-cdf');
    let sum = 0;
    for (const [i, d] of dots.entries()) {
      sum += acf[i]! ** 2 / (n - i - 1);
      expect(d.lags).toBe(i + 1);
      expect(d.p).toBeCloseTo(1 - chisqCdf(n * (n + 2) * sum, i + 1), 9);
    }
    // The ringed point is the check itself.
    expect(dots[lb.lags - 1]!.p).toBeCloseTo(lb.pValue, 9);
    expect(await page.locator('svg.lb circle.lb-used').count()).toBe(1);
    await page.close();
  });

  it('draws a normal Q–Q plot and the spread of the first and last thirds the spread check compares', async () => {
    const run = results([series({ name: 'qq', n: 61 })]);
    const s = run.series[0]!;
    const r = s.residuals.filter((x): x is number => x !== null);
    const { page } = await load(renderHtml(run), 'qq');
    // One dot per residual: the dots are drawn as zero-length segments of one path per class.
    const qq = await page.$$eval('svg.qq path.qq-dot', (ps) =>
      ps.map((p) => ({ n: Number(p.getAttribute('data-dots')), d: p.getAttribute('d')! })),
    );
    expect(qq.reduce((a, p) => a + p.n, 0)).toBe(r.length);
    for (const p of qq) expect(p.d.match(/M[\d.]+ [\d.]+h0/g)).toHaveLength(p.n);
    // Brown–Forsythe's quantity for each third: mean absolute distance from the third's median
    // (20 values: the median is the mean of the 10th and 11th smallest).
    const distance = (xs: number[]) => {
      const o = [...xs].sort((a, b) => a - b);
      const med = (o[9]! + o[10]!) / 2;
      return xs.reduce((a, v) => a + Math.abs(v - med), 0) / xs.length;
    };
    const third = Math.floor(r.length / 3);
    expect(third).toBe(20);
    const bands = await page.$$eval('svg.spread rect.spread-band', (rs) =>
      rs.map((x) => Number(x.getAttribute('data-spread'))),
    );
    expect(bands[0]).toBeCloseTo(distance(r.slice(0, third)), 9);
    expect(bands[1]).toBeCloseTo(distance(r.slice(r.length - third)), 9);
    // No trio of residual line, autocorrelation bars and histogram.
    expect(await page.locator('svg.acf, svg.hist, svg.resid').count()).toBe(0);
    await page.close();
  });
});

describe('HTML layout', () => {
  it('folds healthy series and opens those needing attention, so ten series make a short page', async () => {
    const run = mixedRun();
    const { page } = await load(renderHtml(run), 'folded');
    const open = await page.$$eval('details.metric', (ds) => ds.map((d) => (d as HTMLDetailsElement).open));
    expect(open).toEqual(run.series.map((s) => s.verdict === 'alarm' || s.verdict === 'at-risk'));
    await page.close();
    const ten = results([
      ...Array.from({ length: 9 }, (_, i) => series({ name: `quiet ${i}`, seed: i + 20 })),
      series({ name: 'loud', lastValue: 400 }),
    ]);
    const { page: p2 } = await load(renderHtml(ten), 'ten');
    const height = await p2.evaluate(() => document.documentElement.scrollHeight);
    expect(height).toBeLessThan(6000);
    await p2.close();
  });

  it('never says one interval kind in a header while the checked rows were judged with another', () => {
    const s = series({ name: 'kinds' });
    s.intervalKind = 'empirical';
    s.checked = s.checked.map((c) => ({ ...c, intervalKind: 'analytic' }));
    const html = renderHtml(results([s]));
    expect(html).toContain('empirical intervals for the forecast, analytic for the checked row');
    expect(html).not.toMatch(/· empirical intervals ·/);
  });
});

describe('HTML size', () => {
  it('caps the metric sections for a big fleet, attention first, and lists every series in the overview', () => {
    const run = results(
      Array.from({ length: HTML_SECTIONS + 20 }, (_, i) =>
        series({
          name: `fleet ${i}`,
          seed: i + 1,
          n: 40,
          ...(i === HTML_SECTIONS + 10 ? { lastValue: 999 } : {}),
        }),
      ),
    );
    const html = renderHtml(run);
    expect(html.match(/<svg class="chart fan"/g)).toHaveLength(HTML_SECTIONS);
    expect(html).toContain(
      `Sections for the first ${HTML_SECTIONS} of ${HTML_SECTIONS + 20} series are shown`,
    );
    // The planted alarm sits near the end of the results but gets a section; alarms come first.
    const headed = [
      ...html.matchAll(/<details class="metric" id="metric-\d+"[^>]*>\n<summary><h2>([^<]*)/g),
    ].map((m) => m[1]!.trim());
    expect(headed).toContain(`fleet ${HTML_SECTIONS + 10}`);
    const alarmNames = new Set(run.series.filter((x) => x.verdict === 'alarm').map((x) => x.name));
    const firstOk = headed.findIndex((n) => !alarmNames.has(n));
    expect(firstOk).toBe(alarmNames.size);
    const overviewRows = html
      .slice(html.indexOf('<h2>Overview</h2>'), html.indexOf('<details class="metric"'))
      .match(/<tr>/g)!;
    expect(overviewRows).toHaveLength(HTML_SECTIONS + 20 + 1); // + header
  });

  it('stays a single file of modest size for 50 metrics', async () => {
    const run = results([
      ...Array.from({ length: 49 }, (_, i) => series({ name: `host ${i} disk`, seed: i + 3, n: 500 })),
      shortSeries('fresh metric'),
    ]);
    const html = renderHtml(run);
    writeFileSync(path.join(dir, 'fifty.html'), html);
    // 500-point histories, six charts each: well under 200 kB per metric (measured ≈ 70 kB).
    expect(html.length).toBeLessThan(50 * 200_000);
    const { page, errors } = await load(html, 'fifty-load');
    expect(errors).toEqual([]);
    expect(await page.locator('svg.fan').count()).toBe(50);
    await page.close();
    console.log(`HTML for 50 metrics × 500 points: ${(html.length / 1024).toFixed(0)} KiB`);
  });
});
