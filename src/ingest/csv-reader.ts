import { BooleanBuilder, DateBuilder, NumberBuilder, TextBuilder, type ColumnBuilder } from './column-builders.js';
import { CsvRowScanner } from './csv-rows.js';
import { sharedInt32Array } from './shared-columns.js';
import { outsideRange, rangeReason, shownColumnNames } from './columnar-ingest.js';
import { resolveDateFormat, UNSETTLED } from './date-order.js';
import { InputError, quoteInput } from './errors.js';
import { cleanIdentifier, type IdentifierMode } from './identifiers.js';
import { wholeWindow, type CsvWindow } from './csv-window.js';
import { DEFAULT_READ_LIMITS, limitsForKind, type ReadLimits } from './limits.js';
import type { DateFormat, FeedProfile } from './profile.js';
import { profileDelimiter } from './profile-marks.js';
import type { RejectedRow } from './records.js';
import {
  INVALID_DAY,
  isoDateAt,
  numberStyle,
  parseBooleanWord,
  parseDateText,
  parseIsoDateBytes,
  parseNumberBytes,
  parseNumberInto,
  readPlainDecimal,
  type NumberStyle,
} from './scalars.js';
import { CANONICAL_COLUMNS, type ColumnSpec, type FileKind } from './schema.js';
import type { Column, IngestResult } from './table.js';

const LF = 10;
const CR = 13;
const QUOTE_ESCAPE = /""/g;
/** textCode's answer for an id holding a quote in an unquoted field. */
const STRAY_QUOTE = -2;
/** textCode's answer for an id the identifier rule refuses. */
const REFUSED_ID = -3;
/** Longest field text decoded to be quoted in a rejection reason. */
const SHOWN_BYTES = 320;
/** The shortcut a plain row's field tries before it is scanned (see `takePlainRow`). */
const NO_SHORTCUT = 0;
const SHORTCUT_ID = 1;
const SHORTCUT_DATE = 2;
const SHORTCUT_NUMBER = 3;

/** One canonical column being filled from one field of the file. */
interface ColumnPlan {
  readonly spec: ColumnSpec;
  readonly field: number;
  readonly builder: ColumnBuilder;
  /** The as-written text of a number column, when the schema keeps it. */
  readonly textCopy: TextBuilder | null;
  /** Byte range of the previous id, to reuse its code without decoding the same id again. */
  lastStart: number;
  lastEnd: number;
  lastCode: number;
  /** For id columns: the code of each distinct id as written, or REFUSED_ID (the rule runs once per id). */
  readonly idCodes: Map<string, number> | null;
}

/**
 * Reads one canonical CSV file. Every data row is either accepted into the typed columns or
 * rejected with its line, its raw text and the reason; blank lines are not data rows.
 */
export function readCsvBuffer(
  input: Uint8Array,
  fileName: string,
  kind: FileKind,
  profile: FeedProfile,
  allLimits: ReadLimits = DEFAULT_READ_LIMITS,
): IngestResult {
  return readCsvWindow(wholeWindow(Buffer.from(input.buffer, input.byteOffset, input.byteLength)), fileName, kind, profile, allLimits);
}

/** Reads a file's rows through its window (csv-window.ts), on this thread. */
export function readCsvWindow(window: CsvWindow, fileName: string, kind: FileKind, profile: FeedProfile, allLimits: ReadLimits): IngestResult {
  const layout = settleLayout(window, fileName, kind, profile, allLimits);
  const reader = rowReaderFor(layout, window.bytes);
  reader.reserve(estimateRows(window.bytes, layout.headerStart, window.totalBytes));
  const { delimiter, quote } = layout;
  const fieldCount = layout.names.length;
  let scanner = new CsvRowScanner(window.bytes, layout.firstRow, delimiter, quote, fieldCount + 1);
  const plainLane = reader.canTakePlainRows();
  let position = layout.firstRow;
  let line = layout.firstLine;
  for (;;) {
    if (plainLane) ({ position, line } = reader.takePlainRows(position, line, fieldCount, delimiter, plainEnd(window)));
    scanner.seek(position, line);
    const got = scanner.next();
    if (!window.final && (!got || !scanner.isWhole(false))) {
      // The row goes on past the window: keep it, read on, and look at it again.
      window.moveOn(position);
      reader.moveTo(window.bytes);
      scanner = new CsvRowScanner(window.bytes, 0, delimiter, quote, fieldCount + 1);
      position = 0;
      continue;
    }
    if (!got) break;
    if (!scanner.isBlank()) reader.take(scanner, fieldCount);
    position = scanner.nextPosition;
    line = scanner.nextLineNumber;
  }
  return reader.finish(kind);
}

/**
 * What the header and the first window settle for every row of a file: the delimiter, the
 * header's names, the date order and where the first data row starts. It crosses to the parsing
 * thread of a file read on two threads (csv-ring.ts), so it holds only plain data.
 */
