import type { Severity } from '../findings.js';

/**
 * The four answers reconciliation gives for a vendor's figure (interface.md):
 * `match` inside tolerance; `rounding` outside it but within half a unit of the precision the
 * vendor printed, so honest rounding never raises a ticket; `breach` otherwise;
 * `not_computable` when navassay cannot compute the figure on the data it was given.
 */
export const STATUSES = ['match', 'rounding', 'breach', 'not_computable'] as const;
export type ReconcileStatus = (typeof STATUSES)[number];

/**
 * The severity each status carries for `--fail-on`: a breach is an `error` (so the default
 * `--fail-on error` exits 1 on any breach); a figure the vendor published although the data
 * cannot support it is a `warning`; the rest are `info`.
 */
export function severityOf(status: ReconcileStatus, unsupportedByData: boolean): Severity {
  if (status === 'breach') return 'error';
  return status === 'not_computable' && unsupportedByData ? 'warning' : 'info';
}

/** Floating-point slack, so that 0.1412 − 0.14115 is within a half unit of 0.00005. */
const SLACK = 1e-10;

export interface Judgement {
  readonly status: Exclude<ReconcileStatus, 'not_computable'>;
  /** vendor − computed. */
  readonly difference: number;
}

/** Compares a vendor's figure with a computed one, given the tolerance and the printed half unit. */
export function judge(vendor: number, computed: number, allowed: number, halfUnit: number): Judgement {
  const difference = vendor - computed;
  const distance = Math.abs(difference);
  if (distance <= allowed + SLACK) return { status: 'match', difference };
  return { status: distance <= halfUnit + SLACK ? 'rounding' : 'breach', difference };
}

/** A candidate computation reproduces the vendor's figure when the judgement is not a breach. */
export function reproduces(vendor: number, computed: number, allowed: number, halfUnit: number): boolean {
  return judge(vendor, computed, allowed, halfUnit).status !== 'breach';
}
