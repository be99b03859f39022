import { DataType, Message, RecordBatchReader, type Data, type Table } from 'apache-arrow';
import { InputError } from './errors.js';

/**
 * Checks an Arrow table read from untrusted bytes before any value is touched. The Arrow
 * library trusts the lengths a file's metadata states: a damaged length of four billion over a
 * buffer of sixteen bytes makes it loop for hours, and an index past the end of a dictionary
 * reads as nothing at all. Every length, offset and index is checked against the buffers the
 * file really holds, so such a file stops with one sentence instead.
 */
export function validateArrowTable(table: Table, fileName: string, maxColumns: number): void {
  const fields = table.schema.fields;
  if (fields.length > maxColumns) {
    throw new InputError(`${fileName} has ${fields.length} columns, more than the limit of ${maxColumns}; raise limits.max_header_columns in the run configuration if it is genuine.`);
  }
  for (const field of fields) {
    const vector = table.getChild(field.name);
    if (!vector) throw damaged(fileName, field.name, 'has no data');
    if (vector.length !== table.numRows) {
      throw damaged(fileName, field.name, `holds ${vector.length} values for ${table.numRows} rows`);
    }
    for (const data of vector.data) checkData(data, fileName, field.name, 0);
  }
}

const MAGIC = 'ARROW1';
/** Bytes allowed between the last block a footer lists and the footer: the end-of-stream marker and padding. */
const FOOTER_SLACK = 16;

/**
 * In the Arrow file format the footer lists every dictionary and record batch. A damaged footer
 * can list none of them, and the file then reads as zero rows without a word; so the blocks the
 * footer lists must reach up to the footer itself.
 */
export function checkFooterCoversFile(bytes: Uint8Array, fileName: string): void {
  if (bytes.length < 18 || textAt(bytes, 0) !== MAGIC || textAt(bytes, bytes.length - 6) !== MAGIC) return;
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const footerStart = bytes.length - 10 - view.getInt32(bytes.length - 10, true);
  const reader = RecordBatchReader.from(bytes);
  reader.open();
  const footer = (reader as unknown as { footer?: FooterBlocks })?.footer ?? (reader as unknown as { _impl?: { _footer?: FooterBlocks } })._impl?._footer;
  if (!footer) return;
  let end = schemaEnd(view);
  for (const block of [...footer.dictionaryBatches(), ...footer.recordBatches()]) {
    end = Math.max(end, Number(block.offset) + block.metaDataLength + Number(block.bodyLength));
  }
  if (footerStart - end > FOOTER_SLACK) {
    throw new InputError(
      `${fileName} is a damaged Arrow file: ${footerStart - end} bytes before its footer belong to no block the footer lists, so its data cannot be trusted; export the file again.`,
    );
  }
}

/**
 * The checks of `checkFooterCoversFile` for the Arrow stream format, which has no footer: the
 * stream's messages are walked frame by frame (continuation marker, metadata length, metadata,
 * body) and must end in the end-of-stream marker with nothing but padding after it, and the
 * rows its record batches state must be the rows read. A damaged frame that reads as an early
 * end, or a transfer cut between two batches, otherwise reads as fewer rows without a word.
 * Every step moves forward by at least eight bytes, so the walk is bounded by the file's size.
 */
export function checkStreamCoversFile(bytes: Uint8Array, fileName: string, rowsRead: number): void {
  if (bytes.length >= MAGIC.length && textAt(bytes, 0) === MAGIC) return; // the file format
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let at = 0;
  let statedRows = 0;
  for (;;) {
    let metadataLength = int32At(view, at, fileName);
    at += 4;
    if (metadataLength === CONTINUATION) {
      metadataLength = int32At(view, at, fileName);
      at += 4;
    }
    if (metadataLength === 0) break;
    if (metadataLength < 0 || at + metadataLength > bytes.length) throw damagedStream(fileName, 'a message states more metadata than the file holds');
    const message = Message.decode(bytes.subarray(at, at + metadataLength));
    const bodyLength = Number(message.bodyLength);
    at += metadataLength;
    if (!(bodyLength >= 0) || at + bodyLength > bytes.length) throw damagedStream(fileName, 'a message states a longer body than the file holds');
    at += bodyLength;
    if (message.isRecordBatch()) statedRows += Number(message.header().length);
  }
  if (bytes.length - at > STREAM_SLACK) {
    throw damagedStream(fileName, `${bytes.length - at} bytes after its end-of-stream marker belong to no message, so its data cannot be trusted`);
  }
  if (statedRows !== rowsRead) throw damagedStream(fileName, `its record batches state ${statedRows} rows but ${rowsRead} were read`);
}

/** The marker before a message's metadata length (absent in streams written before Arrow 0.15). */
const CONTINUATION = -1;
/** Bytes allowed after the end-of-stream marker: padding to an 8-byte boundary. */
const STREAM_SLACK = 7;

function int32At(view: DataView, at: number, fileName: string): number {
  if (at + 4 > view.byteLength) throw damagedStream(fileName, 'it ends without the end-of-stream marker, so it was cut short');
  return view.getInt32(at, true);
}

