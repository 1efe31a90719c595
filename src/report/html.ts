// The HTML report: one self-contained page (inline CSS and SVG, no script, no network; a content
// security policy forbids anything else), readable in light and dark mode.
import type { Results, SeriesResult } from '../results.js';
import { chance, escapeHtml as h, num, pct, plural } from '../text/index.js';
import { METHOD_LABEL, reportName, VERDICT_LABEL } from './format.js';
import { backtestChart, fanChart, ljungBoxChart, qqChart, spreadChart } from './svg.js';
import { buildView, reportOrder, type SeriesView } from './view.js';

const CSS = `
:root{color-scheme:light dark;--bg:#fbfaf7;--fg:#1f2328;--muted:#5b6470;--line:#d8dce1;--card:#ffffff;
--hist:#1f3a5f;--fc:#7b2cbf;--b0:#e9ddf7;--b1:#d3bdf0;--b2:#bb9ae6;--b3:#a37adb;--ok:#2f7d4f;--alarm:#c62828;
--risk:#b45309;--na:#6b7280;--limit:#b45309;--grid:#eceef1;--resid:#2a6f97;--bar:#8aa8c7;--chosen:#2f7d4f;--incident:#0f766e;
font-family:system-ui,-apple-system,"Segoe UI",Roboto,"Noto Sans",sans-serif;}
@media (prefers-color-scheme:dark){:root{--bg:#14171c;--fg:#e6e8eb;--muted:#9aa4b1;--line:#2d333b;--card:#1b2027;
--hist:#9cc3f0;--fc:#d0a8ff;--b0:#2b2340;--b1:#3a2d5a;--b2:#4c3a75;--b3:#604a91;--ok:#5cc48a;--alarm:#ff6b6b;
--risk:#f0a04b;--na:#9aa4b1;--limit:#f0a04b;--grid:#242a31;--resid:#7fc1e6;--bar:#4f6f91;--chosen:#5cc48a;--incident:#5eead4;}}
*{box-sizing:border-box}
body{margin:0;background:var(--bg);color:var(--fg);line-height:1.45;font-size:15px}
main{max-width:1080px;margin:0 auto;padding:24px 20px 64px}
h1{font-size:1.6rem;margin:0 0 4px}h2{font-size:1.25rem;margin:0 0 6px}h3{font-size:1rem;margin:18px 0 6px}
a{color:inherit}
.muted,.facts,.note{color:var(--muted)}.facts{font-size:.9rem}
.badge{display:inline-block;padding:1px 8px;border-radius:10px;font-size:.8rem;font-weight:600;border:1px solid currentColor;white-space:nowrap}
.v-ok{color:var(--ok)}.v-alarm{color:var(--alarm)}.v-at-risk{color:var(--risk)}.v-too-short{color:var(--na)}.v-error{color:var(--alarm)}
.caution{border-left:4px solid var(--risk);padding:6px 12px;background:var(--card);margin:12px 0}
table{border-collapse:collapse;width:100%;margin:6px 0 10px;font-size:.88rem;background:var(--card)}
th,td{border:1px solid var(--line);padding:4px 8px;text-align:left;vertical-align:top}
th{font-weight:600}td.n{text-align:right;font-variant-numeric:tabular-nums}
details.metric{background:var(--card);border:1px solid var(--line);border-radius:8px;padding:10px 18px;margin:14px 0}
details.metric>summary{color:var(--fg)}details.metric>summary h2{display:inline;font-size:1.1rem}details.metric>summary .why{color:var(--muted);font-size:.9rem}
details.metric[open]>summary{margin-bottom:8px}
.checks{display:grid;grid-template-columns:repeat(auto-fill,minmax(360px,1fr));gap:12px}
figure.check{border:1px solid var(--line);border-radius:6px;padding:8px;margin:0}figure.check figcaption{font-size:.85rem;margin-bottom:4px}
figure.check .state{font-weight:600}.c-flagged .state{color:var(--risk)}.c-not-computed .state{color:var(--na)}.c-passed .state{color:var(--ok)}
.charts{display:flex;flex-wrap:wrap;gap:12px}
figure{margin:8px 0}figcaption{font-size:.82rem;color:var(--muted)}
svg.chart{max-width:100%;height:auto;display:block}svg.chart:not(.half){width:100%}
svg .grid{stroke:var(--grid)}svg .axis{stroke:var(--muted)}
svg text{fill:var(--muted);font-size:11px;font-family:inherit}
svg .band{stroke:none}svg .band-0{fill:var(--b0)}svg .band-1{fill:var(--b1)}svg .band-2{fill:var(--b2)}svg .band-3{fill:var(--b3)}
svg .history{fill:none;stroke:var(--hist);stroke-width:1.6}
svg .forecast{fill:none;stroke:var(--fc);stroke-width:1.8;stroke-dasharray:5 3}
svg .now{stroke:var(--muted);stroke-dasharray:2 3}
svg .limit,svg .crossing{stroke:var(--limit);stroke-width:1.4;stroke-dasharray:6 3}
svg .limit-label{fill:var(--limit);font-weight:600}
svg .check-range{stroke:var(--fg);stroke-width:1.2;opacity:.65}
svg .checked{fill:var(--bg);stroke:var(--hist);stroke-width:2}
svg .checked.outside{stroke:var(--risk)}
svg .checked.alarm{fill:var(--alarm);stroke:var(--bg);stroke-width:1.5}
svg .incident{fill:var(--bg);stroke:var(--incident);stroke-width:2}svg .unit{fill:var(--muted)}
svg .zero{stroke:var(--muted)}svg .resid-line{fill:none;stroke:var(--resid);stroke-width:1;opacity:.6}
svg .resid-dot{stroke:var(--resid)}
svg .resid-dot.middle{opacity:.35}svg .third{stroke:var(--muted);stroke-dasharray:3 3}svg .spread-band{fill:var(--b0);opacity:.8}
svg .qq-line{stroke:var(--fc);stroke-width:1.5}svg .dots{fill:none;stroke-linecap:round}
svg .qq-dot{stroke:var(--resid)}svg .qq-dot.off{stroke:var(--risk)}
svg .p-line{stroke:var(--risk);stroke-dasharray:4 3}svg .lb-line{fill:none;stroke:var(--resid);stroke-width:1.2}
svg .lb-dot{fill:var(--resid)}svg .lb-dot.low{fill:var(--alarm)}svg .lb-used{fill:none;stroke:var(--fg);stroke-width:1.5}
svg .bt-bar{fill:var(--bar)}svg .bt-bar.chosen{fill:var(--chosen)}svg .bt-label{fill:var(--fg)}
svg .empty{fill:var(--muted);font-size:13px}
.key{display:flex;flex-wrap:wrap;gap:14px;font-size:.82rem;color:var(--muted);margin:2px 0 0}
.key span::before{content:"";display:inline-block;width:14px;height:10px;margin-right:5px;vertical-align:middle}
.key .k-hist::before{border-top:2px solid var(--hist);height:0}
.key .k-fc::before{border-top:2px dashed var(--fc);height:0}
.key .k-band::before{background:var(--b1)}
.key .k-alarm::before{background:var(--alarm);width:10px;transform:rotate(45deg)}
.key .k-limit::before{border-top:2px dashed var(--limit);height:0}
.key .k-incident::before{border:2px solid var(--incident);width:8px;height:8px}
details>summary{cursor:pointer;color:var(--muted)}
footer{margin-top:32px;font-size:.8rem;color:var(--muted)}
`;

