import { closeSync, readSync } from 'node:fs';
import { MessageChannel, receiveMessageOnPort, type Worker } from 'node:worker_threads';
import { siblingModuleWorker } from '../threads/module-worker.js';
import { rebuildThrown } from '../threads/thrown.js';
import { BackgroundHash } from './background-hash.js';
import { estimateRows, settleLayout, windowArraysFor, windowRowsFor, type CsvLayout, type WindowArrays, type WindowRows } from './csv-reader.js';
import { WindowStitcher } from './csv-stitch.js';
import { openInputFile, tooLarge } from './input-file.js';
import type { ReadLimits } from './limits.js';
import type { FeedProfile } from './profile.js';
import type { FileKind } from './schema.js';
import type { IngestResult } from './table.js';
import { parseRingWindow, WindowRing, type ParsedWindow } from './window-ring.js';

/**
 * Files from this size on are parsed on two threads. The worker's start-up (a fresh isolate
 * loading the reader's modules, some tens of milliseconds, hidden behind the first reads) and the
 * joining of the windows pay off only on files of many windows: in practice the NAV file.
 */
export const TWO_THREAD_BYTES = 64 << 20;
/**
 * Windows in the ring (8 MiB each): one per parser, the one being read, and room for the hashing
 * thread to fall behind (a slot is read into again only once its bytes are hashed) on a busy machine.
 */
const SLOTS = 6;
const LF = 10;
/** Longest wait for the worker without its posting a window (it only happens when it died). */
const STALL_MS = 120_000;

/** Why the two threads give the file back to the one-thread reader. */
class GiveUp extends Error {}

/**
 * Reads a large CSV file with its rows parsed on two threads, or answers null for the one-thread
 * reader (a file under `twoThreadBytes`, or one the two threads cannot split).
 *
 * This thread reads the file into a ring of windows (window-ring.ts), each cut just after its last
 * line feed (the rest of its last line starts the next window); the hashing thread takes the
 * SHA-256 of the bytes as they are read (background-hash.ts). Whichever parser is free, this
 * thread or the worker (csv-ring-worker.ts), takes the next window and reads its rows into
 * columns of its own (`readWindowRows`); this thread joins the finished windows in file order
 * (csv-stitch.ts), and reads on as windows are joined. So the threads never wait for each other
 * window by window: the reading thread only waits when the ring is full of windows still being
 * parsed, the worker only when every window read is taken.
 *
 * The answer is the one-thread reader's. A window is cut at a line feed, so it holds whole lines,
 * and each of its rows is the one-thread reader's when a row starts where it starts; that holds for
 * the first window and then, window by window, as long as no row runs past a window's end. A row
 * can only do that through a quoted field that finds no closing quote in its window (a quoted field
 * may span lines): the window then answers `spilled`, and the whole file goes back to the one-thread
 * reader, as does a file whose header the first window does not settle (it would grow the window)
 * or a line longer than a window. Such files are rare and are read twice.
 */
export function readCsvOnTwoThreads(
  path: string,
  kind: FileKind,
  profile: FeedProfile,
  limits: ReadLimits,
  windowBytes: number,
  twoThreadBytes: number,
): { result: IngestResult; sha256: string } | null {
  const { fd, size } = openInputFile(path, limits.maxInputBytes, 'the file');
  try {
    if (size < twoThreadBytes) return null;
    const read = new TwoThreadRead(fd, path, limits.maxInputBytes, size, windowBytes);
    try {
      return read.run(kind, profile, limits);
    } catch (error) {
      if (error instanceof GiveUp) return null;
      throw error;
    } finally {
      read.close();
    }
  } finally {
    closeSync(fd);
  }
}

class TwoThreadRead {
  // Started first, so the worker loads its modules while this thread reads the first window.
  private readonly worker: Worker = siblingModuleWorker(import.meta.url, 'csv-ring-worker');
  private readonly channel = new MessageChannel();
  private readonly hash = new BackgroundHash();
  private readonly ring: WindowRing;
  /** Runs of bytes handed to the hashing thread up to the end of each window. */
  private readonly runsThrough: number[] = [];
  private windowsRead = 0;
  private bytesRead = 0;
  private atEnd = false;
  /** The bytes after the last window's last line feed, in its slot: the start of the next window. */
  private carry = { from: 0, to: 0 };
  private done = false;

  constructor(
    private readonly fd: number,
    private readonly path: string,
    private readonly maxBytes: number,
    private readonly size: number,
    windowBytes: number,
  ) {
    // The thread never keeps the process alive; it ends when the ring stops.
    this.worker.unref();
    // A worker that fails to start never takes a window, and this thread parses them all; the
    // error event would otherwise end the process.
    this.worker.on('error', () => undefined);
    this.ring = WindowRing.create(SLOTS, Math.max(16, Math.min(windowBytes, size + 1)));
  }

