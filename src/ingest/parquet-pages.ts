import type { ColumnMetaData, DataReader, FileMetaData, PageHeader, SchemaElement } from 'hyparquet';
import { parquetHeader } from 'hyparquet/src/column.js';
import { readRleBitPackedHybrid } from 'hyparquet/src/encoding.js';
import { readPlain } from 'hyparquet/src/plain.js';
import { snappyUncompressor } from 'hysnappy';
import { endianness } from 'node:os';
import { TextDictionaryBuilder, type SourceColumn } from './columnar-ingest.js';
import { sharedFloat64Array, sharedInt32Array } from './shared-columns.js';
import { NULL_DATE } from './table.js';

/**
 * Decodes the pages of a flat Parquet column straight into our typed columns, for the common
 * shapes: PLAIN or dictionary-encoded values of strings, dates and plain numbers, in data pages
 * of version 1 or 2, uncompressed or snappy. hyparquet's own reader makes one JavaScript value per
 * row (a string per series id, a boxed number per NAV) that the reader then copies again; here a
 * dictionary page is decoded once and its indices become our text codes, and PLAIN numbers are
 * copied as bytes.
 *
 * It uses hyparquet's own page-header, level and PLAIN decoders, so it reads the bytes as
 * hyparquet does; it only skips the per-row values. Snappy pages go through hysnappy (WebAssembly),
 * which decodes every valid stream to the same bytes. Whenever a file strays from the well-formed
 * shape (a count that does not add up, an index past its dictionary, an encoding it does not know,
 * a snappy stream either decoder refuses) it throws, and the caller reads the file with hyparquet
 * instead, which gives the table or the error message the reader always gave. (One difference:
 * hyparquet's decoder refuses a valid but odd stream that spells a literal of under four bytes
 * with the long length form as its last element; no encoder writes that, and hysnappy reads it.)
 */

/** The forms of a source column this decoder makes; booleans are left to hyparquet. */
export type PageDecodedForm = 'days' | 'number' | 'text';

const CODECS_DECODED: ReadonlySet<string> = new Set(['UNCOMPRESSED', 'SNAPPY']);
const VALUE_ENCODINGS: ReadonlySet<string> = new Set(['PLAIN', 'PLAIN_DICTIONARY', 'RLE_DICTIONARY']);
const LITTLE_ENDIAN = endianness() === 'LE';

/**
 * The form this decoder gives a top-level column, or null when hyparquet must read it. The
 * conditions mirror hyparquet's conversions: these are the types it hands back unconverted
 * (numbers, epoch days) or decodes as UTF-8 text.
 */
export function pageDecodedForm(element: SchemaElement, metadata: FileMetaData): PageDecodedForm | null {
  if (!LITTLE_ENDIAN || element.num_children || element.repetition_type === 'REPEATED') return null;
  const form = valueForm(element);
  if (form === null) return null;
  for (const group of metadata.row_groups) {
    // hyparquet would read every chunk of a name given twice into one column; leave that to it.
    const chunks = group.columns.filter((column) => column.meta_data?.path_in_schema[0] === element.name);
    const chunk = chunks.length === 1 ? chunks[0] : undefined;
    const meta = chunk?.meta_data;
    if (!chunk || chunk.file_path || !meta || meta.path_in_schema.length !== 1 || meta.type !== element.type) return null;
    if (!CODECS_DECODED.has(meta.codec)) return null;
  }
  return form;
}

function valueForm(element: SchemaElement): PageDecodedForm | null {
  const converted = element.converted_type;
  const logical = element.logical_type?.type;
  switch (element.type) {
    case 'INT32':
      if ((converted === 'DATE' || converted === undefined) && logical === 'DATE') return 'days';
      if (converted === 'DATE' && logical === undefined) return 'days';
      return converted === undefined && logical === undefined ? 'number' : null;
    case 'INT64':
    case 'FLOAT':
    case 'DOUBLE':
      return converted === undefined && logical === undefined ? 'number' : null;
    case 'BYTE_ARRAY':
      return (converted === 'UTF8' || converted === undefined) && (logical === 'STRING' || logical === undefined) ? 'text' : null;
    default:
      return null;
  }
}