export interface CsvLayout {
  readonly fileName: string;
  readonly kind: FileKind;
  readonly profile: FeedProfile;
  /** The limits of every kind, as the caller gave them (`limitsForKind` picks this kind's). */
  readonly limits: ReadLimits;
  readonly delimiter: number;
  readonly quote: number;
  readonly names: readonly string[];
  readonly dateFormat: DateFormat;
  readonly headerStart: number;
  /** Where the first data row starts in the first window, and its line. */
  readonly firstRow: number;
  readonly firstLine: number;
}

/** Reads the header from the first window (growing it while the header needs) and settles the layout. */
export function settleLayout(window: CsvWindow, fileName: string, kind: FileKind, profile: FeedProfile, allLimits: ReadLimits): CsvLayout {
  const limits = limitsForKind(kind, allLimits);
  const quote = profile.quote.charCodeAt(0);
  wholeFirstLine(window);
  const begin = window.bytes[0] === 0xef && window.bytes[1] === 0xbb && window.bytes[2] === 0xbf ? 3 : 0;
  const delimiter = chooseDelimiter(window.bytes, begin, profile, fileName);
  const header = wholeHeader(window, begin, delimiter, quote, fileName, kind, limits.maxHeaderColumns);
  const plans = planColumns(header.names, kind, profile, fileName);
  const dateFormat = settledDateFormat(window, header, delimiter, quote, plans, profile, fileName);
  const scanner = new CsvRowScanner(window.bytes, header.headerStart, delimiter, quote, header.names.length + 1);
  scanner.next(); // the header row itself
  return {
    fileName,
    kind,
    profile,
    limits: allLimits,
    delimiter,
    quote,
    names: header.names,
    dateFormat,
    headerStart: header.headerStart,
    firstRow: scanner.nextPosition,
    firstLine: scanner.nextLineNumber,
  };
}

/** A row reader with fresh columns (and so a dictionary of its own) for rows of a file of this layout. */
function rowReaderFor(layout: CsvLayout, bytes: Buffer): RowReader {
  const { profile } = layout;
  const plans = planColumns(layout.names, layout.kind, profile, layout.fileName);
  const rules = { limits: limitsForKind(layout.kind, layout.limits), identifiers: profile.identifiers ?? 'strict' };
  return new RowReader(bytes, layout.fileName, plans, layout.dateFormat, numberStyle(profile.decimal, profile.thousands), layout.quote, rules);
}

/**
 * The rows of one window of a file read on two threads (csv-ring.ts), into columns of its own:
 * codes of a dictionary of its own, lines counted from `startLine`, rejected rows in order.
 * The window ends just after a line feed (or is the file's last), and a row starts at `start`.
 * A row whose quoted field finds no closing quote before the window's end might go on in the next
 * window, as a quoted field may span lines: then the window answers `spilled`, and its rows (and
 * every later window's, which assumed a row starts where it starts) cannot be used.
 */
export function readWindowRows(layout: CsvLayout, bytes: Buffer, start: number, startLine: number, final: boolean, arrays?: WindowArrays): WindowRows {
  const reader = rowReaderFor(layout, bytes);
  if (arrays) reader.adopt(arrays);
  reader.reserve(estimateRows(bytes, start, bytes.length));
  const { delimiter, quote } = layout;
  const fieldCount = layout.names.length;
  const scanner = new CsvRowScanner(bytes, start, delimiter, quote, fieldCount + 1);
  const plainLane = reader.canTakePlainRows();
  let position = start;
  let line = startLine;
  for (;;) {
    // The window ends just after a line feed, so every plain row in it is whole.
    if (plainLane) ({ position, line } = reader.takePlainRows(position, line, fieldCount, delimiter, bytes.length));
    scanner.seek(position, line);
    if (!scanner.next()) break;
    if (!final && scanner.quoteRanOut) return SPILLED;
    if (!scanner.isBlank()) reader.take(scanner, fieldCount);
    position = scanner.nextPosition;
    line = scanner.nextLineNumber;
  }
  return reader.windowRows(line);
}

/**
 * Arrays a window's rows are read into, kept with a slot of the ring and reused window after
 * window (csv-ring.ts). Fresh memory costs a page fault per 4 KiB the first time it is written:
 * fresh columns for every window of the NAV file cost about as much CPU as the second thread saved.
 * On shared memory, so the worker's rows reach the main thread without a copy.
 */
export interface WindowArrays {
  readonly lines: Int32Array;
  /** In the order of `columnsOfLayout`. */
  readonly columns: ReadonlyArray<Int32Array | Float64Array | Uint8Array>;
}

/**
 * Rows to give each slot's arrays for windows of `windowBytes` bytes: the rows of the first window
 * (`firstWindow`, the file's first bytes as published, its rows from `layout.firstRow`) scaled to a
 * whole window, with a quarter to spare, and never more than a window can hold (an accepted row
 * has every field, so it takes at least a byte per field, the file's last row excepted).
 * Sized for the most a window could hold, the NAV file's arrays were ten times longer than its
 * windows fill; with transparent huge pages (src/cli/huge-pages.ts) memory is given 2 MiB at a time,
 * so the part past the rows cost memory too. A window of shorter lines grows its arrays
 * (`readWindowIntoSlot`).
 */
