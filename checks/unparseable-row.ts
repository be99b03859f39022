import { createHash } from 'node:crypto';
import type { FeedCheck } from '../src/checks/check.js';
import { makeFinding } from '../src/checks/support.js';

/**
 * One finding per input row that could not be read. The key hashes the raw text only, not the
 * line number nor the file's path (which moves with the working directory and often carries the
 * day's date), so the same bad row tomorrow keeps its ticket.
 */
export const unparseableRow: FeedCheck<Record<string, never>> = {
  id: 'unparseable_row',
  scope: 'feed',
  purpose: 'A row of an input file that could not be read.',
  defaults: {},
  run(context) {
    return context.rejected.map((row) =>
      makeFinding({
        check: 'unparseable_row',
        severity: 'error',
        seriesId: null,
        start: null,
        end: null,
        message: `Line ${row.line} of ${row.file} could not be read (${row.reason}) and was left out.`,
        evidence: { file: row.file, line: row.line, raw: row.raw, reason: row.reason },
        identity: [rowDigest(row.raw.trim())],
      }),
    );
  },
};

/**
 * The first 16 hex digits (64 bits) of the SHA-256 of the row's text: keys stay unique across
 * years of tickets, where a 32-bit hash would collide among a few hundred thousand bad rows.
 */
export function rowDigest(text: string): string {
  return createHash('sha256').update(text, 'utf8').digest('hex').slice(0, 16);
}
