import { DateDay, Dictionary, Float64, Int32, Table, tableToIPC, Utf8, vectorFromArray } from 'apache-arrow';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { readArrowBuffer } from '../../src/ingest/arrow-reader.js';
import { DEFAULT_PROFILE } from '../../src/ingest/profile.js';
import type { Column, IngestResult } from '../../src/ingest/table.js';
import { ANY_DATE_LIMITS } from '../ingest/helpers.js';

/**
 * An Arrow file read from shared memory takes its one-chunk columns as views of the file's bytes
 * (src/ingest/arrow-reader.ts `sharedView`, `textView`); read from an ordinary buffer, every
 * column is copied. Both must give the same result, value for value, for any file: ids with
 * blanks, padding, repeats after trimming and nulls; missing dates and NAVs; one or two record
 * batches.
 */
const MILLIS_PER_DAY = 86_400_000;
const id = fc.constantFrom('FUND-A', 'FUND-B', ' FUND-A', 'FUND-C ', '', '  ', 'Fund-Ü', null);
const day = fc.option(fc.integer({ min: -40000, max: 40000 }), { nil: null, freq: 8 });
const nav = fc.option(fc.oneof(fc.double(), fc.constantFrom(0, -1, 100.25)), { nil: null, freq: 8 });
const row = fc.record({ series_id: id, date: day, nav });
const rows = fc.array(row, { minLength: 0, maxLength: 30 });

function batchOf(part: Array<{ series_id: string | null; date: number | null; nav: number | null }>): Table {
  return new Table({
    series_id: vectorFromArray(part.map((r) => r.series_id), new Dictionary(new Utf8(), new Int32())),
    date: vectorFromArray(part.map((r) => (r.date === null ? null : r.date * MILLIS_PER_DAY)), new DateDay()),
    nav: vectorFromArray(part.map((r) => r.nav), new Float64()),
  });
}

function onSharedMemory(bytes: Uint8Array): Buffer {
  const shared = Buffer.from(new SharedArrayBuffer(bytes.length));
  shared.set(bytes);
  return shared;
}

/** Every column and row of a result as plain values, so two results compare whatever memory holds them. */
function plain(result: IngestResult) {
  const columns = Object.fromEntries(
    Object.entries(result.table.columns).map(([name, column]: [string, Column]) => [name, column.type === 'text' ? { codes: [...column.codes], dictionary: column.dictionary } : [...column.values]]),
  );
  return { rows: result.rows, rejected: result.rejected, lines: [...result.table.lines], columns };
}

describe('Arrow columns read as views of shared file bytes', () => {
  it('give the same result as the copied columns, for any file', () => {
    fc.assert(
      fc.property(rows, fc.nat(30), (generated, cut) => {
        const at = Math.min(cut, generated.length);
        const table = at > 0 && at < generated.length ? batchOf(generated.slice(0, at)).concat(batchOf(generated.slice(at))) : batchOf(generated);
        // The file format refuses a second batch's own dictionary; the stream format carries it.
        const bytes = tableToIPC(table, table.batches.length > 1 ? 'stream' : 'file');
        const copied = readArrowBuffer(Buffer.from(bytes), 'nav.arrow', 'nav', DEFAULT_PROFILE, ANY_DATE_LIMITS);
        const viewed = readArrowBuffer(onSharedMemory(bytes), 'nav.arrow', 'nav', DEFAULT_PROFILE, ANY_DATE_LIMITS);
        expect(plain(viewed)).toEqual(plain(copied));
      }),
      { numRuns: 400 },
    );
  });

  it('a clean one-batch NAV table is read without copying its ids, dates or values', () => {
    const bytes = onSharedMemory(tableToIPC(batchOf([
      { series_id: 'FUND-A', date: 20000, nav: 101.5 },
      { series_id: 'FUND-A', date: 20001, nav: 101.75 },
      { series_id: 'FUND-B', date: 20000, nav: 9.5 },
    ]), 'file'));
    const { columns } = readArrowBuffer(bytes, 'nav.arrow', 'nav', DEFAULT_PROFILE, ANY_DATE_LIMITS).table;
    for (const name of ['series_id', 'date', 'nav']) {
      const column = columns[name];
      const array = column.type === 'text' ? column.codes : column.values;
      expect(array.buffer, name).toBe(bytes.buffer);
    }
    expect(columns.nav.type === 'number' && [...columns.nav.values]).toEqual([101.5, 101.75, 9.5]);
  });
});
