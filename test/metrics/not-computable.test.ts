import { describe, expect, it } from 'vitest';
import { epochDay } from '../../src/calendar/days.js';
import {
  computeMetrics,
  DEFAULT_METHODOLOGY,
  MetricCalculator,
  parseMethodology,
  parseMethodologyChanges,
  parseWindow,
  withChanges,
  type MetricId,
  type MetricInputs,
  type Methodology,
} from '../../src/metrics/index.js';
import { compound, frame, masterRecord, monthEnds } from './builders.js';

const RETURNS = [0.01, -0.02, 0.03, 0.015, -0.01, 0.02, 0.005, -0.03, 0.025, 0.01, -0.005, 0.012];
const DATES = monthEnds(2025, 6, 13); // 2025-06 … 2026-06
const AS_OF = DATES[12];
const NO_RATE = withChanges(DEFAULT_METHODOLOGY, { risk_free: { source: 'none' } });

function without<T>(values: T[], index: number): T[] {
  return values.filter((_, i) => i !== index);
}

function figure(inputs: MetricInputs, metric: MetricId, methodology: Methodology = NO_RATE, window = '1y', seriesId = 'F') {
  return new MetricCalculator(inputs).metric({ seriesId, asOf: AS_OF, window, metric, methodology });
}

const base: MetricInputs = {
  nav: frame({ F: { dates: DATES, values: compound(RETURNS) } }),
  benchmarks: frame({ B: { dates: DATES, values: compound(RETURNS.map((r) => r * 0.8 + 0.001)) } }),
  master: [masterRecord('F', 'B', 'RF')],
};

