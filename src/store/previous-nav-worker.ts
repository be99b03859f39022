/**
 * The worker thread that reads the previous day's NAVs (src/store/previous-nav.ts,
 * `previousNavInBackground`): `previousNav` as on the main thread, its answer or error posted back.
 */
import { workerData } from 'node:worker_threads';
import { postOutcomeOf } from '../threads/module-worker.js';
import { previousNav } from './previous-nav.js';

const { storeDir, feed, asOfExclusive } = workerData as { storeDir: string; feed: string; asOfExclusive: string };
postOutcomeOf(() => previousNav(storeDir, feed, asOfExclusive));
