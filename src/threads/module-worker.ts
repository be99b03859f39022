import { Worker, type WorkerOptions } from 'node:worker_threads';

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
  return new Promise((resolve, reject) => {
    const worker = siblingModuleWorker(callerUrl, name, { workerData });
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
