import { execFileSync } from 'node:child_process';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { epochDay } from '../../src/calendar/days.js';
import { cleanIdentifier } from '../../src/ingest/identifiers.js';
import { readInputFile } from '../../src/ingest/input-file.js';
import { DEFAULT_READ_LIMITS, oneYearAfter, readLimits } from '../../src/ingest/limits.js';
import { FeedProfileSchema } from '../../src/ingest/profile.js';
import { readFeedFile } from '../../src/ingest/read.js';
import { NavassayError, quoteInput } from '../../src/ingest/errors.js';
import { scratchDir } from '../cli/run-cli.js';
import { readText } from './helpers.js';

const catchError = (act: () => unknown): NavassayError => {
  try {
    act();
  } catch (error) {
    return error as NavassayError;
  }
  throw new Error('expected an error');
};

describe('only regular files within the size limit are read', () => {
  it('refuses a directory, a device and a FIFO with exit 3 and the reason', () => {
    const dir = scratchDir();
    expect(catchError(() => readInputFile(dir, 1000)).message).toMatch(/is not a regular file \(a directory\)|it is a directory/);
    const zero = catchError(() => readInputFile('/dev/zero', 1000));
    expect(zero.exitCode).toBe(3);
    expect(zero.message).toContain('/dev/zero: the file is not a regular file (a device)');
    const fifo = join(dir, 'pipe');
    execFileSync('mkfifo', [fifo]);
    expect(catchError(() => readInputFile(fifo, 1000)).message).toContain('is not a regular file (a FIFO)');
  });

  it('refuses files under /proc, which claim a size they do not have', () => {
    const error = catchError(() => readInputFile('/proc/self/status', 1 << 20));
    expect(error.exitCode).toBe(3);
    expect(error.message).toContain('pseudo file system');
  });

  it('refuses a file over the size limit, naming the limit to raise', () => {
    const path = join(scratchDir(), 'big.csv');
    writeFileSync(path, 'x'.repeat(2000));
    expect(readInputFile(path, 2000).length).toBe(2000);
    expect(catchError(() => readInputFile(path, 1999)).message).toContain('larger than the limit of 1999 bytes; raise limits.max_input_bytes');
  });
});

describe('CSV limits', () => {
  it('reads a 5,000-column header in full instead of cutting it at 4,096', () => {
    const extra = Array.from({ length: 4997 }, (_, k) => `x${k}`);
    const header = ['series_id', 'date', ...extra, 'nav'].join(',');
    const row = ['NVA0001', '2026-01-02', ...extra.map(() => ''), '101.5'].join(',');
    const result = readText(`${header}\n${row}\n`);
    expect(result.rows).toEqual({ read: 1, accepted: 1, rejected: 0 });
  });

  it('refuses a header wider than the limit with exit 3, never a silent cut', () => {
    const header = ['series_id', 'date', 'nav', ...Array.from({ length: 20 }, (_, k) => `x${k}`)].join(',');
    const error = catchError(() => readText(`${header}\n`, 'nav', {}, { ...DEFAULT_READ_LIMITS, maxHeaderColumns: 10 }));
    expect(error.exitCode).toBe(3);
    expect(error.message).toBe('feed.csv, line 1: the header has 23 columns, more than the limit of 10; raise limits.max_header_columns in the run configuration if the file is genuine.');
  });

  it('rejects a row whose field is over the limit, in either lane, and keeps only a bounded raw text', () => {
    const long = '1'.repeat(5000);
    const result = readText(`series_id,date,nav\nNVA0001,2026-01-02,${long}\nNVA0001,2026-01-05,2\n`, 'nav', {}, { ...DEFAULT_READ_LIMITS, maxFieldBytes: 1000 });
    expect(result.rows).toEqual({ read: 2, accepted: 1, rejected: 1 });
    expect(result.rejected[0].reason).toBe('field 3 is 5000 bytes long, more than the limit of 1000 (limits.max_field_bytes in the run configuration)');
    expect(result.rejected[0].raw.length).toBeLessThan(1100);
  });

  it('a tab-only value in a nullable column is a missing value, and the row is accepted', () => {
    const result = readText('series_id,benchmark_id,name\nNVA0001,\t,Fund one\n', 'master');
    expect(result.rows).toEqual({ read: 1, accepted: 1, rejected: 0 });
    const benchmark = result.table.columns.benchmark_id;
    expect(benchmark.type === 'text' && benchmark.codes[0]).toBe(-1);
  });
});

