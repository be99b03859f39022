import { createRequire } from 'node:module';
import fc from 'fast-check';
import {
  linearRegression,
  rootMeanSquare,
  sampleCorrelation,
  sampleCovariance,
  sampleStandardDeviation,
  standardDeviation,
} from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import {
  correlation,
  covariance,
  DEFAULT_METHODOLOGY,
  interceptYonX,
  MetricCalculator,
  pairMoments,
  slopeYonX,
  varianceX,
  varianceY,
  withChanges,
  type MethodologyChanges,
  type MetricId,
} from '../../src/metrics/index.js';
import { compound, frame, masterRecord, monthEnds } from './builders.js';

const { jStat } = createRequire(import.meta.url)('jstat') as {
  jStat: { covariance(a: number[], b: number[]): number; stdev(a: number[], sample: boolean): number };
};

/** Relative agreement to 1e-9, with an absolute floor for values that are zero up to rounding. */
function expectClose(actual: number, expected: number, absoluteFloor = 1e-15): void {
  const tolerance = 1e-9 * Math.max(Math.abs(actual), Math.abs(expected)) + absoluteFloor;
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(tolerance);
}

const aReturn = fc.double({ min: -0.5, max: 0.5, noNaN: true, noDefaultInfinity: true });
const returns = fc.array(aReturn, { minLength: 3, maxLength: 120 });
const pairs = fc.array(fc.tuple(aReturn, aReturn), { minLength: 3, maxLength: 120 });
const split = (xy: [number, number][]) => [xy.map(([x]) => x), xy.map(([, y]) => y)] as const;

function naiveVariance(x: number[]): number {
  const m = x.reduce((s, v) => s + v, 0) / x.length;
  return x.reduce((s, v) => s + (v - m) ** 2, 0) / x.length;
}

describe('streaming moments agree with simple-statistics and jstat', () => {
  it('sample and population standard deviation', () => {
    fc.assert(
      fc.property(returns, (x) => {
        const m = pairMoments(x, x);
        expectClose(Math.sqrt(varianceX(m, 'sample')), sampleStandardDeviation(x));
        expectClose(Math.sqrt(varianceY(m, 'population')), standardDeviation(x));
        expectClose(Math.sqrt(varianceX(m, 'sample')), jStat.stdev(x, true));
      }),
      { numRuns: 300 },
    );
  });

  it('sample and population covariance', () => {
    fc.assert(
      fc.property(pairs, (xy) => {
        const [x, y] = split(xy);
        const m = pairMoments(x, y);
        expectClose(covariance(m, 'sample'), sampleCovariance(x, y));
        expectClose(covariance(m, 'sample'), jStat.covariance(x, y));
        expectClose(covariance(m, 'population'), (sampleCovariance(x, y) * (x.length - 1)) / x.length);
      }),
      { numRuns: 300 },
    );
  });

  it('regression slope and intercept of y on x', () => {
    fc.assert(
      fc.property(pairs, (xy) => {
        const [x, y] = split(xy);
        fc.pre(naiveVariance(x) > 1e-6);
        const m = pairMoments(x, y);
        const reference = linearRegression(xy);
        expectClose(slopeYonX(m), reference.m, 1e-12);
        expectClose(interceptYonX(m), reference.b, 1e-12);
      }),
      { numRuns: 300 },
    );
  });

  it('correlation', () => {
    fc.assert(
      fc.property(pairs, (xy) => {
        const [x, y] = split(xy);
        fc.pre(naiveVariance(x) > 1e-6 && naiveVariance(y) > 1e-6);
        expectClose(correlation(pairMoments(x, y)), sampleCorrelation(x, y), 1e-12);
      }),
      { numRuns: 300 },
    );
  });
});

