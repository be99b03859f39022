import { describe, expect, it } from 'vitest';
import { epochDay } from '../../src/calendar/days.js';
import type { CorporateActionRecord } from '../../src/ingest/records.js';
import { adjustForCorporateActions } from '../../src/series/adjust.js';
import { findSeries, frameFromSeries } from '../../src/series/frame.js';

const day = (d: number) => epochDay(2026, 6, d);
const action = (series_id: string, ex: number, kind: 'split' | 'distribution', value: number): CorporateActionRecord => ({
  series_id,
  ex_date: ex,
  kind,
  value,
  line: 2,
});

function returnsOf(values: ArrayLike<number>): number[] {
  const returns: number[] = [];
  for (let i = 1; i < values.length; i++) returns.push(values[i] / values[i - 1] - 1);
  return returns;
}

describe('adjustForCorporateActions', () => {
  it('a split of 10 new units per old unit leaves the returns of one unit held throughout', () => {
    const frame = frameFromSeries([{ id: 'A', dates: [day(11), day(12), day(15), day(16)], values: [100, 102, 10.3, 10.4] }]);
    const adjusted = findSeries(adjustForCorporateActions(frame, [action('A', day(15), 'split', 10)]), 'A')!;
    // By definition: 10 new units at 10.3 are worth 103 against one old unit at 102.
    const expected = [102 / 100 - 1, 103 / 102 - 1, 10.4 / 10.3 - 1];
    returnsOf(adjusted.values).forEach((r, i) => expect(r).toBeCloseTo(expected[i], 12));
    expect([...adjusted.values.subarray(2)]).toEqual([10.3, 10.4]);
  });

  it('a distribution is reinvested at the ex-date NAV, giving the total return', () => {
    const frame = frameFromSeries([{ id: 'B', dates: [day(11), day(12), day(15)], values: [50, 51, 49] }]);
    const adjusted = findSeries(adjustForCorporateActions(frame, [action('B', day(15), 'distribution', 2.5)]), 'B')!;
    // Total return on the ex-date: (NAV + distribution) / previous NAV − 1 = 51.5 / 51 − 1.
    const returns = returnsOf(adjusted.values);
    expect(returns[0]).toBeCloseTo(51 / 50 - 1, 12);
    expect(returns[1]).toBeCloseTo(51.5 / 51 - 1, 12);
  });

  it('leaves other series, and actions without an ex-date NAV, alone', () => {
    const frame = frameFromSeries([
      { id: 'A', dates: [day(11), day(12)], values: [100, 101] },
      { id: 'C', dates: [day(11), day(12)], values: [20, 21] },
    ]);
    const adjusted = adjustForCorporateActions(frame, [action('A', day(20), 'split', 2), action('Z', day(12), 'split', 2)]);
    expect([...adjusted.values]).toEqual([100, 101, 20, 21]);
    expect(frame.values[0]).toBe(100);
  });
});
