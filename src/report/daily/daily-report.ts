import { SEVERITIES, severityRank, type Finding, type Severity } from '../../findings.js';
import type { Methodology } from '../../metrics/methodology.js';
import type { MetricsAnswer } from '../../metrics/compute.js';
import type { RunCounts } from '../../tickets/ledger.js';
import type { FeedPattern } from '../../tickets/patterns.js';
import type { ReconciliationInput, TicketRecord, TicketState } from '../../tickets/ticket.js';
import type { CheckAnswer } from '../check-answer.js';
import { CAUTION } from '../view.js';
import type { NavChart } from './chart-data.js';
import { figureFlags, flaggedFigure, type FigureFlags, type FlaggedFigure } from './figure-flags.js';

/**
 * The day's report, one object that every output (html, markdown, csv, json, terminal) renders.
 * Its json form starts with the check answer's fields (as_of, rows, findings, summary), so a
 * script reading `check --format json` reads `run --format json` the same way.
 */
export interface DailyReport extends CheckAnswer {
  readonly feed: string;
  readonly previous_as_of: string | null;
  readonly patterns: readonly Finding[];
  readonly tickets: { readonly counts: TicketCounts; readonly records: readonly TicketRecord[] };
  readonly figures: FigureSummary | null;
  readonly reconciliation: ReconciliationInput | null;
  readonly history: readonly RunCounts[];
  readonly charts: readonly NavChart[];
  readonly notices: readonly string[];
  readonly caution: string;
}

export interface TicketCounts {
  readonly new: number;
  readonly open: number;
  readonly reopened: number;
  readonly resolved: number;
  readonly acknowledged: number;
}

export interface FigureSummary {
  readonly as_of: string;
  readonly methodology: Methodology;
  readonly computed: number;
  readonly not_computable: number;
  readonly flagged: number;
  /** The figures the report shows: all of them on a small run, else those that need a person. */
  readonly shown: readonly FlaggedFigure[];
  readonly complete: boolean;
  /** The file (beside the report) holding every figure. */
  readonly full_file: string;
}

/** Above this many figures the report shows only the flagged and not-computable ones and links the file. */
export const FIGURES_SHOWN_AT_MOST = 400;

export interface DailyInputs {
  readonly feed: string;
  readonly previousAsOf: string | null;
  readonly check: CheckAnswer;
  readonly patterns: readonly FeedPattern[];
  readonly tickets: readonly TicketRecord[];
  readonly history: readonly RunCounts[];
  readonly metrics: MetricsAnswer | null;
  /** The metrics' figures flagged against the check's findings (`figureFlags`), when the caller has them already. */
  readonly figureFlags?: FigureFlags;
  readonly reconciliation?: ReconciliationInput | null;
  readonly charts?: readonly NavChart[];
  readonly figuresFile?: string;
  readonly notices?: readonly string[];
}

export function buildDailyReport(inputs: DailyInputs): DailyReport {
  return {
    ...inputs.check,
    feed: inputs.feed,
    previous_as_of: inputs.previousAsOf,
    patterns: inputs.patterns.map((p) => p.finding),
    tickets: { counts: countTickets(inputs.tickets), records: inputs.tickets },
    figures: inputs.metrics
      ? summarizeFigures(inputs.metrics, inputs.figureFlags ?? figureFlags(inputs.metrics, inputs.check.findings), inputs.figuresFile ?? 'figures.csv')
      : null,
    reconciliation: inputs.reconciliation ?? null,
    history: inputs.history,
    charts: inputs.charts ?? [],
    notices: inputs.notices ?? [],
    caution: CAUTION,
  };
}

function countTickets(records: readonly TicketRecord[]): TicketCounts {
  const live = (state: TicketState) => records.filter((r) => r.state === state && !r.silenced).length;
  return { new: live('new'), open: live('open'), reopened: live('reopened'), resolved: records.filter((r) => r.state === 'resolved').length, acknowledged: records.filter((r) => r.silenced).length };
}

export function summarizeFigures(metrics: MetricsAnswer, flagged: FigureFlags, fullFile: string): FigureSummary {
  const { figures, flags } = flagged;
  const complete = figures.length <= FIGURES_SHOWN_AT_MOST;
  // Counted and picked in one pass; a flagged figure made only for those shown.
  let notComputable = 0;
  let flaggedCount = 0;
  const shown: FlaggedFigure[] = [];
  for (let index = 0; index < figures.length; index++) {
    const missing = figures[index].value === null;
    const hasFlags = flags[index].length > 0;
    if (missing) notComputable++;
    if (hasFlags) flaggedCount++;
    if (shown.length < FIGURES_SHOWN_AT_MOST && (complete || missing || hasFlags)) shown.push(flaggedFigure(flagged, index));
  }
  return {
    as_of: metrics.as_of,
    methodology: metrics.methodology,
    computed: figures.length - notComputable,
    not_computable: notComputable,
    flagged: flaggedCount,
    shown,
    complete,
    full_file: fullFile,
  };
}

