import { formatIsoDate } from '../../calendar/days.js';
import { writeSnapshot, type SnapshotRef } from '../../store/index.js';
import type { Day } from '../day.js';

export interface SnapshotPlace {
  readonly store: string;
  readonly feed: string;
}

/** The snapshot stage: the day's canonical tables, with the hashes of the bytes that were parsed. */
export function snapshotStage(day: Day, place: SnapshotPlace): SnapshotRef {
  return writeSnapshot(place.store, {
    feed: place.feed,
    asOf: formatIsoDate(day.asOf),
    results: day.feed.results,
    sources: day.feed.sources,
  });
}
