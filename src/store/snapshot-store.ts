import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseIsoDate } from '../calendar/days.js';
import { arrowIpcToCanonical, canonicalToArrowIpc } from '../ingest/arrow-table.js';
import { ConfigError, InputError } from '../ingest/errors.js';
import type { RejectedRow } from '../ingest/records.js';
import type { FileKind } from '../ingest/schema.js';
import type { CanonicalTable, IngestResult } from '../ingest/table.js';
import { removeTree, renameDurably, sha256Bytes, syncDirectory, writeFileDurably } from './durable-files.js';
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
  mkdirSync(feedDir, { recursive: true });
  recoverFeed(feedDir);

  const nonce = `${process.pid}-${randomBytes(4).toString('hex')}`;
  const staging = join(feedDir, `${STAGING_PREFIX}${input.asOf}-${nonce}`);
  mkdirSync(staging);
  const manifest = stageSnapshot(staging, input, sourceOf, options.now ?? new Date());
  syncDirectory(staging);
  syncDirectory(feedDir);
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

function stageSnapshot(
  staging: string,
  input: SnapshotInput,
  sourceOf: Map<FileKind, SnapshotSource>,
  now: Date,
): SnapshotManifest {
  const files: SnapshotFile[] = input.results.map((result) => {
    const storedFile = `${result.kind}.arrow`;
    const bytes = canonicalToArrowIpc(result.table);
    writeFileDurably(join(staging, storedFile), bytes);
    const source = sourceOf.get(result.kind)!;
    return {
      kind: result.kind,
      source_path: source.path,
      source_sha256: source.sha256,
      rows: { ...result.rows },
      stored_file: storedFile,
      stored_sha256: sha256Bytes(bytes),
    };
  });
  const rejected = input.results.flatMap((result) => result.rejected);
  writeFileDurably(join(staging, REJECTED_FILE), rejectedRowsToCsv(rejected));
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
  writeFileDurably(join(staging, MANIFEST_FILE), `${JSON.stringify(manifest, null, 2)}\n`);
  return manifest;
}

/**
 * Puts a feed directory back in order after a write that stopped half-way: a retired snapshot
 * whose replacement never arrived goes back in place; staging and other retired directories go.
 */
function recoverFeed(feedDir: string): void {
  for (const entry of readdirSync(feedDir)) {
    const path = join(feedDir, entry);
    if (entry.startsWith(STAGING_PREFIX)) removeTree(path);
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
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))
    .map(([asOf, dir]) => ({ feed, asOf, dir, manifest: readManifest(dir) }));
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
  const parsed = SnapshotManifestSchema.safeParse(JSON.parse(readFileSync(path, 'utf8')));
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
  const tables: Partial<Record<FileKind, CanonicalTable>> = {};
  for (const file of ref.manifest.files) tables[file.kind] = readStoredTable(ref.dir, file);
  const rejected = rejectedRowsFromCsv(readFileSync(join(ref.dir, ref.manifest.rejected_file), 'utf8'));
  return { ...ref, tables, rejected };
}

function readStoredTable(dir: string, file: SnapshotFile): CanonicalTable {
  const path = join(dir, file.stored_file);
  const bytes = readFileSync(path);
  if (sha256Bytes(bytes) !== file.stored_sha256) {
    throw new InputError(`${path} does not match the SHA-256 in its manifest; the snapshot is damaged, so write that day again.`);
  }
  return arrowIpcToCanonical(file.kind, bytes, path);
}
