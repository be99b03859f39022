import type { Severity } from '../findings.js';

/**
 * A ticket: one problem worth a person's time, raised from one or more findings (or from a
 * reconciliation result) and carried across runs by the ticket ledger. See docs/tickets.md.
 */
export type TicketKind = 'series' | 'feed' | 'reconciliation';

export interface Ticket {
  /** Stable across runs while the problem is the same: built from the findings' keys, never from today's date. */
  readonly key: string;
  readonly kind: TicketKind;
  /** The check (or pattern, or reconciliation status) that raised it. */
  readonly check: string;
  readonly severity: Severity;
  readonly title: string;
  /** The series concerned, in order; empty for a file-level problem. */
  readonly series_ids: readonly string[];
  /** The series' category in the master, when the master has it (the team that looks after it). */
  readonly category: string | null;
  readonly start: string | null;
  readonly end: string | null;
  readonly action: string;
  /** The findings' keys (or the reconciliation results' identities) the ticket stands for. */
  readonly finding_keys: readonly string[];
  readonly evidence: Readonly<Record<string, unknown>>;
  /** A short hash of the finding keys: it changes when the problem changes shape. */
  readonly fingerprint: string;
}

export const TICKET_STATES = ['new', 'open', 'reopened', 'resolved'] as const;
export type TicketState = (typeof TICKET_STATES)[number];

/** How an acknowledgement stands today. */
export type AcknowledgementStatus = 'active' | 'expired' | 'problem_changed';

export interface AppliedAcknowledgement {
  readonly reason: string;
  readonly who: string;
  readonly expires: string;
  readonly status: AcknowledgementStatus;
}

/** A ticket as today's run reports it: the ticket, its state across runs and its acknowledgement. */
export interface TicketRecord extends Ticket {
  readonly state: TicketState;
  readonly first_seen: string;
  readonly last_seen: string;
  /** The as-of on which it was found gone; null while it is seen. */
  readonly resolved_on: string | null;
  readonly acknowledgement: AppliedAcknowledgement | null;
  /** True when an active acknowledgement silences it: it stays in the files but leaves the summary. */
  readonly silenced: boolean;
}

/**
 * What the reconciliation stage hands over, typed loosely on purpose: only the fields a ticket
 * needs, all optional, so the reconciliation answer plugs in without a conversion.
 */
export interface ReconciliationInput {
  readonly results?: ReadonlyArray<ReconciliationResultLike>;
  readonly vendor_explanations?: ReadonlyArray<VendorExplanationLike>;
}

export interface ReconciliationResultLike {
  readonly series_id: string;
  readonly window?: string;
  readonly metric?: string;
  readonly status: string;
  readonly vendor?: number | null;
  readonly computed?: number | null;
  readonly difference?: number | null;
  readonly tolerance?: number | null;
  readonly reason?: string | null;
  readonly explanations?: ReadonlyArray<{ readonly changes?: Readonly<Record<string, unknown>>; readonly computed?: number | null; readonly reproduces?: boolean }>;
  /** The explanations as a person reads them, when the reconciliation gives them. */
  readonly explanation_text?: string;
}

export interface VendorExplanationLike {
  readonly key?: string;
  readonly vendor?: string;
  readonly message?: string;
  readonly explanation?: string;
  readonly changes?: Readonly<Record<string, unknown>>;
  readonly series_ids?: readonly string[];
  readonly severity?: string;
}
