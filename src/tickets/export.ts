import { csvLine } from '../report/safe-text.js';
import type { TicketRecord } from './ticket.js';

/** Today's tickets for a team's own ticket system: one JSON object a line, and the same as CSV. */
export function ticketsToJsonLines(records: readonly TicketRecord[]): string {
  return records.map((record) => JSON.stringify(record)).join('\n') + (records.length ? '\n' : '');
}

export const TICKET_CSV_COLUMNS = [
  'key', 'state', 'severity', 'kind', 'check', 'title', 'series_ids', 'category', 'start', 'end',
  'action', 'first_seen', 'last_seen', 'resolved_on', 'silenced', 'ack_status', 'ack_reason', 'ack_who', 'ack_expires', 'fingerprint',
] as const;

export function ticketsToCsv(records: readonly TicketRecord[]): string {
  const lines = [csvLine(TICKET_CSV_COLUMNS)];
  for (const r of records) {
    const ack = r.acknowledgement;
    lines.push(
      csvLine([
        r.key, r.state, r.severity, r.kind, r.check, r.title, r.series_ids.join(' '), r.category, r.start, r.end,
        r.action, r.first_seen, r.last_seen, r.resolved_on, r.silenced ? 'true' : 'false',
        ack?.status ?? null, ack?.reason ?? null, ack?.who ?? null, ack?.expires ?? null, r.fingerprint,
      ]),
    );
  }
  return lines.join('\n') + '\n';
}
