/**
 * The check runner on worker threads: the series are cut into many consecutive ranges of about
 * equal row counts, dealt to the workers in turn (range r to worker r mod threads), so a
 * stretch of costly series is shared by every worker instead of holding one of them up at the
 * end. Every worker receives the whole frame on shared memory (the readers build frames on
 * SharedArrayBuffers, src/ingest/shared-columns.ts, so the rows are neither copied nor moved;
 * a frame made of ordinary arrays is copied once onto shared memory for all the workers) and
 * the list of its ranges, runs every series-level check over each range
 * (src/checks/check-worker.ts) while this thread runs the feed-level checks, and answers the
 * findings of each range. The findings are put back in range order and sorted exactly as
 * `runChecks` sorts them: same findings as `runChecks`, in the same order
 * (test/checks/parallel.test.ts).
 */
import { availableParallelism } from 'node:os';
import { answerOfSiblingWorker, MIN_ROWS_FOR_A_WORKER } from '../threads/module-worker.js';
import type { Finding } from '../findings.js';
import type { CorporateActionRecord, SeriesMasterRecord } from '../ingest/records.js';
import { sharedFrame, type SeriesFrame } from '../series/frame.js';
import type { CalendarDescription } from '../calendar/business-calendar.js';
import { compareFindings, latestDateUpTo, runChecks, runFeedChecks, type CheckInput } from './run.js';
import { parseCheckSettings, SettingsResolver, type CheckSettings } from './settings.js';

/** A frame on shared memory, which a worker receives without its `indexById` map. */
export interface FrameData {
  readonly ids: readonly string[];
  readonly offsets: Int32Array;
  readonly dates: Int32Array;
  readonly values: Float64Array;
  readonly lines: Int32Array;
}

/** What one worker needs for the ranges of series dealt to it. */
export interface WorkerInput {
  /** The whole feed; the worker checks only the series of its ranges. */
  readonly nav: FrameData;
  readonly benchmarks?: FrameData;
  readonly previous?: FrameData;
  readonly master: SeriesMasterRecord[];
  readonly actions: CorporateActionRecord[];
  readonly calendars: CalendarDescription;
  readonly asOf: number;
  readonly feedLatest: number | undefined;
  readonly settings: CheckSettings;
  /** The worker's ranges: range `numbers[j]` is the series `ranges[j][0]` to `ranges[j][1] − 1` of `nav`. */
  readonly numbers: number[];
  readonly ranges: Array<[first: number, end: number]>;
}

/** What a worker answers: the findings of each of its ranges, by range number. */
export type WorkerAnswer = Array<[range: number, findings: Finding[]]>;

/** More threads than this gain little: the feed-level checks and the final sort stay on one. */
const MAX_DEFAULT_THREADS = 8;
/** Ranges per thread: enough that costly stretches of series are shared out evenly. */
const RANGES_PER_THREAD = 16;

export interface ParallelOptions {
  /** Worker threads; 1 runs the plain path on this thread. Default: `defaultThreads()`. */
  readonly threads?: number;
  /** Feeds with fewer NAV rows take the plain path (tests lower it to exercise the workers). */
  readonly minRows?: number;
}

/** One worker per available core, at most MAX_DEFAULT_THREADS. */
export function defaultThreads(): number {
  return Math.max(1, Math.min(MAX_DEFAULT_THREADS, availableParallelism()));
}

/**
 * `runChecks` on `threads` worker threads. One thread (or a small feed) takes the plain path
 * on this thread. Settings are validated here first, so a bad key fails before any worker starts.
 */
export async function runChecksInParallel(input: CheckInput, settings: CheckSettings = {}, options: ParallelOptions = {}): Promise<Finding[]> {
  const parsed = parseCheckSettings(settings);
  const threads = options.threads ?? defaultThreads();
  const small = input.nav.dates.length < (options.minRows ?? MIN_ROWS_FOR_A_WORKER) || input.nav.ids.length < threads;
  if (threads <= 1 || small) return runChecks(input, parsed);
  const feedLatest = latestDateUpTo(input.nav, input.asOf);
  const calendars = input.calendars.describe();
  const nav = frameData(sharedFrame(input.nav));
  const benchmarks = input.benchmarks && frameData(sharedFrame(input.benchmarks));
  const previous = input.previous && frameData(sharedFrame(input.previous));
  const ranges = seriesRanges(input.nav, threads * RANGES_PER_THREAD);
  const pending = Array.from({ length: threads }, (_, worker) => {
    const numbers = ranges.map((_, r) => r).filter((r) => r % threads === worker);
    const mine = numbers.map((r) => ranges[r]);
    const ids = new Set(mine.flatMap(([first, end]) => input.nav.ids.slice(first, end)));
    const job: WorkerInput = {
      nav,
      benchmarks,
      previous,
      master: (input.master ?? []).filter((record) => ids.has(record.series_id)),
      actions: (input.actions ?? []).filter((action) => ids.has(action.series_id)),
      calendars,
      asOf: input.asOf,
      feedLatest,
      settings: parsed,
      numbers,
      ranges: mine,
    };
    return runWorker(job);
  });
  // This thread runs the feed-level checks while the workers run the series-level ones.
  const feedFindings = runFeedChecks(input, new SettingsResolver(parsed));
  const byRange: Finding[][] = new Array(ranges.length);
  for (const answer of await Promise.all(pending)) for (const [range, findings] of answer) byRange[range] = findings;
  // Range order is series order, as on one thread, so equal findings keep their order in the sort.
  const findings = byRange.flat();
  findings.push(...feedFindings);
  return findings.sort(compareFindings);
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
  const { ids, offsets, dates, values, lines } = frame;
  return { ids, offsets, dates, values, lines };
}

function runWorker(job: WorkerInput): Promise<WorkerAnswer> {
  // The frames' arrays are on shared memory: the worker sees the same rows, nothing is copied.
  return answerOfSiblingWorker(import.meta.url, 'check-worker', job, 'a check worker');
}
