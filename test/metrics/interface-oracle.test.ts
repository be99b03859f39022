import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { computeMetrics, DEFAULT_METHODOLOGY, withChanges, type MethodologyChanges } from '../../src/metrics/index.js';
import { frameFromSeries } from '../../src/series/frame.js';
import { runCli, scratchDir, writeFiles } from '../cli/run-cli.js';
import { masterRecord } from './builders.js';
import { dayNumber, isoDate, METRICS, ORACLE_DEFAULT, oracle, type Obs, type OracleAnswer, type OracleRiskFree } from './oracle.js';

/**
 * The public `computeMetrics` (and once the `metrics` command) against the naive oracle of
 * ./oracle.ts, written from interface.md. Every figure must agree to 1e-9 relative, with an
 * absolute floor of 1e-12 near zero; a figure the oracle cannot compute must be null with a reason.
 * All data is invented.
 */

const RELATIVE = 1e-9;
const ABSOLUTE = 1e-12;

function agree(actual: number | null, expected: number | null): boolean {
  if (actual === null || expected === null) return actual === expected;
  return Math.abs(actual - expected) <= RELATIVE * Math.max(Math.abs(actual), Math.abs(expected)) + ABSOLUTE;
}

// ---------------------------------------------------------------------------------------------
// Invented data

/** A small deterministic generator, seeded by fast-check, for the long daily paths. */
function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const isWeekday = (date: string) => ![0, 6].includes(new Date(dayNumber(date) * 86_400_000).getUTCDay());
const lastDayOf = (month: string) => isoDate(dayNumber(`${shift(month, 1)}-01`) - 1);
function shift(month: string, by: number): string {
  const total = Number(month.slice(0, 4)) * 12 + Number(month.slice(5, 7)) - 1 + by;
  return `${Math.floor(total / 12)}-${String((total % 12) + 1).padStart(2, '0')}`;
}
const monthsFrom = (first: string, count: number) => Array.from({ length: count }, (_, k) => shift(first, k));

type RateMode = 'constant' | 'one-a-month' | 'several-a-month';

interface Scenario {
  fund: Obs[];
  benchmarks: Record<string, Obs[]>;
  rates: Obs[];
  constant: number;
  rateMode: RateMode;
  asOf: string;
}

const returnArb = fc.integer({ min: -900, max: 900 }).map((bp) => bp / 10_000);

/** Monthly NAV and benchmark levels from monthly returns, optionally with mid-month NAVs. */
const monthlyScenario = fc
  .record({
    startYear: fc.integer({ min: 2012, max: 2019 }),
    startMonth: fc.integer({ min: 1, max: 12 }),
    months: fc.integer({ min: 14, max: 70 }),
    fund: fc.array(returnArb, { minLength: 70, maxLength: 70 }),
    bench: fc.array(returnArb, { minLength: 70, maxLength: 70 }),
    other: fc.array(returnArb, { minLength: 70, maxLength: 70 }),
    businessMonthEnds: fc.boolean(),
    midMonth: fc.array(fc.tuple(fc.integer({ min: 0, max: 69 }), fc.integer({ min: 50, max: 130 })), { maxLength: 6 }),
    rateMode: fc.constantFrom<RateMode>('constant', 'one-a-month', 'several-a-month'),
    constant: fc.integer({ min: 0, max: 800 }).map((bp) => bp / 10_000),
    rateSeed: fc.integer(),
  })
  .map((s): Scenario => {
    const months = monthsFrom(`${s.startYear}-${String(s.startMonth).padStart(2, '0')}`, s.months + 1);
    // A month-end on the last calendar day, or on the last weekday of the month.
    const endOf = (month: string) => {
      let day = lastDayOf(month);
      while (s.businessMonthEnds && !isWeekday(day)) day = isoDate(dayNumber(day) - 1);
      return day;
    };
    // The wiggle keeps every window's variances away from zero whatever fast-check draws.
    const wiggle = (k: number, phase: number) => 0.004 * Math.sin(1.3 * k + phase);
    const levels = (returns: number[], phase: number, start: number) => {
      const out = [start];
      for (let k = 1; k < months.length; k++) out.push(out[k - 1] * (1 + returns[k - 1] + wiggle(k, phase)));
      return out;
    };
    const fundLevels = levels(s.fund, 0, 100);
    const fund: Obs[] = months.map((month, k) => ({ date: endOf(month), value: fundLevels[k] }));
    for (const [k, percent] of s.midMonth) {
      if (k < 1 || k >= months.length) continue;
      const date = `${months[k]}-14`;
      if (!fund.some((o) => o.date === date)) fund.push({ date, value: (fundLevels[k - 1] * percent) / 100 });
    }
    fund.sort((a, b) => (a.date < b.date ? -1 : 1));
    const benchmarks = {
      B1: months.map((month, k) => ({ date: endOf(month), value: levels(s.bench, 1, 1000)[k] })),
      B2: months.map((month, k) => ({ date: lastDayOf(month), value: levels(s.other, 2, 50)[k] })),
    };
    const random = mulberry32(s.rateSeed);
    const rates: Obs[] = [];
    for (const month of months) {
      if (s.rateMode === 'one-a-month') rates.push({ date: lastDayOf(month), value: 0.06 * random() });
      else for (const day of ['01', '10', '15', '28'].filter(() => random() < 0.6)) rates.push({ date: `${month}-${day}`, value: 0.06 * random() });
    }
    return { fund, benchmarks, rates, constant: s.constant, rateMode: s.rateMode, asOf: lastDayOf(months[months.length - 1]) };
  });

