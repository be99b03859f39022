import { formatIsoDate } from '../calendar/days.js';
import type { RunConfig } from '../config/run-config.js';
import { toSeriesFrame } from '../ingest/convert.js';
import type { LoadedFeed } from '../ingest/feed.js';
import type { SeriesFrame } from '../series/frame.js';
import { previousSnapshot, readSnapshot, sha256File, writeSnapshot, type SnapshotRef } from '../store/index.js';

/** The run's bridge to the snapshot store: find the last earlier NAVs, keep today's. */
export function previousNavFromStore(config: RunConfig, asOf: number): SeriesFrame | undefined {
  const earlier = previousSnapshot(config.store, config.feed, formatIsoDate(asOf));
  if (!earlier) return undefined;
  const nav = readSnapshot(config.store, config.feed, earlier.asOf).tables.nav;
  return nav && toSeriesFrame(nav, 'nav');
}

export function storeSnapshot(config: Pick<RunConfig, 'store' | 'feed'>, asOf: number, feed: LoadedFeed): SnapshotRef {
  return writeSnapshot(config.store, {
    feed: config.feed,
    asOf: formatIsoDate(asOf),
    results: feed.results,
    sources: feed.results.map((result) => ({ kind: result.kind, path: result.file, sha256: sha256File(result.file) })),
  });
}
