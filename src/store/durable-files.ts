import { closeSync, fsyncSync, openSync, readSync, renameSync, rmSync, writeSync } from 'node:fs';
import { createHash } from 'node:crypto';

/**
 * File-system steps whose order makes a snapshot write atomic: data reaches the disk (fsync)
 * before the rename that publishes it, and the rename reaches the disk before the next step.
 */

/** Writes a whole file and flushes it to the disk before returning. */
export function writeFileDurably(path: string, data: Uint8Array | string | Iterable<string>): void {
  const fd = openSync(path, 'wx');
  try {
    if (data instanceof Uint8Array) writeAll(fd, data);
    else if (typeof data === 'string') for (const piece of utf8Pieces(data)) writeAll(fd, piece);
    else writeTexts(fd, data);
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
}

function writeAll(fd: number, bytes: Uint8Array): void {
  let written = 0;
  while (written < bytes.length) written += writeSync(fd, bytes, written, bytes.length - written);
}

/**
 * Writes texts as they come through one reused buffer. Each text is encoded as soon as it is
 * handed over, so it dies young: holding small pieces until a batch is full let them outlive the
 * young generation's collections and pile up as garbage until a full collection. Each text must
 * end on a whole character (not between the halves of a surrogate pair), as JSON pieces do.
 */
function writeTexts(fd: number, texts: Iterable<string>): void {
  const buffer = Buffer.allocUnsafe(WRITE_BUFFER_BYTES);
  let used = 0;
  const flush = () => {
    writeAll(fd, buffer.subarray(0, used));
    used = 0;
  };
  for (const text of texts) {
    // Three bytes per UTF-16 unit at most (a pair is two units for four bytes).
    if (used + text.length * 3 > buffer.length) flush();
    if (text.length * 3 > buffer.length) for (const piece of utf8Pieces(text)) writeAll(fd, piece);
    else used += buffer.write(text, used, 'utf8');
  }
  flush();
}

const WRITE_BUFFER_BYTES = 1 << 20;

/** Characters encoded at a time: a large text is never copied whole into one buffer. */
const PIECE_CHARACTERS = 1 << 22;

/**
 * The UTF-8 bytes of `text`, a piece at a time. A piece never ends between the two halves of a
 * surrogate pair, so the pieces together are exactly `Buffer.from(text, 'utf8')`.
 */
export function* utf8Pieces(text: string, pieceCharacters: number = PIECE_CHARACTERS): Generator<Uint8Array> {
  for (let start = 0; start < text.length; ) {
    let end = Math.min(start + pieceCharacters, text.length);
    if (end < text.length && isHighSurrogate(text.charCodeAt(end - 1)) && isLowSurrogate(text.charCodeAt(end))) {
      end = end - 1 > start ? end - 1 : end + 1; // keep the pair together, in this piece if it is all there is
    }
    yield Buffer.from(text.slice(start, end), 'utf8');
    start = end;
  }
}

const isHighSurrogate = (code: number) => code >= 0xd800 && code <= 0xdbff;
const isLowSurrogate = (code: number) => code >= 0xdc00 && code <= 0xdfff;

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
  const fd = openSync(path, 'r');
  try {
    return sha256OfOpenFile(fd, Buffer.allocUnsafe(HASH_CHUNK));
  } finally {
    closeSync(fd);
  }
}

/** SHA-256 of an open file from its first byte to its end, read through `buffer` (a caller's scratch). */
export function sha256OfOpenFile(fd: number, buffer: Uint8Array): string {
  const hash = createHash('sha256');
  let read: number;
  for (let at = 0; (read = readSync(fd, buffer, 0, buffer.length, at)) > 0; at += read) hash.update(buffer.subarray(0, read));
  return hash.digest('hex');
}

export function sha256Bytes(bytes: Uint8Array | string): string {
  return createHash('sha256').update(bytes).digest('hex');
}
