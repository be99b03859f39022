import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { epochDay, parseIsoDate } from '../../src/calendar/days.js';
import {
  appraisalRatio,
  computeMetrics,
  DEFAULT_METHODOLOGY,
  downsideFrequency,
  downsidePotential,
  famaBeta,
  meanAbsoluteDeviation,
  MetricCalculator,
  modiglianiM2,
  sampleExcessKurtosis,
  specificRisk,
  upsideRisk,
  withChanges,
  type MetricId,
  type MetricOutcome,
  type Methodology,
} from '../../src/metrics/index.js';
import { compound, frame, masterRecord } from './builders.js';

/**
 * Reference values from Carl R. Bacon, Practical Portfolio Performance Measurement and
 * Attribution, 2nd ed., Wiley, 2008, reproduced from the book's 24-month example table through
 * the tool's own public functions. Each expected value names its source beside it.
 */

const csv = readFileSync(new URL('../../fixtures/reference/bacon-2008/returns.csv', import.meta.url), 'utf8');
const rows = csv.trim().split(/\r?\n/).slice(1).map((line) => line.split(','));
const monthEndDays = rows.map(([date]) => parseIsoDate(date)!);
const portfolioReturns = rows.map((row) => Number(row[1]));
const benchmarkReturns = rows.map((row) => Number(row[2]));

// The levels start a month before the first return, at the end of 1999.
const dates = [epochDay(1999, 12, 31), ...monthEndDays];
const inputs = {
  nav: frame({
    P: { dates, values: compound(portfolioReturns) },
    // The benchmark run as if it were a fund, for its own annualised return and deviation.
    B_AS_FUND: { dates, values: compound(benchmarkReturns, 1000) },
  }),
  benchmarks: frame({ B: { dates, values: compound(benchmarkReturns, 1000) } }),
  master: [masterRecord('P', 'B'), masterRecord('B_AS_FUND', 'B')],
};
const asOf = epochDay(2001, 12, 31);
const window = '2y';

/** The book's conventions: no risk-free rate. */
const ZERO_RATE: Methodology = withChanges(DEFAULT_METHODOLOGY, { risk_free: { source: 'none' } });
/** The book's downside examples: a minimum acceptable return of 0.5 % a month = 6 % a year / 12. */
const MAR_HALF_PERCENT: Methodology = withChanges(DEFAULT_METHODOLOGY, { risk_free: { source: 'constant', annual_rate: 0.06 } });

const calculator = new MetricCalculator(inputs);

function metric(seriesId: string, id: MetricId, methodology: Methodology): number {
  const figure = calculator.metric({ seriesId, asOf, window, metric: id, methodology });
  expect(figure.reason).toBeUndefined();
  expect(figure.observations).toBe(id === 'max_drawdown' ? 25 : 24);
  return figure.value!;
}

function stats(methodology: Methodology) {
  const outcome = calculator.statistics({ seriesId: 'P', asOf, window, methodology });
  if (!outcome.ok) throw new Error(outcome.reason);
  return outcome.value;
}

function valueOf(outcome: MetricOutcome): number {
  if (!outcome.ok) throw new Error(outcome.reason);
  return outcome.value;
}

function sampledPortfolioReturns(): Float64Array {
  const sample = calculator.sample({ seriesId: 'P', asOf, window, methodology: ZERO_RATE });
  if (!sample.ok) throw new Error(sample.reason);
  return sample.value.fund;
}

