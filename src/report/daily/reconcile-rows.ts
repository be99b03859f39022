import type { ReconciliationResultLike } from '../../tickets/ticket.js';

/** The reconciliation results that are not plain matches, breaches first, then not computable, then rounding, then any other status; the first `atMost` of them. */
export function needingALook<R extends ReconciliationResultLike>(results: readonly R[], atMost = Infinity): R[] {
  // One pass into a bucket per rank, in the results' order: what a stable sort by rank gives,
  // without a comparator called a million times on a large universe. A bucket needs no more
  // than `atMost` results, as the first `atMost` of all come from the first results of each.
  const buckets: R[][] = [[], [], [], []];
  for (const r of results) {
    const status = r.status;
    if (status === 'match') continue;
    const bucket = buckets[status === 'breach' ? 0 : status === 'not_computable' ? 1 : status === 'rounding' ? 2 : 3];
    if (bucket.length < atMost) bucket.push(r);
  }
  return buckets.flat().slice(0, atMost);
}
