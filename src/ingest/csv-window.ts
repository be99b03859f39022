import { createHash, type Hash } from 'node:crypto';
import { closeSync, readSync } from 'node:fs';
import { BackgroundHash } from './background-hash.js';
import { openInputFile, tooLarge } from './input-file.js';

/**
 * The part of a CSV file the reader looks at: the rows of a file pass through one window of
 * bytes instead of the whole file being held, so the memory a large file needs follows its
 * columns and not its text (a 740 MiB NAV file is read through an 8 MiB window).
 *
 * `bytes` holds a run of the file; `final` says it reaches the end of the file. When the reader
 * has used up the complete rows in it, `moveOn(keepFrom)` keeps the unfinished bytes from
 * `keepFrom` on, puts them at the start and reads on after them; a row longer than the window
 * makes the window grow. The SHA-256 covers exactly the bytes read, so a snapshot's manifest
 * still describes the very bytes that were parsed. A large file is hashed on another thread
 * while this one parses (background-hash.ts): its window is then in shared memory, and a run of
 * bytes is overwritten only once the hashing thread has taken it.
 */
export interface CsvWindow {
  readonly bytes: Buffer;
  readonly final: boolean;
  /** The size of the whole input, for reserving columns. */
  readonly totalBytes: number;
  moveOn(keepFrom: number): void;
  /** Reads the rest of the input into the window at once (a file whose dates need every row to settle their order). */
  takeAll(): void;
}

/** A whole input already in memory: one final window. */
export function wholeWindow(bytes: Buffer): CsvWindow {
  return {
    bytes,
    final: true,
    totalBytes: bytes.length,
    moveOn: () => {
      throw new Error('a whole input has nothing more to read');
    },
    takeAll: () => undefined,
  };
}

/** Bytes a file window starts with. */
export const WINDOW_BYTES = 8 << 20;
/**
 * Files from this size on are hashed on another thread. Starting that thread costs some tens of
 * milliseconds, about what hashing a few tens of megabytes here costs, so small files stay here.
 */
export const BACKGROUND_HASH_BYTES = 32 << 20;

/** The SHA-256 of the bytes read, taken on this thread or on another (background-hash.ts). */
interface InputHash {
  add(bytes: Buffer): void;
  /** Blocks until the bytes added so far are no longer needed, before the window overwrites them. */
  waitUntilHashed(): void;
  sha256(): string;
  stop(): void;
}

/** The hash taken on this thread, as each run of bytes is read. */
class HashHere implements InputHash {
  private readonly hash: Hash = createHash('sha256');
  add(bytes: Buffer): void {
    this.hash.update(bytes);
  }
  waitUntilHashed(): void {}
  sha256(): string {
    return this.hash.digest('hex');
  }
  stop(): void {}
}

/** A file read window by window, within the size limit, hashing what it reads. */
export class FileWindow implements CsvWindow {
  bytes: Buffer;
  final = false;
  readonly totalBytes: number;
  private buffer: Buffer;
  private readonly hash: InputHash;
  private readonly allocate: (size: number) => Buffer;
  private readSoFar = 0;

  /** `backgroundHashBytes`: files from this size on are hashed on another thread. */
  constructor(
    private readonly fd: number,
    private readonly path: string,
    private readonly maxBytes: number,
    size: number,
    windowBytes = WINDOW_BYTES,
    backgroundHashBytes = BACKGROUND_HASH_BYTES,
  ) {
    this.totalBytes = size;
    const elsewhere = size >= backgroundHashBytes;
    this.hash = elsewhere ? new BackgroundHash() : new HashHere();
    this.allocate = elsewhere ? sharedBuffer : Buffer.allocUnsafe;
    this.buffer = this.allocate(Math.max(16, Math.min(windowBytes, size + 1)));
    this.bytes = this.buffer.subarray(0, 0);
    try {
      this.fillFrom(0);
    } catch (error) {
      this.hash.stop();
      throw error;
    }
  }

  static open(path: string, maxBytes: number, windowBytes = WINDOW_BYTES, backgroundHashBytes = BACKGROUND_HASH_BYTES): FileWindow {
    const { fd, size } = openInputFile(path, maxBytes, 'the file');
    try {
      return new FileWindow(fd, path, maxBytes, size, windowBytes, backgroundHashBytes);
    } catch (error) {
      closeSync(fd);
      throw error;
    }
  }

  moveOn(keepFrom: number): void {
    const kept = this.bytes.length - keepFrom;
    if (kept >= this.buffer.length) {
      const bigger = this.allocate(this.buffer.length * 2);
      this.bytes.copy(bigger, 0, keepFrom);
      this.buffer = bigger;
    } else {
      // The start of the window is about to be overwritten: its bytes must be hashed first.
      this.hash.waitUntilHashed();
      this.bytes.copy(this.buffer, 0, keepFrom);
    }
    this.fillFrom(kept);
  }

  takeAll(): void {
    while (!this.final) {
      const bigger = this.allocate(Math.max(this.buffer.length * 2, this.totalBytes - this.readSoFar + this.bytes.length + 1));
      this.bytes.copy(bigger, 0);
      this.buffer = bigger;
      this.fillFrom(this.bytes.length);
    }
  }

  /** Hex SHA-256 of every byte read; call once the window is final. */
  sha256(): string {
    return this.hash.sha256();
  }

  /** Closes the file and ends a hashing thread whose digest was not taken. */
  close(): void {
    this.hash.stop();
    closeSync(this.fd);
  }

  /** Fills the buffer after its first `filled` bytes; the window is final once the file ends. */
  private fillFrom(filled: number): void {
    while (filled < this.buffer.length) {
      const read = readSync(this.fd, this.buffer, filled, this.buffer.length - filled, null);
      if (read === 0) {
        this.final = true;
        break;
      }
      this.hash.add(this.buffer.subarray(filled, filled + read));
      filled += read;
      this.readSoFar += read;
      if (this.readSoFar > this.maxBytes) throw tooLarge(this.path, 'the file', this.maxBytes);
    }
    this.bytes = this.buffer.subarray(0, filled);
  }
}

/** A buffer in shared memory, which the hashing thread reads without a copy. */
function sharedBuffer(size: number): Buffer {
  return Buffer.from(new SharedArrayBuffer(size));
}
