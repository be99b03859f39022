import { parentPort, Worker, type WorkerOptions } from 'node:worker_threads';
import { describeThrown, rebuildThrown, type ThrownElsewhere } from './thrown.js';

/**
 * Below this many rows a worker thread's start-up (about a tenth of a second: a fresh isolate
 * loading our modules) costs more than the work it would take off the main thread. One rule for
 * the check workers, the snapshot's writer and the reader of the previous day.
 */
export const MIN_ROWS_FOR_A_WORKER = 200_000;

/**
 * A worker thread running the module `name` that sits beside the caller's module: the compiled
 * `name.js` beside a compiled caller; under tsx and the tests, where the caller is TypeScript
 * source, a small bootstrap that registers tsx's loader in the worker first (a worker does not
 * inherit the loader of the thread that starts it).
 */
export function siblingModuleWorker(callerUrl: string, name: string, options: Omit<WorkerOptions, 'eval'> = {}): Worker {
  if (!callerUrl.endsWith('.ts')) return new Worker(new URL(`./${name}.js`, callerUrl), options);
  const source = new URL(`./${name}.ts`, callerUrl).href;
  const bootstrap = `import('tsx/esm/api').then(({ register }) => { register(); return import(${JSON.stringify(source)}); });`;
  return new Worker(bootstrap, { ...options, eval: true });
}

/**
 * Runs the sibling module `name` on a worker thread with `workerData` and answers the first
 * message it posts: the whole job of a worker that does one thing and stops. `what` names it in
 * the error of a worker that stops without answering.
 */
export function answerOfSiblingWorker<T>(callerUrl: string, name: string, workerData: unknown, what: string): Promise<T> {
  return answerOfWorker(siblingModuleWorker(callerUrl, name, { workerData }), what);
}

/**
 * The first message `worker` posts: the whole job of a worker that does one thing and stops.
 * `what` names it in the error of a worker that stops without answering.
 */
export function answerOfWorker<T>(worker: Worker, what: string): Promise<T> {
  return new Promise((resolve, reject) => {
    let answered = false;
    worker.once('message', (answer: T) => {
      answered = true;
      resolve(answer);
    });
    worker.once('error', reject);
    worker.once('exit', (code) => {
      if (!answered) reject(new Error(`${what} stopped (exit code ${code}) before answering`));
    });
  });
}

/** What a one-job worker posts: its answer, or the error it threw, described to cross threads. */
type Outcome<T> = { readonly answer: T } | { readonly thrown: ThrownElsewhere };

/** In a one-job worker: posts what `work` answers, or what it throws. */
export function postOutcomeOf<T>(work: () => T): void {
  let outcome: Outcome<T>;
  try {
    outcome = { answer: work() };
  } catch (error) {
    outcome = { thrown: describeThrown(error) };
  }
  parentPort!.postMessage(outcome);
}

/**
 * `work` of `rows` rows, on the sibling worker `name` (which calls `postOutcomeOf` with the same
 * work) when there are enough rows, else on this thread at once (`work` may answer a promise, as
 * one that loads its module first does). Either way a promise that settles with the answer, or
 * rejects with the error of the same class the work threw; it never throws itself.
 */
export function onWorkerWhenLarge<T>(
  job: { readonly callerUrl: string; readonly name: string; readonly workerData: unknown; readonly what: string },
  rows: number,
  minRows: number,
  work: () => T | PromiseLike<T>,
): Promise<T> {
  if (rows < minRows) {
    try {
      return Promise.resolve(work());
    } catch (error) {
      return Promise.reject(error);
    }
  }
  return answerOfSiblingWorker<Outcome<T>>(job.callerUrl, job.name, job.workerData, job.what).then((outcome) => {
    if ('answer' in outcome) return outcome.answer;
    throw rebuildThrown(outcome.thrown);
  });
}
