import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/ingest/errors.js';
import type { FileKind } from '../../src/ingest/schema.js';
import type { IngestResult } from '../../src/ingest/table.js';
import { layoutArb, masterTableArb, profileFor, writeCsv, type Layout, type Table } from './csv-writer.js';
import { readText } from './helpers.js';

type Mutation =
  | { kind: 'delete'; at: number }
  | { kind: 'insert'; at: number; byte: number }
  | { kind: 'duplicateLine'; line: number }
  | { kind: 'dropLine'; line: number }
  | { kind: 'swapFields'; line: number; a: number; b: number };

const interesting = [0x22, 0x2c, 0x3b, 0x09, 0x7c, 0x0a, 0x0d, 0x20, 0x2e, 0x2d, 0x25, 0x30, 0x39, 0x41, 0xc3, 0xa9, 0xff, 0x00];
const byteArb = fc.oneof(fc.constantFrom(...interesting), fc.integer({ min: 0, max: 255 }));
const position = fc.nat({ max: 1_000_000 });

const mutationArb: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({ kind: fc.constant('delete' as const), at: position }),
  fc.record({ kind: fc.constant('insert' as const), at: position, byte: byteArb }),
  fc.record({ kind: fc.constant('duplicateLine' as const), line: position }),
  fc.record({ kind: fc.constant('dropLine' as const), line: position }),
  fc.record({ kind: fc.constant('swapFields' as const), line: position, a: fc.nat({ max: 8 }), b: fc.nat({ max: 8 }) }),
);

/** Lines split the way the reader splits them: LF, CRLF or a lone CR; each keeps its ending. */
function linesWithEndings(bytes: Buffer): Buffer[] {
  const lines: Buffer[] = [];
  let start = 0;
  for (let i = 0; i < bytes.length; i++) {
    if (bytes[i] === 10 || bytes[i] === 13) {
      const end = bytes[i] === 13 && bytes[i + 1] === 10 ? i + 2 : i + 1;
      lines.push(bytes.subarray(start, end));
      start = end;
      i = end - 1;
    }
  }
  if (start < bytes.length) lines.push(bytes.subarray(start));
  return lines;
}

function mutate(bytes: Buffer, mutation: Mutation, delimiter: number): Buffer {
  if (bytes.length === 0) return mutation.kind === 'insert' ? Buffer.from([mutation.byte]) : bytes;
  switch (mutation.kind) {
    case 'delete': {
      const at = mutation.at % bytes.length;
      return Buffer.concat([bytes.subarray(0, at), bytes.subarray(at + 1)]);
    }
    case 'insert': {
      const at = mutation.at % (bytes.length + 1);
      return Buffer.concat([bytes.subarray(0, at), Buffer.from([mutation.byte]), bytes.subarray(at)]);
    }
    case 'duplicateLine':
    case 'dropLine':
    case 'swapFields': {
      const lines = linesWithEndings(bytes);
      const k = mutation.line % lines.length;
      if (mutation.kind === 'duplicateLine') lines.splice(k, 0, lines[k]);
      else if (mutation.kind === 'dropLine') lines.splice(k, 1);
      else {
        const line = lines[k];
        let contentEnd = line.length;
        while (contentEnd > 0 && (line[contentEnd - 1] === 10 || line[contentEnd - 1] === 13)) contentEnd--;
        const fields = line.subarray(0, contentEnd).toString('latin1').split(String.fromCharCode(delimiter));
        const a = mutation.a % fields.length;
        const b = mutation.b % fields.length;
        [fields[a], fields[b]] = [fields[b], fields[a]];
        lines[k] = Buffer.concat([Buffer.from(fields.join(String.fromCharCode(delimiter)), 'latin1'), line.subarray(contentEnd)]);
      }
      return Buffer.concat(lines);
    }
  }
}

/** Physical lines of a file without quotes, as the reader numbers them (BOM dropped). */
function physicalLines(bytes: Buffer): string[] {
  const begin = bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf ? 3 : 0;
  return linesWithEndings(bytes.subarray(begin)).map((line) => line.toString('utf8').replace(/\r\n$|\r$|\n$/, ''));
}

