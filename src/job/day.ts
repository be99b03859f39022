import { formatIsoDate } from '../calendar/days.js';
import { loadFeed, loadPreviousNav, type FeedPaths, type LoadedFeed, type LoadOptions } from '../ingest/feed.js';
import type { FeedProfile } from '../ingest/profile.js';
import { MetricCalculator, type MetricInputs } from '../metrics/compute.js';
import { adjustForCorporateActions } from '../series/adjust.js';
import { datedFrameOf, type DatedFrame } from '../series/frame.js';
import type { PreviousNav as StoredPreviousNav } from '../store/previous-nav.js';
import { previousNavHere, previousNavInBackground } from '../store/previous-nav-background.js';

/**
 * One day of a feed, loaded once and shared by every stage of the daily job. Each rule that
 * shapes the data lives here, once: the source hashes come from the very bytes parsed, the
 * previous snapshot is converted once, and NAVs are adjusted for corporate actions once.
 */
export interface Day {
  /** Epoch day the day is judged as of. */
  readonly asOf: number;
  /** The files as read, with `sources` (SHA-256 of the bytes parsed). */
  readonly feed: LoadedFeed;
  /** The previous snapshot's NAVs (dates and values), for restated and dropped rows; absent on a feed's first day. */
  readonly previous?: DatedFrame;
  /** Earlier stored snapshots that could not be read and were passed over in finding the previous one. */
  readonly skippedSnapshots: readonly SkippedSnapshot[];
  /** What risk figures are computed from (NAVs adjusted for corporate actions); absent without benchmarks and master. */
  readonly figures?: FigureSource;
}

/** The inputs of the risk figures, and one calculator over them that every stage shares. */
export interface FigureSource {
  readonly inputs: MetricInputs;
  readonly calculator: MetricCalculator;
}

/** Where the previous NAVs come from: a file, the store's latest earlier snapshot, or nowhere. */
export type PreviousSource =
  | { readonly kind: 'file'; readonly path: string; readonly profile?: FeedProfile }
  | { readonly kind: 'store'; readonly store: string; readonly feed: string }
  | { readonly kind: 'none' };

/** A store snapshot the day could not use (damaged manifest, missing file), as the answers report it. */
export interface SkippedSnapshot {
  readonly as_of: string;
  readonly reason: string;
}

export interface DayRequest {
  readonly paths: FeedPaths;
  readonly asOf: number;
  readonly load?: LoadOptions;
  readonly previous?: PreviousSource;
  /** An annual risk-free rate for every series (`--rf`), instead of the methodology's source. */
  readonly constantRate?: number;
}

/** The load stage: reads the files and shapes them once for every later stage. */
export async function loadDay(request: DayRequest): Promise<Day> {
  const source = request.previous ?? { kind: 'none' };
  // The store's previous NAVs are read on another thread while today's files are parsed here.
  const stored = source.kind === 'store' ? startReadingStoredPrevious(source, request.asOf) : null;
  const feed = await loadFeedBeside(stored, request);
  const { nav: previous, skipped } = stored ? reportSkipped(await stored) : await loadPrevious(source, request.asOf, request.load);
  return { asOf: request.asOf, feed, previous, skippedSnapshots: skipped, figures: figureSource(feed, request.constantRate) };
}

/**
 * The rule "risk figures use NAVs adjusted for corporate actions", in its one place: the
 * commands, the library and the demo's vendor file all take their figures' inputs from here.
 */
export function figureInputs(feed: Pick<LoadedFeed, 'nav' | 'actions' | 'benchmarks' | 'master' | 'rates'>, constantRate?: number): MetricInputs | undefined {
  if (!feed.benchmarks || !feed.master) return undefined;
  return {
    nav: adjustForCorporateActions(feed.nav, feed.actions ?? []),
    benchmarks: feed.benchmarks,
    master: feed.master,
    rates: feed.rates,
    constantRate,
  };
}

function figureSource(feed: LoadedFeed, constantRate: number | undefined): FigureSource | undefined {
  const inputs = figureInputs(feed, constantRate);
  return inputs && { inputs, calculator: new MetricCalculator(inputs) };
}

interface PreviousNav {
  readonly nav?: DatedFrame;
  readonly skipped: readonly SkippedSnapshot[];
}

/**
 * The previous NAVs. From the store, the latest earlier snapshot that reads: each damaged one
 * passed over is reported once on standard error and returned, so the answer says why the
 * comparison used an older day (or none).
 */
async function loadPrevious(source: PreviousSource, asOf: number, load: LoadOptions | undefined): Promise<PreviousNav> {
  switch (source.kind) {
    case 'none':
      return { skipped: [] };
    case 'file':
      // Compared by date and value only: the file's lines are let go.
      return { nav: datedFrameOf(await loadPreviousNav(source.path, source.profile, load?.limits)), skipped: [] };
    case 'store':
      return reportSkipped(await previousNavHere(source.store, source.feed, formatIsoDate(asOf)));
  }
}

/**
 * Only the NAV table of the previous snapshot is compared with, so only it is read: on a worker
 * thread for a large store (src/store/previous-nav.ts).
 */
function startReadingStoredPrevious(source: Extract<PreviousSource, { kind: 'store' }>, asOf: number): Promise<StoredPreviousNav> {
  const reading = previousNavInBackground(source.store, source.feed, formatIsoDate(asOf));
  reading.catch(() => {}); // awaited by loadDay once today's files are read
  return reading;
}

/** Today's files; when they fail, their error is told once the previous NAVs' reader has finished. */
async function loadFeedBeside(stored: Promise<unknown> | null, request: DayRequest): Promise<LoadedFeed> {
  try {
    return await loadFeed(request.paths, request.load);
  } catch (error) {
    await stored?.catch(() => {});
    throw error;
  }
}

/** Each damaged snapshot passed over is told once on standard error, and kept for the answer. */
function reportSkipped({ nav, skipped }: StoredPreviousNav): PreviousNav {
  for (const entry of skipped) process.stderr.write(`navassay: skipping the stored snapshot of ${entry.asOf}: ${entry.reason}\n`);
  return { nav, skipped: skipped.map((entry) => ({ as_of: entry.asOf, reason: entry.reason })) };
}
