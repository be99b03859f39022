import { execFileSync, spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { scratchDir } from './run-cli.js';

/**
 * The command line in a child process, bounded by a timeout, on inputs that used to hang it,
 * grow it without end or end in a stack trace: each must end with an exit status of 0 to 3
 * and, when it fails, one line on standard error, well inside the bound.
 */
const BIN = fileURLToPath(new URL('../../src/cli/bin.ts', import.meta.url));
const BOUND_MS = 60_000;

function navassay(...args: string[]): { status: number | null; signal: string | null; stderr: string } {
  const result = spawnSync(process.execPath, ['--import', 'tsx', BIN, ...args], { timeout: BOUND_MS, encoding: 'utf8' });
  return { status: result.status, signal: result.signal, stderr: result.stderr };
}

function expectCleanEnd(result: { status: number | null; signal: string | null; stderr: string }, status: number): void {
  expect(result.signal, 'the command hung and was stopped by the bound').toBeNull();
  expect(result.status).toBe(status);
  const lines = result.stderr.trim().split('\n');
  expect(lines.length).toBe(1);
  expect(lines[0]).toMatch(/^navassay: .{10,600}$/);
  expect(result.stderr).not.toMatch(/\n\s+at /); // no stack trace
}

describe('hostile inputs through the command line', () => {
  it('/dev/zero, a FIFO and a directory as the NAV file are refused with exit 3', () => {
    const dir = scratchDir();
    const fifo = join(dir, 'nav.fifo');
    execFileSync('mkfifo', [fifo]);
    for (const nav of ['/dev/zero', fifo, dir]) {
      expectCleanEnd(navassay('check', '--nav', nav, '--as-of', '2026-01-05', '--format', 'json'), 3);
    }
  }, 4 * BOUND_MS);

  it('a store under /proc is refused instead of spinning', () => {
    const dir = scratchDir();
    writeFileSync(join(dir, 'nav.csv'), 'series_id,date,nav\nNVA0001,2026-01-02,100\n');
    const result = navassay('ingest', '--nav', join(dir, 'nav.csv'), '--store', '/proc/self', '--as-of', '2026-01-05', '--format', 'json');
    expect(result.signal).toBeNull();
    expect([2, 3]).toContain(result.status);
  }, 2 * BOUND_MS);

  it('a run configuration whose quarantine would overwrite its NAV file is exit 2, and the file is untouched', () => {
    const dir = scratchDir();
    const nav = 'series_id,date,nav\nNVA0001,2026-01-02,100\n';
    writeFileSync(join(dir, 'quarantine.csv'), nav);
    writeFileSync(join(dir, 'run.yaml'), 'files: {nav: quarantine.csv}\noutput: {dir: .}\n');
    expectCleanEnd(navassay('run', join(dir, 'run.yaml'), '--as-of', '2026-01-05'), 2);
    expect(readFileSync(join(dir, 'quarantine.csv'), 'utf8')).toBe(nav);
  }, 2 * BOUND_MS);
});
