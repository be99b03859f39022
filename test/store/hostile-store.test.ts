import { spawn } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, truncateSync, writeFileSync } from 'node:fs';
import { hostname } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { readCsvBuffer } from '../../src/ingest/csv-reader.js';
import { NavassayError } from '../../src/ingest/errors.js';
import { DEFAULT_PROFILE } from '../../src/ingest/profile.js';
import { LOCK_FILE } from '../../src/store/feed-lock.js';
import { listSnapshots, previousReadableSnapshot, readSnapshot, scanSnapshots, writeSnapshot } from '../../src/store/index.js';
import { runCli, scratchDir, writeFiles } from '../cli/run-cli.js';

const nav = (value: number) =>
  readCsvBuffer(Buffer.from(`series_id,date,nav\nFUND-1,2026-01-02,${value}\n`), 'nav.csv', 'nav', DEFAULT_PROFILE);
const sources = [{ kind: 'nav' as const, path: 'nav.csv', sha256: '0'.repeat(64) }];
const write = (store: string, asOf: string, value: number, options = {}) =>
  writeSnapshot(store, { feed: 'f', asOf, results: [nav(value)], sources }, options);

function threeDays(): string {
  const store = join(scratchDir(), 'store');
  write(store, '2026-01-02', 2);
  write(store, '2026-01-05', 5);
  write(store, '2026-01-06', 6);
  return store;
}

describe('one damaged snapshot never bricks the store', () => {
  it('a truncated manifest makes only that snapshot unreadable, with its reason', () => {
    const store = threeDays();
    truncateSync(join(store, 'f', '2026-01-05', 'manifest.json'), 40);
    const { snapshots, unreadable } = scanSnapshots(store, 'f');
    expect(snapshots.map((s) => s.asOf)).toEqual(['2026-01-02', '2026-01-06']);
    expect(unreadable.map((s) => s.asOf)).toEqual(['2026-01-05']);
    expect(unreadable[0].reason).toMatch(/manifest\.json cannot be read as a snapshot manifest \(.*\); the snapshot is damaged/);
    expect(listSnapshots(store, 'f').length).toBe(2);
    const previous = previousReadableSnapshot(store, 'f', '2026-01-06');
    expect(previous.snapshot?.asOf).toBe('2026-01-02');
    expect(previous.skipped.map((s) => s.asOf)).toEqual(['2026-01-05']);
  });

  it('a missing stored file is skipped the same way when looking for the previous snapshot', () => {
    const store = threeDays();
    rmSync(join(store, 'f', '2026-01-05', 'nav.arrow'));
    expect(() => readSnapshot(store, 'f', '2026-01-05')).toThrow(/nav\.arrow cannot be read \(it is missing\)/);
    const previous = previousReadableSnapshot(store, 'f', '2026-01-06');
    expect(previous.snapshot?.asOf).toBe('2026-01-02');
    expect(previous.skipped[0].reason).toContain('it is missing');
  });

  it('a run after a damaged older snapshot completes, says which it skipped and why, and stores its own day', async () => {
    const dir = scratchDir();
    writeFiles(dir, {
      'nav.csv': 'series_id,date,nav\nNVA0001,2026-01-05,100\nNVA0001,2026-01-06,101\n',
      'run.yaml': 'feed: f\nfiles: {nav: nav.csv}\nstore: store\noutput: {dir: out, formats: [json]}\nfail_on: none\n',
    });
    write(join(dir, 'store'), '2026-01-02', 2);
    write(join(dir, 'store'), '2026-01-05', 5);
    writeFileSync(join(dir, 'store', 'f', '2026-01-05', 'manifest.json'), '{"format": "navassay-snap');
    const result = await runCli('run', join(dir, 'run.yaml'), '--as-of', '2026-01-06', '--format', 'json');
    expect(result.status).toBe(0);
    const answer = JSON.parse(result.stdout);
    expect(answer.skipped_snapshots).toEqual([{ as_of: '2026-01-05', reason: expect.stringContaining('cannot be read as a snapshot manifest') }]);
    expect(result.stderr.match(/skipping the stored snapshot of 2026-01-05/g)?.length).toBe(1);
    expect(listSnapshots(join(dir, 'store'), 'f').map((s) => s.asOf)).toEqual(['2026-01-02', '2026-01-06']);
  });

  it('a manifest naming a file outside its directory is damaged, not followed', () => {
    const store = threeDays();
    const path = join(store, 'f', '2026-01-05', 'manifest.json');
    writeFileSync(path, readFileSync(path, 'utf8').replace('"nav.arrow"', '"../../../etc/passwd"'));
    expect(scanSnapshots(store, 'f').unreadable[0].reason).toContain('must be <kind>.arrow');
  });
});


