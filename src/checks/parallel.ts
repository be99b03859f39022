/**
 * The check runner on worker threads: the frames go to shared memory once, the series are cut
 * into many consecutive ranges of about equal row counts, and each worker takes the next range
 * nobody has taken yet (a shared counter), runs every series-level check over it
 * (src/checks/check-worker.ts), and so on until none is left, while this thread runs the
 * feed-level checks. Taking ranges in turn keeps both cores busy to the end even when some
 * series cost far more than others. The findings are put back in range order and sorted
 * exactly as `runChecks` sorts them: same findings as `runChecks`, in the same order
 * (test/checks/parallel.test.ts).
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import type { Finding } from '../findings.js';
import type { CorporateActionRecord, SeriesMasterRecord } from '../ingest/records.js';
import type { SeriesFrame } from '../series/frame.js';
import type { CalendarDescription } from '../calendar/business-calendar.js';
import { compareFindings, latestDateUpTo, runChecks, runFeedChecks, type CheckInput } from './run.js';
import { parseCheckSettings, SettingsResolver, type CheckSettings } from './settings.js';

/** A frame as plain arrays on shared memory, which a worker receives without its `indexById` map. */
export interface FrameData {
  readonly ids: string[];
  readonly offsets: Int32Array;
  readonly dates: Int32Array;
  readonly values: Float64Array;
  readonly lines: Int32Array;
}

/** What every worker receives: the whole feed on shared memory, and the ranges to take in turn. */
export interface WorkerInput {
  readonly nav: FrameData;
  readonly benchmarks?: FrameData;
  readonly previous?: FrameData;
  readonly master: readonly SeriesMasterRecord[];
  readonly actions: readonly CorporateActionRecord[];
  readonly calendars: CalendarDescription;
  readonly asOf: number;
  readonly feedLatest: number | undefined;
  readonly settings: CheckSettings;
  /** Range r is series `ranges[2r]` to `ranges[2r + 1] − 1` of the NAV frame. */
  readonly ranges: Int32Array;
  /** `next[0]`: the next range to take (shared by every worker, taken with Atomics.add). */
  readonly next: Int32Array;
}

/** What a worker answers: the findings of each range it took, by range number. */
export type WorkerAnswer = Array<[range: number, findings: Finding[]]>;

/** Below this many NAV rows a worker's start-up costs more than it saves. */
const MIN_ROWS_FOR_WORKERS = 200_000;
/** More threads than this gain little: the feed-level checks and the final sort stay on one. */
const MAX_DEFAULT_THREADS = 8;
/**
 * Ranges per thread: enough that a range of costly series at the end does not leave one core
 * idle while the other finishes, few enough that taking one costs nothing measurable.
 */
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
  const small = input.nav.dates.length < (options.minRows ?? MIN_ROWS_FOR_WORKERS) || input.nav.ids.length < threads;
  if (threads <= 1 || small) return runChecks(input, parsed);
  const cuts = seriesRanges(input.nav, threads * RANGES_PER_THREAD);
  const job: WorkerInput = {
    nav: sharedFrame(input.nav),
    benchmarks: input.benchmarks && sharedFrame(input.benchmarks),
    previous: input.previous && sharedFrame(input.previous),
    master: input.master ?? [],
    actions: input.actions ?? [],
    calendars: input.calendars.describe(),
    asOf: input.asOf,
    feedLatest: latestDateUpTo(input.nav, input.asOf),
    settings: parsed,
    ranges: sharedCopy(Int32Array.from(cuts.flat())),
    next: new Int32Array(new SharedArrayBuffer(4)),
  };
  const pending = Array.from({ length: threads }, () => runWorker(job));
  // This thread runs the feed-level checks while the workers run the series-level ones.
  const feedFindings = runFeedChecks(input, new SettingsResolver(parsed));
  const byRange: Finding[][] = new Array(cuts.length);
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

/** The frame's arrays on shared memory: as they are when already shared, else copied there once for every worker. */
function sharedFrame(frame: SeriesFrame): FrameData {
  return { ids: [...frame.ids], offsets: sharedCopy(frame.offsets), dates: sharedCopy(frame.dates), values: sharedCopy(frame.values), lines: sharedCopy(frame.lines) };
}

function sharedCopy<T extends Int32Array | Float64Array>(array: T): T {
  if (array.buffer instanceof SharedArrayBuffer) return array;
  const Kind = array.constructor as new (buffer: SharedArrayBuffer) => T;
  const shared = new Kind(new SharedArrayBuffer(array.byteLength));
  shared.set(array);
  return shared;
}

/**
 * The worker's module: the compiled .js beside this file; under tsx and the tests, where this
 * file is TypeScript source, a small bootstrap that registers tsx's loader in the worker first
 * (a worker does not inherit the loader of the thread that starts it).
 */
function workerScript(): { script: string | URL; eval: boolean } {
  if (!import.meta.url.endsWith('.ts')) return { script: new URL('./check-worker.js', import.meta.url), eval: false };
  const source = new URL('./check-worker.ts', import.meta.url).href;
  return { script: `import('tsx/esm/api').then(({ register }) => { register(); return import(${JSON.stringify(source)}); });`, eval: true };
}

function runWorker(job: WorkerInput): Promise<WorkerAnswer> {
  const { script, eval: evaluate } = workerScript();
  return new Promise((resolve, reject) => {
    // Shared arrays reach the worker as views of the same memory: nothing is copied.
    const worker = new Worker(script, { eval: evaluate, workerData: job });
    let answered = false;
    worker.once('message', (answer: WorkerAnswer) => {
      answered = true;
      resolve(answer);
    });
    worker.once('error', reject);
    worker.once('exit', (code) => {
      if (!answered) reject(new Error(`a check worker stopped (exit code ${code}) before answering`));
    });
  });
}
