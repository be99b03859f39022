import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { DEFAULT_METHODOLOGY, MetricCalculator, withChanges, type MethodologyChanges } from '../../src/metrics/index.js';
import { METRIC_IDS } from '../../src/metrics/kernels.js';
import type { MetricInputs } from '../../src/metrics/compute.js';
import { PairMoments, SeriesMoments, TargetSums } from '../../src/metrics/moments.js';
import { basisStatistics, maxDrawdown } from '../../src/metrics/statistics.js';
import { firstAboveNear } from '../../src/metrics/sampling.js';
import { firstAbove } from '../../src/numeric/search.js';
import { SeededRandom } from '../../src/random.js';
import { frameFromSeries, findSeries } from '../../src/series/frame.js';
import { masterRecord } from './builders.js';
import { AS_OF, universe } from '../reconcile/universe.js';

/**
 * The speed-ups of the calculator must not change a bit of any figure:
 * - the benchmark's and the risk-free returns of a window are kept across series and reused for a
 *   fund with the same sample days (a few calendars per key, the least recently used dropped);
 * - a window's moments are built part by part on first use, each by its own pass;
 * - the drawdown takes one division per peak instead of one per value;
 * - the date searches step from the previous position by doubling steps.
 * Each is compared with the plain computation, with Object.is (so −0 and NaN count too).
 */


/**
 * Eight funds on six calendars (more than the four kept per key, so parts are dropped and made
 * again): FUND-0 to FUND-2 on every business day, the others each missing other days, one of
 * them a whole month.
 */
function manyCalendars(): MetricInputs {
  const { days, data } = universe();
  const fundA = findSeries(data.nav, 'FUND-A')!;
  const funds = Array.from({ length: 8 }, (_, i) => {
    const calendar = Math.max(0, i - 2);
    const kept = days.map((_, k) => k).filter((k) => calendar === 0 || (calendar === 5 ? !(k >= 300 && k < 322) : k % (calendar + 6) !== 3));
    return { id: `FUND-${i}`, dates: kept.map((k) => days[k]), values: kept.map((k) => fundA.values[k] * (1 + i / 100) ** (k / 250)) };
  });
  return {
    ...data,
    nav: frameFromSeries(funds),
    master: funds.map(({ id }, i) => masterRecord(id, i % 2 === 0 ? 'BMK-WIDE' : 'BMK-NARROW', 'RATE-X')),
  };
}

describe('benchmark and risk-free parts kept across series', () => {
  const data = manyCalendars();
  const variants: MethodologyChanges[] = [];
  for (const frequency of ['monthly', 'weekly', 'daily'] as const) {
    for (const window_end of [0, -1]) {
      for (const benchmark of [null, 'BMK-WIDE', 'BMK-NARROW']) {
        for (const rate_conversion of ['simple', 'compound'] as const) variants.push({ frequency, window_end, benchmark, rate_conversion });
      }
    }
  }
  const requests = data.nav.ids.flatMap((seriesId) =>
    ['1y', '3y'].flatMap((window) => variants.flatMap((changes) => METRIC_IDS.map((metric) => ({ seriesId, window, metric, changes })))),
  );

  it.each([
    ['series by series', (items: typeof requests) => items],
    ['in a random order, series and calendars interleaved', (items: typeof requests) => new SeededRandom(11).shuffle(items)],
  ])('gives every figure a fresh calculator gives, %s', (_, order) => {
    const shared = new MetricCalculator(data);
    const sampled = order(requests).filter((_, k) => k % 7 === 0);
    for (const { seriesId, window, metric, changes } of sampled) {
      const request = { seriesId, asOf: AS_OF, window, metric, methodology: withChanges(DEFAULT_METHODOLOGY, changes) };
      const alone = new MetricCalculator(data).metric(request);
      const reused = shared.metric(request);
      expect(Object.is(reused.value, alone.value), `${seriesId} ${window} ${metric} ${JSON.stringify(changes)}: ${reused.value} vs ${alone.value}`).toBe(true);
      expect(reused.reason).toBe(alone.reason);
      expect(reused.observations).toBe(alone.observations);
    }
  });
});

