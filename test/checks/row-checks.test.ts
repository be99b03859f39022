import { describe, expect, it } from 'vitest';
import { BusinessCalendars } from '../../src/calendar/business-calendar.js';
import type { FeedContext } from '../../src/checks/check.js';
import { duplicateRow } from '../../checks/duplicate-row.js';
import { duplicateConflict } from '../../checks/duplicate-conflict.js';
import { nonPositiveValue } from '../../checks/non-positive-value.js';
import { staleValue } from '../../checks/stale-value.js';
import { restatedValue } from '../../checks/restated-value.js';
import { droppedRows } from '../../checks/dropped-rows.js';
import { unparseableRow } from '../../checks/unparseable-row.js';
import { seriesAt } from '../../src/series/frame.js';
import { SeededRandom as Random } from '../../src/random.js';
import { contextFor, day, frameOf, iso, master, seriesOf, weekdays } from './helpers.js';

describe('duplicate_row and duplicate_conflict', () => {
  const series = seriesOf('S1', [
    ['2026-03-02', 10],
    ['2026-03-03', 10.1],
    ['2026-03-03', 10.1],
    ['2026-03-04', 10.2],
    ['2026-03-04', 10.25],
  ]);

  it('tells an identical repeat from a conflicting one', () => {
    const same = duplicateRow.run(series, contextFor(), {});
    const conflict = duplicateConflict.run(series, contextFor(), {});
    expect(same.map((f) => [f.start, f.severity, f.key])).toEqual([['2026-03-03', 'warning', 'duplicate_row|S1|2026-03-03']]);
    expect(conflict.map((f) => [f.start, f.severity, f.key])).toEqual([['2026-03-04', 'error', 'duplicate_conflict|S1|2026-03-04']]);
    expect(conflict[0].evidence.rows).toEqual([{ value: 10.2, line: 5 }, { value: 10.25, line: 6 }]);
  });
});

describe('non_positive_value', () => {
  it('flags zero and negative NAVs as critical', () => {
    const series = seriesOf('S1', [['2026-03-02', 10], ['2026-03-03', 0], ['2026-03-04', -10.2]]);
    const findings = nonPositiveValue.run(series, contextFor(), {});
    expect(findings.map((f) => [f.start, f.severity, f.key, f.evidence.value])).toEqual([
      ['2026-03-03', 'critical', 'non_positive_value|S1|2026-03-03', 0],
      ['2026-03-04', 'critical', 'non_positive_value|S1|2026-03-04', -10.2],
    ]);
  });
});

describe('stale_value', () => {
  const moving = (from: number, count: number) => Array.from({ length: count }, (_, i) => from + i * 0.0731 * (i % 2 ? 1 : -0.6));
  const rows = (values: number[]): Array<[string, number]> => {
    const dates: string[] = [];
    for (let d = day('2026-03-02'); dates.length < values.length; d++) {
      const weekday = ((d + 3) % 7) + 1;
      if (weekday <= 5) dates.push(new Date(d * 86_400_000).toISOString().slice(0, 10));
    }
    return values.map((v, i) => [dates[i], v]);
  };

  it('flags the same NAV on four business days in a row, from its first appearance', () => {
    const values = [...moving(100, 10), 101.5, 101.5, 101.5, 101.5, ...moving(102, 10)];
    const series = seriesOf('S1', rows(values));
    const findings = staleValue.run(series, contextFor(), staleValue.defaults);
    expect(findings.map((f) => [f.start, f.end, f.severity, f.key, f.evidence.business_days])).toEqual([
      ['2026-03-16', '2026-03-19', 'warning', 'stale_value|S1|2026-03-16', 4],
    ]);
  });

  it('finds three repeats by default (not with min_days 4), and skips stable-value and smoothly accruing funds', () => {
    const three = [...moving(100, 10), 101.5, 101.5, 101.5, ...moving(102, 10)];
    expect(staleValue.run(seriesOf('S1', rows(three)), contextFor(), staleValue.defaults).map((f) => f.evidence.business_days)).toEqual([3]);
    expect(staleValue.run(seriesOf('S1', rows(three)), contextFor(), { ...staleValue.defaults, min_days: 4 })).toEqual([]);
    const frozen = rows([...moving(100, 10), ...Array(8).fill(1), ...moving(102, 10)]);
    expect(staleValue.run(seriesOf('S1', frozen), contextFor({ master: master('S1', { stable_value: true }) }), staleValue.defaults)).toEqual([]);
    // 10.0000, 10.0001 … rounded accrual repeats a value for days at a time but only ever rises
    const accruing = Array.from({ length: 60 }, (_, i) => Math.round((10 + i * 0.00003) * 1e4) / 1e4);
    expect(staleValue.run(seriesOf('MM1', rows(accruing)), contextFor(), staleValue.defaults)).toEqual([]);
  });

  it('asks coarsely rounded series for a longer run', () => {
    // a 2-decimal NAV of about 10 moving 0.1 % a day repeats itself on many days by rounding alone
    const random = new Random(3);
    let nav = 10;
    const coarse = Array.from({ length: 250 }, () => Math.round((nav += 0.01 * random.normal()) * 100) / 100);
    const withRun = (length: number) => {
      const values = [...coarse.slice(0, 120), ...Array(length).fill(11.11), ...coarse.slice(120)];
      const dates = weekdays('2025-06-02', values.length);
      return seriesOf('B1', values.map((v, i) => [iso(dates[i]), v]));
    };
    expect(staleValue.run(withRun(9), contextFor(), staleValue.defaults)).toEqual([]);
    const [finding] = staleValue.run(withRun(12), contextFor(), staleValue.defaults);
    expect(finding).toMatchObject({ start: '2025-11-17', end: '2025-12-02', evidence: { business_days: 12 } });
    // The run length asked for must agree with the two verdicts: more than 9 days, at most 12.
    expect(finding.evidence.required_days).toBeGreaterThan(9);
    expect(finding.evidence.required_days).toBeLessThanOrEqual(12);
  });
});