export function windowRowsFor(layout: CsvLayout, firstWindow: Uint8Array, windowBytes: number): number {
  const most = Math.floor(windowBytes / Math.max(1, layout.names.length)) + 1;
  const rowBytes = firstWindow.length - layout.firstRow;
  let lineFeeds = 0;
  for (let at = layout.firstRow; at < firstWindow.length; at++) if (firstWindow[at] === LF) lineFeeds++;
  if (lineFeeds === 0) return most;
  const averageLine = rowBytes / lineFeeds;
  return Math.min(most, Math.ceil((windowBytes / averageLine) * 1.25) + 1024);
}

/** Arrays for `rows` rows of a window, on shared memory. Only the pages the rows are written to take memory. */
export function windowArraysFor(layout: CsvLayout, rows: number): WindowArrays {
  const columns = columnsOfLayout(layout).map(({ builder }) => builder.emptyArray(rows));
  return { lines: sharedInt32Array(rows), columns };
}

/**
 * Reads a window's rows (`readWindowRows`) into the arrays of its slot, `slots[slot]`. A window of
 * more rows than they hold grows them as the one-thread reader grows its own, and the slot keeps
 * the grown arrays for its next windows (read by this thread), so fresh memory is taken once.
 * The arrays a thread keeps for a slot are only written by the windows of that slot, each read
 * after the one before it was joined.
 */
export function readWindowIntoSlot(
  layout: CsvLayout,
  bytes: Buffer,
  start: number,
  startLine: number,
  final: boolean,
  slots: WindowArrays[],
  slot: number,
): WindowRows {
  const rows = readWindowRows(layout, bytes, start, startLine, final, slots[slot]);
  if (!rows.spilled) slots[slot] = { lines: rows.lines, columns: rows.columns.map((column) => ('codes' in column ? column.codes : column.values)) };
  return rows;
}

/** One column of a window's rows: the builder's arrays, of which the window's first `accepted` rows count. */
export type WindowColumn = { readonly values: Int32Array | Float64Array | Uint8Array } | { readonly codes: Int32Array; readonly dictionary: readonly string[] };

/** What one window's rows give; its lines are counted from the line it was read from. */
export interface WindowRows {
  readonly spilled: boolean;
  readonly read: number;
  readonly accepted: number;
  readonly lines: Int32Array;
  /** The line after the window's last (the window's lines are `startLine` up to it). */
  readonly nextLine: number;
  readonly rejected: readonly RejectedRow[];
  /** In the order of `columnsOfLayout`. */
  readonly columns: readonly WindowColumn[];
}

const SPILLED: WindowRows = { spilled: true, read: 0, accepted: 0, lines: new Int32Array(0), nextLine: 0, rejected: [], columns: [] };

/** The canonical columns a file of this layout fills, by name, with an empty builder each, in the order of `WindowRows.columns`. */
export function columnsOfLayout(layout: CsvLayout): Array<{ readonly name: string; readonly builder: ColumnBuilder }> {
  return columnsOfPlans(planColumns(layout.names, layout.kind, layout.profile, layout.fileName));
}

function columnsOfPlans(plans: readonly ColumnPlan[]): Array<{ readonly name: string; readonly builder: ColumnBuilder }> {
  return plans.flatMap((plan) => {
    const column = { name: plan.spec.name, builder: plan.builder };
    return plan.textCopy ? [column, { name: `${plan.spec.name}_text`, builder: plan.textCopy }] : [column];
  });
}

/** Where plain rows may be read up to: the end of the input, or just after the window's last line feed. */
function plainEnd(window: CsvWindow): number {
  if (window.final) return window.bytes.length;
  return window.bytes.lastIndexOf(LF) + 1;
}

/** Grows the first window until it holds the whole first line, which names the delimiter. */
function wholeFirstLine(window: CsvWindow): void {
  while (!window.final && window.bytes.indexOf(LF) < 0 && window.bytes.indexOf(CR) < 0) window.moveOn(0);
}

/** The header row, read again over a larger window while it runs past the window's end. */
function wholeHeader(window: CsvWindow, begin: number, delimiter: number, quote: number, fileName: string, kind: FileKind, maxColumns: number) {
  for (;;) {
    const scanner = new CsvRowScanner(window.bytes, begin, delimiter, quote, maxColumns + 1);
    if (window.final || (scanner.next() && scanner.isWhole(false))) return readHeader(window.bytes, begin, delimiter, quote, fileName, kind, maxColumns);
    window.moveOn(0);
  }
}

/**
 * The date order, from the first window when its rows settle it (an explicit profile, or a
 * first readable date that needs no order); otherwise from every row of the file, read whole.
 */