describe('figures that cannot be computed are null with a reason', () => {
  it('history too short for the window', () => {
    const result = figure(base, 'std_dev', NO_RATE, '2y');
    expect(result).toEqual({ value: null, observations: 0, reason: expect.stringMatching(/history too short.*2024-06.*2025-06-30/) });
  });

  it('missing month-end values are named', () => {
    const inputs = { ...base, nav: frame({ F: { dates: without(without(DATES, 4), 7), values: without(without(compound(RETURNS), 4), 7) } }) };
    expect(figure(inputs, 'std_dev').reason).toBe('missing NAV month-end values for 2025-10, 2026-02');
  });

  it('no benchmark mapped: benchmark figures are null, the others computed', () => {
    const inputs = { ...base, master: [masterRecord('F', null)] };
    expect(figure(inputs, 'beta')).toMatchObject({ value: null, reason: 'no benchmark is mapped to series F in the series master' });
    expect(figure(inputs, 'std_dev').value).toBeGreaterThan(0);
  });

  it('a series missing from the master has no benchmark', () => {
    expect(figure({ ...base, master: [] }, 'tracking_error').reason).toMatch(/not in the series master/);
  });

  it('a benchmark with no levels', () => {
    expect(figure({ ...base, master: [masterRecord('F', 'BX')] }, 'r_squared').reason).toBe('benchmark BX has no levels');
  });

  it('a benchmark missing a month-end', () => {
    const inputs = { ...base, benchmarks: frame({ B: { dates: without(DATES, 5), values: without(compound(RETURNS), 5) } }) };
    expect(figure(inputs, 'beta').reason).toBe('missing benchmark B level month-end values for 2025-11');
  });

  it('a series with no NAV observations', () => {
    expect(figure(base, 'std_dev', NO_RATE, '1y', 'NOPE').reason).toBe('series NOPE has no NAV observations');
  });

  it('zero variance', () => {
    const flat = Array(12).fill(0.004);
    const inputs = {
      ...base,
      nav: frame({ F: { dates: DATES, values: compound(flat) } }),
      benchmarks: frame({ B: { dates: DATES, values: compound(flat) } }),
    };
    expect(figure(inputs, 'sharpe').reason).toBe('the excess returns have zero variance');
    expect(figure(inputs, 'beta').reason).toBe('the benchmark returns have zero variance');
    expect(figure(inputs, 'information_ratio').reason).toBe('the tracking error is zero');
    expect(figure(inputs, 'std_dev').value).toBeLessThan(1e-12);
  });

  it('no month below the minimum acceptable return: sortino is null', () => {
    const up = RETURNS.map((r) => Math.abs(r) + 0.001);
    const inputs = { ...base, nav: frame({ F: { dates: DATES, values: compound(up) } }) };
    expect(figure(inputs, 'downside_deviation').value).toBe(0);
    expect(figure(inputs, 'sortino').reason).toMatch(/no period fell below the minimum acceptable return/);
  });

  it('no risk-free rate for a month: rate figures are null, the others computed', () => {
    const rateDays = DATES.filter((_, i) => i !== 3).map((d) => d - 10);
    const inputs = { ...base, rates: frame({ RF: { dates: rateDays, values: rateDays.map(() => 0.03) } }) };
    expect(figure(inputs, 'sharpe', DEFAULT_METHODOLOGY).reason).toBe('no risk-free rate RF for 2025-09');
    expect(figure(inputs, 'std_dev', DEFAULT_METHODOLOGY).value).toBeGreaterThan(0);
    expect(figure(inputs, 'beta', withChanges(DEFAULT_METHODOLOGY, { regression: 'raw' })).value).toBeGreaterThan(0);
  });

  it('no rate file and no constant rate', () => {
    expect(figure(base, 'sharpe', DEFAULT_METHODOLOGY).reason).toBe('no risk-free rates were given for rate RF: give a rate file or a constant rate');
    const otherRate = { ...base, rates: frame({ OTHER: { dates: DATES, values: DATES.map(() => 0.01) } }) };
    expect(figure(otherRate, 'sharpe', DEFAULT_METHODOLOGY).reason).toBe('risk-free rate RF has no observations');
    const noRateId = { ...base, master: [masterRecord('F', 'B')] };
    expect(figure(noRateId, 'treynor', DEFAULT_METHODOLOGY).reason).toMatch(/series F has no rate_id/);
  });

  it('a non-positive NAV at a month-end', () => {
    const values = compound(RETURNS);
    values[6] = 0;
    expect(figure({ ...base, nav: frame({ F: { dates: DATES, values } }) }, 'std_dev').reason).toBe('NAV 0 on 2025-12-31 is not a positive number');
  });

  it('a non-positive NAV inside a month: max_drawdown and daily figures are null, monthly ones are not', () => {
    const midMonth = epochDay(2025, 12, 15);
    const dates = [...DATES.slice(0, 7), midMonth, ...DATES.slice(7)].sort((a, b) => a - b);
    const levels = compound(RETURNS);
    const values = dates.map((d) => (d === midMonth ? -1 : levels[DATES.indexOf(d)]));
    const inputs = { ...base, nav: frame({ F: { dates, values } }) };
    expect(figure(inputs, 'max_drawdown').reason).toBe('a NAV in the window is not a positive number');
    expect(figure(inputs, 'std_dev').value).toBeGreaterThan(0);
    expect(figure(inputs, 'std_dev', withChanges(NO_RATE, { frequency: 'daily' })).reason).toBe('NAV -1 on 2025-12-15 is not a positive number');
  });

  it('weekly rates: a week without a fixing takes the latest within 31 days, else the figure is null', () => {
    const weekly = withChanges(DEFAULT_METHODOLOGY, { frequency: 'weekly' });
    const fewFixings = (gapFrom: number, gapTo: number) => ({
      ...base,
      rates: frame({ RF: { dates: DATES.filter((d) => d < gapFrom || d > gapTo), values: DATES.filter((d) => d < gapFrom || d > gapTo).map(() => 0.03) } }),
    });
    // The NAV and the rates are both month-end only, so each weekly period is one month long.
    // Without the 2025-09-30 fixing, that week takes the 2025-08-31 one (29 days before it).
    expect(figure(fewFixings(DATES[3], DATES[3]), 'sharpe', weekly).value).toEqual(expect.any(Number));
    // Without the 2025-10-31 fixing too, its week (from 2025-10-27) finds none in 31 days.
    expect(figure(fewFixings(DATES[3], DATES[4]), 'sharpe', weekly).reason).toBe('no risk-free rate RF for the week of 2025-10-27');
  });

  it('an unknown window label is a usage error', () => {
    expect(() => figure(base, 'std_dev', NO_RATE, 'three years')).toThrow(RangeError);
    expect(parseWindow('36m')).toBe(36);
    expect(parseWindow('5Y')).toBe(60);
    expect(parseWindow('0y')).toBeNull();
  });
});

