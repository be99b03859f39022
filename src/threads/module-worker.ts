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
