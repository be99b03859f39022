/**
 * Check workers started ahead of the checks stage. A worker's start-up (a fresh isolate that
 * loads the check modules: 0.2–0.4 s of one core on the development machine) otherwise falls
 * inside the checks stage, where this thread is busy with the feed-level checks and the risk
 * figures and every core counts; started while the feed is read, it is paid beside the reading,
 * and the worker waits, idle, for its job (src/checks/check-worker.ts). A worker never handed a
 * job is ended by `release`; while it waits it does not keep the process alive.
 */
import { statSync } from 'node:fs';
import type { Worker } from 'node:worker_threads';
import { siblingModuleWorker } from '../threads/module-worker.js';

/** A started worker and whether it has stopped (a failed start) before any job. */
interface Waiting {
  readonly worker: Worker;
  stopped: boolean;
}

export class CheckWorkers {
  private readonly waiting: Waiting[] = [];

  /** Starts `count` check workers, which wait for their job. */
  constructor(count: number) {
    for (let i = 0; i < count; i++) this.waiting.push(startWaiting());
  }

  /**
   * `count` check workers for a job: those started ahead first, fresh ones for the rest or for
   * any that stopped; the caller posts each its job and waits for its answer.
   */
  take(count: number): Worker[] {
    const taken: Worker[] = [];
    while (taken.length < count) {
      const next = this.waiting.shift();
      if (next && next.stopped) continue;
      const worker = next?.worker ?? siblingModuleWorker(import.meta.url, 'check-worker');
      // Its answer is awaited now: the process waits for it too.
      worker.ref();
      taken.push(worker);
    }
    return taken;
  }

  /** Ends the workers no job took (a small feed, one thread, or a run that failed before its checks). */
  release(): void {
    for (const { worker } of this.waiting.splice(0)) void worker.terminate();
  }
}

function startWaiting(): Waiting {
  const worker = siblingModuleWorker(import.meta.url, 'check-worker');
  const waiting: Waiting = { worker, stopped: false };
  // A worker that fails to start is replaced by a fresh one when its job comes, which reports the error.
  worker.on('error', () => {});
  worker.once('exit', () => (waiting.stopped = true));
  worker.unref();
  return waiting;
}

/**
 * A NAV file this large holds far more rows than `MIN_ROWS_FOR_A_WORKER` in any format (about 30
 * bytes a row in CSV, 10 in Parquet): its checks will take workers, so they are started with the
 * reading. A smaller feed starts none ahead, and one that does need workers starts them at its checks.
 */
export const NAV_BYTES_FOR_WORKERS_AHEAD = 16 * 2 ** 20;

/** The check workers a run of `threads` threads will use, started now when the NAV file is large enough to need them. */
export function checkWorkersAhead(navPath: string | undefined, threads: number): CheckWorkers {
  return new CheckWorkers(threads > 1 && navPath !== undefined && sizeOf(navPath) >= NAV_BYTES_FOR_WORKERS_AHEAD ? threads - 1 : 0);
}

/** The file's size, or 0 when it cannot be read (the reading will say why). */
function sizeOf(path: string): number {
  try {
    return statSync(path).size;
  } catch {
    return 0;
  }
}
