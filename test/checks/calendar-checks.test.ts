import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { BusinessCalendars } from '../../src/calendar/business-calendar.js';
import { missingDates } from '../../checks/missing-dates.js';
import { lateSeries } from '../../checks/late-series.js';
import { offCalendarDate } from '../../checks/off-calendar-date.js';
import { futureDate } from '../../checks/future-date.js';
import { contextFor, day, frameOfArrays, master, seriesOf } from './helpers.js';
import { seriesAt } from '../../src/series/frame.js';

const northCalendar = () => {
  const calendars = new BusinessCalendars();
  calendars.addHoliday('north', day('2026-03-09'));
  return calendars;
};

describe('missing_dates', () => {
  it('reports one finding per run of missing business days, ignoring weekends and the series’ holidays', () => {
    const series = seriesOf('S1', [
      ['2026-03-02', 10],
      ['2026-03-03', 10.1],
      // 03-04 and 03-05 missing: one run
      ['2026-03-06', 10.2],
      // weekend, then 03-09 is a holiday of calendar north
      ['2026-03-10', 10.3],
      ['2026-03-11', 10.4],
      // 03-12 missing: a second run
      ['2026-03-13', 10.5],
    ]);
    const context = contextFor({ calendars: northCalendar(), master: master('S1', { calendar: 'north' }) });
    const findings = missingDates.run(series, context, missingDates.defaults);
    expect(findings.map((f) => [f.start, f.end, f.severity, f.key])).toEqual([
      ['2026-03-04', '2026-03-05', 'warning', 'missing_dates|S1|2026-03-04'],
      ['2026-03-12', '2026-03-12', 'warning', 'missing_dates|S1|2026-03-12'],
    ]);
    expect(findings[0].evidence).toMatchObject({ missing_days: 2, before: { date: '2026-03-03', line: 3 }, after: { date: '2026-03-06', line: 4 } });
  });

  it('counts the holiday as missing when the series is on the default calendar', () => {
    const series = seriesOf('S1', [['2026-03-06', 1], ['2026-03-10', 1.01]]);
    const findings = missingDates.run(series, contextFor({ calendars: northCalendar() }), missingDates.defaults);
    expect(findings.map((f) => f.start)).toEqual(['2026-03-09']);
  });

  it('finds every run the plain listing of each gap between distinct dates finds, whatever the rows', () => {
    // The plain rule: every pair of consecutive distinct dates up to the as-of, the business
    // days strictly between them listed in full (the check skips consecutive days and weekends).
    const plainRuns = (dates: number[], asOf: number, calendars: BusinessCalendars) => {
      const runs: Array<[number, number, number]> = [];
      const kept = dates.filter((d, i) => d <= asOf && (i === 0 || d !== dates[i - 1]));
      for (let i = 1; i < kept.length && kept[i] <= asOf; i++) {
        const missing = calendars.businessDaysBetween('north', kept[i - 1], kept[i]);
        if (missing.length > 0) runs.push([missing[0], missing[missing.length - 1], missing.length]);
      }
      return runs;
    };
    const start = day('2026-01-01');
    const gaps = fc.array(fc.oneof({ weight: 6, arbitrary: fc.constant(1) }, { weight: 2, arbitrary: fc.constant(0) }, { weight: 3, arbitrary: fc.integer({ min: 2, max: 9 }) }), { maxLength: 120 });
    fc.assert(
      fc.property(gaps, fc.integer({ min: 0, max: 400 }), (steps, asOfOffset) => {
        const dates: number[] = [];
        let d = start;
        for (const gap of steps) dates.push((d += gap));
        const calendars = northCalendar();
        const series = seriesAt(frameOfArrays([{ id: 'S1', dates, values: dates.map((_, i) => 10 + i / 100) }]), 0);
        const asOf = start + asOfOffset;
        const context = contextFor({ asOf, calendars, master: master('S1', { calendar: 'north' }) });
        const found = missingDates.run(series, context, missingDates.defaults).map((f) => [day(f.start!), day(f.end!), f.evidence.missing_days]);
        expect(found).toEqual(plainRuns(dates, asOf, calendars));
      }),
      { numRuns: 300 },
    );
  });
});

describe('late_series', () => {
  const series = seriesOf('S1', [['2026-03-09', 10], ['2026-03-10', 10.1]]);

  it('flags a latest value more business days behind the as-of than allowed', () => {
    const [finding] = lateSeries.run(series, contextFor({ asOf: day('2026-03-13') }), lateSeries.defaults);
    expect(finding).toMatchObject({
      check: 'late_series',
      severity: 'error',
      start: '2026-03-11',
      end: '2026-03-13',
      key: 'late_series|S1|2026-03-10',
      evidence: { latest_date: '2026-03-10', lag_business_days: 3, latest_line: 3 },
    });
  });

  it('allows one business day of publication lag, and weekends do not count', () => {
    expect(lateSeries.run(series, contextFor({ asOf: day('2026-03-11') }), lateSeries.defaults)).toEqual([]);
    const friday = seriesOf('S1', [['2026-03-13', 10]]);
    expect(lateSeries.run(friday, contextFor({ asOf: day('2026-03-16') }), lateSeries.defaults)).toEqual([]);
    expect(lateSeries.run(friday, contextFor({ asOf: day('2026-03-17') }), lateSeries.defaults)).toHaveLength(1);
  });

  it('keeps the same key tomorrow while the series stays late', () => {
    const today = lateSeries.run(series, contextFor({ asOf: day('2026-03-13') }), lateSeries.defaults)[0];
    const tomorrow = lateSeries.run(series, contextFor({ asOf: day('2026-03-16') }), lateSeries.defaults)[0];
    expect(tomorrow.key).toBe(today.key);
    expect(tomorrow.evidence.lag_business_days).toBe(4);
  });
});

describe('off_calendar_date', () => {
  it('flags weekend and holiday dates, one finding per date', () => {
    const series = seriesOf('S1', [['2026-03-06', 10], ['2026-03-07', 10], ['2026-03-09', 10.1], ['2026-03-10', 10.2]]);
    const context = contextFor({ calendars: northCalendar(), master: master('S1', { calendar: 'north' }) });
    const findings = offCalendarDate.run(series, context, {});
    expect(findings.map((f) => [f.start, f.severity, f.key, f.evidence.reason, f.evidence.line])).toEqual([
      ['2026-03-07', 'warning', 'off_calendar_date|S1|2026-03-07', 'weekend', 3],
      ['2026-03-09', 'warning', 'off_calendar_date|S1|2026-03-09', 'holiday', 4],
    ]);
    expect(findings[0].message).toContain('Saturday');
  });
});

describe('future_date', () => {
  it('gathers every value dated after the as-of into one finding', () => {
    const series = seriesOf('S1', [['2026-03-12', 10], ['2026-03-13', 10.1], ['2026-03-16', 10.2], ['2026-03-17', 10.3]]);
    const findings = futureDate.run(series, contextFor({ asOf: day('2026-03-13') }), {});
    expect(findings).toHaveLength(1);
    expect(findings[0]).toMatchObject({ severity: 'error', start: '2026-03-16', end: '2026-03-17', key: 'future_date|S1|2026-03-16', evidence: { count: 2 } });
  });
});
