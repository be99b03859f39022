/**
 * The check runner on worker threads: the series are cut into many consecutive ranges of about
 * equal row counts, dealt to the workers in turn (range r to worker r mod threads), so a
 * stretch of costly series is shared by every worker instead of holding one of them up at the
 * end. Each worker receives a copy of its ranges' rows, moved (not copied again) into it and
 * freed with it, runs every series-level check over each range (src/checks/check-worker.ts)
 * while this thread runs the feed-level checks, and answers the findings of each range. The
 * findings are put back in range order and sorted exactly as `runChecks` sorts them: same
 * findings as `runChecks`, in the same order (test/checks/parallel.test.ts).
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import type { Finding } from '../findings.js';
import type { CorporateActionRecord, SeriesMasterRecord } from '../ingest/records.js';
import type { SeriesFrame } from '../series/frame.js';
import type { CalendarDescription } from '../calendar/business-calendar.js';
import { compareFindings, latestDateUpTo, runChecks, runFeedChecks, type CheckInput } from './run.js';
import { parseCheckSettings, SettingsResolver, type CheckSettings } from './settings.js';

/** A frame as plain arrays, which a worker receives without its `indexById` map. */
export interface FrameData {
  readonly ids: string[];
  readonly offsets: Int32Array;
  readonly dates: Int32Array;
  readonly values: Float64Array;
  readonly lines: Int32Array;
}

/** What one worker needs for the ranges of series dealt to it. */
export interface WorkerInput {
  /** The worker's series, range after range. */
  readonly nav: FrameData;
  readonly benchmarks?: FrameData;
  readonly previous?: FrameData;
  readonly master: SeriesMasterRecord[];
  readonly actions: CorporateActionRecord[];
  readonly calendars: CalendarDescription;
  readonly asOf: number;
  readonly feedLatest: number | undefined;
  readonly settings: CheckSettings;
  /** The worker's ranges: range `numbers[j]` is its series `cuts[j]` to `cuts[j + 1] − 1`. */
  readonly numbers: number[];
  readonly cuts: number[];
}

/** What a worker answers: the findings of each of its ranges, by range number. */
export type WorkerAnswer = Array<[range: number, findings: Finding[]]>;

/** Below this many NAV rows a worker's start-up costs more than it saves. */
const MIN_ROWS_FOR_WORKERS = 200_000;
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
  const small = input.nav.dates.length < (options.minRows ?? MIN_ROWS_FOR_WORKERS) || input.nav.ids.length < threads;
  if (threads <= 1 || small) return runChecks(input, parsed);
  const feedLatest = latestDateUpTo(input.nav, input.asOf);
  const calendars = input.calendars.describe();
  const benchmarks = input.benchmarks && framePart(input.benchmarks, indicesFrom(0, input.benchmarks.ids.length));
  const ranges = seriesRanges(input.nav, threads * RANGES_PER_THREAD);
  const pending = Array.from({ length: threads }, (_, worker) => {
    const numbers = ranges.map((_, r) => r).filter((r) => r % threads === worker);
    const mine = numbers.map((r) => ranges[r]);
    const cuts = [0];
    for (const [first, end] of mine) cuts.push(cuts[cuts.length - 1] + end - first);
    const nav = framePart(input.nav, mine.flatMap(([first, end]) => indicesFrom(first, end)));
    const ids = new Set(nav.ids);
    const job: WorkerInput = {
      nav,
      benchmarks,
      previous: input.previous && previousPart(input.previous, ids),
      master: (input.master ?? []).filter((record) => ids.has(record.series_id)),
      actions: (input.actions ?? []).filter((action) => ids.has(action.series_id)),
      calendars,
      asOf: input.asOf,
      feedLatest,
      settings: parsed,
      numbers,
      cuts,
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

/** first, first + 1, …, end − 1. */
function indicesFrom(first: number, end: number): number[] {
  return Array.from({ length: end - first }, (_, k) => first + k);
}

/** The series of `frame` whose ids are in `ids`, in the frame's order. */
function previousPart(frame: SeriesFrame, ids: ReadonlySet<string>): FrameData {
  const kept: number[] = [];
  for (let i = 0; i < frame.ids.length; i++) if (ids.has(frame.ids[i])) kept.push(i);
  return framePart(frame, kept);
}

/** The series `chosen` (frame indices) of a frame, in that order, copied into fresh arrays the worker can take over. */
function framePart(frame: SeriesFrame, chosen: readonly number[]): FrameData {
  let rows = 0;
  for (const i of chosen) rows += frame.offsets[i + 1] - frame.offsets[i];
  const offsets = new Int32Array(chosen.length + 1);
  const dates = new Int32Array(rows);
  const values = new Float64Array(rows);
  const lines = new Int32Array(rows);
  chosen.forEach((i, k) => {
    const start = frame.offsets[i];
    const stop = frame.offsets[i + 1];
    dates.set(frame.dates.subarray(start, stop), offsets[k]);
    values.set(frame.values.subarray(start, stop), offsets[k]);
    lines.set(frame.lines.subarray(start, stop), offsets[k]);
    offsets[k + 1] = offsets[k] + stop - start;
  });
  return { ids: chosen.map((i) => frame.ids[i]), offsets, dates, values, lines };
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
  // The worker's rows were copied for it alone, so they move instead of being copied again.
  const frames = job.previous ? [job.nav, job.previous] : [job.nav];
  const transfer = frames.flatMap((f) => [f.offsets.buffer, f.dates.buffer, f.values.buffer, f.lines.buffer] as ArrayBuffer[]);
  return new Promise((resolve, reject) => {
    const worker = new Worker(script, { eval: evaluate, workerData: job, transferList: transfer });
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