/** Weekday NAVs and levels over several years, with holidays, for weekly and daily sampling. */
const dailyScenario = fc
  .record({
    startYear: fc.integer({ min: 2014, max: 2019 }),
    startMonth: fc.integer({ min: 1, max: 12 }),
    months: fc.integer({ min: 14, max: 40 }),
    seed: fc.integer(),
    drift: fc.array(fc.integer({ min: -30, max: 30 }).map((bp) => bp / 10_000), { minLength: 41, maxLength: 41 }),
    vol: fc.integer({ min: 2, max: 25 }).map((bp) => bp / 1000),
    rateMode: fc.constantFrom<RateMode>('constant', 'one-a-month', 'several-a-month'),
    constant: fc.integer({ min: 0, max: 800 }).map((bp) => bp / 10_000),
  })
  .map((s): Scenario => {
    const random = mulberry32(s.seed);
    const months = monthsFrom(`${s.startYear}-${String(s.startMonth).padStart(2, '0')}`, s.months + 1);
    const days: string[] = [];
    for (let d = dayNumber(`${months[0]}-01`); d <= dayNumber(lastDayOf(months[months.length - 1])); d++) {
      const date = isoDate(d);
      if (isWeekday(date)) days.push(date);
    }
    const fund: Obs[] = [];
    const bench: Obs[] = [];
    let nav = 100;
    let level = 1000;
    for (const date of days) {
      const k = months.indexOf(date.slice(0, 7));
      const market = s.drift[k] / 21 + s.vol * (random() - 0.5);
      level *= 1 + market;
      nav *= 1 + 0.9 * market + (s.vol / 3) * (random() - 0.5);
      if (random() > 0.03) fund.push({ date, value: nav }); // a fund holiday
      if (random() > 0.03) bench.push({ date, value: level }); // a benchmark holiday
    }
    const rates: Obs[] = [];
    for (const month of months) {
      if (s.rateMode === 'one-a-month') rates.push({ date: lastDayOf(month), value: 0.06 * random() });
      else for (const day of ['01', '10', '15', '28'].filter(() => random() < 0.6)) rates.push({ date: `${month}-${day}`, value: 0.06 * random() });
    }
    return { fund, benchmarks: { B1: bench, B2: bench.map((o) => ({ date: o.date, value: o.value * (1 + 0.01 * Math.sin(dayNumber(o.date))) })) }, rates, constant: s.constant, rateMode: s.rateMode, asOf: days[days.length - 1] };
  });

// ---------------------------------------------------------------------------------------------
// The library, fed the way the command feeds it

const frameOf = (series: Record<string, Obs[]>) =>
  frameFromSeries(Object.entries(series).map(([id, obs]) => ({ id, dates: obs.map((o) => dayNumber(o.date)), values: obs.map((o) => o.value) })));

function library(scenario: Scenario, windows: string[], changes: MethodologyChanges) {
  const useRates = scenario.rateMode !== 'constant';
  return computeMetrics({
    nav: frameOf({ F: scenario.fund }),
    benchmarks: frameOf(scenario.benchmarks),
    master: [masterRecord('F', 'B1', 'RF')],
    rates: useRates ? frameOf({ RF: scenario.rates }) : undefined,
    constantRate: useRates ? undefined : scenario.constant,
    asOf: dayNumber(scenario.asOf),
    windows,
    methodology: withChanges(DEFAULT_METHODOLOGY, changes),
  });
}

