import { describe, expect, it } from 'vitest';
import { epochDay } from '../../src/calendar/days.js';
import {
  DEFAULT_METHODOLOGY,
  DIMENSION_CHOICES,
  METHODOLOGY_DIMENSIONS,
  MetricCalculator,
  parseMethodology,
  parseMethodologyChanges,
  perPeriodRate,
  withChanges,
  type MethodologyChanges,
  type MetricId,
  type MetricValue,
} from '../../src/metrics/index.js';
import { RunConfigSchema } from '../../src/config/run-config.js';
import { compound, frame, masterRecord, monthEnds } from './builders.js';

/**
 * The conventions of issue 10, each on a four-month invented example small enough to work by
 * hand. Every expected value is the hand computation written out beside it (no value is copied
 * from the code's output).
 *
 *   fund returns      p = 0.02, −0.01, 0.03, −0.02     mean 0.005
 *   benchmark returns b = 0.01, −0.02, 0.02,  0.00     mean 0.0025
 *   NAV at month ends: 100, 102, 100.98, 104.0094, 101.929212 (2025-12-31 … 2026-04-30)
 *   a mid-month NAV of 95 on 2026-01-15 (inside the first month's period)
 *   constant risk-free rate 0.012 a year unless a test says otherwise
 *
 * Sums worked by hand:
 *   p − p̄ = 0.015, −0.015, 0.025, −0.025    S_pp = 0.0017        sample sd(p) = √(0.0017 / 3)
 *   b − b̄ = 0.0075, −0.0225, 0.0175, −0.0025 S_bb = 0.000875
 *   S_bp = 0.0001125 + 0.0003375 + 0.0004375 + 0.0000625 = 0.00095    β = 0.95 / 0.875 = 38/35
 *   active a = p − b = 0.01, 0.01, 0.01, −0.02, mean 0.0025, S_aa = 0.000675, sample sd = 0.015
 */

const P = [0.02, -0.01, 0.03, -0.02];
const B = [0.01, -0.02, 0.02, 0.0];
const DATES = monthEnds(2025, 12, 5);
const AS_OF = DATES[4];
const MID_MONTH = { date: epochDay(2026, 1, 15), value: 95 };

const navDates = [DATES[0], MID_MONTH.date, ...DATES.slice(1)];
const navValues = compound(P);
navValues.splice(1, 0, MID_MONTH.value);

const calculator = new MetricCalculator({
  nav: frame({ F: { dates: navDates, values: navValues } }),
  benchmarks: frame({ B: { dates: DATES, values: compound(B, 1000) } }),
  master: [masterRecord('F', 'B')],
});

const RATE_1_2 = { risk_free: { source: 'constant', annual_rate: 0.012 } } as const;

function result(metric: MetricId, changes: MethodologyChanges): MetricValue {
  const methodology = withChanges(DEFAULT_METHODOLOGY, { ...RATE_1_2, ...changes });
  return calculator.metric({ seriesId: 'F', asOf: AS_OF, window: '4m', metric, methodology });
}

function figure(metric: MetricId, changes: MethodologyChanges = {}): number {
  const outcome = result(metric, changes);
  expect(outcome.reason).toBeUndefined();
  return outcome.value!;
}

const close = (actual: number, expected: number) => expect(actual).toBeCloseTo(expected, 12);
const SD_P = Math.sqrt(0.0017 / 3);
const BETA = 38 / 35;

describe('rate_periods: the per-period risk-free rate follows the frequency', () => {
  it('monthly with A = 252: 0.12 a year is 0.01 a month by default, 0.12 / 252 with rate_periods: annualization', () => {
    const rate = { risk_free: { source: 'constant', annual_rate: 0.12 } } as const;
    // Excess mean 0.005 − 0.01 = −0.005 by default; annualised by √252.
    close(figure('sharpe', { ...rate, annualization: 252 }), (-0.005 / SD_P) * Math.sqrt(252));
    // The other reading: 0.005 − 0.12 / 252.
    close(figure('sharpe', { ...rate, annualization: 252, rate_periods: 'annualization' }), ((0.005 - 0.12 / 252) / SD_P) * Math.sqrt(252));
  });

  it('the default reads as before: monthly rate = annual / 12', () => {
    close(figure('sharpe'), ((0.005 - 0.001) / SD_P) * Math.sqrt(12));
  });
});

