/**
 * The worker thread that stores one snapshot (src/store/background-write.ts): `writeSnapshot`
 * as on the main thread, its answer or its error posted back.
 */
import { workerData } from 'node:worker_threads';
import { postOutcomeOf } from '../threads/module-worker.js';
import type { SnapshotJob } from './background-write.js';
import { writeSnapshot } from './snapshot-store.js';

const job = workerData as SnapshotJob;
postOutcomeOf(() => writeSnapshot(job.storeDir, job.input));
