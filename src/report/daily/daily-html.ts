import type { ReconciliationResultLike } from '../../tickets/ticket.js';
import { needingALook } from './reconcile-rows.js';
import { SEVERITIES } from '../../findings.js';
import { escapeHtml } from '../safe-text.js';
import { cellText } from '../view.js';
import { figureGrid, findingsByCheck, headline, ticketDates, ticketsNeedingPerson, type DailyReport } from './daily-report.js';
import { navChartSvg, runCountsSvg, toleranceSvg, type ToleranceRow } from './svg-charts.js';

/**
 * The day's report as one self-contained HTML file: inline style, inline SVG, no script, no
 * external font, image or link other than the figures file beside it. Readable on a phone (one
 * column, tables scroll sideways) and printed (no backgrounds needed, charts keep their size).
 */
const TICKETS_SHOWN = 200;
const e = (value: string | number | null | undefined) => escapeHtml(value === null || value === undefined ? '' : typeof value === 'number' ? cellText(value) : value);

export function renderDailyHtml(report: DailyReport): string {
  const title = `navassay daily report: ${report.feed}, as of ${report.as_of}`;
  return `<!doctype html>
<html lang="en">
<head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${e(title)}</title>
<style>${STYLE}</style></head>
<body>
<header><h1>${e(title)}</h1>
<p class="headline">${e(headline(report))}</p>
${counters(report)}
<p class="caution">${e(report.caution)}</p>
${report.notices.map((notice) => `<p class="notice">${e(notice)}</p>`).join('\n')}
</header>
<main>
${ticketSection(report)}
${patternSection(report)}
${chartSection(report)}
${findingSection(report)}
${reconciliationSection(report)}
${figureSection(report)}
${historySection(report)}
<section><h2>Rows read</h2><p>${e(`${report.rows.read} rows read: ${report.rows.accepted} accepted, ${report.rows.rejected} rejected (see quarantine.csv).`)}</p></section>
</main>
</body>
</html>
`;
}

const STYLE = `
body { font-family: system-ui, -apple-system, "Segoe UI", sans-serif; margin: 0 auto; padding: 1rem; max-width: 72rem; color: #1b1b1b; line-height: 1.4; }
h1 { font-size: 1.4rem; } h2 { font-size: 1.15rem; margin-top: 2rem; border-bottom: 1px solid #ccc; }
.headline { font-size: 1.05rem; font-weight: 600; }
.counters { display: flex; flex-wrap: wrap; gap: .5rem; padding: 0; list-style: none; }
.counters li { border: 1px solid #bbb; border-radius: .3rem; padding: .3rem .7rem; }
.counters b { font-size: 1.2rem; margin-right: .3rem; }
.caution { font-size: .85rem; color: #444; border-left: 3px solid #999; padding-left: .6rem; }
.notice { font-size: .9rem; border-left: 3px solid #d35400; padding-left: .6rem; }
.scroll { overflow-x: auto; }
table { border-collapse: collapse; font-size: .85rem; margin: .5rem 0 1rem; }
th, td { border: 1px solid #ccc; padding: .25rem .45rem; text-align: left; vertical-align: top; }
th { background: #f0f0f0; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
.sev-critical, .sev-error { color: #a93226; font-weight: 600; } .sev-warning { color: #9a7d0a; }
.state-new, .state-reopened { font-weight: 700; }
.flag { color: #a93226; }
figure { margin: 1rem 0; break-inside: avoid; } figcaption { font-size: .85rem; color: #333; }
svg.chart { width: 100%; max-width: 40rem; height: auto; display: block; border: 1px solid #eee; }
svg.chart text { font-family: inherit; fill: #333; }
.charts { display: grid; grid-template-columns: repeat(auto-fill, minmax(min(100%, 28rem), 1fr)); gap: 1rem; }
@media print { body { max-width: none; font-size: 10pt; } .scroll { overflow: visible; } h2 { break-after: avoid; } }
`;

function counters(report: DailyReport): string {
  const c = report.tickets.counts;
  const items: Array<[number, string]> = [[c.new, 'new'], [c.open + c.reopened, 'still open'], [c.resolved, 'resolved'], [c.acknowledged, 'acknowledged'], [report.findings.length, 'findings']];
  return `<ul class="counters">${items.map(([n, label]) => `<li><b>${n}</b>${label}</li>`).join('')}</ul>`;
}