function checkAccounting(original: Buffer, mutated: Buffer, kind: FileKind, layout: Layout): void {
  let result: IngestResult;
  try {
    result = readText(mutated, kind, profileFor(layout));
  } catch (error) {
    // Only a damaged header (line 1) may stop the file, and only as InputError.
    expect(error).toBeInstanceOf(InputError);
    expect((error as InputError).exitCode).toBe(3);
    expect((error as Error).message).toMatch(/^feed\.csv, line 1: .*; .*\.$/s);
    expect(physicalLines(mutated)[0]).not.toBe(physicalLines(original)[0]);
    return;
  }
  const physical = physicalLines(mutated);
  expect(result.rows.read).toBe(result.rows.accepted + result.rows.rejected);
  expect(result.table.length).toBe(result.rows.accepted);
  expect(result.rejected.length).toBe(result.rows.rejected);
  for (const row of result.rejected) {
    expect(row.file).toBe('feed.csv');
    expect(row.line).toBeGreaterThanOrEqual(2);
    expect(row.line).toBeLessThanOrEqual(physical.length);
    expect(row.reason.length).toBeGreaterThan(0);
  }
  const starts = [...result.table.lines, ...result.rejected.map((r) => r.line)].sort((a, b) => a - b);
  expect(new Set(starts).size).toBe(starts.length); // one row per starting line
  for (const line of result.table.lines) {
    expect(line).toBeGreaterThanOrEqual(2);
    expect(line).toBeLessThanOrEqual(physical.length);
  }
  if (!mutated.includes(0x22)) {
    // No quotes: every non-blank physical line after the header is exactly one row, accepted or
    // rejected, and a rejected row's raw text is its line.
    const dataLines = physical.flatMap((text, index) => (index > 0 && !/^[ \t]*$/.test(text) ? [index + 1] : []));
    expect(starts).toEqual(dataLines);
    expect(result.rows.read).toBe(dataLines.length);
    for (const row of result.rejected) expect(row.raw).toBe(physical[row.line - 1]);
    if (kind === 'nav' && physical[0] === physicalLines(original)[0]) {
      // An independent verdict per row: the small reference reader below decides accept or reject.
      const accepted = new Set(result.table.lines);
      for (const line of dataLines) {
        const verdict = referenceVerdict(physical[0], physical[line - 1], layout);
        if (verdict === 'either') continue;
        expect({ line, text: physical[line - 1], accepted: accepted.has(line) }).toEqual({ line, text: physical[line - 1], accepted: verdict === 'accept' });
      }
    }
  }
}

/**
 * A reference reader for one unquoted NAV line, written from docs/ingestion.md rather than from
 * the reader's code: the line must split into the header's fields; the id, trimmed, must be
 * non-empty and free of control, invisible and replacement characters; the date must be
 * YYYY-MM-DD, YYYYMMDD or year-first with a four-digit year and one- or two-digit month and
 * day, and a real day (checked with
 * the platform's Date); the NAV a plain decimal with the layout's mark, an optional exponent and
 * an optional percent sign. 'either' where the rules leave the reader to the file's evidence
 * (day–month orders).
 */
function referenceVerdict(header: string, text: string, layout: Layout): 'accept' | 'reject' | 'either' {
  const names = header.split(layout.delimiter).map((name) => name.trim().toLowerCase());
  const fields = text.split(layout.delimiter);
  if (fields.length !== names.length) return 'reject';
  const field = (name: string) => fields[names.indexOf(name)];
  const id = field('series_id').trim();
  if (id === '' || /[\p{Cc}\p{Cf}\uFFFD]/u.test(id)) return 'reject';
  const date = referenceDate(field('date').replace(/^[ \t]+|[ \t]+$/g, ''));
  if (date !== 'accept') return date;
  return referenceNumber(field('nav'), layout.decimal) ? 'accept' : 'reject';
}

function referenceDate(text: string): 'accept' | 'reject' | 'either' {
  if (/^\d{8}$/.test(text)) return realDay(+text.slice(0, 4), +text.slice(4, 6), +text.slice(6, 8)) ? 'accept' : 'reject';
  const parts = text.split(/[-/. ]/);
  if (parts.length !== 3 || !parts.every((part) => /^\d{1,4}$/.test(part))) return 'reject';
  // A year has four digits, a day or month one or two: `2026-11-0027` is not a date.
  const dayOrMonth = (part: string) => part.length <= 2;
  if (parts[0].length === 4) return dayOrMonth(parts[1]) && dayOrMonth(parts[2]) && realDay(+parts[0], +parts[1], +parts[2]) ? 'accept' : 'reject';
  return parts[2].length === 4 && dayOrMonth(parts[0]) && dayOrMonth(parts[1]) ? 'either' : 'reject';
}

function realDay(year: number, month: number, day: number): boolean {
  const date = new Date(Date.UTC(2000, 0, 1));
  date.setUTCFullYear(year, month - 1, day);
  return date.getUTCFullYear() === year && date.getUTCMonth() === month - 1 && date.getUTCDate() === day;
}

function referenceNumber(raw: string, decimal: string): boolean {
  let text = raw.replace(/^[ \t]+|[ \t]+$/g, '');
  if (text.endsWith('%')) text = text.slice(0, -1).replace(/[ \t]+$/, '');
  const mark = decimal === ',' ? ',' : '\\.';
  if (!new RegExp(`^[+-]?(\\d+(${mark}\\d*)?|${mark}\\d+)([eE][+-]?\\d+)?$`).test(text)) return false;
  return Number.isFinite(Number(text.replace(',', '.')));
}

const plainIds = fc.constantFrom('NVA0001', 'NVA0002', 'Fonds-É1', '基金7', 'NVA😀9');
const plainNavArb: fc.Arbitrary<Table> = fc
  .array(fc.record({ series_id: plainIds, date: fc.integer({ min: 18_000, max: 21_000 }), nav: fc.double({ min: -1e6, max: 1e6, noNaN: true }) }), {
    minLength: 1,
    maxLength: 20,
  })
  .map((rows) => ({ columns: ['series_id', 'date', 'nav'], rows: rows.map((r) => ({ ...r, nav: r.nav === 0 ? 0 : r.nav })), quoteAll: rows.map(() => false) }));

