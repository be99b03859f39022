import {
  parquetMetadata,
  parquetRead,
  parquetSchema,
  type ColumnData,
  type FileMetaData,
  type ParquetParsers,
  type SchemaElement,
} from 'hyparquet';
import { ingestColumnarFile, matchColumns, TextDictionaryBuilder, type SourceColumn } from './columnar-ingest.js';
import { cutInput, InputError } from './errors.js';
import { decodeColumnPages, pageDecodedForm } from './parquet-pages.js';
import { DEFAULT_READ_LIMITS, type ReadLimits } from './limits.js';
import type { FeedProfile } from './profile.js';
import type { FileKind } from './schema.js';
import { NULL_BOOLEAN, NULL_DATE, type IngestResult } from './table.js';
import { sharedFloat64Array, sharedInt32Array } from './shared-columns.js';

const MILLIS_PER_DAY = 86_400_000n;

/**
 * Dates and timestamps arrive as epoch days straight from hyparquet's decoder instead of as Date
 * objects. Timestamps are BigInt counts of their unit; flooring keeps days before 1970 right.
 */
const EPOCH_DAY_PARSERS: Partial<ParquetParsers> = {
  dateFromDays: (days) => days,
  timestampFromMilliseconds: (millis) => floorDays(millis, 1n),
  timestampFromMicroseconds: (micros) => floorDays(micros, 1_000n),
  timestampFromNanoseconds: (nanos) => floorDays(nanos, 1_000_000n),
};

function floorDays(count: bigint, unitsPerMilli: bigint): number {
  const perDay = MILLIS_PER_DAY * unitsPerMilli;
  const quotient = count / perDay;
  return Number(count % perDay < 0n ? quotient - 1n : quotient);
}

/**
 * Reads a canonical file held as Parquet, only the columns the file kind needs, each as one array.
 * Flat string, date and number columns in the common encodings go through the page decoder
 * (parquet-pages.ts); anything else, and any file that decoder finds out of shape, through
 * hyparquet. `pageDecoder: false` reads every column with hyparquet: tests compare the two.
 */
export async function readParquetBuffer(
  bytes: Uint8Array,
  fileName: string,
  kind: FileKind,
  profile: FeedProfile,
  limits: ReadLimits = DEFAULT_READ_LIMITS,
  pageDecoder = true,
): Promise<IngestResult> {
  const file = exactArrayBuffer(bytes);
  const metadata = openParquetMetadata(file, fileName);
  const elements = topLevelColumns(metadata);
  const columnNames = [...elements.keys()];
  if (columnNames.length > limits.maxHeaderColumns) {
    throw new InputError(`${fileName} has ${columnNames.length} columns, more than the limit of ${limits.maxHeaderColumns}; raise limits.max_header_columns in the run configuration if it is genuine.`);
  }
  const rowCount = checkedRowCount(metadata, bytes.length, fileName);
  const wanted = [...new Set(matchColumns(fileName, columnNames, kind, profile).map((match) => match.sourceName))];
  const sources = pageDecoder ? decodeByPages(file, metadata, elements, wanted, rowCount) : new Map<string, SourceColumn>();
  const left = sources.size === 0 ? wanted : wanted.filter((name) => !sources.has(name));
  const chunks = await readColumnChunks(file, metadata, left);
  checkChunks(chunks, rowCount, fileName);
  for (const [name, columnChunks] of chunks) {
    sources.set(name, parquetSourceColumn(columnChunks, rowCount, elements.get(name)!, fileName));
  }
  return ingestColumnarFile({ fileName, rowCount, columnNames, readColumn: (name) => sources.get(name)! }, kind, profile, limits);
}

/**
 * The columns the page decoder can read (parquet-pages.ts), straight into typed columns. If any
 * of them is not the well-formed shape it expects, none is kept: hyparquet then reads every column,
 * so a damaged file gives the same message as before.
 */
function decodeByPages(
  file: ArrayBuffer,
  metadata: FileMetaData,
  elements: Map<string, SchemaElement>,
  wanted: readonly string[],
  rowCount: number,
): Map<string, SourceColumn> {
  const sources = new Map<string, SourceColumn>();
  try {
    for (const name of wanted) {
      const element = elements.get(name)!;
      const form = pageDecodedForm(element, metadata);
      if (form !== null) sources.set(name, decodeColumnPages(file, metadata, element, form, rowCount));
    }
    return sources;
  } catch {
    return new Map();
  }
}

/**
 * Rows a file can really hold. The count in the footer is what the columns are sized by, so a
 * damaged count of a trillion would allocate terabytes; it must agree with the row groups and
 * stay within what the file's bytes can encode (generously: 64 rows a byte, at least a million).
 */
function checkedRowCount(metadata: FileMetaData, fileBytes: number, fileName: string): number {
  const rows = Number(metadata.num_rows);
  const groupRows = metadata.row_groups.reduce((sum, group) => sum + Number(group.num_rows), 0);
  const plausible = Math.max(1_000_000, fileBytes * 64);
  if (!Number.isSafeInteger(rows) || rows < 0 || rows !== groupRows || rows > plausible) {
    throw new InputError(`${fileName} is a damaged Parquet file: its footer states ${cutInput(String(metadata.num_rows))} rows, which its row groups (${groupRows}) and size do not bear out; export the file again.`);
  }
  return rows;
}

