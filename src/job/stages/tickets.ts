import { formatIsoDate } from '../../calendar/days.js';
import type { Finding } from '../../findings.js';
import type { ReconcileAnswer } from '../../reconcile/reconcile.js';
import { describeExplanation } from '../../report/reconcile-answer.js';
import { ticketStage, type TicketStageResult } from '../../tickets/stage.js';
import type { ReconciliationInput } from '../../tickets/ticket.js';
import type { Day } from '../day.js';

export interface TicketPlace {
  readonly store: string;
  readonly feed: string;
  /** The acknowledgement file the team edits, if the configuration names one. */
  readonly acknowledgements?: string;
}

/** What the tickets stage answers: the tickets, and the reconciliation as they read it, for the day's report too. */
export interface TicketsStageResult extends TicketStageResult {
  /** Every result with its explanation in words, and the vendor-level explanations; null without a vendor file. */
  readonly reconciliation: ReconciliationInput | null;
}

/**
 * The tickets stage: the check stage's findings and the reconcile stage's answer become tickets
 * (per series and check, per feed-level pattern, per series with breaches, per vendor-level
 * explanation), carried across days in the ledger in the store.
 */
export function ticketsStage(day: Day, findings: readonly Finding[], reconciliation: ReconcileAnswer | null, place: TicketPlace): TicketsStageResult {
  const prepared = reconciliation && reconciliationForTickets(reconciliation);
  const result = ticketStage({
    storeDir: place.store,
    feed: place.feed,
    asOf: formatIsoDate(day.asOf),
    findings,
    nav: day.feed.nav,
    master: day.feed.master,
    reconciliation: prepared,
    acknowledgementsPath: place.acknowledgements,
  });
  return { ...result, reconciliation: prepared };
}

/**
 * What tickets and the day's report take from a reconciliation: every result, and one
 * vendor-level explanation per shared cause (summary.vendor_patterns), naming the series whose
 * breaches it reproduces. The tickets stage prepares it once and hands it on to the report.
 */
export function reconciliationForTickets(answer: ReconcileAnswer): ReconciliationInput {
  const breaches = answer.results.filter((result) => result.status === 'breach');
  const vendor_explanations = answer.summary.vendor_patterns.map((pattern) => {
    const signature = JSON.stringify(pattern.changes);
    const series = breaches
      .filter((result) => result.metric === pattern.metric)
      .filter((result) => result.explanations.some((explanation) => explanation.kind === 'convention' && JSON.stringify(explanation.changes) === signature))
      .map((result) => result.series_id);
    return {
      key: `${pattern.metric}|${signature}`,
      vendor: 'vendor',
      message: `${pattern.metric} figures reproduced with ${describeChanges(pattern.changes)} (${pattern.explained} of ${pattern.breaches} breaches)`,
      changes: pattern.changes,
      series_ids: [...new Set(series)],
      severity: 'warning',
    };
  });
  const results = answer.results.map((result) =>
    result.explanations.length === 0 ? result : { ...result, explanation_text: result.explanations.map(describeExplanation).join('; ') },
  );
  return { results, vendor_explanations };
}

function describeChanges(changes: Readonly<Record<string, unknown>>): string {
  return Object.entries(changes)
    .map(([dimension, value]) => `${dimension} ${String(value)}`)
    .join(' and ');
}
