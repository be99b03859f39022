import type { FeedProfile } from './profile.js';

/**
 * The marks a feed profile gives the CSV reader (delimiter and quote): what a mark may be, and
 * the delimiter as the reader takes it. The CSV reader's worker thread needs these and not the
 * profile's schema (src/ingest/profile.ts), so it starts without loading the schema library.
 */

/** The delimiter a profile asks for, with `\t` spelled out; `auto` stays `auto`. */
export function profileDelimiter(profile: Pick<FeedProfile, 'delimiter'>): string {
  return profile.delimiter === '\\t' ? '\t' : profile.delimiter;
}

/**
 * The CSV reader works on bytes, so a delimiter or quote must be one byte: an ASCII character.
 * A line break cannot be one either, since it ends the row.
 */
export function isSingleByteMark(mark: string): boolean {
  return mark.length === 1 && mark.charCodeAt(0) < 0x80 && mark !== '\n' && mark !== '\r';
}

/** A mark as an error message shows it: quoted, cut when long, with its size in bytes. */
export function describeMark(mark: string): string {
  const shown = JSON.stringify(mark.length > 10 ? `${mark.slice(0, 10)}…` : mark);
  const bytes = Buffer.byteLength(mark, 'utf8');
  return `${shown} (${bytes} byte${bytes === 1 ? '' : 's'}${/[\r\n]/.test(mark) ? ', a line break' : ''})`;
}
