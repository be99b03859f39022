import { spawn } from 'node:child_process';
import { withEngineFlags } from './engine-flags.js';

/**
 * Fresh memory costs a page fault per 4 KiB the first time it is written, and on the virtual
 * machines navassay runs on that costs about 4 ms of CPU per MiB: for the NAV file's columns
 * (516 MB) about as much as parsing their rows (docs/performance.md). Transparent huge pages give
 * memory 2 MiB at a time instead, but where the system gives them only to memory that asks for
 * them (`madvise`, the usual setting), a process must ask. Node allocates the memory of its
 * typed arrays with glibc's malloc, which asks for huge pages for its blocks when the tunable
 * `glibc.malloc.hugetlb=1` is set (glibc 2.35 on; older versions and other C libraries ignore it).
 * Tunables are read once, when the process starts, so the executable starts itself again with it.
 *
 * It changes where memory comes from, never a value: every answer is the same with or without it.
 */
const HUGE_PAGES_TUNABLE = 'glibc.malloc.hugetlb=1';
/** Set to 0 to run without asking for huge pages (and without starting a second process). */
export const HUGE_PAGES_SWITCH = 'NAVASSAY_HUGE_PAGES';

/**
 * The environment to start navassay again in, with huge pages asked for; or null when this
 * process runs it itself: not on Linux, switched off, or the tunable is set already (so the
 * process started again never starts a third).
 */
export function environmentWithHugePages(env: NodeJS.ProcessEnv, platform: NodeJS.Platform): NodeJS.ProcessEnv | null {
  if (platform !== 'linux' || env[HUGE_PAGES_SWITCH] === '0') return null;
  const tunables = env.GLIBC_TUNABLES ?? '';
  if (tunables.includes('glibc.malloc.hugetlb')) return null;
  return { ...env, GLIBC_TUNABLES: tunables === '' ? HUGE_PAGES_TUNABLE : `${tunables}:${HUGE_PAGES_TUNABLE}` };
}

/** What the command is started again with: its environment and Node's options. */
export interface StartAgain {
  readonly env: NodeJS.ProcessEnv;
  readonly nodeOptions: readonly string[];
}

/**
 * How the executable starts itself again, in its one place: with huge pages asked for and the
 * engine's flags (engine-flags.ts) before `execArgv`, Node's options it was given; or null when
 * it runs the command itself (see `environmentWithHugePages`).
 */
export function startAgain(env: NodeJS.ProcessEnv, platform: NodeJS.Platform, execArgv: readonly string[]): StartAgain | null {
  const withHugePages = environmentWithHugePages(env, platform);
  return withHugePages && { env: withHugePages, nodeOptions: withEngineFlags(execArgv) };
}

/** Signals a scheduler or a terminal may send this process, handed on to the process started again. */
const HANDED_ON: readonly NodeJS.Signals[] = ['SIGINT', 'SIGTERM', 'SIGHUP'];

/**
 * Runs this same command (script and arguments) again with `again`'s environment and Node's
 * options, on the same standard streams, and ends as it ends: its exit status, or the
 * signal that ended it. When the process cannot be started, `runHere` runs the command in this
 * one instead.
 */
export function runAgainIn(again: StartAgain, runHere: () => void): void {
  const child = spawn(process.execPath, [...again.nodeOptions, ...process.argv.slice(1)], { env: again.env, stdio: 'inherit' });
  const handOn = (signal: NodeJS.Signals) => child.kill(signal);
  const stopHandingOn = () => HANDED_ON.forEach((signal) => process.off(signal, handOn));
  HANDED_ON.forEach((signal) => process.on(signal, handOn));
  child.on('error', () => {
    stopHandingOn();
    runHere();
  });
  child.on('exit', (status, signal) => {
    stopHandingOn();
    if (signal !== null) process.kill(process.pid, signal);
    else process.exitCode = status ?? 1;
  });
}
