import { writeFileSync } from 'node:fs';
import {
  AsyncByteQueue,
  Bool,
  DateDay,
  Dictionary,
  Float64,
  Int32,
  makeData,
  makeVector,
  RecordBatchFileWriter,
  Table,
  tableFromIPC,
  tableToIPC,
  Utf8,
  vectorFromArray,
  type Vector,
} from 'apache-arrow';
import { arrowSourceColumn } from './arrow-reader.js';
import type { SourceColumn } from './columnar-ingest.js';
import { InputError } from './errors.js';
import { CANONICAL_COLUMNS, type FileKind } from './schema.js';
import { NULL_BOOLEAN, NULL_DATE, type CanonicalTable, type Column } from './table.js';
import { sharedInt32Array } from './shared-columns.js';

/**
 * Canonical tables as Arrow tables, the form snapshots are stored in and tests and the bench
 * write their Arrow and Parquet inputs from.
 *
 * Column types: text and ids are Dictionary<Utf8, Int32>, so the codes are copied as they are;
 * dates are Date32 (unit DAY), whose storage is Int32 days since 1970-01-01, exactly the
 * canonical epoch days, while any Arrow tool still sees real dates; numbers are Float64 and
 * booleans Bool. Missing values are Arrow nulls. A `line` Int32 column keeps each row's source
 * line (CSV) or record number (Arrow, Parquet).
 */
export const LINE_COLUMN = 'line';

export function canonicalToArrow(table: CanonicalTable): Table {
  const vectors: Record<string, Vector> = {};
  for (const [name, column] of Object.entries(table.columns)) vectors[name] = columnToVector(column, table.length);
  vectors[LINE_COLUMN] = makeVector(table.lines);
  return new Table(vectors);
}

function columnToVector(column: Column, length: number): Vector {
  switch (column.type) {
    case 'text':
      return textVector(column.codes, column.dictionary);
    case 'date':
      return primitiveVector(new DateDay(), column.values, (value) => value !== NULL_DATE);
    case 'number':
      return primitiveVector(new Float64(), column.values, (value) => !Number.isNaN(value));
    case 'boolean':
      return booleanVector(column.values, length);
  }
}

/** Bit `i` set when row `i` holds a value, as Arrow's validity bitmaps want. */
function validityBitmap(length: number, isValid: (row: number) => boolean): { nullBitmap: Uint8Array; nullCount: number } {
  const nullBitmap = new Uint8Array(Math.ceil(length / 8));
  let nullCount = 0;
  for (let row = 0; row < length; row++) {
    if (isValid(row)) nullBitmap[row >> 3] |= 1 << (row & 7);
    else nullCount++;
  }
  return { nullBitmap, nullCount };
}

/**
 * A column with no missing value needs no bitmap: Arrow's writer stores none when the null
 * count is 0, so the stored bytes are the same as with a full one, and the common column
 * (every row holds a value) costs one counting loop instead of a bit per row.
 */
const NO_NULLS = { nullBitmap: new Uint8Array(0), nullCount: 0 };

/*
 * The missing-value counts, one plain loop per array type: one shared loop taking a test per
 * value was not inlined (it saw three array types and three tests) and took half a second for
 * the 25 M rows of the standard universe.
 */
function countNegative(values: Int32Array): number {
  let count = 0;
  for (let row = 0; row < values.length; row++) if (values[row] < 0) count++;
  return count;
}

function countNaN(values: Float64Array): number {
  let count = 0;
  for (let row = 0; row < values.length; row++) if (values[row] !== values[row]) count++;
  return count;
}

function countEqual(values: Int32Array | Uint8Array, missing: number): number {
  let count = 0;
  for (let row = 0; row < values.length; row++) if (values[row] === missing) count++;
  return count;
}

function textVector(codes: Int32Array, dictionary: readonly string[]): Vector {
  const complete = countNegative(codes) === 0;
  const { nullBitmap, nullCount } = complete ? NO_NULLS : validityBitmap(codes.length, (row) => codes[row] >= 0);
  // Null slots still need an index inside the dictionary; 0 is never read through the bitmap.
  const indices = complete ? codes : codes.map((code) => (code < 0 ? 0 : code));
  const type = new Dictionary(new Utf8(), new Int32());
  const values = vectorFromArray([...dictionary], new Utf8());
  return makeVector(makeData({ type, length: codes.length, nullCount, nullBitmap, data: indices, dictionary: values }));
}