describe('rate_conversion: simple c / P or compound (1 + c)^(1/P) − 1', () => {
  it('a 6 % annual rate is 0.5 % a month simple and 1.06^(1/12) − 1 = 0.4867551 % compound', () => {
    // 1.06^(1/12) = e^(ln 1.06 / 12) = e^(0.0582689081 / 12) = e^0.0048557423 = 1.0048675506 (by hand, to 10 digits)
    expect(perPeriodRate(0.06, withChanges(DEFAULT_METHODOLOGY, { rate_conversion: 'compound' }))).toBeCloseTo(0.0048675506, 10);
    expect(perPeriodRate(0.06, DEFAULT_METHODOLOGY)).toBeCloseTo(0.005, 15);
    const rate = { risk_free: { source: 'constant', annual_rate: 0.06 } } as const;
    close(figure('sharpe', { ...rate, rate_conversion: 'compound' }), ((0.005 - (1.06 ** (1 / 12) - 1)) / SD_P) * Math.sqrt(12));
  });
});

describe('alpha_form: compounded, (1 + m)^A − 1 of the per-period Jensen intercept', () => {
  it('m = ē_p − β ē_b = 0.004 − (38/35)(0.0015) = 0.0023714… compounded over 12 months', () => {
    // Excess returns shift p and b by the same 0.001, so β stays 38/35 and m = 0.004 − 0.0015 β.
    const m = 0.004 - BETA * 0.0015;
    expect(m).toBeCloseTo(0.00237142857, 10);
    close(figure('alpha', { alpha_form: 'compounded' }), (1 + m) ** 12 - 1);
    close(figure('alpha'), 12 * m); // jensen, for contrast
    expect(figure('alpha', { alpha_form: 'compounded' })).toBeGreaterThan(figure('alpha'));
  });
});

describe('mar: a fixed annual minimum acceptable return', () => {
  it('mar 0.024 is 0.002 a month: shortfalls −0.012 and −0.022, Σ² = 0.000628', () => {
    const deviation = Math.sqrt((0.000628 / 4) * 12); // √0.001884 = 0.0434050…
    close(figure('downside_deviation', { mar: 0.024 }), deviation);
    close(figure('sortino', { mar: 0.024 }), (12 * (0.005 - 0.002)) / deviation);
  });

  it('is computable without any risk-free rate, and is converted per period like the rate', () => {
    const none = { risk_free: { source: 'none' } } as const;
    close(figure('downside_deviation', { ...none, mar: 0.024 }), Math.sqrt((0.000628 / 4) * 12));
    // Compound: 1.024^(1/12) − 1 per month.
    const target = 1.024 ** (1 / 12) - 1;
    const squares = (-0.01 - target) ** 2 + (-0.02 - target) ** 2;
    close(figure('downside_deviation', { mar: 0.024, rate_conversion: 'compound' }), Math.sqrt((squares / 4) * 12));
  });

  it('a fixed MAR of 0 equals mar: zero', () => {
    close(figure('sortino', { mar: 0 }), figure('sortino', { mar: 'zero' }));
  });
});

describe('drawdown: every NAV observation or the sampled values', () => {
  it('every NAV: the mid-month 95 after the 100 peak is a 5 % fall; sampled: 104.0094 → 101.929212 is 2 %', () => {
    close(figure('max_drawdown'), 1 - 95 / 100);
    close(figure('max_drawdown', { drawdown: 'sampled' }), 1 - 101.929212 / 104.0094); // = 0.02
    expect(result('max_drawdown', {}).observations).toBe(6);
    expect(result('max_drawdown', { drawdown: 'sampled' }).observations).toBe(5);
  });
});

