import { existsSync } from 'node:fs';
import { formatIsoDate } from '../calendar/days.js';
import type { Finding } from '../findings.js';
import type { SeriesMasterRecord } from '../ingest/records.js';
import type { SeriesFrame } from '../series/frame.js';
import { readAcknowledgements } from './acknowledgements.js';
import { advanceLedger, type RunCounts } from './ledger.js';
import { readLedger, writeLedger } from './ledger-file.js';
import { findFeedPatterns, type FeedPattern, type SeriesSpan } from './patterns.js';
import { raiseTickets } from './raise.js';
import type { ReconciliationInput, TicketRecord } from './ticket.js';

/**
 * The tickets stage of the daily job, one call: group the findings into feed-level patterns,
 * raise tickets, move them along the ledger in the store, and keep the ledger.
 */
export interface TicketStageInput {
  readonly storeDir: string;
  readonly feed: string;
  /** ISO date. */
  readonly asOf: string;
  readonly findings: readonly Finding[];
  readonly nav: SeriesFrame;
  readonly master?: readonly SeriesMasterRecord[];
  readonly reconciliation?: ReconciliationInput | null;
  readonly acknowledgementsPath?: string;
  readonly now?: Date;
}

export interface TicketStageResult {
  readonly patterns: readonly FeedPattern[];
  readonly records: readonly TicketRecord[];
  readonly history: readonly RunCounts[];
  /** The as-of of the ledger's latest earlier run, if any. */
  readonly previousAsOf: string | null;
  readonly ledgerFile: string | null;
  readonly notices: readonly string[];
}

export function ticketStage(input: TicketStageInput): TicketStageResult {
  const spans = seriesSpans(input.nav, input.master ?? []);
  const patterns = findFeedPatterns(input.findings, spans);
  const categories = new Map((input.master ?? []).map((m) => [m.series_id, m.category]));
  const tickets = raiseTickets({ findings: input.findings, patterns, categories, reconciliation: input.reconciliation ?? null });
  const ledger = readLedger(input.storeDir, input.feed);
  const previousAsOf = ledger.runs.filter((run) => run.as_of < input.asOf).at(-1)?.as_of ?? null;
  const advance = advanceLedger(ledger, tickets, input.asOf, readAcknowledgements(input.acknowledgementsPath), input.now);
  const notices: string[] = [];
  if (input.acknowledgementsPath !== undefined && !existsSync(input.acknowledgementsPath)) {
    notices.push(`the acknowledgement file ${input.acknowledgementsPath} does not exist; no ticket is silenced (create it or fix acknowledgements: in the configuration).`);
  }
  let ledgerFile: string | null = null;
  if (advance.backdated) {
    notices.push(`the ticket ledger already holds a later run (${ledger.runs.at(-1)!.as_of}); ticket states for ${input.asOf} are shown but not kept.`);
  } else {
    ledgerFile = writeLedger(input.storeDir, advance.ledger);
  }
  return { patterns, records: advance.records, history: advance.ledger.runs, previousAsOf, ledgerFile, notices };
}

/** Each series' calendar, category and first and last dates, for the pattern rules. */
export function seriesSpans(nav: SeriesFrame, master: readonly SeriesMasterRecord[]): SeriesSpan[] {
  const byId = new Map(master.map((m) => [m.series_id, m]));
  return nav.ids.map((id, index) => {
    const from = nav.offsets[index];
    const to = nav.offsets[index + 1] - 1;
    const record = byId.get(id);
    return {
      series_id: id,
      calendar: record?.calendar ?? null,
      category: record?.category ?? null,
      first: formatIsoDate(nav.dates[from]),
      last: formatIsoDate(nav.dates[Math.max(from, to)]),
    };
  });
}
