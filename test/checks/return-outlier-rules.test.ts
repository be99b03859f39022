import { describe, expect, it } from 'vitest';
import { returnOutlier } from '../../checks/return-outlier.js';
import { residualMoves, tailBar } from '../../src/checks/residual-moves.js';
import { iso, linked, weekdays } from './helpers.js';

/**
 * Hand-made series (no random numbers): the benchmark moves 0.8 % × sin(1.7 i) a day, and the
 * fund follows it with a residual that is ordinarily ±0.1–0.2 % and, every tenth day, a wilder
 * genuine ±0.4–0.86 % (a fat tail of 24 days out of 240). One day can carry a planted move.
 */
function handMade(plant: { at: number; fund: number; bench?: number } | null, count = 241) {
  const dates = weekdays('2025-01-06', count);
  const ordinary = [0.001, -0.002, 0.002, -0.001];
  const wild = Array.from({ length: 24 }, (_, j) => (j % 2 ? -1 : 1) * (0.004 + 0.0002 * ((j * 7) % 24)));
  const bench = [1000];
  const fund = [100];
  for (let i = 1; i < count; i++) {
    let b = 0.008 * Math.sin(i * 1.7);
    let r = i % 10 === 5 ? wild[(i - 5) / 10] : ordinary[i % 4];
    if (plant && i === plant.at) {
      r = plant.fund;
      b = plant.bench ?? b;
    }
    bench.push(bench[i - 1] * Math.exp(b));
    fund.push(fund[i - 1] * Math.exp(b + r));
  }
  return { dates, fund, bench };
}

describe('return_outlier: the judged day is left out of its own tail estimate', () => {
  const AT = 150;
  const { dates, fund, bench } = handMade({ at: AT, fund: -0.032 });

  it('finds a −3.2 % mispricing that would otherwise raise its own bar above it', () => {
    const { series, context } = linked(dates, fund, bench);
    const returns = residualMoves(series, context);
    const k = AT - 1;
    const z = Math.abs(returns.z[k]);
    // With the fault inside its own tail estimate the bar sits above it; without, well below.
    expect(z).toBeGreaterThan(10.5);
    expect(tailBar(returns, returnOutlier.defaults.tail_chance)).toBeGreaterThan(z);
    expect(tailBar(returns, returnOutlier.defaults.tail_chance, k)).toBeLessThan(8);

    const findings = returnOutlier.run(series, context, returnOutlier.defaults);
    expect(findings.map((f) => [f.start, f.end, f.key])).toEqual([[iso(dates[AT]), iso(dates[AT]), `return_outlier|F1|${iso(dates[AT])}`]]);
    expect(findings[0].evidence).toMatchObject({ previous: { date: iso(dates[AT - 1]) }, current: { date: iso(dates[AT]) } });
    expect(findings[0].evidence.bridged).toBeUndefined();
  });

  it('reports nothing on the same fund without the fault (the wild genuine days stay below the bar)', () => {
    const clean = handMade(null);
    const { series, context } = linked(clean.dates, clean.fund, clean.bench);
    expect(returnOutlier.run(series, context, returnOutlier.defaults)).toEqual([]);
  });
});

describe('return_outlier: a benchmark holiday is bridged', () => {
  const AT = 120;

  /** The fund on every weekday; its benchmark on every weekday but `dates[AT]` (its holiday). */
  function onBenchmarkHoliday(fundMove: number, benchMove: number) {
    // The market's move over the holiday window (AT−1 → AT+1) lands on the fund's day AT; the
    // fund's own residual that day is `fundMove − benchMove`.
    const { dates, fund, bench } = handMade({ at: AT, fund: fundMove - benchMove, bench: benchMove });
    const benchDates = dates.filter((_, i) => i !== AT);
    const benchValues = bench.filter((_, i) => i !== AT);
    const { series, context } = linked(dates, fund, benchValues, {}, benchDates);
    return { dates, series, context };
  }

  it('does not report a −12 % fund day that the benchmark made over the bridged window', () => {
    const { series, context } = onBenchmarkHoliday(Math.log(0.88), Math.log(0.88));
    const returns = residualMoves(series, context);
    // The benchmark cannot price the day itself, and judged alone the day is far out.
    expect(Number.isNaN(returns.bench[AT - 1])).toBe(true);
    expect(Math.abs(returns.z[AT - 1])).toBeGreaterThan(10);
    expect(returnOutlier.run(series, context, returnOutlier.defaults)).toEqual([]);
  });

  it('still reports a −12 % mispricing on the benchmark holiday when the benchmark stayed flat', () => {
    const { dates, series, context } = onBenchmarkHoliday(Math.log(0.88), 0);
    const findings = returnOutlier.run(series, context, returnOutlier.defaults);
    expect(findings.map((f) => [f.start, f.key])).toEqual([[iso(dates[AT]), `return_outlier|F1|${iso(dates[AT])}`]]);
    expect(findings[0].evidence).toMatchObject({
      benchmark_return: null,
      bridged: { from: iso(dates[AT - 1]), to: iso(dates[AT + 1]) },
    });
    const bridged = findings[0].evidence.bridged as { benchmark_return: number; residual: number; robust_z: number };
    expect(Math.abs(bridged.benchmark_return)).toBeLessThan(0.02);
    expect(bridged.residual).toBeLessThan(-0.1);
    expect(bridged.robust_z).toBeLessThan(-20);
  });
});