/** Reads one column of every row group into a source column of `rowCount` rows; throws on anything unexpected. */
export function decodeColumnPages(
  file: ArrayBuffer,
  metadata: FileMetaData,
  element: SchemaElement,
  form: PageDecodedForm,
  rowCount: number,
): SourceColumn {
  const sink = sinkFor(form, element, rowCount);
  const optional = element.repetition_type !== 'REQUIRED';
  let groupStart = 0;
  for (const group of metadata.row_groups) {
    const groupRows = Number(group.num_rows);
    const meta = group.columns.find((column) => column.meta_data?.path_in_schema[0] === element.name)!.meta_data!;
    const decoded = decodeChunk(chunkBytes(file, meta), meta, optional, sink, groupStart, groupRows);
    if (decoded !== groupRows) throw new Error(`column chunk holds ${decoded} rows, its row group ${groupRows}`);
    groupStart += groupRows;
  }
  if (groupStart !== rowCount) throw new Error('row groups do not add up to the file');
  return sink.finish();
}

function chunkBytes(file: ArrayBuffer, meta: ColumnMetaData): Uint8Array {
  const start = Number(meta.dictionary_page_offset || meta.data_page_offset);
  const length = Number(meta.total_compressed_size);
  if (!(start >= 0 && length >= 0 && start + length <= file.byteLength)) throw new Error('column chunk outside the file');
  return new Uint8Array(file, start, length);
}

/** Decodes the pages of one column chunk; returns how many rows they held. */
function decodeChunk(chunk: Uint8Array, meta: ColumnMetaData, optional: boolean, sink: ValueSink, groupStart: number, groupRows: number): number {
  const reader: DataReader = { view: new DataView(chunk.buffer, chunk.byteOffset, chunk.byteLength), offset: 0 };
  sink.startChunk();
  let rows = 0;
  // hyparquet stops once it has the row group's rows, whatever bytes follow; so does this loop.
  while (rows < groupRows && reader.offset < chunk.byteLength - 1) {
    const header = parquetHeader(reader);
    const body = chunk.subarray(reader.offset, reader.offset + header.compressed_page_size);
    if (body.length !== header.compressed_page_size) throw new Error('page runs past its column chunk');
    reader.offset += header.compressed_page_size;
    if (header.type === 'DICTIONARY_PAGE') {
      const count = header.dictionary_page_header?.num_values;
      if (count === undefined || count < 0) throw new Error('dictionary page without a count');
      sink.dictionary(decompress(body, header.uncompressed_page_size, meta.codec), count);
    } else if (header.type === 'DATA_PAGE' || header.type === 'DATA_PAGE_V2') {
      const page = dataPage(header, body, meta, optional, groupRows - rows);
      placePage(page, sink, groupStart + rows);
      rows += page.rows;
    } else {
      throw new Error(`page type ${header.type}`);
    }
  }
  return rows;
}

interface DataPage {
  readonly version: 1 | 2;
  readonly rows: number;
  /** One level a row (1 = a value, 0 = null), or null when every row has a value. */
  readonly defined: Uint8Array | null;
  readonly valueCount: number;
  readonly encoding: string;
  /** The values' bytes, uncompressed, starting at the first value. */
  readonly values: Uint8Array;
}

/** A data page's levels and values; `rowsLeft` bounds its rows before anything is allocated for them. */
function dataPage(header: PageHeader, body: Uint8Array, meta: ColumnMetaData, optional: boolean, rowsLeft: number): DataPage {
  if (header.type === 'DATA_PAGE') {
    const pageHeader = header.data_page_header;
    if (!pageHeader || !VALUE_ENCODINGS.has(pageHeader.encoding)) throw new Error('data page without a known encoding');
    if (optional && pageHeader.definition_level_encoding !== 'RLE') throw new Error('definition levels not RLE');
    const rows = checkedRows(pageHeader.num_values, rowsLeft);
    const page = decompress(body, header.uncompressed_page_size, meta.codec);
    const reader: DataReader = { view: new DataView(page.buffer, page.byteOffset, page.byteLength), offset: 0 };
    // Version 1 pages prefix their definition levels with their byte length.
    const defined = optional ? readLevels(reader, rows, undefined) : null;
    const valueCount = defined ? countDefined(defined) : rows;
    return { version: 1, rows, defined: defined && valueCount < rows ? defined : null, valueCount, encoding: pageHeader.encoding, values: page.subarray(reader.offset) };
  }
  const pageHeader = header.data_page_header_v2;
  if (!pageHeader || !VALUE_ENCODINGS.has(pageHeader.encoding)) throw new Error('data page without a known encoding');
  const { num_values: rows, num_rows, num_nulls, repetition_levels_byte_length: repeatBytes, definition_levels_byte_length: defineBytes } = pageHeader;
  checkedRows(rows, rowsLeft);
  if (rows !== num_rows || repeatBytes !== 0 || (!optional && defineBytes !== 0)) throw new Error('page levels do not fit a flat column');
  const reader: DataReader = { view: new DataView(body.buffer, body.byteOffset, body.byteLength), offset: 0 };
  const defined = optional ? readLevels(reader, rows, defineBytes) : null;
  const valueCount = defined ? countDefined(defined) : rows;
  if (rows - valueCount !== num_nulls) throw new Error('page null count disagrees with its levels');
  const uncompressedSize = header.uncompressed_page_size - defineBytes - repeatBytes;
  let values = body.subarray(defineBytes + repeatBytes);
  if (pageHeader.is_compressed !== false && uncompressedSize) values = decompress(values, uncompressedSize, meta.codec);
  return { version: 2, rows, defined: defined && valueCount < rows ? defined : null, valueCount, encoding: pageHeader.encoding, values };
}

