import { createHash } from 'node:crypto';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { readCsvBuffer } from '../../src/ingest/csv-reader.js';
import { readCsvSource } from '../../src/ingest/csv-source.js';
import { ConfigError } from '../../src/ingest/errors.js';
import type { FileKind } from '../../src/ingest/schema.js';
import { ANY_DATE_LIMITS, profile } from './helpers.js';

/**
 * A file is read through a window of bytes (src/ingest/csv-window.ts), not whole. Whatever the
 * window's size, and wherever its edges fall (inside a quoted field that spans lines, between
 * the CR and LF of a line ending, inside the header), the answer must be the one the whole file
 * in memory gives: the same accepted rows and lines, the same rejected rows with their reasons,
 * the same errors, and the SHA-256 of the file's bytes.
 */
const dir = mkdtempSync(join(tmpdir(), 'navassay-window-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const eol = fc.constantFrom('\n', '\r\n', '\r');
const id = fc.constantFrom('NVA0001', 'NVA0002', ' NVA0003 ', '"NVA0004"', '"NVA\n0005"', 'NVA"6', '', 'NVA0001');
const date = fc.constantFrom('2026-11-27', '2026-11-30', '2026-02-30', '27/11/2026', '11/27/2026', '03/04/2026', ' 2026-11-26', '"2026-11-25"', '2026-1');
const nav = fc.constantFrom('101.25', '-0.5', '1,234.5', '12.3%', '1.5e-3', '"7.25"', '"8.0', 'abc', '', '1234567890123456', '.5');
const row = fc.oneof(
  { weight: 6, arbitrary: fc.tuple(id, date, nav).map((fields) => fields.join(',')) },
  { weight: 1, arbitrary: fc.tuple(id, date).map((fields) => fields.join(',')) },
  { weight: 1, arbitrary: fc.constantFrom('', '   ', 'NVA0001,2026-11-27,1,extra', '"unclosed,2026-11-27,1') },
);
const csvFile = fc
  .tuple(fc.constantFrom('series_id,date,nav', '\ufeffseries_id,date,nav', '"series_id","date","nav"', 'series_id;date;nav'), fc.array(fc.tuple(row, eol), { maxLength: 30 }), fc.boolean())
  .map(([header, rows, lastEol]) => header + '\n' + rows.map(([text, end], k) => text + (k < rows.length - 1 || lastEol ? end : '')).join(''));

function outcome(read: () => unknown): unknown {
  try {
    return { value: read() };
  } catch (error) {
    return { error: String(error), config: error instanceof ConfigError };
  }
}

let fileNumber = 0;

/** The windowed read gives the whole read's rows (or its error), with the standard SHA-256 of the bytes. */
function expectSameAsWhole(windowed: unknown, whole: unknown, bytes: Buffer): void {
  if ('value' in (windowed as object)) {
    const { result, sha256 } = (windowed as { value: ReturnType<typeof readCsvSource> }).value;
    expect(sha256).toBe(createHash('sha256').update(bytes).digest('hex'));
    expect({ value: result }).toEqual(whole);
  } else {
    expect(windowed).toEqual(whole);
  }
}

describe('reading a CSV file through a window gives what the whole file gives', () => {
  it('for any window size and any rows', () => {
    fc.assert(
      fc.property(csvFile, fc.integer({ min: 1, max: 80 }), fc.constantFrom<FileKind>('nav'), fc.constantFrom('auto', 'iso', 'day-first'), (text, windowBytes, kind, dateFormat) => {
        const path = join(dir, `feed-${fileNumber++}.csv`);
        const bytes = Buffer.from(text, 'utf8');
        writeFileSync(path, bytes);
        const feedProfile = profile({ date_format: dateFormat });
        const whole = outcome(() => readCsvBuffer(bytes, path, kind, feedProfile, ANY_DATE_LIMITS));
        const windowed = outcome(() => readCsvSource(path, kind, feedProfile, ANY_DATE_LIMITS, windowBytes));
        expectSameAsWhole(windowed, whole, bytes);
      }),
      { numRuns: 1500 },
    );
  });

  it('with the SHA-256 taken on another thread while the rows are parsed', () => {
    fc.assert(
      fc.property(csvFile, fc.integer({ min: 1, max: 80 }), (text, windowBytes) => {
        const path = join(dir, `feed-${fileNumber++}.csv`);
        const bytes = Buffer.from(text, 'utf8');
        writeFileSync(path, bytes);
        const feedProfile = profile({ date_format: 'iso' });
        const whole = outcome(() => readCsvBuffer(bytes, path, 'nav', feedProfile, ANY_DATE_LIMITS));
        // Every file from 0 bytes on is hashed on the hashing thread here.
        const windowed = outcome(() => readCsvSource(path, 'nav', feedProfile, ANY_DATE_LIMITS, windowBytes, 0));
        expectSameAsWhole(windowed, whole, bytes);
      }),
      { numRuns: 60 },
    );
  });
});
