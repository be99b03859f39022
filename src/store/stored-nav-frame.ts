import { closeSync, fstatSync, openSync, readSync } from 'node:fs';
import { DataType, DateUnit, Precision, type Field } from 'apache-arrow';
import { Footer, type FileBlock } from 'apache-arrow/ipc/metadata/file';
import { Message } from 'apache-arrow/ipc/metadata/message';
import { sharedFloat64Array, sharedInt32Array } from '../ingest/shared-columns.js';
import { datedFrameOfRuns, rankOfEveryCode, type DatedFrame } from '../series/frame.js';
import { sha256OfOpenFile } from './durable-files.js';
import { alteredStoredFile, unreadableStoredFile } from './stored-files.js';

/**
 * A stored NAV table read in part: the file is checked against its SHA-256 through a small reused
 * buffer, then only the dates and values of its record batches are read into shared memory, each
 * buffer at its place in the file (the Arrow footer and each batch's metadata give the places),
 * and the series codes pass through the small buffer, where the series' runs of rows are found.
 * The rows' lines are not read: today's feed is compared with the previous snapshot by date and
 * value, and evidence cites today's lines. At 10,000 series the frame holds 300 MB instead of the
 * whole 500 MB file, and no view of the file keeps it alive.
 *
 * Only the form `run` stores is read this way: a table whose `series_id` is a dictionary of
 * Utf8 with Int32 codes, `date` Date32, `nav` Float64 and `line` Int32, none with a missing
 * value, in (id, date) order, uncompressed, in any number of record batches. A file that does
 * not match its SHA-256 is a damaged snapshot, as when it is read whole; for anything else
 * (another form, or a file that cannot be opened) the answer is null and the caller reads the
 * whole file as before. The frame is the whole-file decode's, value for value
 * (test/store/stored-nav-frame.test.ts).
 */
export function readNavFrameInPart(path: string, sha256: string): DatedFrame | null {
  let fd: number;
  try {
    fd = openSync(path, 'r');
  } catch {
    return null;
  }
  try {
    const size = fstatSync(fd).size;
    const scratch = new Uint8Array(CHUNK_BYTES);
    // The file is checked before its layout is parsed: damaged metadata could send a parser anywhere.
    if (sha256OfOpenFile(fd, scratch) !== sha256) throw alteredStoredFile(path);
    const layout = layoutOrNull(fd, size);
    if (!layout) return null;
    const columns: NavColumns = { dates: sharedInt32Array(layout.rows), values: sharedFloat64Array(layout.rows) };
    const runs = new SeriesRuns(layout.dictionary);
    readColumns(fd, layout, columns, runs, scratch, path);
    return runs.frame({ dictionary: layout.dictionary, ...columns });
  } finally {
    closeSync(fd);
  }
}

type ColumnName = 'codes' | 'dates' | 'values' | 'lines';

/** Where one column of one record batch lies in the file. */
interface ColumnRange {
  readonly column: ColumnName;
  readonly start: number;
  readonly bytes: number;
  readonly firstRow: number;
}

interface NavColumns {
  readonly dates: Int32Array;
  readonly values: Float64Array;
}

interface NavLayout {
  readonly dictionary: string[];
  readonly rows: number;
  /** In file order, none overlapping. */
  readonly ranges: ColumnRange[];
}

const ARROW_MAGIC = 'ARROW1';
/** The file ends with the footer's Int32 length and the magic. */
const TRAILER_BYTES = 4 + ARROW_MAGIC.length;
const CHUNK_BYTES = 4 << 20;

/** Each column the frame is built from, its field name and the width of one value. */
const COLUMNS: ReadonlyArray<{ column: ColumnName; field: string; width: number; fits: (type: DataType) => boolean }> = [
  { column: 'codes', field: 'series_id', width: 4, fits: (type) => DataType.isDictionary(type) && isInt32(type.indices) && DataType.isUtf8(type.dictionary) },
  { column: 'dates', field: 'date', width: 4, fits: (type) => DataType.isDate(type) && type.unit === DateUnit.DAY },
  { column: 'values', field: 'nav', width: 8, fits: (type) => DataType.isFloat(type) && type.precision === Precision.DOUBLE },
  { column: 'lines', field: 'line', width: 4, fits: isInt32 },
];

function isInt32(type: DataType): boolean {
  return DataType.isInt(type) && type.bitWidth === 32 && type.isSigned;
}

/** The file's layout when it is in the stored form, else null (also when it cannot be parsed). */
function layoutOrNull(fd: number, size: number): NavLayout | null {
  try {
    return layoutOf(fd, size);
  } catch {
    return null;
  }
}

