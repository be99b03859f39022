/**
 * The check runner on several threads: this thread and `threads − 1` worker threads. The series
 * are cut into many consecutive ranges of about equal row counts, and every thread claims the
 * next unclaimed range from one counter on shared memory until none is left, so a thread that
 * had other work first (this one runs the feed-level checks, and the daily job computes the risk
 * figures here while the workers check) or drew costlier series simply takes fewer ranges, and
 * all threads finish within about one range of each other. Every worker receives the whole frame
 * on shared memory (the readers build frames on SharedArrayBuffers, src/ingest/shared-columns.ts,
 * so the rows are neither copied nor moved; a frame made of ordinary arrays is copied once onto
 * shared memory for all the workers), runs every series-level check over each range it claims
 * (src/checks/check-worker.ts) and answers the findings of each range. This thread takes its
 * ranges one per turn of its event loop, whenever it is otherwise idle. The findings are put back
 * in range order and sorted exactly as `runChecks` sorts them: same findings as `runChecks`, in
 * the same order, whichever thread checked which range (test/checks/parallel.test.ts).
 */
import { availableParallelism } from 'node:os';
import type { Worker } from 'node:worker_threads';
import { answerOfWorker, MIN_ROWS_FOR_A_WORKER } from '../threads/module-worker.js';
import type { Finding } from '../findings.js';
import type { CorporateActionRecord, SeriesMasterRecord } from '../ingest/records.js';
import { sharedFrame, type DatedFrame, type SeriesFrame } from '../series/frame.js';
import type { CalendarDescription } from '../calendar/business-calendar.js';
import { compareFindings, latestDateUpTo, runChecks, runFeedChecks, seriesChecker, type CheckInput } from './run.js';
import { CheckWorkers } from './check-workers.js';
import { claimRange } from './series-runner.js';
import { parseCheckSettings, SettingsResolver, type CheckSettings } from './settings.js';

/** A dated frame on shared memory, which a worker receives without its `indexById` map. */
export interface DatedFrameData {
  readonly ids: readonly string[];
  readonly offsets: Int32Array;
  readonly dates: Int32Array;
  readonly values: Float64Array;
}

/** A frame on shared memory, which a worker receives without its `indexById` map. */
export interface FrameData extends DatedFrameData {
  readonly lines: Int32Array;
}

/** What one worker needs to check the ranges of series it claims. */
export interface WorkerInput {
  /** The whole feed; the worker checks only the series of the ranges it claims. */
  readonly nav: FrameData;
  readonly benchmarks?: FrameData;
  readonly previous?: DatedFrameData;
  readonly master: SeriesMasterRecord[];
  readonly actions: CorporateActionRecord[];
  readonly calendars: CalendarDescription;
  readonly asOf: number;
  readonly feedLatest: number | undefined;
  readonly settings: CheckSettings;
  /** Every range: range `r` is the series `ranges[r][0]` to `ranges[r][1] − 1` of `nav`. */
  readonly ranges: Array<[first: number, end: number]>;
  /** The number of the next range to claim, shared by every thread (see `claimRange`). */
  readonly claims: Int32Array;
}

/** What a worker answers: the findings of each of its ranges, by range number. */
export type WorkerAnswer = Array<[range: number, findings: Finding[]]>;

/** More threads than this gain little: the feed-level checks and the final sort stay on one. */
const MAX_DEFAULT_THREADS = 8;
/**
 * Ranges per thread: enough that the threads finish close together (the last range claimed is
 * the most any thread can run on alone), few enough that a range's own cost stays negligible.
 */
const RANGES_PER_THREAD = 32;

export interface ParallelOptions {
  /** Threads, this one included (so `threads − 1` workers); 1 runs the plain path on this thread. Default: `defaultThreads()`. */
  readonly threads?: number;
  /** Feeds with fewer NAV rows take the plain path (tests lower it to exercise the workers). */
  readonly minRows?: number;
  /** Workers started ahead (src/checks/check-workers.ts), taken before any fresh one is started; the caller releases those left. */
  readonly workers?: CheckWorkers;
}

/** One thread per available core, at most MAX_DEFAULT_THREADS. */
export function defaultThreads(): number {
  return Math.max(1, Math.min(MAX_DEFAULT_THREADS, availableParallelism()));
}

