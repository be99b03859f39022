import type { ThrownElsewhere } from '../threads/thrown.js';
import { readWindowIntoSlot, type CsvLayout, type WindowArrays, type WindowRows } from './csv-reader.js';

/**
 * The ring of read windows a large CSV file is parsed through on two threads (csv-ring.ts): a few
 * slots of shared memory, each holding one window of the file (whole lines), and a small control
 * array on shared memory. The reading thread publishes windows in file order; any parsing thread
 * takes the next published window no one has taken (a compare-and-swap on one counter), so
 * neither thread waits for the other window by window.
 */
const PUBLISHED = 0; // windows read into the ring so far
const CLAIMED = 1; // windows a parser has taken so far
const STOPPED = 2; // 1 once no more windows will be published
const CHANGES = 3; // bumped at each publication and at the stop: what a parser waiting for work waits on
const POSTED = 4; // windows the worker has parsed and posted
const JOINED_ROWS = 5; // rows the main thread has joined into the file's columns
const INFO = 6; // per slot: the window's length, where its first row starts, 1 when it is the file's last
const INFO_SIZE = 3;

/** The ring as it crosses to the worker. */
export interface SharedRing {
  readonly slots: readonly SharedArrayBuffer[];
  readonly control: SharedArrayBuffer;
}

/** What the worker posts for each window it parsed. */
export type ParsedWindow = { readonly window: number; readonly rows: WindowRows } | { readonly window: number; readonly thrown: ThrownElsewhere };

export class WindowRing {
  readonly slots: readonly Buffer[];
  private readonly control: Int32Array;

  private constructor(readonly shared: SharedRing) {
    this.slots = shared.slots.map((buffer) => Buffer.from(buffer));
    this.control = new Int32Array(shared.control);
  }

  static create(slotCount: number, slotBytes: number): WindowRing {
    const slots = Array.from({ length: slotCount }, () => new SharedArrayBuffer(slotBytes));
    return new WindowRing({ slots, control: new SharedArrayBuffer((INFO + INFO_SIZE * slotCount) * Int32Array.BYTES_PER_ELEMENT) });
  }

  /** The ring another thread created. */
  static attach(shared: SharedRing): WindowRing {
    return new WindowRing(shared);
  }

  slotOf(window: number): Buffer {
    return this.slots[window % this.slots.length];
  }

  /** Publishes the next window: the first `length` bytes of its slot, its first row at `start`. */
  publish(window: number, length: number, start: number, final: boolean): void {
    const info = INFO + INFO_SIZE * (window % this.slots.length);
    this.control[info] = length;
    this.control[info + 1] = start;
    this.control[info + 2] = final ? 1 : 0;
    Atomics.store(this.control, PUBLISHED, window + 1); // after the window's facts, which it publishes with it
    this.changed();
  }

  /** No more windows will be published (the file is read, or its reading was given up). */
  stop(): void {
    Atomics.store(this.control, STOPPED, 1);
    this.changed();
  }

  /** The next published window no parser has taken, now taken; or −1 when there is none. */
  claim(): number {
    for (;;) {
      const next = Atomics.load(this.control, CLAIMED);
      if (next >= Atomics.load(this.control, PUBLISHED)) return -1;
      if (Atomics.compareExchange(this.control, CLAIMED, next, next + 1) === next) return next;
    }
  }

  /**
   * On the worker: the next window to parse, waiting for one to be published; −1 once the ring is
   * stopped and empty. While there is none it does a step of `idleWork` instead of waiting, for as
   * long as that answers true (there is more of it).
   */
  claimOrWait(idleWork: () => boolean = () => false): number {
    for (;;) {
      const changes = Atomics.load(this.control, CHANGES);
      const window = this.claim();
      if (window >= 0) return window;
      if (Atomics.load(this.control, STOPPED) === 1) return -1;
      if (idleWork()) continue;
      Atomics.wait(this.control, CHANGES, changes);
    }
  }

  /** On the main thread: the rows joined so far. */
  markJoined(rows: number): void {
    Atomics.store(this.control, JOINED_ROWS, rows);
  }

  get joinedRows(): number {
    return Atomics.load(this.control, JOINED_ROWS);
  }

  /** The window's bytes, where its first row starts and whether it is the file's last. */
  window(window: number): { bytes: Buffer; start: number; final: boolean } {
    const info = INFO + INFO_SIZE * (window % this.slots.length);
    return { bytes: this.slotOf(window).subarray(0, this.control[info]), start: this.control[info + 1], final: this.control[info + 2] === 1 };
  }

  /** On the worker, after posting a window's rows. */
  markPosted(): void {
    Atomics.add(this.control, POSTED, 1);
    Atomics.notify(this.control, POSTED);
  }

  get posted(): number {
    return Atomics.load(this.control, POSTED);
  }

  /** Waits until the worker posts more than `seen` windows; false when it did not within `timeoutMs`. */
  waitForPost(seen: number, timeoutMs: number): boolean {
    return Atomics.wait(this.control, POSTED, seen, timeoutMs) !== 'timed-out' || this.posted !== seen;
  }

  private changed(): void {
    Atomics.add(this.control, CHANGES, 1);
    Atomics.notify(this.control, CHANGES);
  }
}

/**
 * Parses one window of the ring into the arrays of its slot (`arrays[slot]`, this thread's, which
 * keeps them when the window grows them), which its previous window no longer needs (it was joined
 * before this one was read): the first window goes on from the header's line, every other one
 * counts from line 1.
 */
export function parseRingWindow(layout: CsvLayout, ring: WindowRing, window: number, arrays: WindowArrays[]): WindowRows {
  const { bytes, start, final } = ring.window(window);
  return readWindowIntoSlot(layout, bytes, start, window === 0 ? layout.firstLine : 1, final, arrays, window % arrays.length);
}