function table(columns: readonly string[], rows: readonly string[][], numeric: ReadonlySet<number> = new Set()): string {
  const head = columns.map((c) => `<th scope="col">${e(c)}</th>`).join('');
  const body = rows.map((row) => `<tr>${row.map((cell, k) => `<td${numeric.has(k) ? ' class="num"' : ''}>${cell}</td>`).join('')}</tr>`).join('\n');
  return `<div class="scroll"><table><thead><tr>${head}</tr></thead><tbody>\n${body}\n</tbody></table></div>`;
}

function ticketSection(report: DailyReport): string {
  const needing = ticketsNeedingPerson(report);
  const rows = needing.slice(0, TICKETS_SHOWN).map((r) => [
    `<span class="state-${e(r.state)}">${e(r.state)}</span>`,
    `<span class="sev-${e(r.severity)}">${e(r.severity)}</span>`,
    e(r.title),
    e(r.category),
    e(ticketDates(r)),
    e(r.action),
    `<code>${e(r.key)}</code>`,
  ]);
  const more = needing.length > TICKETS_SHOWN ? `<p>${needing.length - TICKETS_SHOWN} more in tickets.csv.</p>` : '';
  const resolved = report.tickets.records.filter((r) => r.state === 'resolved');
  const acknowledged = report.tickets.records.filter((r) => r.acknowledgement);
  return `<section id="tickets"><h2>Tickets that need a person (${needing.length})</h2>
${needing.length ? table(['state', 'severity', 'ticket', 'category', 'dates', 'suggested action', 'key'], rows) : '<p>None today.</p>'}${more}
<h2>Resolved today (${resolved.length})</h2>
${resolved.length ? table(['ticket', 'first seen', 'key'], resolved.map((r) => [e(r.title), e(r.first_seen), `<code>${e(r.key)}</code>`])) : '<p>None.</p>'}
<h2>Acknowledged (${acknowledged.length})</h2>
${acknowledged.length ? table(['ticket', 'status', 'reason', 'who', 'expires'], acknowledged.map((r) => [e(r.title), e(r.acknowledgement!.status), e(r.acknowledgement!.reason), e(r.acknowledgement!.who), e(r.acknowledgement!.expires)])) : '<p>None.</p>'}
</section>`;
}

function patternSection(report: DailyReport): string {
  if (report.patterns.length === 0) return '';
  const rows = report.patterns.map((p) => [`<span class="sev-${e(p.severity)}">${e(p.severity)}</span>`, e(p.check), e(p.message), e(((p.evidence.series_ids as string[]) ?? []).slice(0, 30).join(' '))]);
  return `<section id="patterns"><h2>Feed-level patterns</h2><p>Findings many series share, grouped into one; each series' own findings stay in report.json.</p>${table(['severity', 'pattern', 'what it means', 'series'], rows)}</section>`;
}

function chartSection(report: DailyReport): string {
  if (report.charts.length === 0) return '';
  const figures = report.charts.map(
    (chart) => `<figure>${navChartSvg(chart)}<figcaption>${e(chart.series_id)}: NAV (solid)${chart.benchmark.length > 1 ? `, ${e(chart.benchmark_id)} rebased (dashed)` : ''}; flagged dates circled, flagged runs shaded (${[...new Set(chart.marks.map((m) => m.check))].map(e).join(', ')}).</figcaption></figure>`,
  );
  return `<section id="charts"><h2>Flagged series</h2><div class="charts">${figures.join('\n')}</div></section>`;
}

function findingSection(report: DailyReport): string {
  const rows = findingsByCheck(report.findings).map(({ check, counts, total }) => [e(check), ...SEVERITIES.map((s) => (counts[s] ? `<span class="sev-${s}">${counts[s]}</span>` : '')), String(total)]);
  return `<section id="findings"><h2>Findings by check and severity (${report.findings.length})</h2>
${rows.length ? table(['check', ...SEVERITIES, 'total'], rows, new Set([1, 2, 3, 4, 5])) : '<p>No findings: every check passed.</p>'}
<p>Every finding, with its evidence, is in report.json and report.csv.</p></section>`;
}

