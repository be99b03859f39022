import {
  Bool,
  DateMillisecond,
  Decimal,
  Dictionary,
  Float32,
  Float64,
  Int32,
  Int64,
  makeData,
  makeVector,
  RecordBatch,
  Table,
  tableToIPC,
  TimestampMillisecond,
  Utf8,
  vectorFromArray,
  type Vector,
} from 'apache-arrow';
import { describe, expect, it } from 'vitest';
import { readArrowBuffer } from '../../src/ingest/arrow-reader.js';
import { canonicalToArrowIpc } from '../../src/ingest/arrow-table.js';
import { ConfigError, InputError } from '../../src/ingest/errors.js';
import { DEFAULT_PROFILE, FeedProfileSchema } from '../../src/ingest/profile.js';
import { rowsOf, tableFromRows } from './tables.js';

const text = (values: (string | null)[]) => vectorFromArray(values, new Utf8());
const ids = (values: (string | null)[]) => vectorFromArray(values, new Dictionary(new Utf8(), new Int32()));
const ipc = (columns: Record<string, Vector>, format: 'file' | 'stream' = 'file') => tableToIPC(new Table(columns), format);

describe('readArrowBuffer', () => {
  it('reads a canonical NAV table written by canonicalToArrowIpc unchanged, numbering records as the lines of the same CSV (the first record is line 2)', () => {
    const rows = [
      { series_id: 'FUND-A', date: '2026-11-27', nav: 101.25 },
      { series_id: 'FUND-B', date: '2026-11-27', nav: 9.87 },
      { series_id: 'FUND-A', date: '2026-11-30', nav: 101.5 },
    ];
    const source = tableFromRows('nav', ['series_id', 'date', 'nav'], rows, [10, 11, 12]);
    const result = readArrowBuffer(canonicalToArrowIpc(source), 'nav.arrow', 'nav', DEFAULT_PROFILE);
    expect(rowsOf(result.table)).toEqual(rows);
    expect([...result.table.lines]).toEqual([2, 3, 4]);
    expect(result.rows).toEqual({ read: 3, accepted: 3, rejected: 0 });
    const series = result.table.columns.series_id;
    expect(series.type === 'text' && series.dictionary).toEqual(['FUND-A', 'FUND-B']);
  });

  it('reads the stream format as well as the file format', () => {
    const bytes = ipc({ series_id: ids(['S1']), date: text(['2026-01-30']), nav: vectorFromArray([1.5]) }, 'stream');
    expect(rowsOf(readArrowBuffer(bytes, 'nav.feather', 'nav', DEFAULT_PROFILE).table)).toEqual([
      { series_id: 'S1', date: '2026-01-30', nav: 1.5 },
    ]);
  });

  it('takes timestamps, Date64, Int64, Float32 and Decimal columns as dates and numbers', () => {
    const day = Date.UTC(2026, 10, 30);
    const decimal = makeVector(
      makeData({ type: new Decimal(2, 10, 128), length: 1, data: new Uint32Array([12345, 0, 0, 0]) }),
    );
    const cases: [string, Vector, Vector][] = [
      ['timestamp + int64', vectorFromArray([new Date(day + 15 * 3600_000)], new TimestampMillisecond()), vectorFromArray([42n], new Int64())],
      ['date64 + float32', vectorFromArray([new Date(day)], new DateMillisecond()), vectorFromArray([0.5], new Float32())],
      ['pre-1970 timestamp + decimal', vectorFromArray([new Date(Date.UTC(1969, 11, 31, 23))], new TimestampMillisecond()), decimal],
    ];
    const read = cases.map(([, dates, levels]) =>
      rowsOf(readArrowBuffer(ipc({ benchmark_id: text(['IDX']), date: dates, level: levels }), 'b.arrow', 'benchmarks', DEFAULT_PROFILE).table),
    );
    expect(read).toEqual([
      [{ benchmark_id: 'IDX', date: '2026-11-30', level: 42 }],
      [{ benchmark_id: 'IDX', date: '2026-11-30', level: 0.5 }],
      [{ benchmark_id: 'IDX', date: '1969-12-31', level: 123.45 }],
    ]);
  });

  it('maps a vendor layout through the profile and parses its text with the profile rules', () => {
    const bytes = ipc({
      'Fund Code': text(['  ALPHA-1 ', 'ALPHA-2']),
      'Valuation Date': text(['31.12.2026', '01.12.2026']),
      Price: text(['1.234,56', '7,5']),
    });
    const profile = FeedProfileSchema.parse({
      columns: { series_id: 'Fund Code', date: 'Valuation Date', nav: 'Price' },
      decimal: ',',
      thousands: '.',
      delimiter: ';',
      date_format: 'day-first',
    });
    const result = readArrowBuffer(bytes, 'vendor-nav.arrow', 'nav', profile);
    expect(rowsOf(result.table)).toEqual([
      { series_id: 'ALPHA-1', date: '2026-12-31', nav: 1234.56 },
      { series_id: 'ALPHA-2', date: '2026-12-01', nav: 7.5 },
    ]);
  });

  it('settles an auto date order from a date that reads only one way', () => {
    const bytes = ipc({ series_id: text(['S1', 'S1']), date: text(['12/03/2026', '12/31/2026']), nav: vectorFromArray([1, 2]) });
    expect(rowsOf(readArrowBuffer(bytes, 'us.arrow', 'nav', DEFAULT_PROFILE).table).map((row) => row.date)).toEqual([
      '2026-12-03',
      '2026-12-31',
    ]);
  });

  it('stops with a ConfigError (exit 2) when auto dates read both day-first and month-first', () => {
    const bytes = ipc({ series_id: text(['S1', 'S1']), date: text(['03/04/2026', '05/04/2026']), nav: vectorFromArray([1, 2]) });
    const read = () => readArrowBuffer(bytes, 'ambiguous.arrow', 'nav', DEFAULT_PROFILE);
    expect(read).toThrow(ConfigError);
    // Record 1 is line 2 when the same table is written as CSV; the message is the CSV reader's.
    expect(read).toThrow(
      'ambiguous.arrow, line 2: dates such as "03/04/2026" read both day-first and month-first and no row settles which; set date_format: day-first or month-first in the feed profile.',
    );
    expect(catchError(read).exitCode).toBe(2);
  });

  it('rejects each bad record once, with its record number, its values and the reason, and keeps the count', () => {
    const bytes = ipc({
      series_id: text(['S1', null, 'S2', 'S3', '  ', 'S4']),
      date: text(['2026-11-30', '2026-11-30', 'not a date', '2026-11-30', '2026-11-30', '2026-02-30']),
      nav: vectorFromArray([1.5, 2, 3, null, 4, 5], new Float32()),
    });
    const result = readArrowBuffer(bytes, 'bad.arrow', 'nav', DEFAULT_PROFILE);
    expect(result.rows).toEqual({ read: 6, accepted: 1, rejected: 5 });
    expect(result.rows.read).toBe(result.rows.accepted + result.rows.rejected);
    expect(result.rejected).toEqual([
      { file: 'bad.arrow', line: 3, raw: '{"series_id":null,"date":"2026-11-30","nav":2}', reason: 'series_id is missing.' },
      { file: 'bad.arrow', line: 4, raw: '{"series_id":"S2","date":"not a date","nav":3}', reason: 'date "not a date" is not a date.' },
      { file: 'bad.arrow', line: 5, raw: '{"series_id":"S3","date":"2026-11-30","nav":null}', reason: 'nav is missing.' },
      { file: 'bad.arrow', line: 6, raw: '{"series_id":null,"date":"2026-11-30","nav":4}', reason: 'series_id is missing.' },
      { file: 'bad.arrow', line: 7, raw: '{"series_id":"S4","date":"2026-02-30","nav":5}', reason: 'date "2026-02-30" is not a date.' },
    ]);
    expect(rowsOf(result.table)).toEqual([{ series_id: 'S1', date: '2026-11-30', nav: 1.5 }]);
    expect([...result.table.lines]).toEqual([2]);
  });

  it('rejects text its column does not allow and optional values that are present but unreadable', () => {
    const bytes = ipc({
      series_id: text(['S1', 'S2', 'S3']),
      benchmark_id: text(['B1', null, 'B1']),
      stable_value: text(['yes', 'maybe', null]),
      inception: text(['2020-01-31', null, 'soon']),
    });
    const result = readArrowBuffer(bytes, 'master.arrow', 'master', DEFAULT_PROFILE);
    expect(result.rows).toEqual({ read: 3, accepted: 1, rejected: 2 });
    expect(result.rejected.map((row) => [row.line, row.reason])).toEqual([
      [3, 'stable_value "maybe" is not true or false.'],
      [4, 'inception "soon" is not a date.'],
    ]);
    expect(rowsOf(result.table)).toEqual([{ series_id: 'S1', benchmark_id: 'B1', stable_value: true, inception: '2020-01-31' }]);

    const actions = ipc({ series_id: text(['S1']), ex_date: text(['2026-06-30']), kind: text(['merger']), value: vectorFromArray([2]) });
    const rejected = readArrowBuffer(actions, 'actions.arrow', 'actions', DEFAULT_PROFILE).rejected;
    expect(rejected.map((row) => row.reason)).toEqual(['kind "merger" is not one of split, distribution.']);
  });

  it('keeps the vendor value as text beside the number', () => {
    const bytes = ipc({
      series_id: text(['S1']),
      as_of: text(['2026-11-30']),
      window: text(['3y']),
      metric: text(['std_dev']),
      value: text(['0.10']),
    });
    const result = readArrowBuffer(bytes, 'vendor.arrow', 'vendor', DEFAULT_PROFILE);
    expect(rowsOf(result.table)).toEqual([
      { series_id: 'S1', as_of: '2026-11-30', window: '3y', metric: 'std_dev', value: 0.1, value_text: '0.10' },
    ]);
  });

  it('reads several record batches whose dictionaries differ into one set of codes', () => {
    const idType = new Dictionary(new Utf8(), new Int32());
    const dateType = new Utf8();
    const navType = new Float64();
    const batch = (names: string[], navs: number[]) =>
      new RecordBatch({
        series_id: vectorFromArray(names, idType).data[0],
        date: vectorFromArray(names.map(() => '2026-11-30'), dateType).data[0],
        nav: vectorFromArray(navs, navType).data[0],
      });
    const table = new Table([batch(['S2', 'S1'], [1, 2]), batch(['S1', 'S3'], [3, 4])]);
    expect(table.getChild('series_id')!.data.map((data) => data.dictionary!.toArray())).toEqual([['S2', 'S1'], ['S1', 'S3']]);
    const result = readArrowBuffer(tableToIPC(table, 'stream'), 'batches.arrow', 'nav', DEFAULT_PROFILE);
    expect(rowsOf(result.table).map((row) => [row.series_id, row.nav])).toEqual([['S2', 1], ['S1', 2], ['S1', 3], ['S3', 4]]);
    const series = result.table.columns.series_id;
    expect(series.type === 'text' && [...series.codes]).toEqual([0, 1, 1, 2]);
  });

  it('stops with an InputError (exit 3) naming the file, the missing column, the columns found and the fix', () => {
    const bytes = ipc({ 'Fund Code': text(['S1']), date: text(['2026-11-30']) });
    const profile = FeedProfileSchema.parse({ columns: { series_id: 'Fund Code' } });
    const error = catchError(() => readArrowBuffer(bytes, 'short.arrow', 'nav', profile));
    expect(error).toBeInstanceOf(InputError);
    expect(error.exitCode).toBe(3);
    expect(error.message).toBe(
      'short.arrow has no column "nav", which a nav file needs (columns found: Fund Code, date); rename the column or map it in the feed profile\'s columns.',
    );
  });

  it('names the mapped header when a mapped column is missing', () => {
    const bytes = ipc({ series_id: text(['S1']), date: text(['2026-11-30']), nav: vectorFromArray([1]) });
    const profile = FeedProfileSchema.parse({ columns: { nav: 'Price' } });
    // The canonical name is still accepted when the mapped one is absent.
    expect(readArrowBuffer(bytes, 'nav.arrow', 'nav', profile).rows.accepted).toBe(1);
    const other = ipc({ series_id: text(['S1']), date: text(['2026-11-30']) });
    expect(() => readArrowBuffer(other, 'nav.arrow', 'nav', profile)).toThrow(/no column "Price" \(mapped to nav\)/);
  });

  it('stops with an InputError on bytes that are not Arrow, and on columns of a type it cannot read', () => {
    expect(catchError(() => readArrowBuffer(new TextEncoder().encode('series_id,date\n'), 'x.arrow', 'nav', DEFAULT_PROFILE)).exitCode).toBe(3);
    const nested = ipc({ series_id: text(['S1']), date: text(['2026-11-30']), nav: vectorFromArray([[1]]) });
    expect(() => readArrowBuffer(nested, 'nested.arrow', 'nav', DEFAULT_PROFILE)).toThrow(/column nav of Arrow type List/);
  });

  it('matches headers regardless of case and reads numeric ids and compact numeric dates', () => {
    const bytes = ipc({
      SERIES_ID: vectorFromArray([1001, 1002], new Int32()),
      Date: vectorFromArray([20261130, 20261301], new Int32()),
      NAV: vectorFromArray([10.5, 11]),
    });
    const result = readArrowBuffer(bytes, 'numeric.arrow', 'nav', DEFAULT_PROFILE);
    expect(rowsOf(result.table)).toEqual([{ series_id: '1001', date: '2026-11-30', nav: 10.5 }]);
    expect(result.rejected.map((row) => row.reason)).toEqual(['Date (date) "20261301" is not a date.']);
  });

  it('reads booleans and nulls in optional master columns', () => {
    const bytes = ipc({
      series_id: text(['S1', 'S2']),
      benchmark_id: text([null, 'B1']),
      stable_value: vectorFromArray([true, null], new Bool()),
      currency: text(['EUR', null]),
    });
    expect(rowsOf(readArrowBuffer(bytes, 'm.arrow', 'master', DEFAULT_PROFILE).table)).toEqual([
      { series_id: 'S1', benchmark_id: null, currency: 'EUR', stable_value: true },
      { series_id: 'S2', benchmark_id: 'B1', currency: null, stable_value: null },
    ]);
  });
});

