import { closeSync, fstatSync, openSync, readFileSync, readSync } from 'node:fs';
import { join } from 'node:path';
import { cutInput, InputError, NavassayError } from '../ingest/errors.js';
import { sha256Bytes } from './durable-files.js';
import type { SnapshotFile } from './manifest.js';

/**
 * Reading a snapshot's stored files: their bytes, checked against the SHA-256 their manifest
 * records, and the one sentence for a file that is missing, altered or undecodable (its
 * snapshot is damaged). What the bytes are decoded into is the caller's: this module holds no
 * file format, so it loads no Arrow library.
 */

export function readStoredText(path: string): string {
  return readStoredBytes(path).toString('utf8');
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

/** The error of a stored file that cannot be read: its snapshot is damaged. */
export function unreadableStoredFile(path: string, error: unknown): InputError {
  const code = (error as NodeJS.ErrnoException).code;
  return new InputError(`${path} cannot be read (${code === 'ENOENT' ? 'it is missing' : cutInput((error as Error).message)}); the snapshot is damaged, so write that day again.`);
}

/** The error of a stored file whose bytes are not those its manifest's SHA-256 names. */
export function alteredStoredFile(path: string): InputError {
  return new InputError(`${path} does not match the SHA-256 in its manifest; the snapshot is damaged, so write that day again.`);
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
