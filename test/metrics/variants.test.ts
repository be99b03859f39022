import { describe, expect, it } from 'vitest';
import { epochDay } from '../../src/calendar/days.js';
import {
  DEFAULT_METHODOLOGY,
  MetricCalculator,
  withChanges,
  type MetricId,
  type MethodologyChanges,
} from '../../src/metrics/index.js';
import {
  compound,
  covarianceNaive,
  frame,
  geometricAnnualized,
  masterRecord,
  mean,
  minus,
  monthEnds,
  sdNaive,
} from './builders.js';

/**
 * Methodology variants on small invented data. Every expected value is computed here with a
 * plain formula over plain arrays, independently of src/metrics.
 */

// 13 monthly returns: level 0 is the 2025-05 month-end, level 13 the 2026-06 month-end.
const FUND = [0.012, -0.021, 0.034, 0.005, -0.013, 0.027, 0.009, -0.031, 0.018, 0.022, -0.007, 0.015, 0.004];
const BENCH = [0.01, -0.018, 0.029, 0.007, -0.01, 0.021, 0.011, -0.026, 0.015, 0.019, -0.004, 0.012, 0.006];
const OTHER = [0.002, 0.004, -0.003, 0.006, 0.001, -0.002, 0.005, 0.003, -0.001, 0.004, 0.002, 0.0, 0.003];
const DATES = monthEnds(2025, 5, 14);
const AS_OF = DATES[13];

/** Two rate fixings a month (1st and 15th); the month's rate is their mean. */
function ratesFor(monthOffset: number): [number, number] {
  return [0.03 + 0.001 * monthOffset, 0.034 + 0.0005 * monthOffset];
}
const RATE_DATES: number[] = [];
const RATE_VALUES: number[] = [];
for (let k = 0; k < 14; k++) {
  const year = 2025 + Math.floor((4 + k) / 12);
  const month = ((4 + k) % 12) + 1;
  const [first, mid] = ratesFor(k);
  RATE_DATES.push(epochDay(year, month, 1), epochDay(year, month, 15));
  RATE_VALUES.push(first, mid);
}
/** Per-month risk-free return of return j (month offset j + 1): mean of the month's rates / A. */
const monthlyRate = (j: number, A = 12) => mean(ratesFor(j + 1)) / A;

// Mid-month NAVs: a dip inside 2025-11 that the month-ends alone would not show, and a crash
// after the as-of day that must not count.
const FUND_LEVELS = compound(FUND);
const MID_MONTH = [
  { date: epochDay(2025, 11, 14), value: FUND_LEVELS[6] * 0.9 },
  { date: epochDay(2026, 7, 15), value: FUND_LEVELS[13] * 0.5 },
];
const fundSeries = [
  ...DATES.map((date, i) => ({ date, value: FUND_LEVELS[i] })),
  ...MID_MONTH,
].sort((a, b) => a.date - b.date);

const inputs = {
  nav: frame({ F: { dates: fundSeries.map((o) => o.date), values: fundSeries.map((o) => o.value) } }),
  benchmarks: frame({ B1: { dates: DATES, values: compound(BENCH) }, B2: { dates: DATES, values: compound(OTHER, 50) } }),
  master: [masterRecord('F', 'B1', 'RF')],
  rates: frame({ RF: { dates: RATE_DATES, values: RATE_VALUES } }),
};
const calculator = new MetricCalculator(inputs);

function figure(metric: MetricId, changes: MethodologyChanges = {}, asOf = AS_OF): number {
  const result = calculator.metric({ seriesId: 'F', asOf, window: '1y', metric, methodology: withChanges(DEFAULT_METHODOLOGY, changes) });
  expect(result.reason).toBeUndefined();
  return result.value!;
}

/** The 1y window's returns ending `end` months before the as-of month (0 or 1). */
function windowData(end = 0) {
  const js = Array.from({ length: 12 }, (_, i) => i + 1 - end);
  const p = js.map((j) => FUND[j]);
  const b = js.map((j) => BENCH[j]);
  const o = js.map((j) => OTHER[j]);
  const f = js.map((j) => monthlyRate(j));
  return { p, b, o, f, ep: minus(p, f), eb: minus(b, f) };
}

const close = (actual: number, expected: number) => expect(actual).toBeCloseTo(expected, 12);

