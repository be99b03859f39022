import { mkdirSync, rmSync } from 'node:fs';
import { open, type FileHandle } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';
import { renameDurably } from '../store/durable-files.js';

/**
 * Report files written atomically while the caller goes on making the next one. This thread
 * encodes each text into fresh buffers and hands them to the file system's own threads (libuv's
 * pool) with the position they go to; it waits for the disk only when too many bytes are on
 * their way, and at `finished()`. Each file takes the durable steps of `writeFileAtomically`
 * (src/report/files.ts): a temporary sibling, every byte flushed to the disk, then the rename.
 * The day's report is about 250 MB at 10,000 series, and writing it on this thread made the
 * audit wait for the disk for about a second.
 */
export class OverlappedWriter {
  private readonly files: Array<Promise<void>> = [];
  private readonly budget: ByteBudget;

  /** `maxBytesOnTheirWay`: bytes handed over and not yet written, at most (tests make it small). */
  constructor(maxBytesOnTheirWay: number = MAX_BYTES_ON_THEIR_WAY) {
    this.budget = new ByteBudget(maxBytesOnTheirWay);
  }

  /** Starts writing `text` to `path`; resolves once every byte is encoded and handed over. */
  async write(path: string, text: string | Iterable<string>): Promise<void> {
    const directory = dirname(path);
    mkdirSync(directory, { recursive: true });
    const temporary = join(directory, `.${basename(path)}.${process.pid}.tmp`);
    rmSync(temporary, { force: true }); // a leftover of an earlier run killed with this pid
    const handle = await open(temporary, 'wx');
    const writes: Array<Promise<void>> = [];
    try {
      let position = 0;
      for (const chunk of encodedChunks(text)) {
        await this.budget.take(chunk.length);
        const write = writeFully(handle, chunk, position).finally(() => this.budget.give(chunk.length));
        write.catch(() => {}); // awaited in `publish`; a failure must not count as unhandled before
        writes.push(write);
        position += chunk.length;
      }
    } catch (error) {
      await Promise.allSettled(writes);
      await handle.close();
      throw error;
    }
    const published = publish(handle, writes, temporary, path, directory);
    published.catch(() => {}); // awaited in `finished`
    this.files.push(published);
  }

  /** Resolves when every file is on the disk under its name; rejects with the first failure. */
  async finished(): Promise<void> {
    await Promise.all(this.files);
  }
}

/** Bytes handed to the file system and not yet written, at most: the rest waits to be encoded. */
const MAX_BYTES_ON_THEIR_WAY = 32 << 20;

/** The bytes of one buffer handed over at a time. */
const CHUNK_BYTES = 1 << 20;

async function publish(handle: FileHandle, writes: Array<Promise<void>>, temporary: string, path: string, directory: string): Promise<void> {
  try {
    await Promise.all(writes);
    await handle.sync();
  } finally {
    await handle.close();
  }
  renameDurably(temporary, path, directory);
}

async function writeFully(handle: FileHandle, chunk: Uint8Array, position: number): Promise<void> {
  let written = 0;
  while (written < chunk.length) {
    const { bytesWritten } = await handle.write(chunk, written, chunk.length - written, position + written);
    written += bytesWritten;
  }
}

/**
 * The UTF-8 bytes of the texts in fresh buffers of about CHUNK_BYTES (a buffer on its way to the
 * disk cannot be reused). Each text must end on a whole character, as JSON pieces do; a text
 * longer than a buffer is encoded a slice at a time, never between the halves of a pair.
 */
export function* encodedChunks(text: string | Iterable<string>): Generator<Uint8Array> {
  let buffer = Buffer.allocUnsafe(CHUNK_BYTES);
  let used = 0;
  for (const piece of typeof text === 'string' ? [text] : text) {
    for (const part of slicesOf(piece, CHUNK_BYTES / 3)) {
      // Three bytes per UTF-16 unit at most (a pair is two units for four bytes).
      if (used + part.length * 3 > buffer.length) {
        yield buffer.subarray(0, used);
        buffer = Buffer.allocUnsafe(CHUNK_BYTES);
        used = 0;
      }
      used += buffer.write(part, used, 'utf8');
    }
  }
  if (used > 0) yield buffer.subarray(0, used);
}

/** `text` in slices of at most `characters`, none ending between the two halves of a surrogate pair. */
function* slicesOf(text: string, characters: number): Generator<string> {
  if (text.length <= characters) {
    yield text;
    return;
  }
  for (let start = 0; start < text.length; ) {
    let end = Math.min(start + characters, text.length);
    if (end < text.length && isHighSurrogate(text.charCodeAt(end - 1)) && isLowSurrogate(text.charCodeAt(end))) end -= 1;
    yield text.slice(start, end);
    start = end;
  }
}

const isHighSurrogate = (code: number) => code >= 0xd800 && code <= 0xdbff;
const isLowSurrogate = (code: number) => code >= 0xdc00 && code <= 0xdfff;

/** A count of bytes that may be on their way at once; `take` waits until enough came back. */
class ByteBudget {
  private available: number;
  private readonly waiting: Array<{ bytes: number; resume: () => void }> = [];

  constructor(private readonly limit: number) {
    this.available = limit;
  }

  async take(bytes: number): Promise<void> {
    // A chunk larger than the whole budget goes alone once everything else came back.
    const needed = Math.min(bytes, this.limit);
    if (this.waiting.length === 0 && this.available >= needed) {
      this.available -= needed;
      return;
    }
    await new Promise<void>((resume) => this.waiting.push({ bytes: needed, resume }));
  }

  give(bytes: number): void {
    this.available += Math.min(bytes, this.limit);
    while (this.waiting.length > 0 && this.available >= this.waiting[0].bytes) {
      const next = this.waiting.shift()!;
      this.available -= next.bytes;
      next.resume();
    }
  }
}