function catchError(run: () => unknown): ConfigError | InputError {
  try {
    run();
  } catch (error) {
    return error as ConfigError | InputError;
  }
  throw new Error('expected an error');
}

describe('damaged Arrow streams are refused, not read short', () => {
  // The Arrow IPC stream format (columnar format specification, "IPC Streaming Format"): a
  // schema message, dictionary and record batch messages, each framed as 0xFFFFFFFF, a metadata
  // length and a body, ended by the end-of-stream marker 0xFFFFFFFF 0x00000000.
  const batch = (names: string[], navs: number[]) =>
    new RecordBatch({
      series_id: vectorFromArray(names, new Utf8()).data[0],
      date: vectorFromArray(names.map(() => '2026-11-30'), new Utf8()).data[0],
      nav: vectorFromArray(navs, new Float64()).data[0],
    });
  const first = batch(['S1', 'S2'], [1, 2]);
  const oneBatch = Buffer.from(tableToIPC(new Table([first]), 'stream'));
  const threeBatches = Buffer.from(tableToIPC(new Table([first, batch(['S1', 'S2'], [3, 4]), batch(['S3'], [5])]), 'stream'));
  const endOfFirstBatch = oneBatch.length - 8;
  const END_OF_STREAM = Buffer.from([0xff, 0xff, 0xff, 0xff, 0, 0, 0, 0]);

  it('the fixtures are what they claim: three batches share the one-batch stream as their beginning', () => {
    expect(oneBatch.subarray(endOfFirstBatch)).toEqual(END_OF_STREAM);
    expect(threeBatches.subarray(0, endOfFirstBatch)).toEqual(oneBatch.subarray(0, endOfFirstBatch));
    expect(threeBatches.subarray(threeBatches.length - 8)).toEqual(END_OF_STREAM);
    expect(readArrowBuffer(threeBatches, 'nav.arrows', 'nav', DEFAULT_PROFILE).rows).toEqual({ read: 5, accepted: 5, rejected: 0 });
  });

  it('a stream cut after a whole batch, without its end-of-stream marker, is refused (exit 3)', () => {
    const error = catchError(() => readArrowBuffer(threeBatches.subarray(0, endOfFirstBatch), 'nav.arrows', 'nav', DEFAULT_PROFILE));
    expect(error).toBeInstanceOf(InputError);
    expect(error.exitCode).toBe(3);
    expect(error.message).toMatch(/^nav\.arrows is a damaged Arrow stream: .*end-of-stream marker.*; export the file again\.$/);
  });

  it('a damaged message frame that reads as the end of the stream, with batches after it, is refused', () => {
    const damaged = Buffer.from(threeBatches);
    END_OF_STREAM.copy(damaged, endOfFirstBatch);
    const error = catchError(() => readArrowBuffer(damaged, 'nav.arrows', 'nav', DEFAULT_PROFILE));
    expect(error).toBeInstanceOf(InputError);
    expect(error.message).toMatch(/^nav\.arrows is a damaged Arrow stream: \d+ bytes after its end-of-stream marker/);
  });
});