/** Every decoded chunk must lie inside the stated rows, or values would land outside the columns. */
function checkChunks(chunks: Map<string, ColumnData[]>, rowCount: number, fileName: string): void {
  for (const [name, columnChunks] of chunks) {
    for (const { rowStart, columnData } of columnChunks) {
      if (!(rowStart >= 0 && rowStart + columnData.length <= rowCount)) {
        throw new InputError(`${fileName} is a damaged Parquet file: column ${JSON.stringify(name.slice(0, 80))} holds values past its ${rowCount} rows; export the file again.`);
      }
    }
  }
}

/** Column name → its decoded chunks (one or more per row group), each placed by its first row. */
async function readColumnChunks(
  file: ArrayBuffer,
  metadata: FileMetaData,
  columns: string[],
): Promise<Map<string, ColumnData[]>> {
  const chunks = new Map<string, ColumnData[]>(columns.map((name) => [name, []]));
  if (columns.length === 0) return chunks;
  await parquetRead({
    file,
    metadata,
    columns,
    parsers: EPOCH_DAY_PARSERS,
    onChunk: (chunk) => chunks.get(chunk.columnName)?.push(chunk),
  });
  return chunks;
}

function exactArrayBuffer(bytes: Uint8Array): ArrayBuffer {
  const { buffer, byteOffset, byteLength } = bytes;
  if (buffer instanceof ArrayBuffer && byteOffset === 0 && byteLength === buffer.byteLength) return buffer;
  return buffer.slice(byteOffset, byteOffset + byteLength) as ArrayBuffer;
}

function openParquetMetadata(file: ArrayBuffer, fileName: string): FileMetaData {
  try {
    return parquetMetadata(file, { parsers: EPOCH_DAY_PARSERS });
  } catch (error) {
    throw new InputError(
      `${fileName} cannot be read as a Parquet file (${cutInput(String((error as Error)?.message ?? error))}); check that the file is complete, or export it as CSV or Arrow.`,
    );
  }
}

/** Column name → schema element, for the columns directly under the root. */
function topLevelColumns(metadata: FileMetaData): Map<string, SchemaElement> {
  return new Map(parquetSchema(metadata).children.map((child) => [child.element.name, child.element]));
}

type ParquetForm = SourceColumn['form'];

function formOf(element: SchemaElement): ParquetForm | null {
  if (element.num_children) return null;
  const converted = element.converted_type;
  const logical = element.logical_type?.type;
  if (converted === 'DATE' || logical === 'DATE' || logical === 'TIMESTAMP' || element.type === 'INT96') return 'days';
  if (converted === 'TIMESTAMP_MILLIS' || converted === 'TIMESTAMP_MICROS') return 'days';
  if (element.type === 'BOOLEAN') return 'boolean';
  if (converted === 'DECIMAL' || logical === 'DECIMAL' || logical === 'FLOAT16') return 'number';
  if (element.type === 'INT32' || element.type === 'INT64' || element.type === 'FLOAT' || element.type === 'DOUBLE') {
    return 'number';
  }
  if (element.type === 'BYTE_ARRAY' && logical !== 'JSON' && logical !== 'BSON' && converted !== 'JSON') return 'text';
  return null;
}

/**
 * hyparquet gives nulls as null or undefined, int64 as BigInt, strings already decoded, and plain
 * arrays or typed arrays depending on the column; each value is read once into a typed array.
 */
function parquetSourceColumn(
  chunks: readonly ColumnData[],
  rowCount: number,
  element: SchemaElement,
  fileName: string,
): SourceColumn {
  const form = formOf(element);
  const eachValue = (visit: (row: number, value: unknown) => void) => {
    for (const { columnData, rowStart } of chunks) {
      for (let i = 0; i < columnData.length; i++) visit(rowStart + i, columnData[i]);
    }
  };
  switch (form) {
    case 'days': {
      const days = sharedInt32Array(rowCount).fill(NULL_DATE);
      eachValue((row, value) => typeof value === 'number' && (days[row] = value));
      return { form, days };
    }
    case 'number': {
      const numbers = sharedFloat64Array(rowCount).fill(NaN);
      eachValue((row, value) => (numbers[row] = toNumber(value)));
      return { form, values: numbers };
    }
    case 'boolean': {
      const flags = new Uint8Array(rowCount).fill(NULL_BOOLEAN);
      eachValue((row, value) => (flags[row] = value === true ? 1 : value === false ? 0 : NULL_BOOLEAN));
      return { form, values: flags };
    }
    case 'text': {
      const builder = new TextDictionaryBuilder(rowCount);
      builder.codes.fill(-1);
      eachValue((row, value) => builder.set(row, typeof value === 'string' ? value : null));
      const { codes, dictionary } = builder.finish();
      return { form, codes, dictionary };
    }
    case null:
      throw new InputError(
        `${fileName} has column ${element.name} of Parquet type ${describeType(element)}, which navassay cannot read; store it as a string, number, date or boolean column.`,
      );
  }
}

function toNumber(value: unknown): number {
  if (typeof value === 'number') return value;
  if (typeof value === 'bigint') return Number(value);
  return NaN;
}

function describeType(element: SchemaElement): string {
  if (element.num_children) return 'group (nested)';
  return [element.type, element.logical_type?.type ?? element.converted_type].filter(Boolean).join(' ');
}
