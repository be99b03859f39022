import { formatIsoDate } from '../calendar/days.js';
import { InputError, quoteInput } from './errors.js';
import { DateOrderEvidence } from './date-order.js';
import { cleanIdentifier, type IdentifierMode } from './identifiers.js';
import { DEFAULT_READ_LIMITS, limitsForKind, type ReadLimits } from './limits.js';
import type { DateFormat, FeedProfile } from './profile.js';
import type { RejectedRow } from './records.js';
import { numberStyle, parseBooleanWord, parseDateText, parseNumberText, type NumberStyle } from './scalars.js';
import { CANONICAL_COLUMNS, type ColumnSpec, type FileKind } from './schema.js';
import { NULL_BOOLEAN, NULL_DATE, type CanonicalTable, type Column, type IngestResult } from './table.js';
import { sharedFloat64Array, sharedInt32Array } from './shared-columns.js';

/**
 * The format-neutral half of reading a columnar file (Arrow IPC, Parquet). A format reader only
 * turns each source column into a `SourceColumn`; this module maps those onto the canonical
 * columns, parses text with the profile's rules, rejects unreadable rows and builds the result.
 * Everything works column by column over typed arrays; text is converted once per distinct value.
 */

/** One source column as the file typed it. Missing values: NULL_DATE, NaN, code −1, NULL_BOOLEAN. */
export type SourceColumn =
  | { readonly form: 'days'; readonly days: Int32Array }
  | { readonly form: 'number'; readonly values: Float64Array }
  | { readonly form: 'text'; readonly codes: Int32Array; readonly dictionary: readonly string[] }
  | { readonly form: 'boolean'; readonly values: Uint8Array };

/** What a format reader knows about a file once it has opened it. */
export interface ColumnarFile {
  readonly fileName: string;
  readonly rowCount: number;
  readonly columnNames: readonly string[];
  /** Reads one source column by its name in the file. */
  readonly readColumn: (sourceName: string) => SourceColumn;
}

/** Finds the source name of a canonical column: the profile's mapping first, then the canonical name. */
export function findSourceName(
  canonical: string,
  columnNames: readonly string[],
  profile: FeedProfile,
): string | undefined {
  const wanted = [profile.columns[canonical], canonical].filter((name): name is string => name !== undefined);
  for (const name of wanted) if (columnNames.includes(name)) return name;
  for (const name of wanted) {
    const folded = name.trim().toLowerCase();
    const match = columnNames.find((found) => found.trim().toLowerCase() === folded);
    if (match !== undefined) return match;
  }
  return undefined;
}

/** A canonical column and the source column that holds it. */
export interface ColumnMatch {
  readonly spec: ColumnSpec;
  readonly sourceName: string;
}

/**
 * Matches the kind's canonical columns to the file's columns before any data is read; a required
 * column that is not there stops the file with an InputError (exit 3).
 */
export function matchColumns(
  fileName: string,
  columnNames: readonly string[],
  kind: FileKind,
  profile: FeedProfile,
): ColumnMatch[] {
  const matches: ColumnMatch[] = [];
  for (const spec of CANONICAL_COLUMNS[kind]) {
    const sourceName = findSourceName(spec.name, columnNames, profile);
    if (sourceName !== undefined) matches.push({ spec, sourceName });
    else if (spec.required) throw missingColumnError(fileName, columnNames, kind, spec, profile);
  }
  return matches;
}

function missingColumnError(
  fileName: string,
  columnNames: readonly string[],
  kind: FileKind,
  spec: ColumnSpec,
  profile: FeedProfile,
): InputError {
  const mapped = profile.columns[spec.name];
  const looked = mapped && mapped !== spec.name ? `"${mapped}" (mapped to ${spec.name})` : `"${spec.name}"`;
  const found = columnNames.length > 0 ? shownColumnNames(columnNames) : 'none';
  return new InputError(
    `${fileName} has no column ${looked}, which a ${kind} file needs (columns found: ${found}); rename the column or map it in the feed profile's columns.`,
  );
}

/** The file's column names for an error message: the first few, each cut short, and how many there are. */
export function shownColumnNames(names: readonly string[], count = 20): string {
  const shown = names.slice(0, count).map((name) => (name.length > 40 ? `${name.slice(0, 40)}…` : name)).join(', ');
  return names.length > count ? `${shown} and ${names.length - count} more` : shown;
}

