import { describe, expect, it } from 'vitest';
import { BusinessCalendars } from '../../src/calendar/business-calendar.js';
import type { FeedContext } from '../../src/checks/check.js';
import { isinCheckDigit, isValidIsin } from '../../src/checks/isin.js';
import { unknownSeries } from '../../checks/unknown-series.js';
import { invalidIdentifier } from '../../checks/invalid-identifier.js';
import { benchmarkMismatch } from '../../checks/benchmark-mismatch.js';
import { seriesAt } from '../../src/series/frame.js';
import { SeededRandom as Random } from '../../src/random.js';
import { contextFor, day, frameOf, frameOfArrays, iso, master, weekdays } from './helpers.js';

function feed(overrides: Partial<FeedContext>): FeedContext {
  return {
    asOf: day('2026-03-13'),
    calendars: new BusinessCalendars(),
    nav: frameOf([]),
    benchmarks: undefined,
    master: undefined,
    previous: undefined,
    rejected: [],
    ...overrides,
  };
}

describe('unknown_series', () => {
  it('reports NAV series the master lacks, benchmarks without levels and gaps in benchmark levels', () => {
    const week: Array<[string, number]> = [['2026-03-09', 10], ['2026-03-10', 10.1], ['2026-03-11', 10.2], ['2026-03-12', 10.3], ['2026-03-13', 10.4]];
    const nav = frameOf([{ id: 'F1', rows: week }, { id: 'F9', rows: week }]);
    const benchmarks = frameOf([{ id: 'BM1', rows: [['2026-03-09', 100], ['2026-03-12', 101], ['2026-03-13', 102]] }]);
    const findings = unknownSeries.run(
      feed({ nav, benchmarks, master: [master('F1', { benchmark_id: 'BM1' }), master('F2', { benchmark_id: 'BM7', line: 3 })] }),
      unknownSeries.defaults,
    );
    expect(findings.map((f) => [f.series_id, f.evidence.kind, f.start, f.end, f.severity, f.key])).toEqual([
      ['F9', 'not_in_master', '2026-03-09', '2026-03-13', 'warning', 'unknown_series|F9|not_in_master'],
      ['F2', 'benchmark_without_levels', null, null, 'warning', 'unknown_series|F2|benchmark_without_levels|BM7'],
      ['BM1', 'benchmark_gap', '2026-03-10', '2026-03-11', 'warning', 'unknown_series|BM1|benchmark_gap|2026-03-10'],
    ]);
  });
});

describe('invalid_identifier', () => {
  it('computes the ISO 6166 check digit', () => {
    const body = 'QZ123ABC456';
    expect(isValidIsin(body + isinCheckDigit(body))).toBe(true);
    expect(isValidIsin(body + ((isinCheckDigit(body) + 1) % 10))).toBe(false);
    // worked by hand: Q=26, Z=35, A=10, B=11, C=12 → "2635123101112456"; doubling every
    // second digit from the right and summing digits gives 42, so the check digit is 8
    expect(isinCheckDigit('QZ123ABC456')).toBe(8);
  });

  it('flags ISIN-shaped ids with a wrong check digit and currencies outside ISO 4217', () => {
    const nav = frameOf([{ id: 'QZ123ABC4560', rows: [['2026-03-09', 10]] }, { id: 'QZ123ABC4568', rows: [['2026-03-09', 10]] }, { id: 'HOUSE01', rows: [['2026-03-09', 10]] }]);
    const records = [master('QZ123ABC4560', { currency: 'EUR' }), master('QZ123ABC4568', { currency: 'GBX', line: 3 }), master('HOUSE01', { currency: 'usd', line: 4 })];
    const findings = invalidIdentifier.run(feed({ nav, master: records }), {});
    expect(findings.map((f) => [f.series_id, f.evidence.kind, f.severity, f.key])).toEqual([
      ['QZ123ABC4560', 'isin_check_digit', 'error', 'invalid_identifier|QZ123ABC4560|isin'],
      ['QZ123ABC4568', 'currency', 'error', 'invalid_identifier|QZ123ABC4568|currency|GBX'],
    ]);
    expect(findings[0].evidence.expected_check_digit).toBe(8);
  });
});