describe('restated_value', () => {
  it('reports runs of historical values that changed since the previous snapshot', () => {
    const previous = seriesOf('S1', [['2026-03-02', 10], ['2026-03-03', 10.1], ['2026-03-04', 10.2], ['2026-03-05', 10.3], ['2026-03-06', 10.4]]);
    const today = seriesOf('S1', [['2026-03-02', 10], ['2026-03-03', 10.15], ['2026-03-04', 10.25], ['2026-03-05', 10.3], ['2026-03-06', 10.41], ['2026-03-09', 10.5]]);
    const findings = restatedValue.run(today, contextFor({ previous }), restatedValue.defaults);
    expect(findings.map((f) => [f.start, f.end, f.severity, f.key, f.evidence.count])).toEqual([
      ['2026-03-03', '2026-03-04', 'warning', 'restated_value|S1|2026-03-03', 2],
      ['2026-03-06', '2026-03-06', 'warning', 'restated_value|S1|2026-03-06', 1],
    ]);
    expect(findings[0].evidence.restated).toEqual([
      { date: '2026-03-03', previous: 10.1, today: 10.15, line: 3 },
      { date: '2026-03-04', previous: 10.2, today: 10.25, line: 4 },
    ]);
    expect(restatedValue.run(today, contextFor({ previous }), { tolerance: 0.01 })).toHaveLength(0);
  });
});

describe('dropped_rows', () => {
  const feed = (nav: ReturnType<typeof frameOf>, previous: ReturnType<typeof frameOf>): FeedContext => ({
    asOf: day('2026-03-10'),
    calendars: new BusinessCalendars(),
    nav,
    previous,
    benchmarks: undefined,
    master: undefined,
    rejected: [],
  });

  it('reports lost dates and lost series, but not rows that rolled out of the window', () => {
    const previous = frameOf([
      { id: 'S1', rows: [['2026-02-27', 9.9], ['2026-03-02', 10], ['2026-03-03', 10.1], ['2026-03-04', 10.2], ['2026-03-05', 10.3]] },
      { id: 'S2', rows: [['2026-03-02', 5]] },
    ]);
    const nav = frameOf([{ id: 'S1', rows: [['2026-03-02', 10], ['2026-03-05', 10.3], ['2026-03-06', 10.4]] }]);
    const findings = droppedRows.run(feed(nav, previous), {});
    expect(findings.map((f) => [f.series_id, f.start, f.end, f.severity, f.key])).toEqual([
      ['S1', '2026-03-03', '2026-03-04', 'warning', 'dropped_rows|S1|2026-03-03'],
      ['S2', '2026-03-02', '2026-03-02', 'error', 'dropped_rows|S2|series'],
    ]);
  });
});

describe('unparseable_row', () => {
  it('reports each rejected row with a key that survives the row moving to another line', () => {
    const context = (line: number): FeedContext => ({
      asOf: day('2026-03-10'),
      calendars: new BusinessCalendars(),
      nav: frameOf([]),
      previous: undefined,
      benchmarks: undefined,
      master: undefined,
      rejected: [{ file: 'nav.csv', line, raw: 'S1,2026-02-30,10.5', reason: 'date is not a valid date' }],
    });
    const [today] = unparseableRow.run(context(17), {});
    const [tomorrow] = unparseableRow.run(context(18), {});
    expect(today).toMatchObject({ severity: 'error', series_id: null, start: null, evidence: { file: 'nav.csv', line: 17, raw: 'S1,2026-02-30,10.5' } });
    expect(today.message).toBe('Line 17 of nav.csv could not be read (date is not a valid date) and was left out.');
    expect(tomorrow.key).toBe(today.key);
    // The first 16 hex digits of SHA-256("S1,2026-02-30,10.5"), from coreutils:
    // printf 'S1,2026-02-30,10.5' | sha256sum
    expect(today.key).toBe('unparseable_row|*|6e03770abbff8149');
  });
});

describe('frame slices', () => {
  it('keeps duplicate rows adjacent in file order, which the duplicate checks rely on', () => {
    const frame = frameOf([{ id: 'S1', rows: [['2026-03-03', 2], ['2026-03-02', 1], ['2026-03-03', 3]] }]);
    expect(Array.from(seriesAt(frame, 0).values)).toEqual([1, 2, 3]);
  });
});