function badge(v: SeriesResult['verdict']): string {
  return `<span class="badge v-${v}">${h(VERDICT_LABEL[v])}</span>`;
}

/** Markdown-escaped view strings are entity-only, so they are valid HTML text as they stand. */
function table(head: string[], rows: string[][], numeric: number[] = []): string {
  const th = head.map((c) => `<th scope="col">${c}</th>`).join('');
  const body = rows
    .map(
      (r) =>
        `<tr>${r.map((c, i) => `<td${numeric.includes(i) ? ' class="n"' : ''}>${c}</td>`).join('')}</tr>`,
    )
    .join('');
  return `<table><thead><tr>${th}</tr></thead><tbody>${body}</tbody></table>`;
}

function metricSection(s: SeriesResult, v: SeriesView, id: string): string {
  const out: string[] = [];
  // Healthy series start folded: one line each; what needs attention is open.
  out.push(`<details class="metric" id="${id}"${v.attention ? ' open' : ''}>`);
  out.push(
    `<summary><h2>${h(reportName(s.name))} ${badge(s.verdict)}</h2>${s.reason ? ` <span class="why">${h(s.reason)}</span>` : ''}</summary>`,
  );
  out.push(`<p class="facts">${v.facts}</p>`);
  out.push(
    `<figure>${fanChart(s, `${id}-fan`, v.levels)}<figcaption class="key"><span class="k-hist">observed</span><span class="k-fc">point forecast</span>` +
      `<span class="k-band">prediction intervals (${v.levels.map((l) => l.label).join(', ')}; darker is narrower)</span><span>○ checked observation with its interval</span>` +
      `<span class="k-alarm">alarm</span>${v.incidents.length > 0 ? '<span class="k-incident">known incident (left out of the statistics)</span>' : ''}${s.limit ? '<span class="k-limit">limit and forecast crossing</span>' : ''}</figcaption></figure>`,
  );
  if (v.limit) out.push(`<p>${v.limit}</p>`);
  if (v.checked.length > 0) {
    out.push('<h3>Checked observations</h3>');
    out.push(
      table(
        ['When', 'Value', 'Forecast', 'Interval', 'Result', 'p', 'z'],
        v.checked.map((c) => [c.where, c.value, c.expected, c.interval, c.result, c.p, c.z]),
        [1, 2, 5, 6],
      ),
    );
  }
  if (v.incidents.length > 0) {
    out.push('<h3>Known incidents</h3>');
    out.push(
      table(
        ['When', 'Value', 'Why'],
        v.incidents.map((x) => [x.where, x.value, x.reason]),
        [1],
      ),
    );
    out.push(
      '<p class="note">Left out of fitting, backtests and residual checks (as missing values); drawn, never alarms.</p>',
    );
  }
  if (v.forecast.length > 0) {
    out.push(`<details><summary>Forecast table (${s.forecast.length} steps)</summary>`);
    out.push(
      table(
        [
          'Step',
          'When',
          v.unit ? `Forecast (${v.unit})` : 'Forecast',
          ...v.levels.map((l) => `${l.label} interval`),
        ],
        v.forecast.map((r) => [String(r.step), r.time, r.mean, ...r.bands]),
        [0, 2],
      ),
    );
    if (v.forecastNote) out.push(`<p class="note">${v.forecastNote}</p>`);
    out.push('</details>');
  }
  if (v.checks.length > 0) {
    out.push('<h3>Residual checks</h3>');
    out.push(`<div class="checks">${checkCards(s, v, id)}</div>`);
    if (v.checksNote) out.push(`<p class="note">${v.checksNote}</p>`);
  }
  if (v.backtest.length > 0) {
    out.push('<h3>Backtest of the candidates</h3>');
    out.push(`<figure>${backtestChart(s, `${id}-bt`)}</figure>`);
    out.push(
      table(
        ['Method', '', `Score (${v.backtestScore})`, 'RMSE', 'MAE', 'MASE', 'MAPE', 'ME', 'Origins'],
        v.backtest.map((b) => [
          b.method,
          b.chosen ? 'chosen' : '',
          b.score,
          b.rmse,
          b.mae,
          b.mase,
          b.mape,
          b.me,
          b.origins,
        ]),
        [2, 3, 4, 5, 6, 7, 8],
      ),
    );
    out.push(`<p>Why this method: ${v.backtestReason}</p><p class="note">${v.backtestNote ?? ''}</p>`);
  }
  if (v.calibration.length > 0) {
    out.push('<h3>Calibration</h3>');
    out.push(
      table(
        ['Interval kind', 'Level', 'Backtest coverage', 'Judgement'],
        v.calibration.map((c) => [`${c.kind}${c.used ? ' (used)' : ''}`, c.level, c.coverage, c.judgement]),
        [1, 2],
      ),
    );
    if (v.calibrationNote) out.push(`<p class="note">${v.calibrationNote}</p>`);
  }
  if (s.notes.length > 0)
    out.push(`<h3>Notes</h3><ul>${s.notes.map((n) => `<li>${h(n)}</li>`).join('')}</ul>`);
  out.push('</details>');
  return out.join('\n');
}

