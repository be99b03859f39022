import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { formatIsoDate } from '../../src/calendar/days.js';
import type { FileKind } from '../../src/ingest/schema.js';
import { layoutArb, masterTableArb, navTableArb, profileFor, vendorTableArb, writeCsv, type Layout, type Table } from './csv-writer.js';
import { readText, rowsOf } from './helpers.js';

const DATE_COLUMNS = new Set(['date', 'as_of', 'inception']);

function expectedRows(table: Table, lines: number[], layout: Layout, kind: FileKind) {
  return table.rows.map((row, r) => {
    const out: Record<string, unknown> = { line: lines[r] };
    for (const column of table.columns) {
      const value = row[column];
      out[column] = DATE_COLUMNS.has(column) && typeof value === 'number' ? formatIsoDate(value) : value;
    }
    if (kind === 'vendor') {
      const text = String(row.value);
      out.value_text = layout.decimal === ',' ? text.replace('.', ',') : text;
    }
    return out;
  });
}

function roundTrip(kind: FileKind, tableArb: fc.Arbitrary<Table>) {
  fc.assert(
    fc.property(tableArb, layoutArb, (table, layout) => {
      const { text, lines } = writeCsv(table, layout);
      const result = readText(text, kind, profileFor(layout));
      expect(result.rejected).toEqual([]);
      expect(result.rows).toEqual({ read: table.rows.length, accepted: table.rows.length, rejected: 0 });
      expect(rowsOf(result)).toEqual(expectedRows(table, lines, layout, kind));
    }),
    { numRuns: 1500 },
  );
}

describe('any canonical table written to CSV reads back unchanged', () => {
  it('NAV feeds', () => roundTrip('nav', navTableArb));
  it('series masters (optional columns, empties, names with quotes, delimiters and line breaks)', () => roundTrip('master', masterTableArb));
  it('vendor figures, keeping the value as written', () => roundTrip('vendor', vendorTableArb));
});
