import { formatIsoDate } from '../../calendar/days.js';
import { findSnapshot, listSnapshots, previousSnapshot, writeSnapshot, type SnapshotRef } from '../../store/index.js';
import type { Day } from '../day.js';

export interface SnapshotPlace {
  readonly store: string;
  readonly feed: string;
  /** A previous NAV file the configuration pins, instead of the store's latest earlier snapshot. */
  readonly previous?: string;
}

export interface StoredSnapshot {
  readonly ref: SnapshotRef;
  /** What a person should know about the store: a re-run of a stored as-of, a pinned previous file. */
  readonly notices: readonly string[];
}

/**
 * The snapshot stage: the day's canonical tables, with the hashes of the bytes that were parsed.
 * A snapshot already stored for the same as-of is never replaced silently: one of the same files
 * is kept as it is, one of other files is replaced and the notice says so.
 */
export function snapshotStage(day: Day, place: SnapshotPlace): StoredSnapshot {
  const asOf = formatIsoDate(day.asOf);
  const notices: string[] = [];
  const pinned = pinnedPreviousNotice(place, asOf);
  if (pinned) notices.push(pinned);
  const existing = findSnapshot(place.store, place.feed, asOf);
  if (existing && sameSources(existing, day.feed.sources)) {
    notices.push(`the snapshot of ${asOf} stored at ${existing.manifest.created_at} holds the same files; it was kept.`);
    return { ref: existing, notices };
  }
  const ref = writeSnapshot(place.store, { feed: place.feed, asOf, results: day.feed.results, sources: day.feed.sources });
  if (existing) notices.push(`the snapshot of ${asOf} stored at ${existing.manifest.created_at} held other files; it was replaced by today's.`);
  const later = listSnapshots(place.store, place.feed).filter((snapshot) => snapshot.asOf > asOf).map((snapshot) => snapshot.asOf);
  if (later.length > 0) notices.push(`the store holds later snapshots (${later.join(', ')}); this run is a re-run of an earlier day.`);
  return { ref, notices };
}

/** When the configuration pins `previous:` while the store holds an earlier snapshot, which one was used. */
function pinnedPreviousNotice(place: SnapshotPlace, asOf: string): string | null {
  if (place.previous === undefined) return null;
  const stored = previousSnapshot(place.store, place.feed, asOf);
  if (!stored) return null;
  return `the configuration pins previous: ${place.previous}; the store also holds the snapshot of ${stored.asOf}; the pinned file was used (remove previous: to compare with the store).`;
}

function sameSources(snapshot: SnapshotRef, sources: ReadonlyArray<{ kind: string; sha256: string }>): boolean {
  const stored = new Map<string, string>(snapshot.manifest.files.map((file) => [file.kind, file.source_sha256]));
  return stored.size === sources.length && sources.every((source) => stored.get(source.kind) === source.sha256);
}
