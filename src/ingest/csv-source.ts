import { readCsvOnTwoThreads, TWO_THREAD_BYTES } from './csv-ring.js';
import { readCsvWindow } from './csv-reader.js';
import { BACKGROUND_HASH_BYTES, FileWindow, WINDOW_BYTES } from './csv-window.js';
import { DEFAULT_READ_LIMITS, type ReadLimits } from './limits.js';
import type { FeedProfile } from './profile.js';
import type { FileKind } from './schema.js';
import type { IngestResult } from './table.js';

/** Reads one canonical CSV file from disk; the SHA-256 is of the bytes parsed. */
export function readCsvFile(path: string, kind: FileKind, profile: FeedProfile, limits: ReadLimits = DEFAULT_READ_LIMITS): IngestResult {
  return readCsvSource(path, kind, profile, limits).result;
}

/**
 * `readCsvFile` with the SHA-256 of the bytes it parsed. A file from `twoThreadBytes` on is
 * parsed on two threads (csv-ring.ts) with the same answer; the rest, and a large file whose
 * rows the two threads cannot split (a quoted field across a window's end, a line longer than a
 * window), through one window on this thread (csv-window.ts).
 */
export function readCsvSource(
  path: string,
  kind: FileKind,
  profile: FeedProfile,
  limits: ReadLimits = DEFAULT_READ_LIMITS,
  windowBytes = WINDOW_BYTES,
  backgroundHashBytes = BACKGROUND_HASH_BYTES,
  twoThreadBytes = TWO_THREAD_BYTES,
): { result: IngestResult; sha256: string } {
  const onTwoThreads = readCsvOnTwoThreads(path, kind, profile, limits, windowBytes, twoThreadBytes);
  if (onTwoThreads !== null) return onTwoThreads;
  const window = FileWindow.open(path, limits.maxInputBytes, windowBytes, backgroundHashBytes);
  try {
    const result = readCsvWindow(window, path, kind, profile, limits);
    return { result, sha256: window.sha256() };
  } finally {
    window.close();
  }
}
