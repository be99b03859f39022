import { z } from 'zod';
import { FILE_KINDS } from './schema.js';

/**
 * A feed profile maps a vendor's own layout onto the canonical columns: which header holds each
 * canonical column, how dates and numbers are written, and how the file is delimited.
 */
export const DATE_FORMATS = ['auto', 'iso', 'day-first', 'month-first'] as const;
export type DateFormat = (typeof DATE_FORMATS)[number];

export const FeedProfileSchema = z
  .object({
    /** Canonical column name → the header the vendor uses for it. */
    columns: z.record(z.string(), z.string().min(1)).default({}),
    /**
     * `auto` accepts ISO dates, compact `20261231` and month-name dates (`31-Dec-2026`), and
     * decides day-first or month-first only when the file itself proves which; otherwise it stops.
     */
    date_format: z.enum(DATE_FORMATS).default('auto'),
    decimal: z.enum(['.', ',']).default('.'),
    thousands: z.enum(['', ',', '.', ' ', "'", '_']).default(''),
    /** A single character, `\t` for tabs, or `auto` to detect `,` `;` tab or `|` from the header. */
    delimiter: z.string().default(','),
    quote: z.string().length(1).default('"'),
  })
  .strict()
  .superRefine((profile, context) => {
    if (profile.thousands !== '' && profile.thousands === profile.decimal) {
      context.addIssue({ code: 'custom', path: ['thousands'], message: 'must differ from decimal' });
    }
    const delimiter = profile.delimiter === '\\t' ? '\t' : profile.delimiter;
    if (delimiter !== 'auto' && delimiter.length !== 1) {
      context.addIssue({ code: 'custom', path: ['delimiter'], message: 'must be one character, \\t or auto' });
    }
    if (delimiter === profile.decimal) {
      context.addIssue({ code: 'custom', path: ['delimiter'], message: 'must differ from the decimal mark' });
    }
  });

export type FeedProfile = z.output<typeof FeedProfileSchema>;

export const DEFAULT_PROFILE: FeedProfile = FeedProfileSchema.parse({});

/** The delimiter a profile asks for, with `\t` spelled out; `auto` stays `auto`. */
export function profileDelimiter(profile: FeedProfile): string {
  return profile.delimiter === '\\t' ? '\t' : profile.delimiter;
}

export const FILE_KIND_SCHEMA = z.enum(FILE_KINDS);
