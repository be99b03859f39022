import { randomBytes } from 'node:crypto';
import { closeSync, existsSync, fstatSync, mkdirSync, openSync, readdirSync, readFileSync, readSync } from 'node:fs';
import { join } from 'node:path';
import { parseIsoDate } from '../calendar/days.js';
import { arrowIpcToCanonical, canonicalToArrowIpc, writeCanonicalArrowIpc } from '../ingest/arrow-table.js';
import { ConfigError, cutInput, InputError, NavassayError } from '../ingest/errors.js';
import { onPseudoFileSystem } from '../ingest/input-file.js';
import type { RejectedRow } from '../ingest/records.js';
import type { FileKind } from '../ingest/schema.js';
import type { CanonicalTable, IngestResult } from '../ingest/table.js';
import { removeTree, renameDurably, sha256Bytes, syncDirectory, writeChunksDurably, writeFileDurably } from './durable-files.js';
import { DEFAULT_LOCK_WAIT_MS, lockFeed, processIsAlive } from './feed-lock.js';
import {
  MANIFEST_FILE,
  MANIFEST_FORMAT,
  REJECTED_FILE,
  SnapshotManifestSchema,
  type SnapshotFile,
  type SnapshotManifest,
} from './manifest.js';
import { rejectedRowsFromCsv, rejectedRowsToCsv } from './rejected-csv.js';

/**
 * The snapshot store: one directory per feed, one directory per as-of date inside it.
 *
 *   STORE/<feed>/<as_of>/manifest.json, <kind>.arrow …, rejected.csv
 *
 * A snapshot is written into a hidden staging directory beside its final place and renamed into
 * place only when every file is on the disk, so a reader sees the old snapshot or the new one,
 * never half of one. See docs/store.md.
 */

export interface SnapshotSource {
  readonly kind: FileKind;
  readonly path: string;
  readonly sha256: string;
}

export interface SnapshotInput {
  readonly feed: string;
  /** ISO date, `YYYY-MM-DD`. */
  readonly asOf: string;
  readonly results: readonly IngestResult[];
  readonly sources: readonly SnapshotSource[];
}

/** The points between the steps of a write, for tests that stop a write half-way. */
export type WriteStep = 'staged' | 'retired' | 'published';

export interface WriteOptions {
  /** Called after each step; throwing from it leaves the store as a crash at that point would. */
  readonly afterStep?: (step: WriteStep) => void;
  /** The write time recorded in the manifest (default: now). */
  readonly now?: Date;
  /** How long to wait for another writer of the same feed (default 30 s). */
  readonly lockWaitMs?: number;
  /** Writes one file durably; tests replace it to make a write fail as a full disk would. */
  readonly writeFile?: (path: string, data: Uint8Array | string) => void;
}

/** A snapshot directory that cannot be read, and why; it is skipped, never the whole store. */
export interface UnreadableSnapshot {
  readonly feed: string;
  readonly asOf: string;
  readonly dir: string;
  readonly reason: string;
}

export interface SnapshotRef {
  readonly feed: string;
  readonly asOf: string;
  /** The directory holding the snapshot's files. */
  readonly dir: string;
  readonly manifest: SnapshotManifest;
}

export interface LoadedSnapshot extends SnapshotRef {
  readonly tables: Partial<Record<FileKind, CanonicalTable>>;
  readonly rejected: readonly RejectedRow[];
}

const STAGING_PREFIX = '.staging-';
const RETIRED_PREFIX = '.retired-';
const AS_OF_DIR = /^\d{4}-\d{2}-\d{2}$/;
const FEED_NAME = /^[A-Za-z0-9][A-Za-z0-9._-]{0,127}$/;

