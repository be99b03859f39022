import { closeSync, fsyncSync, openSync, readSync, renameSync, rmSync, writeSync } from 'node:fs';
import { createHash } from 'node:crypto';

/**
 * File-system steps whose order makes a snapshot write atomic: data reaches the disk (fsync)
 * before the rename that publishes it, and the rename reaches the disk before the next step.
 */

/** Writes a whole file and flushes it to the disk before returning. */
export function writeFileDurably(path: string, data: Uint8Array | string): void {
  const fd = openSync(path, 'wx');
  try {
    const bytes = typeof data === 'string' ? Buffer.from(data, 'utf8') : data;
    let written = 0;
    while (written < bytes.length) written += writeSync(fd, bytes, written, bytes.length - written);
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
}

/**
 * Writes a file from the chunks `produce` hands to its `write` callback, as they come, and
 * flushes it to the disk before returning; returns the SHA-256 of everything written. A large
 * file is never held whole in memory.
 */
export function writeChunksDurably(path: string, produce: (write: (chunk: Uint8Array) => void) => void): string {
  const fd = openSync(path, 'wx');
  const hash = createHash('sha256');
  try {
    produce((chunk) => {
      let written = 0;
      while (written < chunk.length) written += writeSync(fd, chunk, written, chunk.length - written);
      hash.update(chunk);
    });
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
  return hash.digest('hex');
}

/**
 * Flushes a directory's entries (a rename, a new file) to the disk. Some platforms cannot open a
 * directory for syncing; there the rename is as durable as the platform makes it.
 */
export function syncDirectory(path: string): void {
  let fd: number;
  try {
    fd = openSync(path, 'r');
  } catch {
    return;
  }
  try {
    fsyncSync(fd);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    if (code !== 'EINVAL' && code !== 'EPERM' && code !== 'EISDIR') throw error;
  } finally {
    closeSync(fd);
  }
}

export function renameDurably(from: string, to: string, parent: string): void {
  renameSync(from, to);
  syncDirectory(parent);
}

export function removeTree(path: string): void {
  rmSync(path, { recursive: true, force: true });
}

const HASH_CHUNK = 1 << 20;

/** SHA-256 of a file as lowercase hex, read in chunks so large feeds are not held in memory. */
export function sha256File(path: string): string {
  const hash = createHash('sha256');
  const buffer = Buffer.allocUnsafe(HASH_CHUNK);
  const fd = openSync(path, 'r');
  try {
    let read: number;
    while ((read = readSync(fd, buffer, 0, HASH_CHUNK, null)) > 0) hash.update(buffer.subarray(0, read));
  } finally {
    closeSync(fd);
  }
  return hash.digest('hex');
}

export function sha256Bytes(bytes: Uint8Array | string): string {
  return createHash('sha256').update(bytes).digest('hex');
}