/** Tickets that need a person today: not resolved, not silenced, worst first. */
export function ticketsNeedingPerson(report: DailyReport): TicketRecord[] {
  return report.tickets.records.filter((r) => r.state !== 'resolved' && !r.silenced);
}

/** Findings counted by check and severity, checks with the worst findings first. */
export function findingsByCheck(findings: readonly Finding[]): Array<{ check: string; counts: Record<Severity, number>; total: number }> {
  const table = new Map<string, Record<Severity, number>>();
  for (const f of findings) {
    const row = table.get(f.check) ?? { info: 0, warning: 0, error: 0, critical: 0 };
    row[f.severity]++;
    table.set(f.check, row);
  }
  const worst = (counts: Record<Severity, number>) => Math.max(...SEVERITIES.filter((s) => counts[s] > 0).map(severityRank));
  return [...table.entries()]
    .map(([check, counts]) => ({ check, counts, total: SEVERITIES.reduce((sum, s) => sum + counts[s], 0) }))
    .sort((a, b) => worst(b.counts) - worst(a.counts) || b.total - a.total || a.check.localeCompare(b.check));
}

/** The one sentence a manager reads first. */
export function headline(report: DailyReport): string {
  const c = report.tickets.counts;
  const needing = ticketsNeedingPerson(report);
  const worst = needing[0];
  const since = report.previous_as_of ? ` since ${report.previous_as_of}` : '';
  const parts = [
    `${c.new} new ticket${c.new === 1 ? '' : 's'}${since}`,
    `${c.open + c.reopened} still open${c.reopened ? ` (${c.reopened} reopened)` : ''}`,
    `${c.resolved} resolved`,
    `${c.acknowledged} acknowledged`,
  ];
  const worstText = worst ? ` Worst: ${worst.severity}, ${worst.title}${worst.state === 'new' ? ' (new today)' : ` (open since ${worst.first_seen})`}.` : ' Nothing needs a person today.';
  return `${parts.join(', ')}.${worstText}`;
}

/** The note beside a figure: why it cannot be computed, or which error-level findings lie in its window. */
export function figureNote(figure: FlaggedFigure): string {
  if (figure.value === null) return `not computable: ${figure.reason ?? 'no reason given'}`;
  if (figure.flagged_by.length > 0) return `error-level finding in window: ${figure.flagged_by.slice(0, 3).join(', ')}${figure.flagged_by.length > 3 ? ', …' : ''}`;
  return '';
}

export function ticketDates(r: TicketRecord): string {
  if (!r.start) return '';
  return r.end && r.end !== r.start ? `${r.start} to ${r.end}` : r.start;
}

export interface FigureGridRow {
  readonly series_id: string;
  readonly window: string;
  /** One cell a metric: the value to four decimals, "n/a", or empty; flagged cells end with ⚑. */
  readonly cells: readonly string[];
  /** The row's reasons and flags, once each. */
  readonly note: string;
}

/** The shown figures as a grid: a row per series and window, a column per metric, as a person reads them. */
export function figureGrid(figures: readonly FlaggedFigure[]): { metrics: string[]; rows: FigureGridRow[] } {
  const metrics = [...new Set(figures.map((f) => f.metric))];
  const rows = new Map<string, { series_id: string; window: string; cells: string[]; notes: Set<string> }>();
  for (const f of figures) {
    const id = `${f.series_id}\u0000${f.window}`;
    let row = rows.get(id);
    if (!row) rows.set(id, (row = { series_id: f.series_id, window: f.window, cells: metrics.map(() => ''), notes: new Set() }));
    row.cells[metrics.indexOf(f.metric)] = f.value === null ? 'n/a' : `${f.value.toFixed(4)}${f.flagged_by.length ? ' ⚑' : ''}`;
    const note = f.value === null ? `n/a: ${f.reason ?? 'no reason given'}` : f.flagged_by.length ? `⚑ error-level finding in window: ${f.flagged_by.join(', ')}` : '';
    if (note) row.notes.add(note);
  }
  return { metrics, rows: [...rows.values()].map((r) => ({ series_id: r.series_id, window: r.window, cells: r.cells, note: [...r.notes].join('; ') })) };
}
