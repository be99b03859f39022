import { closeSync, constants, fstatSync, openSync, readSync, realpathSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { InputError } from './errors.js';

/**
 * Opening an input file safely. Only a regular file is read, never a device (`/dev/zero` would
 * grow without end), a FIFO (it would block), a directory, or anything under the kernel's
 * pseudo file systems (`/proc`, `/sys` report sizes that are not what reading gives). The read
 * itself stops at the size limit whatever the file claims, so a file that grows while it is read
 * cannot take the memory with it.
 */
const PSEUDO_FILE_SYSTEMS = ['/proc/', '/sys/', '/dev/'];

/**
 * `shared` reads the bytes into shared memory (a SharedArrayBuffer), so a worker thread can look
 * at them without a copy (the Arrow watchdog, arrow-watchdog.ts). `onRun`, given the file's size,
 * may answer a function that is told each run of bytes as it lands, in order (the SHA-256 is then
 * taken while the rest is read, read.ts); a run is never written again.
 */
export function readInputFile(
  path: string,
  maxBytes: number,
  what = 'the file',
  shared = false,
  onRun?: (size: number) => ((run: Uint8Array) => void) | null,
): Buffer {
  const { fd, size } = openInputFile(path, maxBytes, what);
  try {
    return readAtMost(fd, path, what, maxBytes, size, shared ? sharedBuffer : Buffer.allocUnsafe, onRun?.(size) ?? null);
  } finally {
    closeSync(fd);
  }
}

/**
 * Opens an input file for reading after the checks above (a regular file, not on a pseudo file
 * system, not over the size limit); the caller reads it and closes `fd`, and stops at the limit.
 */
export function openInputFile(path: string, maxBytes: number, what = 'the file'): { fd: number; size: number } {
  const fd = openInput(path, what);
  try {
    const stat = fstatSync(fd);
    if (!stat.isFile()) throw new InputError(`${path}: ${what} is not a regular file (${kindOf(stat)}); name a file.`);
    if (onPseudoFileSystem(path)) {
      throw new InputError(`${path}: ${what} is on a system pseudo file system (/proc, /sys or /dev), which navassay does not read; copy the data to a regular file.`);
    }
    if (stat.size > maxBytes) throw tooLarge(path, what, maxBytes);
    return { fd, size: stat.size };
  } catch (error) {
    closeSync(fd);
    throw error;
  }
}

function openInput(path: string, what: string): number {
  try {
    // O_NONBLOCK keeps a FIFO from blocking the open; its type is refused right after.
    return openSync(path, constants.O_RDONLY | constants.O_NONBLOCK);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    const reason =
      code === 'ENOENT' ? 'it does not exist'
      : code === 'EACCES' || code === 'EPERM' ? 'permission is denied'
      : code === 'EISDIR' ? 'it is a directory'
      : code === 'ENOTDIR' ? 'a part of its path is not a directory'
      : (error as Error).message;
    throw new InputError(`${path}: cannot open ${what} because ${reason}; check the path and permissions.`);
  }
}

/**
 * True when a path, or the nearest part of it that exists, lies under /proc, /sys or /dev. Such
 * a place is never read as an input nor written as a store or report: Node's recursive mkdir
 * loops forever under /proc, and its files report sizes that are not what reading gives.
 */
export function onPseudoFileSystem(path: string): boolean {
  let current = resolve(path);
  for (;;) {
    try {
      const real = realpathSync(current);
      return PSEUDO_FILE_SYSTEMS.some((prefix) => `${real}/`.startsWith(prefix));
    } catch {
      const parent = dirname(current);
      if (parent === current) return false;
      current = parent;
    }
  }
}

function kindOf(stat: { isDirectory(): boolean; isFIFO(): boolean; isCharacterDevice(): boolean; isBlockDevice(): boolean; isSocket(): boolean }): string {
  if (stat.isDirectory()) return 'a directory';
  if (stat.isFIFO()) return 'a FIFO';
  if (stat.isCharacterDevice() || stat.isBlockDevice()) return 'a device';
  if (stat.isSocket()) return 'a socket';
  return 'not a plain file';
}

export function tooLarge(path: string, what: string, maxBytes: number): InputError {
  return new InputError(
    `${path}: ${what} is larger than the limit of ${maxBytes} bytes; raise limits.max_input_bytes in the run configuration if it is genuine.`,
  );
}

/** Bytes read per call when each run is told as it lands, so the hashing keeps pace with the read. */
const RUN_BYTES = 8 << 20;

/** Reads up to `maxBytes`; one byte more means the file is over the limit, whatever its size said. */
function readAtMost(
  fd: number,
  path: string,
  what: string,
  maxBytes: number,
  sizeHint: number,
  allocate: (size: number) => Buffer,
  told: ((run: Uint8Array) => void) | null,
): Buffer {
  let buffer = allocate(Math.min(Math.max(sizeHint, 0) + 1, maxBytes + 1, 1 << 30));
  let filled = 0;
  for (;;) {
    if (filled === buffer.length) {
      if (filled > maxBytes) throw tooLarge(path, what, maxBytes);
      const bigger = allocate(Math.min(buffer.length * 2, maxBytes + 1));
      buffer.copy(bigger, 0, 0, filled);
      buffer = bigger;
    }
    const wanted = told ? Math.min(RUN_BYTES, buffer.length - filled) : buffer.length - filled;
    const read = readSync(fd, buffer, filled, wanted, null);
    if (read === 0) break;
    // Bytes past the limit are never told: the read fails below instead.
    if (told && filled + read <= maxBytes) told(buffer.subarray(filled, filled + read));
    filled += read;
  }
  if (filled > maxBytes) throw tooLarge(path, what, maxBytes);
  return buffer.subarray(0, filled);
}

function sharedBuffer(size: number): Buffer {
  return Buffer.from(new SharedArrayBuffer(size));
}
