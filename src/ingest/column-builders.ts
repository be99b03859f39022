import { isShared, sharedFloat64Array, sharedInt32Array, sharedPrefix, type SharedColumn } from './shared-columns.js';
import type { Column, } from './table.js';
import { NULL_BOOLEAN, NULL_DATE } from './table.js';

/**
 * Growable typed-array builders, one per canonical column. A row is written at `row` and only
 * kept if the whole row is accepted, so a rejected row simply gets overwritten by the next one.
 */
/** The typed array a builder writes its rows into. */
export type BuilderArray = Int32Array | Float64Array | Uint8Array;

export interface ColumnBuilder {
  /**
   * The array rows are written into (the codes of a text column). A reader of many windows
   * (src/ingest/csv-ring.ts) hands each window's builders arrays it reuses, and reads them back.
   */
  array: BuilderArray;
  /** An empty array of this builder's type for `rows` rows, on shared memory. */
  emptyArray(rows: number): BuilderArray;
  ensureCapacity(rows: number): void;
  setMissing(row: number): void;
  finish(length: number): Column;
}

/**
 * The filled part of a column: a view when it is most of the array, else a compact copy (on
 * shared memory when the array is).
 */
function filled<T extends Int32Array | Float64Array | Uint8Array>(array: T, length: number): T {
  if (length * 4 >= array.length * 3) return array.subarray(0, length) as T;
  return (isShared(array) ? sharedPrefix(array as SharedColumn, length) : array.slice(0, length)) as T;
}

function grow<T extends Int32Array | Float64Array | Uint8Array>(array: T, rows: number, make: (n: number) => T): T {
  if (rows <= array.length) return array;
  const bigger = make(Math.max(rows, array.length * 2));
  bigger.set(array);
  return bigger;
}

/** Dates and numbers are series frame columns, so they live on shared memory (shared-columns.ts). */
export class DateBuilder implements ColumnBuilder {
  values = sharedInt32Array(1024);
  get array(): BuilderArray {
    return this.values;
  }
  set array(array: BuilderArray) {
    this.values = array as typeof this.values;
  }
  emptyArray(rows: number): BuilderArray {
    return sharedInt32Array(rows);
  }
  ensureCapacity(rows: number) {
    this.values = grow(this.values, rows, sharedInt32Array);
  }
  setMissing(row: number) {
    this.values[row] = NULL_DATE;
  }
  finish(length: number): Column {
    return { type: 'date', values: filled(this.values, length) };
  }
}

export class NumberBuilder implements ColumnBuilder {
  values = sharedFloat64Array(1024);
  get array(): BuilderArray {
    return this.values;
  }
  set array(array: BuilderArray) {
    this.values = array as typeof this.values;
  }
  emptyArray(rows: number): BuilderArray {
    return sharedFloat64Array(rows);
  }
  ensureCapacity(rows: number) {
    this.values = grow(this.values, rows, sharedFloat64Array);
  }
  setMissing(row: number) {
    this.values[row] = NaN;
  }
  finish(length: number): Column {
    return { type: 'number', values: filled(this.values, length) };
  }
}

export class BooleanBuilder implements ColumnBuilder {
  values = new Uint8Array(1024);
  get array(): BuilderArray {
    return this.values;
  }
  set array(array: BuilderArray) {
    this.values = array as typeof this.values;
  }
  emptyArray(rows: number): BuilderArray {
    return new Uint8Array(new SharedArrayBuffer(rows));
  }
  ensureCapacity(rows: number) {
    this.values = grow(this.values, rows, (n) => new Uint8Array(n));
  }
  setMissing(row: number) {
    this.values[row] = NULL_BOOLEAN;
  }
  finish(length: number): Column {
    return { type: 'boolean', values: filled(this.values, length) };
  }
}

/** Dictionary-coded strings: each distinct string is stored once and rows hold its code. */
export class TextBuilder implements ColumnBuilder {
  // Shared too: the snapshot's writer thread takes the day's tables without copying their codes.
  codes = sharedInt32Array(1024);
  readonly dictionary: string[] = [];
  private readonly codeByText = new Map<string, number>();

  get array(): BuilderArray {
    return this.codes;
  }
  set array(array: BuilderArray) {
    this.codes = array as typeof this.codes;
  }
  emptyArray(rows: number): BuilderArray {
    return sharedInt32Array(rows);
  }
  ensureCapacity(rows: number) {
    this.codes = grow(this.codes, rows, sharedInt32Array);
  }
  setMissing(row: number) {
    this.codes[row] = -1;
  }
  codeOf(text: string): number {
    let code = this.codeByText.get(text);
    if (code === undefined) {
      code = this.dictionary.length;
      this.dictionary.push(text);
      this.codeByText.set(text, code);
    }
    return code;
  }
  /**
   * The column with its dictionary in order of first use by the kept rows. A rejected row may
   * have added a string no kept row uses; dropping it makes the column the same whichever way
   * the rows were read (whole or through a window, by the plain-row lane or the general path).
   */
  finish(length: number): Column {
    const codes = filled(this.codes, length);
    if (inOrderOfFirstUse(codes, this.dictionary.length)) return { type: 'text', codes, dictionary: this.dictionary };
    const newCodeOf = new Int32Array(this.dictionary.length).fill(-1);
    const dictionary: string[] = [];
    const renumbered = sharedInt32Array(length);
    for (let row = 0; row < length; row++) {
      const code = codes[row];
      if (code < 0) renumbered[row] = code;
      else {
        if (newCodeOf[code] < 0) newCodeOf[code] = dictionary.push(this.dictionary[code]) - 1;
        renumbered[row] = newCodeOf[code];
      }
    }
    return { type: 'text', codes: renumbered, dictionary };
  }
}

/** True when every entry is used and each first appears after the one before it. */
function inOrderOfFirstUse(codes: Int32Array, entries: number): boolean {
  let next = 0;
  for (let row = 0; row < codes.length; row++) {
    const code = codes[row];
    if (code === next) next++;
    else if (code > next) return false;
  }
  return next === entries;
}