describe('metrics over random NAV series agree with simple-statistics', () => {
  const monthlyPairs = fc.array(fc.tuple(fc.double({ min: -0.2, max: 0.2, noNaN: true }), fc.double({ min: -0.2, max: 0.2, noNaN: true })), {
    minLength: 12,
    maxLength: 12,
  });
  const noRate = withChanges(DEFAULT_METHODOLOGY, { risk_free: { source: 'none' } });

  it('std_dev, beta, r_squared and tracking_error of a 1y window', () => {
    fc.assert(
      fc.property(monthlyPairs, (xy) => {
        const [fund, bench] = split(xy);
        fc.pre(naiveVariance(fund) > 1e-6 && naiveVariance(bench) > 1e-6);
        const dates = monthEnds(2025, 12, 13);
        const calculator = new MetricCalculator({
          nav: frame({ F: { dates, values: compound(fund) } }),
          benchmarks: frame({ B: { dates, values: compound(bench) } }),
          master: [masterRecord('F', 'B')],
        });
        const figure = (metric: 'std_dev' | 'beta' | 'r_squared' | 'tracking_error') =>
          calculator.metric({ seriesId: 'F', asOf: dates[12], window: '1y', metric, methodology: noRate }).value!;
        // The fund's returns come back from its NAV levels with relative rounding of about 1e-16.
        expectClose(figure('std_dev'), sampleStandardDeviation(fund) * Math.sqrt(12), 1e-13);
        expectClose(figure('beta'), linearRegression(xy.map(([f, b]) => [b, f])).m, 1e-11);
        expectClose(figure('r_squared'), sampleCorrelation(fund, bench) ** 2, 1e-11);
        const active = fund.map((f, i) => f - bench[i]);
        expectClose(figure('tracking_error'), sampleStandardDeviation(active) * Math.sqrt(12), 1e-13);
      }),
      { numRuns: 200 },
    );
  });
});

describe('the conventions of issue 10 agree with simple-statistics and jstat', () => {
  const monthlyPairs = fc.array(fc.tuple(fc.double({ min: -0.2, max: 0.2, noNaN: true }), fc.double({ min: -0.2, max: 0.2, noNaN: true })), {
    minLength: 12,
    maxLength: 12,
  });
  const annualRate = fc.integer({ min: 0, max: 800 }).map((bp) => bp / 10_000);

  function setUp(xy: [number, number][]) {
    const [fund, bench] = split(xy);
    const dates = monthEnds(2025, 12, 13);
    const calculator = new MetricCalculator({
      nav: frame({ F: { dates, values: compound(fund) } }),
      benchmarks: frame({ B: { dates, values: compound(bench) } }),
      master: [masterRecord('F', 'B')],
    });
    const figure = (metric: MetricId, changes: MethodologyChanges) =>
      calculator.metric({ seriesId: 'F', asOf: dates[12], window: '1y', metric, methodology: withChanges(DEFAULT_METHODOLOGY, changes) }).value!;
    return { fund, bench, figure };
  }

  it('per-period Sharpe and information ratio, and the compounded Jensen intercept, with a compounded rate', () => {
    fc.assert(
      fc.property(monthlyPairs, annualRate, (xy, rate) => {
        const { fund, bench, figure } = setUp(xy);
        fc.pre(naiveVariance(fund) > 1e-6 && naiveVariance(bench) > 1e-6);
        const riskFree = { source: 'constant', annual_rate: rate } as const;
        const rf = (1 + rate) ** (1 / 12) - 1;
        const excess = fund.map((r) => r - rf);
        const base = { risk_free: riskFree, rate_conversion: 'compound', ratio_scale: 'per_period' } as const;
        expectClose(figure('sharpe', base), mean(excess) / sampleStandardDeviation(excess), 1e-11);
        expectClose(figure('sharpe', base), mean(excess) / jStat.stdev(excess, true), 1e-11);
        const active = fund.map((r, i) => r - bench[i]);
        fc.pre(naiveVariance(active) > 1e-8);
        expectClose(figure('information_ratio', base), mean(active) / sampleStandardDeviation(active), 1e-10);
        const intercept = linearRegression(xy.map(([f, b]) => [b - rf, f - rf])).b;
        expectClose(figure('alpha', { ...base, alpha_form: 'compounded' }), (1 + intercept) ** 12 - 1, 1e-11);
      }),
      { numRuns: 150 },
    );
  });

  it('downside deviation about a fixed annual MAR: simple-statistics root mean square of the shortfalls', () => {
    fc.assert(
      fc.property(monthlyPairs, fc.integer({ min: -500, max: 1500 }).map((bp) => bp / 10_000), (xy, mar) => {
        const { fund, figure } = setUp(xy);
        const shortfalls = fund.map((r) => Math.min(r - mar / 12, 0));
        const none = { risk_free: { source: 'none' } } as const;
        expectClose(figure('downside_deviation', { ...none, mar }), rootMeanSquare(shortfalls) * Math.sqrt(12), 1e-13);
      }),
      { numRuns: 150 },
    );
  });
});

function mean(x: number[]): number {
  return x.reduce((s, v) => s + v, 0) / x.length;
}
