/**
 * A worker thread of the parallel check runner (src/checks/parallel.ts): takes the next range
 * of series nobody has taken (a counter shared by every worker), runs every series-level check
 * over it, and so on until none is left; then posts the findings of each range it took.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { BusinessCalendars } from '../calendar/business-calendar.js';
import type { SeriesFrame } from '../series/frame.js';
import type { FrameData, WorkerAnswer, WorkerInput } from './parallel.js';
import { seriesChecker } from './series-runner.js';
import { SettingsResolver } from './settings-resolver.js';

const job = workerData as WorkerInput;
const frame = (data: FrameData): SeriesFrame => ({ ...data, indexById: new Map(data.ids.map((id, i) => [id, i])) });
const input = {
  nav: frame(job.nav),
  benchmarks: job.benchmarks && frame(job.benchmarks),
  previous: job.previous && frame(job.previous),
  master: job.master,
  actions: job.actions,
  rejected: [],
  calendars: BusinessCalendars.from(job.calendars),
  asOf: job.asOf,
};
// The settings were validated on the main thread; the worker only resolves them.
const check = seriesChecker(input, new SettingsResolver(job.settings), job.feedLatest);
const answer: WorkerAnswer = [];
const ranges = job.ranges.length / 2;
for (let range = Atomics.add(job.next, 0, 1); range < ranges; range = Atomics.add(job.next, 0, 1)) {
  answer.push([range, check(job.ranges[2 * range], job.ranges[2 * range + 1])]);
}
parentPort!.postMessage(answer);