/** Each residual check beside its own picture: autocorrelation, normality, spread; bias has none. */
function checkCards(s: SeriesResult, v: SeriesView, id: string): string {
  const chartOf: Record<string, (s: SeriesResult, id: string) => string> = {
    ljungBox: ljungBoxChart,
    normality: qqChart,
    spread: spreadChart,
  };
  return v.checks
    .map((c) => {
      const chart = chartOf[c.key];
      return (
        `<figure class="check c-${c.state}"><figcaption><strong>${c.name}</strong> <span class="state">${c.result}</span>` +
        `${c.statistic ? ` · ${c.statistic}` : ''}${c.p !== 'n/a' ? ` · p ${c.p}` : ''}<br>${c.finding}</figcaption>` +
        `${chart ? chart(s, `${id}-${c.key}`) : ''}</figure>`
      );
    })
    .join('');
}

/** Most metric sections in one page. */
export const HTML_SECTIONS = 250;

/** The whole HTML report as one self-contained file. Metrics in report order: what needs attention first. */
export function renderHtml(results: Results): string {
  const view = buildView(results, { maxCharts: 0, detail: HTML_SECTIONS });
  // view.series follows reportOrder, so the two lists line up index by index.
  const ordered = reportOrder(results);
  const sum = results.summary;
  const title = `Leadline report: ${VERDICT_LABEL[results.verdict]}`;
  const id = (i: number) => `metric-${i + 1}`;
  // A section per series up to a cap (attention items come first in this order), so a fleet of
  // thousands still gives a page a browser opens; the overview lists every series.
  const shown = Math.min(ordered.length, HTML_SECTIONS);

  const overview = table(
    ['Metric', 'Verdict', 'Why', 'Method', 'Checked', 'Limit risk'],
    ordered.map((s, i) => [
      i < shown ? `<a href="#${id(i)}">${h(reportName(s.name))}</a>` : h(reportName(s.name)),
      badge(s.verdict),
      h(s.reason),
      h(s.method ? (METHOD_LABEL[s.method] ?? s.method) : 'n/a'),
      s.checked.length === 0
        ? 'none'
        : `${plural(s.checked.filter((c) => c.alarm).length, 'alarm')} in ${s.checked.length} checked`,
      s.limit
        ? `${s.limit.alreadyCrossed ? 'already beyond' : chance(s.limit.probability, s.limit.paths)} (allowed ${pct(s.limit.risk)})`
        : '',
    ]),
  );
  const problems =
    results.problems.length > 0
      ? `<h2>Problems</h2><ul>${results.problems
          .map(
            (p) =>
              `<li>${h([p.file, p.line, p.column].filter((x) => x !== null).join(':') || p.keyPath || p.kind)}: ${h(p.message)}</li>`,
          )
          .join('')}</ul>`
      : '';
  const body = [
    `<header><h1>Leadline report ${badge(results.verdict)}</h1>`,
    `<p><strong>${view.headline}</strong> ${h(results.gate.reason)}</p>`,
    `<p class="muted">${view.counts}</p>`,
    `<p>${view.falseAlarms}</p>`,
    `<p class="caution">${h(view.caution)}</p>`,
    ...(results.notes ?? []).map((n) => `<p class="note">${h(n)}</p>`),
    `</header>`,
    `<h2>Overview</h2>`,
    overview,
    problems,
    ...ordered.slice(0, shown).map((s, i) => metricSection(s, view.series[i]!, id(i))),
    shown < ordered.length
      ? `<p class="note">Sections for the first ${shown} of ${ordered.length} series are shown (what needs attention first); the results JSON has every series in full.</p>`
      : '',
    `<footer>Leadline ${h(results.generator.version)}${results.config ? ` · config ${h(results.config)}` : ''} · generated ${h(results.generatedAt)} · ${num(sum.series)} series</footer>`,
  ].join('\n');

  return (
    '<!doctype html>\n<html lang="en"><head><meta charset="utf-8">' +
    `<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">` +
    '<meta name="viewport" content="width=device-width, initial-scale=1"><meta name="color-scheme" content="light dark">' +
    `<title>${h(title)}</title><style>${CSS.trim()}</style></head><body><main>\n${body}\n</main></body></html>\n`
  );
}