/** Reads every canonical column of a kind from a columnar file and applies the row rules. */
export function ingestColumnarFile(
  file: ColumnarFile,
  kind: FileKind,
  profile: FeedProfile,
  allLimits: ReadLimits = DEFAULT_READ_LIMITS,
): IngestResult {
  const limits = limitsForKind(kind, allLimits);
  const found = matchColumns(file.fileName, file.columnNames, kind, profile).map(({ spec, sourceName }): FoundColumn => {
    const source = file.readColumn(sourceName);
    const converted = toCanonicalColumn(spec, source, profile, { fileName: file.fileName, sourceName });
    if (spec.type === 'id' && converted.type === 'text') {
      const cleaned = cleanIdColumn(spec.name, converted, profile.identifiers ?? 'strict');
      return { spec, sourceName, source, converted: cleaned.column, complaints: cleaned.complaints };
    }
    return { spec, sourceName, source, converted, complaints: textComplaints(spec, converted) };
  });
  return assembleResult(file, kind, found, limits);
}

interface FoundColumn {
  readonly spec: ColumnSpec;
  readonly sourceName: string;
  readonly source: SourceColumn;
  readonly converted: Column;
  /** For text columns with a rule: the complaint about each dictionary entry, or null. */
  readonly complaints: (string | null)[] | null;
}

/**
 * Applies the identifier rule once per distinct id. Entries that clean to the same id share one
 * code; a refused entry keeps a code of its own with its complaint, so its rows are rejected.
 */
function cleanIdColumn(name: string, column: TextColumn, mode: IdentifierMode): { column: TextColumn; complaints: (string | null)[] } {
  const dictionary: string[] = [];
  const complaints: (string | null)[] = [];
  const codeOfValue = new Map<string, number>();
  const newCode = Int32Array.from(column.dictionary, (entry) => {
    const cleaned = cleanIdentifier(name, entry, mode);
    if (cleaned.problem !== null) {
      complaints.push(cleaned.problem);
      return dictionary.push(entry) - 1;
    }
    let code = codeOfValue.get(cleaned.value);
    if (code === undefined) {
      code = dictionary.push(cleaned.value) - 1;
      complaints.push(null);
      codeOfValue.set(cleaned.value, code);
    }
    return code;
  });
  // Ids that are all clean and distinct keep their codes: no second column of codes.
  if (newCode.every((code, entry) => code === entry)) return { column: { type: 'text', codes: column.codes, dictionary }, complaints };
  const codes = sharedInt32Array(column.codes.length);
  for (let row = 0; row < codes.length; row++) {
    const code = column.codes[row];
    codes[row] = code < 0 ? code : newCode[code];
  }
  return { column: { type: 'text', codes, dictionary }, complaints };
}

interface ConversionContext {
  readonly fileName: string;
  readonly sourceName: string;
}

/** Converts a source column to the canonical type of its spec; values that do not convert become missing. */
export function toCanonicalColumn(
  spec: ColumnSpec,
  source: SourceColumn,
  profile: FeedProfile,
  context: ConversionContext,
): Column {
  switch (spec.type) {
    case 'id':
    case 'text':
      return toText(source);
    case 'date':
      return toDates(source, profile.date_format, context);
    case 'number':
      return toNumbers(source, numberStyle(profile.decimal, profile.thousands));
    case 'boolean':
      return toBooleans(source);
  }
}

type TextColumn = Extract<Column, { type: 'text' }>;

function toText(source: SourceColumn): TextColumn {
  if (source.form === 'text') return { type: 'text', codes: source.codes, dictionary: source.dictionary };
  const encoder = new TextDictionaryBuilder(source.form === 'days' ? source.days.length : source.values.length);
  for (let row = 0; row < encoder.codes.length; row++) encoder.set(row, displayValue(source, row));
  return encoder.finish();
}

/** The value of a non-text source cell as text, or null when missing. */
function displayValue(source: SourceColumn, row: number): string | null {
  switch (source.form) {
    case 'text':
      return source.codes[row] < 0 ? null : source.dictionary[source.codes[row]];
    case 'days':
      return source.days[row] === NULL_DATE ? null : formatIsoDate(source.days[row]);
    case 'number':
      return Number.isNaN(source.values[row]) ? null : String(source.values[row]);
    case 'boolean':
      return source.values[row] === NULL_BOOLEAN ? null : source.values[row] === 1 ? 'true' : 'false';
  }
}

