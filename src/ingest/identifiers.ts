import { quoteInput } from './errors.js';

/**
 * The rule for identifier values (series, benchmark, rate and calendar ids). An id that holds a
 * control character (NUL included), the replacement character U+FFFD (what invalid UTF-8
 * decodes to), or an invisible formatting character (zero-width space, byte-order mark,
 * direction marks, soft hyphen) looks like another id, or like nothing, on every screen: it
 * would silently start a new series. Such a row is rejected with the reason. A feed profile can
 * say `identifiers: strip-invisible` for a vendor known to send invisible characters: they are
 * then removed (control characters and U+FFFD are still rejected, they mean damaged data).
 */
export const IDENTIFIER_MODES = ['strict', 'strip-invisible'] as const;
export type IdentifierMode = (typeof IDENTIFIER_MODES)[number];

const CONTROL = /\p{Cc}/u;
const REPLACEMENT = /\uFFFD/;
const INVISIBLE = /\p{Cf}/u;
const INVISIBLE_ALL = /\p{Cf}/gu;

export type CleanIdentifier = { readonly value: string; readonly problem: null } | { readonly value: null; readonly problem: string };

/**
 * The id as it is stored, or why it is refused. `text` is already trimmed of surrounding white
 * space (JavaScript's `trim`, which also removes a byte-order mark at either end).
 */
export function cleanIdentifier(column: string, text: string, mode: IdentifierMode): CleanIdentifier {
  if (CONTROL.test(text)) return refuse(column, text, 'holds a control character');
  if (REPLACEMENT.test(text)) return refuse(column, text, 'holds U+FFFD, the mark of bytes that are not valid UTF-8');
  if (!INVISIBLE.test(text)) return { value: text, problem: null };
  if (mode === 'strict') {
    const visible = text.replace(INVISIBLE_ALL, '').trim();
    const what = visible === '' ? 'holds only invisible characters' : 'holds an invisible character (such as a zero-width space or a byte-order mark)';
    return refuse(column, text, `${what}; set identifiers: strip-invisible in the feed profile if the vendor sends them`);
  }
  const value = text.replace(INVISIBLE_ALL, '').trim();
  return value === '' ? refuse(column, text, 'holds only invisible characters') : { value, problem: null };
}

function refuse(column: string, text: string, why: string): CleanIdentifier {
  return { value: null, problem: `${column} ${quoteInput(text)} ${why}` };
}
