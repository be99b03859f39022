import { parquetWriteBuffer, type ColumnSource } from 'hyparquet-writer';
import { describe, expect, it } from 'vitest';
import { ConfigError, InputError } from '../../src/ingest/errors.js';
import { canonicalToParquetBuffer } from '../../fixtures/parquet-writer.js';
import { readParquetBuffer } from '../../src/ingest/parquet-reader.js';
import { DEFAULT_PROFILE, FeedProfileSchema } from '../../src/ingest/profile.js';
import { rowsOf, tableFromRows } from './tables.js';

const parquet = (columnData: ColumnSource[], rowGroupSize?: number) =>
  new Uint8Array(parquetWriteBuffer({ columnData, rowGroupSize }));

describe('readParquetBuffer', () => {
  it('reads a canonical master table written by canonicalToParquetBuffer, nulls included', async () => {
    const rows = [
      { series_id: 'FUND-Ä', benchmark_id: 'IDX-1', currency: 'EUR', stable_value: false, inception: '1999-01-04' },
      { series_id: 'FUND-B', benchmark_id: null, currency: null, stable_value: null, inception: null },
      { series_id: '基金-C', benchmark_id: 'IDX-1', currency: 'JPY', stable_value: true, inception: '2026-11-30' },
    ];
    const source = tableFromRows('master', ['series_id', 'benchmark_id', 'currency', 'stable_value', 'inception'], rows);
    const result = await readParquetBuffer(canonicalToParquetBuffer(source), 'master.parquet', 'master', DEFAULT_PROFILE);
    expect(rowsOf(result.table)).toEqual(rows);
    expect(result.rows).toEqual({ read: 3, accepted: 3, rejected: 0 });
  });

  it('takes INT64 as numbers (not BigInt) and TIMESTAMP and DATE as epoch days, across row groups', async () => {
    const bytes = parquet(
      [
        { name: 'benchmark_id', data: ['IDX', 'IDX', 'IDX'], type: 'STRING' },
        {
          name: 'date',
          data: [new Date(Date.UTC(2026, 10, 27, 22)), new Date(Date.UTC(1969, 11, 31, 1)), null],
          type: 'TIMESTAMP',
        },
        { name: 'level', data: new BigInt64Array([1000n, 2000n, 3000n]), type: 'INT64', nullable: false },
      ],
      2,
    );
    const result = await readParquetBuffer(bytes, 'levels.parquet', 'benchmarks', DEFAULT_PROFILE);
    expect(rowsOf(result.table)).toEqual([
      { benchmark_id: 'IDX', date: '2026-11-27', level: 1000 },
      { benchmark_id: 'IDX', date: '1969-12-31', level: 2000 },
    ]);
    expect(result.rejected).toEqual([
      { file: 'levels.parquet', line: 4, raw: '{"benchmark_id":"IDX","date":null,"level":3000}', reason: 'date is missing.' },
    ]);
  });

  it('maps a vendor layout through the profile and parses text numbers and dates', async () => {
    const bytes = parquet([
      { name: 'ISIN-like code', data: ['ZZ0000000001', 'ZZ0000000002', 'ZZ0000000003'], type: 'STRING' },
      { name: 'Px Date', data: ['12/31/2026', '01/02/2026', '02/30/2026'], type: 'STRING' },
      { name: 'Px', data: ['1,234.50', '12.5%', 'n/a'], type: 'STRING' },
    ]);
    const profile = FeedProfileSchema.parse({
      columns: { series_id: 'ISIN-like code', date: 'Px Date', nav: 'Px' },
      thousands: ',',
    });
    const result = await readParquetBuffer(bytes, 'vendor.parquet', 'nav', profile);
    expect(rowsOf(result.table)).toEqual([
      { series_id: 'ZZ0000000001', date: '2026-12-31', nav: 1234.5 },
      { series_id: 'ZZ0000000002', date: '2026-01-02', nav: 0.125 },
    ]);
    expect(result.rows).toEqual({ read: 3, accepted: 2, rejected: 1 });
    expect(result.rejected[0]).toEqual({
      file: 'vendor.parquet',
      line: 4,
      raw: '{"ISIN-like code":"ZZ0000000003","Px Date":"02/30/2026","Px":"n/a"}',
      reason: 'Px Date (date) "02/30/2026" is not a date.',
    });
  });

  it('rejects one row per bad record and keeps read == accepted + rejected', async () => {
    const bytes = parquet([
      { name: 'rate_id', data: ['RF', 'RF', null, 'RF', 'RF'], type: 'STRING' },
      { name: 'date', data: ['2026-01-30', 'garbage', '2026-03-31', '2026-04-30', '2026-05-29'], type: 'STRING' },
      { name: 'rate', data: [0.031, 0.032, 0.033, null, Number.NaN], type: 'DOUBLE' },
    ]);
    const result = await readParquetBuffer(bytes, 'rates.parquet', 'rates', DEFAULT_PROFILE);
    expect(result.rows).toEqual({ read: 5, accepted: 1, rejected: 4 });
    expect(result.rejected.map((row) => [row.line, row.reason])).toEqual([
      [3, 'date "garbage" is not a date.'],
      [4, 'rate_id is missing.'],
      [5, 'rate is missing.'],
      [6, 'rate is missing.'],
    ]);
  });

  it('stops with an InputError (exit 3) when a required column is missing', async () => {
    const bytes = parquet([{ name: 'series_id', data: ['S1'], type: 'STRING' }]);
    const error = await readParquetBuffer(bytes, 'thin.parquet', 'nav', DEFAULT_PROFILE).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(InputError);
    expect((error as InputError).exitCode).toBe(3);
    expect((error as InputError).message).toBe(
      'thin.parquet has no column "date", which a nav file needs (columns found: series_id); rename the column or map it in the feed profile\'s columns.',
    );
  });

  it('stops with an InputError on bytes that are not Parquet', async () => {
    const error = await readParquetBuffer(new Uint8Array([1, 2, 3]), 'junk.parquet', 'nav', DEFAULT_PROFILE).catch((e: unknown) => e);
    expect((error as InputError).exitCode).toBe(3);
    expect((error as InputError).message).toMatch(/^junk\.parquet cannot be read as a Parquet file/);
  });

  it('stops with a ConfigError when auto dates cannot be ordered', async () => {
    const bytes = parquet([
      { name: 'calendar', data: ['XCAL'], type: 'STRING' },
      { name: 'date', data: ['01/02/2026'], type: 'STRING' },
    ]);
    const error = await readParquetBuffer(bytes, 'holidays.parquet', 'holidays', DEFAULT_PROFILE).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ConfigError);
    expect((error as ConfigError).exitCode).toBe(2);
  });
});