describe('Bacon (2008) printed values', () => {
  it('mean absolute deviation of monthly returns', () => {
    // Bacon (2008) p. 62: 0.0310, printed with a tolerance of ±0.0002
    expect(Math.abs(meanAbsoluteDeviation(sampledPortfolioReturns()) - 0.031)).toBeLessThanOrEqual(0.0002);
  });

  it('M² with a zero risk-free rate', () => {
    // Bacon (2008) pp. 67–68: 0.10062
    expect(valueOf(modiglianiM2(stats(ZERO_RATE), ZERO_RATE))).toBeCloseTo(0.10062, 5);
  });

  it("Jensen's alpha, geometric form, zero risk-free rate", () => {
    const geometric = withChanges(ZERO_RATE, { alpha_form: 'jensen_geometric' });
    // Bacon (2008) p. 72: −0.014
    expect(metric('P', 'alpha', geometric)).toBeCloseTo(-0.014, 3);
  });

  it('specific risk: population deviation of regression residuals, annualised', () => {
    const population = withChanges(ZERO_RATE, { sd_denominator: 'population' });
    // Bacon (2008) p. 75: 0.0329
    expect(valueOf(specificRisk(stats(population), population))).toBeCloseTo(0.0329, 4);
  });

  it('appraisal ratio: geometric Jensen alpha over specific risk', () => {
    const book = withChanges(ZERO_RATE, { sd_denominator: 'population', alpha_form: 'jensen_geometric' });
    // Bacon (2008) p. 77: −0.430
    expect(valueOf(appraisalRatio(stats(book), book))).toBeCloseTo(-0.43, 3);
  });

  it('Fama beta: ratio of annualised sample deviations', () => {
    // Bacon (2008) p. 78: 1.03
    expect(valueOf(famaBeta(stats(ZERO_RATE), ZERO_RATE))).toBeCloseTo(1.03, 2);
  });

  it('sample excess kurtosis', () => {
    // Bacon (2008) pp. 84–85: −0.41
    expect(sampleExcessKurtosis(sampledPortfolioReturns())).toBeCloseTo(-0.41, 2);
  });

  it('downside frequency with a 0.5 % monthly target', () => {
    // Bacon (2008) p. 94: 0.458
    expect(downsideFrequency(stats(MAR_HALF_PERCENT), MAR_HALF_PERCENT)).toBeCloseTo(0.458, 3);
  });

  it('downside deviation with a 0.5 % monthly target, monthly (the metric divided by √12)', () => {
    // Bacon (2008), chapter on downside risk: 0.0255
    expect(metric('P', 'downside_deviation', MAR_HALF_PERCENT) / Math.sqrt(12)).toBeCloseTo(0.0255, 4);
  });

  it('downside potential with a 0.5 % monthly target', () => {
    // Bacon (2008), chapter on downside risk: 0.0137
    expect(downsidePotential(stats(MAR_HALF_PERCENT), MAR_HALF_PERCENT)).toBeCloseTo(0.0137, 4);
  });

  it('upside risk with a 0.5 % monthly target', () => {
    // Bacon (2008), chapter on downside risk: 0.02937
    expect(upsideRisk(stats(MAR_HALF_PERCENT), MAR_HALF_PERCENT)).toBeCloseTo(0.02937, 5);
  });

  it('Kappa 2 with a 0.5 % monthly target (the Sortino ratio divided by √12)', () => {
    // Bacon (2008) p. 96: 0.157
    expect(metric('P', 'sortino', MAR_HALF_PERCENT) / Math.sqrt(12)).toBeCloseTo(0.157, 3);
  });

  it('Kappa 2 as a per-period Sortino ratio about a fixed MAR of 6 % a year (mar: 0.06, ratio_scale: per_period)', () => {
    // Bacon (2008) p. 96: 0.157. The target is a fixed annual rate, 0.06 / 12 = 0.5 % a month,
    // with no risk-free rate at all, and the ratio is reported per period (not × √12).
    const fixedTarget = withChanges(ZERO_RATE, { mar: 0.06, ratio_scale: 'per_period' });
    expect(metric('P', 'sortino', fixedTarget)).toBeCloseTo(0.157, 3);
  });
});

describe('values derived from the same table (derived cross-check, independent reference)', () => {
  it('annualised geometric returns', () => {
    expect(metric('P', 'return_annualized', ZERO_RATE)).toBeCloseTo(0.103678, 6); // derived cross-check, independent reference
    expect(metric('B_AS_FUND', 'return_annualized', ZERO_RATE)).toBeCloseTo(0.117983, 6); // derived cross-check, independent reference
  });

  it('annualised sample standard deviations', () => {
    expect(metric('P', 'std_dev', ZERO_RATE)).toBeCloseTo(0.137, 6); // derived cross-check, independent reference
    expect(metric('B_AS_FUND', 'std_dev', ZERO_RATE)).toBeCloseTo(0.132959, 6); // derived cross-check, independent reference
  });

  it('beta, R² and tracking error with a zero risk-free rate', () => {
    expect(metric('P', 'beta', ZERO_RATE)).toBeCloseTo(0.99885, 6); // derived cross-check, independent reference
    expect(metric('P', 'r_squared', ZERO_RATE)).toBeCloseTo(0.939709, 6); // derived cross-check, independent reference
    expect(metric('P', 'tracking_error', ZERO_RATE)).toBeCloseTo(0.03364, 6); // derived cross-check, independent reference
  });

  it('maximum drawdown of the compounded portfolio', () => {
    expect(metric('P', 'max_drawdown', ZERO_RATE)).toBeCloseTo(0.144673, 6); // derived cross-check, independent reference
  });

  it('the same figures come out of computeMetrics, the answer the metrics command prints', () => {
    const answer = computeMetrics({ ...inputs, asOf, windows: [window], methodology: ZERO_RATE });
    expect(answer.as_of).toBe('2001-12-31');
    expect(answer.methodology.annualization).toBe(12);
    const beta = answer.metrics.find((row) => row.series_id === 'P' && row.metric === 'beta');
    expect(beta).toEqual({ series_id: 'P', window: '2y', metric: 'beta', value: expect.closeTo(0.99885, 6), observations: 24 });
  });
});