function toDates(source: SourceColumn, format: DateFormat, context: ConversionContext): Column {
  if (source.form === 'days') return { type: 'date', values: source.days };
  const text = toText(source);
  const resolved = resolveDateFormat(text.dictionary, format, text.codes, context);
  const daysOfCode = Int32Array.from(text.dictionary, (entry) => parseDateText(entry, resolved) ?? NULL_DATE);
  return { type: 'date', values: mapCodes(text.codes, daysOfCode, NULL_DATE, sharedInt32Array) };
}

function toNumbers(source: SourceColumn, style: NumberStyle): Column {
  if (source.form === 'number') return { type: 'number', values: source.values };
  if (source.form !== 'text') return { type: 'number', values: sharedFloat64Array(rowCountOf(source)).fill(NaN) };
  const valueOfCode = Float64Array.from(source.dictionary, (entry) => parseNumberText(entry, style));
  return { type: 'number', values: mapCodes(source.codes, valueOfCode, NaN, sharedFloat64Array) };
}

function toBooleans(source: SourceColumn): Column {
  if (source.form === 'boolean') return { type: 'boolean', values: source.values };
  const values = new Uint8Array(rowCountOf(source)).fill(NULL_BOOLEAN);
  if (source.form === 'number') {
    source.values.forEach((value, row) => (values[row] = value === 1 ? 1 : value === 0 ? 0 : NULL_BOOLEAN));
  } else if (source.form === 'text') {
    const valueOfCode = Uint8Array.from(source.dictionary, (word) => parseBooleanWord(word) ?? NULL_BOOLEAN);
    return { type: 'boolean', values: mapCodes(source.codes, valueOfCode, NULL_BOOLEAN, (length) => new Uint8Array(length)) };
  }
  return { type: 'boolean', values };
}


function mapCodes<T extends Int32Array | Float64Array | Uint8Array>(
  codes: Int32Array,
  valueOfCode: T,
  missing: number,
  make: (length: number) => T,
): T {
  const values = make(codes.length);
  for (let row = 0; row < codes.length; row++) values[row] = codes[row] < 0 ? missing : valueOfCode[codes[row]];
  return values;
}

/**
 * Under `auto`, numeric dates such as 03/04/2026 need the file to prove their order: a value
 * like 31/01/2026 proves day-first. Proof both ways, or none with ambiguous values, stops the run.
 * Each distinct value is looked at once.
 */
export function resolveDateFormat(
  dictionary: readonly string[],
  format: DateFormat,
  codes: Int32Array,
  context: ConversionContext,
): DateFormat {
  if (format !== 'auto') return format;
  const evidence = new DateOrderEvidence();
  dictionary.forEach((entry, code) => {
    if (parseDateText(entry, 'auto') === null) evidence.record(entry, () => lineOfRecord(codes.indexOf(code)));
  });
  return evidence.decide(context.fileName);
}

function rowCountOf(source: SourceColumn): number {
  return source.form === 'days' ? source.days.length : source.form === 'text' ? source.codes.length : source.values.length;
}

function isMissing(column: Column, row: number): boolean {
  switch (column.type) {
    case 'date':
      return column.values[row] === NULL_DATE;
    case 'number':
      return Number.isNaN(column.values[row]);
    case 'text':
      return column.codes[row] < 0;
    case 'boolean':
      return column.values[row] === NULL_BOOLEAN;
  }
}

/** Calls `visit` for each row whose value is missing, with one tight loop per column type. */
function forEachMissing(column: Column, visit: (row: number) => void): void {
  // Each loop reads a local array: a property read per row of a column of any type costs more.
  switch (column.type) {
    case 'date': {
      const days = column.values;
      for (let row = 0; row < days.length; row++) if (days[row] === NULL_DATE) visit(row);
      return;
    }
    case 'number': {
      const numbers = column.values;
      for (let row = 0; row < numbers.length; row++) if (numbers[row] !== numbers[row]) visit(row); // NaN
      return;
    }
    case 'text': {
      const codes = column.codes;
      for (let row = 0; row < codes.length; row++) if (codes[row] < 0) visit(row);
      return;
    }
    case 'boolean': {
      const flags = column.values;
      for (let row = 0; row < flags.length; row++) if (flags[row] === NULL_BOOLEAN) visit(row);
      return;
    }
  }
}

function isPresent(source: SourceColumn, row: number): boolean {
  return displayValue(source, row) !== null;
}

