import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { readArrowBuffer } from '../../src/ingest/arrow-reader.js';
import { writeArrowIpc } from '../../src/ingest/arrow-table.js';
import { ConfigError, InputError } from '../../src/ingest/errors.js';
import { DEFAULT_PROFILE } from '../../src/ingest/profile.js';
import type { IngestResult } from '../../src/ingest/table.js';
import { writeParquet } from '../../fixtures/parquet-writer.js';
import { readParquetBuffer } from '../../src/ingest/parquet-reader.js';
import {
  findSnapshot,
  listFeeds,
  listSnapshots,
  previousSnapshot,
  readSnapshot,
  sha256File,
  writeSnapshot,
  type SnapshotInput,
} from '../../src/store/index.js';
import { rowsOf, tableFromRows } from '../ingest-formats/tables.js';

let work: string;
let store: string;

beforeEach(() => {
  work = mkdtempSync(join(tmpdir(), 'navassay-store-'));
  store = join(work, 'store');
});

afterEach(() => {
  rmSync(work, { recursive: true, force: true });
});

const independentSha256 = (path: string) => createHash('sha256').update(readFileSync(path)).digest('hex');

/** Writes a NAV file as Arrow and reads it back as a feed, as a run would. */
function navDay(name: string, navs: (number | null)[]): { result: IngestResult; path: string } {
  const rows = navs.map((nav, index) => ({ series_id: `FUND-${index + 1}`, date: '2026-11-30', nav }));
  const path = join(work, `${name}.arrow`);
  writeArrowIpc(tableFromRows('nav', ['series_id', 'date', 'nav'], rows), path);
  return { result: readArrowBuffer(readFileSync(path), path, 'nav', DEFAULT_PROFILE), path };
}

function snapshotOf(feed: string, asOf: string, navs: (number | null)[]): SnapshotInput {
  const { result, path } = navDay(`${feed}-${asOf}`, navs);
  return { feed, asOf, results: [result], sources: [{ kind: 'nav', path, sha256: sha256File(path) }] };
}

const navsIn = (asOf: string, feed = 'north-daily') =>
  rowsOf(readSnapshot(store, feed, asOf).tables.nav!).map((row) => row.nav);

describe('sha256File', () => {
  it('gives the standard SHA-256 digest of a file', () => {
    const path = join(work, 'abc.txt');
    writeFileSync(path, 'abc');
    expect(sha256File(path)).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });
});

