/**
 * A worker thread of the parallel check runner (src/checks/parallel.ts): runs every series-level
 * check over the range of series it was given and posts the findings back.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { BusinessCalendars } from '../calendar/business-calendar.js';
import type { SeriesFrame } from '../series/frame.js';
import type { FrameData, WorkerInput } from './parallel.js';
import { runSeriesChecks } from './run.js';
import { parseCheckSettings, SettingsResolver } from './settings.js';

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
const resolver = new SettingsResolver(parseCheckSettings(job.settings));
parentPort!.postMessage(runSeriesChecks(input, resolver, 0, input.nav.ids.length, job.feedLatest));
