import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { arrowIpcToCanonical } from '../../src/ingest/arrow-table.js';
import { toSeriesFrame } from '../../src/ingest/convert.js';
import { previousNav, readStoredNavFrame } from '../../src/store/previous-nav.js';
import { previousNavInBackground } from '../../src/store/previous-nav-background.js';
import { readManifest, writeSnapshot, type SnapshotInput } from '../../src/store/index.js';
import { tableFromRows } from '../ingest-formats/tables.js';
import { datedFrameOf, type DatedFrame } from '../../src/series/frame.js';
import { plainFrame } from './frames.js';

let work: string;

beforeEach(() => {
  work = mkdtempSync(join(tmpdir(), 'navassay-previous-'));
});

afterEach(() => {
  rmSync(work, { recursive: true, force: true });
});

type NavRow = {
  readonly series_id: string;
  readonly date: string;
  readonly nav: number | null;
};

function store(asOf: string, rows: readonly NavRow[], store = join(work, 'store')): string {
  const table = tableFromRows('nav', ['series_id', 'date', 'nav'], rows);
  const input: SnapshotInput = {
    feed: 'f',
    asOf,
    results: [{ file: 'nav.csv', kind: 'nav', table, rejected: [], rows: { read: rows.length, accepted: rows.length, rejected: 0 } }],
    sources: [{ kind: 'nav', path: 'nav.csv', sha256: '0'.repeat(64) }],
  };
  return writeSnapshot(store, input).dir;
}

/**
 * The frame as the stored table decodes through the general Arrow reader, without the lines the
 * previous NAVs do not keep: the oracle.
 */
function decodedFrame(dir: string): DatedFrame {
  return datedFrameOf(toSeriesFrame(arrowIpcToCanonical('nav', readFileSync(join(dir, 'nav.arrow'))), 'nav'));
}


const navFile = (dir: string) => readManifest(dir).files.find((file) => file.kind === 'nav')!;

describe('the previous NAV frame read from the store', () => {
  it('equals the decoded frame for any stored NAV table: sorted or not, repeated dates, missing values', () => {
    const row = fc.record({
      series_id: fc.constantFrom('NVA0001', 'NVA0002', 'NVA0010', 'B-7'),
      date: fc.integer({ min: 1, max: 28 }).map((day) => `2026-02-${String(day).padStart(2, '0')}`),
      nav: fc.oneof({ weight: 9, arbitrary: fc.double({ min: 0.01, max: 1e4, noNaN: true }) }, { weight: 1, arbitrary: fc.constant(null) }),
    });
    fc.assert(
      fc.property(fc.array(row, { minLength: 1, maxLength: 60 }), fc.boolean(), (rows, sorted) => {
        const ordered = sorted ? [...rows].sort((a, b) => (a.series_id + a.date < b.series_id + b.date ? -1 : 1)) : rows;
        const dir = store('2026-03-02', ordered, join(work, `store-${Math.random().toString(36).slice(2)}`));
        expect(plainFrame(readStoredNavFrame(dir, navFile(dir)))).toEqual(plainFrame(decodedFrame(dir)));
      }),
      { numRuns: 60 },
    );
  });

  it('reads a complete sorted table into shared memory, which worker threads take without a copy, and keeps no lines', () => {
    const dir = store('2026-03-02', [
      { series_id: 'NVA0001', date: '2026-03-02', nav: 100 },
      { series_id: 'NVA0001', date: '2026-03-03', nav: 101 },
      { series_id: 'NVA0002', date: '2026-03-02', nav: 50 },
    ]);
    const frame = readStoredNavFrame(dir, navFile(dir));
    expect(plainFrame(frame)).toEqual(plainFrame(decodedFrame(dir)));
    expect(frame.values.buffer).toBeInstanceOf(SharedArrayBuffer);
    expect(frame.dates.buffer).toBeInstanceOf(SharedArrayBuffer);
    // Today's feed is compared by date and value; evidence cites today's lines.
    expect('lines' in frame).toBe(false);
  });

  it('takes the latest earlier snapshot whose NAV table reads, and passes over a damaged one with its reason', () => {
    store('2026-03-02', [{ series_id: 'NVA0001', date: '2026-03-02', nav: 100 }]);
    const damaged = store('2026-03-03', [{ series_id: 'NVA0001', date: '2026-03-03', nav: 101 }]);
    store('2026-03-04', [{ series_id: 'NVA0001', date: '2026-03-04', nav: 102 }]);
    // Same length, other bytes: only the SHA-256 of the manifest can tell.
    const bytes = readFileSync(join(damaged, 'nav.arrow'));
    bytes[bytes.length - 20] ^= 0xff;
    writeFileSync(join(damaged, 'nav.arrow'), bytes);
    const previous = previousNav(join(work, 'store'), 'f', '2026-03-04');
    expect(previous.asOf).toBe('2026-03-02');
    expect([...previous.nav!.values]).toEqual([100]);
    expect(previous.skipped.map((entry) => [entry.asOf, entry.reason])).toEqual([
      ['2026-03-03', `${join(damaged, 'nav.arrow')} does not match the SHA-256 in its manifest; the snapshot is damaged, so write that day again.`],
    ]);
  });

  it('says a missing NAV file is missing, and answers nothing before the first snapshot', () => {
    store('2026-03-02', [{ series_id: 'NVA0001', date: '2026-03-02', nav: 100 }]);
    const second = store('2026-03-03', [{ series_id: 'NVA0001', date: '2026-03-03', nav: 101 }]);
    rmSync(join(second, 'nav.arrow'));
    const previous = previousNav(join(work, 'store'), 'f', '2026-03-04');
    expect(previous.asOf).toBe('2026-03-02');
    expect(previous.skipped[0].reason).toContain('it is missing');
    expect(previousNav(join(work, 'store'), 'f', '2026-03-02')).toEqual({ skipped: [] });
  });
});