describe('identifiers', () => {
  const cases: Array<[string, string]> = [
    ['NUL', 'NVA\u00000001'],
    ['another control character', 'NVA\u00070001'],
    ['U+FFFD from invalid UTF-8', 'NVA\uFFFD0001'],
    ['a lone zero-width space', '\u200B'],
    ['an embedded byte-order mark', 'NVA\uFEFF0001'],
  ];
  it.each(cases)('rejects an id holding %s, with the reason, in CSV', (_, id) => {
    const result = readText(`series_id,date,nav\n${id},2026-01-02,1\nNVA0002,2026-01-02,1\n`);
    expect(result.rows).toEqual({ read: 2, accepted: 1, rejected: 1 });
    expect(result.rejected[0].reason).toMatch(/^series_id ".*" holds (a control character|U\+FFFD|only invisible characters|an invisible character)/);
  });

  it('the bytes of invalid UTF-8 in an id become U+FFFD and the row is rejected', () => {
    const bytes = Buffer.concat([Buffer.from('series_id,date,nav\nNVA'), Buffer.from([0xff]), Buffer.from(',2026-01-02,1\n')]);
    expect(readText(bytes).rejected[0].reason).toContain('U+FFFD');
  });

  it('identifiers: strip-invisible removes invisible characters but still refuses control characters', () => {
    expect(cleanIdentifier('series_id', 'NVA\u200B0001', 'strip-invisible')).toEqual({ value: 'NVA0001', problem: null });
    expect(cleanIdentifier('series_id', '\u200B', 'strip-invisible').problem).toContain('only invisible characters');
    expect(cleanIdentifier('series_id', 'NVA\u00000001', 'strip-invisible').problem).toContain('control character');
    const result = readText('series_id,date,nav\nNVA\u200B0001,2026-01-02,1\nNVA0001,2026-01-05,2\n', 'nav', { identifiers: 'strip-invisible' });
    expect(result.rows.accepted).toBe(2);
    const ids = result.table.columns.series_id;
    expect(ids.type === 'text' && ids.dictionary).toEqual(['NVA0001']);
  });
});

describe('dates outside the plausible range are rejected rows', () => {
  // as-of 2026-12-02: the range is 1900-01-01 to 2027-12-02 (as-of plus one year).
  const limits = readLimits({}, epochDay(2026, 12, 2));
  it.each(['0000-01-01', '1899-12-31', '2200-01-01', '9999-12-31', '2027-12-03'])('rejects %s', (date) => {
    const result = readText(`series_id,date,nav\nNVA0001,${date},1\n`, 'nav', {}, limits);
    expect(result.rows).toEqual({ read: 1, accepted: 0, rejected: 1 });
    expect(result.rejected[0].reason).toContain('is outside the plausible range 1900-01-01 to 2027-12-02');
  });
  it.each(['1900-01-01', '2027-12-02', '2026-12-02'])('accepts %s, inside the range', (date) => {
    expect(readText(`series_id,date,nav\nNVA0001,${date},1\n`, 'nav', {}, limits).rows.accepted).toBe(1);
  });
  it('one year after 29 February is 28 February', () => {
    expect(oneYearAfter(epochDay(2028, 2, 29))).toBe(epochDay(2029, 2, 28));
  });
});

describe('feed profile marks', () => {
  it.each([
    ['a multi-byte delimiter', { delimiter: '§' }, /delimiter: must be one ASCII character/],
    ['a newline delimiter', { delimiter: '\n' }, /a line break/],
    ['a two-character delimiter', { delimiter: ';;' }, /delimiter: must be one ASCII character/],
    ['a multi-byte quote', { quote: '«' }, /quote: must be one ASCII character/],
  ])('rejects %s at validation', (_, input, message) => {
    const parsed = FeedProfileSchema.safeParse(input);
    expect(parsed.success).toBe(false);
    const issue = parsed.error!.issues[0];
    expect(`${issue.path.join('.')}: ${issue.message}`).toMatch(message);
  });
});

describe('messages never echo unbounded input', () => {
  it('cuts a quoted value at 80 characters and says how long it was', () => {
    expect(quoteInput('x'.repeat(20_000_000))).toBe(`"${'x'.repeat(80)}…" (20000000 characters)`);
    expect(quoteInput('a\u0000b')).toBe('"a\\u0000b"');
  });

  it('a header without the needed columns lists at most twenty of the found ones', () => {
    const header = Array.from({ length: 500 }, (_, k) => `column${k}`).join(',');
    const error = catchError(() => readText(`${header}\n`));
    expect(error.message).toContain('and 480 more');
    expect(error.message.length).toBeLessThan(600);
  });
});

describe('readFeedFile', () => {
  it('turns a file it cannot open into exit 3 and reads only regular files', async () => {
    const dir = scratchDir();
    mkdirSync(join(dir, 'nav.csv'));
    await expect(readFeedFile(join(dir, 'nav.csv'), 'nav', FeedProfileSchema.parse({}))).rejects.toMatchObject({ exitCode: 3 });
  });
});

describe('holiday calendars are published ahead', () => {
  it('a holidays file keeps only the lower bound of the plausible range', () => {
    const limits = readLimits({}, epochDay(2026, 10, 14));
    const result = readText('calendar,date\nXCAL,2028-12-25\nXCAL,1899-12-25\n', 'holidays', {}, limits);
    expect(result.rows).toEqual({ read: 2, accepted: 1, rejected: 1 });
    expect(result.rejected[0].reason).toContain('1899-12-25 is outside the plausible range');
  });
});
