/**
 * The worker thread that stores one snapshot (src/store/background-write.ts): `writeSnapshot`
 * as on the main thread, its answer or its error posted back.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { describeThrown } from '../threads/thrown.js';
import type { SnapshotJob, SnapshotOutcome } from './background-write.js';
import { writeSnapshot } from './snapshot-store.js';

const job = workerData as SnapshotJob;
let outcome: SnapshotOutcome;
try {
  outcome = { ref: writeSnapshot(job.storeDir, job.input) };
} catch (error) {
  outcome = { thrown: describeThrown(error) };
}
parentPort!.postMessage(outcome);