function settledDateFormat(
  window: CsvWindow,
  header: { names: string[]; headerStart: number },
  delimiter: number,
  quote: number,
  plans: ColumnPlan[],
  profile: FeedProfile,
  fileName: string,
): DateFormat {
  const fromWindow = resolveDateFormat(window.bytes, header.headerStart, header.names.length, delimiter, quote, plans, profile, fileName, window.final);
  if (fromWindow !== UNSETTLED) return fromWindow;
  window.takeAll();
  return resolveDateFormat(window.bytes, header.headerStart, header.names.length, delimiter, quote, plans, profile, fileName) as DateFormat;
}

/**
 * Rows to reserve room for, from the average line length of the first 64 KiB and the size of
 * the whole input, so the columns are allocated once instead of doubling twenty times.
 */
export function estimateRows(bytes: Uint8Array, begin: number, totalBytes: number): number {
  const sampleEnd = Math.min(bytes.length, begin + 65536);
  let lineFeeds = 0;
  for (let i = begin; i < sampleEnd; i++) if (bytes[i] === LF) lineFeeds++;
  if (lineFeeds === 0) return 1024;
  const averageLine = (sampleEnd - begin) / lineFeeds;
  return Math.ceil(((totalBytes - begin) / averageLine) * 1.02) + 16;
}

function chooseDelimiter(bytes: Buffer, begin: number, profile: FeedProfile, fileName: string): number {
  const wanted = profileDelimiter(profile);
  if (wanted !== 'auto') return wanted.charCodeAt(0);
  let lineEnd = begin; // the header line ends at LF, CRLF or a lone CR
  while (lineEnd < bytes.length && bytes[lineEnd] !== 10 && bytes[lineEnd] !== 13) lineEnd++;
  const headerText = bytes.toString('utf8', begin, lineEnd);
  const candidates = [',', ';', '\t', '|'].map((d) => ({ d, count: headerText.split(d).length - 1 }));
  const best = candidates.reduce((a, b) => (b.count > a.count ? b : a));
  if (best.count === 0) {
    throw new InputError(`${fileName}, line 1: no delimiter (comma, semicolon, tab or bar) found in the header; set delimiter in the feed profile.`);
  }
  return best.d.charCodeAt(0);
}

function readHeader(bytes: Buffer, begin: number, delimiter: number, quote: number, fileName: string, kind: FileKind, maxColumns: number) {
  const scanner = new CsvRowScanner(bytes, begin, delimiter, quote, maxColumns + 1);
  const expected = CANONICAL_COLUMNS[kind].filter((c) => c.required).map((c) => c.name).join(', ');
  if (!scanner.next()) {
    throw new InputError(`${fileName}, line 1: the file is empty; send a header row with the columns ${expected}.`);
  }
  if (scanner.isBlank()) {
    throw new InputError(`${fileName}, line 1: the first line is blank, so the file has no header row; put the header with the columns ${expected} on line 1.`);
  }
  if (scanner.error) throw new InputError(`${fileName}, line 1: the header cannot be read because ${scanner.error}; fix the header row.`);
  if (scanner.fieldCount > maxColumns) {
    throw new InputError(
      `${fileName}, line 1: the header has ${scanner.fieldCount} columns, more than the limit of ${maxColumns}; raise limits.max_header_columns in the run configuration if the file is genuine.`,
    );
  }
  const names: string[] = [];
  for (let k = 0; k < Math.min(scanner.fieldCount, scanner.starts.length); k++) {
    names.push(decodeQuoted(bytes, scanner.starts[k], scanner.ends[k], scanner.quoted[k], quote).trim());
  }
  return { names, headerStart: begin };
}

function planColumns(names: readonly string[], kind: FileKind, profile: FeedProfile, fileName: string): ColumnPlan[] {
  const plans: ColumnPlan[] = [];
  for (const spec of CANONICAL_COLUMNS[kind]) {
    const sourceName = profile.columns[spec.name] ?? spec.name;
    const field = findHeader(names, sourceName);
    if (field < 0) {
      if (!spec.required) continue;
      const mapped = sourceName === spec.name ? '' : ` (mapped from "${sourceName}")`;
      throw new InputError(
        `${fileName}, line 1: the header has no column "${spec.name}"${mapped} (found: ${shownColumnNames(names)}); add the column or map it in the feed profile's columns.`,
      );
    }
    const textCopy = spec.keepsText ? new TextBuilder() : null;
    const idCodes = spec.type === 'id' ? new Map<string, number>() : null;
    plans.push({ spec, field, builder: builderFor(spec), textCopy, lastStart: -1, lastEnd: -1, lastCode: -1, idCodes });
  }
  return plans;
}

function findHeader(names: readonly string[], wanted: string): number {
  const exact = names.indexOf(wanted);
  if (exact >= 0) return exact;
  const lower = wanted.toLowerCase();
  return names.findIndex((name) => name.toLowerCase() === lower);
}

