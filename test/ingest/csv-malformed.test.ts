import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readCsvFile } from '../../src/ingest/csv-source.js';
import { ConfigError, InputError } from '../../src/ingest/errors.js';
import { DEFAULT_PROFILE } from '../../src/ingest/profile.js';
import { expectBalanced, FILE, navTuples, readText } from './helpers.js';

const HEADER = 'series_id,date,nav\n';

function rejectedOf(text: string) {
  const result = readText(text);
  expectBalanced(result);
  return { result, rejected: result.rejected.map((r) => ({ line: r.line, raw: r.raw, reason: r.reason })) };
}

describe('malformed rows are rejected one by one, with line, raw text and reason', () => {
  it('bad dates', () => {
    const { result, rejected } = rejectedOf(
      HEADER + 'NVA0001,2026-01-02,10.5\nNVA0001,2026-02-30,10.6\nNVA0001,2026-1-5,10.7\nNVA0001,yesterday,10.8\nNVA0001,2026-01-06,10.9\n',
    );
    expect(result.rows).toEqual({ read: 5, accepted: 3, rejected: 2 });
    // A year-first date without zero padding is unambiguous and accepted.
    expect(navTuples(result)).toEqual([
      [2, 'NVA0001', '2026-01-02', 10.5],
      [4, 'NVA0001', '2026-01-05', 10.7],
      [6, 'NVA0001', '2026-01-06', 10.9],
    ]);
    expect(rejected).toEqual([
      { line: 3, raw: 'NVA0001,2026-02-30,10.6', reason: 'date "2026-02-30" is not a valid date (expected YYYY-MM-DD)' },
      { line: 5, raw: 'NVA0001,yesterday,10.8', reason: 'date "yesterday" is not a valid date (expected YYYY-MM-DD)' },
    ]);
  });

  it('bad numbers', () => {
    const { result, rejected } = rejectedOf(
      HEADER + 'NVA0001,2026-01-02,12.5x\nNVA0001,2026-01-05,1.2.3\nNVA0001,2026-01-06,\nNVA0001,2026-01-07,-\nNVA0001,2026-01-08,1e999\nNVA0001,2026-01-09,NaN\nNVA0001,2026-01-12,-0.25\n',
    );
    expect(result.rows).toEqual({ read: 7, accepted: 1, rejected: 6 });
    expect(navTuples(result)).toEqual([[8, 'NVA0001', '2026-01-12', -0.25]]);
    expect(rejected.map((r) => [r.line, r.reason])).toEqual([
      [2, 'nav "12.5x" is not a number'],
      [3, 'nav "1.2.3" is not a number'],
      [4, 'nav is empty'],
      [5, 'nav "-" is not a number'],
      [6, 'nav "1e999" is not a number'],
      [7, 'nav "NaN" is not a number'],
    ]);
  });

  it('missing fields and too many fields', () => {
    const { result, rejected } = rejectedOf(HEADER + 'NVA0001,2026-01-02\nNVA0001\nNVA0001,2026-01-05,1,2\n,2026-01-06,3\nNVA0002,2026-01-06,4\n');
    expect(result.rows).toEqual({ read: 5, accepted: 1, rejected: 4 });
    expect(navTuples(result)).toEqual([[6, 'NVA0002', '2026-01-06', 4]]);
    expect(rejected).toEqual([
      { line: 2, raw: 'NVA0001,2026-01-02', reason: 'expected 3 fields as in the header, found 2 fields' },
      { line: 3, raw: 'NVA0001', reason: 'expected 3 fields as in the header, found 1 field' },
      { line: 4, raw: 'NVA0001,2026-01-05,1,2', reason: 'expected 3 fields as in the header, found 4 fields' },
      { line: 5, raw: ',2026-01-06,3', reason: 'series_id is empty' },
    ]);
  });

  it('an unbalanced quote costs only its own line', () => {
    const { result, rejected } = rejectedOf(HEADER + 'NVA0001,2026-01-02,1\n"NVA0002,2026-01-02,2\nNVA0003,2026-01-02,3\n');
    expect(navTuples(result)).toEqual([
      [2, 'NVA0001', '2026-01-02', 1],
      [4, 'NVA0003', '2026-01-02', 3],
    ]);
    expect(rejected).toEqual([
      { line: 3, raw: '"NVA0002,2026-01-02,2', reason: 'a quoted field is never closed (unbalanced quote)' },
    ]);
  });

  it('two stray quotes do not swallow the lines between them', () => {
    // The quote opened on line 3 closes on line 5: the "row" would span three lines and even have
    // three fields. An id never holds a line break, so line 3 alone is rejected and 4, 5 re-read.
    const { result, rejected } = rejectedOf(HEADER + 'NVA0001,2026-01-02,1\n"NVA0002,2026-01-02,2\nNVA0003,2026-01-02,3\nNVA0004",2026-01-02,4\n');
    expect(result.rows).toEqual({ read: 4, accepted: 2, rejected: 2 });
    expect(navTuples(result)).toEqual([
      [2, 'NVA0001', '2026-01-02', 1],
      [4, 'NVA0003', '2026-01-02', 3],
    ]);
    expect(rejected).toEqual([
      { line: 3, raw: '"NVA0002,2026-01-02,2', reason: 'a quoted field runs past the end of the line (unbalanced quote)' },
      { line: 5, raw: 'NVA0004",2026-01-02,4', reason: 'series_id "NVA0004"" has a quote inside an unquoted field (unbalanced quote)' },
    ]);
  });

  it('text after a closing quote', () => {
    const { rejected } = rejectedOf(HEADER + '"NVA0001"x,2026-01-02,1\nNVA0002,2026-01-02,2\n');
    expect(rejected).toEqual([{ line: 2, raw: '"NVA0001"x,2026-01-02,1', reason: 'text follows a closing quote (unbalanced quote)' }]);
  });

  it('an id that is only non-breaking spaces is empty', () => {
    const { rejected } = rejectedOf(HEADER + '\u00a0\u00a0,2026-01-02,1\n');
    expect(rejected).toEqual([{ line: 2, raw: '\u00a0\u00a0,2026-01-02,1', reason: 'series_id is empty' }]);
  });

  it('header only: nothing read, nothing rejected', () => {
    for (const text of ['series_id,date,nav', HEADER, 'series_id,date,nav\r\n', HEADER + '\n\n']) {
      const result = readText(text);
      expect(result.rows).toEqual({ read: 0, accepted: 0, rejected: 0 });
      expect(result.table.length).toBe(0);
    }
  });

  it('blank lines are not data rows but line numbers still count them', () => {
    const result = readText(HEADER + '\nNVA0001,2026-01-02,1\n   \n\t\n\nNVA0001,2026-01-05,x\n\n');
    expect(result.rows).toEqual({ read: 2, accepted: 1, rejected: 1 });
    expect(navTuples(result)).toEqual([[3, 'NVA0001', '2026-01-02', 1]]);
    expect(result.rejected[0].line).toBe(7);
  });

  it('in a tab-delimited file too, a line of only spaces and tabs is blank (a fast-check counterexample)', () => {
    const text = 'series_id\tdate\tnav\r\nNVA0001\t2026-01-02\t1\r\n\t\r\n \t \t\r\nNVA0001\t2026-01-05\tx\r\n';
    const result = readText(text, 'nav', { delimiter: '\\t' });
    expect(result.rows).toEqual({ read: 2, accepted: 1, rejected: 1 });
    expect(result.rejected[0].line).toBe(5);
  });

  it('a line of empty fields is a data row, rejected', () => {
    const { rejected } = rejectedOf(HEADER + ',,\n""\n');
    expect(rejected).toEqual([
      { line: 2, raw: ',,', reason: 'series_id is empty' },
      { line: 3, raw: '""', reason: 'expected 3 fields as in the header, found 1 field' },
    ]);
  });

  it('the same (series, date) twice is kept twice, in file order', () => {
    const result = readText(HEADER + 'NVA0001,2026-01-02,1.5\nNVA0001,2026-01-02,1.5\nNVA0001,2026-01-02,1.6\n');
    expect(result.rows).toEqual({ read: 3, accepted: 3, rejected: 0 });
    expect(navTuples(result)).toEqual([
      [2, 'NVA0001', '2026-01-02', 1.5],
      [3, 'NVA0001', '2026-01-02', 1.5],
      [4, 'NVA0001', '2026-01-02', 1.6],
    ]);
  });

  it('BOM and CRLF together', () => {
    const result = readText('\ufeffseries_id,date,nav\r\nNVA0001,2026-01-02,1.25\r\nNVA0001,2026-01-05,oops\r\n');
    expect(navTuples(result)).toEqual([[2, 'NVA0001', '2026-01-02', 1.25]]);
    expect(result.rejected).toEqual([{ file: FILE, line: 3, raw: 'NVA0001,2026-01-05,oops', reason: 'nav "oops" is not a number' }]);
  });

  it('a day-first file with an unambiguous row is read day-first, its bad rows rejected', () => {
    const result = readText(HEADER + 'NVA0001,02-01-2026,1\nNVA0001,31-01-2026,2\nNVA0001,31-02-2026,3\n');
    expect(navTuples(result)).toEqual([
      [2, 'NVA0001', '2026-01-02', 1],
      [3, 'NVA0001', '2026-01-31', 2],
    ]);
    expect(result.rejected.map((r) => [r.line, r.reason])).toEqual([[4, 'date "31-02-2026" is not a valid date (expected a day-first date)']]);
  });
});

