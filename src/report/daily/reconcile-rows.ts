import type { ReconciliationResultLike } from '../../tickets/ticket.js';

/** Order of the statuses a person should look at first; a match needs no look. */
const LOOK_FIRST: Readonly<Record<string, number>> = { breach: 0, not_computable: 1, rounding: 2 };

/** The reconciliation results that are not plain matches, breaches first, then not computable, then rounding. */
export function needingALook<R extends ReconciliationResultLike>(results: readonly R[]): R[] {
  const rank = (r: R) => LOOK_FIRST[r.status] ?? 3;
  return results.filter((r) => r.status !== 'match').sort((a, b) => rank(a) - rank(b));
}