export function writeSnapshot(storeDir: string, input: SnapshotInput, options: WriteOptions = {}): SnapshotRef {
  checkFeedName(input.feed);
  checkAsOf(input.asOf);
  const sourceOf = matchSources(input);
  const feedDir = join(storeDir, input.feed);
  if (onPseudoFileSystem(storeDir)) {
    throw new ConfigError(`The store ${storeDir} is on a system pseudo file system (/proc, /sys or /dev); point store at an ordinary directory.`);
  }
  storeStep(storeDir, () => mkdirSync(feedDir, { recursive: true }));
  const lock = lockFeed(feedDir, options.lockWaitMs ?? DEFAULT_LOCK_WAIT_MS);
  try {
    return writeLocked(storeDir, feedDir, input, sourceOf, options);
  } finally {
    lock.release();
  }
}

/** The write itself, while this process alone holds the feed. */
function writeLocked(
  storeDir: string,
  feedDir: string,
  input: SnapshotInput,
  sourceOf: Map<FileKind, SnapshotSource>,
  options: WriteOptions,
): SnapshotRef {
  storeStep(storeDir, () => recoverFeed(feedDir));
  const nonce = `${process.pid}-${randomBytes(4).toString('hex')}`;
  const staging = join(feedDir, `${STAGING_PREFIX}${input.asOf}-${nonce}`);
  const manifest = storeStep(storeDir, () => {
    try {
      mkdirSync(staging);
      const staged = stageSnapshot(staging, input, sourceOf, options.now ?? new Date(), options.writeFile);
      syncDirectory(staging);
      syncDirectory(feedDir);
      return staged;
    } catch (error) {
      removeTree(staging); // our own staging only: a full disk must not stay full of it
      throw error;
    }
  });
  options.afterStep?.('staged');

  const target = join(feedDir, input.asOf);
  const retired = join(feedDir, `${RETIRED_PREFIX}${input.asOf}-${nonce}`);
  const replacing = existsSync(target);
  if (replacing) renameDurably(target, retired, feedDir);
  options.afterStep?.('retired');
  renameDurably(staging, target, feedDir);
  options.afterStep?.('published');
  if (replacing) removeTree(retired);
  return { feed: input.feed, asOf: input.asOf, dir: target, manifest };
}

function checkFeedName(feed: string): void {
  if (!FEED_NAME.test(feed)) {
    throw new ConfigError(
      `The feed name "${feed}" cannot name a store directory; use letters, digits, dots, dashes and underscores only, starting with a letter or digit.`,
    );
  }
}

function checkAsOf(asOf: string): void {
  if (parseIsoDate(asOf) === null || !AS_OF_DIR.test(asOf)) {
    throw new ConfigError(`The as-of date "${asOf}" is not a real YYYY-MM-DD date; give the snapshot date as YYYY-MM-DD.`);
  }
}

/** Each result needs the source file it came from; a snapshot holds one file per kind. */
function matchSources(input: SnapshotInput): Map<FileKind, SnapshotSource> {
  const sourceOf = new Map(input.sources.map((source) => [source.kind, source]));
  const seen = new Set<FileKind>();
  for (const result of input.results) {
    if (seen.has(result.kind)) {
      throw new ConfigError(`The snapshot of ${input.feed} for ${input.asOf} has two ${result.kind} files; give one file per kind.`);
    }
    seen.add(result.kind);
    if (!sourceOf.has(result.kind)) {
      throw new ConfigError(`The snapshot of ${input.feed} for ${input.asOf} has no source for its ${result.kind} file (${result.file}); pass its path and SHA-256.`);
    }
  }
  return sourceOf;
}

/**
 * Runs a file-system step of a write; a failure of the disk (full, read-only, no permission)
 * becomes one sentence naming the store, exit 2, since the fix is where the store points.
 */
function storeStep<T>(storeDir: string, step: () => T): T {
  try {
    return step();
  } catch (error) {
    if (error instanceof NavassayError) throw error;
    const code = (error as NodeJS.ErrnoException).code;
    if (code === undefined) throw error;
    throw new ConfigError(
      `Cannot write the snapshot into the store ${storeDir} (${cutInput((error as Error).message)}); free space, fix the permissions or point store elsewhere, then run again.`,
    );
  }
}

