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
        identity: [fnv1a(row.raw.trim())],
      }),
    );
  },
};

/** 32-bit FNV-1a as 8 hex digits: short, stable, dependency-free. */
export function fnv1a(text: string): string {
  let hash = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    hash ^= text.charCodeAt(i);
    hash = Math.imul(hash, 0x01000193);
  }
  return (hash >>> 0).toString(16).padStart(8, '0');
}
