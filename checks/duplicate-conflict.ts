import type { SeriesCheck } from '../src/checks/check.js';
import { isoDate, makeFinding } from '../src/checks/support.js';
import { allValuesEqual, rowEvidence, sameDateGroups } from '../src/checks/duplicates.js';

/**
 * The same series and date with different values: nobody can tell which one is right, and
 * checks downstream use the first. Often a correction sent as a new row.
 */
export const duplicateConflict: SeriesCheck<Record<string, never>> = {
  id: 'duplicate_conflict',
  scope: 'series',
  purpose: 'The same series and date delivered with different values.',
  defaults: {},
  run(series) {
    return sameDateGroups(series)
      .filter((rows) => !allValuesEqual(series, rows))
      .map((rows) => {
        const day = series.dates[rows[0]];
        const values = [...new Set(rows.map((row) => series.values[row]))];
        return makeFinding({
          check: 'duplicate_conflict',
          severity: 'error',
          seriesId: series.id,
          start: day,
          end: day,
          message: `${series.id} has ${rows.length} rows for ${isoDate(day)} with different values (${values.join(', ')}); only one can be right.`,
          evidence: { date: isoDate(day), rows: rowEvidence(series, rows) },
          identity: [isoDate(day)],
        });
      });
  },
};