/**
 * A snappy stream states its own length first; it must be the page's, and no stream grows more
 * than 64 bytes from a 3-byte copy. Checked before anything that size is allocated, so a damaged
 * page header cannot make the decoder ask for gigabytes.
 */
function plausibleSnappy(bytes: Uint8Array, uncompressedSize: number): boolean {
  if (uncompressedSize > bytes.length * 22 + 16) return false;
  let stated = 0;
  for (let i = 0; i < 5 && i < bytes.length; i++) {
    stated += (bytes[i]! & 0x7f) * 2 ** (7 * i);
    if (bytes[i]! < 128) return stated === uncompressedSize;
  }
  return false;
}

/** As hyparquet's decompressPage (the same codecs and the same length check), with hysnappy for snappy. */
/**
 * hysnappy: snappy compiled to WebAssembly, from hyparquet's authors; it decodes NAV pages about
 * 2.5 times faster than hyparquet's JavaScript decoder. Its memory grows to the largest page read.
 */
const snappyUncompress = snappyUncompressor();

function decompress(bytes: Uint8Array, uncompressedSize: number, codec: string): Uint8Array {
  if (!(Number.isInteger(uncompressedSize) && uncompressedSize >= 0)) throw new Error('page size out of range');
  if (codec === 'SNAPPY' && !plausibleSnappy(bytes, uncompressedSize)) throw new Error('snappy stream disagrees with its page size');
  const page = codec === 'SNAPPY' ? snappyUncompress(bytes, uncompressedSize) : bytes;
  if (page.length !== uncompressedSize) throw new Error('page length disagrees with its header');
  return page;
}

function checkedRows(rows: number, rowsLeft: number): number {
  if (!(Number.isInteger(rows) && rows >= 0 && rows <= rowsLeft)) throw new Error('page holds more rows than its row group');
  return rows;
}

function readLevels(reader: DataReader, rows: number, byteLength: number | undefined): Uint8Array {
  const levels = new Uint8Array(rows);
  readRleBitPackedHybrid(reader, 1, levels, byteLength);
  return levels;
}

function countDefined(levels: Uint8Array): number {
  let count = 0;
  for (let i = 0; i < levels.length; i++) {
    if (levels[i]! > 1) throw new Error('definition level above 1');
    count += levels[i]!;
  }
  return count;
}

function placePage(page: DataPage, sink: ValueSink, rowStart: number): void {
  if (page.encoding === 'PLAIN') {
    sink.plain(page.values, page.valueCount, rowStart, page.rows, page.defined);
    return;
  }
  // hyparquet reads the bit width even when no value follows, and fails when it is missing.
  if (page.values.length === 0) throw new Error('dictionary-encoded page without a bit width');
  const indices = new Int32Array(page.valueCount);
  const bitWidth = page.values[0]!;
  // As in hyparquet: a version 1 page with a bit width of 0 holds only index 0 and its runs are
  // not read; a version 2 page's runs are read whatever the width.
  if (page.valueCount > 0 && (bitWidth > 0 || page.version === 2)) {
    const reader: DataReader = { view: new DataView(page.values.buffer, page.values.byteOffset, page.values.byteLength), offset: 1 };
    readRleBitPackedHybrid(reader, bitWidth, indices, page.values.length - 1);
  }
  sink.indices(indices, rowStart, page.rows, page.defined);
}

