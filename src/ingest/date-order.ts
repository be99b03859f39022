import { CsvRowScanner } from './csv-rows.js';
import { ConfigError } from './errors.js';
import type { DateFormat, FeedProfile } from './profile.js';
import { numericDateReadings, parseDateText, trimSpacesAndTabs } from './scalars.js';
import type { ColumnSpec } from './schema.js';

/**
 * Settles day-first against month-first for a file whose profile says `auto`. A numeric date
 * such as `03/04/2026` reads both ways; only a row like `31/01/2026` proves the order. When no
 * row proves it, or rows prove both, the file stops with an error instead of a guess.
 */
export interface DateFieldPlan {
  readonly spec: ColumnSpec;
  readonly field: number;
}

/**
 * What the dates of one file prove about their order: the first text (and its line) that only
 * reads day-first, the first that only reads month-first, and the first that reads both ways.
 * The CSV reader and the Arrow/Parquet reader gather it their own way and decide alike.
 */
export class DateOrderEvidence {
  private dayFirst: { line: number; text: string } | null = null;
  private monthFirst: { line: number; text: string } | null = null;
  private ambiguous: { line: number; text: string } | null = null;
  /** True once a numeric day–month date has been seen. */
  sawNumeric = false;

  /** Records one date as written; false when it is not a numeric day–month date at all. */
  record(text: string, lineOf: () => number): boolean {
    const readings = numericDateReadings(text);
    if (!readings) return false;
    this.sawNumeric = true;
    if (readings.dayFirst && readings.monthFirst) this.ambiguous ??= { line: lineOf(), text };
    else if (readings.dayFirst) this.dayFirst ??= { line: lineOf(), text };
    else if (readings.monthFirst) this.monthFirst ??= { line: lineOf(), text };
    return true;
  }

  /** The order the file proves, `auto` when nothing needs one, or a ConfigError when it cannot be told. */
  decide(fileName: string): DateFormat {
    const { dayFirst, monthFirst, ambiguous } = this;
    if (dayFirst && monthFirst) {
      throw new ConfigError(
        `${fileName}, line ${dayFirst.line}: "${dayFirst.text}" can only be day-first but line ${monthFirst.line} has "${monthFirst.text}", which can only be month-first; fix the file or set date_format in the feed profile.`,
      );
    }
    if (dayFirst) return 'day-first';
    if (monthFirst) return 'month-first';
    if (!ambiguous) return 'auto'; // only impossible dates such as 13/13/2026: each row is rejected
    throw new ConfigError(
      `${fileName}, line ${ambiguous.line}: dates such as "${ambiguous.text}" read both day-first and month-first and no row settles which; set date_format: day-first or month-first in the feed profile.`,
    );
  }
}

const LONGEST_DATE = 64;

export function resolveDateFormat(
  bytes: Buffer,
  headerStart: number,
  fieldCount: number,
  delimiter: number,
  quote: number,
  plans: readonly DateFieldPlan[],
  profile: FeedProfile,
  fileName: string,
  final = true,
): DateFormat | typeof UNSETTLED {
  if (profile.date_format !== 'auto') return profile.date_format;
  const dateFields = plans.filter((plan) => plan.spec.type === 'date').map((plan) => plan.field);
  if (dateFields.length === 0) return 'auto';
  const scanner = new CsvRowScanner(bytes, headerStart, delimiter, quote, fieldCount + 1);
  scanner.next();
  const evidence = gatherEvidence(scanner, bytes, dateFields, fieldCount, final);
  if (evidence === UNSETTLED) return UNSETTLED;
  if (!evidence) return 'auto';
  return evidence.decide(fileName);
}

/**
 * What `resolveDateFormat` answers when `bytes` are only the first window of the file
 * (`final` false) and the rows in it do not settle the order: the caller reads the whole file.
 */
export const UNSETTLED = 'unsettled';

/**
 * Scans the date fields of the rows that split into the header's number of fields. Returns null
 * (keep `auto`) when the first such row with a readable date writes it in a form that needs no
 * order (ISO, `YYYYMMDD`, a month name); rows whose dates are unreadable either way do not count.
 */
function gatherEvidence(
  scanner: CsvRowScanner,
  bytes: Buffer,
  dateFields: readonly number[],
  fieldCount: number,
  final: boolean,
): DateOrderEvidence | null | typeof UNSETTLED {
  const evidence = new DateOrderEvidence();
  while (scanner.next()) {
    if (!scanner.isWhole(final)) return UNSETTLED;
    if (scanner.isBlank() || scanner.error !== null || scanner.fieldCount !== fieldCount) continue;
    for (const field of dateFields) {
      // No written date is longer; a huge field is rejected by the row reader, not decoded here.
      if (scanner.ends[field] - scanner.starts[field] > LONGEST_DATE) continue;
      const text = trimSpacesAndTabs(bytes.toString('utf8', scanner.starts[field], scanner.ends[field]));
      if (text === '' || evidence.record(text, () => scanner.line)) continue;
      if (!evidence.sawNumeric && parseDateText(text, 'auto') !== null) return null;
    }
  }
  if (!final) return UNSETTLED;
  return evidence.sawNumeric ? evidence : null;
}
