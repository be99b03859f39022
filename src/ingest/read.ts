import { createHash } from 'node:crypto';
import { extname } from 'node:path';
import { readArrowBuffer } from './arrow-reader.js';
import { readCsvBuffer, readInput } from './csv-reader.js';
import { readParquetBuffer } from './parquet-reader.js';
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

/** Reads one canonical file once: the bytes are hashed and parsed from the same buffer. */
export async function readSourceFile(path: string, kind: FileKind, profile: FeedProfile): Promise<SourceRead> {
  const bytes = readInput(path);
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  return { result: await parseFeedBytes(bytes, path, kind, profile), sha256 };
}

/** Reads one canonical file in whatever format its extension names. */
export async function readFeedFile(path: string, kind: FileKind, profile: FeedProfile): Promise<IngestResult> {
  return parseFeedBytes(readInput(path), path, kind, profile);
}

function parseFeedBytes(bytes: Buffer, path: string, kind: FileKind, profile: FeedProfile): Promise<IngestResult> | IngestResult {
  switch (formatOf(path)) {
    case 'csv':
      return readCsvBuffer(bytes, path, kind, profile);
    case 'arrow':
      return readArrowBuffer(bytes, path, kind, profile);
    case 'parquet':
      return readParquetBuffer(bytes, path, kind, profile);
  }
}