describe('variant figures kept only while their series is the latest', () => {
  const data = manyCalendars();
  const variants: MethodologyChanges[] = [{}];
  for (const frequency of ['monthly', 'weekly', 'daily'] as const) {
    for (const window_end of [0, -2]) {
      for (const benchmark of [null, 'BMK-NARROW']) variants.push({ frequency, window_end, benchmark }, { frequency, window_end, benchmark, sd_denominator: 'population' });
    }
  }
  const requests = data.nav.ids.flatMap((seriesId) =>
    ['1y', '3y'].flatMap((window) => variants.flatMap((changes) => METRIC_IDS.map((metric) => ({ seriesId, window, metric, changes })))),
  );

  it.each([
    ['series by series', (items: typeof requests) => items],
    ['in a random order, so each series is left and come back to', (items: typeof requests) => new SeededRandom(17).shuffle(items)],
  ])('are the figures a fresh calculator gives, asked as variants or kept for the run, %s', (_, order) => {
    const shared = new MetricCalculator(data);
    const random = new SeededRandom(5);
    const sampled = order(requests).filter((_, k) => k % 5 === 0);
    for (const { seriesId, window, metric, changes } of sampled) {
      const request = { seriesId, asOf: AS_OF, window, metric, methodology: withChanges(DEFAULT_METHODOLOGY, changes) };
      const alone = new MetricCalculator(data).metric(request);
      // Variants and figures kept for the run mixed, as the reconcile stage mixes them.
      const reused = random.next() < 0.7 ? shared.variantMetric(request) : shared.metric(request);
      expect(Object.is(reused.value, alone.value), `${seriesId} ${window} ${metric} ${JSON.stringify(changes)}: ${reused.value} vs ${alone.value}`).toBe(true);
      expect(reused.reason).toBe(alone.reason);
      expect(reused.observations).toBe(alone.observations);
    }
  });

  it("read the run's statistics when the variant samples the window as the run does, and are not kept for the run otherwise", () => {
    const calculator = new MetricCalculator(data);
    const request = { seriesId: 'FUND-0', asOf: AS_OF, window: '1y', metric: 'std_dev' as const };
    const run = calculator.statistics({ ...request, methodology: DEFAULT_METHODOLOGY });
    // Another denominator samples as the configured methodology does: the very statistics of the run.
    const population = withChanges(DEFAULT_METHODOLOGY, { sd_denominator: 'population' });
    expect(calculator.statistics({ ...request, methodology: population }, 'while the series is the latest')).toBe(run);
    // A weekly variant is kept while FUND-0 is the latest series, and made anew after another series.
    const weekly = withChanges(DEFAULT_METHODOLOGY, { frequency: 'weekly' });
    const first = calculator.statistics({ ...request, methodology: weekly }, 'while the series is the latest');
    expect(calculator.statistics({ ...request, methodology: weekly }, 'while the series is the latest')).toBe(first);
    calculator.statistics({ ...request, seriesId: 'FUND-1', methodology: weekly }, 'while the series is the latest');
    const again = calculator.statistics({ ...request, methodology: weekly }, 'while the series is the latest');
    expect(again).not.toBe(first);
    expect(again.ok && first.ok && again.value.simple.raw.n === first.value.simple.raw.n).toBe(true);
  });
});

/** The moments as one pass over every accumulator builds them (the plain path). */
function onePass(fund: Float64Array, benchmark: Float64Array, riskFree: Float64Array) {
  const stats = { raw: new PairMoments(), excess: new PairMoments(), active: new SeriesMoments(), belowRiskFree: new TargetSums(), belowZero: new TargetSums() };
  for (let i = 0; i < fund.length; i++) {
    const p = fund[i];
    const b = benchmark[i];
    const f = riskFree[i];
    stats.raw.add(b, p);
    stats.excess.add(b - f, p - f);
    stats.active.add(p - b);
    stats.belowRiskFree.add(p, f);
    stats.belowZero.add(p, 0);
  }
  return stats;
}

function sameFields(a: object, b: object): boolean {
  const left = a as Record<string, number>;
  const right = b as Record<string, number>;
  return Object.keys(left).length === Object.keys(right).length && Object.keys(left).every((key) => Object.is(left[key], right[key]));
}

const aReturn = fc.oneof(fc.double({ min: -0.5, max: 0.5, noNaN: true }), fc.constantFrom(0, -0, 0.01, -0.01));
const PARTS = ['raw', 'excess', 'active', 'belowRiskFree', 'belowZero'] as const;

describe('moments built part by part', () => {
  it('equal the moments of one pass over all of them, in whatever order the parts are read', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(aReturn, aReturn, aReturn), { minLength: 0, maxLength: 80 }),
        fc.shuffledSubarray([...PARTS], { minLength: 1 }),
        (rows, order) => {
          const fund = Float64Array.from(rows, (row) => row[0]);
          const benchmark = Float64Array.from(rows, (row) => row[1]);
          const riskFree = Float64Array.from(rows, (row) => row[2]);
          const plain = onePass(fund, benchmark, riskFree);
          const lazy = basisStatistics(fund, benchmark, riskFree);
          for (const part of order) expect(sameFields(lazy[part], plain[part]), part).toBe(true);
        },
      ),
    );
  });
});

/** The drawdown as it was written first: the fall from the running peak at every value. */
function drawdownAtEveryValue(values: readonly number[]): number {
  let peak = -Infinity;
  let deepest = 0;
  for (const value of values) {
    if (!(value > 0 && value < Infinity)) return NaN;
    if (value > peak) peak = value;
    else deepest = Math.max(deepest, 1 - value / peak);
  }
  return deepest;
}

describe('max drawdown from each peak’s trough', () => {
  const level = fc.oneof(fc.double({ min: 1e-6, max: 1e6, noNaN: true }), fc.constantFrom(100, 99.99, 100.01, 50));
  it('equals the fall computed at every value', () => {
    fc.assert(
      fc.property(fc.array(level, { maxLength: 200 }), (values) => {
        expect(Object.is(maxDrawdown(values), drawdownAtEveryValue(values))).toBe(true);
      }),
    );
  });
  it('is NaN on a value that is not a positive number, as before', () => {
    fc.assert(
      fc.property(fc.array(level, { maxLength: 50 }), fc.constantFrom(0, -1, NaN, Infinity), fc.nat(), (values, bad, at) => {
        const withBad = [...values];
        withBad.splice(at % (values.length + 1), 0, bad);
        expect(Object.is(maxDrawdown(withBad), drawdownAtEveryValue(withBad))).toBe(true);
      }),
    );
  });
});

describe('the search by doubling steps', () => {
  it('finds what the binary search from the same start finds', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: -50, max: 400 }), { maxLength: 120 }), fc.integer({ min: -60, max: 420 }), fc.nat(), (days, x, start) => {
        const sorted = Int32Array.from(days.sort((a, b) => a - b));
        const from = start % (sorted.length + 1);
        expect(firstAboveNear(sorted, x, from)).toBe(firstAbove(sorted, x, from));
      }),
    );
  });
});