describe('default monthly methodology', () => {
  const { p, b, f, ep, eb } = windowData();
  const beta = covarianceNaive(ep, eb) / covarianceNaive(eb, eb);
  const downside = Math.sqrt(ep.reduce((s, e) => s + Math.min(e, 0) ** 2, 0) / 12) * Math.sqrt(12);
  const active = minus(p, b);

  it('computes every metric from the formulas of interface.md', () => {
    close(figure('return_annualized'), geometricAnnualized(p, 12));
    close(figure('std_dev'), sdNaive(p) * Math.sqrt(12));
    close(figure('beta'), beta);
    close(figure('alpha'), 12 * (mean(ep) - beta * mean(eb)));
    close(figure('r_squared'), covarianceNaive(ep, eb) ** 2 / (covarianceNaive(ep, ep) * covarianceNaive(eb, eb)));
    close(figure('sharpe'), (mean(ep) / sdNaive(ep)) * Math.sqrt(12));
    close(figure('downside_deviation'), downside);
    close(figure('sortino'), (12 * mean(ep)) / downside);
    close(figure('tracking_error'), sdNaive(active) * Math.sqrt(12));
    close(figure('information_ratio'), (12 * mean(active)) / (sdNaive(active) * Math.sqrt(12)));
    close(figure('treynor'), (12 * mean(ep)) / beta);
    expect(f[0]).toBeCloseTo((0.032 + 0.035) / 2 / 12, 15); // the 2025-07 fixings, averaged, a month's worth
  });

  it('max drawdown uses every NAV observation in the window, and none after the as-of day', () => {
    const drawdown = (path: number[]) => {
      let peak = -Infinity;
      let deepest = 0;
      for (const v of path) {
        peak = Math.max(peak, v);
        deepest = Math.max(deepest, (peak - v) / peak);
      }
      return deepest;
    };
    const deepest = drawdown(fundSeries.filter((o) => o.date >= DATES[1] && o.date <= AS_OF).map((o) => o.value));
    expect(deepest).toBeGreaterThan(drawdown(FUND_LEVELS.slice(1)) + 0.05); // the mid-month dip is the deepest fall
    close(figure('max_drawdown'), deepest);
    const result = calculator.metric({ seriesId: 'F', asOf: AS_OF, window: '1y', metric: 'max_drawdown', methodology: DEFAULT_METHODOLOGY });
    expect(result.observations).toBe(14);
  });
});

