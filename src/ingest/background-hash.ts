import { Worker } from 'node:worker_threads';

/** Slots of the shared progress array. */
const RUNS_HASHED = 0;
const DIGEST_READY = 1;

/** The hashing thread: adds each run of bytes it is told of, then gives the digest when told `null`. */
const HASHING_THREAD = `
Promise.all([import('node:worker_threads'), import('node:crypto')]).then(([{ parentPort, workerData }, { createHash }]) => {
  const progress = new Int32Array(workerData.progress);
  const digest = new Uint8Array(workerData.digest);
  const hash = createHash('sha256');
  parentPort.on('message', (run) => {
    if (run === null) {
      digest.set(Buffer.from(hash.digest('hex'), 'latin1'));
      Atomics.store(progress, ${DIGEST_READY}, 1);
      Atomics.notify(progress, ${DIGEST_READY});
      return;
    }
    hash.update(new Uint8Array(run.buffer, run.start, run.length));
    Atomics.add(progress, ${RUNS_HASHED}, 1);
    Atomics.notify(progress, ${RUNS_HASHED});
  });
});
`;

const HEX_DIGEST_LENGTH = 64;
/**
 * Longest wait for the hashing thread without any progress before giving up with an error
 * rather than waiting for ever (it only happens when the thread could not start or died).
 */
const STALL_MS = 120_000;

/**
 * The SHA-256 of an input taken on a thread of its own while this thread parses the same bytes.
 * The bytes are never copied nor read again: they stay in shared memory (a SharedArrayBuffer),
 * this thread tells the hashing thread which run of them to add next, and does not overwrite a
 * run before the hashing thread has added it (`waitUntilHashed`). So the digest is the one
 * `createHash('sha256')` gives for the very bytes that were parsed, in the order they were read.
 *
 * The hashing thread runs a few lines given as text (no module of ours to load, so it starts in a
 * few milliseconds and the same way under tsc's output and under tsx); it imports Node's modules
 * with `import()`, which works whether the text is taken as CommonJS or as an ES module (as
 * `--input-type=module`, which worker threads inherit, makes it). Messages that arrive before its
 * listener wait in its port.
 */
export class BackgroundHash {
  private readonly worker: Worker;
  private readonly progress = new Int32Array(new SharedArrayBuffer(2 * Int32Array.BYTES_PER_ELEMENT));
  private readonly digest = new Uint8Array(new SharedArrayBuffer(HEX_DIGEST_LENGTH));
  private runsSent = 0;
  private finished = false;

  constructor() {
    this.worker = new Worker(HASHING_THREAD, { eval: true, workerData: { progress: this.progress.buffer, digest: this.digest.buffer } });
    // The thread never keeps the process alive; `sha256()` or `stop()` ends it.
    this.worker.unref();
  }

  /** Adds `bytes` (a view on shared memory) to the hash, later, on the hashing thread. */
  add(bytes: Uint8Array): void {
    if (!(bytes.buffer instanceof SharedArrayBuffer)) throw new Error('BackgroundHash.add needs bytes in shared memory');
    if (bytes.length === 0) return;
    this.runsSent++;
    this.worker.postMessage({ buffer: bytes.buffer, start: bytes.byteOffset, length: bytes.length });
  }

  /** Blocks until every run added so far is hashed, so its bytes may be overwritten. */
  waitUntilHashed(): void {
    this.waitUntilRunsHashed(this.runsSent);
  }

  /** Runs added so far (a count to give `waitUntilRunsHashed` later). */
  get runsAdded(): number {
    return this.runsSent;
  }

  /** Blocks until the first `runs` runs added are hashed, so their bytes may be overwritten. */
  waitUntilRunsHashed(runs: number): void {
    this.waitFor(RUNS_HASHED, runs);
  }

  /** The hex SHA-256 of every byte added, in order; ends the hashing thread. */
  sha256(): string {
    if (this.finished) throw new Error('BackgroundHash.sha256 was already taken');
    this.worker.postMessage(null);
    this.waitFor(DIGEST_READY, 1);
    this.stop();
    return Buffer.from(this.digest).toString('latin1');
  }

  /** Ends the hashing thread without a digest (the input could not be read). */
  stop(): void {
    if (this.finished) return;
    this.finished = true;
    void this.worker.terminate();
  }

  private waitFor(slot: number, wanted: number): void {
    let seen = Atomics.load(this.progress, slot);
    while (seen < wanted) {
      if (Atomics.wait(this.progress, slot, seen, STALL_MS) === 'timed-out' && Atomics.load(this.progress, slot) === seen) {
        this.stop();
        throw new Error(`the thread hashing the input made no progress in ${STALL_MS / 1000} s`);
      }
      seen = Atomics.load(this.progress, slot);
    }
  }
}