describe('files with no usable header stop with InputError (exit 3)', () => {
  const cases: Array<[string, string, RegExp]> = [
    ['empty file', '', /^feed\.csv, line 1: the file is empty; send a header row with the columns series_id, date, nav\.$/],
    ['BOM only', '\ufeff', /^feed\.csv, line 1: the file is empty;/],
    ['blank first line', '\nseries_id,date,nav\nNVA0001,2026-01-02,1\n', /^feed\.csv, line 1: the first line is blank, so the file has no header row; put the header .* on line 1\.$/],
    ['missing column', 'series_id,day,nav\nNVA0001,2026-01-02,1\n', /^feed\.csv, line 1: the header has no column "date" \(found: series_id, day, nav\); add the column or map it in the feed profile's columns\.$/],
    ['unbalanced header', '"series_id,date,nav\n', /^feed\.csv, line 1: the header cannot be read because a quoted field is never closed \(unbalanced quote\); fix the header row\.$/],
  ];
  for (const [name, text, message] of cases) {
    it(name, () => {
      let error: unknown;
      try {
        readText(text);
      } catch (caught) {
        error = caught;
      }
      expect(error).toBeInstanceOf(InputError);
      expect((error as InputError).exitCode).toBe(3);
      expect((error as Error).message).toMatch(message);
      // one sentence: a single full stop, at the end
      expect((error as Error).message.replace(/\.(?=\S)/g, '').match(/\.\s|\.$/g)).toHaveLength(1);
    });
  }

  it('auto delimiter with a one-column header', () => {
    expect(() => readText('series_id\n', 'nav', { delimiter: 'auto' })).toThrow(InputError);
  });
});

describe('readCsvFile', () => {
  it('a missing path is InputError exit 3 naming the path', () => {
    const path = join(tmpdir(), 'navassay-no-such-dir', 'nav.csv');
    let error: unknown;
    try {
      readCsvFile(path, 'nav', DEFAULT_PROFILE);
    } catch (caught) {
      error = caught;
    }
    expect(error).toBeInstanceOf(InputError);
    expect(error).not.toBeInstanceOf(ConfigError);
    expect((error as InputError).exitCode).toBe(3);
    expect((error as Error).message).toBe(`${path}: cannot open the file because it does not exist; check the path and permissions.`);
  });

  it('reads a file from disk with the path as the file name', () => {
    const dir = mkdtempSync(join(tmpdir(), 'navassay-ingest-'));
    const path = join(dir, 'nav.csv');
    writeFileSync(path, HEADER + 'NVA0001,2026-01-02,1\nNVA0001,bad,2\n');
    const result = readCsvFile(path, 'nav', DEFAULT_PROFILE);
    expect(result.file).toBe(path);
    expect(result.rejected).toEqual([{ file: path, line: 3, raw: 'NVA0001,bad,2', reason: 'date "bad" is not a valid date (expected YYYY-MM-DD)' }]);
  });
});