function builderFor(spec: ColumnSpec): ColumnBuilder {
  switch (spec.type) {
    case 'id':
    case 'text':
      return new TextBuilder();
    case 'date':
      return new DateBuilder();
    case 'number':
      return new NumberBuilder();
    case 'boolean':
      return new BooleanBuilder();
  }
}

/** A field's text with a doubled quote character (the profile's, not only `"`) made single. */
function decodeQuoted(bytes: Buffer, start: number, end: number, quoted: number, quote: number): string {
  const text = bytes.toString('utf8', start, end);
  if (!quoted) return text;
  if (quote === 34) return text.replace(QUOTE_ESCAPE, '"');
  const mark = String.fromCharCode(quote);
  return text.split(mark + mark).join(mark);
}

/** Fills the column builders row by row and keeps the rejected rows with their reasons. */
class RowReader {
  private accepted = 0;
  private read = 0;
  private readonly rejected: RejectedRow[] = [];
  /** On shared memory, as the frame's other columns (shared-columns.ts). */
  private lines = sharedInt32Array(1024);

  constructor(
    private bytes: Buffer,
    private readonly fileName: string,
    private readonly plans: ColumnPlan[],
    private readonly dateFormat: DateFormat,
    private readonly numbers: NumberStyle,
    private readonly quote: number,
    private readonly rules: { readonly limits: ReadLimits; readonly identifiers: IdentifierMode },
  ) {}

  /**
   * Moves on to the next window of the file. The previous id of each column was found by its
   * place in the old window, so it is forgotten (the next row decodes its id again).
   */
  moveTo(bytes: Buffer): void {
    this.bytes = bytes;
    for (const plan of this.plans) {
      plan.lastStart = -1;
      plan.lastEnd = -1;
      plan.lastCode = -1;
    }
  }

  /** The plain-row lane serves files whose columns are all ids, ISO dates and numbers. */
  canTakePlainRows(): boolean {
    if (this.dateFormat !== 'auto' && this.dateFormat !== 'iso') return false;
    return this.plans.every((plan) => plan.textCopy === null && (plan.spec.type === 'id' || plan.spec.type === 'date' || plan.spec.type === 'number'));
  }

  /**
   * The fast lane: reads plain rows (no quote, every field present and valid, LF or CRLF) straight
   * into the columns and returns where the first other row starts; that row takes the general path,
   * which explains or accepts it. Same results as the general path, several times faster.
   */
  takePlainRows(position: number, line: number, fieldCount: number, delimiter: number, end: number): { position: number; line: number } {
    const length = end;
    this.plainLength = end;
    this.plansByField ??= Array.from({ length: fieldCount }, (_, k) => this.plans.find((plan) => plan.field === k) ?? null);
    this.shortcutsByField ??= Uint8Array.from(this.plansByField, (plan) => this.shortcutFor(plan, delimiter));
    this.plainDelimiter = delimiter;
    const firstRow = this.accepted;
    let row = firstRow;
    while (position < length) {
      if (row >= this.lines.length) this.growTo(row + 1);
      const next = this.takePlainRow(position, row, fieldCount, delimiter);
      if (next < 0) break;
      position = next;
      this.lines[row++] = line++;
    }
    this.read += row - firstRow;
    this.accepted = row;
    return { position, line };
  }

  /**
   * One plain row into the columns at `row`: the position after its line ending, or −1 when the
   * row is not plain. A call per row (rather than one long loop) lets the engine optimise it as
   * an ordinary hot function from the first file on.
   *
   * Each field first tries its column's shortcut, which reads and checks the field in one pass
   * (an id equal to the previous row's, a ten-byte ISO date, a plain decimal); a field the
   * shortcut does not settle is scanned to its end and stored by `storePlain`, as before.
   */
  private takePlainRow(position: number, row: number, fieldCount: number, delimiter: number): number {
    const bytes = this.bytes;
    const length = this.plainLength;
    const quote = this.quote;
    const planByField = this.plansByField!;
    const shortcuts = this.shortcutsByField!;
    for (let field = 0; field < fieldCount; field++) {
      const last = field === fieldCount - 1;
      const plan = planByField[field];
      const fieldStart = position;
      let end = -1;
      if (plan !== null) {
        switch (shortcuts[field]) {
          case SHORTCUT_ID:
            end = this.sameIdAsLast(plan, position, row);
            break;
          case SHORTCUT_DATE:
            end = this.isoDateField(plan, position, row);
            break;
          case SHORTCUT_NUMBER:
            end = this.plainDecimalField(plan, position, row);
            break;
        }
      }
      if (end >= 0) {
        position = end;
      } else {
        while (position < length) {
          const c = bytes[position];
          if (c === delimiter || c === LF || c === CR || c === quote) break;
          position++;
        }
        if (position < length && bytes[position] === quote) return -1;
        if (plan !== null && !this.storePlain(plan, fieldStart, position, row)) return -1;
      }
      const stop = position < length ? bytes[position] : LF;
      if (last !== (stop !== delimiter)) return -1; // too few or too many fields
      position++;
    }
    // `position` is one past the row's end; a CR there must be followed by LF.
    if (position - 1 < length && bytes[position - 1] === CR) {
      if (bytes[position] !== LF) return -1;
      position++;
    }
    return Math.min(position, length);
  }

