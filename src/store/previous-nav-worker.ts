/**
 * The worker thread that reads the previous day's NAVs (`previousNavInBackground`, in
 * src/store/previous-nav-background.ts): `previousNav` as on the main thread, its answer or
 * error posted back.
 */
import { workerData } from 'node:worker_threads';
import { postOutcomeOf } from '../threads/module-worker.js';
import { previousNav } from './previous-nav.js';

const { storeDir, feed, asOfExclusive } = workerData as { storeDir: string; feed: string; asOfExclusive: string };
postOutcomeOf(() => previousNav(storeDir, feed, asOfExclusive));
