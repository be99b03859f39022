import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { readCsvBuffer } from '../../src/ingest/csv-reader.js';
import { DEFAULT_PROFILE } from '../../src/ingest/profile.js';
import { listSnapshots, readSnapshot, writeSnapshot } from '../../src/store/index.js';

const work = mkdtempSync(join(tmpdir(), 'navassay-kill-'));
const store = join(work, 'store');
afterAll(() => rmSync(work, { recursive: true, force: true }));

/** Starts a writer, waits until it is writing, lets it run `afterMs`, then kills it with SIGKILL. */
function killWriterAfter(afterMs: number, version: number): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ['--import', 'tsx', fileURLToPath(new URL('writer-child.ts', import.meta.url)), store, work, String(version), '200000'], {
      stdio: ['ignore', 'pipe', 'inherit'],
    });
    child.stdout.once('data', () => setTimeout(() => child.kill('SIGKILL'), afterMs));
    child.once('exit', (_code, signal) => (signal === 'SIGKILL' ? resolve() : reject(new Error(`writer ended without being killed (${signal})`))));
  });
}

function navValues(): Set<number> {
  const table = readSnapshot(store, 'kill-test', '2026-11-30').tables.nav!;
  const values = table.columns.nav;
  if (values.type !== 'number') throw new Error('nav is not a number column');
  return new Set(values.values);
}

describe('a writer killed mid-write', () => {
  it('leaves either the previous snapshot or the new one, whole, every time', async () => {
    const first = readCsvBuffer(Buffer.from('series_id,date,nav\nFUND-1,2026-11-30,1\n'), 'first.csv', 'nav', DEFAULT_PROFILE);
    writeSnapshot(store, { feed: 'kill-test', asOf: '2026-11-30', results: [first], sources: [{ kind: 'nav', path: 'first.csv', sha256: '0'.repeat(64) }] });
    const seen: number[] = [];
    for (const [attempt, afterMs] of [40, 90, 150, 230, 320, 450].entries()) {
      await killWriterAfter(afterMs, attempt + 2);
      const snapshots = listSnapshots(store, 'kill-test');
      expect(snapshots.map((s) => s.asOf)).toEqual(['2026-11-30']);
      const values = navValues();
      expect(values.size, 'a snapshot never mixes two writes').toBe(1);
      const [value] = values;
      const rows = readSnapshot(store, 'kill-test', '2026-11-30').tables.nav!.length;
      expect(rows).toBe(value === 1 ? 1 : 200000);
      seen.push(value);
    }
    // After the kills, an ordinary write still succeeds and replaces the day.
    const last = readCsvBuffer(Buffer.from('series_id,date,nav\nFUND-9,2026-11-30,99\n'), 'last.csv', 'nav', DEFAULT_PROFILE);
    writeSnapshot(store, { feed: 'kill-test', asOf: '2026-11-30', results: [last], sources: [{ kind: 'nav', path: 'last.csv', sha256: '0'.repeat(64) }] });
    expect([...navValues()]).toEqual([99]);
    // The longer runs finished at least one rewrite before the kill, so both states were met.
    expect(seen.some((value) => value > 1)).toBe(true);
  });
});
