/**
 * The check runner on worker threads: the series are cut into disjoint ranges of about equal
 * row counts, each worker runs every series-level check over its range (src/checks/check-worker.ts)
 * while this thread runs the feed-level checks, and the findings are sorted exactly as
 * `runChecks` sorts them. Same findings as `runChecks`, in the same order (test/checks/parallel.test.ts).
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

/** What one worker needs for its range of series. */
export interface WorkerInput {
  readonly nav: FrameData;
  readonly benchmarks?: FrameData;
  readonly previous?: FrameData;
  readonly master: SeriesMasterRecord[];
  readonly actions: CorporateActionRecord[];
  readonly calendars: CalendarDescription;
  readonly asOf: number;
  readonly feedLatest: number | undefined;
  readonly settings: CheckSettings;
}

/** Below this many NAV rows a worker's start-up costs more than it saves. */
const MIN_ROWS_FOR_WORKERS = 200_000;
/** More threads than this gain little: the feed-level checks and the final sort stay on one. */
const MAX_DEFAULT_THREADS = 8;

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
  const benchmarks = input.benchmarks && frameData(input.benchmarks, 0, input.benchmarks.ids.length);
  const pending = seriesRanges(input.nav, threads).map(([first, end]) => {
    const ids = new Set(input.nav.ids.slice(first, end));
    const job: WorkerInput = {
      nav: frameData(input.nav, first, end),
      benchmarks,
      previous: input.previous && framePart(input.previous, ids),
      master: (input.master ?? []).filter((record) => ids.has(record.series_id)),
      actions: (input.actions ?? []).filter((action) => ids.has(action.series_id)),
      calendars,
      asOf: input.asOf,
      feedLatest,
      settings: parsed,
    };
    return runWorker(job);
  });
  // This thread runs the feed-level checks while the workers run the series-level ones.
  const feedFindings = runFeedChecks(input, new SettingsResolver(parsed));
  const findings = (await Promise.all(pending)).flat();
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

/** Series `first` to `end − 1` of a frame, copied into fresh arrays the worker can take over. */
function frameData(frame: SeriesFrame, first: number, end: number): FrameData {
  const start = frame.offsets[first];
  const stop = frame.offsets[end];
  const offsets = frame.offsets.slice(first, end + 1);
  for (let i = 0; i < offsets.length; i++) offsets[i] -= start;
  return {
    ids: frame.ids.slice(first, end),
    offsets,
    dates: frame.dates.slice(start, stop),
    values: frame.values.slice(start, stop),
    lines: frame.lines.slice(start, stop),
  };
}

/** The series of `frame` whose ids are in `ids`, in the frame's order. */
function framePart(frame: SeriesFrame, ids: ReadonlySet<string>): FrameData {
  const kept: number[] = [];
  let rows = 0;
  for (let i = 0; i < frame.ids.length; i++) {
    if (!ids.has(frame.ids[i])) continue;
    kept.push(i);
    rows += frame.offsets[i + 1] - frame.offsets[i];
  }
  const offsets = new Int32Array(kept.length + 1);
  const dates = new Int32Array(rows);
  const values = new Float64Array(rows);
  const lines = new Int32Array(rows);
  kept.forEach((i, k) => {
    const start = frame.offsets[i];
    const stop = frame.offsets[i + 1];
    dates.set(frame.dates.subarray(start, stop), offsets[k]);
    values.set(frame.values.subarray(start, stop), offsets[k]);
    lines.set(frame.lines.subarray(start, stop), offsets[k]);
    offsets[k + 1] = offsets[k] + stop - start;
  });
  return { ids: kept.map((i) => frame.ids[i]), offsets, dates, values, lines };
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

function runWorker(job: WorkerInput): Promise<Finding[]> {
  const { script, eval: evaluate } = workerScript();
  // The range's arrays were copied for this worker alone, so they move instead of being copied again.
  const frames = job.previous ? [job.nav, job.previous] : [job.nav];
  const transfer = frames.flatMap((f) => [f.offsets.buffer, f.dates.buffer, f.values.buffer, f.lines.buffer] as ArrayBuffer[]);
  return new Promise((resolve, reject) => {
    const worker = new Worker(script, { eval: evaluate, workerData: job, transferList: transfer });
    let answered = false;
    worker.once('message', (findings: Finding[]) => {
      answered = true;
      resolve(findings);
    });
    worker.once('error', reject);
    worker.once('exit', (code) => {
      if (!answered) reject(new Error(`a check worker stopped (exit code ${code}) before answering`));
    });
  });
}