const NO_PROBLEM = -1;

/**
 * For each row, the index (into `found`) of the first column that makes it unreadable, or −1, and
 * that column's complaint. A value that is missing where the column is not nullable, a value that
 * is present but does not convert, and a text value its column does not allow all reject the row.
 */
function findProblems(found: readonly FoundColumn[], rowCount: number, limits: ReadLimits) {
  const problemOf = new Int16Array(rowCount).fill(NO_PROBLEM);
  found.forEach(({ spec, source, converted, complaints }, index) => {
    forEachMissing(converted, (row) => {
      if (problemOf[row] === NO_PROBLEM && (!spec.nullable || isPresent(source, row))) problemOf[row] = index;
    });
    if (converted.type === 'date') markOutsideRange(converted.values, limits, problemOf, index);
    const complaintOfCode = complaints;
    if (!complaintOfCode || converted.type !== 'text' || complaintOfCode.every((complaint) => complaint === null)) return;
    for (let row = 0; row < rowCount; row++) {
      const code = converted.codes[row];
      if (problemOf[row] === NO_PROBLEM && code >= 0 && complaintOfCode[code] !== null) problemOf[row] = index;
    }
  });
  return problemOf;
}

/** Marks the rows not marked yet whose date is present but outside the plausible range. */
function markOutsideRange(days: Int32Array, limits: ReadLimits, problemOf: Int16Array, index: number): void {
  const { firstDay, lastDay } = limits;
  for (let row = 0; row < days.length; row++) {
    const day = days[row];
    if (day !== NULL_DATE && (day < firstDay || day > lastDay) && problemOf[row] === NO_PROBLEM) problemOf[row] = index;
  }
}

/** A text column's validation run once per distinct value; null when the column has no rule. */
function textComplaints(spec: ColumnSpec, column: Column): (string | null)[] | null {
  if (column.type !== 'text' || !spec.validate) return null;
  return column.dictionary.map(spec.validate);
}

/** True for a date present but outside the plausible range of the limits. */
export function outsideRange(day: number, limits: ReadLimits): boolean {
  return day !== NULL_DATE && (day < limits.firstDay || day > limits.lastDay);
}

/** The rejection reason of a date outside the plausible range, the same for every reader. */
export function rangeReason(label: string, day: number, limits: ReadLimits): string {
  return `${label} ${formatIsoDate(day)} is outside the plausible range ${formatIsoDate(limits.firstDay)} to ${formatIsoDate(limits.lastDay)} (limits.earliest_date and limits.latest_date in the run configuration)`;
}

function assembleResult(file: ColumnarFile, kind: FileKind, found: readonly FoundColumn[], limits: ReadLimits): IngestResult {
  const problemOf = findProblems(found, file.rowCount, limits);
  const rejected: RejectedRow[] = [];
  for (let row = 0; row < file.rowCount; row++) {
    if (problemOf[row] !== NO_PROBLEM) rejected.push(rejectedRow(file.fileName, found, row, found[problemOf[row]], limits));
  }
  const keep = acceptedRows(problemOf, file.rowCount - rejected.length);
  const columns: Record<string, Column> = {};
  for (const { spec, source, converted } of found) {
    columns[spec.name] = keep ? gatherColumn(converted, keep) : converted;
    if (spec.keepsText) columns[`${spec.name}_text`] = keep ? gatherColumn(toText(source), keep) : toText(source);
  }
  const length = file.rowCount - rejected.length;
  // Dates, numbers and lines are series frame columns: on shared memory (shared-columns.ts).
  const lines = sharedInt32Array(length);
  if (keep) for (let i = 0; i < length; i++) lines[i] = lineOfRecord(keep[i]);
  else for (let i = 0; i < length; i++) lines[i] = lineOfRecord(i);
  const table: CanonicalTable = { kind, length, lines, columns };
  return { file: file.fileName, kind, table, rejected, rows: { read: file.rowCount, accepted: length, rejected: rejected.length } };
}

/**
 * Records are numbered as the lines of the same table written as a canonical CSV (the header
 * is line 1, so the first record is line 2): the same data in CSV, Arrow or Parquet then gives
 * the same findings, evidence lines included.
 */
function lineOfRecord(row: number): number {
  return row + 2;
}

