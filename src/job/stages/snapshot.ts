import { formatIsoDate } from '../../calendar/days.js';
import { writeSnapshotHere, writeSnapshotInBackground, type BackgroundOptions } from '../../store/background-write.js';
import { findSnapshot, listSnapshots, previousSnapshot, type SnapshotRef } from '../../store/snapshot-catalog.js';
import type { SnapshotInput } from '../../store/snapshot-store.js';
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
 * The snapshot stage on this thread: the day's canonical tables, with the hashes of the bytes
 * that were parsed. A snapshot already stored for the same as-of is never replaced silently: one
 * of the same files is kept as it is, one of other files is replaced and the notice says so.
 */
export async function snapshotStage(day: Day, place: SnapshotPlace): Promise<StoredSnapshot> {
  const plan = planSnapshot(day, place);
  return plan.kept ?? { ref: await writeSnapshotHere(place.store, plan.input), notices: plan.notices };
}

/** A snapshot being written on a worker thread, with what its notices say already known. */
export interface SnapshotUnderWay {
  /** The stage's notices, the same as `stored`'s: they depend on the store as found, not on the write. */
  readonly notices: readonly string[];
  /** Settles when the snapshot is on the disk (or kept), or fails with the store's error. */
  readonly stored: Promise<StoredSnapshot>;
}

/**
 * The snapshot stage with the write on a worker thread (src/store/background-write.ts): what to
 * keep is decided here at once, with the notices, and `stored` settles when the snapshot is on
 * the disk, while this thread goes on with reconciliation, tickets and reports
 * (src/job/daily-job.ts). Same snapshot, notices and errors as `snapshotStage`.
 */
export function startSnapshotInBackground(day: Day, place: SnapshotPlace, options: BackgroundOptions = {}): SnapshotUnderWay {
  const plan = planSnapshot(day, place);
  const stored = plan.kept ? Promise.resolve(plan.kept) : writeSnapshotInBackground(place.store, plan.input, options).then((ref) => ({ ref, notices: plan.notices }));
  return { notices: plan.notices, stored };
}

interface SnapshotPlan {
  readonly input: SnapshotInput;
  /** The stored snapshot of the same files, kept as it is; null when today's must be written. */
  readonly kept: StoredSnapshot | null;
  /** Everything the stage tells, decided before the write: writing today's snapshot changes none of it. */
  readonly notices: string[];
}

function planSnapshot(day: Day, place: SnapshotPlace): SnapshotPlan {
  const asOf = formatIsoDate(day.asOf);
  const notices: string[] = [];
  const pinned = pinnedPreviousNotice(place, asOf);
  if (pinned) notices.push(pinned);
  const existing = findSnapshot(place.store, place.feed, asOf);
  const input: SnapshotInput = { feed: place.feed, asOf, results: day.feed.results, sources: day.feed.sources };
  if (existing && sameSources(existing, day.feed.sources)) {
    notices.push(`the snapshot of ${asOf} stored at ${existing.manifest.created_at} holds the same files; it was kept.`);
    return { input, kept: { ref: existing, notices }, notices };
  }
  if (existing) notices.push(`the snapshot of ${asOf} stored at ${existing.manifest.created_at} held other files; it was replaced by today's.`);
  const later = listSnapshots(place.store, place.feed).filter((snapshot) => snapshot.asOf > asOf).map((snapshot) => snapshot.asOf);
  if (later.length > 0) notices.push(`the store holds later snapshots (${later.join(', ')}); this run is a re-run of an earlier day.`);
  return { input, kept: null, notices };
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
