import { formatIsoDate } from '../calendar/days.js';
import type { RunConfig } from '../config/run-config.js';
import { toSeriesFrame } from '../ingest/convert.js';
import type { LoadedFeed } from '../ingest/feed.js';
import type { SeriesFrame } from '../series/frame.js';
import { findSnapshot, listSnapshots, previousSnapshot, readSnapshot, sha256File, writeSnapshot, type SnapshotRef } from '../store/index.js';

/** The run's bridge to the snapshot store: find the last earlier NAVs, keep today's. */
export function previousNavFromStore(config: RunConfig, asOf: number): SeriesFrame | undefined {
  const earlier = previousSnapshot(config.store, config.feed, formatIsoDate(asOf));
  if (!earlier) return undefined;
  const nav = readSnapshot(config.store, config.feed, earlier.asOf).tables.nav;
  return nav && toSeriesFrame(nav, 'nav');
}

/** When the configuration pins `previous:` while the store holds a later snapshot, which one was used. */
export function pinnedPreviousNotice(config: RunConfig, asOf: number): string | null {
  if (config.previous === undefined) return null;
  const stored = previousSnapshot(config.store, config.feed, formatIsoDate(asOf));
  if (!stored) return null;
  return `the configuration pins previous: ${config.previous}; the store also holds the snapshot of ${stored.asOf}; the pinned file was used (remove previous: to compare with the store).`;
}

export interface StoredSnapshot {
  readonly ref: SnapshotRef;
  /** Says what happened to an earlier snapshot of the same as-of; null when there was none. */
  readonly notice: string | null;
}

/**
 * Keeps today's snapshot. A snapshot already stored for the same as-of is never replaced
 * silently: an identical one is kept as it is, a different one is replaced and the run says so.
 */
export function storeSnapshot(config: Pick<RunConfig, 'store' | 'feed'>, asOf: number, feed: LoadedFeed): StoredSnapshot {
  const iso = formatIsoDate(asOf);
  const sources = feed.results.map((result) => ({ kind: result.kind, path: result.file, sha256: sha256File(result.file) }));
  const existing = findSnapshot(config.store, config.feed, iso);
  if (existing && sameSources(existing, sources)) {
    return { ref: existing, notice: `the snapshot of ${iso} stored at ${existing.manifest.created_at} holds the same files; it was kept.` };
  }
  const ref = writeSnapshot(config.store, { feed: config.feed, asOf: iso, results: feed.results, sources });
  const later = listSnapshots(config.store, config.feed).filter((s) => s.asOf > iso).map((s) => s.asOf);
  const notices = [
    existing ? `the snapshot of ${iso} stored at ${existing.manifest.created_at} held other files; it was replaced by today's.` : null,
    later.length ? `the store holds later snapshots (${later.join(', ')}); this run is a re-run of an earlier day.` : null,
  ].filter((n): n is string => n !== null);
  return { ref, notice: notices.length ? notices.join(' ') : null };
}

function sameSources(snapshot: SnapshotRef, sources: ReadonlyArray<{ kind: string; sha256: string }>): boolean {
  const stored = new Map<string, string>(snapshot.manifest.files.map((f) => [f.kind, f.source_sha256]));
  return stored.size === sources.length && sources.every((s) => stored.get(s.kind) === s.sha256);
}
