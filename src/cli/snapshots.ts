import { formatIsoDate } from '../calendar/days.js';
import type { RunConfig } from '../config/run-config.js';
import { toSeriesFrame } from '../ingest/convert.js';
import type { LoadedFeed } from '../ingest/feed.js';
import type { SeriesFrame } from '../series/frame.js';
import { previousReadableSnapshot, sha256File, writeSnapshot, type SnapshotRef } from '../store/index.js';

/** A store snapshot the run could not use, as the check answer reports it. */
export interface SkippedSnapshot {
  readonly as_of: string;
  readonly reason: string;
}

/**
 * The run's bridge to the snapshot store: find the last earlier NAVs that read, keep today's.
 * Each earlier snapshot that cannot be read is reported once on standard error and returned, so
 * the answer says why the comparison used an older day (or none).
 */
export function previousNavFromStore(config: RunConfig, asOf: number): { nav: SeriesFrame | undefined; skipped: SkippedSnapshot[] } {
  const { snapshot, skipped } = previousReadableSnapshot(config.store, config.feed, formatIsoDate(asOf));
  for (const entry of skipped) process.stderr.write(`navassay: skipping the stored snapshot of ${entry.asOf}: ${entry.reason}\n`);
  const nav = snapshot?.tables.nav;
  return { nav: nav && toSeriesFrame(nav, 'nav'), skipped: skipped.map((entry) => ({ as_of: entry.asOf, reason: entry.reason })) };
}

export function storeSnapshot(config: Pick<RunConfig, 'store' | 'feed'>, asOf: number, feed: LoadedFeed): SnapshotRef {
  return writeSnapshot(config.store, {
    feed: config.feed,
    asOf: formatIsoDate(asOf),
    results: feed.results,
    sources: feed.results.map((result) => ({ kind: result.kind, path: result.file, sha256: sha256File(result.file) })),
  });
}