const WINDOW_MONTHS: Record<string, number> = { '1y': 12, '3y': 36, '5y': 60, '18m': 18 };

function riskFreeOf(scenario: Scenario): OracleRiskFree {
  return scenario.rateMode === 'constant' ? { constant: scenario.constant } : { rates: scenario.rates };
}

function expected(scenario: Scenario, window: string, changes: MethodologyChanges): OracleAnswer {
  return oracle({
    fund: scenario.fund,
    benchmarks: scenario.benchmarks,
    benchmarkId: 'B1',
    riskFree: riskFreeOf(scenario),
    asOf: scenario.asOf,
    months: WINDOW_MONTHS[window],
    methodology: { ...ORACLE_DEFAULT, ...(changes as object) },
  });
}

/** Every disagreement between the answer's rows and the oracle, as readable lines. */
function disagreements(rows: ReadonlyArray<{ window: string; metric: string; value: number | null; reason?: string }>, want: (window: string) => OracleAnswer): string[] {
  const problems: string[] = [];
  const cache = new Map<string, OracleAnswer>();
  for (const row of rows) {
    if (!cache.has(row.window)) cache.set(row.window, want(row.window));
    const oracleValue = cache.get(row.window)![row.metric as keyof OracleAnswer];
    if (!agree(row.value, oracleValue)) problems.push(`${row.window} ${row.metric}: library ${row.value} (${row.reason ?? ''}), oracle ${oracleValue}`);
    if (row.value === null && !row.reason) problems.push(`${row.window} ${row.metric}: null without a reason`);
  }
  return problems;
}

const VARIANTS: Array<[string, MethodologyChanges]> = [
  ['default', {}],
  ['sd_denominator: population', { sd_denominator: 'population' }],
  ['return_type: log', { return_type: 'log' }],
  ['regression: raw', { regression: 'raw' }],
  ['alpha_form: jensen_geometric', { alpha_form: 'jensen_geometric' }],
  ['alpha_form: excess_return', { alpha_form: 'excess_return' }],
  ['mar: zero', { mar: 'zero' }],
  ['dd_denominator: below', { dd_denominator: 'below' }],
  ['annualization: 52', { annualization: 52 }],
  ['annualization: 252', { annualization: 252 }],
  ['annualization: 365', { annualization: 365 }],
  ['frequency: weekly', { frequency: 'weekly' }],
  ['frequency: daily', { frequency: 'daily' }],
  ['window_end: -1', { window_end: -1 }],
  ['benchmark: B2', { benchmark: 'B2' }],
  ['log + raw', { return_type: 'log', regression: 'raw' }],
  ['population + log + jensen_geometric', { sd_denominator: 'population', return_type: 'log', alpha_form: 'jensen_geometric' }],
  ['raw + jensen_geometric', { regression: 'raw', alpha_form: 'jensen_geometric' }],
  ['mar zero + dd below + log', { mar: 'zero', dd_denominator: 'below', return_type: 'log' }],
  ['weekly + population', { frequency: 'weekly', sd_denominator: 'population' }],
  ['daily + annualization 260 + log', { frequency: 'daily', annualization: 260, return_type: 'log' }],
  ['weekly + window_end -1 + benchmark B2', { frequency: 'weekly', window_end: -1, benchmark: 'B2' }],
  ['annualization 252 + excess_return', { annualization: 252, alpha_form: 'excess_return' }],
  ['window_end -2 + raw + dd below', { window_end: -2, regression: 'raw', dd_denominator: 'below' }],
  ['rate_periods: annualization + annualization 252', { rate_periods: 'annualization', annualization: 252 }],
  ['rate_conversion: compound', { rate_conversion: 'compound' }],
  ['rate_conversion: compound + annualization 52', { rate_conversion: 'compound', annualization: 52 }],
  ['alpha_form: compounded', { alpha_form: 'compounded' }],
  ['alpha_form: compounded + raw', { alpha_form: 'compounded', regression: 'raw' }],
  ['mar: 0.02', { mar: 0.02 }],
  ['mar: 0.05 + dd below + log + compound', { mar: 0.05, dd_denominator: 'below', return_type: 'log', rate_conversion: 'compound' }],
  ['drawdown: sampled', { drawdown: 'sampled' }],
  ['ratio_scale: per_period', { ratio_scale: 'per_period' }],
  ['ratio_scale: per_period + population + mar zero', { ratio_scale: 'per_period', sd_denominator: 'population', mar: 'zero' }],
  ['return_annualization: calendar_days', { return_annualization: 'calendar_days' }],
  ['calendar_days + jensen_geometric', { return_annualization: 'calendar_days', alpha_form: 'jensen_geometric' }],
  ['weekly + drawdown sampled + per_period', { frequency: 'weekly', drawdown: 'sampled', ratio_scale: 'per_period' }],
  ['daily + calendar_days + excess_return + compound', { frequency: 'daily', return_annualization: 'calendar_days', alpha_form: 'excess_return', rate_conversion: 'compound' }],
  ['daily + rate_periods annualization + annualization 365', { frequency: 'daily', rate_periods: 'annualization', annualization: 365 }],
];

