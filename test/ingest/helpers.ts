import { expect } from 'vitest';
import { formatIsoDate } from '../../src/calendar/days.js';
import { readCsvBuffer } from '../../src/ingest/csv-reader.js';
import { DEFAULT_READ_LIMITS, type ReadLimits } from '../../src/ingest/limits.js';
import { FeedProfileSchema, type FeedProfile } from '../../src/ingest/profile.js';
import type { FileKind } from '../../src/ingest/schema.js';
import { NULL_BOOLEAN, NULL_DATE, type Column, type IngestResult } from '../../src/ingest/table.js';

export const FILE = 'feed.csv';

export function profile(input: Record<string, unknown> = {}): FeedProfile {
  return FeedProfileSchema.parse(input);
}

/**
 * The default limits with every Int32 day allowed: for tests of how a format carries dates,
 * which generate years far outside the plausible range (that rule has tests of its own).
 */
export const ANY_DATE_LIMITS: ReadLimits = { ...DEFAULT_READ_LIMITS, firstDay: -2147483647, lastDay: 2147483647 };

/** Reads CSV text (or bytes) as one canonical file named feed.csv (any date allowed unless limits say otherwise). */
export function readText(
  text: string | Uint8Array,
  kind: FileKind = 'nav',
  profileInput: Record<string, unknown> = {},
  limits: ReadLimits = ANY_DATE_LIMITS,
): IngestResult {
  const bytes = typeof text === 'string' ? Buffer.from(text, 'utf8') : text;
  return readCsvBuffer(bytes, FILE, kind, profile(profileInput), limits);
}

/** The value of one cell as a plain JS value: ISO text for dates, null for missing. */
export function cell(column: Column, row: number): string | number | boolean | null {
  switch (column.type) {
    case 'date':
      return column.values[row] === NULL_DATE ? null : formatIsoDate(column.values[row]);
    case 'number':
      return Number.isNaN(column.values[row]) ? null : column.values[row];
    case 'text':
      return column.codes[row] < 0 ? null : column.dictionary[column.codes[row]];
    case 'boolean':
      return column.values[row] === NULL_BOOLEAN ? null : column.values[row] === 1;
  }
}

/** Accepted rows as objects keyed by canonical column, plus `line`. */
export function rowsOf(result: IngestResult): Array<Record<string, string | number | boolean | null>> {
  const out: Array<Record<string, string | number | boolean | null>> = [];
  for (let row = 0; row < result.table.length; row++) {
    const record: Record<string, string | number | boolean | null> = { line: result.table.lines[row] };
    for (const [name, column] of Object.entries(result.table.columns)) record[name] = cell(column, row);
    out.push(record);
  }
  return out;
}

/** NAV rows as compact tuples [line, series_id, date, nav]. */
export function navTuples(result: IngestResult): Array<[number, string, string, number]> {
  return rowsOf(result).map((r) => [r.line as number, r.series_id as string, r.date as string, r.nav as number]);
}

export function expectBalanced(result: IngestResult): void {
  expect(result.rows.read).toBe(result.rows.accepted + result.rows.rejected);
  expect(result.rows.accepted).toBe(result.table.length);
  expect(result.rows.rejected).toBe(result.rejected.length);
}
