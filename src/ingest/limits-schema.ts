import { z } from 'zod';
import { parseIsoDate } from '../calendar/days.js';
import { LIMIT_DEFAULTS, READABLE_BYTES } from './limits.js';

/**
 * The run configuration's `limits:` as it is checked when the configuration is read: each limit
 * within its bounds, its default when it is left out (src/ingest/limits.ts turns it into the
 * readers' limits).
 */

const isoDate = z.string().refine((text) => parseIsoDate(text) !== null, 'must be a date written YYYY-MM-DD');

export const LimitsSchema = z
  .object({
    max_input_bytes: z.number().int().min(1).max(READABLE_BYTES).default(LIMIT_DEFAULTS.max_input_bytes),
    max_field_bytes: z.number().int().min(16).default(LIMIT_DEFAULTS.max_field_bytes),
    max_header_columns: z.number().int().min(1).default(LIMIT_DEFAULTS.max_header_columns),
    yaml_max_aliases: z.number().int().min(0).default(LIMIT_DEFAULTS.yaml_max_aliases),
    yaml_max_depth: z.number().int().min(2).default(LIMIT_DEFAULTS.yaml_max_depth),
    decode_timeout_ms: z.number().int().min(100).default(LIMIT_DEFAULTS.decode_timeout_ms),
    earliest_date: isoDate.default(LIMIT_DEFAULTS.earliest_date),
    /** Latest date a row may carry; by default the as-of date plus one year. */
    latest_date: isoDate.optional(),
  })
  .strict();

export type LimitsFile = z.output<typeof LimitsSchema>;
