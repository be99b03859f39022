import { describe, expect, it } from 'vitest';
import { ConfigError, InputError } from '../../src/ingest/errors.js';
import { expectBalanced, navTuples, readText, rowsOf } from './helpers.js';

function errorOf(run: () => unknown): Error {
  try {
    run();
  } catch (error) {
    return error as Error;
  }
  throw new Error('expected an error');
}

describe('day-first against month-first', () => {
  it('an ambiguous file with no profile setting stops with ConfigError (exit 2) naming file, line and remedy', () => {
    const error = errorOf(() => readText('series_id,date,nav\nNVA0001,02/01/2026,1\nNVA0001,03/01/2026,2\nNVA0001,04/01/2026,3\n'));
    expect(error).toBeInstanceOf(ConfigError);
    expect(error).not.toBeInstanceOf(InputError);
    expect((error as ConfigError).exitCode).toBe(2);
    expect(error.message).toBe(
      'feed.csv, line 2: dates such as "02/01/2026" read both day-first and month-first and no row settles which; set date_format: day-first or month-first in the feed profile.',
    );
  });

  it('the same ambiguous file is read either way once the profile says which', () => {
    const text = 'series_id,date,nav\nNVA0001,02/01/2026,1\nNVA0001,03/01/2026,2\n';
    expect(navTuples(readText(text, 'nav', { date_format: 'day-first' })).map((t) => t[2])).toEqual(['2026-01-02', '2026-01-03']);
    expect(navTuples(readText(text, 'nav', { date_format: 'month-first' })).map((t) => t[2])).toEqual(['2026-02-01', '2026-03-01']);
  });

  it('one row anywhere in the file settles the order', () => {
    const body = Array.from({ length: 50 }, (_, k) => `NVA0001,${String((k % 12) + 1).padStart(2, '0')}/01/2026,${k}`).join('\n');
    const dayFirst = readText(`series_id,date,nav\n${body}\nNVA0001,13/01/2026,99\n`);
    expect(navTuples(dayFirst)[0][2]).toBe('2026-01-01');
    expect(navTuples(dayFirst)[1][2]).toBe('2026-01-02');
    expect(navTuples(dayFirst)[50]).toEqual([52, 'NVA0001', '2026-01-13', 99]);
    const monthFirst = readText(`series_id,date,nav\n${body}\nNVA0001,01/13/2026,99\n`);
    expect(navTuples(monthFirst)[1][2]).toBe('2026-02-01');
    expect(navTuples(monthFirst)[50]).toEqual([52, 'NVA0001', '2026-01-13', 99]);
  });

  it('contradictory rows stop with ConfigError naming both lines', () => {
    const error = errorOf(() => readText('series_id,date,nav\nNVA0001,01/02/2026,1\nNVA0001,31/01/2026,2\nNVA0001,01/31/2026,3\n'));
    expect(error).toBeInstanceOf(ConfigError);
    expect((error as ConfigError).exitCode).toBe(2);
    expect(error.message).toBe(
      'feed.csv, line 3: "31/01/2026" can only be day-first but line 4 has "01/31/2026", which can only be month-first; fix the file or set date_format in the feed profile.',
    );
  });

  it('with date_format set, contradicting rows are rejected one by one instead', () => {
    const result = readText('series_id,date,nav\nNVA0001,31/01/2026,2\nNVA0001,01/31/2026,3\n', 'nav', { date_format: 'day-first' });
    expectBalanced(result);
    expect(result.rejected.map((r) => [r.line, r.reason])).toEqual([[3, 'date "01/31/2026" is not a valid date (expected a day-first date)']]);
  });

  it('an unreadable first date does not hide the ambiguity of the rest', () => {
    const error = errorOf(() => readText('series_id,date,nav\nNVA0001,n/a,1\nNVA0001,02/01/2026,2\n'));
    expect(error).toBeInstanceOf(ConfigError);
    expect(error.message).toMatch(/^feed\.csv, line 3: dates such as "02\/01\/2026"/);
    const settled = readText('series_id,date,nav\nNVA0001,n/a,1\nNVA0001,02/01/2026,2\nNVA0001,25/01/2026,3\n');
    expect(navTuples(settled).map((t) => t[2])).toEqual(['2026-01-02', '2026-01-25']);
    expect(settled.rejected.map((r) => r.line)).toEqual([2]);
  });

  it('rows with the wrong number of fields give no evidence', () => {
    // Line 3 would prove month-first, but it cannot be read anyway; line 2 alone is ambiguous.
    expect(() => readText('series_id,date,nav\nNVA0001,02/01/2026,1\nNVA0001,01/31/2026,2,extra\n')).toThrow(ConfigError);
  });

  it('ISO and month-name files never need the order; a first ISO row keeps auto', () => {
    const result = readText('series_id,date,nav\nNVA0001,2026-01-02,1\nNVA0001,03/01/2026,2\nNVA0001,5-Jan-2026,3\n');
    expect(navTuples(result).map((t) => t[2])).toEqual(['2026-01-02', '2026-01-05']);
    expect(result.rejected.map((r) => [r.line, r.reason])).toEqual([[3, 'date "03/01/2026" is not a valid date (expected YYYY-MM-DD)']]);
  });

  it('dates impossible both ways are rejected, not an ambiguity', () => {
    const result = readText('series_id,date,nav\nNVA0001,13/13/2026,1\nNVA0001,2026-01-05,2\n');
    expect(result.rows).toEqual({ read: 2, accepted: 1, rejected: 1 });
  });

  it('every date column of a file counts, optional ones too', () => {
    const error = errorOf(() => readText('series_id,benchmark_id,inception\nNVA0001,BMK01,05/06/2020\n', 'master'));
    expect(error).toBeInstanceOf(ConfigError);
    const result = readText('series_id,benchmark_id,inception\nNVA0001,BMK01,05/06/2020\nNVA0002,BMK01,\nNVA0003,BMK01,06/30/2019\n', 'master');
    expect(rowsOf(result).map((r) => r.inception)).toEqual(['2020-05-06', null, '2019-06-30']);
  });
});