/** Where decoded values go: one kind per form of source column. */
interface ValueSink {
  /** A new column chunk begins: its dictionary, if any, is its own. */
  startChunk(): void;
  dictionary(page: Uint8Array, count: number): void;
  plain(bytes: Uint8Array, valueCount: number, rowStart: number, rows: number, defined: Uint8Array | null): void;
  indices(indices: Int32Array, rowStart: number, rows: number, defined: Uint8Array | null): void;
  finish(): SourceColumn;
}

function sinkFor(form: PageDecodedForm, element: SchemaElement, rowCount: number): ValueSink {
  switch (form) {
    case 'number':
      return new NumberSink(element, rowCount);
    case 'days':
      return new DaysSink(rowCount);
    case 'text':
      return new TextSink(rowCount);
  }
}

function readerOf(bytes: Uint8Array): DataReader {
  return { view: new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength), offset: 0 };
}

/** PLAIN strings, checked to end inside their page (hyparquet's reader would look past its end). */
function plainByteArrays(bytes: Uint8Array, count: number): Uint8Array[] {
  // Each string takes at least its 4-byte length: a count beyond that is damage.
  if (!(Number.isInteger(count) && count >= 0 && count * 4 <= bytes.length)) throw new Error('strings run past their page');
  const reader = readerOf(bytes);
  const values = readPlain(reader, 'BYTE_ARRAY', count, undefined) as Uint8Array[];
  if (reader.offset > bytes.length || values.length !== count) throw new Error('strings run past their page');
  return values;
}

/** PLAIN values of a fixed width, checked to lie inside their page before hyparquet reads them. */
function plainFixed(bytes: Uint8Array, element: SchemaElement, count: number): ArrayLike<number | bigint> {
  const width = element.type === 'INT32' || element.type === 'FLOAT' ? 4 : 8;
  if (!(Number.isInteger(count) && count >= 0) || count * width > bytes.length) throw new Error('values run past their page');
  return readPlain(readerOf(bytes), element.type!, count, undefined) as ArrayLike<number | bigint>;
}

/**
 * Places a page's values (one per row with a value) at its rows from `rowStart`; rows whose level
 * is 0 get `missing`. Every row of a column is written by exactly one page, so the columns need no
 * filling beforehand.
 */
function spread<T extends Float64Array | Int32Array>(target: T, rowStart: number, rows: number, defined: Uint8Array | null, source: T, missing: number): void {
  if (defined === null) {
    target.set(source.subarray(0, rows), rowStart);
    return;
  }
  let value = 0;
  for (let i = 0; i < rows; i++) target[rowStart + i] = defined[i] === 1 ? source[value++]! : missing;
}

/** The dictionary entries a page's indices name, into `looked`, each index checked against the dictionary. */
function lookedUp<T extends Float64Array | Int32Array>(entries: T | null, indices: Int32Array, looked: T): T {
  if (entries === null) throw new Error('dictionary-encoded page without a dictionary');
  for (let i = 0; i < indices.length; i++) {
    const entry = indices[i]!;
    if (entry >= entries.length) throw new Error('dictionary index past its dictionary');
    looked[i] = entries[entry]!;
  }
  return looked;
}

/** Numbers (INT32, INT64, FLOAT, DOUBLE) as float64; nulls are NaN, as hyparquet's nulls became. */
class NumberSink implements ValueSink {
  private readonly values: Float64Array;
  private entries: Float64Array | null = null;

  constructor(
    private readonly element: SchemaElement,
    rowCount: number,
  ) {
    this.values = sharedFloat64Array(rowCount);
  }

  startChunk(): void {
    this.entries = null;
  }

  dictionary(page: Uint8Array, count: number): void {
    this.entries = asFloat64(plainFixed(page, this.element, count));
  }

  plain(bytes: Uint8Array, valueCount: number, rowStart: number, rows: number, defined: Uint8Array | null): void {
    if (defined === null && this.element.type === 'DOUBLE') {
      // Parquet stores doubles little-endian, as this machine does: the bytes are the values.
      if (valueCount * 8 > bytes.length) throw new Error('values run past their page');
      new Uint8Array(this.values.buffer, this.values.byteOffset + rowStart * 8, valueCount * 8).set(bytes.subarray(0, valueCount * 8));
      return;
    }
    spread(this.values, rowStart, rows, defined, asFloat64(plainFixed(bytes, this.element, valueCount)), NaN);
  }

