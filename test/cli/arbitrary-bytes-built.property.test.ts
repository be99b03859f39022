import { execFileSync, spawn } from 'node:child_process';
import { existsSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import fc from 'fast-check';
import { beforeAll, describe, expect, it } from 'vitest';
import { scratchDir } from './run-cli.js';

/**
 * Issue 13: arbitrary bytes as a CSV, Arrow or Parquet input and as a YAML run configuration,
 * given to the BUILT command line (tsc output run by plain Node, as an installed package runs)
 * in a child process. Every run must end within the bound, with an exit status of 0 to 3
 * (docs/interface.md; 70 would be an internal error), and when it answers, the JSON answer's row
 * accounting must be exact: rows read = accepted + rejected, one unparseable_row finding per
 * rejected row. The build goes to a folder of its own under node_modules/.cache, so the
 * package's dist/ (which other tests pack) is not written while they read it.
 */
const REPOSITORY = resolve('.');
const BUILT = join(REPOSITORY, 'node_modules', '.cache', 'navassay-built-cli');
const BIN = join(BUILT, 'src', 'cli', 'bin.js');
const BOUND_MS = 60_000;
const RUNS = { numRuns: 10 };

beforeAll(() => {
  execFileSync(process.execPath, [join(REPOSITORY, 'node_modules', 'typescript', 'bin', 'tsc'), '-p', 'tsconfig.json', '--outDir', BUILT], { cwd: REPOSITORY, stdio: 'pipe' });
  expect(existsSync(BIN)).toBe(true);
}, 600_000);

interface Ending {
  readonly status: number | null;
  readonly timedOut: boolean;
  readonly stdout: string;
  readonly stderr: string;
}

function navassay(cwd: string, args: string[]): Promise<Ending> {
  return new Promise((done, fail) => {
    const child = spawn(process.execPath, [BIN, ...args], { cwd, stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    let timedOut = false;
    const timer = setTimeout(() => {
      timedOut = true;
      child.kill('SIGKILL');
    }, BOUND_MS);
    child.stdout.on('data', (chunk: Buffer) => (stdout += chunk.toString('utf8')));
    child.stderr.on('data', (chunk: Buffer) => (stderr += chunk.toString('utf8')));
    child.on('error', fail);
    child.on('close', (status) => {
      clearTimeout(timer);
      done({ status, timedOut, stdout, stderr });
    });
  });
}

function expectCleanEnding(ending: Ending): void {
  expect(ending.timedOut, 'the command was still running at the bound').toBe(false);
  expect([0, 1, 2, 3], ending.stderr).toContain(ending.status);
  expect(ending.stderr).not.toMatch(/\n\s+at /); // no stack trace
  if (ending.status === 2 || ending.status === 3) {
    expect(ending.stderr.trim().split('\n')).toHaveLength(1);
    return;
  }
  const answer = JSON.parse(ending.stdout) as { rows: { read: number; accepted: number; rejected: number }; findings: { check: string }[] };
  expect(answer.rows.read).toBe(answer.rows.accepted + answer.rows.rejected);
  expect(answer.findings.filter((finding) => finding.check === 'unparseable_row')).toHaveLength(answer.rows.rejected);
}

const VALID_NAV = 'series_id,date,nav\nNVA0001,2026-01-02,100.5\nNVA0001,2026-01-05,100.75\n';
const COMMON = ['--as-of', '2026-01-10', '--format', 'json', '--fail-on', 'none'];

/** Arbitrary bytes, and arbitrary bytes after a plausible beginning, so both the header and the rows are reached. */
const bytesAfter = (prefix: string) =>
  fc.oneof(
    fc.uint8Array({ maxLength: 400 }).map((bytes) => Buffer.from(bytes)),
    fc.uint8Array({ maxLength: 400 }).map((bytes) => Buffer.concat([Buffer.from(prefix), bytes])),
  );

describe('arbitrary bytes through the built command line', () => {
  for (const [name, prefix] of [['nav.csv', 'series_id,date,nav\nNVA0001,2026-01-0'], ['nav.arrow', 'ARROW1\0\0'], ['nav.parquet', 'PAR1']] as const) {
    it(`as the NAV input ${name}`, async () => {
      await fc.assert(
        fc.asyncProperty(bytesAfter(prefix), async (bytes) => {
          const dir = scratchDir();
          writeFileSync(join(dir, name), bytes);
          expectCleanEnding(await navassay(dir, ['check', '--nav', name, ...COMMON]));
        }),
        RUNS,
      );
    }, 900_000);
  }

  it('as the YAML run configuration', async () => {
    await fc.assert(
      fc.asyncProperty(bytesAfter('files: {nav: nav.csv}\nprofiles:\n  '), async (bytes) => {
        const dir = scratchDir();
        writeFileSync(join(dir, 'nav.csv'), VALID_NAV);
        writeFileSync(join(dir, 'run.yaml'), bytes);
        expectCleanEnding(await navassay(dir, ['check', '--config', 'run.yaml', '--nav', 'nav.csv', ...COMMON]));
      }),
      RUNS,
    );
  }, 900_000);
});