const WINDOWS = ['1y', '3y', '5y', '18m'];

describe('computeMetrics against the interface oracle, monthly NAV series', () => {
  for (const [name, changes] of VARIANTS) {
    it(name, () => {
      fc.assert(
        fc.property(monthlyScenario, (scenario) => {
          const answer = library(scenario, WINDOWS, changes);
          expect(answer.metrics).toHaveLength(WINDOWS.length * METRICS.length);
          expect(disagreements(answer.metrics, (w) => expected(scenario, w, changes))).toEqual([]);
        }),
        { numRuns: 40 },
      );
    });
  }
});

describe('computeMetrics against the interface oracle, daily NAV series sampled weekly and daily', () => {
  const DAILY_VARIANTS = VARIANTS.filter(([, c]) => c.frequency !== undefined || c.window_end !== undefined).concat([
    ['weekly + log + raw', { frequency: 'weekly', return_type: 'log', regression: 'raw' }],
    ['daily + mar zero + jensen_geometric', { frequency: 'daily', mar: 'zero', alpha_form: 'jensen_geometric' }],
    ['weekly + annualization 12', { frequency: 'weekly', annualization: 12 }],
    ['monthly on daily data', {}],
  ]);
  for (const [name, changes] of DAILY_VARIANTS) {
    it(name, () => {
      fc.assert(
        fc.property(dailyScenario, (scenario) => {
          const answer = library(scenario, ['1y', '18m', '3y'], changes);
          expect(disagreements(answer.metrics, (w) => expected(scenario, w, changes))).toEqual([]);
        }),
        { numRuns: 12 },
      );
    });
  }
});

describe('the oracle can fail', () => {
  it('a changed methodology gives different figures, so agreement is not vacuous', () => {
    const scenario = fc.sample(monthlyScenario.filter((s) => s.rateMode === 'constant'), { seed: 7, numRuns: 1 })[0];
    const answer = library(scenario, ['1y'], {});
    expect(disagreements(answer.metrics, (w) => expected(scenario, w, {}))).toEqual([]);
    // Annualising by 52 instead of 12 changes every figure but beta, r_squared and max_drawdown.
    const wrong = disagreements(answer.metrics, (w) => expected(scenario, w, { annualization: 52 }));
    expect(wrong.map((line) => line.split(':')[0])).toEqual(
      ['return_annualized', 'std_dev', 'downside_deviation', 'alpha', 'sharpe', 'sortino', 'tracking_error', 'information_ratio', 'treynor'].map((m) => `1y ${m}`),
    );
  });

  it('short history: every figure of a window longer than the data is null with a reason', () => {
    const scenario = fc.sample(monthlyScenario, { seed: 11, numRuns: 1 })[0];
    const answer = library(scenario, ['10y'], {});
    expect(answer.metrics.every((row) => row.value === null && /history too short/.test(row.reason ?? ''))).toBe(true);
  });
});

// ---------------------------------------------------------------------------------------------
// The command line, end to end once