function layoutOf(fd: number, size: number): NavLayout | null {
  if (size < 2 * 8 + TRAILER_BYTES) return null;
  const decoder = new TextDecoder();
  if (decoder.decode(readAt(fd, ARROW_MAGIC.length, 0)) !== ARROW_MAGIC) return null;
  const trailer = readAt(fd, TRAILER_BYTES, size - TRAILER_BYTES);
  if (decoder.decode(trailer.subarray(4)) !== ARROW_MAGIC) return null;
  const footerLength = new DataView(trailer.buffer, trailer.byteOffset).getInt32(0, true);
  if (footerLength <= 0 || footerLength > size - TRAILER_BYTES - 8) return null;
  const footer = Footer.decode(readAt(fd, footerLength, size - TRAILER_BYTES - footerLength));
  const fields = footer.schema.fields;
  const places = bufferPlaces(fields);
  if (!places) return null;
  const seriesField = fields[places.get('codes')!.field];
  const dictionary = dictionaryOf(fd, size, footer, (seriesField.type as { id: number }).id);
  if (!dictionary) return null;
  return batchRanges(fd, size, footer, places, dictionary);
}

/** For each column, its field's index (the first field of that name, as `Table.getChild` finds it) and its data buffer's index. */
function bufferPlaces(fields: Field[]): Map<ColumnName, { field: number; buffer: number }> | null {
  const firstBuffer: number[] = [];
  let buffers = 0;
  for (const field of fields) {
    const count = bufferCount(field.type);
    if (count === null) return null;
    firstBuffer.push(buffers);
    buffers += count;
  }
  const places = new Map<ColumnName, { field: number; buffer: number }>();
  for (const { column, field: name, fits } of COLUMNS) {
    const field = fields.findIndex((candidate) => candidate.name === name);
    if (field < 0 || !fits(fields[field].type)) return null;
    // The validity bitmap comes first, then the values (or the dictionary codes).
    places.set(column, { field, buffer: firstBuffer[field] + 1 });
  }
  return places;
}

/** Buffers of a flat column in a record batch; null for types the stored form never holds. */
function bufferCount(type: DataType): number | null {
  if (DataType.isDictionary(type) || DataType.isInt(type) || DataType.isFloat(type) || DataType.isDate(type) || DataType.isBool(type)) return 2;
  if (DataType.isUtf8(type)) return 3;
  return null;
}

/** The series ids: the one dictionary batch of the `series_id` field, when it holds distinct texts. */
function dictionaryOf(fd: number, size: number, footer: Footer, id: number): string[] | null {
  const batches = [...footer.dictionaryBatches()].map((block) => ({ block, message: messageAt(fd, size, block) }));
  const ours = batches.filter(({ message }) => message.isDictionaryBatch() && message.header().id === id);
  if (ours.length !== 1) return null;
  const { block, message } = ours[0];
  if (!message.isDictionaryBatch() || message.compression) return null;
  const header = message.header();
  const node = header.nodes[0];
  if (header.isDelta || !node || node.nullCount !== 0 || header.buffers.length < 3) return null;
  const body = block.offset + block.metaDataLength;
  const offsets = new Int32Array(readAt(fd, (node.length + 1) * 4, body + header.buffers[1].offset).buffer);
  const data = readAt(fd, header.buffers[2].length, body + header.buffers[2].offset);
  const decoder = new TextDecoder('utf-8');
  const texts: string[] = [];
  for (let k = 0; k < node.length; k++) {
    if (!(offsets[k] >= 0 && offsets[k] <= offsets[k + 1] && offsets[k + 1] <= data.length)) return null;
    texts.push(decoder.decode(data.subarray(offsets[k], offsets[k + 1])));
  }
  return new Set(texts).size === texts.length ? texts : null;
}

/** The four columns' ranges in every record batch, rows counted in the footer's order of batches. */
function batchRanges(fd: number, size: number, footer: Footer, places: Map<ColumnName, { field: number; buffer: number }>, dictionary: string[]): NavLayout | null {
  const ranges: ColumnRange[] = [];
  let rows = 0;
  for (const block of footer.recordBatches()) {
    const message = messageAt(fd, size, block);
    if (!message.isRecordBatch() || message.compression) return null;
    const header = message.header();
    const body = block.offset + block.metaDataLength;
    const bodyEnd = body + message.bodyLength;
    for (const { column, width } of COLUMNS) {
      const place = places.get(column)!;
      const node = header.nodes[place.field];
      const region = header.buffers[place.buffer];
      if (!node || !region || node.nullCount !== 0 || node.length !== header.length) return null;
      const bytes = header.length * width;
      const start = body + region.offset;
      if (region.offset < 0 || bytes > region.length || start + bytes > bodyEnd || bodyEnd > size) return null;
      if (bytes > 0) ranges.push({ column, start, bytes, firstRow: rows });
    }
    rows += header.length;
  }
  ranges.sort((a, b) => a.start - b.start);
  return inFileOrder(ranges) ? { dictionary, rows, ranges } : null;
}