/**
 * `runChecks` on `threads` threads, this one and `threads − 1` workers. One thread (or a small feed) takes the plain path
 * on this thread. Settings are validated here first, so a bad key fails before any worker starts.
 */
export async function runChecksInParallel(input: CheckInput, settings: CheckSettings = {}, options: ParallelOptions = {}): Promise<Finding[]> {
  const parsed = parseCheckSettings(settings);
  const threads = options.threads ?? defaultThreads();
  const small = input.nav.dates.length < (options.minRows ?? MIN_ROWS_FOR_A_WORKER) || input.nav.ids.length < threads;
  if (threads <= 1 || small) return runChecks(input, parsed);
  const feedLatest = latestDateUpTo(input.nav, input.asOf);
  const ranges = seriesRanges(input.nav, threads * RANGES_PER_THREAD);
  const claims = new Int32Array(new SharedArrayBuffer(Int32Array.BYTES_PER_ELEMENT));
  const job: WorkerInput = {
    nav: frameData(sharedFrame(input.nav)),
    benchmarks: input.benchmarks && frameData(sharedFrame(input.benchmarks)),
    previous: input.previous && datedFrameData(sharedFrame(input.previous)),
    master: [...(input.master ?? [])],
    actions: [...(input.actions ?? [])],
    calendars: input.calendars.describe(),
    asOf: input.asOf,
    feedLatest,
    settings: parsed,
    ranges,
    claims,
  };
  // This thread is one of the `threads`: it starts the others, then runs the feed-level checks
  // while they start and check, then claims ranges too whenever it is idle.
  const workers = (options.workers ?? new CheckWorkers(0)).take(threads - 1).map((worker) => runWorker(worker, job));
  const resolver = new SettingsResolver(parsed);
  const feedFindings = runFeedChecks(input, resolver);
  const own = checkRangesWhenIdle(seriesChecker(input, resolver, feedLatest), ranges, claims);
  const byRange: Finding[][] = new Array(ranges.length);
  for (const answer of await Promise.all([own, ...workers])) for (const [range, findings] of answer) byRange[range] = findings;
  // Range order is series order, as on one thread, so equal findings keep their order in the sort.
  const findings = byRange.flat();
  findings.push(...feedFindings);
  return findings.sort(compareFindings);
}

/**
 * The ranges this thread claims, one per turn of its event loop (so the work its caller does
 * beside the checks, and the workers' answers, are never held up by more than one range), until
 * every range is claimed.
 */
function checkRangesWhenIdle(check: (first: number, end: number) => Finding[], ranges: ReadonlyArray<[number, number]>, claims: Int32Array): Promise<WorkerAnswer> {
  return new Promise((resolve, reject) => {
    const answer: WorkerAnswer = [];
    const checkNext = (): void => {
      try {
        const range = claimRange(claims);
        if (range >= ranges.length) return resolve(answer);
        answer.push([range, check(ranges[range][0], ranges[range][1])]);
        setImmediate(checkNext);
      } catch (error) {
        reject(error);
      }
    };
    setImmediate(checkNext);
  });
}

/** `threads` consecutive ranges [first, end) of series with about equal row counts. */
export function seriesRanges(frame: SeriesFrame, threads: number): Array<[number, number]> {
  const ranges: Array<[number, number]> = [];
  const rows = frame.dates.length;
  let first = 0;
  for (let t = 1; t <= threads && first < frame.ids.length; t++) {
    let end = first + 1;
    const target = (rows * t) / threads;
    while (end < frame.ids.length && frame.offsets[end] < target) end++;
    if (t === threads) end = frame.ids.length;
    ranges.push([first, end]);
    first = end;
  }
  return ranges;
}

/** The frame's arrays without its map, which the worker rebuilds from the ids. */
function frameData(frame: SeriesFrame): FrameData {
  return { ...datedFrameData(frame), lines: frame.lines };
}

function datedFrameData(frame: DatedFrame): DatedFrameData {
  const { ids, offsets, dates, values } = frame;
  return { ids, offsets, dates, values };
}

function runWorker(worker: Worker, job: WorkerInput): Promise<WorkerAnswer> {
  const answer = answerOfWorker<WorkerAnswer>(worker, 'a check worker');
  // The frames' arrays are on shared memory: the worker sees the same rows, nothing is copied.
  worker.postMessage(job);
  return answer;
}
