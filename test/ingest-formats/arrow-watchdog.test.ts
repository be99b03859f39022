import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { canonicalToArrowIpc } from '../../src/ingest/arrow-table.js';
import { decodeArrowUnderWatchdog, releaseArrowDecoder } from '../../src/ingest/arrow-watchdog.js';
import { InputError } from '../../src/ingest/errors.js';
import { tableFromRows } from './tables.js';

/**
 * The watchdog decodes every Arrow file of a process in one worker, one file at a time. A file
 * that runs out of time stops that worker; the next file must still be judged on its own, by a
 * fresh worker, and files sent together must each get their full time.
 */
const rows = [
  { series_id: 'FUND-A', date: '2026-11-27', nav: 101.25 },
  { series_id: 'FUND-B', date: '2026-11-27', nav: 9.87 },
];
const goodFile = () => canonicalToArrowIpc(tableFromRows('nav', ['series_id', 'date', 'nav'], rows));

describe('decodeArrowUnderWatchdog', () => {
  it('refuses a file that runs out of time, then decodes the next file in a fresh worker', async () => {
    // No decoding finishes within 0 ms: the timer fires before the worker can answer.
    await expect(decodeArrowUnderWatchdog(goodFile(), 'slow.arrow', 0)).rejects.toThrow(InputError);
    await expect(decodeArrowUnderWatchdog(goodFile(), 'slow.arrow', 0)).rejects.toThrow(/slow\.arrow.*longer than 0 ms/);
    await expect(decodeArrowUnderWatchdog(goodFile(), 'good.arrow', 30_000)).resolves.toBeUndefined();
  });

  it('judges files sent together one by one: a damaged one is refused, the others pass', async () => {
    const whole = goodFile();
    const damaged = whole.slice(0, whole.length >> 1); // cut in half: the schema message is incomplete
    const outcomes = await Promise.allSettled([
      decodeArrowUnderWatchdog(goodFile(), 'a.arrow', 30_000),
      decodeArrowUnderWatchdog(damaged, 'damaged.arrow', 30_000),
      decodeArrowUnderWatchdog(goodFile(), 'b.arrow', 30_000),
    ]);
    expect(outcomes.map((outcome) => outcome.status)).toEqual(['fulfilled', 'rejected', 'fulfilled']);
    expect(String((outcomes[1] as PromiseRejectedResult).reason.message)).toMatch(/^damaged\.arrow cannot be read as an Arrow IPC file/);
  });

  it('lets the files in hand finish before it is released, and a later file starts a fresh worker', async () => {
    const pending = decodeArrowUnderWatchdog(goodFile(), 'first.arrow', 30_000);
    await releaseArrowDecoder(); // waits for first.arrow's turn to end, then stops the worker
    await expect(pending).resolves.toBeUndefined();
    await expect(decodeArrowUnderWatchdog(goodFile(), 'later.arrow', 30_000)).resolves.toBeUndefined();
    await releaseArrowDecoder();
    await releaseArrowDecoder(); // nothing to stop: a no-op
  });

  it('decodes in a process started with --input-type=module, whose evaluated workers are ES modules', () => {
    const watchdog = fileURLToPath(new URL('../../src/ingest/arrow-watchdog.ts', import.meta.url));
    const tables = fileURLToPath(new URL('../../src/ingest/arrow-table.ts', import.meta.url));
    const rowsHere = fileURLToPath(new URL('./tables.ts', import.meta.url));
    const source = `
      const { decodeArrowUnderWatchdog, releaseArrowDecoder } = await import(${JSON.stringify(watchdog)});
      const { canonicalToArrowIpc } = await import(${JSON.stringify(tables)});
      const { tableFromRows } = await import(${JSON.stringify(rowsHere)});
      const rows = ${JSON.stringify(rows)};
      await decodeArrowUnderWatchdog(canonicalToArrowIpc(tableFromRows('nav', ['series_id', 'date', 'nav'], rows)), 'good.arrow', 30000);
      await releaseArrowDecoder();
      console.log('decoded');
    `;
    const child = spawnSync(process.execPath, ['--input-type=module', '--import', 'tsx', '-e', source], { encoding: 'utf8' });
    expect(child.stderr).toBe('');
    expect(child.stdout.trim()).toBe('decoded');
  });
});