/** No two ranges overlap, and the codes come in row order (the series' runs are found as they are read). */
function inFileOrder(ranges: readonly ColumnRange[]): boolean {
  let end = 0;
  let codesRow = -1;
  for (const range of ranges) {
    if (range.start < end) return false;
    end = range.start + range.bytes;
    if (range.column !== 'codes') continue;
    if (range.firstRow <= codesRow) return false;
    codesRow = range.firstRow;
  }
  return true;
}

/** The IPC message at a footer's block: its metadata follows a continuation marker (or, in old files, only its length). */
function messageAt(fd: number, size: number, block: FileBlock): Message {
  if (block.offset < 0 || block.offset + block.metaDataLength > size) throw new RangeError('a block outside the file');
  const prefix = new DataView(readAt(fd, 8, block.offset).buffer);
  const continued = prefix.getInt32(0, true) === -1;
  const length = prefix.getInt32(continued ? 4 : 0, true);
  const start = block.offset + (continued ? 8 : 4);
  if (length <= 0 || start + length > block.offset + block.metaDataLength) throw new RangeError('metadata outside its block');
  return Message.decode(readAt(fd, length, start));
}

/** `length` bytes at `position`, on an ArrayBuffer of their own; a file that ends before them is an error. */
function readAt(fd: number, length: number, position: number): Uint8Array {
  const bytes = new Uint8Array(length);
  if (fill(fd, bytes, position) < length) throw new RangeError('the file ends too soon');
  return bytes;
}

/** Reads into `target` from `position` until it is full or the file ends; the bytes read. */
function fill(fd: number, target: Uint8Array, position: number): number {
  let filled = 0;
  for (let read = 1; read > 0 && filled < target.length; filled += read) read = readSync(fd, target, filled, target.length - filled, position + filled);
  return filled;
}

/** The SHA-256 (hex) of the whole file, read through `scratch`; a file that cannot be read is a damaged snapshot. */
/**
 * The dates and values of every range into their columns, and the codes through `scratch` into
 * `runs`. The lines' ranges are passed over (the stored form has them; the frame does not keep them).
 */
function readColumns(fd: number, layout: NavLayout, columns: NavColumns, runs: SeriesRuns, scratch: Uint8Array, path: string): void {
  for (const range of layout.ranges) {
    if (range.column === 'lines') continue;
    if (range.column === 'codes') {
      // The scratch's length is a multiple of 4: each chunk holds whole codes.
      for (let done = 0; done < range.bytes; done += scratch.length) {
        const chunk = scratch.subarray(0, Math.min(scratch.length, range.bytes - done));
        readFully(fd, chunk, range.start + done, path);
        runs.add(new Int32Array(chunk.buffer, 0, chunk.length / 4));
      }
    } else {
      const target = columns[range.column];
      readFully(fd, new Uint8Array(target.buffer, range.firstRow * target.BYTES_PER_ELEMENT, range.bytes), range.start, path);
    }
  }
}

/** Fills `target` from `position`; a file that cannot be read, or ends before, is a damaged snapshot. */
function readFully(fd: number, target: Uint8Array, position: number, path: string): void {
  let filled: number;
  try {
    filled = fill(fd, target, position);
  } catch (error) {
    throw unreadableStoredFile(path, error);
  }
  if (filled < target.length) throw alteredStoredFile(path);
}

/**
 * The series' runs of rows, found from the codes as they are read in row order, as the frame
 * of a sorted feed finds them (`framedInFileOrder` in src/series/frame.ts): a new run at each
 * change of code, ids in ascending order. Codes out of that order (or outside the dictionary)
 * leave no frame to build from the runs.
 */
class SeriesRuns {
  private readonly rankOfCode: Int32Array;
  private readonly starts: number[] = [];
  private readonly runCodes: number[] = [];
  private previousRank = -1;
  private rows = 0;
  private inOrder = true;

  constructor(dictionary: readonly string[]) {
    this.rankOfCode = rankOfEveryCode(dictionary);
  }

  add(codes: Int32Array): void {
    if (!this.inOrder) return;
    const { rankOfCode } = this;
    for (let k = 0; k < codes.length; k++) {
      const code = codes[k];
      if (!(code >= 0 && code < rankOfCode.length)) return void (this.inOrder = false);
      const rank = rankOfCode[code];
      if (rank === this.previousRank) continue;
      if (rank < this.previousRank) return void (this.inOrder = false);
      this.previousRank = rank;
      this.starts.push(this.rows + k);
      this.runCodes.push(code);
    }
    this.rows += codes.length;
  }

  /** The frame, or null when the codes were out of order or some series' dates descend. */
  frame(input: { dictionary: readonly string[]; dates: Int32Array; values: Float64Array }): DatedFrame | null {
    if (!this.inOrder) return null;
    const starts = [...this.starts, input.dates.length];
    const { dates } = input;
    for (let run = 0; run < this.runCodes.length; run++) {
      for (let row = starts[run] + 1; row < starts[run + 1]; row++) if (dates[row] < dates[row - 1]) return null;
    }
    return datedFrameOfRuns(this.runCodes, starts, input);
  }
}
