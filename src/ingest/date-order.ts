import { CsvRowScanner } from './csv-rows.js';
import { ConfigError } from './errors.js';
import type { DateFormat, FeedProfile } from './profile.js';
import { numericDateReadings, parseDateText } from './scalars.js';
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

interface Evidence {
  dayFirstLine: number;
  dayFirstText: string;
  monthFirstLine: number;
  monthFirstText: string;
  ambiguousLine: number;
  ambiguousText: string;
}

export function resolveDateFormat(
  bytes: Buffer,
  bodyStart: number,
  fieldCount: number,
  delimiter: number,
  quote: number,
  plans: readonly DateFieldPlan[],
  profile: FeedProfile,
  fileName: string,
): DateFormat {
  if (profile.date_format !== 'auto') return profile.date_format;
  const dateFields = plans.filter((plan) => plan.spec.type === 'date').map((plan) => plan.field);
  if (dateFields.length === 0) return 'auto';
  const scanner = new CsvRowScanner(bytes, bodyStart, delimiter, quote, fieldCount + 1);
  scanner.next();
  const evidence = gatherEvidence(scanner, bytes, dateFields, fieldCount);
  if (!evidence) return 'auto';
  return decide(evidence, fileName);
}

/**
 * Scans the date fields of the rows that split into the header's number of fields. Returns null
 * (keep `auto`) when the first such row with a readable date writes it in a form that needs no
 * order (ISO, `YYYYMMDD`, a month name); rows whose dates are unreadable either way do not count.
 */
function gatherEvidence(scanner: CsvRowScanner, bytes: Buffer, dateFields: readonly number[], fieldCount: number): Evidence | null {
  const evidence: Evidence = {
    dayFirstLine: 0,
    dayFirstText: '',
    monthFirstLine: 0,
    monthFirstText: '',
    ambiguousLine: 0,
    ambiguousText: '',
  };
  let sawNumeric = false;
  while (scanner.next()) {
    if (scanner.isBlank() || scanner.error !== null || scanner.fieldCount !== fieldCount) continue;
    for (const field of dateFields) {
      const text = bytes.toString('utf8', scanner.starts[field], scanner.ends[field]).trim();
      if (text === '') continue;
      const readings = numericDateReadings(text);
      if (readings) {
        sawNumeric = true;
        record(evidence, readings, scanner.line, text);
      } else if (!sawNumeric && parseDateText(text, 'auto') !== null) {
        return null;
      }
    }
  }
  return sawNumeric ? evidence : null;
}

function record(evidence: Evidence, readings: { dayFirst: boolean; monthFirst: boolean }, line: number, text: string) {
  if (readings.dayFirst && readings.monthFirst) {
    if (!evidence.ambiguousLine) Object.assign(evidence, { ambiguousLine: line, ambiguousText: text });
  } else if (readings.dayFirst) {
    if (!evidence.dayFirstLine) Object.assign(evidence, { dayFirstLine: line, dayFirstText: text });
  } else if (readings.monthFirst) {
    if (!evidence.monthFirstLine) Object.assign(evidence, { monthFirstLine: line, monthFirstText: text });
  }
}

function decide(evidence: Evidence, fileName: string): DateFormat {
  if (evidence.dayFirstLine && evidence.monthFirstLine) {
    throw new ConfigError(
      `${fileName}, line ${evidence.dayFirstLine}: "${evidence.dayFirstText}" can only be day-first but line ${evidence.monthFirstLine} has "${evidence.monthFirstText}", which can only be month-first; fix the file or set date_format in the feed profile.`,
    );
  }
  if (evidence.dayFirstLine) return 'day-first';
  if (evidence.monthFirstLine) return 'month-first';
  if (!evidence.ambiguousLine) return 'auto'; // only impossible dates such as 13/13/2026: each row is rejected
  throw new ConfigError(
    `${fileName}, line ${evidence.ambiguousLine}: dates such as "${evidence.ambiguousText}" read both day-first and month-first and no row settles which; set date_format: day-first or month-first in the feed profile.`,
  );
}
