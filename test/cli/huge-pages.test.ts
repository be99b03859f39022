import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { ENGINE_FLAGS, withEngineFlags } from '../../src/cli/engine-flags.js';
import { environmentWithHugePages, HUGE_PAGES_SWITCH, startAgain } from '../../src/cli/huge-pages.js';

const CHILD = fileURLToPath(new URL('./huge-pages-child.ts', import.meta.url));

/** Runs the stand-in for the executable with no tunables set (an undefined variable is left out of a child's environment). */
function runStandIn(ending: string, overrides: NodeJS.ProcessEnv = {}, nodeOptions: string[] = []) {
  return spawnSync(process.execPath, [...nodeOptions, '--import', 'tsx', CHILD, ending], { encoding: 'utf8', env: { ...process.env, GLIBC_TUNABLES: undefined, ...overrides } });
}

/** What the stand-in prints when it runs in the process started again with the engine's settings. */
const STARTED_AGAIN = 'tunables=glibc.malloc.hugetlb=1\noptions=--no-concurrent-recompilation --single-threaded-gc\n';

describe('asking for huge pages', () => {
  it('adds the tunable on Linux, after any the environment sets, once', () => {
    expect(environmentWithHugePages({ PATH: '/bin' }, 'linux')).toEqual({ PATH: '/bin', GLIBC_TUNABLES: 'glibc.malloc.hugetlb=1' });
    expect(environmentWithHugePages({ GLIBC_TUNABLES: 'glibc.malloc.arena_max=2' }, 'linux')?.GLIBC_TUNABLES).toBe('glibc.malloc.arena_max=2:glibc.malloc.hugetlb=1');
    expect(environmentWithHugePages({ GLIBC_TUNABLES: 'glibc.malloc.hugetlb=1' }, 'linux')).toBeNull();
    expect(environmentWithHugePages({ GLIBC_TUNABLES: 'glibc.malloc.hugetlb=0' }, 'linux')).toBeNull(); // the user's choice stands
  });

  it('starts no second process elsewhere or when switched off', () => {
    expect(environmentWithHugePages({}, 'darwin')).toBeNull();
    expect(environmentWithHugePages({}, 'win32')).toBeNull();
    expect(environmentWithHugePages({ [HUGE_PAGES_SWITCH]: '0' }, 'linux')).toBeNull();
    expect(environmentWithHugePages({ [HUGE_PAGES_SWITCH]: '1' }, 'linux')).not.toBeNull();
  });

  it.runIf(process.platform === 'linux')('runs the command in a process with the tunable, and ends with its exit status', () => {
    for (const status of [0, 1, 3]) {
      const run = runStandIn(String(status));
      expect(run.stdout).toBe(STARTED_AGAIN);
      expect(run.status).toBe(status);
    }
  });

  it.runIf(process.platform === 'linux')('ends with the signal that ended the process started again', () => {
    const run = runStandIn('SIGTERM');
    expect(run.stdout).toBe(STARTED_AGAIN);
    expect(run.signal).toBe('SIGTERM');
  });

  it('runs the command itself when switched off', () => {
    const run = runStandIn('0', { [HUGE_PAGES_SWITCH]: '0' });
    expect(run.stdout).toBe('tunables=\noptions=\n');
    expect(run.status).toBe(0);
  });
});

describe("the engine's settings for the process started again", () => {
  it('come before the options the process was given, so that a contrary flag given by the user wins (the engine takes the last)', () => {
    expect(ENGINE_FLAGS).toEqual(['--no-concurrent-recompilation', '--single-threaded-gc']);
    expect(withEngineFlags([])).toEqual([...ENGINE_FLAGS]);
    expect(withEngineFlags(['--concurrent-recompilation', '--max-old-space-size=4096'])).toEqual([...ENGINE_FLAGS, '--concurrent-recompilation', '--max-old-space-size=4096']);
  });

  it('go with huge pages, in the one answer to how the executable starts itself again', () => {
    expect(startAgain({ PATH: '/bin' }, 'linux', ['--max-old-space-size=3000'])).toEqual({
      env: { PATH: '/bin', GLIBC_TUNABLES: 'glibc.malloc.hugetlb=1' },
      nodeOptions: [...ENGINE_FLAGS, '--max-old-space-size=3000'],
    });
    expect(startAgain({}, 'darwin', [])).toBeNull();
    expect(startAgain({ [HUGE_PAGES_SWITCH]: '0' }, 'linux', [])).toBeNull();
  });

  it.runIf(process.platform === 'linux')('keeps the options the user gave node, after the engine flags', () => {
    const run = runStandIn('0', {}, ['--max-old-space-size=3000']);
    expect(run.stdout).toBe('tunables=glibc.malloc.hugetlb=1\noptions=--no-concurrent-recompilation --single-threaded-gc --max-old-space-size=3000\n');
  });
});