function reconciliationSection(report: DailyReport): string {
  const rec = report.reconciliation;
  if (!rec) return '';
  const results = rec.results ?? [];
  const statuses = new Map<string, number>();
  for (const r of results) statuses.set(r.status, (statuses.get(r.status) ?? 0) + 1);
  const plotted: ToleranceRow[] = breachesFirst(results, isPlottable, PLOTTED_AT_MOST)
    .map((r) => ({ label: `${r.series_id} ${r.window ?? ''} ${r.metric ?? ''}`, vendor: r.vendor!, computed: r.computed!, tolerance: r.tolerance!, status: r.status }));
  const notMatching = needingALook(results, TICKETS_SHOWN);
  const rows = notMatching.map((r) => [
    e(r.series_id), e(r.window), e(r.metric), `<span class="${r.status === 'breach' ? 'sev-error' : ''}">${e(r.status)}</span>`, e(r.vendor ?? null), e(r.computed ?? null), e(r.tolerance ?? null),
    e(r.status === 'not_computable' ? (r.reason ?? 'no reason given') : (r.explanation_text ?? (r.explanations ?? []).map((x) => JSON.stringify(x.changes ?? {})).join('; '))),
  ]);
  const vendor = (rec.vendor_explanations ?? []).map((v) => `<li>${e(v.vendor ?? 'vendor')}: ${e(v.message ?? v.explanation ?? JSON.stringify(v.changes ?? {}))}</li>`).join('');
  return `<section id="reconciliation"><h2>Reconciliation with the vendor</h2>
<p>${[...statuses.entries()].map(([s, n]) => `${n} ${e(s)}`).join(', ') || 'No figures compared.'}</p>
${plotted.length ? `<figure>${toleranceSvg(plotted)}<figcaption>Each dot is a published figure: its distance from the computed one in tolerances; the green band is within tolerance.</figcaption></figure>` : ''}
${rows.length ? table(['series', 'window', 'metric', 'status', 'vendor', 'computed', 'tolerance', 'explanation or reason'], rows, new Set([4, 5, 6])) : ''}
${vendor ? `<h3>Vendor-level explanations</h3><ul>${vendor}</ul>` : ''}</section>`;
}

/** Dots on the tolerance chart at most. */
const PLOTTED_AT_MOST = 40;

/** A result the tolerance chart can place: vendor, computed and tolerance all numbers. */
function isPlottable(r: ReconciliationResultLike): boolean {
  return typeof r.vendor === 'number' && typeof r.computed === 'number' && typeof r.tolerance === 'number';
}

/**
 * The first `count` results that pass `wanted`, with the breaches first, each group in the order
 * given (a stable sort by "is a breach", cut short); the results are not filtered into a list of
 * their own first (360,000 at 10,000 series).
 */
export function breachesFirst<R extends { readonly status: string }>(results: readonly R[], wanted: (r: R) => boolean, count: number): R[] {
  const breaches: R[] = [];
  const others: R[] = [];
  for (const r of results) {
    if (r.status === 'breach') {
      if (!wanted(r)) continue;
      breaches.push(r);
      if (breaches.length === count) break;
    } else if (others.length < count && wanted(r)) others.push(r);
  }
  return [...breaches, ...others].slice(0, count);
}

function figureSection(report: DailyReport): string {
  const f = report.figures;
  if (!f) return '';
  const grid = figureGrid(f.shown);
  const rows = grid.rows.map((r) => [e(r.series_id), e(r.window), ...r.cells.map((c) => (c.endsWith('⚑') ? `<span class="flag">${e(c)}</span>` : e(c))), `<span class="flag">${e(r.note)}</span>`]);
  const scope = f.complete ? 'every figure' : `the ${f.shown.length} figures that need a person (not computable, or an error-level finding in the window)`;
  return `<section id="figures"><h2>Risk figures at ${e(f.as_of)}</h2>
<p>${f.computed} computed, ${f.not_computable} not computable, ${f.flagged} computed over a window holding an error-level finding (⚑). Shown: ${e(scope)}. All figures: <a href="${e(f.full_file)}">${e(f.full_file)}</a>.</p>
${rows.length ? table(['series', 'window', ...grid.metrics, 'note'], rows, new Set(grid.metrics.map((_, k) => k + 2))) : ''}</section>`;
}

function historySection(report: DailyReport): string {
  if (report.history.length === 0) return '';
  return `<section id="history"><h2>Recent runs</h2><figure>${runCountsSvg(report.history)}<figcaption>Tickets per run (from the ticket ledger in the store).</figcaption></figure></section>`;
}
