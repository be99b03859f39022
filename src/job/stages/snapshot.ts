import { formatIsoDate } from '../../calendar/days.js';
import { writeSnapshotInBackground, type BackgroundOptions } from '../../store/background-write.js';
import { findSnapshot, listSnapshots, previousSnapshot, writeSnapshot, type SnapshotInput, type SnapshotRef } from '../../store/index.js';
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
  const plan = planSnapshot(day, place);
  return plan.kept ?? afterWrite(plan, place, writeSnapshot(place.store, plan.input));
}

/**
 * The snapshot stage with the write on a worker thread (src/store/background-write.ts): what
 * to keep is decided here at once, and the promise settles when the snapshot is on the disk,
 * while this thread goes on with the day's figures. Same snapshot, notices and errors as
 * `snapshotStage`.
 */
export async function snapshotStageInBackground(day: Day, place: SnapshotPlace, options: BackgroundOptions = {}): Promise<StoredSnapshot> {
  const plan = planSnapshot(day, place);
  return plan.kept ?? afterWrite(plan, place, await writeSnapshotInBackground(place.store, plan.input, options));
}

interface SnapshotPlan {
  readonly asOf: string;
  readonly input: SnapshotInput;
  /** The stored snapshot of the same files, kept as it is; null when today's must be written. */
  readonly kept: StoredSnapshot | null;
  readonly replacing: SnapshotRef | undefined;
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
    return { asOf, input, kept: { ref: existing, notices }, replacing: undefined, notices };
  }
  return { asOf, input, kept: null, replacing: existing, notices };
}

function afterWrite(plan: SnapshotPlan, place: SnapshotPlace, ref: SnapshotRef): StoredSnapshot {
  const notices = [...plan.notices];
  if (plan.replacing) notices.push(`the snapshot of ${plan.asOf} stored at ${plan.replacing.manifest.created_at} held other files; it was replaced by today's.`);
  const later = listSnapshots(place.store, place.feed).filter((snapshot) => snapshot.asOf > plan.asOf).map((snapshot) => snapshot.asOf);
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
