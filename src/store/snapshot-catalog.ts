import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseIsoDate } from '../calendar/days.js';
import { ConfigError, cutInput, InputError, NavassayError } from '../ingest/errors.js';
import { MANIFEST_FILE, SnapshotManifestSchema, type SnapshotManifest } from './manifest.js';

/**
 * The store's catalog: which snapshots it holds, where, and what their manifests say. Only
 * directories and manifests are read here, never a stored table, so finding the previous day or
 * planning today's write does not load the Arrow library (src/store/snapshot-store.ts writes and
 * reads the tables). The layout is
 *
 *   STORE/<feed>/<as_of>/manifest.json, <kind>.arrow …, rejected.csv
 *
 * with a write's hidden staging and retired directories beside the snapshots (docs/store.md).
 */

export interface SnapshotRef {
  readonly feed: string;
  readonly asOf: string;
  /** The directory holding the snapshot's files. */
  readonly dir: string;
  readonly manifest: SnapshotManifest;
}

/** A snapshot directory that cannot be read, and why; it is skipped, never the whole store. */
export interface UnreadableSnapshot {
  readonly feed: string;
  readonly asOf: string;
  readonly dir: string;
  readonly reason: string;
}

/** A write's directory before it is renamed into place: `.staging-<as_of>-<pid>-<random>`. */
export const STAGING_PREFIX = '.staging-';
/** A replaced snapshot's directory until its replacement is in place: `.retired-<as_of>-<pid>-<random>`. */
export const RETIRED_PREFIX = '.retired-';
export const AS_OF_DIR = /^\d{4}-\d{2}-\d{2}$/;
const FEED_NAME = /^[A-Za-z0-9][A-Za-z0-9._-]{0,127}$/;

export function checkFeedName(feed: string): void {
  if (!FEED_NAME.test(feed)) {
    throw new ConfigError(
      `The feed name "${feed}" cannot name a store directory; use letters, digits, dots, dashes and underscores only, starting with a letter or digit.`,
    );
  }
}

export function checkAsOf(asOf: string): void {
  if (parseIsoDate(asOf) === null || !AS_OF_DIR.test(asOf)) {
    throw new ConfigError(`The as-of date "${asOf}" is not a real YYYY-MM-DD date; give the snapshot date as YYYY-MM-DD.`);
  }
}

/** The as-of date in the name of a staging or retired directory. */
export function asOfOfHidden(entry: string, prefix: string): string {
  return entry.slice(prefix.length, prefix.length + 10);
}

/** The feeds the store holds, by name. */
export function listFeeds(storeDir: string): string[] {
  if (!existsSync(storeDir)) return [];
  return readdirSync(storeDir, { withFileTypes: true })
    .filter((entry) => entry.isDirectory() && FEED_NAME.test(entry.name))
    .map((entry) => entry.name)
    .sort();
}

/**
 * A feed's complete snapshots, oldest first, found by scanning its directory. A snapshot caught
 * between being retired and being replaced still counts, from its retired directory.
 */
export function listSnapshots(storeDir: string, feed: string): SnapshotRef[] {
  return scanSnapshots(storeDir, feed).snapshots;
}

/**
 * A feed's snapshots whose manifest reads, oldest first, and those whose manifest does not
 * (truncated, not JSON, not a manifest), each with the reason: one damaged snapshot is set
 * aside, never the whole store.
 */
export function scanSnapshots(storeDir: string, feed: string): { snapshots: SnapshotRef[]; unreadable: UnreadableSnapshot[] } {
  const snapshots: SnapshotRef[] = [];
  const unreadable: UnreadableSnapshot[] = [];
  for (const [asOf, dir] of snapshotDirs(storeDir, feed)) {
    try {
      snapshots.push({ feed, asOf, dir, manifest: readManifest(dir) });
    } catch (error) {
      if (!(error instanceof NavassayError)) throw error;
      unreadable.push({ feed, asOf, dir, reason: error.message });
    }
  }
  return { snapshots, unreadable };
}

/** Date → directory of each snapshot with a manifest file, oldest first. */
function snapshotDirs(storeDir: string, feed: string): Array<[string, string]> {
  checkFeedName(feed);
  const feedDir = join(storeDir, feed);
  if (!existsSync(feedDir)) return [];
  const entries = readdirSync(feedDir);
  const dirOf = new Map<string, string>();
  for (const entry of entries) if (AS_OF_DIR.test(entry)) dirOf.set(entry, join(feedDir, entry));
  for (const entry of entries) {
    if (!entry.startsWith(RETIRED_PREFIX)) continue;
    const asOf = asOfOfHidden(entry, RETIRED_PREFIX);
    if (AS_OF_DIR.test(asOf) && !dirOf.has(asOf)) dirOf.set(asOf, join(feedDir, entry));
  }
  return [...dirOf.entries()]
    .filter(([, dir]) => existsSync(join(dir, MANIFEST_FILE)))
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
}

export function findSnapshot(storeDir: string, feed: string, asOf: string): SnapshotRef | undefined {
  return listSnapshots(storeDir, feed).find((snapshot) => snapshot.asOf === asOf);
}

/** The latest snapshot strictly before an as-of date: what today's feed is compared with. */
export function previousSnapshot(storeDir: string, feed: string, asOfExclusive: string): SnapshotRef | undefined {
  checkAsOf(asOfExclusive);
  return listSnapshots(storeDir, feed)
    .filter((snapshot) => snapshot.asOf < asOfExclusive)
    .at(-1);
}

export function readManifest(dir: string): SnapshotManifest {
  const path = join(dir, MANIFEST_FILE);
  let json: unknown;
  try {
    json = JSON.parse(readFileSync(path, 'utf8'));
  } catch (error) {
    throw new InputError(`${path} cannot be read as a snapshot manifest (${cutInput((error as Error).message)}); the snapshot is damaged, so write that day again.`);
  }
  const parsed = SnapshotManifestSchema.safeParse(json);
  if (!parsed.success) {
    throw new InputError(`${path} is not a navassay snapshot manifest (${parsed.error.issues[0].message}); remove the snapshot directory and write it again.`);
  }
  return parsed.data;
}

/**
 * The latest snapshot before a date for which `load` succeeds, with what it loaded. Snapshots
 * whose manifest cannot be read, and later ones whose `load` throws a NavassayError (a missing
 * or altered file), are passed over and returned with their reasons, oldest first.
 */
export function latestEarlierThatLoads<T>(
  storeDir: string,
  feed: string,
  asOfExclusive: string,
  load: (snapshot: SnapshotRef) => T,
): { snapshot?: SnapshotRef; loaded?: T; skipped: UnreadableSnapshot[] } {
  checkAsOf(asOfExclusive);
  const { snapshots, unreadable } = scanSnapshots(storeDir, feed);
  const skipped = unreadable.filter((entry) => entry.asOf < asOfExclusive);
  const earlier = snapshots.filter((snapshot) => snapshot.asOf < asOfExclusive);
  for (let k = earlier.length - 1; k >= 0; k--) {
    try {
      return { snapshot: earlier[k], loaded: load(earlier[k]), skipped: sortByDate(skipped) };
    } catch (error) {
      if (!(error instanceof NavassayError)) throw error;
      skipped.push({ feed, asOf: earlier[k].asOf, dir: earlier[k].dir, reason: error.message });
    }
  }
  return { skipped: sortByDate(skipped) };
}

function sortByDate(entries: UnreadableSnapshot[]): UnreadableSnapshot[] {
  return entries.sort((a, b) => (a.asOf < b.asOf ? -1 : a.asOf > b.asOf ? 1 : 0));
}
