import { describe, expect, it } from 'vitest';
import { BusinessCalendars } from '../../src/calendar/business-calendar.js';
import { runChecks } from '../../src/checks/run.js';
import { CHECK_IDS, CHECKS } from '../../src/checks/registry.js';
import { CheckSettingsError, parseCheckSettings, SettingsResolver } from '../../src/checks/settings.js';
import { day, frameOf, master } from './helpers.js';

describe('the registry', () => {
  it('holds every check the interface names (interface.md, "Check identifiers") plus invalid_identifier, each once and documented', () => {
    const required = ['missing_dates', 'late_series', 'stale_value', 'split_like_jump', 'spike_reversal', 'return_outlier', 'date_shift',
      'off_calendar_date', 'future_date', 'duplicate_conflict', 'duplicate_row', 'non_positive_value', 'unparseable_row', 'unknown_series',
      'restated_value', 'dropped_rows', 'benchmark_mismatch', 'vendor_inconsistent', 'invalid_identifier'];
    expect([...CHECK_IDS].sort()).toEqual([...required].sort());
    expect(new Set(CHECK_IDS).size).toBe(CHECK_IDS.length);
    for (const check of CHECKS) expect(check.purpose.length).toBeGreaterThan(20);
  });
});

describe('check settings', () => {
  it('applies defaults, then the run, then the category, then the series', () => {
    const settings = parseCheckSettings({
      run: { stale_value: { min_days: 6 }, late_series: { max_lag_business_days: 2 } },
      categories: { 'money market': { stale_value: { enabled: false, min_days: 9 } } },
      series: { S1: { stale_value: { min_days: 3 } } },
    });
    const resolver = new SettingsResolver(settings);
    const stale = CHECKS.find((c) => c.id === 'stale_value')!;
    expect(resolver.resolve(stale, null, 'S0')).toEqual({ enabled: true, params: { min_days: 6, max_chance: 0.01, accrual_max_daily: 0.0005 } });
    expect(resolver.resolve(stale, 'Money Market', 'S0')).toEqual({ enabled: false, params: { min_days: 9, max_chance: 0.01, accrual_max_daily: 0.0005 } });
    expect(resolver.resolve(stale, 'Money Market', 'S1')).toEqual({ enabled: false, params: { min_days: 3, max_chance: 0.01, accrual_max_daily: 0.0005 } });
  });

  it('resolves a check the same however often and in whatever order categories, spellings and series are asked', () => {
    // The resolver keeps its answers by category as spelled; a fresh resolver per question is the plain form.
    const settings = parseCheckSettings({
      run: { stale_value: { min_days: 6 } },
      categories: { 'money market': { stale_value: { enabled: false, min_days: 9 } }, equity: { late_series: { max_lag_business_days: 3 } } },
      series: { S1: { stale_value: { min_days: 3 } }, S2: { late_series: { enabled: false } } },
    });
    const kept = new SettingsResolver(settings);
    const categories = [null, undefined, '', 'Money Market', ' money market ', 'MONEY MARKET', 'Equity', 'equity', 'bond'];
    for (let round = 0; round < 3; round++) {
      for (const category of round === 1 ? [...categories].reverse() : categories) {
        for (const seriesId of ['S0', 'S1', 'S2', null]) {
          for (const check of CHECKS) expect(kept.resolve(check, category, seriesId)).toEqual(new SettingsResolver(settings).resolve(check, category, seriesId));
        }
      }
    }
  });

  it('refuses unknown checks, unknown parameters and wrong types, naming the key path', () => {
    expect(() => parseCheckSettings({ run: { stale_values: { min_days: 4 } } })).toThrow(/unknown key run\.stale_values \(check ids: missing_dates, /);
    expect(() => parseCheckSettings({ series: { S1: { stale_value: { min_dayz: 4 } } } })).toThrow(
      'Invalid check settings: unknown key series.S1.stale_value.min_dayz (parameters of stale_value: enabled, min_days, max_chance, accrual_max_daily).',
    );
    expect(() => parseCheckSettings({ categories: { Equity: { late_series: { max_lag_business_days: 'two' } } } })).toThrow(
      /categories\.Equity\.late_series\.max_lag_business_days: /,
    );
    expect(() => parseCheckSettings({ checks: {} })).toThrow(CheckSettingsError);
  });
});

describe('runChecks', () => {
  const calendars = new BusinessCalendars();
  const input = {
    nav: frameOf([
      { id: 'S2', rows: [['2026-03-02', 10], ['2026-03-02', 10.5], ['2026-03-04', 10.2]] },
      { id: 'S1', rows: [['2026-03-02', 10], ['2026-03-03', 0], ['2026-03-05', 10.3]] },
    ]),
    master: [master('S1'), master('S2')],
    rejected: [{ file: 'nav.csv', line: 9, raw: 'S3,x,1', reason: 'date is not a valid date' }],
    calendars,
    asOf: day('2026-03-06'),
  };

  it('runs series and feed checks and sorts findings by series, date, check', () => {
    const findings = runChecks(input);
    expect(findings.map((f) => [f.series_id, f.start, f.check])).toEqual([
      ['S1', '2026-03-03', 'non_positive_value'],
      ['S1', '2026-03-04', 'missing_dates'],
      ['S2', '2026-03-02', 'duplicate_conflict'],
      ['S2', '2026-03-03', 'missing_dates'],
      ['S2', '2026-03-05', 'late_series'],
      [null, null, 'unparseable_row'],
    ]);
    expect(runChecks(input)).toEqual(findings);
  });

  it('honours per-series settings and validates them before running', () => {
    const quiet = runChecks(input, { series: { S2: { late_series: { max_lag_business_days: 3, max_as_of_lag_business_days: 3 }, missing_dates: { enabled: false } } } });
    expect(quiet.filter((f) => f.series_id === 'S2').map((f) => f.check)).toEqual(['duplicate_conflict']);
    expect(() => runChecks(input, { run: { no_such_check: {} } } as never)).toThrow(/unknown key run\.no_such_check/);
  });
});
