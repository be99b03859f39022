import type { SeriesCheck } from '../src/checks/check.js';
import { isoDate, makeFinding } from '../src/checks/support.js';
import { allValuesEqual, rowEvidence, sameDateGroups } from '../src/checks/duplicates.js';

/** The same series, date and value more than once: harmless to the figures but a feed fault. */
export const duplicateRow: SeriesCheck<Record<string, never>> = {
  id: 'duplicate_row',
  scope: 'series',
  purpose: 'The same series, date and value delivered more than once.',
  defaults: {},
  run(series) {
    return sameDateGroups(series)
      .filter((rows) => allValuesEqual(series, rows))
      .map((rows) => {
        const day = series.dates[rows[0]];
        return makeFinding({
          check: 'duplicate_row',
          severity: 'warning',
          seriesId: series.id,
          start: day,
          end: day,
          message: `${series.id} has ${rows.length} identical rows for ${isoDate(day)} (value ${series.values[rows[0]]}).`,
          evidence: { date: isoDate(day), rows: rowEvidence(series, rows) },
          identity: [isoDate(day)],
        });
      });
  },
};
