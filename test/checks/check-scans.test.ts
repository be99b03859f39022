/**
 * Speed never changes answers: the quicker scans of the checks (a run of repeats found without
 * listing the rows, the logarithm of a change read from the residual model, the rows after the
 * as-of found from the end of a history, a gap's business days counted from running counts)
 * must give what the plain loops they replace give, on any series.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { BusinessCalendars } from '../../src/calendar/business-calendar.js';
import { residualMoves } from '../../src/checks/residual-moves.js';
import { seriesAt, type SeriesSlice } from '../../src/series/frame.js';
import { futureDate } from '../../checks/future-date.js';
import { offCalendarDate } from '../../checks/off-calendar-date.js';
import { lateSeries } from '../../checks/late-series.js';
import { logChanges, repeatsAValue } from '../../checks/stale-value.js';
import { isoDate } from '../../src/checks/support.js';
import { contextFor, frameOfArrays, master, weekdays } from './helpers.js';

/**
 * A history of business days with repeats, holes, duplicate dates, zero, negative and
 * infinite values (the rows the checks skip), and a benchmark over the same days.
 */
const history = fc.record({
  count: fc.integer({ min: 0, max: 120 }),
  seed: fc.integer({ min: 1, max: 1e6 }),
  asOfShare: fc.double({ min: -0.1, max: 1.2, noNaN: true }),
});

function build({ count, seed, asOfShare }: { count: number; seed: number; asOfShare: number }) {
  let state = seed;
  const random = () => (state = (state * 16807) % 2147483647) / 2147483647;
  const days = weekdays('2025-01-06', count);
  const dates: number[] = [];
  const values: number[] = [];
  let level = 100;
  for (const day of days) {
    const roll = random();
    if (roll < 0.05) continue; // a missing day
    if (roll < 0.6) level = Math.round(level * Math.exp(0.02 * (random() - 0.5)) * 100) / 100;
    const odd = random();
    const value = odd < 0.03 ? 0 : odd < 0.05 ? -level : odd < 0.06 ? Infinity : level;
    dates.push(day);
    values.push(value);
    if (random() < 0.05) {
      dates.push(day); // a second row on the same date
      values.push(level + 1);
    }
  }
  const bench = days.map((_, i) => 1000 + 10 * Math.sin(i + seed));
  const benchmarks = frameOfArrays([{ id: 'BM1', dates: days, values: bench }]);
  const series = seriesAt(frameOfArrays([{ id: 'F1', dates, values }]), 0);
  const asOf = days.length === 0 ? 0 : days[0] + Math.floor(asOfShare * (days[days.length - 1] - days[0]));
  return { series, context: contextFor({ asOf, benchmark: seriesAt(benchmarks, 0), benchmarks }) };
}

/** The plain forms: the first row of each date up to the as-of with a positive value. */
function positiveFirstRows(series: SeriesSlice, asOf: number): number[] {
  const rows: number[] = [];
  for (let i = 0; i < series.dates.length; i++) {
    if (series.dates[i] > asOf) break;
    if ((i === 0 || series.dates[i] !== series.dates[i - 1]) && series.values[i] > 0) rows.push(i);
  }
  return rows;
}

describe('the quicker scans of the checks', () => {
  it('repeatsAValue is true exactly when two consecutive positive first rows have one value', () => {
    fc.assert(
      fc.property(history, (spec) => {
        const { series, context } = build(spec);
        const rows = positiveFirstRows(series, context.asOf);
        const plain = rows.some((row, k) => k > 0 && series.values[row] === series.values[rows[k - 1]]);
        expect(repeatsAValue(series, context.asOf)).toBe(plain);
      }),
      { numRuns: 300 },
    );
  });

  it('logChanges gives ln(v[rows[k]] / v[rows[k − 1]]) bit for bit, read from the model or computed', () => {
    fc.assert(
      fc.property(history, (spec) => {
        const { series, context } = build(spec);
        const rows = positiveFirstRows(series, context.asOf);
        if (rows.length < 2) return;
        const plain = rows.slice(1).map((row, k) => Math.log(series.values[row] / series.values[rows[k]]));
        const changes = Array.from(logChanges(series, rows, residualMoves(series, context)));
        expect(changes.every((change, k) => Object.is(change, plain[k]))).toBe(true);
      }),
      { numRuns: 300 },
    );
  });

  it('future_date and late_series find the rows after the as-of and the last one before it as a full scan does', () => {
    fc.assert(
      fc.property(history, (spec) => {
        const { series, context } = build(spec);
        const after = Array.from(series.dates).filter((day) => day > context.asOf);
        const future = futureDate.run(series, context, {});
        expect(future.length).toBe(after.length > 0 ? 1 : 0);
        if (after.length > 0) expect(future[0].evidence.count).toBe(after.length);
        let lastRow = -1;
        for (let i = 0; i < series.dates.length && series.dates[i] <= context.asOf; i++) lastRow = i;
        const late = lateSeries.run(series, { ...context, feedLatest: context.asOf + 30 }, lateSeries.defaults);
        expect(late.length).toBe(lastRow < 0 ? 0 : 1);
        if (lastRow >= 0) expect(late[0].evidence.latest_line).toBe(series.lines[lastRow]);
      }),
      { numRuns: 300 },
    );
  });

  it('off_calendar_date reads the calendar\'s flags as isBusinessDay answers, inside the table and beyond it', () => {
    const calendars = new BusinessCalendars();
    for (const day of weekdays('2025-01-06', 400)) if (day % 7 === 2) calendars.addHoliday('HOLIDAYS', day);
    // Days around 1900 and 2200 as well, where isBusinessDay leaves its table.
    const day = fc.oneof(fc.integer({ min: 20090, max: 20500 }), fc.integer({ min: -25580, max: -25560 }), fc.integer({ min: 84000, max: 84020 }));
    fc.assert(
      fc.property(fc.constantFrom(undefined, 'HOLIDAYS'), fc.array(day, { maxLength: 60 }), (calendar, days) => {
        const dates = [...days].sort((a, b) => a - b);
        const series = seriesAt(frameOfArrays([{ id: 'F1', dates, values: dates.map(() => 100) }]), 0);
        const context = contextFor({ calendars, master: calendar === undefined ? undefined : master('F1', { calendar }) });
        const found = offCalendarDate.run(series, context, {}).map((finding) => finding.start);
        const plain = [...new Set(dates)].filter((d) => !calendars.isBusinessDay(calendar, d)).map((d) => isoDate(d));
        expect(found).toEqual(plain);
      }),
      { numRuns: 300 },
    );
  });

  it('a gap holds a business day exactly when the business days in (from, to − 1] number one or more', () => {
    const calendars = new BusinessCalendars();
    for (const day of weekdays('2025-01-06', 400)) if (day % 11 === 0) calendars.addHoliday('HOLIDAYS', day);
    fc.assert(
      fc.property(fc.constantFrom(undefined, 'HOLIDAYS'), fc.integer({ min: 20000, max: 20700 }), fc.integer({ min: 1, max: 12 }), (calendar, from, width) => {
        const to = from + width;
        expect(calendars.businessDayDistance(calendar, from, to - 1) > 0).toBe(calendars.businessDaysBetween(calendar, from, to).length > 0);
      }),
      { numRuns: 500 },
    );
  });
});
