import type { DatedFrame, SeriesFrame } from '../../src/series/frame.js';

/**
 * A frame's contents as plain arrays, so two frames compare with `toEqual` whatever memory holds
 * them; a dated frame (no lines) has no `lines` member.
 */
export const plainFrame = (frame: DatedFrame | SeriesFrame) => ({
  ids: [...frame.ids],
  offsets: [...frame.offsets],
  dates: [...frame.dates],
  values: [...frame.values],
  ...('lines' in frame ? { lines: [...frame.lines] } : {}),
  indexById: [...frame.indexById],
});
