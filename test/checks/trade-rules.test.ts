/** The trade rules added after the second universe, one small case each. */
import { describe, expect, it } from 'vitest';
import { BusinessCalendars } from '../../src/calendar/business-calendar.js';
import { runChecks } from '../../src/checks/run.js';
import { day, frameOf, frameOfArrays, master, weekdays } from './helpers.js';
import { formatIsoDate } from '../../src/calendar/days.js';

const rows = (dates: number[], start = 100, step = 0.003) => dates.map((d, i): [string, number] => [formatIsoDate(d), +(start * Math.exp(step * Math.sin(i))).toFixed(4)]);

describe('trade rules', () => {
  it('reads GBp (pence) as not an ISO currency, and eur as EUR', () => {
    const nav = frameOf([{ id: 'S1', rows: [['2026-03-02', 10]] }, { id: 'S2', rows: [['2026-03-02', 10]] }]);
    const findings = runChecks({ nav, master: [master('S1', { currency: 'GBp' }), master('S2', { currency: 'eur', line: 3 })], rejected: [], calendars: new BusinessCalendars(), asOf: day('2026-03-02') });
    expect(findings.filter((f) => f.check === 'invalid_identifier').map((f) => [f.series_id, f.evidence.currency])).toEqual([['S1', 'GBp']]);
  });

  it('reports a series a quarter behind a current feed as info (looks closed), and a week behind as an error', () => {
    const dates = weekdays('2026-01-05', 200);
    const nav = frameOf([
      { id: 'CURRENT', rows: rows(dates) },
      { id: 'CLOSED', rows: rows(dates.slice(0, 100)) },
      { id: 'LATE', rows: rows(dates.slice(0, 195)) },
    ]);
    const late = runChecks({ nav, rejected: [], calendars: new BusinessCalendars(), asOf: dates[199] }).filter((f) => f.check === 'late_series');
    expect(late.map((f) => [f.series_id, f.severity, f.evidence.looks_closed])).toEqual([['CLOSED', 'info', true], ['LATE', 'error', false]]);
  });

  it('takes a benchmark level missing on a holiday of a calendar the master uses for the index holiday, not a gap', () => {
    const calendars = new BusinessCalendars();
    calendars.addHoliday('vale', day('2026-03-04'));
    const dates = weekdays('2026-03-02', 10);
    const nav = frameOf([{ id: 'F1', rows: rows(dates) }, { id: 'F2', rows: rows(dates.filter((d) => d !== day('2026-03-04'))) }]);
    const benchDates = dates.filter((d) => d !== day('2026-03-04') && d !== day('2026-03-10'));
    const benchmarks = frameOfArrays([{ id: 'IDX', dates: benchDates, values: benchDates.map((_, i) => 1000 + i) }]);
    const findings = runChecks({
      nav, benchmarks, master: [master('F1', { benchmark_id: 'IDX' }), master('F2', { benchmark_id: 'IDX', calendar: 'vale', line: 3 })],
      rejected: [], calendars, asOf: dates[9],
    });
    expect(findings.filter((f) => f.check === 'unknown_series').map((f) => [f.series_id, f.start])).toEqual([['IDX', '2026-03-10']]);
  });

  it('finds a three-day stale run on a 4-decimal fund', () => {
    const dates = weekdays('2026-01-05', 120);
    const values = rows(dates, 50, 0.01);
    values[60][1] = values[59][1];
    values[61][1] = values[59][1];
    const findings = runChecks({ nav: frameOf([{ id: 'S', rows: values }]), rejected: [], calendars: new BusinessCalendars(), asOf: dates[119] });
    expect(findings.filter((f) => f.check === 'stale_value').map((f) => [f.start, f.end])).toEqual([[values[59][0], values[61][0]]]);
  });
});