const delimiterByte = (layout: Layout) => layout.delimiter.charCodeAt(0);

describe('mutated files keep the row accounting exact', () => {
  it('NAV files without quotes: every data line is one row, accepted or rejected', () => {
    fc.assert(
      fc.property(plainNavArb, layoutArb, fc.array(mutationArb, { minLength: 1, maxLength: 4 }), (table, layout, mutations) => {
        const original: Buffer = Buffer.from(writeCsv(table, layout).text, 'utf8');
        const mutated = mutations.reduce<Buffer>((bytes, m) => mutate(bytes, m, delimiterByte(layout)), original);
        checkAccounting(original, mutated, 'nav', layout);
      }),
      { numRuns: 4000 },
    );
  });

  it('master files with quoted, multi-line names', () => {
    fc.assert(
      fc.property(masterTableArb, layoutArb, fc.array(mutationArb, { minLength: 1, maxLength: 4 }), (table, layout, mutations) => {
        const original: Buffer = Buffer.from(writeCsv(table, layout).text, 'utf8');
        const mutated = mutations.reduce<Buffer>((bytes, m) => mutate(bytes, m, delimiterByte(layout)), original);
        checkAccounting(original, mutated, 'master', layout);
      }),
      { numRuns: 3000 },
    );
  });

  it('the mutation harness itself: a dropped data line is one row fewer, a duplicated one is one more', () => {
    const layout: Layout = { delimiter: ',', decimal: '.', eol: '\n', bom: false, trailingEol: true, autoDelimiter: false };
    const base = Buffer.from('series_id,date,nav\nNVA0001,2026-01-02,1\nNVA0001,2026-01-05,2\n');
    expect(readText(mutate(base, { kind: 'dropLine', line: 1 }, 44)).rows).toEqual({ read: 1, accepted: 1, rejected: 0 });
    const duplicated = readText(mutate(base, { kind: 'duplicateLine', line: 2 }, 44));
    expect(duplicated.rows).toEqual({ read: 3, accepted: 3, rejected: 0 });
    expect(Array.from(duplicated.table.lines)).toEqual([2, 3, 4]);
    const swapped = readText(mutate(base, { kind: 'swapFields', line: 1, a: 1, b: 2 }, 44));
    expect(swapped.rejected).toEqual([{ file: 'feed.csv', line: 2, raw: 'NVA0001,1,2026-01-02', reason: 'date "1" is not a valid date (expected YYYY-MM-DD)' }]);
    checkAccounting(base, mutate(base, { kind: 'insert', at: 20, byte: 0x0a }, 44), 'nav', layout);
  });

  it('the reference verdict decides: a date with a trailing letter is rejected, whatever lane reads it', () => {
    const layout: Layout = { delimiter: ',', decimal: '.', eol: '\n', bom: false, trailingEol: true, autoDelimiter: false };
    expect(referenceVerdict('series_id,date,nav', 'NVA0001,2026-01-02X,1', layout)).toBe('reject');
    expect(referenceVerdict('series_id,date,nav', 'NVA0001,2026-01-02,1', layout)).toBe('accept');
    const base = Buffer.from('series_id,date,nav\nNVA0001,2026-01-02,1\nNVA0001,2026-01-05,2\n');
    const result = readText(mutate(base, { kind: 'insert', at: 37, byte: 0x58 }, 44));
    expect(result.rejected.map((row) => row.raw)).toEqual(['NVA0001,2026-01-02X,1']);
    checkAccounting(base, mutate(base, { kind: 'insert', at: 37, byte: 0x58 }, 44), 'nav', layout);
  });

  it('the reference verdict decides: a zero-padded day or month is rejected (a tester read `2026-11-0027`)', () => {
    const layout: Layout = { delimiter: ',', decimal: '.', eol: '\n', bom: false, trailingEol: true, autoDelimiter: false };
    expect(referenceVerdict('series_id,date,nav', 'NVA0001,2026-01-0002,1', layout)).toBe('reject');
    expect(referenceVerdict('series_id,date,nav', 'NVA0001,2026-1-2,1', layout)).toBe('accept');
    const base = Buffer.from('series_id,date,nav\nNVA0001,2026-01-02,1\nNVA0001,2026-01-05,2\n');
    // Two zeros inserted before the day of line 2 and one before the month of line 3.
    const padded = [
      { kind: 'insert', at: 35, byte: 0x30 },
      { kind: 'insert', at: 35, byte: 0x30 },
      { kind: 'insert', at: 56, byte: 0x30 },
    ].reduce<Buffer>((bytes, m) => mutate(bytes, m as Mutation, 44), base);
    expect(padded.toString()).toBe('series_id,date,nav\nNVA0001,2026-01-0002,1\nNVA0001,2026-001-05,2\n');
    const result = readText(padded);
    expect(result.rejected.map((row) => row.raw)).toEqual(['NVA0001,2026-01-0002,1', 'NVA0001,2026-001-05,2']);
    checkAccounting(base, padded, 'nav', layout);
  });
});