  /**
   * The id shortcut: when the field holds the same bytes as the previous row's id and ends right
   * after them, it takes that id's code; returns where the field ends, or −1 to scan it instead.
   */
  private sameIdAsLast(plan: ColumnPlan, position: number, row: number): number {
    const size = plan.lastEnd - plan.lastStart;
    if (size <= 0) return -1;
    const end = position + size;
    if (end > this.plainLength || !this.endsField(end) || !this.sameBytes(position, plan.lastStart, size)) return -1;
    (plan.builder as TextBuilder).codes[row] = plan.lastCode;
    return end;
  }

  /** The date shortcut: ten bytes `YYYY-MM-DD` ending the field, a real date within the limits. */
  private isoDateField(plan: ColumnPlan, position: number, row: number): number {
    const end = position + 10;
    if (end > this.plainLength || !this.endsField(end) || this.rules.limits.maxFieldBytes < 10) return -1;
    const day = isoDateAt(this.bytes, position);
    if (day === INVALID_DAY || day < this.rules.limits.firstDay || day > this.rules.limits.lastDay) return -1;
    (plan.builder as DateBuilder).values[row] = day;
    return end;
  }

  /** The number shortcut: a plain decimal (`readPlainDecimal`) ending the field, within the field limit. */
  private plainDecimalField(plan: ColumnPlan, position: number, row: number): number {
    const end = readPlainDecimal(this.bytes, position, this.numbers.decimal, (plan.builder as NumberBuilder).values, row);
    if (end < 0 || end - position > this.rules.limits.maxFieldBytes || !this.endsField(end)) return -1;
    return end;
  }

  /** True when a field of a plain row can end at `position`: a delimiter, a line ending or the end. */
  private endsField(position: number): boolean {
    if (position >= this.plainLength) return true;
    const c = this.bytes[position];
    return c === this.plainDelimiter || c === LF || c === CR;
  }

  /** The plan filled from each field of the file, or null for a field no canonical column uses. */
  private plansByField: Array<ColumnPlan | null> | null = null;
  /** The shortcut each field of a plain row tries first. */
  private shortcutsByField: Uint8Array | null = null;
  private plainDelimiter = -1;
  /** Where plain rows may be read up to in the current window (see `plainEnd`). */
  private plainLength = 0;

  private shortcutFor(plan: ColumnPlan | null, delimiter: number): number {
    if (plan === null) return NO_SHORTCUT;
    switch (plan.spec.type) {
      case 'id':
        return SHORTCUT_ID;
      case 'date':
        return SHORTCUT_DATE;
      case 'number':
        // A decimal comma with a comma delimiter would read two fields as one number.
        return this.numbers.decimal === delimiter || this.numbers.decimal === this.quote ? NO_SHORTCUT : SHORTCUT_NUMBER;
      default:
        return NO_SHORTCUT;
    }
  }

  /** Stores one plain field; false sends the row to the general path. */
  private storePlain(plan: ColumnPlan, start: number, end: number, row: number): boolean {
    if (end - start > this.rules.limits.maxFieldBytes) return false;
    const type = plan.spec.type;
    if (type === 'number') return parseNumberInto(this.bytes, start, end, this.numbers, (plan.builder as NumberBuilder).values, row);
    if (type === 'date') {
      if (end - start !== 10) return false;
      const day = isoDateAt(this.bytes, start);
      if (day === INVALID_DAY || day < this.rules.limits.firstDay || day > this.rules.limits.lastDay) return false;
      (plan.builder as DateBuilder).values[row] = day;
      return true;
    }
    if (end === start) return false;
    if (end - start === plan.lastEnd - plan.lastStart && this.sameBytes(start, plan.lastStart, end - start)) {
      (plan.builder as TextBuilder).codes[row] = plan.lastCode;
      return true;
    }
    const text = this.text(start, end).trim();
    if (text === '') return false;
    const code = this.idCode(plan, text);
    if (code === REFUSED_ID) return false;
    plan.lastStart = start;
    plan.lastEnd = end;
    plan.lastCode = code;
    (plan.builder as TextBuilder).codes[row] = code;
    return true;
  }