describe('writeSnapshot and readSnapshot', () => {
  it('stores each kind as Arrow, the rejected rows as CSV and a manifest describing the real files', async () => {
    const nav = navDay('nav-feed', [101.5, null, 99.25]);
    const masterRows = [
      { series_id: 'FUND-1', benchmark_id: 'IDX-1', currency: 'EUR', inception: '2001-03-30' },
      { series_id: 'FUND-3', benchmark_id: null, currency: null, inception: null },
    ];
    const masterPath = join(work, 'master.parquet');
    writeParquet(tableFromRows('master', ['series_id', 'benchmark_id', 'currency', 'inception'], masterRows), masterPath);
    const master = await readParquetBuffer(readFileSync(masterPath), masterPath, 'master', DEFAULT_PROFILE);
    const quirky = { file: 'odd, "quoted".csv', line: 7, raw: 'a,"b"\nc', reason: 'nav "x,y" is not a number.' };

    const ref = writeSnapshot(
      store,
      {
        feed: 'north-daily',
        asOf: '2026-11-30',
        results: [nav.result, { ...master, rejected: [quirky], rows: { read: 3, accepted: 2, rejected: 1 } }],
        sources: [
          { kind: 'master', path: masterPath, sha256: sha256File(masterPath) },
          { kind: 'nav', path: nav.path, sha256: sha256File(nav.path) },
        ],
      },
      { now: new Date('2026-11-30T18:45:00Z') },
    );

    expect(ref.dir).toBe(join(store, 'north-daily', '2026-11-30'));
    expect(readdirSync(ref.dir).sort()).toEqual(['manifest.json', 'master.arrow', 'nav.arrow', 'rejected.csv']);
    const manifest = JSON.parse(readFileSync(join(ref.dir, 'manifest.json'), 'utf8'));
    expect(manifest).toEqual({
      format: 'navassay-snapshot',
      version: 1,
      feed: 'north-daily',
      as_of: '2026-11-30',
      created_at: '2026-11-30T18:45:00.000Z',
      files: [
        {
          kind: 'nav',
          source_path: nav.path,
          source_sha256: independentSha256(nav.path),
          rows: { read: 3, accepted: 2, rejected: 1 },
          stored_file: 'nav.arrow',
          stored_sha256: independentSha256(join(ref.dir, 'nav.arrow')),
        },
        {
          kind: 'master',
          source_path: masterPath,
          source_sha256: independentSha256(masterPath),
          rows: { read: 3, accepted: 2, rejected: 1 },
          stored_file: 'master.arrow',
          stored_sha256: independentSha256(join(ref.dir, 'master.arrow')),
        },
      ],
      rejected_file: 'rejected.csv',
      rejected_rows: 2,
    });

    const loaded = readSnapshot(store, 'north-daily', '2026-11-30');
    expect(rowsOf(loaded.tables.nav!)).toEqual([
      { series_id: 'FUND-1', date: '2026-11-30', nav: 101.5 },
      { series_id: 'FUND-3', date: '2026-11-30', nav: 99.25 },
    ]);
    expect([...loaded.tables.nav!.lines]).toEqual([2, 4]); // records 1 and 3, numbered as CSV lines
    expect(rowsOf(loaded.tables.master!)).toEqual(masterRows);
    expect(loaded.rejected).toEqual([
      { file: nav.path, line: 3, raw: '{"series_id":"FUND-2","date":"2026-11-30","nav":null}', reason: 'nav is missing.' },
      quirky,
    ]);
    expect(readFileSync(join(ref.dir, 'rejected.csv'), 'utf8').split('\n')[0]).toBe('file,line,raw,reason');
  });

  it('refuses feed names that are not a plain directory name, dates that are not real, and two files of one kind', () => {
    const input = snapshotOf('north-daily', '2026-11-30', [1]);
    expect(() => writeSnapshot(store, { ...input, feed: '../elsewhere' })).toThrow(ConfigError);
    expect(() => writeSnapshot(store, { ...input, asOf: '2026-02-30' })).toThrow(/not a real YYYY-MM-DD date/);
    expect(() => writeSnapshot(store, { ...input, results: [...input.results, ...input.results] })).toThrow(/two nav files/);
    expect(() => writeSnapshot(store, { ...input, sources: [] })).toThrow(/no source for its nav file/);
    expect(existsSync(store)).toBe(false);
  });

  it('stops with an InputError when a stored table no longer matches its manifest', () => {
    const ref = writeSnapshot(store, snapshotOf('north-daily', '2026-11-30', [1, 2]));
    const stored = join(ref.dir, 'nav.arrow');
    const bytes = readFileSync(stored);
    bytes[bytes.length - 20] ^= 0xff;
    writeFileSync(stored, bytes);
    expect(() => readSnapshot(store, 'north-daily', '2026-11-30')).toThrow(InputError);
    expect(() => readSnapshot(store, 'north-daily', '2026-11-29')).toThrow(/has no snapshot of north-daily for 2026-11-29/);
  });
});

describe('finding snapshots', () => {
  it('lists a feed oldest first and finds the latest snapshot strictly before a date', () => {
    for (const asOf of ['2026-11-27', '2026-11-30', '2026-11-26']) writeSnapshot(store, snapshotOf('north-daily', asOf, [1]));
    writeSnapshot(store, snapshotOf('other-feed', '2026-11-28', [1]));

    expect(listFeeds(store)).toEqual(['north-daily', 'other-feed']);
    expect(listSnapshots(store, 'north-daily').map((s) => s.asOf)).toEqual(['2026-11-26', '2026-11-27', '2026-11-30']);
    expect(previousSnapshot(store, 'north-daily', '2026-11-30')?.asOf).toBe('2026-11-27');
    expect(previousSnapshot(store, 'north-daily', '2026-11-29')?.asOf).toBe('2026-11-27');
    expect(previousSnapshot(store, 'north-daily', '2026-11-27')?.asOf).toBe('2026-11-26');
    expect(previousSnapshot(store, 'north-daily', '2026-11-26')).toBeUndefined();
    expect(previousSnapshot(store, 'north-daily', '2026-12-31')?.asOf).toBe('2026-11-30');
    expect(previousSnapshot(store, 'no-such-feed', '2026-12-31')).toBeUndefined();
    expect(findSnapshot(store, 'north-daily', '2026-11-28')).toBeUndefined();
    expect(findSnapshot(store, 'north-daily', '2026-11-27')?.manifest.as_of).toBe('2026-11-27');
  });

  it('ignores directories that are not finished snapshots', () => {
    writeSnapshot(store, snapshotOf('north-daily', '2026-11-27', [1]));
    mkdirSync(join(store, 'north-daily', '2026-11-28'));
    mkdirSync(join(store, 'north-daily', '.staging-2026-11-29-1-abcd'));
    writeFileSync(join(store, 'north-daily', '.staging-2026-11-29-1-abcd', 'manifest.json'), '{}');
    expect(listSnapshots(store, 'north-daily').map((s) => s.asOf)).toEqual(['2026-11-27']);
  });
});

