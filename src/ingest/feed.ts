import type { BusinessCalendars } from '../calendar/business-calendar.js';
import type { SeriesFrame } from '../series/frame.js';
import { toCalendars, toCorporateActions, toMasterRecords, toSeriesFrame, toVendorFigures } from './convert.js';
import { DEFAULT_READ_LIMITS, type ReadLimits } from './limits.js';
import { DEFAULT_PROFILE, type FeedProfile } from './profile.js';
import { releaseArrowDecoder } from './arrow-watchdog.js';
import { readFeedFile, readSourceFile, type SourceRead } from './read.js';
import type {
  CorporateActionRecord,
  RejectedRow,
  RowAccounting,
  SeriesMasterRecord,
  VendorFigureRecord,
} from './records.js';
import type { FileKind } from './schema.js';
import type { IngestResult } from './table.js';

/** The paths of one day's feed; only the NAV file is always needed. */
export type FeedPaths = { readonly nav: string } & Partial<Readonly<Record<Exclude<FileKind, 'nav'>, string>>>;

export type FeedProfiles = Partial<Readonly<Record<FileKind, FeedProfile>>>;

/** One day's feed, read and shaped for the checks and the metrics. */
export interface LoadedFeed {
  readonly nav: SeriesFrame;
  readonly benchmarks?: SeriesFrame;
  readonly rates?: SeriesFrame;
  readonly master?: SeriesMasterRecord[];
  readonly actions?: CorporateActionRecord[];
  readonly vendor?: VendorFigureRecord[];
  readonly calendars: BusinessCalendars;
  /** Every file read, in the order of FILE_KINDS, with its own accounting. */
  readonly results: readonly IngestResult[];
  /** The SHA-256 of each file's bytes as parsed, in the order of `results`. */
  readonly sources: readonly FeedSource[];
  readonly rows: RowAccounting;
  readonly rejected: readonly RejectedRow[];
}

export interface FeedSource {
  readonly kind: FileKind;
  readonly path: string;
  readonly sha256: string;
}

export interface LoadOptions {
  readonly profiles?: FeedProfiles;
  /** ISO weekdays (1 = Monday … 7 = Sunday) that are never business days; Saturday and Sunday by default. */
  readonly weekendDays?: readonly number[];
  /** Field, header and file sizes, and the plausible date range (default: limits.ts, as of today). */
  readonly limits?: ReadLimits;
}

export async function loadFeed(paths: FeedPaths, options: LoadOptions = {}): Promise<LoadedFeed> {
  const read = async (kind: FileKind) => {
    const path = paths[kind];
    return path === undefined ? undefined : readSourceFile(path, kind, options.profiles?.[kind] ?? DEFAULT_PROFILE, options.limits ?? DEFAULT_READ_LIMITS);
  };
  const navRead = (await read('nav'))!;
  const reads = [navRead, ...(await Promise.all((['benchmarks', 'master', 'rates', 'holidays', 'actions', 'vendor'] as const).map(read)))];
  await releaseArrowDecoder();
  const [nav, benchmarks, master, rates, holidays, actions, vendor] = reads.map((one) => one?.result);
  const results = reads.filter((one): one is SourceRead => !!one).map((one) => one.result);
  const sources = reads.filter((one): one is SourceRead => !!one).map((one) => ({ kind: one.result.kind, path: one.result.file, sha256: one.sha256 }));
  return {
    nav: toSeriesFrame(nav!.table, 'nav'),
    benchmarks: benchmarks && toSeriesFrame(benchmarks.table, 'benchmarks'),
    rates: rates && toSeriesFrame(rates.table, 'rates'),
    master: master && toMasterRecords(master.table),
    actions: actions && toCorporateActions(actions.table),
    vendor: vendor && toVendorFigures(vendor.table),
    calendars: toCalendars(holidays?.table, options.weekendDays),
    results,
    sources,
    rows: totalRows(results),
    rejected: results.flatMap((result) => result.rejected),
  };
}

export function totalRows(results: readonly IngestResult[]): RowAccounting {
  const rows = { read: 0, accepted: 0, rejected: 0 };
  for (const result of results) {
    rows.read += result.rows.read;
    rows.accepted += result.rows.accepted;
    rows.rejected += result.rows.rejected;
  }
  return rows;
}

/** Reads the NAV file of an earlier snapshot, for restatement checks. */
export async function loadPreviousNav(
  path: string,
  profile: FeedProfile = DEFAULT_PROFILE,
  limits: ReadLimits = DEFAULT_READ_LIMITS,
): Promise<SeriesFrame> {
  return toSeriesFrame((await readFeedFile(path, 'nav', profile, limits)).table, 'nav');
}