describe('methodology variants', () => {
  const { p, b, o, f, ep, eb } = windowData();

  it('sd_denominator population', () => {
    close(figure('std_dev', { sd_denominator: 'population' }), sdNaive(p, true) * Math.sqrt(12));
    close(figure('sharpe', { sd_denominator: 'population' }), (mean(ep) / sdNaive(ep, true)) * Math.sqrt(12));
    close(figure('tracking_error', { sd_denominator: 'population' }), sdNaive(minus(p, b), true) * Math.sqrt(12));
    close(figure('beta', { sd_denominator: 'population' }), covarianceNaive(ep, eb, true) / covarianceNaive(eb, eb, true));
  });

  it('return_type log', () => {
    const lp = p.map(Math.log1p);
    const lb = b.map(Math.log1p);
    const lep = minus(lp, f);
    const leb = minus(lb, f);
    close(figure('std_dev', { return_type: 'log' }), sdNaive(lp) * Math.sqrt(12));
    close(figure('sharpe', { return_type: 'log' }), (mean(lep) / sdNaive(lep)) * Math.sqrt(12));
    close(figure('beta', { return_type: 'log' }), covarianceNaive(lep, leb) / covarianceNaive(leb, leb));
    close(figure('tracking_error', { return_type: 'log' }), sdNaive(minus(lp, lb)) * Math.sqrt(12));
    // Annualised returns always compound the simple returns.
    close(figure('return_annualized', { return_type: 'log' }), geometricAnnualized(p, 12));
  });

  it('regression raw', () => {
    const beta = covarianceNaive(p, b) / covarianceNaive(b, b);
    close(figure('beta', { regression: 'raw' }), beta);
    close(figure('alpha', { regression: 'raw' }), 12 * (mean(p) - beta * mean(b)));
    close(figure('r_squared', { regression: 'raw' }), covarianceNaive(p, b) ** 2 / (covarianceNaive(p, p) * covarianceNaive(b, b)));
    // Treynor keeps excess returns in its numerator.
    close(figure('treynor', { regression: 'raw' }), (12 * mean(ep)) / beta);
  });

  it('alpha_form jensen_geometric and excess_return', () => {
    const beta = covarianceNaive(ep, eb) / covarianceNaive(eb, eb);
    const [gp, gb, gf] = [p, b, f].map((r) => geometricAnnualized(r, 12));
    close(figure('alpha', { alpha_form: 'jensen_geometric' }), gp - gf - beta * (gb - gf));
    close(figure('alpha', { alpha_form: 'excess_return' }), gp - gb);
  });

  it('mar zero', () => {
    const downside = Math.sqrt(p.reduce((s, r) => s + Math.min(r, 0) ** 2, 0) / 12) * Math.sqrt(12);
    close(figure('downside_deviation', { mar: 'zero' }), downside);
    close(figure('sortino', { mar: 'zero' }), (12 * mean(p)) / downside);
  });

  it('dd_denominator below', () => {
    const below = ep.filter((e) => e < 0);
    const downside = Math.sqrt(below.reduce((s, e) => s + e * e, 0) / below.length) * Math.sqrt(12);
    expect(below.length).toBeLessThan(12);
    close(figure('downside_deviation', { dd_denominator: 'below' }), downside);
    close(figure('sortino', { dd_denominator: 'below' }), (12 * mean(ep)) / downside);
  });

  it('annualization 52 on monthly returns: the rate stays annual / 12 (interface.md), / 52 only with rate_periods: annualization', () => {
    close(figure('std_dev', { annualization: 52 }), sdNaive(p) * Math.sqrt(52));
    // Changing A alone never changes the excess returns: the monthly rate is the annual one / 12.
    close(figure('sharpe', { annualization: 52 }), (mean(ep) / sdNaive(ep)) * Math.sqrt(52));
    close(figure('alpha', { annualization: 52 }), (52 / 12) * figure('alpha'));
    close(figure('return_annualized', { annualization: 52 }), geometricAnnualized(p, 52));
    const f52 = p.map((_, i) => monthlyRate(i + 1, 52));
    const ep52 = minus(p, f52);
    close(figure('sharpe', { annualization: 52, rate_periods: 'annualization' }), (mean(ep52) / sdNaive(ep52)) * Math.sqrt(52));
  });

  it('window_end −1 ends the window a month before the as-of month', () => {
    const earlier = windowData(1);
    const beta = covarianceNaive(earlier.ep, earlier.eb) / covarianceNaive(earlier.eb, earlier.eb);
    close(figure('std_dev', { window_end: -1 }), sdNaive(earlier.p) * Math.sqrt(12));
    close(figure('beta', { window_end: -1 }), beta);
    expect(figure('std_dev', { window_end: -1 })).not.toBeCloseTo(figure('std_dev'), 6);
  });

  it('benchmark override', () => {
    const eo = minus(o, f);
    close(figure('beta', { benchmark: 'B2' }), covarianceNaive(ep, eo) / covarianceNaive(eo, eo));
    close(figure('tracking_error', { benchmark: 'B2' }), sdNaive(minus(p, o)) * Math.sqrt(12));
  });
});

// ---------------------------------------------------------------------------------------------
// Weekly and daily sampling over the same calendar span, on invented weekday series.

const DAY_MS = 86_400_000;
const toDate = (day: number) => new Date(day * DAY_MS);
const isWeekend = (day: number) => [0, 6].includes(toDate(day).getUTCDay());
const mondayOf = (day: number) => day - ((toDate(day).getUTCDay() + 6) % 7);

/** A deterministic wiggle, different for each seed. */
const wiggle = (i: number, seed: number) => 0.004 * Math.sin(i * 1.7 + seed) + 0.001 * Math.cos(i * 0.3 * seed);

const START = epochDay(2025, 5, 1);
const END = epochDay(2026, 6, 30);
const WEEKDAYS: number[] = [];
for (let d = START; d <= END; d++) if (!isWeekend(d)) WEEKDAYS.push(d);
const BENCH_HOLIDAY = epochDay(2025, 12, 26); // a Friday the benchmark does not publish
const dailyLevels = (seed: number) => compound(WEEKDAYS.slice(1).map((_, i) => wiggle(i, seed)));
const FUND_DAILY = dailyLevels(1);
const BENCH_DAILY_ALL = dailyLevels(2);
const BENCH_DAYS = WEEKDAYS.filter((d) => d !== BENCH_HOLIDAY);
const BENCH_DAILY = BENCH_DAYS.map((d) => BENCH_DAILY_ALL[WEEKDAYS.indexOf(d)]);
const DAILY_RATE = (d: number) => 0.02 + 0.00001 * (d - START);