describe('navassay metrics --format json against the oracle', () => {
  const scenario = fc.sample(
    monthlyScenario.filter((s) => s.fund.length >= 62 && s.rateMode === 'several-a-month'),
    { seed: 3, numRuns: 1 },
  )[0];
  const dir = scratchDir();
  const csv = (header: string, id: string, rows: Obs[]) => [header, ...rows.map((o) => `${id},${o.date},${o.value}`)].join('\n') + '\n';
  writeFiles(dir, {
    'nav.csv': csv('series_id,date,nav', 'F', scenario.fund),
    'benchmarks.csv': [csv('benchmark_id,date,level', 'B1', scenario.benchmarks.B1), csv('', 'B2', scenario.benchmarks.B2).slice(1)].join(''),
    'master.csv': 'series_id,benchmark_id,rate_id\nF,B1,RF\n',
    'rates.csv': csv('rate_id,date,rate', 'RF', scenario.rates),
  });
  const file = (name: string) => join(dir, name);
  const base = ['metrics', '--nav', file('nav.csv'), '--benchmarks', file('benchmarks.csv'), '--master', file('master.csv')];
  const tail = ['--as-of', scenario.asOf, '--windows', '1y,3y,5y,18m', '--format', 'json', '--out', file('answer.json')];

  async function answerOf(args: string[]) {
    const run = await runCli(...base, ...args, ...tail);
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    return JSON.parse(readFileSync(file('answer.json'), 'utf8')) as { as_of: string; metrics: Array<{ window: string; metric: string; value: number | null; reason?: string }> };
  }

  it('with --rf 0.02', async () => {
    const answer = await answerOf(['--rf', '0.02']);
    expect(answer.as_of).toBe(scenario.asOf);
    expect(answer.metrics.filter((row) => row.value !== null).length).toBeGreaterThanOrEqual(36);
    expect(disagreements(answer.metrics, (w) => expected({ ...scenario, rateMode: 'constant', constant: 0.02 }, w, {}))).toEqual([]);
  });

  it('with --rates, and with --set for two dimensions', async () => {
    const answer = await answerOf(['--rates', file('rates.csv')]);
    // Some months have no rate fixing, so some rate-dependent figures are null (with a reason).
    expect(answer.metrics.filter((row) => row.value !== null).length).toBeGreaterThanOrEqual(24);
    expect(disagreements(answer.metrics, (w) => expected(scenario, w, {}))).toEqual([]);
    const changes: MethodologyChanges = { sd_denominator: 'population', frequency: 'weekly' };
    const varied = await answerOf(['--rates', file('rates.csv'), '--set', 'sd_denominator=population', '--set', 'frequency=weekly']);
    expect(disagreements(varied.metrics, (w) => expected(scenario, w, changes))).toEqual([]);
  });
});

describe('consequences of the documented readings', () => {
  it('month-end NAVs on the last calendar day: weekly is monthly annualised by 52 with the rate spread over 52 periods', () => {
    // The identity needs a rate in every month: a month without one has no monthly rate (null),
    // while a month-long "week" may borrow the latest rate of the 31 days before its end.
    const everyMonthHasARate = (s: { fund: Array<{ date: string }>; rates: Array<{ date: string }>; rateMode: string }) =>
      s.rateMode !== 'several-a-month' || s.fund.every((o) => s.rates.some((r) => r.date.slice(0, 7) === o.date.slice(0, 7)));
    const monthEndOnly = monthlyScenario.filter((s) => s.fund.every((o) => o.date === lastDayOf(o.date.slice(0, 7))) && everyMonthHasARate(s));
    fc.assert(
      fc.property(monthEndOnly, (scenario) => {
        const weekly = library(scenario, ['1y', '3y'], { frequency: 'weekly' }).metrics;
        // Weekly spreads the annual rate over 52 periods (its frequency's own); monthly does so
        // only with `rate_periods: annualization`, since by default a monthly rate is annual / 12.
        const monthly52 = library(scenario, ['1y', '3y'], { annualization: 52, rate_periods: 'annualization' }).metrics;
        weekly.forEach((row, i) => expect(agree(row.value, monthly52[i].value)).toBe(true));
      }),
      { numRuns: 30 },
    );
  });

  it('an as-of day inside a month: its month-end value is the last on or before it', () => {
    fc.assert(
      fc.property(dailyScenario, fc.integer({ min: 3, max: 20 }), fc.constantFrom<MethodologyChanges>({}, { frequency: 'weekly' }, { frequency: 'daily', window_end: -1 }), (full, back, changes) => {
        const scenario = { ...full, asOf: isoDate(dayNumber(full.asOf) - back) };
        const answer = library(scenario, ['1y', '18m'], changes);
        expect(answer.as_of).toBe(scenario.asOf);
        expect(disagreements(answer.metrics, (w) => expected(scenario, w, changes))).toEqual([]);
      }),
      { numRuns: 20 },
    );
  });
});
