import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { runChild } from './child-cli.js';
import { scratchDir, writeFiles } from './run-cli.js';

/**
 * Issue: the executable ended the process while a piped standard output still held data, so
 * every answer above 64 KiB reached its reader cut. These tests run the real executable with its
 * output on a pipe whose reader is slower than the writer.
 */

/** A NAV file with thousands of unreadable rows: each is a finding, so every format's answer runs to megabytes. */
function feedWithManyFindings(dir: string): string {
  const lines = ['series_id,date,nav'];
  for (let k = 0; k < 6_000; k++) lines.push(`NVA${String(k).padStart(5, '0')},2026-11-${k % 2 ? '3O' : '31'},100.${k}`);
  writeFiles(dir, { 'nav.csv': lines.join('\n') + '\n' });
  return join(dir, 'nav.csv');
}

describe('answers reach a piped reader whole', () => {
  const dir = scratchDir();
  const nav = feedWithManyFindings(dir);

  for (const format of ['json', 'csv', 'markdown', 'html']) {
    it(`check --format ${format}: the piped answer equals the --out file byte for byte, with exit status 1 for the findings`, async () => {
      const out = join(dir, `answer.${format}`);
      const written = await runChild(['check', '--nav', nav, '--as-of', '2026-11-30', '--format', format, '--out', out]);
      expect(written.status).toBe(1);
      const piped = await runChild(['check', '--nav', nav, '--as-of', '2026-11-30', '--format', format], { slowReader: true });
      expect(piped.stderr).toBe('');
      expect(piped.status).toBe(1);
      const expected = readFileSync(out);
      expect(expected.length).toBeGreaterThan(1_000_000); // several times the 64 KiB a pipe buffers
      expect(piped.stdout.length).toBe(expected.length);
      expect(piped.stdout.equals(expected)).toBe(true);
      if (format === 'json') expect(JSON.parse(piped.stdout.toString('utf8')).findings).toHaveLength(6_000);
    });
  }

  it('a reader that closes the pipe early (| head -1) ends the run quietly, with no stack trace', () => {
    const bin = fileURLToPath(new URL('../../src/cli/bin.ts', import.meta.url));
    const shell = spawnSync('sh', ['-c', `"${process.execPath}" --import tsx "${bin}" check --nav "${nav}" --as-of 2026-11-30 --format json | head -1`], {
      encoding: 'utf8',
    });
    expect(shell.stdout.split('\n')[0]).toBe('{');
    expect(shell.stderr).toBe('');
  });
});
