import { DataType, makeVector, tableFromIPC, TimeUnit, util, type Data, type Table, type Vector } from 'apache-arrow';
import { ingestColumnarFile, TextDictionaryBuilder, type SourceColumn } from './columnar-ingest.js';
import { checkFooterCoversFile, checkStreamCoversFile, validateArrowTable } from './arrow-validate.js';
import { cutInput, InputError } from './errors.js';
import { DEFAULT_READ_LIMITS, type ReadLimits } from './limits.js';
import type { FeedProfile } from './profile.js';
import type { FileKind } from './schema.js';
import { NULL_BOOLEAN, NULL_DATE, type IngestResult } from './table.js';
import { isShared, sharedFloat64Array, sharedInt32Array } from './shared-columns.js';

const MILLIS_PER_DAY = 86_400_000;

/**
 * Reads a canonical file held as Arrow IPC (file or stream format, `.arrow` / `.feather` v2).
 * Typed columns are taken as typed; text columns are parsed with the profile's rules.
 */
export function readArrowBuffer(
  bytes: Uint8Array,
  fileName: string,
  kind: FileKind,
  profile: FeedProfile,
  limits: ReadLimits = DEFAULT_READ_LIMITS,
): IngestResult {
  const table = openArrowTable(bytes, fileName);
  validateArrowTable(table, fileName, limits.maxHeaderColumns);
  const columnNames = table.schema.fields.map((field) => field.name);
  return ingestColumnarFile(
    {
      fileName,
      rowCount: table.numRows,
      columnNames,
      readColumn: (name) => arrowSourceColumn(table.getChild(name)!, name, fileName),
    },
    kind,
    profile,
    limits,
  );
}

function openArrowTable(bytes: Uint8Array, fileName: string): Table {
  try {
    const table = tableFromIPC(bytes);
    checkFooterCoversFile(bytes, fileName);
    checkStreamCoversFile(bytes, fileName, table.numRows);
    return table;
  } catch (error) {
    if (error instanceof InputError) throw error;
    throw new InputError(
      `${fileName} cannot be read as an Arrow IPC file (${cutInput(String((error as Error)?.message ?? error))}); check that it is an uncompressed Arrow file or stream, or export it as CSV or Parquet.`,
    );
  }
}

/** Turns one Arrow column of any supported type into a source column, chunk by chunk. */
export function arrowSourceColumn(vector: Vector, name: string, fileName: string): SourceColumn {
  const type = vector.type as DataType;
  if (DataType.isDate(type) || DataType.isTimestamp(type)) return { form: 'days', days: arrowDays(vector) };
  if (DataType.isInt(type) || DataType.isFloat(type) || DataType.isDecimal(type)) {
    return { form: 'number', values: arrowNumbers(vector) };
  }
  if (DataType.isBool(type)) return { form: 'boolean', values: arrowBooleans(vector) };
  if (DataType.isUtf8(type) || DataType.isLargeUtf8(type) || DataType.isDictionary(type)) {
    return arrowText(vector);
  }
  throw new InputError(
    `${fileName} has column ${name} of Arrow type ${String(type)}, which navassay cannot read; store it as a string, number, date or boolean column.`,
  );
}

/** Calls `visit` for each chunk with the row number its first value has in the whole column. */
function eachChunk(vector: Vector, visit: (data: Data, firstRow: number) => void): void {
  let firstRow = 0;
  for (const data of vector.data) {
    visit(data, firstRow);
    firstRow += data.length;
  }
}

/** The chunk's validity test, or null when the chunk has no nulls and every value counts. */
function nullTest(data: Data): ((index: number) => boolean) | null {
  const bitmap = data.nullBitmap;
  if (data.nullCount === 0 || !bitmap || bitmap.length === 0) return null;
  const offset = data.offset;
  return (index) => {
    const bit = offset + index;
    return (bitmap[bit >> 3] & (1 << (bit & 7))) === 0;
  };
}

/**
 * The column's values as a view of the file's own bytes, when the file was read into shared
 * memory (`readInputFile`) and the column is one chunk of exactly the type wanted with no missing
 * value: the copy would hold the same numbers. At 25 M NAV rows this saves writing 310 MB of
 * fresh memory, and page faults are what a large copy costs most on some machines. The file's
 * bytes are only ever read (by the checks, the snapshot's writer and the hashing thread), so
 * the frame may keep them. Anything else is copied chunk by chunk, below.
 */
function sharedView<T extends Int32Array | Float64Array>(vector: Vector, type: { new (...args: never[]): T }): T | null {
  if (vector.data.length !== 1) return null;
  const data = vector.data[0];
  const values = data.values as unknown;
  if (!(values instanceof type) || !isShared(values) || nullTest(data)) return null;
  return values.subarray(0, data.length) as T;
}

/**
 * A dictionary column read through a view of its indices, under `sharedView`'s conditions and one
 * more: its entries, trimmed, are distinct and none is blank, so each index already is the code
 * the dictionary builder would give it (codes follow first appearance in the dictionary).
 */
