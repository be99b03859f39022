import type { SeriesFrame } from '../../src/series/frame.js';

/** A frame's contents as plain arrays, so two frames compare with `toEqual` whatever memory holds them. */
export const plainFrame = (frame: SeriesFrame) => ({
  ids: [...frame.ids],
  offsets: [...frame.offsets],
  dates: [...frame.dates],
  values: [...frame.values],
  lines: [...frame.lines],
  indexById: [...frame.indexById],
});
