import { MIN_ROWS_FOR_A_WORKER, onWorkerWhenLarge } from '../threads/module-worker.js';
import type { SnapshotRef } from './snapshot-catalog.js';
import type { SnapshotInput } from './snapshot-store.js';

/**
 * A snapshot written on a worker thread while this thread goes on with the day's figures.
 * Storing the standard universe's snapshot encodes and writes half a gigabyte of Arrow and waits
 * for the disk (about 2.5 s), while metrics and reconciliation use one core only; on its own
 * thread it takes the other. The tables reach the worker by structured clone: columns in shared
 * memory are shared, others copied once.
 */

export interface SnapshotJob {
  readonly storeDir: string;
  readonly input: SnapshotInput;
}

export interface BackgroundOptions {
  /** Fewer rows in all are written on this thread before the promise is returned (tests lower it). */
  readonly minRows?: number;
}

/**
 * `writeSnapshot` on a worker thread. Its errors are those of `writeSnapshot`, of the same
 * classes, when the promise is awaited. A small snapshot is written on this thread instead.
 */
export function writeSnapshotInBackground(storeDir: string, input: SnapshotInput, options: BackgroundOptions = {}): Promise<SnapshotRef> {
  const rows = input.results.reduce((sum, result) => sum + result.table.length, 0);
  const job: SnapshotJob = { storeDir, input };
  const worker = { callerUrl: import.meta.url, name: 'snapshot-worker', workerData: job, what: 'the snapshot writer' };
  return onWorkerWhenLarge(worker, rows, options.minRows ?? MIN_ROWS_FOR_A_WORKER, () => writeSnapshotHere(storeDir, input));
}

/**
 * `writeSnapshot` on this thread, its module loaded on first use. The writer brings the Arrow
 * library (about 0.2 s of CPU to load), which the daily job's main thread never needs when a
 * large snapshot is written on the worker: loaded at start, it delayed the reading of the feed.
 * Only a small feed, or the `ingest` command, writes here and pays for it, once.
 */
export async function writeSnapshotHere(storeDir: string, input: SnapshotInput): Promise<SnapshotRef> {
  const { writeSnapshot } = await import('./snapshot-store.js');
  return writeSnapshot(storeDir, input);
}