function textView(vector: Vector): SourceColumn | null {
  if (vector.data.length !== 1 || !vector.data[0].dictionary) return null;
  const codes = sharedView(vector, Int32Array);
  if (!codes) return null;
  const dictionary: string[] = [];
  const seen = new Set<string>();
  const entries = vector.data[0].dictionary.toArray() as ArrayLike<unknown>;
  for (let i = 0; i < entries.length; i++) {
    const entry = entries[i];
    const text = entry === null || entry === undefined ? '' : String(entry).trim();
    if (text === '' || seen.has(text)) return null;
    seen.add(text);
    dictionary.push(text);
  }
  return { form: 'text', codes, dictionary };
}

function arrowDays(vector: Vector): Int32Array {
  const view = sharedView(vector, Int32Array);
  if (view) return view;
  const days = sharedInt32Array(vector.length);
  const type = vector.type as DataType;
  const millisPerUnit = DataType.isTimestamp(type) ? timestampMillisPerUnit(type.unit) : 1;
  eachChunk(vector, (data, firstRow) => {
    const values = data.values as Int32Array | BigInt64Array;
    if (values instanceof Int32Array) days.set(values.subarray(0, data.length), firstRow);
    else for (let i = 0; i < data.length; i++) days[firstRow + i] = toEpochDay(values[i], millisPerUnit);
    const isNull = nullTest(data);
    if (isNull) for (let i = 0; i < data.length; i++) if (isNull(i)) days[firstRow + i] = NULL_DATE;
  });
  return days;
}

/** Date32 holds epoch days already; Date64 and timestamps hold BigInt counts of a time unit. */
function toEpochDay(value: bigint, millisPerUnit: number): number {
  return Math.floor((Number(value) * millisPerUnit) / MILLIS_PER_DAY);
}

function timestampMillisPerUnit(unit: TimeUnit): number {
  switch (unit) {
    case TimeUnit.SECOND:
      return 1000;
    case TimeUnit.MILLISECOND:
      return 1;
    case TimeUnit.MICROSECOND:
      return 1e-3;
    case TimeUnit.NANOSECOND:
      return 1e-6;
  }
}

function arrowNumbers(vector: Vector): Float64Array {
  const view = sharedView(vector, Float64Array);
  if (view) return view;
  const numbers = sharedFloat64Array(vector.length);
  const type = vector.type as DataType;
  // Float16 stores raw half-precision bits and Decimal stores 128-bit words: only `get` decodes them.
  const decodesItself = DataType.isDecimal(type) || (DataType.isFloat(type) && type.precision === 0);
  const scale = DataType.isDecimal(type) ? type.scale : 0;
  eachChunk(vector, (data, firstRow) => {
    const values = data.values as ArrayLike<number | bigint>;
    if (decodesItself) for (let i = 0; i < data.length; i++) numbers[firstRow + i] = decodedNumber(vector, firstRow + i, scale);
    else if (values instanceof Float64Array) numbers.set(values.subarray(0, data.length), firstRow);
    else for (let i = 0; i < data.length; i++) numbers[firstRow + i] = Number(values[i]);
    const isNull = nullTest(data);
    if (isNull) for (let i = 0; i < data.length; i++) if (isNull(i)) numbers[firstRow + i] = NaN;
  });
  return numbers;
}

function decodedNumber(vector: Vector, row: number, scale: number): number {
  const value: unknown = vector.get(row);
  if (typeof value === 'number') return value;
  return util.bigNumToNumber(value as Parameters<typeof util.bigNumToNumber>[0], scale);
}

function arrowBooleans(vector: Vector): Uint8Array {
  const flags = new Uint8Array(vector.length);
  eachChunk(vector, (data, firstRow) => {
    const bits = data.values as Uint8Array;
    const isNull = nullTest(data);
    for (let i = 0; i < data.length; i++) {
      const bit = data.offset + i;
      flags[firstRow + i] = isNull?.(i) ? NULL_BOOLEAN : (bits[bit >> 3] >> (bit & 7)) & 1;
    }
  });
  return flags;
}

/**
 * Dictionary columns are re-coded once per dictionary entry, so a million rows of a few thousand
 * ids decode a few thousand strings; plain string columns go through a lookup per row.
 */
function arrowText(vector: Vector): SourceColumn {
  const view = textView(vector);
  if (view) return view;
  const builder = new TextDictionaryBuilder(vector.length);
  eachChunk(vector, (data, firstRow) => {
    const isNull = nullTest(data);
    if (data.dictionary) {
      const codeOfEntry = Int32Array.from(data.dictionary.toArray() as ArrayLike<unknown>, (entry) =>
        builder.codeFor(entry === null || entry === undefined ? null : String(entry)),
      );
      const indices = data.values as ArrayLike<number | bigint>;
      if (!isNull && indices instanceof Int32Array) {
        for (let i = 0; i < data.length; i++) builder.codes[firstRow + i] = codeOfEntry[indices[i]];
      } else {
        for (let i = 0; i < data.length; i++) builder.codes[firstRow + i] = isNull?.(i) ? -1 : codeOfEntry[Number(indices[i])];
      }
    } else {
      const chunk = makeVector(data);
      for (let i = 0; i < data.length; i++) builder.set(firstRow + i, isNull?.(i) ? null : (chunk.get(i) as string));
    }
  });
  const { codes, dictionary } = builder.finish();
  return { form: 'text', codes, dictionary };
}
