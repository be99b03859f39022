import { civilFromEpochDay, daysInMonth, epochDay, parseIsoDate, todayEpochDay } from '../calendar/days.js';
import type { LimitsFile } from './limits-schema.js';

/**
 * The bounds every input is read within, so a hostile or broken file ends in a clear error or a
 * rejected row instead of a hang or an out-of-memory abort. Every default is documented in
 * docs/ingestion.md ("Limits") and can be raised under `limits:` in the run configuration
 * (checked by src/ingest/limits-schema.ts). The readers, on every thread, take their limits from
 * here without loading the schema library: the CSV reader's worker thread starts sooner.
 */
export const LIMIT_DEFAULTS = {
  /** Largest input file read (bytes); Node.js reads at most 2 GiB into one buffer. */
  max_input_bytes: 1024 * 1024 * 1024,
  /** Largest single field of a CSV row (bytes); a longer field rejects its row. */
  max_field_bytes: 64 * 1024,
  /** Widest header (columns) of a CSV, Arrow or Parquet file. */
  max_header_columns: 16_384,
  /** YAML aliases a configuration may expand (`*name`), against alias bombs. */
  yaml_max_aliases: 100,
  /** Deepest nesting of a configuration's YAML collections. */
  yaml_max_depth: 64,
  /** Time an Arrow file may take to decode in the watchdog worker (ms) before it is refused as damaged. */
  decode_timeout_ms: 10_000,
  /** Earliest date a fund-data row may carry. */
  earliest_date: '1900-01-01',
} as const;

/** Node.js cannot read a larger file into one buffer. */
export const READABLE_BYTES = 2 ** 31 - 1;

/** What the readers need of the limits, with the date range as epoch days. */
export interface ReadLimits {
  readonly maxInputBytes: number;
  readonly maxFieldBytes: number;
  readonly maxHeaderColumns: number;
  readonly decodeTimeoutMs: number;
  /** Epoch days of the first and last plausible date, both included. */
  readonly firstDay: number;
  readonly lastDay: number;
}

/** The readers' limits from a configuration's `limits:` (or the defaults) and the run's as-of date. */
export function readLimits(file: Partial<LimitsFile> = {}, asOf: number = todayEpochDay()): ReadLimits {
  return {
    maxInputBytes: file.max_input_bytes ?? LIMIT_DEFAULTS.max_input_bytes,
    maxFieldBytes: file.max_field_bytes ?? LIMIT_DEFAULTS.max_field_bytes,
    maxHeaderColumns: file.max_header_columns ?? LIMIT_DEFAULTS.max_header_columns,
    decodeTimeoutMs: file.decode_timeout_ms ?? LIMIT_DEFAULTS.decode_timeout_ms,
    firstDay: parseIsoDate(file.earliest_date ?? LIMIT_DEFAULTS.earliest_date)!,
    lastDay: file.latest_date === undefined ? oneYearAfter(asOf) : parseIsoDate(file.latest_date)!,
  };
}

/** The same day a year later (29 February becomes 28 February). */
export function oneYearAfter(day: number): number {
  const { year, month, day: dayOfMonth } = civilFromEpochDay(day);
  return epochDay(year + 1, month, Math.min(dayOfMonth, daysInMonth(year + 1, month)));
}

export const DEFAULT_READ_LIMITS: ReadLimits = readLimits();

/**
 * The limits as one file kind applies them. A holiday calendar is published years ahead, so a
 * holidays file keeps only the lower bound of the plausible range; every other kind keeps both.
 */
export function limitsForKind(kind: string, limits: ReadLimits): ReadLimits {
  return kind === 'holidays' ? { ...limits, lastDay: 2147483647 } : limits;
}

/** Size of the largest run configuration read; it cannot be raised from inside the file it limits. */
export const DEFAULT_MAX_CONFIG_BYTES = 1024 * 1024;
export const MAX_CONFIG_BYTES_VARIABLE = 'NAVASSAY_MAX_CONFIG_BYTES';

export function maxConfigBytes(environment: NodeJS.ProcessEnv = process.env): number {
  const raised = Number(environment[MAX_CONFIG_BYTES_VARIABLE]);
  return Number.isInteger(raised) && raised > 0 ? Math.min(raised, READABLE_BYTES) : DEFAULT_MAX_CONFIG_BYTES;
}
