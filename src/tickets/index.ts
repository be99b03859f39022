/** Tickets: findings (and reconciliation results) → tickets carried across runs. See docs/tickets.md. */
export { findFeedPatterns, absorbedKeys, PATTERN_RULES, type FeedPattern, type SeriesSpan } from './patterns.js';
export { raiseTickets, type TicketInputs } from './raise.js';
export { readAcknowledgements, acknowledgementsFromYaml, type Acknowledgement } from './acknowledgements.js';
export { advanceLedger, emptyLedger, byWorst, type TicketLedger, type RunCounts, type LedgerAdvance } from './ledger.js';
export { readLedger, writeLedger, ledgerPath } from './ledger-file.js';
export { ticketsToCsv, ticketsToJsonLines } from './export.js';
export type { Ticket, TicketRecord, TicketState, TicketKind, ReconciliationInput, AppliedAcknowledgement } from './ticket.js';
export { ticketStage, seriesSpans, type TicketStageInput, type TicketStageResult } from './stage.js';