describe('the previous NAVs read on a worker thread', () => {
  it('answer what the calling thread reads, damaged snapshots included, with the columns still shared', async () => {
    store('2026-03-02', [{ series_id: 'NVA0001', date: '2026-03-02', nav: 100 }, { series_id: 'NVA0002', date: '2026-03-02', nav: 7 }]);
    const damaged = store('2026-03-03', [{ series_id: 'NVA0001', date: '2026-03-03', nav: 101 }]);
    rmSync(join(damaged, 'nav.arrow'));
    // minRows 0: a small store would otherwise be read on this thread.
    const onWorker = await previousNavInBackground(join(work, 'store'), 'f', '2026-03-04', 0);
    const here = previousNav(join(work, 'store'), 'f', '2026-03-04');
    expect(plainFrame(onWorker.nav!)).toEqual(plainFrame(here.nav!));
    expect([...onWorker.nav!.indexById]).toEqual([...here.nav!.indexById]);
    expect(onWorker.skipped).toEqual(here.skipped);
    expect(onWorker.asOf).toBe('2026-03-02');
    expect(onWorker.nav!.values.buffer).toBeInstanceOf(SharedArrayBuffer);
  });

  it("answer as the calling thread on a feed's first day, damaged earlier snapshots told, without reading a table", async () => {
    const damaged = store('2026-03-02', [{ series_id: 'NVA0001', date: '2026-03-02', nav: 100 }]);
    writeFileSync(join(damaged, 'manifest.json'), '{ not json');
    store('2026-03-05', [{ series_id: 'NVA0001', date: '2026-03-05', nav: 102 }]);
    const here = previousNav(join(work, 'store'), 'f', '2026-03-04');
    expect(here.skipped.map((entry) => entry.asOf)).toEqual(['2026-03-02']);
    expect(here.nav).toBeUndefined();
    for (const minRows of [0, Infinity]) expect(await previousNavInBackground(join(work, 'store'), 'f', '2026-03-04', minRows)).toEqual(here);
    expect(await previousNavInBackground(join(work, 'empty-store'), 'f', '2026-03-04')).toEqual(previousNav(join(work, 'empty-store'), 'f', '2026-03-04'));
  });

  it('reject with the error class the calling thread would throw', async () => {
    await expect(previousNavInBackground(join(work, 'store'), '../outside', '2026-03-04', 0)).rejects.toThrow();
    let here: unknown;
    try {
      previousNav(join(work, 'store'), '../outside', '2026-03-04');
    } catch (error) {
      here = error;
    }
    const there = await previousNavInBackground(join(work, 'store'), '../outside', '2026-03-04', 0).catch((error: unknown) => error);
    expect(there).toBeInstanceOf((here as object).constructor);
    expect((there as Error).message).toBe((here as Error).message);
  });
});