  run(kind: FileKind, profile: FeedProfile, limits: ReadLimits): { result: IngestResult; sha256: string } {
    const filled = this.fillNextSlot();
    const layout = this.layoutOfFirstWindow(filled, kind, profile, limits);
    this.publish(filled, layout.firstRow);
    const rowsPerSlot = windowRowsFor(layout, this.ring.window(0).bytes, this.ring.slots[0].length);
    const arrays = this.ring.slots.map(() => windowArraysFor(layout, rowsPerSlot));
    const stitcher = new WindowStitcher(layout, estimateRows(this.ring.slots[0], layout.headerStart, this.size));
    const job = { layout, ring: this.ring.shared, arrays, columns: stitcher.memory(), port: this.channel.port2 };
    this.worker.postMessage(job, [this.channel.port2]);
    this.parseAndJoin(layout, arrays, stitcher);
    this.done = true;
    return { result: stitcher.finish(), sha256: this.hash.sha256() };
  }

  close(): void {
    this.ring.stop();
    this.channel.port1.close();
    if (!this.done) {
      this.hash.stop();
      void this.worker.terminate();
    }
  }

  /**
   * The layout as the one-thread reader settles it from its first window, which is this one (the
   * same size). Whatever would make that reader grow its window, or throw, gives the file back to
   * it: it then throws the same error, or reads the file.
   */
  private layoutOfFirstWindow(filled: number, kind: FileKind, profile: FeedProfile, limits: ReadLimits): CsvLayout {
    const firstWindow = {
      bytes: this.ring.slots[0].subarray(0, filled),
      final: this.atEnd,
      totalBytes: this.size,
      moveOn: () => {
        throw new GiveUp();
      },
      takeAll: () => {
        throw new GiveUp();
      },
    };
    try {
      return settleLayout(firstWindow, this.path, kind, profile, limits);
    } catch {
      throw new GiveUp();
    }
  }

  /**
   * Until every window is joined: join the finished windows in order, keep the ring full, parse the
   * next window no one has taken, and wait for the worker only when there is nothing else to do.
   */
  private parseAndJoin(layout: CsvLayout, arrays: WindowArrays[], stitcher: WindowStitcher): void {
    const parsed = new Map<number, WindowRows>();
    let joined = 0;
    for (;;) {
      const posted = this.ring.posted;
      this.takePosted(parsed);
      for (let rows = parsed.get(joined); rows !== undefined; rows = parsed.get(joined)) {
        if (rows.spilled) throw new GiveUp();
        parsed.delete(joined);
        stitcher.append(rows);
        this.ring.markJoined(stitcher.rows);
        joined++;
      }
      if (this.atEnd && joined === this.windowsRead) return;
      if (!this.atEnd && this.windowsRead - joined < SLOTS) {
        this.publish(this.fillNextSlot(), 0);
        continue;
      }
      const window = this.ring.claim();
      if (window >= 0) {
        parsed.set(window, parseRingWindow(layout, this.ring, window, arrays));
        continue;
      }
      if (!this.ring.waitForPost(posted, STALL_MS)) throw new Error(`the thread parsing ${this.path} made no progress in ${STALL_MS / 1000} s`);
    }
  }

  /** The windows the worker posted since last asked (the port is read without the event loop). */
  private takePosted(parsed: Map<number, WindowRows>): void {
    for (let message = receiveMessageOnPort(this.channel.port1); message !== undefined; message = receiveMessageOnPort(this.channel.port1)) {
      const posted = message.message as ParsedWindow;
      if ('thrown' in posted) throw rebuildThrown(posted.thrown);
      parsed.set(posted.window, posted.rows);
    }
  }

  /**
   * Reads the next window into its slot, after the bytes carried from the window before, until the
   * slot is full or the file ends; answers the bytes in the slot. The slot's previous window was
   * joined (the caller keeps the ring to SLOTS windows), and its bytes must be hashed first.
   */
  private fillNextSlot(): number {
    const window = this.windowsRead;
    const slot = this.ring.slotOf(window);
    if (window >= SLOTS) this.hash.waitUntilRunsHashed(this.runsThrough[window - SLOTS]);
    let filled = window === 0 ? 0 : this.ring.slotOf(window - 1).copy(slot, 0, this.carry.from, this.carry.to);
    while (filled < slot.length) {
      const read = readSync(this.fd, slot, filled, slot.length - filled, null);
      if (read === 0) {
        this.atEnd = true;
        break;
      }
      this.hash.add(slot.subarray(filled, filled + read));
      filled += read;
      this.bytesRead += read;
      if (this.bytesRead > this.maxBytes) throw tooLarge(this.path, 'the file', this.maxBytes);
    }
    this.runsThrough[window] = this.hash.runsAdded;
    return filled;
  }

  /**
   * Publishes the window just read: the whole slot at the end of the file, else up to just after
   * its last line feed, the rest carried into the next window. A slot without a line feed after
   * `start` (a line longer than a window) gives the file back to the one-thread reader.
   */
  private publish(filled: number, start: number): void {
    const window = this.windowsRead;
    const slot = this.ring.slotOf(window);
    let length = filled;
    if (!this.atEnd) {
      length = slot.lastIndexOf(LF, filled - 1) + 1;
      if (length <= start) throw new GiveUp();
      this.carry = { from: length, to: filled };
    }
    this.windowsRead++;
    this.ring.publish(window, length, start, this.atEnd);
    if (this.atEnd) this.ring.stop();
  }
}
