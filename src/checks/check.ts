import type { BusinessCalendars } from '../calendar/business-calendar.js';
import type { Finding, Severity } from '../findings.js';
import type { CorporateActionRecord, SeriesMasterRecord } from '../ingest/records.js';
import type { DatedFrame, DatedSlice, SeriesFrame, SeriesSlice } from '../series/frame.js';
import type { MoveAnalysis } from './move-analysis.js';
import type { FrameTables } from './series-tables.js';

/**
 * A validation check: one file in `checks/`, pure, with its parameters and their defaults.
 * Series-level checks see one series at a time; feed-level checks see the whole feed
 * (row accounting, master against NAVs, today against the previous snapshot).
 */
export type CheckParams = Readonly<Record<string, number | string | boolean>>;

export interface SeriesContext {
  readonly asOf: number;
  readonly calendars: BusinessCalendars;
  /** The series' master record, when the master knows it. */
  readonly master: SeriesMasterRecord | undefined;
  /** The assigned benchmark's levels, when available. */
  readonly benchmark: SeriesSlice | undefined;
  /** Every benchmark in the feed, for checks that look for a better fit. */
  readonly benchmarks: SeriesFrame | undefined;
  /**
   * Lookup tables over `benchmarks` (day tables, day-to-day moves), made once per run by the
   * series runner and shared by every series; a check run on its own may go without.
   */
  readonly benchmarkTables?: FrameTables;
  /** Corporate actions of this series, ascending by ex-date. */
  readonly actions: readonly CorporateActionRecord[];
  /** This series in the previous snapshot, when one was given (dates and values: its lines are not kept). */
  readonly previous: DatedSlice | undefined;
  /**
   * The latest NAV date anywhere in the feed on or before the as-of (epoch day), when known:
   * what "up to date" means for this feed, whether it is checked the evening of the valuation
   * day or the next morning.
   */
  readonly feedLatest?: number;
  /**
   * The residual model of the series' moves and the steps other checks claim, built once per
   * series by the runner (`src/checks/move-analysis.ts`). A check called on its own without it
   * builds the bare model itself.
   */
  readonly moves?: MoveAnalysis;
}

export interface SeriesCheck<P extends CheckParams = CheckParams> {
  readonly id: string;
  readonly scope: 'series';
  readonly purpose: string;
  readonly defaults: P;
  /** True for checks that read the residual model of moves (`context.moves`). */
  readonly readsMoves?: boolean;
  run(series: SeriesSlice, context: SeriesContext, params: P): Finding[];
}

export interface FeedContext {
  readonly asOf: number;
  readonly calendars: BusinessCalendars;
  readonly nav: SeriesFrame;
  readonly benchmarks: SeriesFrame | undefined;
  readonly master: readonly SeriesMasterRecord[] | undefined;
  /** The previous snapshot's NAVs (dates and values: its lines are not kept). */
  readonly previous: DatedFrame | undefined;
  /** Rows that could not be read, from every input file. */
  readonly rejected: readonly import('../ingest/records.js').RejectedRow[];
  /** The vendor's risk figures, when a vendor file was given. */
  readonly vendor?: readonly import('../ingest/records.js').VendorFigureRecord[];
}

export interface FeedCheck<P extends CheckParams = CheckParams> {
  readonly id: string;
  readonly scope: 'feed';
  readonly purpose: string;
  readonly defaults: P;
  run(context: FeedContext, params: P): Finding[];
}

export type Check = SeriesCheck<any> | FeedCheck<any>;

export type { Finding, Severity };