const dailyCalculator = new MetricCalculator({
  nav: frame({ D: { dates: WEEKDAYS, values: FUND_DAILY } }),
  benchmarks: frame({ BD: { dates: BENCH_DAYS, values: BENCH_DAILY } }),
  master: [masterRecord('D', 'BD', 'RD')],
  rates: frame({ RD: { dates: WEEKDAYS, values: WEEKDAYS.map(DAILY_RATE) } }),
});

function dailyFigure(metric: MetricId, changes: MethodologyChanges): number {
  const methodology = withChanges(DEFAULT_METHODOLOGY, changes);
  const result = dailyCalculator.metric({ seriesId: 'D', asOf: END, window: '1y', metric, methodology });
  expect(result.reason).toBeUndefined();
  return result.value!;
}

const lastOnOrBefore = (days: number[], limit: number) => days.filter((d) => d <= limit).at(-1)!;
const SPAN_START = lastOnOrBefore(WEEKDAYS, epochDay(2025, 6, 30));
const SPAN_END = lastOnOrBefore(WEEKDAYS, END);
const fundAt = (d: number) => FUND_DAILY[WEEKDAYS.indexOf(d)];
const benchOnOrBefore = (limit: number) => BENCH_DAILY[BENCH_DAYS.indexOf(lastOnOrBefore(BENCH_DAYS, limit))];
const simpleReturns = (levels: number[]) => levels.slice(1).map((v, i) => v / levels[i] - 1);

describe('weekly and daily frequencies keep the window calendar span', () => {
  it('weekly: the last value of each ISO week, annualised by 52, rates averaged over the days each return covers', () => {
    const inside = WEEKDAYS.filter((d) => d > SPAN_START && d <= SPAN_END);
    const points = [SPAN_START, ...inside.filter((d, i) => i === inside.length - 1 || mondayOf(inside[i + 1]) !== mondayOf(d))];
    const p = simpleReturns(points.map(fundAt));
    const b = simpleReturns(points.map((d, i) => (i === 0 ? benchOnOrBefore(d) : benchOnOrBefore(mondayOf(d) + 6))));
    // The rates of the days each return covers: after its start point, up to its end point.
    const f = points.slice(1).map((d, k) => mean(WEEKDAYS.filter((r) => r > points[k] && r <= d).map(DAILY_RATE)) / 52);
    const ep = minus(p, f);
    const eb = minus(b, f);
    expect(p.length).toBeGreaterThan(50);
    close(dailyFigure('std_dev', { frequency: 'weekly' }), sdNaive(p) * Math.sqrt(52));
    close(dailyFigure('sharpe', { frequency: 'weekly' }), (mean(ep) / sdNaive(ep)) * Math.sqrt(52));
    close(dailyFigure('beta', { frequency: 'weekly' }), covarianceNaive(ep, eb) / covarianceNaive(eb, eb));
    close(dailyFigure('return_annualized', { frequency: 'weekly' }), geometricAnnualized(p, 52));
  });

  it('daily: every observation, annualised by 252; the benchmark holiday carries its last level', () => {
    const points = WEEKDAYS.filter((d) => d >= SPAN_START && d <= SPAN_END);
    const p = simpleReturns(points.map(fundAt));
    const b = simpleReturns(points.map(benchOnOrBefore));
    const f = points.slice(1).map((d) => DAILY_RATE(d) / 252);
    const ep = minus(p, f);
    const eb = minus(b, f);
    close(dailyFigure('std_dev', { frequency: 'daily' }), sdNaive(p) * Math.sqrt(252));
    close(dailyFigure('tracking_error', { frequency: 'daily' }), sdNaive(minus(p, b)) * Math.sqrt(252));
    close(dailyFigure('beta', { frequency: 'daily' }), covarianceNaive(ep, eb) / covarianceNaive(eb, eb));
    close(dailyFigure('std_dev', { frequency: 'daily', annualization: 260 }), sdNaive(p) * Math.sqrt(260));
  });
});
