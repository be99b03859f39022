import { needingALook } from './reconcile-rows.js';
import { SEVERITIES } from '../../findings.js';
import { csvCell, csvLine, markdownText } from '../safe-text.js';
import { linesInPieces } from '../text-pieces.js';
import { cellText } from '../view.js';
import { figureGrid, figureNote, findingsByCheck, headline, ticketDates, ticketsNeedingPerson, type DailyReport } from './daily-report.js';

/**
 * The day's report as Markdown (for a chat or an e-mail) and as one long CSV table (for a
 * spreadsheet): the same sections as the HTML, without the charts.
 */
const ROWS_SHOWN = 200;
const md = (value: string | number | null | undefined) => markdownText(value === null || value === undefined ? '' : typeof value === 'number' ? cellText(value) : value);

function mdTable(columns: readonly string[], rows: ReadonlyArray<ReadonlyArray<string | number | null | undefined>>): string[] {
  return [`| ${columns.map(md).join(' | ')} |`, `|${columns.map(() => ' --- ').join('|')}|`, ...rows.map((row) => `| ${row.map(md).join(' | ')} |`)];
}

export function renderDailyMarkdown(report: DailyReport): string {
  const c = report.tickets.counts;
  const lines = [`# navassay daily report: ${md(report.feed)}, as of ${report.as_of}`, '', `**${md(headline(report))}**`, '', `> ${md(report.caution)}`, ''];
  for (const notice of report.notices) lines.push(`- ${md(notice)}`);
  const needing = ticketsNeedingPerson(report);
  lines.push('', `## Tickets that need a person (${needing.length})`, '');
  if (needing.length) lines.push(...mdTable(['state', 'severity', 'ticket', 'category', 'dates', 'suggested action'], needing.slice(0, ROWS_SHOWN).map((r) => [r.state, r.severity, r.title, r.category, ticketDates(r), r.action])));
  else lines.push('None today.');
  if (needing.length > ROWS_SHOWN) lines.push('', `${needing.length - ROWS_SHOWN} more in tickets.csv.`);
  const resolved = report.tickets.records.filter((r) => r.state === 'resolved');
  lines.push('', `## Resolved today (${c.resolved})`, '', ...(resolved.length ? mdTable(['ticket', 'first seen'], resolved.map((r) => [r.title, r.first_seen])) : ['None.']));
  const acknowledged = report.tickets.records.filter((r) => r.acknowledgement);
  lines.push('', `## Acknowledged (${acknowledged.length})`, '', ...(acknowledged.length ? mdTable(['ticket', 'status', 'reason', 'who', 'expires'], acknowledged.map((r) => [r.title, r.acknowledgement!.status, r.acknowledgement!.reason, r.acknowledgement!.who, r.acknowledgement!.expires])) : ['None.']));
  if (report.patterns.length) lines.push('', '## Feed-level patterns', '', ...report.patterns.map((p) => `- **${md(p.severity)}** ${md(p.message)}`));
  lines.push('', `## Findings by check and severity (${report.findings.length})`, '', ...mdTable(['check', ...SEVERITIES, 'total'], findingsByCheck(report.findings).map(({ check, counts, total }) => [check, ...SEVERITIES.map((s) => counts[s] || ''), total])));
  const rec = report.reconciliation;
  if (rec) {
    const off = needingALook(rec.results ?? [], ROWS_SHOWN);
    lines.push('', '## Reconciliation with the vendor', '', ...mdTable(['series', 'window', 'metric', 'status', 'vendor', 'computed', 'tolerance', 'explanation or reason'], off.map((r) => [r.series_id, r.window, r.metric, r.status, r.vendor, r.computed, r.tolerance, r.status === 'not_computable' ? r.reason : (r.explanation_text ?? (r.explanations ?? []).map((x) => JSON.stringify(x.changes ?? {})).join('; '))])));
    for (const v of rec.vendor_explanations ?? []) lines.push(`- ${md(v.vendor ?? 'vendor')}: ${md(v.message ?? v.explanation ?? JSON.stringify(v.changes ?? {}))}`);
  }
  const f = report.figures;
  if (f) {
    lines.push('', `## Risk figures at ${f.as_of}`, '', `${f.computed} computed, ${f.not_computable} not computable, ${f.flagged} over a window holding an error-level finding (⚑). All figures: ${md(f.full_file)}.`, '');
    const grid = figureGrid(f.shown);
    lines.push(...mdTable(['series', 'window', ...grid.metrics, 'note'], grid.rows.slice(0, ROWS_SHOWN).map((r) => [r.series_id, r.window, ...r.cells, r.note])));
  }
  lines.push('', `Rows read ${report.rows.read}: ${report.rows.accepted} accepted, ${report.rows.rejected} rejected. Charts are in report.html.`, '');
  return lines.join('\n');
}

export const DAILY_CSV_COLUMNS = ['section', 'state', 'severity', 'check', 'series_id', 'start', 'end', 'title', 'detail', 'value', 'key'] as const;

/** One long table: tickets, patterns, findings, figures that need a person, reconciliation results. */
export function renderDailyCsv(report: DailyReport): string {
  return [...dailyCsvLines(report)].join('\n') + '\n';
}

/** The same text as `renderDailyCsv`, in pieces for a file. */
export function dailyCsvInPieces(report: DailyReport): Iterable<string> {
  return linesInPieces(dailyCsvLines(report));
}

function* dailyCsvLines(report: DailyReport): Generator<string> {
  yield csvLine(DAILY_CSV_COLUMNS);
  for (const r of report.tickets.records) yield csvLine(['ticket', r.silenced ? 'acknowledged' : r.state, r.severity, r.check, r.series_ids.join(' '), r.start, r.end, r.title, r.action, null, r.key]);
  for (const p of report.patterns) yield csvLine(['pattern', null, p.severity, p.check, null, p.start, p.end, p.message, ((p.evidence.series_ids as string[]) ?? []).join(' '), null, p.key]);
  for (const f of report.findings) yield csvLine(['finding', null, f.severity, f.check, f.series_id, f.start, f.end, f.message, JSON.stringify(f.evidence), null, f.key]);
  for (const x of report.figures?.shown ?? []) {
    if (x.value !== null && x.flagged_by.length === 0) continue;
    yield csvLine(['figure', x.value === null ? 'not_computable' : 'flagged', null, x.metric, x.series_id, null, null, x.window, figureNote(x), x.value, null]);
  }
  // One line per vendor figure (360,000 at 10,000 series): csvLine's cells without an array per line.
  for (const r of report.reconciliation?.results ?? []) {
    yield `reconciliation,${csvCell(r.status)},,${csvCell(r.metric ?? null)},${csvCell(r.series_id)},,,${csvCell(r.window ?? null)},${csvCell(r.reason ?? null)},${csvCell(r.vendor ?? null)},`;
  }
}