describe('the metrics answer', () => {
  it('has every series, window and metric; values are finite or null with a reason', () => {
    const answer = computeMetrics({
      ...base,
      master: [...base.master, masterRecord('G', 'B')],
      asOf: AS_OF,
      windows: ['1y', '6m', '3y'],
      methodology: DEFAULT_METHODOLOGY,
      constantRate: 0.02,
    });
    expect(answer.metrics).toHaveLength(2 * 3 * 12);
    expect(answer.methodology.risk_free).toEqual({ source: 'constant', annual_rate: 0.02 });
    for (const row of answer.metrics) {
      if (row.value === null) expect(row.reason).toEqual(expect.any(String));
      else {
        expect(Number.isFinite(row.value)).toBe(true);
        expect(row).not.toHaveProperty('reason');
      }
    }
    const sixMonths = answer.metrics.find((row) => row.series_id === 'F' && row.window === '6m' && row.metric === 'sharpe');
    expect(sixMonths).toMatchObject({ observations: 6, value: expect.any(Number) });
    expect(answer.metrics.filter((row) => row.series_id === 'G').every((row) => row.value === null)).toBe(true);
  });

  it('uses no observation after the as-of day, and a mid-month as-of ends the window there', () => {
    const midMonth = epochDay(2026, 6, 15);
    const values = compound(RETURNS);
    const dates = [...DATES.slice(0, 12), midMonth, DATES[12]];
    const withMid = { ...base, nav: frame({ F: { dates, values: [...values.slice(0, 12), values[12] * 1.05, values[12]] } }) };
    const calculator = new MetricCalculator(withMid);
    const result = calculator.metric({ seriesId: 'F', asOf: midMonth, window: '1y', metric: 'return_annualized', methodology: NO_RATE });
    expect(result.value).toBeCloseTo((values[12] * 1.05) / values[0] - 1, 12);
  });
});

describe('methodology configuration', () => {
  it('the default is interface.md’s monthly methodology', () => {
    expect(parseMethodology({})).toEqual(DEFAULT_METHODOLOGY);
    expect(DEFAULT_METHODOLOGY).toEqual({
      frequency: 'monthly',
      annualization: null,
      sd_denominator: 'sample',
      return_type: 'simple',
      regression: 'excess',
      alpha_form: 'jensen',
      mar: 'risk_free',
      dd_denominator: 'full',
      window_end: 0,
      benchmark: null,
      risk_free: { source: 'series' },
      rate_periods: 'frequency',
      rate_conversion: 'simple',
      drawdown: 'every_nav',
      ratio_scale: 'annualized',
      return_annualization: 'periods',
    });
  });

  it('changes name only the dimensions they change and are checked', () => {
    expect(parseMethodologyChanges({ sd_denominator: 'population' })).toEqual({ sd_denominator: 'population' });
    expect(() => parseMethodologyChanges({ sd_denominator: 'both' })).toThrow();
    expect(() => parseMethodologyChanges({ colour: 'blue' })).toThrow();
    expect(() => parseMethodologyChanges({ window_end: 1 })).toThrow();
    expect(withChanges(DEFAULT_METHODOLOGY, { frequency: 'weekly' })).toEqual({ ...DEFAULT_METHODOLOGY, frequency: 'weekly' });
  });
});
