import { answerOfSiblingWorker } from '../threads/module-worker.js';
import { rebuildThrown, type ThrownElsewhere } from '../threads/thrown.js';
import { writeSnapshot, type SnapshotInput, type SnapshotRef } from './snapshot-store.js';

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

export type SnapshotOutcome = { readonly ref: SnapshotRef } | { readonly thrown: ThrownElsewhere };

/** Below this many rows in all tables the worker's start-up costs more than the write. */
export const MIN_ROWS_FOR_BACKGROUND = 200_000;

export interface BackgroundOptions {
  /** Fewer rows in all are written on this thread before the promise is returned (tests lower it). */
  readonly minRows?: number;
}

/**
 * `writeSnapshot` on a worker thread. Its errors are those of `writeSnapshot`, of the same
 * classes, when the promise is awaited. A small snapshot is written on this thread at once.
 */
export function writeSnapshotInBackground(storeDir: string, input: SnapshotInput, options: BackgroundOptions = {}): Promise<SnapshotRef> {
  const rows = input.results.reduce((sum, result) => sum + result.table.length, 0);
  if (rows < (options.minRows ?? MIN_ROWS_FOR_BACKGROUND)) {
    try {
      return Promise.resolve(writeSnapshot(storeDir, input));
    } catch (error) {
      return Promise.reject(error);
    }
  }
  const job: SnapshotJob = { storeDir, input };
  return answerOfSiblingWorker<SnapshotOutcome>(import.meta.url, 'snapshot-worker', job, 'the snapshot writer').then((outcome) => {
    if ('ref' in outcome) return outcome.ref;
    throw rebuildThrown(outcome.thrown);
  });
}
