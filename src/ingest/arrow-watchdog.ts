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
 * the worker, not copied per message.
 */
const WORKER_SOURCE = `
const { parentPort, workerData } = require('node:worker_threads');
import(workerData.arrowUrl)
  .then(({ tableFromIPC }) => {
    const table = tableFromIPC(workerData.bytes);
    for (const field of table.schema.fields) {
      const vector = table.getChild(field.name);
      if (vector) for (const data of vector.data) void data.length;
    }
    parentPort.postMessage({ ok: true });
  })
  .catch((error) => parentPort.postMessage({ ok: false, message: String((error && error.message) || error) }));
`;

/** Heap the decoding worker may use; its buffers are the shared file bytes. */
const WORKER_HEAP_MB = 512;

let arrowUrl: string | undefined;

function arrowModuleUrl(): string {
  arrowUrl ??= pathToFileURL(createRequire(import.meta.url).resolve('apache-arrow')).href;
  return arrowUrl;
}

export async function decodeArrowUnderWatchdog(bytes: Uint8Array, fileName: string, timeoutMs: number): Promise<void> {
  const shared = new Uint8Array(new SharedArrayBuffer(bytes.byteLength));
  shared.set(bytes);
  const worker = new Worker(WORKER_SOURCE, {
    eval: true,
    workerData: { bytes: shared, arrowUrl: arrowModuleUrl() },
    resourceLimits: { maxOldGenerationSizeMb: WORKER_HEAP_MB },
    stdout: true,
    stderr: true,
  });
  try {
    const outcome = await new Promise<{ ok: boolean; message?: string }>((resolve) => {
      const timer = setTimeout(() => resolve({ ok: false, message: `decoding took longer than ${timeoutMs} ms` }), timeoutMs);
      const settle = (result: { ok: boolean; message?: string }) => {
        clearTimeout(timer);
        resolve(result);
      };
      worker.once('message', settle);
      worker.once('error', (error) => settle({ ok: false, message: error.message }));
      worker.once('exit', (code) => settle({ ok: false, message: `the decoder stopped (exit ${code})` }));
    });
    if (!outcome.ok) {
      throw new InputError(
        `${fileName} cannot be read as an Arrow IPC file (${cutInput(outcome.message ?? 'unknown failure')}); the file is damaged or not Arrow, so export it again (limits.decode_timeout_ms raises the time allowed).`,
      );
    }
  } finally {
    await worker.terminate();
  }
}