describe('atomic writes', () => {
  const hiddenEntries = () => readdirSync(join(store, 'north-daily')).filter((entry) => entry.startsWith('.'));

  it('replaces a snapshot written twice for the same date and leaves nothing behind', () => {
    writeSnapshot(store, snapshotOf('north-daily', '2026-11-30', [1, 2]));
    writeSnapshot(store, snapshotOf('north-daily', '2026-11-30', [3]));
    expect(navsIn('2026-11-30')).toEqual([3]);
    expect(listSnapshots(store, 'north-daily')).toHaveLength(1);
    expect(hiddenEntries()).toEqual([]);
  });

  it('keeps the previous snapshot when a replacement stops after staging, and cleans the leftovers on the next write', () => {
    writeSnapshot(store, snapshotOf('north-daily', '2026-11-30', [1, 2]));
    const crash = () => {
      throw new Error('killed');
    };
    expect(() =>
      writeSnapshot(store, snapshotOf('north-daily', '2026-11-30', [3]), { afterStep: (step) => step === 'staged' && crash() }),
    ).toThrow('killed');

    expect(hiddenEntries()).toHaveLength(1);
    expect(hiddenEntries()[0]).toMatch(/^\.staging-2026-11-30-/);
    expect(navsIn('2026-11-30')).toEqual([1, 2]);

    writeSnapshot(store, snapshotOf('north-daily', '2026-12-01', [4]));
    expect(hiddenEntries()).toEqual([]);
    expect(navsIn('2026-11-30')).toEqual([1, 2]);
  });

  it('still serves the previous snapshot when a replacement stops between retiring it and publishing the new one', () => {
    writeSnapshot(store, snapshotOf('north-daily', '2026-11-30', [1, 2]));
    expect(() =>
      writeSnapshot(store, snapshotOf('north-daily', '2026-11-30', [3]), {
        afterStep: (step) => {
          if (step === 'retired') throw new Error('killed');
        },
      }),
    ).toThrow('killed');

    expect(existsSync(join(store, 'north-daily', '2026-11-30'))).toBe(false);
    expect(listSnapshots(store, 'north-daily').map((s) => s.asOf)).toEqual(['2026-11-30']);
    expect(navsIn('2026-11-30')).toEqual([1, 2]);
    expect(previousSnapshot(store, 'north-daily', '2026-12-01')?.asOf).toBe('2026-11-30');

    writeSnapshot(store, snapshotOf('north-daily', '2026-12-01', [4]));
    expect(existsSync(join(store, 'north-daily', '2026-11-30', 'manifest.json'))).toBe(true);
    expect(hiddenEntries()).toEqual([]);
    expect(navsIn('2026-11-30')).toEqual([1, 2]);
  });

  it('leaves no snapshot at all when the first write of a date stops before publishing', () => {
    expect(() =>
      writeSnapshot(store, snapshotOf('north-daily', '2026-11-30', [1]), {
        afterStep: (step) => {
          if (step === 'staged') throw new Error('killed');
        },
      }),
    ).toThrow('killed');
    expect(listSnapshots(store, 'north-daily')).toEqual([]);
    expect(findSnapshot(store, 'north-daily', '2026-11-30')).toBeUndefined();
  });

  it('publishes the new snapshot once the rename is done, even if cleaning up afterwards is cut short', () => {
    writeSnapshot(store, snapshotOf('north-daily', '2026-11-30', [1]));
    expect(() =>
      writeSnapshot(store, snapshotOf('north-daily', '2026-11-30', [2]), {
        afterStep: (step) => {
          if (step === 'published') throw new Error('killed');
        },
      }),
    ).toThrow('killed');
    expect(navsIn('2026-11-30')).toEqual([2]);
    expect(hiddenEntries()[0]).toMatch(/^\.retired-2026-11-30-/);
    writeSnapshot(store, snapshotOf('north-daily', '2026-12-01', [3]));
    expect(hiddenEntries()).toEqual([]);
    expect(navsIn('2026-11-30')).toEqual([2]);
  });
});