function damagedStream(fileName: string, what: string): InputError {
  return new InputError(`${fileName} is a damaged Arrow stream: ${what}; export the file again.`);
}

interface FooterBlocks {
  dictionaryBatches(): Iterable<{ offset: number | bigint; metaDataLength: number; bodyLength: number | bigint }>;
  recordBatches(): Iterable<{ offset: number | bigint; metaDataLength: number; bodyLength: number | bigint }>;
}

/** Where the schema message after the leading magic ends (with or without the continuation marker). */
function schemaEnd(view: DataView): number {
  const first = view.getInt32(8, true);
  return first === -1 ? 16 + view.getInt32(12, true) : 12 + first;
}

function textAt(bytes: Uint8Array, at: number): string {
  return String.fromCharCode(...bytes.subarray(at, at + MAGIC.length));
}

const MAX_NESTING = 32;

function checkData(data: Data, fileName: string, column: string, depth: number): void {
  if (depth > MAX_NESTING) throw damaged(fileName, column, 'is nested deeper than any real column');
  const { length, offset } = data;
  if (!Number.isSafeInteger(length) || length < 0 || !Number.isSafeInteger(offset) || offset < 0) {
    throw damaged(fileName, column, 'states a negative or impossible length');
  }
  const end = offset + length;
  const type = data.type as DataType;
  // The bitmap is measured before `nullCount`, which Arrow counts from the bitmap when asked.
  if (data.nullBitmap && data.nullBitmap.length > 0 && data.nullBitmap.length * 8 < end) {
    throw damaged(fileName, column, `has a validity bitmap shorter than its ${length} values`);
  }
  if (DataType.isDictionary(type)) {
    checkDictionary(data, fileName, column, depth);
  } else if (DataType.isUtf8(type) || DataType.isBinary(type) || DataType.isLargeUtf8(type) || DataType.isLargeBinary(type)) {
    checkVariableWidth(data, fileName, column, end);
  } else if (DataType.isBool(type)) {
    if (length > 0 && (!data.values || data.values.length * 8 < end)) throw short(fileName, column, length);
  } else if (hasFixedWidthValues(type)) {
    const stride = (type as { stride?: number }).stride ?? 1;
    if (length > 0 && (!data.values || data.values.length < end * stride)) throw short(fileName, column, length);
  }
  for (const child of data.children ?? []) checkData(child, fileName, column, depth + 1);
}

function hasFixedWidthValues(type: DataType): boolean {
  return (
    DataType.isInt(type) || DataType.isFloat(type) || DataType.isDecimal(type) || DataType.isDate(type) ||
    DataType.isTimestamp(type) || DataType.isTime(type) || DataType.isInterval(type) || DataType.isDuration(type) ||
    DataType.isFixedSizeBinary(type)
  );
}

function checkVariableWidth(data: Data, fileName: string, column: string, end: number): void {
  if (data.length === 0) return;
  const offsets = data.valueOffsets as ArrayLike<number | bigint> | undefined;
  if (!offsets || offsets.length < end + 1) throw short(fileName, column, data.length);
  const bytes = data.values?.length ?? 0;
  let previous = Number(offsets[data.offset]);
  if (previous < 0 || previous > bytes) throw damaged(fileName, column, 'has a text offset outside its data');
  for (let i = data.offset + 1; i <= end; i++) {
    const next = Number(offsets[i]);
    if (next < previous || next > bytes) throw damaged(fileName, column, 'has a text offset outside its data');
    previous = next;
  }
}

function checkDictionary(data: Data, fileName: string, column: string, depth: number): void {
  const dictionary = data.dictionary;
  if (!dictionary) throw damaged(fileName, column, 'is a dictionary column without its dictionary');
  let entries = 0;
  for (const chunk of dictionary.data) {
    checkData(chunk, fileName, column, depth + 1);
    entries += chunk.length;
  }
  if (entries !== dictionary.length) throw damaged(fileName, column, 'has a dictionary whose stated length differs from its data');
  const indices = data.values as ArrayLike<number | bigint> | undefined;
  if (data.length > 0 && (!indices || indices.length < data.offset + data.length)) throw short(fileName, column, data.length);
  const bitmap = data.nullCount > 0 ? data.nullBitmap : undefined;
  for (let i = 0; i < data.length; i++) {
    const bit = data.offset + i;
    if (bitmap && bitmap.length > 0 && (bitmap[bit >> 3] & (1 << (bit & 7))) === 0) continue;
    const index = Number(indices![bit]);
    if (!(index >= 0 && index < entries)) {
      throw damaged(fileName, column, `has a dictionary index ${index} outside its ${entries} entries (record ${i + 1})`);
    }
  }
}

function short(fileName: string, column: string, length: number): InputError {
  return damaged(fileName, column, `states ${length} values but its data holds fewer`);
}

function damaged(fileName: string, column: string, what: string): InputError {
  return new InputError(
    `${fileName} is a damaged Arrow file: column ${JSON.stringify(column.slice(0, 80))} ${what}; export the file again.`,
  );
}
