import { findingsByCheck, headline, ticketsNeedingPerson, type DailyReport } from './daily-report.js';

/**
 * The day on a terminal: the manager's summary first, then what needs a person, then counts;
 * every line fits 80 columns, and the caution is printed once, at the end.
 */
export const TERMINAL_WIDTH = 80;
const TICKET_LINES = 25;

export interface TerminalStyle {
  /** Colour only on a terminal and when NO_COLOR is not set. */
  readonly colour: boolean;
}

export function renderDailyTerminal(report: DailyReport, style: TerminalStyle, files: readonly string[] = []): string {
  const paint = (code: string, text: string) => (style.colour ? `\u001b[${code}m${text}\u001b[0m` : text);
  const severityPaint: Record<string, string> = { critical: '1;31', error: '31', warning: '33', info: '2' };
  const lines: string[] = [];
  lines.push(...wrap(`navassay run: ${report.feed}, as of ${report.as_of}${report.previous_as_of ? ` (previous ${report.previous_as_of})` : ''}`));
  lines.push(...wrap(headline(report)).map((l) => paint('1', l)));
  for (const notice of report.notices) lines.push(...wrap(`Note: ${notice}`));
  lines.push('');
  const needing = ticketsNeedingPerson(report);
  if (needing.length) {
    lines.push(`Tickets that need a person (${needing.length}), worst first:`);
    for (const r of needing.slice(0, TICKET_LINES)) {
      const state = r.state.padEnd(8);
      const severity = r.severity.padEnd(8);
      const title = fit(r.title, TERMINAL_WIDTH - 2 - 9 - 9);
      lines.push(`  ${paint('1', state)} ${paint(severityPaint[r.severity] ?? '0', severity)} ${title}`);
    }
    if (needing.length > TICKET_LINES) lines.push(`  … ${needing.length - TICKET_LINES} more in tickets.csv`);
    lines.push('');
  }
  const resolved = report.tickets.records.filter((r) => r.state === 'resolved');
  if (resolved.length) lines.push(...wrap(`Resolved today: ${resolved.map((r) => r.title).join('; ')}`), '');
  lines.push(`Findings: ${report.findings.length}; rows read ${report.rows.read}, ${report.rows.rejected} rejected.`);
  const checks = findingsByCheck(report.findings);
  for (const { check, counts, total } of checks.slice(0, 20)) {
    const bySeverity = (['critical', 'error', 'warning', 'info'] as const).filter((s) => counts[s]).map((s) => `${counts[s]} ${s}`).join(', ');
    lines.push(fit(`  ${check.padEnd(22)} ${String(total).padStart(6)}  ${bySeverity}`, TERMINAL_WIDTH));
  }
  if (report.patterns.length) {
    lines.push('', 'Feed-level patterns:');
    for (const p of report.patterns) lines.push(...wrap(p.message, '  '));
  }
  const f = report.figures;
  if (f) {
    lines.push('', ...wrap(`Risk figures at ${f.as_of}: ${f.computed} computed, ${f.not_computable} not computable, ${f.flagged} over a window holding an error-level finding.`));
    const flaggedBySeries = new Map<string, Set<string>>();
    for (const x of f.shown) if (x.flagged_by.length) flaggedBySeries.set(x.series_id, new Set([...(flaggedBySeries.get(x.series_id) ?? []), ...x.flagged_by]));
    for (const [id, keys] of [...flaggedBySeries].slice(0, 8)) lines.push(fit(`  [!] ${id}: error-level finding in window (${[...new Set([...keys].map((k) => k.split('|')[0]))].join(', ')})`, TERMINAL_WIDTH));
    const reasons = new Map<string, number>();
    for (const x of f.shown) if (x.value === null) reasons.set(x.reason ?? 'no reason given', (reasons.get(x.reason ?? 'no reason given') ?? 0) + 1);
    for (const [reason, count] of [...reasons].slice(0, 5)) lines.push(fit(`  n/a ×${count}: ${reason}`, TERMINAL_WIDTH));
  }
  const rec = report.reconciliation;
  if (rec?.results?.length) {
    const statuses = new Map<string, number>();
    for (const r of rec.results) statuses.set(r.status, (statuses.get(r.status) ?? 0) + 1);
    lines.push('', ...wrap(`Reconciliation of ${rec.results.length} vendor figures: ${[...statuses.entries()].map(([s, n]) => `${n} ${s.replace(/_/g, ' ')}`).join(', ')}.`));
    const breaches = rec.results.filter((r) => r.status === 'breach');
    // Explained: a convention, or a repair of the data, reproduces the vendor's figure.
    const explains = (x: { readonly changes?: unknown; readonly reproduces?: boolean }) => x.changes !== undefined || x.reproduces === true;
    const unexplained = breaches.filter((r) => !(r.explanations ?? []).some(explains));
    const shown = (value: number | null | undefined) => (typeof value === 'number' ? String(Number(value.toPrecision(6))) : '?');
    for (const r of unexplained.slice(0, 5)) lines.push(fit(`  [!] ${r.series_id} ${r.window ?? ''} ${r.metric ?? ''}: vendor ${shown(r.vendor)}, computed ${shown(r.computed)}, unexplained`, TERMINAL_WIDTH));
    if (breaches.length > unexplained.length) lines.push(fit(`  ${breaches.length - unexplained.length} other breaches are explained by a convention or the data (report.html).`, TERMINAL_WIDTH));
  }
  if (files.length) lines.push('', ...wrap(`Written: ${files.join(', ')}`));
  lines.push('', ...wrap(report.caution), '');
  return lines.join('\n');
}

/** Cuts text to a width, ending with an ellipsis when cut. */
export function fit(text: string, width: number): string {
  return text.length <= width ? text : text.slice(0, width - 1) + '…';
}

/** Word-wraps text to the terminal width. */
export function wrap(text: string, indent = ''): string[] {
  const lines: string[] = [];
  let line = indent;
  for (const word of text.split(/\s+/)) {
    if (line.trim() && line.length + 1 + word.length > TERMINAL_WIDTH) {
      lines.push(line);
      line = indent + word;
    } else line = line.trim() ? `${line} ${word}` : indent + word;
  }
  if (line.trim()) lines.push(line);
  return lines.map((l) => fit(l, TERMINAL_WIDTH));
}
