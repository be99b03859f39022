/**
 * The worker thread that reads the previous day's NAVs (src/store/previous-nav.ts,
 * `previousNavInBackground`): `previousNav` as on the main thread, its answer or error posted back.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { describeThrown } from '../threads/thrown.js';
import { previousNav, type PreviousNavOutcome } from './previous-nav.js';

const { storeDir, feed, asOfExclusive } = workerData as { storeDir: string; feed: string; asOfExclusive: string };
let outcome: PreviousNavOutcome;
try {
  outcome = { previous: previousNav(storeDir, feed, asOfExclusive) };
} catch (error) {
  outcome = { thrown: describeThrown(error) };
}
parentPort!.postMessage(outcome);