  take(scanner: CsvRowScanner, expectedFields: number): void {
    this.read++;
    if (scanner.error !== null) return this.reject(scanner, scanner.error);
    if (scanner.fieldCount !== expectedFields) {
      if (scanner.spansLines) {
        scanner.failOnPhysicalLine('a quoted field runs past the end of the line (unbalanced quote)');
        return this.reject(scanner, scanner.error!);
      }
      const fields = `${scanner.fieldCount} field${scanner.fieldCount === 1 ? '' : 's'}`;
      return this.reject(scanner, `expected ${expectedFields} fields as in the header, found ${fields}`);
    }
    if (scanner.spansLines && this.lineBreakOutsideText(scanner)) {
      // An id, date or number never holds a line break: a stray quote swallowed the lines after
      // it. Keep only the first physical line as the rejected row and read the others again.
      scanner.failOnPhysicalLine('a quoted field runs past the end of the line (unbalanced quote)');
      return this.reject(scanner, scanner.error!);
    }
    const oversized = this.oversizedField(scanner);
    if (oversized !== null) return this.reject(scanner, oversized);
    const row = this.accepted;
    if (row >= this.lines.length) this.growTo(row + 1);
    for (const plan of this.plans) {
      const problem = this.parseField(plan, scanner, row);
      if (problem !== null) return this.reject(scanner, problem);
    }
    this.lines[row] = scanner.line;
    this.accepted++;
  }

  /** Why a field of the row is longer than the limit, or null when none is. */
  private oversizedField(scanner: CsvRowScanner): string | null {
    const limit = this.rules.limits.maxFieldBytes;
    for (let k = 0; k < Math.min(scanner.fieldCount, scanner.starts.length); k++) {
      const length = scanner.ends[k] - scanner.starts[k];
      if (length > limit) {
        return `field ${k + 1} is ${length} bytes long, more than the limit of ${limit} (limits.max_field_bytes in the run configuration)`;
      }
    }
    return null;
  }

  /** True when a field of a column other than free text holds a line break. */
  private lineBreakOutsideText(scanner: CsvRowScanner): boolean {
    const bytes = this.bytes;
    for (const plan of this.plans) {
      if (plan.spec.type === 'text' || !scanner.quoted[plan.field]) continue;
      for (let i = scanner.starts[plan.field]; i < scanner.ends[plan.field]; i++) {
        if (bytes[i] === 10 || bytes[i] === 13) return true;
      }
    }
    return false;
  }

  /** Writes one field into its column at `row`; returns why it cannot, or null. */
  private parseField(plan: ColumnPlan, scanner: CsvRowScanner, row: number): string | null {
    const start = scanner.starts[plan.field];
    const end = scanner.ends[plan.field];
    const quoted = scanner.quoted[plan.field];
    const builder = plan.builder;
    if (isBlankField(this.bytes, start, end)) {
      if (!plan.spec.nullable) return `${plan.spec.name} is empty`;
      builder.setMissing(row);
      plan.textCopy?.setMissing(row);
      return null;
    }
    switch (plan.spec.type) {
      case 'id':
      case 'text': {
        const code = this.textCode(plan, start, end, quoted);
        if (code === STRAY_QUOTE) {
          return `${plan.spec.name} ${this.shown(start, end)} has a quote inside an unquoted field (unbalanced quote)`;
        }
        if (code === REFUSED_ID) {
          return cleanIdentifier(plan.spec.name, decodeQuoted(this.bytes, start, end, quoted, this.quote).trim(), this.rules.identifiers).problem;
        }
        if ((builder as TextBuilder).dictionary[code] === '') {
          // Only space-like characters beyond space and tab (such as U+00A0): empty once trimmed.
          if (!plan.spec.nullable) return `${plan.spec.name} is empty`;
          builder.setMissing(row);
          return null;
        }
        const problem = plan.spec.validate?.((builder as TextBuilder).dictionary[code]) ?? null;
        (builder as TextBuilder).codes[row] = code;
        return problem;
      }
      case 'date': {
        const day = this.parseDate(start, end);
        if (day === null) return `${plan.spec.name} ${this.shown(start, end)} is not a valid date${this.dateHint()}`;
        if (outsideRange(day, this.rules.limits)) return rangeReason(plan.spec.name, day, this.rules.limits);
        (builder as DateBuilder).values[row] = day;
        return null;
      }
      case 'number': {
        const value = parseNumberBytes(this.bytes, start, end, this.numbers);
        if (Number.isNaN(value)) return `${plan.spec.name} ${this.shown(start, end)} is not a number`;
        (builder as NumberBuilder).values[row] = value;
        if (plan.textCopy) plan.textCopy.codes[row] = plan.textCopy.codeOf(this.text(start, end).trim());
        return null;
      }
      case 'boolean': {
        const flag = parseBooleanWord(this.text(start, end));
        if (flag === null) return `${plan.spec.name} ${this.shown(start, end)} is not true/false, yes/no or 1/0`;
        (builder as BooleanBuilder).values[row] = flag;
        return null;
      }
    }
  }