describe('benchmark_mismatch', () => {
  // Two indices sharing a market factor (R² between them about 0.5) and a bond index.
  const random = new Random(21);
  const dates = weekdays('2024-01-01', 400);
  const levels = { EQ_A: [1000], EQ_B: [1000], BOND: [1000] };
  // `moved` follows EQ_A like `active` for 200 days, then EQ_B: a fund re-pointed at another
  // index's universe whose master still names the old one.
  const MOVED_AT = 200;
  const fundLevels = { index: [100], active: [50], moved: [50] };
  for (let t = 1; t < dates.length; t++) {
    const market = 0.009 * random.normal();
    const a = market + 0.006 * random.normal();
    const b = market + 0.006 * random.normal();
    levels.EQ_A.push(levels.EQ_A[t - 1] * Math.exp(a));
    levels.EQ_B.push(levels.EQ_B[t - 1] * Math.exp(b));
    levels.BOND.push(levels.BOND[t - 1] * Math.exp(0.0025 * random.normal()));
    fundLevels.index.push(fundLevels.index[t - 1] * Math.exp(a + 0.0002 * random.normal()));
    const own = 0.004 * random.normal();
    fundLevels.active.push(fundLevels.active[t - 1] * Math.exp(0.9 * a + own));
    fundLevels.moved.push(fundLevels.moved[t - 1] * Math.exp(0.9 * (t < MOVED_AT ? a : b) + own));
  }
  const benchmarks = frameOfArrays(Object.entries(levels).map(([id, values]) => ({ id, dates, values })));
  const run = (fund: number[], assigned: string, category: string) => {
    const series = seriesAt(frameOfArrays([{ id: 'F1', dates, values: fund }]), 0);
    const context = contextFor({
      asOf: dates[dates.length - 1],
      master: master('F1', { benchmark_id: assigned, category }),
      benchmark: seriesAt(benchmarks, benchmarks.indexById.get(assigned)!),
      benchmarks,
    });
    return benchmarkMismatch.run(series, context, benchmarkMismatch.defaults);
  };

  it('flags an index fund mapped to a sibling index, naming the one it tracks', () => {
    const [finding] = run(fundLevels.index, 'EQ_B', 'Equity Index');
    expect(finding).toMatchObject({ severity: 'error', key: 'benchmark_mismatch|F1|EQ_B|EQ_A', evidence: { better_benchmark: 'EQ_A', index_fund: true } });
    expect(finding.evidence.better_r2 as number).toBeGreaterThan(0.99);
    expect(finding.evidence.assigned_r2 as number).toBeLessThan(0.8);
  });

  it('flags an active fund mapped to a sibling equity index that fits it far worse (R² about 0.4 against 0.86)', () => {
    // Expected R²s from the construction: var(a) = 0.009² + 0.006²; fund = 0.9a + 0.004 noise.
    const [finding] = run(fundLevels.active, 'EQ_B', 'Equity');
    expect(finding).toMatchObject({ key: 'benchmark_mismatch|F1|EQ_B|EQ_A', evidence: { better_benchmark: 'EQ_A', index_fund: false } });
    expect(finding.message).toContain('poorly');
  });

  it('says since when a sibling index fits better, for a fund that moved to it mid-history', () => {
    const findings = run(fundLevels.moved, 'EQ_A', 'Equity');
    expect(findings).toHaveLength(1);
    expect(findings[0]).toMatchObject({ key: 'benchmark_mismatch|F1|EQ_A|EQ_B', end: iso(dates[dates.length - 1]), evidence: { better_benchmark: 'EQ_B' } });
    // Judged from quarter (13-week) starts: the start lies within a quarter of the move.
    const start = dates.indexOf(day(findings[0].start!));
    expect(Math.abs(start - MOVED_AT)).toBeLessThanOrEqual(65);
    expect(findings[0].message).toMatch(/^F1 fits EQ_B better than its assigned benchmark EQ_A since \d{4}-\d{2} /);
    expect(findings[0].evidence.better_r2 as number).toBeGreaterThan(findings[0].evidence.assigned_r2 as number);
  });

  it('flags an active fund mapped to a bond index, but not one mapped to a loosely related equity index', () => {
    const [finding] = run(fundLevels.active, 'BOND', 'Equity');
    expect(finding).toMatchObject({ key: 'benchmark_mismatch|F1|BOND|EQ_A', evidence: { index_fund: false } });
    expect(finding.evidence.assigned_r2 as number).toBeLessThan(0.1);
    expect(run(fundLevels.active, 'EQ_A', 'Equity')).toEqual([]);
    expect(run(fundLevels.index, 'EQ_A', 'Equity Index')).toEqual([]);
  });
});
