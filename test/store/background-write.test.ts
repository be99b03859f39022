import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { writeDemo } from '../../src/cli/commands/demo.js';
import { loadRunConfig } from '../../src/config/run-config.js';
import { parseIsoDate } from '../../src/calendar/days.js';
import { ConfigError, InputError, NavassayError } from '../../src/ingest/errors.js';
import { loadOptionsOf } from '../../src/job/daily-job.js';
import { loadDay, type Day } from '../../src/job/day.js';
import { snapshotStage, startSnapshotInBackground } from '../../src/job/stages/snapshot.js';
import { readManifest } from '../../src/store/index.js';
import { describeThrown, rebuildThrown } from '../../src/threads/thrown.js';

let work: string;

beforeEach(() => {
  work = mkdtempSync(join(tmpdir(), 'navassay-background-'));
});

afterEach(() => {
  rmSync(work, { recursive: true, force: true });
});

async function demoDay(): Promise<Day> {
  const config = loadRunConfig(writeDemo(join(work, 'demo')).at(-1)!);
  const asOf = parseIsoDate('2026-11-30')!;
  return loadDay({ paths: config.paths, asOf, load: loadOptionsOf(config, asOf) });
}

/** Every file of a snapshot by name, and its manifest without the time it was written. */
function snapshotContent(dir: string): { files: Record<string, Buffer>; manifest: unknown } {
  const files = Object.fromEntries(readdirSync(dir).filter((name) => name !== 'manifest.json').map((name) => [name, readFileSync(join(dir, name))]));
  const { created_at: _written, ...manifest } = readManifest(dir);
  return { files, manifest };
}

describe('the snapshot stage on a worker thread', () => {
  it('stores the same files and manifest as on this thread, and the same notices', async () => {
    const day = await demoDay();
    // minRows 0: the demo is small, so without it the write would stay on this thread.
    const onWorker = await startSnapshotInBackground(day, { store: join(work, 'worker-store'), feed: 'demo' }, { minRows: 0 }).stored;
    const onThisThread = await snapshotStage(day, { store: join(work, 'plain-store'), feed: 'demo' });
    expect(onWorker.ref.dir).toBe(join(work, 'worker-store', 'demo', '2026-11-30'));
    expect(snapshotContent(onWorker.ref.dir)).toEqual(snapshotContent(onThisThread.ref.dir));
    // Not an empty agreement: every table of the day was written.
    const stored = Object.keys(snapshotContent(onWorker.ref.dir).files);
    for (const result of day.feed.results) expect(stored).toContain(`${result.kind}.arrow`);
    expect(day.feed.results.length).toBeGreaterThanOrEqual(6);
    expect(onWorker.notices).toEqual(onThisThread.notices);
  });

  it('keeps a stored snapshot of the same files without starting a write, as on this thread', async () => {
    const day = await demoDay();
    const place = { store: join(work, 'store'), feed: 'demo' };
    const first = await startSnapshotInBackground(day, place, { minRows: 0 }).stored;
    const again = await startSnapshotInBackground(day, place, { minRows: 0 }).stored;
    expect(again.ref.manifest.created_at).toBe(first.ref.manifest.created_at);
    expect(again.notices).toEqual([`the snapshot of 2026-11-30 stored at ${first.ref.manifest.created_at} holds the same files; it was kept.`]);
  });

  it("rejects with the same error class, exit status and message as the write on this thread", async () => {
    const day = await demoDay();
    // A store path under a plain file cannot hold a directory.
    writeFileSync(join(work, 'not-a-dir'), 'x');
    const place = { store: join(work, 'not-a-dir', 'store'), feed: 'demo' };
    const plain = await snapshotStage(day, place).catch((error: unknown) => error);
    const fromWorker = await startSnapshotInBackground(day, place, { minRows: 0 }).stored.catch((error: unknown) => error);
    expect(plain).toBeInstanceOf(ConfigError);
    expect(fromWorker).toBeInstanceOf(ConfigError);
    expect((fromWorker as ConfigError).exitCode).toBe(2);
    expect((fromWorker as Error).message).toBe((plain as Error).message);
  });
});

describe('errors crossing threads', () => {
  // A structured clone, as postMessage makes, keeps the described error's fields.
  const crossed = (error: unknown) => rebuildThrown(structuredClone(describeThrown(error)));

  it('come back as our classes with their exit status', () => {
    const config = crossed(new ConfigError('Cannot write the store.'));
    const input = crossed(new InputError('nav.csv line 3: no date.'));
    const other = crossed(new NavassayError('Something else.', 3));
    expect(config).toBeInstanceOf(ConfigError);
    expect([config.message, (config as ConfigError).exitCode]).toEqual(['Cannot write the store.', 2]);
    expect(input).toBeInstanceOf(InputError);
    expect((input as InputError).exitCode).toBe(3);
    expect(other).toBeInstanceOf(NavassayError);
    expect((other as NavassayError).exitCode).toBe(3);
  });

  it("keep a system error's code, path and name, and turn a thrown value into an error", () => {
    const system = Object.assign(new Error("EACCES: permission denied, open '/x/y'"), { code: 'EACCES', path: '/x/y', syscall: 'open' });
    const back = crossed(system) as NodeJS.ErrnoException;
    expect([back.message, back.code, back.path, back.syscall, back.name]).toEqual([system.message, 'EACCES', '/x/y', 'open', 'Error']);
    expect(back).not.toBeInstanceOf(NavassayError);
    expect(crossed(new TypeError('bad')).name).toBe('TypeError');
    expect(crossed('a string').message).toBe('a string');
  });
});

describe('work beside a snapshot being stored', () => {
  it("tells the work's own error, and only once the write has finished", async () => {
    const { beside } = await import('../../src/job/daily-job.js');
    const order: string[] = [];
    const storing = new Promise<void>((_, reject) => setTimeout(() => { order.push('write failed'); reject(new ConfigError('store full')); }, 20));
    const failed = await beside(storing, () => {
      throw new InputError('reconcile failed');
    }).catch((error: Error) => { order.push(error.message); return error; });
    expect(failed).toBeInstanceOf(InputError);
    expect(order).toEqual(['write failed', 'reconcile failed']);
  });

  it("answers the work's result and leaves the write's failure to whoever awaits it", async () => {
    const { beside } = await import('../../src/job/daily-job.js');
    const storing = Promise.reject(new ConfigError('store full'));
    await expect(beside(storing, () => 42)).resolves.toBe(42);
    await expect(storing).rejects.toThrow('store full');
  });
});