function primitiveVector<T extends DateDay | Float64>(
  type: T,
  values: T['TArray'],
  holdsValue: (value: number) => boolean,
): Vector {
  const complete = (values instanceof Float64Array ? countNaN(values) : countEqual(values as Int32Array, NULL_DATE)) === 0;
  const { nullBitmap, nullCount } = complete ? NO_NULLS : validityBitmap(values.length, (row) => holdsValue(values[row] as number));
  return makeVector(makeData({ type, length: values.length, nullCount, nullBitmap, data: values } as never));
}

function booleanVector(values: Uint8Array, length: number): Vector {
  const complete = countEqual(values, NULL_BOOLEAN) === 0;
  const { nullBitmap, nullCount } = complete ? NO_NULLS : validityBitmap(length, (row) => values[row] !== NULL_BOOLEAN);
  const bits = new Uint8Array(Math.ceil(length / 8));
  for (let row = 0; row < length; row++) if (values[row] === 1) bits[row >> 3] |= 1 << (row & 7);
  return makeVector(makeData({ type: new Bool(), length, nullCount, nullBitmap, data: bits }));
}

/** The inverse of `canonicalToArrow`; every column is taken by its Arrow type. */
export function arrowToCanonical(kind: FileKind, arrow: Table, fileName = `${kind} table`): CanonicalTable {
  for (const spec of CANONICAL_COLUMNS[kind]) {
    if (spec.required && !arrow.getChild(spec.name)) {
      throw new InputError(
        `${fileName} has no column ${spec.name}, which a stored ${kind} table needs; write the table again with canonicalToArrow.`,
      );
    }
  }
  const columns: Record<string, Column> = {};
  for (const field of arrow.schema.fields) {
    if (field.name === LINE_COLUMN) continue;
    columns[field.name] = sourceToColumn(arrowSourceColumn(arrow.getChild(field.name)!, field.name, fileName));
  }
  const lineVector = arrow.getChild(LINE_COLUMN);
  const lines = lineVector ? copyOfLines(lineVector) : recordNumbers(arrow.numRows);
  return { kind, length: arrow.numRows, lines, columns };
}

/**
 * The stored line column as a copy of its own (a view would keep the whole file's bytes alive),
 * on shared memory as the frame's other columns (shared-columns.ts).
 */
function copyOfLines(vector: Vector): Int32Array {
  const array = vector.toArray() as ArrayLike<number>;
  const lines = sharedInt32Array(array.length);
  lines.set(array);
  return lines;
}

/** 1, 2, …, rows: the lines of a table stored without its line column. */
function recordNumbers(rows: number): Int32Array {
  const lines = sharedInt32Array(rows);
  for (let row = 0; row < rows; row++) lines[row] = row + 1;
  return lines;
}

function sourceToColumn(source: SourceColumn): Column {
  switch (source.form) {
    case 'days':
      return { type: 'date', values: source.days };
    case 'number':
      return { type: 'number', values: source.values };
    case 'text':
      return { type: 'text', codes: source.codes, dictionary: source.dictionary };
    case 'boolean':
      return { type: 'boolean', values: source.values };
  }
}

/** The table as Arrow IPC file-format bytes. */
export function canonicalToArrowIpc(table: CanonicalTable): Uint8Array {
  return tableToIPC(canonicalToArrow(table), 'file');
}

/**
 * The same bytes as `canonicalToArrowIpc`, handed to `write` chunk by chunk as Arrow's writer
 * makes them (mostly views of the columns themselves), so a large table is never copied whole.
 */
export function writeCanonicalArrowIpc(table: CanonicalTable, write: (chunk: Uint8Array) => void): void {
  const writer = new RecordBatchFileWriter();
  writer.reset(new ChunkSink(write));
  writer.writeAll(canonicalToArrow(table));
}

/** A sink for Arrow's writer that passes each chunk on at once instead of queueing it. */
class ChunkSink extends AsyncByteQueue {
  constructor(private readonly take: (chunk: Uint8Array) => void) {
    super();
  }

  override write(value: Uint8Array): void {
    if (value.byteLength > 0) this.take(value);
  }
}

export function arrowIpcToCanonical(kind: FileKind, bytes: Uint8Array, fileName?: string): CanonicalTable {
  return arrowToCanonical(kind, tableFromIPC(bytes), fileName);
}

export function writeArrowIpc(table: CanonicalTable, path: string): void {
  writeFileSync(path, canonicalToArrowIpc(table));
}