  /** The dictionary code of a text field, or STRAY_QUOTE for an id with a quote in an unquoted field. */
  private textCode(plan: ColumnPlan, start: number, end: number, quoted: number): number {
    if (!quoted && end - start === plan.lastEnd - plan.lastStart && this.sameBytes(start, plan.lastStart, end - start)) {
      return plan.lastCode;
    }
    if (!quoted && plan.spec.type === 'id' && this.holdsByte(start, end, this.quote)) {
      return STRAY_QUOTE;
    }
    const text = decodeQuoted(this.bytes, start, end, quoted, this.quote).trim();
    const code = plan.idCodes ? this.idCode(plan, text) : (plan.builder as TextBuilder).codeOf(text);
    if (!quoted && code !== REFUSED_ID) {
      plan.lastStart = start;
      plan.lastEnd = end;
      plan.lastCode = code;
    }
    return code;
  }

  /** The code of an id (cleaned under the profile's identifiers rule), or REFUSED_ID. */
  private idCode(plan: ColumnPlan, text: string): number {
    let code = plan.idCodes!.get(text);
    if (code === undefined) {
      const cleaned = cleanIdentifier(plan.spec.name, text, this.rules.identifiers);
      code = cleaned.problem === null ? (plan.builder as TextBuilder).codeOf(cleaned.value) : REFUSED_ID;
      plan.idCodes!.set(text, code);
    }
    return code;
  }

  private holdsByte(start: number, end: number, byte: number): boolean {
    const bytes = this.bytes;
    for (let i = start; i < end; i++) if (bytes[i] === byte) return true;
    return false;
  }

  private sameBytes(a: number, b: number, length: number): boolean {
    const bytes = this.bytes;
    for (let i = 0; i < length; i++) if (bytes[a + i] !== bytes[b + i]) return false;
    return true;
  }

  private parseDate(start: number, end: number): number | null {
    if (this.dateFormat === 'auto' || this.dateFormat === 'iso') {
      const day = parseIsoDateBytes(this.bytes, start, end);
      if (day !== null || this.dateFormat === 'iso') return day;
    }
    return parseDateText(this.text(start, end), this.dateFormat);
  }

  private dateHint(): string {
    return this.dateFormat === 'auto' || this.dateFormat === 'iso' ? ' (expected YYYY-MM-DD)' : ` (expected a ${this.dateFormat} date)`;
  }

  private text(start: number, end: number): string {
    return this.bytes.toString('utf8', start, end);
  }

  /** A field as a reason quotes it: JSON-quoted and cut, so a huge field never fills the report. */
  private shown(start: number, end: number): string {
    if (end - start <= SHOWN_BYTES) return quoteInput(this.text(start, end));
    return `${quoteInput(this.text(start, start + SHOWN_BYTES))} (${end - start} bytes)`;
  }

  /** The row as the quarantine keeps it: its text, cut at the field limit so one row stays bounded. */
  private reject(scanner: CsvRowScanner, reason: string): void {
    const limit = this.rules.limits.maxFieldBytes;
    const end = Math.min(scanner.rowEnd, scanner.rowStart + limit);
    const raw = this.text(scanner.rowStart, end) + (end < scanner.rowEnd ? `… (${scanner.rowEnd - scanner.rowStart} bytes in all)` : '');
    this.rejected.push({ file: this.fileName, line: scanner.line, raw, reason });
  }

  reserve(rows: number): void {
    if (rows > this.lines.length) this.growTo(rows);
  }

  private growTo(rows: number): void {
    const size = Math.max(rows, this.lines.length * 2);
    const lines = sharedInt32Array(size);
    lines.set(this.lines);
    this.lines = lines;
    for (const plan of this.plans) {
      plan.builder.ensureCapacity(size);
      plan.textCopy?.ensureCapacity(size);
    }
  }

  /** Reads rows into these arrays (which are long enough, or grown like the reader's own). */
  adopt(arrays: WindowArrays): void {
    this.lines = arrays.lines;
    columnsOfPlans(this.plans).forEach(({ builder }, k) => (builder.array = arrays.columns[k]));
  }

  /** The rows read so far as one window's (`readWindowRows`), without finishing the columns. */
  windowRows(nextLine: number): WindowRows {
    const columns = columnsOfPlans(this.plans).map(({ builder }) => windowColumn(builder));
    return { spilled: false, read: this.read, accepted: this.accepted, lines: this.lines, nextLine, rejected: this.rejected, columns };
  }

  finish(kind: FileKind): IngestResult {
    const columns: Record<string, Column> = {};
    for (const { name, builder } of columnsOfPlans(this.plans)) columns[name] = builder.finish(this.accepted);
    const rows = { read: this.read, accepted: this.accepted, rejected: this.rejected.length };
    const table = { kind, length: this.accepted, lines: this.lines.subarray(0, this.accepted), columns };
    return { file: this.fileName, kind, table, rejected: this.rejected, rows };
  }
}

function windowColumn(builder: ColumnBuilder): WindowColumn {
  if (builder instanceof TextBuilder) return { codes: builder.codes, dictionary: builder.dictionary };
  return { values: builder.array };
}

function isBlankField(bytes: Uint8Array, start: number, end: number): boolean {
  for (let i = start; i < end; i++) if (bytes[i] !== 32 && bytes[i] !== 9) return false;
  return true;
}