function stageSnapshot(
  staging: string,
  input: SnapshotInput,
  sourceOf: Map<FileKind, SnapshotSource>,
  now: Date,
  writeFileInstead: ((path: string, data: Uint8Array | string) => void) | undefined,
): SnapshotManifest {
  const writeFile = writeFileInstead ?? writeFileDurably;
  const files: SnapshotFile[] = input.results.map((result) => {
    const storedFile = `${result.kind}.arrow`;
    const storedSha256 = writeStoredTable(join(staging, storedFile), result.table, writeFileInstead);
    const source = sourceOf.get(result.kind)!;
    return {
      kind: result.kind,
      source_path: source.path,
      source_sha256: source.sha256,
      rows: { ...result.rows },
      stored_file: storedFile,
      stored_sha256: storedSha256,
    };
  });
  const rejected = input.results.flatMap((result) => result.rejected);
  writeFile(join(staging, REJECTED_FILE), rejectedRowsToCsv(rejected));
  const manifest: SnapshotManifest = {
    format: MANIFEST_FORMAT,
    version: 1,
    feed: input.feed,
    as_of: input.asOf,
    created_at: now.toISOString(),
    files,
    rejected_file: REJECTED_FILE,
    rejected_rows: rejected.length,
  };
  // The manifest goes last: a directory without one was never finished.
  writeFile(join(staging, MANIFEST_FILE), `${JSON.stringify(manifest, null, 2)}\n`);
  return manifest;
}

/**
 * Writes one table as Arrow IPC and returns the SHA-256 of its bytes. The table streams to the
 * disk chunk by chunk (no second copy of a 25-million-row table in memory); a test's own
 * `writeFile` gets the whole bytes, as before.
 */
function writeStoredTable(path: string, table: CanonicalTable, writeFile: ((path: string, data: Uint8Array | string) => void) | undefined): string {
  if (writeFile === undefined) return writeChunksDurably(path, (write) => writeCanonicalArrowIpc(table, write));
  const bytes = canonicalToArrowIpc(table);
  writeFile(path, bytes);
  return sha256Bytes(bytes);
}

/**
 * Puts a feed directory back in order after a write that stopped half-way: a retired snapshot
 * whose replacement never arrived goes back in place; staging and other retired directories go.
 * It runs under the feed's lock, and a staging directory goes only when the process named in it
 * is gone, so a writer never deletes another live writer's work.
 */
function recoverFeed(feedDir: string): void {
  for (const entry of readdirSync(feedDir)) {
    const path = join(feedDir, entry);
    if (entry.startsWith(STAGING_PREFIX)) {
      if (!processIsAlive(pidOfHidden(entry, STAGING_PREFIX)) || pidOfHidden(entry, STAGING_PREFIX) === process.pid) removeTree(path);
    }
    else if (entry.startsWith(RETIRED_PREFIX)) {
      const asOf = asOfOfHidden(entry, RETIRED_PREFIX);
      const target = join(feedDir, asOf);
      if (AS_OF_DIR.test(asOf) && !existsSync(target) && existsSync(join(path, MANIFEST_FILE))) {
        renameDurably(path, target, feedDir);
      } else removeTree(path);
    }
  }
}

function asOfOfHidden(entry: string, prefix: string): string {
  return entry.slice(prefix.length, prefix.length + 10);
}

