import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { environmentWithHugePages, HUGE_PAGES_SWITCH } from '../../src/cli/huge-pages.js';

const CHILD = fileURLToPath(new URL('./huge-pages-child.ts', import.meta.url));

/** Runs the stand-in for the executable with no tunables set (an undefined variable is left out of a child's environment). */
function runStandIn(ending: string, overrides: NodeJS.ProcessEnv = {}) {
  return spawnSync(process.execPath, ['--import', 'tsx', CHILD, ending], { encoding: 'utf8', env: { ...process.env, GLIBC_TUNABLES: undefined, ...overrides } });
}

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
      expect(run.stdout).toBe('tunables=glibc.malloc.hugetlb=1\n');
      expect(run.status).toBe(status);
    }
  });

  it.runIf(process.platform === 'linux')('ends with the signal that ended the process started again', () => {
    const run = runStandIn('SIGTERM');
    expect(run.stdout).toBe('tunables=glibc.malloc.hugetlb=1\n');
    expect(run.signal).toBe('SIGTERM');
  });

  it('runs the command itself when switched off', () => {
    const run = runStandIn('0', { [HUGE_PAGES_SWITCH]: '0' });
    expect(run.stdout).toBe('tunables=\n');
    expect(run.status).toBe(0);
  });
});