describe('writers of one feed are serialised by a lock', () => {
  it('waits for a live holder, then stops with "another run holds the store since …"', () => {
    const store = threeDays();
    const since = new Date().toISOString();
    writeFileSync(join(store, 'f', LOCK_FILE), JSON.stringify({ pid: process.pid, host: hostname(), since }));
    let error: NavassayError | undefined;
    try {
      write(store, '2026-01-07', 7, { lockWaitMs: 200 });
    } catch (caught) {
      error = caught as NavassayError;
    }
    expect(error?.message).toContain(`Another run holds the store at ${join(store, 'f')} since ${since} (pid ${process.pid}`);
    expect(error?.exitCode).toBe(3);
    expect(existsSync(join(store, 'f', '2026-01-07'))).toBe(false);
  });

  it('takes over a lock whose process is gone, and one older than an hour', () => {
    const store = threeDays();
    writeFileSync(join(store, 'f', LOCK_FILE), JSON.stringify({ pid: 2 ** 22 + 12345, host: hostname(), since: new Date().toISOString() }));
    write(store, '2026-01-07', 7, { lockWaitMs: 200 });
    writeFileSync(join(store, 'f', LOCK_FILE), JSON.stringify({ pid: process.pid, host: 'elsewhere', since: '2026-01-01T00:00:00.000Z' }));
    write(store, '2026-01-08', 8, { lockWaitMs: 200 });
    expect(listSnapshots(store, 'f').map((s) => s.asOf)).toEqual(['2026-01-02', '2026-01-05', '2026-01-06', '2026-01-07', '2026-01-08']);
    expect(existsSync(join(store, 'f', LOCK_FILE))).toBe(false);
  });

  it('two processes writing the same feed at once both finish, and every snapshot reads', async () => {
    const store = join(scratchDir(), 'store');
    const child = fileURLToPath(new URL('concurrent-child.ts', import.meta.url));
    const run = (firstDay: number) =>
      new Promise<number | null>((resolve) => {
        const process_ = spawn(process.execPath, ['--import', 'tsx', child, store, String(firstDay), '6'], { stdio: ['ignore', 'ignore', 'inherit'] });
        process_.once('exit', (code) => resolve(code));
      });
    const codes = await Promise.all([run(1), run(11)]);
    expect(codes).toEqual([0, 0]);
    const { snapshots, unreadable } = scanSnapshots(store, 'shared');
    expect(unreadable).toEqual([]);
    expect(snapshots.length).toBe(12);
    for (const snapshot of snapshots) expect(readSnapshot(store, 'shared', snapshot.asOf).tables.nav!.length).toBe(20000);
    expect(readdirSync(join(store, 'shared')).filter((entry) => entry.startsWith('.'))).toEqual([]);
  }, 120_000);
});

describe('a failed write cleans up its own staging directory', () => {
  it('a full disk (ENOSPC injected on the second file) leaves no staging directory and the store as it was', () => {
    const store = threeDays();
    let files = 0;
    const fullDisk = (path: string, data: Uint8Array | string) => {
      if (++files === 2) throw Object.assign(new Error(`ENOSPC: no space left on device, write '${path}'`), { code: 'ENOSPC' });
      writeFileSync(path, data);
    };
    let error: NavassayError | undefined;
    try {
      write(store, '2026-01-06', 66, { writeFile: fullDisk });
    } catch (caught) {
      error = caught as NavassayError;
    }
    expect(error?.exitCode).toBe(2);
    expect(error?.message).toMatch(/^Cannot write the snapshot into the store .* \(ENOSPC: no space left on device.*\); free space/);
    expect(readdirSync(join(store, 'f')).filter((entry) => entry.startsWith('.'))).toEqual([]);
    const kept = readSnapshot(store, 'f', '2026-01-06').tables.nav!.columns.nav;
    expect(kept.type === 'number' && kept.values[0]).toBe(6);
  });

  it("another live writer's staging directory is left alone", () => {
    const store = threeDays();
    const other = join(store, 'f', `.staging-2026-01-09-${process.ppid}-abcd1234`);
    mkdirSync(other);
    write(store, '2026-01-07', 7);
    expect(existsSync(other)).toBe(true);
  });
});
