import { severityRank, type Severity } from '../findings.js';
import { acknowledgementIdentity, type Acknowledgement } from './acknowledgements.js';
import type { AppliedAcknowledgement, Ticket, TicketRecord, TicketState } from './ticket.js';

/**
 * The ticket ledger: every ticket ever raised for a feed, with its state, and a count per run.
 * `advanceLedger` is the one place where states move:
 *
 *   seen today, never before            → new
 *   seen today, seen on an earlier run  → open   (also a second run of the same as-of)
 *   seen today, resolved before         → reopened
 *   not seen today, not resolved        → resolved (resolved_on = today)
 */
export const LEDGER_FORMAT = 'navassay-tickets/1';
/** Runs kept for the "counts over recent runs" chart. */
const RUNS_KEPT = 60;

export interface LedgerEntry {
  readonly ticket: Ticket;
  readonly state: TicketState;
  readonly first_seen: string;
  readonly last_seen: string;
  readonly resolved_on: string | null;
  /** The acknowledgement last accepted for it, and the ticket's fingerprint at that moment. */
  readonly acknowledged?: { readonly identity: string; readonly fingerprint: string };
}

export interface RunCounts {
  readonly as_of: string;
  readonly recorded_at: string;
  readonly new: number;
  readonly open: number;
  readonly reopened: number;
  readonly resolved: number;
  readonly silenced: number;
  readonly by_severity: Record<Severity, number>;
}

export interface TicketLedger {
  readonly format: typeof LEDGER_FORMAT;
  readonly feed: string;
  readonly runs: readonly RunCounts[];
  readonly tickets: Readonly<Record<string, LedgerEntry>>;
}

export function emptyLedger(feed: string): TicketLedger {
  return { format: LEDGER_FORMAT, feed, runs: [], tickets: {} };
}

export interface LedgerAdvance {
  readonly ledger: TicketLedger;
  /** Today's tickets (new, open, reopened) and those resolved today, worst first. */
  readonly records: readonly TicketRecord[];
  /** The as-of is older than the ledger's latest run: the states are shown but not kept. */
  readonly backdated: boolean;
}

export function advanceLedger(
  previous: TicketLedger,
  tickets: readonly Ticket[],
  asOf: string,
  acknowledgements: ReadonlyMap<string, Acknowledgement>,
  now = new Date(),
): LedgerAdvance {
  const entries: Record<string, LedgerEntry> = {};
  const records: TicketRecord[] = [];
  const seen = new Set<string>();
  for (const ticket of tickets) {
    seen.add(ticket.key);
    const before = previous.tickets[ticket.key];
    const state: TicketState = !before ? 'new' : before.state === 'resolved' ? 'reopened' : 'open';
    const { applied, acknowledged } = applyAcknowledgement(acknowledgements.get(ticket.key), before?.acknowledged, ticket, asOf);
    const entry: LedgerEntry = { ticket, state, first_seen: before?.first_seen ?? asOf, last_seen: asOf, resolved_on: null, ...(acknowledged && { acknowledged }) };
    entries[ticket.key] = entry;
    records.push(recordOf(entry, applied));
  }
  for (const [key, before] of Object.entries(previous.tickets)) {
    if (seen.has(key)) continue;
    const resolvedNow = before.state !== 'resolved';
    const entry: LedgerEntry = resolvedNow ? { ...before, state: 'resolved', resolved_on: asOf } : before;
    entries[key] = entry;
    if (entry.resolved_on === asOf) records.push(recordOf(entry, null));
  }
  records.sort(byWorst);
  const latest = previous.runs.at(-1)?.as_of;
  const backdated = latest !== undefined && asOf < latest;
  const counts = countRun(records, asOf, now);
  const runs = [...previous.runs.filter((run) => run.as_of !== asOf), counts].sort((a, b) => a.as_of.localeCompare(b.as_of)).slice(-RUNS_KEPT);
  const ledger: TicketLedger = backdated ? previous : { format: LEDGER_FORMAT, feed: previous.feed, runs, tickets: entries };
  return { ledger, records, backdated };
}

/**
 * An acknowledgement silences its ticket while it has not expired and the problem keeps the shape
 * it had when the acknowledgement was first accepted; editing the acknowledgement accepts it anew.
 */
function applyAcknowledgement(
  ack: Acknowledgement | undefined,
  earlier: LedgerEntry['acknowledged'],
  ticket: Ticket,
  asOf: string,
): { applied: AppliedAcknowledgement | null; acknowledged?: LedgerEntry['acknowledged'] } {
  if (!ack) return { applied: null };
  const identity = acknowledgementIdentity(ack);
  const acknowledged = earlier && earlier.identity === identity ? earlier : { identity, fingerprint: ticket.fingerprint };
  const status = ack.expires < asOf ? 'expired' : acknowledged.fingerprint !== ticket.fingerprint ? 'problem_changed' : 'active';
  return { applied: { reason: ack.reason, who: ack.who, expires: ack.expires, status }, acknowledged };
}

function recordOf(entry: LedgerEntry, acknowledgement: AppliedAcknowledgement | null): TicketRecord {
  return {
    ...entry.ticket,
    state: entry.state,
    first_seen: entry.first_seen,
    last_seen: entry.last_seen,
    resolved_on: entry.resolved_on,
    acknowledgement,
    silenced: acknowledgement?.status === 'active',
  };
}

const STATE_ORDER: Record<TicketState, number> = { new: 0, reopened: 1, open: 2, resolved: 3 };

/** Worst first; among equals, what is new today before what is old. */
export function byWorst(a: TicketRecord, b: TicketRecord): number {
  return (
    Number(a.silenced) - Number(b.silenced) ||
    Number(a.state === 'resolved') - Number(b.state === 'resolved') ||
    severityRank(b.severity) - severityRank(a.severity) ||
    STATE_ORDER[a.state] - STATE_ORDER[b.state] ||
    a.key.localeCompare(b.key)
  );
}

function countRun(records: readonly TicketRecord[], asOf: string, now: Date): RunCounts {
  const by_severity: Record<Severity, number> = { info: 0, warning: 0, error: 0, critical: 0 };
  const count = (state: TicketState) => records.filter((r) => r.state === state).length;
  for (const record of records) if (record.state !== 'resolved') by_severity[record.severity]++;
  return {
    as_of: asOf,
    recorded_at: now.toISOString(),
    new: count('new'),
    open: count('open'),
    reopened: count('reopened'),
    resolved: count('resolved'),
    silenced: records.filter((r) => r.silenced).length,
    by_severity,
  };
}