/** The rows to keep, or null when every row is kept and the columns can be used as they are. */
function acceptedRows(problemOf: Int16Array, acceptedCount: number): Int32Array | null {
  if (acceptedCount === problemOf.length) return null;
  const keep = new Int32Array(acceptedCount);
  let next = 0;
  for (let row = 0; row < problemOf.length; row++) if (problemOf[row] === NO_PROBLEM) keep[next++] = row;
  return keep;
}

function rejectedRow(fileName: string, found: readonly FoundColumn[], row: number, culprit: FoundColumn, limits: ReadLimits): RejectedRow {
  const record: Record<string, string | number | boolean | null> = {};
  for (const { sourceName, source } of found) record[sourceName] = rawValue(source, row);
  return { file: fileName, line: lineOfRecord(row), raw: JSON.stringify(record), reason: problemReason(culprit, row, limits) };
}

function rawValue(source: SourceColumn, row: number): string | number | boolean | null {
  if (source.form === 'number') return Number.isNaN(source.values[row]) ? null : source.values[row];
  if (source.form === 'boolean') return source.values[row] === NULL_BOOLEAN ? null : source.values[row] === 1;
  return displayValue(source, row);
}

const TYPE_WORDS = { id: 'an id', text: 'text', date: 'a date', number: 'a number', boolean: 'true or false' } as const;

function problemReason({ spec, sourceName, source, converted, complaints }: FoundColumn, row: number, limits: ReadLimits): string {
  const label = sourceName === spec.name ? spec.name : `${sourceName} (${spec.name})`;
  const shown = displayValue(source, row);
  if (shown === null) return `${label} is missing.`;
  if (!isMissing(converted, row) && converted.type === 'text' && complaints) {
    return `${complaints[converted.codes[row]]}.`;
  }
  if (converted.type === 'date' && outsideRange(converted.values[row], limits)) return `${rangeReason(label, converted.values[row], limits)}.`;
  return `${label} ${quoteInput(shown)} is not ${TYPE_WORDS[spec.type]}.`;
}

function gatherColumn(column: Column, keep: Int32Array): Column {
  switch (column.type) {
    case 'date':
      return { type: 'date', values: gather(column.values, keep, sharedInt32Array) };
    case 'number':
      return { type: 'number', values: gather(column.values, keep, sharedFloat64Array) };
    case 'boolean':
      return { type: 'boolean', values: gather(column.values, keep, (length) => new Uint8Array(length)) };
    case 'text':
      return compactDictionary(gather(column.codes, keep, sharedInt32Array), column.dictionary);
  }
}

function gather<T extends Int32Array | Float64Array | Uint8Array>(
  values: T,
  keep: Int32Array,
  make: (length: number) => T,
): T {
  const out = make(keep.length);
  for (let i = 0; i < keep.length; i++) out[i] = values[keep[i]];
  return out;
}

/** Renumbers codes so the dictionary holds only the values in use, in order of first appearance. */
export function compactDictionary(codes: Int32Array, dictionary: readonly string[]): TextColumn {
  const newCodeOf = new Int32Array(dictionary.length).fill(-1);
  const kept: string[] = [];
  const out = sharedInt32Array(codes.length);
  for (let row = 0; row < codes.length; row++) {
    const code = codes[row];
    if (code < 0) {
      out[row] = -1;
      continue;
    }
    if (newCodeOf[code] < 0) newCodeOf[code] = kept.push(dictionary[code]) - 1;
    out[row] = newCodeOf[code];
  }
  return { type: 'text', codes: out, dictionary: kept };
}

/**
 * Builds a text column value by value, giving equal strings one code. Values are trimmed and blank
 * ones count as missing, as in a CSV cell.
 */
export class TextDictionaryBuilder {
  readonly codes: Int32Array;
  private readonly dictionary: string[] = [];
  private readonly codeOf = new Map<string, number>();

  constructor(length: number) {
    this.codes = sharedInt32Array(length);
  }

  set(row: number, value: string | null | undefined): void {
    this.codes[row] = this.codeFor(value);
  }

  codeFor(untrimmed: string | null | undefined): number {
    const value = untrimmed?.trim();
    if (value === undefined || value === '') return -1;
    let code = this.codeOf.get(value);
    if (code === undefined) {
      code = this.dictionary.push(value) - 1;
      this.codeOf.set(value, code);
    }
    return code;
  }

  finish(): TextColumn {
    return { type: 'text', codes: this.codes, dictionary: this.dictionary };
  }
}
