/**
 * A worker thread of the parallel check runner (src/checks/parallel.ts): claims ranges of
 * series one after another until none is left, runs every series-level check over each,
 * reading the frames on shared memory, and posts the findings range by range. Its job comes as
 * the first message it receives, so a worker can be started ahead of the checks and have its
 * modules loaded by then (src/checks/check-workers.ts).
 */
import { parentPort } from 'node:worker_threads';
import { BusinessCalendars } from '../calendar/business-calendar.js';
import type { DatedFrame } from '../series/frame.js';
import type { DatedFrameData, WorkerAnswer, WorkerInput } from './parallel.js';
import { claimRange, seriesChecker } from './series-runner.js';
import { SettingsResolver } from './settings-resolver.js';

/** The frame of its data, the map from id to series rebuilt: a whole frame from FrameData, a dated one from DatedFrameData. */
const frame = <Data extends DatedFrameData>(data: Data): Data & Pick<DatedFrame, 'indexById'> => ({ ...data, indexById: new Map(data.ids.map((id, i) => [id, i])) });

function checkClaimedRanges(job: WorkerInput): WorkerAnswer {
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
  for (let range = claimRange(job.claims); range < job.ranges.length; range = claimRange(job.claims)) {
    answer.push([range, check(job.ranges[range][0], job.ranges[range][1])]);
  }
  return answer;
}

parentPort!.once('message', (job: WorkerInput) => parentPort!.postMessage(checkClaimedRanges(job)));
