import type { ColumnBuilder } from './column-builders.js';
import { TextBuilder } from './column-builders.js';
import { columnsOfLayout, type CsvLayout, type WindowColumn, type WindowRows } from './csv-reader.js';
import type { RejectedRow } from './records.js';
import { sharedInt32Array } from './shared-columns.js';
import type { Column, IngestResult } from './table.js';

/** The memory of the columns being filled, for a `Prefaulter` on another thread. */
export interface ColumnsMemory {
  readonly buffers: readonly SharedArrayBuffer[];
  /** The bytes of one row in each buffer. */
  readonly rowBytes: readonly number[];
  /** Rows the buffers hold. */
  readonly rows: number;
}

/**
 * Joins the rows of a file's windows, each read with columns of its own (`readWindowRows`), in
 * file order into the table the one-thread reader gives: values copied after the rows before
 * them; each window's text codes renumbered into one dictionary in order of first use (the order
 * the one-thread reader's columns finish in, so the dictionary is the same, entry for entry);
 * lines moved on by the lines of the windows before; rejected rows appended in order.
 */
export class WindowStitcher {
  private readonly columns: Array<{ readonly name: string; readonly builder: ColumnBuilder }>;
  /** On shared memory, as the one-thread reader's. */
  private lines = sharedInt32Array(1024);
  private accepted = 0;
  private read = 0;
  private readonly rejected: RejectedRow[] = [];
  /** Lines of the file up to the end of the windows joined so far (the first window counts from line 1). */
  private linesBefore = 0;

  constructor(private readonly layout: CsvLayout, reservedRows: number) {
    this.columns = columnsOfLayout(layout);
    this.reserve(reservedRows);
  }

  /**
   * Appends the next window's rows. The first window's lines are already the file's (it was read
   * from the line after the header); every later window was read from line 1.
   */
  append(window: WindowRows): void {
    const offset = this.linesBefore;
    const at = this.accepted;
    const rows = window.accepted;
    this.reserve(at + rows);
    for (let k = 0; k < rows; k++) this.lines[at + k] = window.lines[k] + offset;
    this.columns.forEach(({ builder }, k) => appendColumn(builder, window.columns[k], at, rows));
    for (const row of window.rejected) this.rejected.push(offset === 0 ? row : { ...row, line: row.line + offset });
    this.accepted += rows;
    this.read += window.read;
    this.linesBefore = window.nextLine - 1 + offset;
  }

  /** Rows joined so far. */
  get rows(): number {
    return this.accepted;
  }

  /** The memory of the columns as they are now (the shared ones; a column that grows moves to new memory). */
  memory(): ColumnsMemory {
    const arrays = [this.lines, ...this.columns.map(({ builder }) => builder.array)].filter((array) => array.buffer instanceof SharedArrayBuffer);
    return { buffers: arrays.map((array) => array.buffer as SharedArrayBuffer), rowBytes: arrays.map((array) => array.BYTES_PER_ELEMENT), rows: this.lines.length };
  }

  finish(): IngestResult {
    const { kind, fileName } = this.layout;
    const columns: Record<string, Column> = {};
    for (const { name, builder } of this.columns) columns[name] = builder.finish(this.accepted);
    const rows = { read: this.read, accepted: this.accepted, rejected: this.rejected.length };
    const table = { kind, length: this.accepted, lines: this.lines.subarray(0, this.accepted), columns };
    return { file: fileName, kind, table, rejected: this.rejected, rows };
  }

  private reserve(rows: number): void {
    if (rows <= this.lines.length) return;
    const size = Math.max(rows, this.lines.length * 2);
    const lines = sharedInt32Array(size);
    lines.set(this.lines);
    this.lines = lines;
    for (const { builder } of this.columns) builder.ensureCapacity(size);
  }
}

/** Copies a window's column after the rows before it; text codes go through the one dictionary. */
function appendColumn(target: ColumnBuilder, part: WindowColumn, at: number, rows: number): void {
  if (target instanceof TextBuilder) {
    const { codes, dictionary } = part as Extract<WindowColumn, { codes: Int32Array }>;
    const codeOfLocal = new Int32Array(dictionary.length).fill(-1);
    const into = target.codes;
    for (let k = 0; k < rows; k++) {
      const local = codes[k];
      if (local < 0) {
        into[at + k] = local; // a missing value
        continue;
      }
      let code = codeOfLocal[local];
      if (code < 0) code = codeOfLocal[local] = target.codeOf(dictionary[local]);
      into[at + k] = code;
    }
    return;
  }
  const { values } = part as Extract<WindowColumn, { values: unknown }>;
  target.array.set(values.subarray(0, rows), at);
}
