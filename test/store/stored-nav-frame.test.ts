import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Table, tableToIPC } from 'apache-arrow';
import fc from 'fast-check';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { arrowIpcToCanonical, canonicalToArrow, canonicalToArrowIpc } from '../../src/ingest/arrow-table.js';
import { toSeriesFrame } from '../../src/ingest/convert.js';
import type { CanonicalTable } from '../../src/ingest/table.js';
import { datedFrameOf } from '../../src/series/frame.js';
import { InputError } from '../../src/ingest/errors.js';
import { sha256Bytes } from '../../src/store/durable-files.js';
import { readStoredNavFrame } from '../../src/store/previous-nav.js';
import { readNavFrameInPart } from '../../src/store/stored-nav-frame.js';
import type { SnapshotFile } from '../../src/store/manifest.js';
import { plainFrame } from './frames.js';
import { tableFromRows } from '../ingest-formats/tables.js';

let work: string;

beforeEach(() => {
  work = mkdtempSync(join(tmpdir(), 'navassay-stored-nav-'));
});

afterEach(() => {
  rmSync(work, { recursive: true, force: true });
});

type NavRow = { readonly series_id: string; readonly date: string; readonly nav: number | null };

const row = (missing: boolean) =>
  fc.record({
    series_id: fc.constantFrom('NVA0001', 'NVA0002', 'NVA0010', 'B-7', 'Ünï 3'),
    date: fc.integer({ min: 1, max: 28 }).map((day) => `2026-02-${String(day).padStart(2, '0')}`),
    nav: missing ? fc.oneof({ weight: 9, arbitrary: fc.double({ noNaN: true }) }, { weight: 1, arbitrary: fc.constant(null) }) : fc.double({ noNaN: true }),
  });

const inStoredOrder = (rows: readonly NavRow[]) => [...rows].sort((a, b) => (a.series_id < b.series_id ? -1 : a.series_id > b.series_id ? 1 : a.date < b.date ? -1 : a.date > b.date ? 1 : 0));

/** The table as an Arrow file cut into record batches at `cuts` (empty batches included when cuts repeat). */
function arrowFileInBatches(table: CanonicalTable, cuts: readonly number[]): Uint8Array {
  const whole = canonicalToArrow(table);
  const bounds = [0, ...cuts.map((cut) => Math.min(cut, table.length)).sort((a, b) => a - b), table.length];
  const batches = bounds.slice(1).flatMap((end, k) => whole.slice(bounds[k], end).batches);
  return tableToIPC(new Table(batches), 'file');
}

function fileOf(bytes: Uint8Array): { dir: string; file: SnapshotFile } {
  const dir = mkdtempSync(join(work, 'snapshot-'));
  writeFileSync(join(dir, 'nav.arrow'), bytes);
  const file: SnapshotFile = {
    kind: 'nav',
    source_path: 'nav.csv',
    source_sha256: '0'.repeat(64),
    rows: { read: 0, accepted: 0, rejected: 0 },
    stored_file: 'nav.arrow',
    stored_sha256: sha256Bytes(bytes),
  };
  return { dir, file };
}

/** The frame as the whole file decodes through the general Arrow reader, without the lines the previous NAVs do not keep: the oracle. */
const decodedFrame = (bytes: Uint8Array) => datedFrameOf(toSeriesFrame(arrowIpcToCanonical('nav', bytes), 'nav'));


describe('the stored NAV table read in part', () => {
  it('gives the whole-file decode, in one record batch or several, for any table in stored order', () => {
    fc.assert(
      fc.property(fc.array(row(false), { maxLength: 80 }), fc.array(fc.nat(80), { maxLength: 4 }), (rows, cuts) => {
        const bytes = arrowFileInBatches(tableFromRows('nav', ['series_id', 'date', 'nav'], inStoredOrder(rows)), cuts);
        const { dir, file } = fileOf(bytes);
        const inPart = readNavFrameInPart(join(dir, file.stored_file), file.stored_sha256);
        // A table without rows has no dictionary batch to read the ids from: it is read whole.
        if (rows.length > 0) {
          expect(inPart).not.toBeNull();
          expect(plainFrame(inPart!)).toEqual(plainFrame(decodedFrame(bytes)));
          expect(inPart!.values.buffer).toBeInstanceOf(SharedArrayBuffer);
        }
        expect(plainFrame(readStoredNavFrame(dir, file))).toEqual(plainFrame(decodedFrame(bytes)));
      }),
      { numRuns: 80 },
    );
  });

  it('leaves any other table to the whole-file reader, which gives the same frame', () => {
    fc.assert(
      fc.property(fc.array(row(true), { minLength: 1, maxLength: 60 }), fc.boolean(), fc.array(fc.nat(60), { maxLength: 3 }), (rows, sorted, cuts) => {
        const bytes = arrowFileInBatches(tableFromRows('nav', ['series_id', 'date', 'nav'], sorted ? inStoredOrder(rows) : rows), cuts);
        const { dir, file } = fileOf(bytes);
        const inPart = readNavFrameInPart(join(dir, file.stored_file), file.stored_sha256);
        if (inPart) expect(plainFrame(inPart)).toEqual(plainFrame(decodedFrame(bytes)));
        expect(plainFrame(readStoredNavFrame(dir, file))).toEqual(plainFrame(decodedFrame(bytes)));
      }),
      { numRuns: 60 },
    );
  });

  it('says a truncated or altered file does not match its SHA-256, wherever it was cut or changed', () => {
    const rows = inStoredOrder(fc.sample(row(false), { numRuns: 200, seed: 7 }));
    const bytes = arrowFileInBatches(tableFromRows('nav', ['series_id', 'date', 'nav'], rows), [70, 140]);
    const { dir, file } = fileOf(bytes);
    const path = join(dir, file.stored_file);
    const message = `${path} does not match the SHA-256 in its manifest; the snapshot is damaged, so write that day again.`;
    fc.assert(
      fc.property(fc.nat(bytes.length - 1), fc.boolean(), (at, truncate) => {
        const damaged = truncate ? bytes.subarray(0, at) : Uint8Array.from(bytes, (byte, k) => (k === at ? byte ^ 0x5a : byte));
        writeFileSync(path, damaged);
        expect(() => readStoredNavFrame(dir, file)).toThrow(InputError);
        expect(() => readStoredNavFrame(dir, file)).toThrow(message);
      }),
      { numRuns: 150 },
    );
  });

  it('says a missing file is missing', () => {
    const { dir, file } = fileOf(arrowFileInBatches(tableFromRows('nav', ['series_id', 'date', 'nav'], [{ series_id: 'A', date: '2026-02-02', nav: 1 }]), []));
    rmSync(join(dir, file.stored_file));
    expect(() => readStoredNavFrame(dir, file)).toThrow(/nav\.arrow cannot be read \(it is missing\)/);
  });

  it('reads the file `run` stores as the whole-file reader frames it', () => {
    const rows = inStoredOrder(fc.sample(row(false), { numRuns: 300, seed: 11 }));
    const { dir, file } = fileOf(canonicalToArrowIpc(tableFromRows('nav', ['series_id', 'date', 'nav'], rows)));
    const stored = readFileSync(join(dir, file.stored_file));
    expect(plainFrame(readNavFrameInPart(join(dir, file.stored_file), file.stored_sha256)!)).toEqual(plainFrame(decodedFrame(stored)));
  });
});
