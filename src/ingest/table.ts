import type { FileKind } from './schema.js';
import type { RejectedRow, RowAccounting } from './records.js';

/** Marks a missing optional date in an Int32Array date column. */
export const NULL_DATE = -2147483648;
/** Marks a missing optional boolean in a Uint8Array column. */
export const NULL_BOOLEAN = 255;

/** One canonical column in typed arrays. Missing optional values: NULL_DATE, NaN, code −1, NULL_BOOLEAN. */
export type Column =
  | { readonly type: 'date'; readonly values: Int32Array }
  | { readonly type: 'number'; readonly values: Float64Array }
  | { readonly type: 'text'; readonly codes: Int32Array; readonly dictionary: readonly string[] }
  | { readonly type: 'boolean'; readonly values: Uint8Array };

/** The accepted rows of one input file, in canonical columns, in file order. */
export interface CanonicalTable {
  readonly kind: FileKind;
  readonly length: number;
  /**
   * Source line (1-based; a CSV header is line 1). Arrow and Parquet records are numbered as the
   * lines of the same table written as CSV: record k (1-based) is line k + 1.
   */
  readonly lines: Int32Array;
  /** Canonical column name → column; optional columns absent from the source are absent here. */
  readonly columns: Readonly<Record<string, Column>>;
}

/** What reading one file gives: accepted rows, rejected rows, and the accounting between them. */
export interface IngestResult {
  readonly file: string;
  readonly kind: FileKind;
  readonly table: CanonicalTable;
  readonly rejected: readonly RejectedRow[];
  readonly rows: RowAccounting;
}

export function textColumn(table: CanonicalTable, name: string) {
  const column = table.columns[name];
  return column?.type === 'text' ? column : undefined;
}

export function dateColumn(table: CanonicalTable, name: string) {
  const column = table.columns[name];
  return column?.type === 'date' ? column.values : undefined;
}

export function numberColumn(table: CanonicalTable, name: string) {
  const column = table.columns[name];
  return column?.type === 'number' ? column.values : undefined;
}

export function booleanColumn(table: CanonicalTable, name: string) {
  const column = table.columns[name];
  return column?.type === 'boolean' ? column.values : undefined;
}

/** The string at a row of a text column, or null when missing. */
export function textAt(column: { codes: Int32Array; dictionary: readonly string[] } | undefined, row: number): string | null {
  if (!column) return null;
  const code = column.codes[row];
  return code < 0 ? null : column.dictionary[code];
}