/** The writer's pid in `.staging-<as_of>-<pid>-<random>`, or 0. */
function pidOfHidden(entry: string, prefix: string): number {
  const pid = Number(entry.slice(prefix.length + 11).split('-')[0]);
  return Number.isInteger(pid) ? pid : 0;
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

/** A snapshot's canonical tables (checked against their recorded SHA-256) and its rejected rows. */
export function readSnapshot(storeDir: string, feed: string, asOf: string): LoadedSnapshot {
  const ref = findSnapshot(storeDir, feed, asOf);
  if (!ref) {
    throw new InputError(`The store ${storeDir} has no snapshot of ${feed} for ${asOf}; run that day first or pick another date.`);
  }
  return loadSnapshot(ref);
}

/** The tables and rejected rows of a listed snapshot; a missing or damaged file is an InputError. */
function loadSnapshot(ref: SnapshotRef): LoadedSnapshot {
  const tables: Partial<Record<FileKind, CanonicalTable>> = {};
  for (const file of ref.manifest.files) tables[file.kind] = readStoredTable(ref.dir, file);
  const rejectedPath = join(ref.dir, ref.manifest.rejected_file);
  let rejected: RejectedRow[];
  try {
    rejected = rejectedRowsFromCsv(readStoredText(rejectedPath));
  } catch (error) {
    if (error instanceof NavassayError) throw error;
    throw new InputError(`${rejectedPath} cannot be read (${cutInput((error as Error).message)}); the snapshot is damaged, so write that day again.`);
  }
  return { ...ref, tables, rejected };
}

/**
 * The latest snapshot before a date that reads completely. Earlier snapshots that cannot be read
 * (damaged manifest, missing or altered file) are skipped and returned with their reasons, so the
 * caller can report each once.
 */
export function previousReadableSnapshot(
  storeDir: string,
  feed: string,
  asOfExclusive: string,
): { snapshot: LoadedSnapshot | undefined; skipped: UnreadableSnapshot[] } {
  const { loaded, skipped } = latestEarlierThatLoads(storeDir, feed, asOfExclusive, loadSnapshot);
  return { snapshot: loaded, skipped };
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

function readStoredText(path: string): string {
  return readStoredBytes(path).toString('utf8');
}

/**
 * A stored file's bytes; `shared` reads them into shared memory, which worker threads see
 * without a copy. A file that cannot be read makes its snapshot damaged.
 */
function readStoredBytes(path: string, shared = false): Buffer {
  try {
    return shared ? readIntoSharedMemory(path) : readFileSync(path);
  } catch (error) {
    throw unreadableStoredFile(path, error);
  }
}

/** The error of a stored file that cannot be read: its snapshot is damaged. */
export function unreadableStoredFile(path: string, error: unknown): InputError {
  const code = (error as NodeJS.ErrnoException).code;
  return new InputError(`${path} cannot be read (${code === 'ENOENT' ? 'it is missing' : cutInput((error as Error).message)}); the snapshot is damaged, so write that day again.`);
}

/** The error of a stored file whose bytes are not those its manifest's SHA-256 names. */
export function alteredStoredFile(path: string): InputError {
  return new InputError(`${path} does not match the SHA-256 in its manifest; the snapshot is damaged, so write that day again.`);
}

function readIntoSharedMemory(path: string): Buffer {
  const fd = openSync(path, 'r');
  try {
    const bytes = Buffer.from(new SharedArrayBuffer(fstatSync(fd).size));
    let filled = 0;
    for (let read = 1; read > 0 && filled < bytes.length; filled += read) read = readSync(fd, bytes, filled, bytes.length - filled, null);
    return bytes.subarray(0, filled);
  } finally {
    closeSync(fd);
  }
}

function readStoredTable(dir: string, file: SnapshotFile): CanonicalTable {
  return readStoredArrow(dir, file, (bytes, path) => arrowIpcToCanonical(file.kind, bytes, path));
}

/**
 * A stored Arrow file, checked against the SHA-256 of its manifest and decoded by `decode`; a
 * missing, altered or undecodable file is an InputError that says the snapshot is damaged.
 * `shared` reads the bytes into shared memory (see `readStoredBytes`).
 */
export function readStoredArrow<T>(dir: string, file: SnapshotFile, decode: (bytes: Uint8Array, path: string) => T, shared = false): T {
  const path = join(dir, file.stored_file);
  const bytes = readStoredBytes(path, shared);
  if (sha256Bytes(bytes) !== file.stored_sha256) throw alteredStoredFile(path);
  try {
    return decode(bytes, path);
  } catch (error) {
    if (error instanceof NavassayError) throw error;
    throw new InputError(`${path} cannot be read as a stored table (${cutInput((error as Error).message)}); the snapshot is damaged, so write that day again.`);
  }
}
