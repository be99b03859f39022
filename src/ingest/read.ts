import { createHash } from 'node:crypto';
import { extname } from 'node:path';
import { BackgroundHash } from './background-hash.js';
import { decodeArrowUnderWatchdog } from './arrow-watchdog.js';
import { readCsvBuffer } from './csv-reader.js';
import { readCsvSource } from './csv-source.js';
import { BACKGROUND_HASH_BYTES } from './csv-window.js';
import { cutInput, InputError, NavassayError } from './errors.js';
import { readInputFile } from './input-file.js';
import { DEFAULT_READ_LIMITS, type ReadLimits } from './limits.js';
import type { FeedProfile } from './profile.js';
import type { FileKind } from './schema.js';
import type { IngestResult } from './table.js';

export type FileFormat = 'csv' | 'arrow' | 'parquet';

/** The format a path's extension names; anything unknown is read as delimited text. */
export function formatOf(path: string): FileFormat {
  const extension = extname(path).toLowerCase();
  if (extension === '.arrow' || extension === '.feather' || extension === '.ipc') return 'arrow';
  if (extension === '.parquet' || extension === '.pq') return 'parquet';
  return 'csv';
}

/** One file as read: its parsed table and the SHA-256 of the very bytes that were parsed. */
export interface SourceRead {
  readonly result: IngestResult;
  /** Hex SHA-256 of the bytes parsed, so a snapshot's manifest describes exactly what was checked. */
  readonly sha256: string;
}

/** Reads one canonical file once, within the limits: the bytes are hashed and parsed from the same buffer. */
export async function readSourceFile(
  path: string,
  kind: FileKind,
  profile: FeedProfile,
  limits: ReadLimits = DEFAULT_READ_LIMITS,
): Promise<SourceRead> {
  if (formatOf(path) === 'csv') {
    try {
      return readCsvSource(path, kind, profile, limits);
    } catch (error) {
      throw asInputError(error, path, 'csv');
    }
  }
  const hash = new HashWhileReading(formatOf(path) === 'arrow');
  try {
    const bytes = readInputFile(path, limits.maxInputBytes, 'the file', hash.shared, (size) => hash.runsOf(size));
    const result = await parseFeedBytes(bytes, path, kind, profile, limits);
    return { result, sha256: hash.sha256(bytes) };
  } finally {
    hash.stop();
  }
}

/**
 * The SHA-256 of a whole input. A large one read into shared memory (an Arrow file, read there
 * for the watchdog) is hashed on another thread run by run as the read lands, and on while it is
 * decoded and parsed; nothing writes to those bytes, so the digest is of the very bytes parsed.
 * Any other is hashed here once it is read.
 */
class HashWhileReading {
  private background: BackgroundHash | null = null;

  constructor(readonly shared: boolean) {}

  /** Where each run of a file of `size` bytes goes as it lands, or null to hash it once read. */
  runsOf(size: number): ((run: Uint8Array) => void) | null {
    if (!this.shared || size < BACKGROUND_HASH_BYTES) return null;
    const background = (this.background = new BackgroundHash());
    return (run) => background.add(run);
  }

  sha256(bytes: Buffer): string {
    return this.background ? this.background.sha256() : createHash('sha256').update(bytes).digest('hex');
  }

  stop(): void {
    this.background?.stop();
  }
}

/** Reads one canonical file in whatever format its extension names, within the limits. */
export async function readFeedFile(
  path: string,
  kind: FileKind,
  profile: FeedProfile,
  limits: ReadLimits = DEFAULT_READ_LIMITS,
): Promise<IngestResult> {
  if (formatOf(path) === 'csv') return (await readSourceFile(path, kind, profile, limits)).result;
  return parseFeedBytes(readInputFile(path, limits.maxInputBytes, 'the file', formatOf(path) === 'arrow'), path, kind, profile, limits);
}

async function parseFeedBytes(bytes: Buffer, path: string, kind: FileKind, profile: FeedProfile, limits: ReadLimits): Promise<IngestResult> {
  const format = formatOf(path);
  const parse = await parserOf(format);
  try {
    return await parse(bytes, path, kind, profile, limits);
  } catch (error) {
    throw asInputError(error, path, format);
  }
}

type Parser = (bytes: Buffer, path: string, kind: FileKind, profile: FeedProfile, limits: ReadLimits) => IngestResult | Promise<IngestResult>;

/**
 * The parser of a format. The Arrow and Parquet readers, and the libraries under them (a third
 * of a second of every start-up), are loaded when a file of theirs comes, not by a run of CSV files.
 */
async function parserOf(format: FileFormat): Promise<Parser> {
  switch (format) {
    case 'csv':
      return readCsvBuffer;
    case 'arrow': {
      const { readArrowBuffer } = await import('./arrow-reader.js');
      return async (bytes, path, kind, profile, limits) => {
        await decodeArrowUnderWatchdog(bytes, path, limits.decodeTimeoutMs);
        return readArrowBuffer(bytes, path, kind, profile, limits);
      };
    }
    case 'parquet':
      return (await import('./parquet-reader.js')).readParquetBuffer;
  }
}

/**
 * A decoder's own exception (a corrupted page, a length past the end, a stack overflow on a
 * malformed nesting) becomes the one-sentence input error every bad file gets, never a crash.
 */
export function asInputError(error: unknown, path: string, format: FileFormat): NavassayError {
  if (error instanceof NavassayError) return error;
  const detail = error instanceof Error ? error.message : String(error);
  const name = format === 'csv' ? 'a CSV file' : format === 'arrow' ? 'an Arrow IPC file' : 'a Parquet file';
  return new InputError(`${path} cannot be read as ${name} (${cutInput(detail)}); check that the file is complete and not damaged, or export it again.`);
}
