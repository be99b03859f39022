import { describe, expect, it } from 'vitest';
import { DEFAULT_METHODOLOGY, MetricCalculator, withChanges } from '../../src/metrics/index.js';
import { TargetSums } from '../../src/metrics/moments.js';
import { compound, frame, masterRecord, monthEnds } from './builders.js';

/**
 * The boundary of the downside count: a return exactly equal to the minimum acceptable return
 * is not a shortfall. Sortino and Price (1994) sum the squared shortfalls of the periods that fall
 * below the MAR; a period at the MAR adds nothing to the sum and, with dd_denominator: below, is
 * not counted in the divisor either (docs/methodology.md: "the number of periods below the MAR").
 * Expected values are computed here from the returns with plain arithmetic.
 */
// Twelve monthly returns, four of them exactly 0 (the level does not move, so the return is exactly 0).
const RETURNS = [0.012, 0, -0.021, 0.034, 0, -0.013, 0.027, 0, -0.031, 0.018, 0, -0.007];
const DATES = monthEnds(2025, 6, 13);

describe('a return equal to the minimum acceptable return', () => {
  it('is not counted below the target', () => {
    const sums = new TargetSums();
    for (const r of RETURNS) sums.add(r, 0);
    expect(sums.countBelow).toBe(4); // −0.021, −0.013, −0.031, −0.007
    expect(sums.sumSqBelow).toBeCloseTo(0.021 ** 2 + 0.013 ** 2 + 0.031 ** 2 + 0.007 ** 2, 15);
  });

  it('downside deviation with dd_denominator: below divides by the four periods strictly below, not the eight at or below', () => {
    const calculator = new MetricCalculator({
      nav: frame({ F: { dates: DATES, values: compound(RETURNS) } }),
      benchmarks: frame({ B: { dates: DATES, values: compound(RETURNS.map(() => 0.001)) } }),
      master: [masterRecord('F', 'B', null)],
    });
    const result = calculator.metric({
      seriesId: 'F',
      asOf: DATES[12],
      window: '1y',
      metric: 'downside_deviation',
      methodology: withChanges(DEFAULT_METHODOLOGY, { mar: 'zero', dd_denominator: 'below' }),
    });
    expect(result.reason).toBeUndefined();
    const squares = 0.021 ** 2 + 0.013 ** 2 + 0.031 ** 2 + 0.007 ** 2;
    expect(result.value!).toBeCloseTo(Math.sqrt(squares / 4) * Math.sqrt(12), 10);
    expect(result.value!).not.toBeCloseTo(Math.sqrt(squares / 8) * Math.sqrt(12), 6);
  });
});
