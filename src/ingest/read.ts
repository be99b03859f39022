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

/** Reads one canonical file in whatever format its extension names. */
export async function readFeedFile(path: string, kind: FileKind, profile: FeedProfile): Promise<IngestResult> {
  const bytes = readInput(path);
  switch (formatOf(path)) {
    case 'csv':
      return readCsvBuffer(bytes, path, kind, profile);
    case 'arrow':
      return readArrowBuffer(bytes, path, kind, profile);
    case 'parquet':
      return readParquetBuffer(bytes, path, kind, profile);
  }
}

