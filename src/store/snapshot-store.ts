import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { arrowIpcToCanonical, canonicalToArrowIpc, writeCanonicalArrowIpc } from '../ingest/arrow-table.js';
import { ConfigError, cutInput, InputError, NavassayError } from '../ingest/errors.js';
import { onPseudoFileSystem } from '../ingest/input-file.js';
import type { RejectedRow } from '../ingest/records.js';
import type { FileKind } from '../ingest/schema.js';
import type { CanonicalTable, IngestResult } from '../ingest/table.js';
import { removeTree, renameDurably, sha256Bytes, syncDirectory, writeChunksDurably, writeFileDurably } from './durable-files.js';
import { DEFAULT_LOCK_WAIT_MS, lockFeed, processIsAlive } from './feed-lock.js';
import { MANIFEST_FILE, MANIFEST_FORMAT, REJECTED_FILE, type SnapshotFile, type SnapshotManifest } from './manifest.js';
import { rejectedRowsFromCsv, rejectedRowsToCsv } from './rejected-csv.js';
import {
  AS_OF_DIR,
  asOfOfHidden,
  checkAsOf,
  checkFeedName,
  findSnapshot,
  latestEarlierThatLoads,
  RETIRED_PREFIX,
  STAGING_PREFIX,
  type SnapshotRef,
  type UnreadableSnapshot,
} from './snapshot-catalog.js';
import { readStoredArrow, readStoredText } from './stored-files.js';

/**
 * The snapshot store's tables: a day's snapshot written, and whole snapshots read back. Both
 * encode or decode Arrow, so this module brings the Arrow library; finding snapshots and reading
 * their manifests is src/store/snapshot-catalog.ts, which does not.
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

export interface LoadedSnapshot extends SnapshotRef {
  readonly tables: Partial<Record<FileKind, CanonicalTable>>;
  readonly rejected: readonly RejectedRow[];
}

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

/** The writer's pid in `.staging-<as_of>-<pid>-<random>`, or 0. */
function pidOfHidden(entry: string, prefix: string): number {
  const pid = Number(entry.slice(prefix.length + 11).split('-')[0]);
  return Number.isInteger(pid) ? pid : 0;
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

function readStoredTable(dir: string, file: SnapshotFile): CanonicalTable {
  return readStoredArrow(dir, file, (bytes, path) => arrowIpcToCanonical(file.kind, bytes, path));
}
