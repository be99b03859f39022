import type { ReconciliationResultLike } from '../../tickets/ticket.js';

/** Order of the statuses a person should look at first; a match needs no look. */
const LOOK_FIRST: Readonly<Record<string, number>> = { breach: 0, not_computable: 1, rounding: 2 };

/** The reconciliation results that are not plain matches, breaches first, then not computable, then rounding. */
export function needingALook<R extends ReconciliationResultLike>(results: readonly R[]): R[] {
  // One pass into a bucket per rank, in the results' order: what a stable sort by rank gives,
  // without a comparator called a million times on a large universe.
  const buckets: R[][] = [[], [], [], []];
  for (const r of results) if (r.status !== 'match') buckets[LOOK_FIRST[r.status] ?? 3].push(r);
  return buckets.flat();
}
