import { describe, expect, it } from 'vitest';
import { FeedProfileSchema } from '../../src/ingest/profile.js';
import { expectBalanced, navTuples, readText, rowsOf } from './helpers.js';

describe('feed profiles', () => {
  it('maps vendor column names (case-insensitively) onto canonical columns', () => {
    const result = readText('Fund Code,Price Date,NAV per Unit,Extra\nNVA0001,2026-01-02,101.25,z\n', 'nav', {
      columns: { series_id: 'fund code', date: 'Price Date', nav: 'NAV per Unit' },
    });
    expect(navTuples(result)).toEqual([[2, 'NVA0001', '2026-01-02', 101.25]]);
    expect(Object.keys(result.table.columns).sort()).toEqual(['date', 'nav', 'series_id']);
  });

  it('the mapped name appears in the missing-column error', () => {
    expect(() => readText('code,date,nav\n', 'nav', { columns: { series_id: 'Fund Code' } })).toThrow(
      'feed.csv, line 1: the header has no column "series_id" (mapped from "Fund Code") (found: code, date, nav); add the column or map it in the feed profile\'s columns.',
    );
  });

  it.each([
    ['day-first', 'NVA0001,03-04-2026,1\nNVA0001,04.05.2026,2\nNVA0001,5/6/2026,3\n', ['2026-04-03', '2026-05-04', '2026-06-05']],
    ['month-first', 'NVA0001,03-04-2026,1\nNVA0001,12/31/2026,2\nNVA0001,5/6/2026,3\n', ['2026-03-04', '2026-12-31', '2026-05-06']],
  ])('date_format %s', (format, body, dates) => {
    const result = readText('series_id,date,nav\n' + body, 'nav', { date_format: format });
    expectBalanced(result);
    expect(navTuples(result).map((t) => t[2])).toEqual(dates);
  });

  it('month-name dates under auto, in either order and any case', () => {
    const result = readText(
      'series_id,date,nav\nNVA0001,31-Dec-2026,1\nNVA0001,1 jan 2027,2\nNVA0001,Feb/3/2027,3\nNVA0001,4-September-2027,4\nNVA0001,5-Sept-2027,5\nNVA0001,6-Decx-2027,6\nNVA0001,20270707,7\n',
    );
    expect(navTuples(result).map((t) => t[2])).toEqual(['2026-12-31', '2027-01-01', '2027-02-03', '2027-09-04', '2027-09-05', '2027-07-07']);
    expect(result.rejected.map((r) => [r.line, r.reason])).toEqual([[7, 'date "6-Decx-2027" is not a valid date (expected YYYY-MM-DD)']]);
  });

  it('iso date_format accepts only YYYY-MM-DD', () => {
    const result = readText('series_id,date,nav\nNVA0001,2026-12-31,1\nNVA0001,31-Dec-2026,2\nNVA0001,20261231,3\n', 'nav', { date_format: 'iso' });
    expect(navTuples(result).map((t) => t[0])).toEqual([2]);
    expect(result.rejected.map((r) => r.line)).toEqual([3, 4]);
  });

  it('decimal comma with ; delimiter', () => {
    const result = readText('series_id;date;nav\nNVA0001;2026-01-02;101,25\nNVA0001;2026-01-05;1.234,5\nNVA0001;2026-01-06;101.25\n', 'nav', {
      delimiter: ';',
      decimal: ',',
      thousands: '.',
    });
    expect(navTuples(result).map((t) => t[3])).toEqual([101.25, 1234.5]);
    // With `.` as the thousands mark, 101.25 groups two digits: rejected, never read as 101250.
    expect(result.rejected.map((r) => [r.line, r.reason])).toEqual([[4, 'nav "101.25" is not a number']]);
  });

  it.each([
    [',', '.', '1,234.56', 1234.56],
    ['.', ',', '1.234,56', 1234.56],
    [' ', ',', '1 234,56', 1234.56],
    ["'", '.', "1'234.56", 1234.56],
    ['_', '.', '1_234_567.5', 1234567.5],
    [',', '.', '-12,345,678.9', -12345678.9],
    [',', '.', '999', 999],
  ])('thousands %j decimal %j: %s', (thousands, decimal, text, value) => {
    const delimiter = thousands === ';' || decimal === ';' ? '|' : ';';
    const result = readText(`series_id${delimiter}date${delimiter}nav\nNVA0001${delimiter}2026-01-02${delimiter}${text}\n`, 'nav', {
      delimiter,
      decimal,
      thousands,
    });
    expect(navTuples(result)).toEqual([[2, 'NVA0001', '2026-01-02', value]]);
  });

  it.each(['1,23', '12,34.5', '1234,567', '0,123', '1,234,56', '1.234,5', '1,23e5'])('misgrouped %s is rejected', (text) => {
    const result = readText(`series_id;date;nav\nNVA0001;2026-01-02;${text}\n`, 'nav', { delimiter: ';', thousands: ',' });
    expect(result.rows).toEqual({ read: 1, accepted: 0, rejected: 1 });
    expect(result.rejected[0].reason).toBe(`nav "${text}" is not a number`);
  });

  it('percent signs divide by 100 exactly once', () => {
    const result = readText('series_id,date,nav\nNVA0001,2026-01-02,12.3%\nNVA0001,2026-01-05,-0.5 %\nNVA0001,2026-01-06,1.5e1%\nNVA0001,2026-01-07,%\n');
    expect(navTuples(result).map((t) => t[3])).toEqual([0.123, -0.005, 0.15]);
    expect(result.rejected.map((r) => r.line)).toEqual([5]);
  });

  it.each([
    ['\\t', '\t'],
    ['|', '|'],
    ['auto', '\t'],
    ['auto', '|'],
    ['auto', ';'],
    ['auto', ','],
  ])('delimiter %j with a %j file', (setting, d) => {
    const text = ['series_id', 'date', 'nav'].join(d) + '\n' + ['NVA0001', '2026-01-02', '1.5'].join(d) + '\n' + ['NVA0002', '2026-01-02', '2.5'].join(d);
    const result = readText(text, 'nav', { delimiter: setting });
    expect(navTuples(result)).toEqual([
      [2, 'NVA0001', '2026-01-02', 1.5],
      [3, 'NVA0002', '2026-01-02', 2.5],
    ]);
  });

  it('auto delimiter looks at the header line only, also when lines end in a lone CR', () => {
    const result = readText('series_id;benchmark_id\rNVA0001;"a,b,c"\r', 'master', { delimiter: 'auto' });
    expect(rowsOf(result)).toEqual([{ line: 2, series_id: 'NVA0001', benchmark_id: 'a,b,c' }]);
  });

  it('quoted fields: doubled quotes, embedded delimiters and newlines', () => {
    const text =
      'series_id,benchmark_id,name,category\n' +
      '"NVA0001",BMK01,"Alpha ""Core"", Income",Bond\n' +
      'NVA0002,,"Line one\nline two, with comma",Equity\n' +
      'NVA0003,BMK02,"",\n';
    const result = readText(text, 'master');
    expectBalanced(result);
    expect(rowsOf(result)).toEqual([
      { line: 2, series_id: 'NVA0001', benchmark_id: 'BMK01', name: 'Alpha "Core", Income', category: 'Bond' },
      { line: 3, series_id: 'NVA0002', benchmark_id: null, name: 'Line one\nline two, with comma', category: 'Equity' },
      { line: 5, series_id: 'NVA0003', benchmark_id: 'BMK02', name: null, category: null },
    ]);
  });

  it("a custom quote character", () => {
    const result = readText("series_id,name,benchmark_id\n'NVA0001','It''s, quoted',BMK01\n", 'master', { quote: "'" });
    expect(rowsOf(result)).toEqual([{ line: 2, series_id: 'NVA0001', benchmark_id: 'BMK01', name: "It's, quoted" }]);
  });

  it.each([
    ['LF', '\n'],
    ['CRLF', '\r\n'],
    ['lone CR', '\r'],
  ])('%s line endings, with and without a trailing newline, with and without BOM', (_, eol) => {
    for (const bom of ['', '\ufeff']) {
      for (const trailing of [eol, '']) {
        const text = bom + ['series_id,date,nav', 'NVA0001,2026-01-02,1', '', 'NVA0001,2026-01-05,x', '"NVA0002",2026-01-05,2'].join(eol) + trailing;
        const result = readText(text);
        expect(navTuples(result)).toEqual([
          [2, 'NVA0001', '2026-01-02', 1],
          [5, 'NVA0002', '2026-01-05', 2],
        ]);
        expect(result.rejected).toEqual([{ file: 'feed.csv', line: 4, raw: 'NVA0001,2026-01-05,x', reason: 'nav "x" is not a number' }]);
      }
    }
  });

  it('line numbers after a multi-line quoted field count CR, LF and CRLF breaks alike', () => {
    for (const eol of ['\n', '\r\n', '\r']) {
      const text = ['series_id,name,benchmark_id', `NVA0001,"a${eol}b${eol}c",BMK01`, 'NVA0002,plain,BMK01', 'NVA0003,x,BMK01,extra'].join(eol);
      const result = readText(text, 'master');
      expect(rowsOf(result).map((r) => [r.line, r.name])).toEqual([
        [2, `a${eol}b${eol}c`],
        [5, 'plain'],
      ]);
      expect(result.rejected.map((r) => r.line)).toEqual([6]);
    }
  });

  it('vendor values keep their written text; booleans and optional dates in the master', () => {
    const vendor = readText('series_id,as_of,window,metric,value,unit\nNVA0001,2026-11-30,3y,std_dev,0.10,decimal\nNVA0001,2026-11-30,3y,sharpe, 1.20 ,\nNVA0001,2026-11-30,2w,beta,1,\n', 'vendor');
    expect(rowsOf(vendor)).toEqual([
      { line: 2, series_id: 'NVA0001', as_of: '2026-11-30', window: '3y', metric: 'std_dev', value: 0.1, value_text: '0.10', unit: 'decimal' },
      { line: 3, series_id: 'NVA0001', as_of: '2026-11-30', window: '3y', metric: 'sharpe', value: 1.2, value_text: '1.20', unit: null },
    ]);
    expect(vendor.rejected.map((r) => r.reason)).toEqual(['window "2w" is not a number of years or months such as 3y or 6m']);
    const master = readText('series_id,benchmark_id,stable_value,inception\nNVA0001,BMK01,yes,2020-01-31\nNVA0002,,,\nNVA0003,BMK01,maybe,\n', 'master');
    expect(rowsOf(master)).toEqual([
      { line: 2, series_id: 'NVA0001', benchmark_id: 'BMK01', stable_value: true, inception: '2020-01-31' },
      { line: 3, series_id: 'NVA0002', benchmark_id: null, stable_value: null, inception: null },
    ]);
    expect(master.rejected.map((r) => r.reason)).toEqual(['stable_value "maybe" is not true/false, yes/no or 1/0']);
  });

  it('profile validation refuses contradictions', () => {
    expect(FeedProfileSchema.safeParse({ decimal: ',', thousands: ',' }).success).toBe(false);
    expect(FeedProfileSchema.safeParse({ decimal: ',' }).success).toBe(false); // delimiter , is the decimal mark
    expect(FeedProfileSchema.safeParse({ delimiter: ';;' }).success).toBe(false);
    expect(FeedProfileSchema.safeParse({ date_format: 'dmy' }).success).toBe(false);
    expect(FeedProfileSchema.safeParse({ unknown_key: 1 }).success).toBe(false);
    expect(FeedProfileSchema.parse({ delimiter: '\\t', decimal: ',', thousands: '.' })).toMatchObject({ delimiter: '\\t' });
  });
});
