import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { readArrowBuffer } from '../../src/ingest/arrow-reader.js';
import { arrowIpcToCanonical, canonicalToArrowIpc } from '../../src/ingest/arrow-table.js';
import { canonicalToParquetBuffer } from '../../fixtures/parquet-writer.js';
import { readParquetBuffer } from '../../src/ingest/parquet-reader.js';
import { DEFAULT_PROFILE } from '../../src/ingest/profile.js';
import { METRIC_IDS, type FileKind } from '../../src/ingest/schema.js';
import type { CanonicalTable } from '../../src/ingest/table.js';
import { ANY_DATE_LIMITS } from '../ingest/helpers.js';
import { rowsOf, tableFromRows, type Row } from './tables.js';

/** Ids and text: any Unicode graphemes, without the surrounding blanks ingestion trims, and without
 * the control and invisible characters the identifier rule refuses in ids. */
const textValue = fc
  .string({ unit: 'grapheme', minLength: 1, maxLength: 6 })
  .filter((s) => s.trim() === s && s !== '' && !/[\p{Cc}\p{Cf}\uFFFD]/u.test(s));
/** Any Int32 epoch day except the null marker: years far before 0 and after 9999 included. */
const day = fc.oneof(
  fc.integer({ min: -2147483647, max: 2147483647 }),
  fc.constantFrom(-2147483647, -719528, -1, 0, 2932896, 2147483647),
  fc.integer({ min: 0, max: 40000 }),
);
const number = fc.double({ noNaN: true });
const optional = <T>(arbitrary: fc.Arbitrary<T>) => fc.option(arbitrary, { nil: null });

interface Generated {
  readonly kind: FileKind;
  readonly columns: string[];
  readonly rows: Row[];
  readonly lines: number[];
}

const withLines = (kind: FileKind, columns: string[], rows: fc.Arbitrary<Row[]>): fc.Arbitrary<Generated> =>
  rows.chain((generated) =>
    fc
      .array(fc.integer({ min: 1, max: 2 ** 31 - 1 }), { minLength: generated.length, maxLength: generated.length })
      .map((lines) => ({ kind, columns, rows: generated, lines })),
  );

const navTables = withLines(
  'nav',
  ['series_id', 'date', 'nav'],
  fc.array(fc.record({ series_id: textValue, date: day, nav: number }), { maxLength: 40 }),
);

const MASTER_OPTIONAL = ['name', 'category', 'currency', 'calendar', 'rate_id', 'stable_value', 'inception'];
const masterTables = fc.subarray(MASTER_OPTIONAL).chain((present) =>
  withLines(
    'master',
    ['series_id', 'benchmark_id', ...present],
    fc.array(
      fc.record({
        series_id: textValue,
        benchmark_id: optional(textValue),
        name: optional(textValue),
        category: optional(textValue),
        currency: optional(fc.constantFrom('EUR', 'USD', 'CHF')),
        calendar: optional(textValue),
        rate_id: optional(textValue),
        stable_value: optional(fc.boolean()),
        inception: optional(day),
      }),
      { maxLength: 30 },
    ).map((rows) => rows.map((row) => pick(row, ['series_id', 'benchmark_id', ...present]))),
  ),
);

const vendorTables = withLines(
  'vendor',
  ['series_id', 'as_of', 'window', 'metric', 'value', 'unit'],
  fc.array(
    fc.record({
      series_id: textValue,
      as_of: day,
      window: fc.constantFrom('1y', '3y', '5y', '6m'),
      metric: fc.constantFrom(...METRIC_IDS),
      value: number,
      unit: optional(fc.constantFrom('decimal', 'percent')),
    }),
    { maxLength: 30 },
  ),
);

const anyTable = fc.oneof(navTables, masterTables, vendorTables);

function pick(row: Row, names: readonly string[]): Row {
  return Object.fromEntries(names.map((name) => [name, row[name]]));
}

function build(generated: Generated): CanonicalTable {
  return tableFromRows(generated.kind, generated.columns, generated.rows, generated.lines);
}

/** What a feed reader gives back: the same values, numbered by record, and the vendor value also as text. */
function expectedFromFeedReader(generated: Generated): Row[] {
  const rows = rowsOf(build(generated));
  if (generated.kind !== 'vendor') return rows;
  return rows.map((row) => ({ ...row, value_text: String(row.value) }));
}

describe('canonical tables survive Arrow IPC and Parquet unchanged', () => {
  it('canonicalToArrowIpc then arrowIpcToCanonical gives the same rows and lines', () => {
    fc.assert(
      fc.property(anyTable, (generated) => {
        const table = build(generated);
        const back = arrowIpcToCanonical(generated.kind, canonicalToArrowIpc(table));
        expect(back.length).toBe(table.length);
        expect(rowsOf(back)).toEqual(rowsOf(table));
        expect([...back.lines]).toEqual(generated.lines);
      }),
      { numRuns: 150 },
    );
  });

  it('an Arrow IPC file read as a feed gives the same rows, all accepted', () => {
    fc.assert(
      fc.property(anyTable, (generated) => {
        const result = readArrowBuffer(canonicalToArrowIpc(build(generated)), 'any.arrow', generated.kind, DEFAULT_PROFILE, ANY_DATE_LIMITS);
        expect(result.rows).toEqual({ read: generated.rows.length, accepted: generated.rows.length, rejected: 0 });
        expect(rowsOf(result.table)).toEqual(expectedFromFeedReader(generated));
        expect([...result.table.lines]).toEqual(generated.rows.map((_, row) => row + 2)); // record k is CSV line k + 1
      }),
      { numRuns: 150 },
    );
  });

  it('a Parquet file read as a feed gives the same rows, all accepted', async () => {
    await fc.assert(
      fc.asyncProperty(anyTable, async (generated) => {
        const bytes = canonicalToParquetBuffer(build(generated));
        const result = await readParquetBuffer(bytes, 'any.parquet', generated.kind, DEFAULT_PROFILE, ANY_DATE_LIMITS);
        expect(result.rows).toEqual({ read: generated.rows.length, accepted: generated.rows.length, rejected: 0 });
        expect(rowsOf(result.table)).toEqual(expectedFromFeedReader(generated));
      }),
      { numRuns: 150 },
    );
  });

  it('rows with a missing required value are rejected one for one, in any format', async () => {
    const navWithHoles = fc.array(
      fc.record({ series_id: optional(textValue), date: optional(day), nav: optional(number) }),
      { maxLength: 40 },
    );
    await fc.assert(
      fc.asyncProperty(navWithHoles, async (rows) => {
        const table = tableFromRows('nav', ['series_id', 'date', 'nav'], rows);
        const bad = rows.flatMap((row, index) => (Object.values(row).includes(null) ? [index + 2] : [])); // as CSV lines
        const arrow = readArrowBuffer(canonicalToArrowIpc(table), 'holes.arrow', 'nav', DEFAULT_PROFILE, ANY_DATE_LIMITS);
        const parquet = await readParquetBuffer(canonicalToParquetBuffer(table), 'holes.parquet', 'nav', DEFAULT_PROFILE, ANY_DATE_LIMITS);
        for (const result of [arrow, parquet]) {
          expect(result.rows).toEqual({ read: rows.length, accepted: rows.length - bad.length, rejected: bad.length });
          expect(result.rejected.map((row) => row.line)).toEqual(bad);
          const good = rows.filter((_, index) => !bad.includes(index + 2));
          expect(rowsOf(result.table)).toEqual(rowsOf(tableFromRows('nav', ['series_id', 'date', 'nav'], good)));
        }
      }),
      { numRuns: 100 },
    );
  });
});
