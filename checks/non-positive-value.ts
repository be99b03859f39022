import type { SeriesCheck } from '../src/checks/check.js';
import { isoDate, makeFinding } from '../src/checks/support.js';

/** A NAV of zero or below: impossible for a fund unit, and it breaks every return around it. */
export const nonPositiveValue: SeriesCheck<Record<string, never>> = {
  id: 'non_positive_value',
  scope: 'series',
  purpose: 'A NAV of zero or less.',
  defaults: {},
  run(series) {
    const findings = [];
    for (let i = 0; i < series.values.length; i++) {
      if (series.values[i] > 0) continue;
      const day = series.dates[i];
      findings.push(
        makeFinding({
          check: 'non_positive_value',
          severity: 'critical',
          seriesId: series.id,
          start: day,
          end: day,
          message: `${series.id}'s NAV on ${isoDate(day)} is ${series.values[i]}; a NAV must be positive.`,
          evidence: { date: isoDate(day), value: series.values[i], line: series.lines[i] },
          identity: [isoDate(day)],
        }),
      );
    }
    return findings;
  },
};