describe('ratio_scale: ratios per period or annualised (Sharpe 1994: a ratio scales with √T)', () => {
  it('Sharpe per period 0.004 / sd(p) = 0.16803, annualised × √12', () => {
    close(figure('sharpe', { ratio_scale: 'per_period' }), 0.004 / SD_P);
    expect(0.004 / SD_P).toBeCloseTo(0.168034, 6);
    close(figure('sharpe'), (0.004 / SD_P) * Math.sqrt(12));
  });

  it('information ratio per period 0.0025 / 0.015 = 1/6', () => {
    close(figure('information_ratio', { ratio_scale: 'per_period' }), 1 / 6);
    close(figure('information_ratio'), Math.sqrt(12) / 6);
  });

  it('Sortino per period with mar zero: 0.005 / √(0.0005 / 4) = √0.2', () => {
    close(figure('sortino', { mar: 'zero', ratio_scale: 'per_period' }), Math.sqrt(0.2));
  });

  it('Treynor per period 0.004 / (38/35) = 0.0036842; annualised × 12 (a return per unit of beta)', () => {
    close(figure('treynor', { ratio_scale: 'per_period' }), 0.004 / BETA);
    close(figure('treynor'), (12 * 0.004) / BETA);
  });

  it('leaves deviations and alpha annualised', () => {
    close(figure('std_dev', { ratio_scale: 'per_period' }), figure('std_dev'));
    close(figure('alpha', { ratio_scale: 'per_period' }), figure('alpha'));
  });
});

describe('return_annualization: over periods or over calendar days', () => {
  it('growth 1.01929212 over 4 months or over 120 days (2025-12-31 to 2026-04-30)', () => {
    const growth = 1.02 * 0.99 * 1.03 * 0.98; // 1.01929212
    expect(DATES[4] - DATES[0]).toBe(31 + 28 + 31 + 30);
    close(figure('return_annualized'), growth ** (12 / 4) - 1);
    close(figure('return_annualized', { return_annualization: 'calendar_days' }), growth ** (365.25 / 120) - 1);
  });

  it('the geometric alpha forms compound over the same time', () => {
    const growthP = 1.02 * 0.99 * 1.03 * 0.98;
    const growthB = 1.01 * 0.98 * 1.02 * 1.0;
    const byDays = (g: number) => g ** (365.25 / 120) - 1;
    close(figure('alpha', { alpha_form: 'excess_return', return_annualization: 'calendar_days' }), byDays(growthP) - byDays(growthB));
  });
});

describe('the declared list of dimensions', () => {
  it('names every dimension of a methodology once, with values the schema accepts', () => {
    const names = METHODOLOGY_DIMENSIONS.map((d) => d.name);
    expect(new Set(names).size).toBe(names.length);
    expect([...names].sort()).toEqual(Object.keys(DEFAULT_METHODOLOGY).sort());
    for (const dimension of METHODOLOGY_DIMENSIONS) {
      for (const value of dimension.values) expect(() => parseMethodologyChanges({ [dimension.name]: value })).not.toThrow();
    }
    for (const [name, values] of Object.entries(DIMENSION_CHOICES)) {
      expect(METHODOLOGY_DIMENSIONS.find((d) => d.name === name)?.values).toEqual(values);
    }
  });

  it('keeps the new dimensions at their old behaviour by default, and accepts them in configuration', () => {
    expect(parseMethodology({ mar: 0.02, drawdown: 'sampled', ratio_scale: 'per_period' })).toMatchObject({ mar: 0.02, drawdown: 'sampled', ratio_scale: 'per_period' });
    expect(() => parseMethodologyChanges({ mar: 'half' })).toThrow();
    expect(() => parseMethodologyChanges({ rate_conversion: 'continuous' })).toThrow();
  });

  it('are written in a run configuration under methodology, the rest keeping their defaults', () => {
    const written = { rate_periods: 'annualization', rate_conversion: 'compound', alpha_form: 'compounded', mar: 0.02, drawdown: 'sampled', ratio_scale: 'per_period', return_annualization: 'calendar_days' };
    const config = RunConfigSchema.parse({ files: { nav: 'nav.csv' }, methodology: written });
    expect(config.methodology).toEqual({ ...DEFAULT_METHODOLOGY, ...written });
    expect(RunConfigSchema.parse({ files: { nav: 'nav.csv' } }).methodology).toEqual(DEFAULT_METHODOLOGY);
  });

  it('marks as resampling exactly the dimensions that change the sampled returns or the per-period rate', () => {
    const resampling = METHODOLOGY_DIMENSIONS.filter((d) => d.resamples).map((d) => d.name);
    expect(resampling.sort()).toEqual(['benchmark', 'frequency', 'rate_conversion', 'rate_periods', 'risk_free', 'window_end']);
  });
});
