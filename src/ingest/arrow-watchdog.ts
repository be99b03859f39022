import { createRequire } from 'node:module';
import { pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import { cutInput, InputError } from './errors.js';

/**
 * A damaged Arrow file can make the Arrow library itself loop for hours while it decodes the
 * file's metadata (a field count or message length of billions), before navassay's own checks
 * (arrow-validate.ts) see anything. So an Arrow input is first decoded once in a worker thread
 * under a time limit: a file that does not decode in time is refused, and the worker, loop and
 * all, is stopped. A file that decodes is then read normally. The file's bytes are shared with
 * the worker, not copied per message (nor at all when they were read into shared memory, see
 * `readInputFile`).
 *
 * One worker serves every Arrow file of a process, one file at a time: starting a worker and
 * loading the Arrow library in it costs more than decoding a feed's small files, and a feed has
 * up to seven. It is stopped after a failure or a timeout, and a fresh one serves the next file;
 * between files it does not keep the process alive.
 */
/*
 * The source is evaluated as a CommonJS script, or as an ES module when the process was started
 * with --input-type=module (workers inherit it); `import()` works in both, `require` only in the
 * first. Messages posted before the listener is attached wait in the port.
 */
const WORKER_SOURCE = `
import('node:worker_threads').then(({ parentPort, workerData }) => {
  const library = import(workerData.arrowUrl);
  parentPort.on('message', (bytes) => {
    library
      .then(({ tableFromIPC }) => {
        const table = tableFromIPC(bytes);
        for (const field of table.schema.fields) {
          const vector = table.getChild(field.name);
          if (vector) for (const data of vector.data) void data.length;
        }
        parentPort.postMessage({ ok: true });
      })
      .catch((error) => parentPort.postMessage({ ok: false, message: String((error && error.message) || error) }));
  });
});
`;

/** Heap the decoding worker may use; its buffers are the shared file bytes. */
const WORKER_HEAP_MB = 512;

let arrowUrl: string | undefined;

function arrowModuleUrl(): string {
  arrowUrl ??= pathToFileURL(createRequire(import.meta.url).resolve('apache-arrow')).href;
  return arrowUrl;
}

type Outcome = { ok: boolean; message?: string };

/** The worker that decodes, started on first use; undefined after it was stopped. */
let decoder: Worker | undefined;
/** Files wait here for their turn, so each file's time limit covers its own decoding only. */
let queue: Promise<void> = Promise.resolve();

function startDecoder(): Worker {
  const worker = new Worker(WORKER_SOURCE, {
    eval: true,
    workerData: { arrowUrl: arrowModuleUrl() },
    resourceLimits: { maxOldGenerationSizeMb: WORKER_HEAP_MB },
    stdout: true,
    stderr: true,
  });
  worker.unref();
  return worker;
}

export async function decodeArrowUnderWatchdog(bytes: Uint8Array, fileName: string, timeoutMs: number): Promise<void> {
  const previous = queue;
  let done!: () => void;
  queue = new Promise((resolve) => (done = resolve));
  await previous;
  try {
    const outcome = await decodeInWorker(sharedBytes(bytes), timeoutMs);
    if (!outcome.ok) {
      throw new InputError(
        `${fileName} cannot be read as an Arrow IPC file (${cutInput(outcome.message ?? 'unknown failure')}); the file is damaged or not Arrow, so export it again (limits.decode_timeout_ms raises the time allowed).`,
      );
    }
  } finally {
    done();
  }
}

/**
 * Stops the idle decoder once a batch of files is read. An idle worker runs no garbage
 * collection, so the last file it decoded (the NAV table, 500 MB at 10,000 series) stayed
 * reachable from its heap, and shared memory is freed only when every thread lets it go.
 */
export async function releaseArrowDecoder(): Promise<void> {
  await queue;
  const worker = decoder;
  decoder = undefined;
  if (worker) await worker.terminate();
}

/** The bytes in shared memory: a view of them when they already are, else one copy. */
function sharedBytes(bytes: Uint8Array): Uint8Array {
  if (bytes.buffer instanceof SharedArrayBuffer) return bytes;
  const shared = new Uint8Array(new SharedArrayBuffer(bytes.byteLength));
  shared.set(bytes);
  return shared;
}

async function decodeInWorker(bytes: Uint8Array, timeoutMs: number): Promise<Outcome> {
  const worker = (decoder ??= startDecoder());
  worker.ref(); // the answer is awaited: keep the process alive until it comes
  const outcome = await new Promise<Outcome>((resolve) => {
    const settle = (result: Outcome) => {
      clearTimeout(timer);
      worker.off('message', settle);
      worker.off('error', onError);
      worker.off('exit', onExit);
      resolve(result);
    };
    const onError = (error: Error) => settle({ ok: false, message: error.message });
    const onExit = (code: number) => settle({ ok: false, message: `the decoder stopped (exit ${code})` });
    const timer = setTimeout(() => settle({ ok: false, message: `decoding took longer than ${timeoutMs} ms` }), timeoutMs);
    worker.on('message', settle);
    worker.once('error', onError);
    worker.once('exit', onExit);
    worker.postMessage(bytes);
  });
  worker.unref();
  if (!outcome.ok) {
    // A worker that failed or ran out of time may still be looping or hold a broken heap.
    decoder = undefined;
    await worker.terminate();
  }
  return outcome;
}
