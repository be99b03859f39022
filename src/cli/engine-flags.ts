/**
 * Settings of the JavaScript engine (V8) for the process the executable starts itself again in
 * (huge-pages.ts). By default the engine optimises hot functions on helper threads and collects
 * garbage with helpers too. On the two cores the audit is built for, both cores already run
 * JavaScript (the check worker beside the main thread, the CSV reader, the snapshot writer), so
 * the helpers take turns from them: at 10,000 series the engine's helper threads used about
 * 4.4 s of CPU, a fifth of the whole run, of which about 2.3 s optimising code the threads that
 * run it compile for about 0.2 s themselves (docs/performance.md, "Session 9"). With the
 * optimiser and the collector on the thread that needs them, the checks take about 10 % less CPU.
 *
 * They change when and where the engine does its work, never a value: every answer is the same.
 */
export const ENGINE_FLAGS: readonly string[] = ['--no-concurrent-recompilation', '--single-threaded-gc'];

/**
 * Node's options for the process started again: the engine flags first, then the options this
 * process was given, so that a flag given by the user (say `--concurrent-recompilation`) wins,
 * as the engine takes the last of two contrary flags.
 */
export function withEngineFlags(execArgv: readonly string[]): string[] {
  return [...ENGINE_FLAGS, ...execArgv];
}
