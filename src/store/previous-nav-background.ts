import { MIN_ROWS_FOR_A_WORKER, onWorkerWhenLarge } from '../threads/module-worker.js';
import type { PreviousNav } from './previous-nav.js';
import { latestEarlierThatLoads, scanSnapshots } from './snapshot-catalog.js';

/**
 * `previousNav` (src/store/previous-nav.ts) on a worker thread, so the previous day's table is
 * read, checked and framed while this thread parses today's files. The frame's columns come back
 * as the same shared memory; a small store is read here instead. It never throws: its errors
 * reject the promise.
 *
 * Only the store's catalog is read on this thread to choose, so this module does not load the
 * Arrow library that the reader brings.
 */
export function previousNavInBackground(storeDir: string, feed: string, asOfExclusive: string, minRows = MIN_ROWS_FOR_A_WORKER): Promise<PreviousNav> {
  let rows: number | null;
  try {
    rows = latestNavRows(storeDir, feed, asOfExclusive);
    if (rows === null) return Promise.resolve(nothingEarlier(storeDir, feed, asOfExclusive));
  } catch (error) {
    return Promise.reject(error);
  }
  const worker = { callerUrl: import.meta.url, name: 'previous-nav-worker', workerData: { storeDir, feed, asOfExclusive }, what: 'the reader of the previous snapshot' };
  return onWorkerWhenLarge(worker, rows, minRows, () => previousNavHere(storeDir, feed, asOfExclusive));
}

/**
 * `previousNav` on this thread, its module loaded on first use: the reader brings the Arrow
 * library (about 0.2 s of CPU to load), which the main thread of a large store's day never needs
 * (the worker reads it); loaded at start, it delayed the reading of today's feed.
 */
export async function previousNavHere(storeDir: string, feed: string, asOfExclusive: string): Promise<PreviousNav> {
  const { previousNav } = await import('./previous-nav.js');
  return previousNav(storeDir, feed, asOfExclusive);
}

/**
 * `previousNav`'s answer when the store holds no readable snapshot before the date (a feed's
 * first day): no table to read, only the damaged earlier snapshots to tell, so the reader is not
 * loaded at all.
 */
function nothingEarlier(storeDir: string, feed: string, asOfExclusive: string): PreviousNav {
  return { skipped: latestEarlierThatLoads(storeDir, feed, asOfExclusive, () => undefined).skipped };
}

/** The NAV rows of the latest earlier snapshot, as its manifest counts them; null when there is none. */
function latestNavRows(storeDir: string, feed: string, asOfExclusive: string): number | null {
  const latest = scanSnapshots(storeDir, feed).snapshots.filter((snapshot) => snapshot.asOf < asOfExclusive).at(-1);
  if (latest === undefined) return null;
  return latest.manifest.files.find((file) => file.kind === 'nav')?.rows.accepted ?? 0;
}
