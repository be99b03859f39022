/**
 * A worker thread of the parallel check runner (src/checks/parallel.ts): runs every
 * series-level check over each range of series dealt to it, reading the frames on shared
 * memory, and posts the findings range by range.
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
const answer: WorkerAnswer = job.numbers.map((range, j) => [range, check(job.ranges[j][0], job.ranges[j][1])]);
parentPort!.postMessage(answer);
