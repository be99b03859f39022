import { z } from 'zod';
import { IDENTIFIER_MODES } from './identifiers.js';
import { describeMark, isSingleByteMark } from './profile-marks.js';
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
    quote: z.string().default('"'),
    /** `strict` rejects ids with invisible characters; `strip-invisible` removes them (docs/ingestion.md). */
    identifiers: z.enum(IDENTIFIER_MODES).default('strict'),
  })
  .strict()
  .superRefine((profile, context) => {
    if (profile.thousands !== '' && profile.thousands === profile.decimal) {
      context.addIssue({ code: 'custom', path: ['thousands'], message: 'must differ from decimal' });
    }
    const delimiter = profile.delimiter === '\\t' ? '\t' : profile.delimiter;
    if (delimiter !== 'auto' && !isSingleByteMark(delimiter)) {
      context.addIssue({ code: 'custom', path: ['delimiter'], message: `must be one ASCII character other than a line break (such as , ; | or \\t) or auto, not ${describeMark(delimiter)}` });
    }
    if (!isSingleByteMark(profile.quote)) {
      context.addIssue({ code: 'custom', path: ['quote'], message: `must be one ASCII character other than a line break, not ${describeMark(profile.quote)}` });
    } else if (delimiter === profile.quote) {
      context.addIssue({ code: 'custom', path: ['delimiter'], message: 'must differ from the quote character' });
    }
    if (delimiter === profile.decimal) {
      context.addIssue({ code: 'custom', path: ['delimiter'], message: 'must differ from the decimal mark' });
    }
  });

export type FeedProfile = z.output<typeof FeedProfileSchema>;

export const DEFAULT_PROFILE: FeedProfile = FeedProfileSchema.parse({});

export const FILE_KIND_SCHEMA = z.enum(FILE_KINDS);