  indices(indices: Int32Array, rowStart: number, rows: number, defined: Uint8Array | null): void {
    spread(this.values, rowStart, rows, defined, lookedUp(this.entries, indices, new Float64Array(indices.length)), NaN);
  }

  finish(): SourceColumn {
    return { form: 'number', values: this.values };
  }
}

function asFloat64(values: ArrayLike<number | bigint>): Float64Array {
  if (values instanceof Float64Array) return values;
  const numbers = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) numbers[i] = Number(values[i]!);
  return numbers;
}

/** Epoch days from INT32 DATE columns; nulls are NULL_DATE. */
class DaysSink implements ValueSink {
  private readonly days: Int32Array;
  private entries: Int32Array | null = null;
  private static readonly ELEMENT: SchemaElement = { name: 'days', type: 'INT32' };

  constructor(rowCount: number) {
    this.days = sharedInt32Array(rowCount);
  }

  startChunk(): void {
    this.entries = null;
  }

  dictionary(page: Uint8Array, count: number): void {
    this.entries = Int32Array.from(plainFixed(page, DaysSink.ELEMENT, count) as ArrayLike<number>);
  }

  plain(bytes: Uint8Array, valueCount: number, rowStart: number, rows: number, defined: Uint8Array | null): void {
    if (valueCount * 4 > bytes.length) throw new Error('values run past their page');
    if (defined === null) {
      new Uint8Array(this.days.buffer, this.days.byteOffset + rowStart * 4, valueCount * 4).set(bytes.subarray(0, valueCount * 4));
      return;
    }
    spread(this.days, rowStart, rows, defined, plainFixed(bytes, DaysSink.ELEMENT, valueCount) as Int32Array, NULL_DATE);
  }

  indices(indices: Int32Array, rowStart: number, rows: number, defined: Uint8Array | null): void {
    spread(this.days, rowStart, rows, defined, lookedUp(this.entries, indices, new Int32Array(indices.length)), NULL_DATE);
  }

  finish(): SourceColumn {
    return { form: 'days', days: this.days };
  }
}

const UTF8 = new TextDecoder();
const NOT_CODED = -2;

/**
 * Text as codes of our own dictionary. Codes are handed out in the order rows first meet each
 * value, exactly as when every row's string went through the builder, so the table is the same;
 * but each entry of a Parquet dictionary is decoded and trimmed once, not once per row.
 */
class TextSink implements ValueSink {
  private readonly builder: TextDictionaryBuilder;
  private entries: Uint8Array[] | null = null;
  private codeOfEntry = new Int32Array(0);

  constructor(rowCount: number) {
    this.builder = new TextDictionaryBuilder(rowCount);
  }

  startChunk(): void {
    this.entries = null;
  }

  dictionary(page: Uint8Array, count: number): void {
    this.entries = plainByteArrays(page, count);
    this.codeOfEntry = new Int32Array(count).fill(NOT_CODED);
  }

  plain(bytes: Uint8Array, valueCount: number, rowStart: number, rows: number, defined: Uint8Array | null): void {
    const decoded = plainByteArrays(bytes, valueCount);
    const { builder } = this;
    let value = 0;
    for (let i = 0; i < rows; i++) {
      builder.set(rowStart + i, defined === null || defined[i] === 1 ? UTF8.decode(decoded[value++]!) : null);
    }
  }

  indices(indices: Int32Array, rowStart: number, rows: number, defined: Uint8Array | null): void {
    const entries = this.entries;
    if (entries === null) throw new Error('dictionary-encoded page without a dictionary');
    const codeOfEntry = this.codeOfEntry;
    for (let i = 0; i < indices.length; i++) {
      const entry = indices[i]!;
      if (entry >= entries.length) throw new Error('dictionary index past its dictionary');
      if (codeOfEntry[entry] === NOT_CODED) codeOfEntry[entry] = this.builder.codeFor(UTF8.decode(entries[entry]!));
    }
    const codes = this.builder.codes;
    if (defined === null) {
      for (let i = 0; i < rows; i++) codes[rowStart + i] = codeOfEntry[indices[i]!]!;
      return;
    }
    let value = 0;
    for (let i = 0; i < rows; i++) codes[rowStart + i] = defined[i] === 1 ? codeOfEntry[indices[value++]!]! : -1;
  }

  finish(): SourceColumn {
    const { codes, dictionary } = this.builder.finish();
    return { form: 'text', codes, dictionary };
  }
}
