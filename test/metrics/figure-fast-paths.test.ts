import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { epochDay, formatIsoDate, isoWeekStart, isoWeekday, monthIndex } from '../../src/calendar/days.js';
import { computeMetrics, type MetricInputs, type MetricRow } from '../../src/metrics/compute.js';
import { DEFAULT_METHODOLOGY, withChanges, type Frequency } from '../../src/metrics/methodology.js';
import { coverWindow, FundPeriods, laterMonthlyStart, returnsAt, sampleFund, samplePoints } from '../../src/metrics/sampling.js';
import { log1pAll, sum, sumOfLog1p } from '../../src/metrics/statistics.js';
import { windowMonths } from '../../src/metrics/windows.js';
import { halfUnitOfPrinted, printedDecimals } from '../../src/reconcile/precision.js';
import { frameFromSeries } from '../../src/series/frame.js';
import { masterRecord } from './builders.js';
import { AS_OF, universe } from '../reconcile/universe.js';

/**
 * The fast paths of the figures and of reconciliation against the plain computations, bit for bit
 * (Object.is, so −0 and NaN count):
 * - a series' shorter monthly windows cut from its longest window's sample;
 * - the sample points written into a typed array, each observation's period computed once;
 * - Σ ln(1 + r) summed without an array of logarithms;
 * - half units of the printed precision read from a table.
 */

const WINDOWS = ['1y', '5y', '3y', '18m', '2y', '6y'];

/** Every figure of every window with one calculator, against each window computed alone by a fresh one. */
function expectSameAsAlone(data: MetricInputs, methodology = DEFAULT_METHODOLOGY, windows = WINDOWS): void {
  const together = computeMetrics({ ...data, asOf: AS_OF, windows, methodology }).metrics;
  const alone = windows.flatMap((window) => computeMetrics({ ...data, asOf: AS_OF, windows: [window], methodology }).metrics);
  expect(together.length).toBe(alone.length);
  const key = (row: MetricRow) => `${row.series_id} ${row.window} ${row.metric}`;
  const byKey = new Map(alone.map((row) => [key(row), row]));
  for (const row of together) {
    const plain = byKey.get(key(row))!;
    expect(Object.is(row.value, plain.value), `${key(row)}: ${row.value} vs ${plain.value}`).toBe(true);
    expect(row).toEqual(plain);
    expect(Object.keys(row)).toEqual(Object.keys(plain));
  }
}

describe('shorter monthly windows cut from the longest one', () => {
  const { days, data } = universe();

  it('give every figure each window gives alone, in the order asked', () => {
    expectSameAsAlone(data);
    const rows = computeMetrics({ ...data, asOf: AS_OF, windows: ['1y', '5y'], methodology: DEFAULT_METHODOLOGY }).metrics;
    expect(rows.slice(0, 12).every((row) => row.window === '1y')).toBe(true);
  });

  it('give the same figures under a shifted window end and other frequencies', () => {
    for (const changes of [{ window_end: -1 }, { frequency: 'weekly' as const }, { drawdown: 'sampled' as const }]) {
      expectSameAsAlone(data, withChanges(DEFAULT_METHODOLOGY, changes));
    }
  });

  it('give the same figures and reasons when a window is missing months or holds a NAV that is not positive', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.nat({ max: days.length - 1 }), fc.nat({ max: 40 }), fc.constantFrom('gap', 'zero', 'late start')), { maxLength: 3 }),
        (faults) => {
          const values = [...data.nav.values.subarray(0, days.length)];
          const kept = days.map(() => true);
          for (const [at, length, kind] of faults) {
            if (kind === 'late start') for (let k = 0; k < at; k++) kept[k] = false;
            else for (let k = at; k < Math.min(days.length, at + length); k++) kind === 'gap' ? (kept[k] = false) : (values[k] = 0);
          }
          const indices = days.map((_, k) => k).filter((k) => kept[k]);
          const fund = { id: 'FUND-X', dates: indices.map((k) => days[k]), values: indices.map((k) => values[k]) };
          expectSameAsAlone({ ...data, nav: frameFromSeries([fund]), master: [masterRecord('FUND-X', 'BMK-WIDE', 'RATE-X')] }, DEFAULT_METHODOLOGY, ['1y', '3y', '5y']);
        },
      ),
      { numRuns: 40 },
    );
  });

  it('cut the very sample sampleFund makes for the shorter window', () => {
    const fund = { dates: Int32Array.from(days), values: data.nav.values.subarray(0, days.length) };
    const request = (months: number) => ({ fund, span: windowMonths(AS_OF, months, 0), asOf: AS_OF, frequency: 'monthly' as const });
    const longer = sampleFund(request(60));
    for (const months of [1, 12, 36, 59, 60]) {
      const alone = sampleFund(request(months));
      if (!longer.ok || !alone.ok) throw new Error('the universe covers five years');
      const cut = laterMonthlyStart(fund, { ...longer.value, points: longer.value.points! }, 60 - months);
      expect([...cut.fund]).toEqual([...alone.value.fund]);
      expect([...cut.navPath]).toEqual([...alone.value.navPath]);
      expect([...cut.pointDays]).toEqual([...alone.value.pointDays]);
      expect([...cut.points!]).toEqual([...alone.value.points!]);
    }
  });
});

/** The sample points as first written: a list of numbers, both periods computed at each step. */
function plainSamplePoints(dates: Int32Array, monthEnds: Int32Array, frequency: Frequency): Int32Array {
  if (frequency === 'monthly') return monthEnds;
  const key = (day: number) => (frequency === 'weekly' ? isoWeekStart(day) : day);
  const first = monthEnds[0];
  const last = monthEnds[monthEnds.length - 1];
  const points: number[] = [first];
  for (let i = first + 1; i < last; i++) if (key(dates[i + 1]) !== key(dates[i])) points.push(i);
  if (last > first) points.push(last);
  return Int32Array.from(points);
}

describe('sample points', () => {
  it('are those of the plain list, at every frequency, with repeated and missing days', () => {
    fc.assert(
      fc.property(
        fc.array(fc.nat({ max: 9 }), { minLength: 1, maxLength: 120 }),
        fc.constantFrom<Frequency>('weekly', 'daily'),
        fc.nat(),
        fc.nat(),
        (steps, frequency, a, b) => {
          let day = epochDay(2025, 1, 1);
          const dates = Int32Array.from(steps, (step) => (day += step));
          const [first, last] = [a % dates.length, b % dates.length].sort((x, y) => x - y);
          const monthEnds = Int32Array.of(first, last);
          expect([...samplePoints(dates, monthEnds, frequency)]).toEqual([...plainSamplePoints(dates, monthEnds, frequency)]);
        },
      ),
      { numRuns: 500 },
    );
    expect(isoWeekday(epochDay(2025, 1, 1))).toBe(3);
    expect(monthIndex(epochDay(2025, 1, 1))).toBeGreaterThan(0);
  });
});

describe("a fund's periods found once", () => {
  const aFund = fc
    .tuple(fc.array(fc.tuple(fc.nat({ max: 4 }), fc.oneof(fc.double({ min: 1, max: 200, noNaN: true }), fc.constantFrom(0, -1, NaN, Infinity))), { minLength: 1, maxLength: 400 }), fc.nat({ max: 3 }), fc.boolean())
    .map(([rows, everyNth, repeats]) => {
      let day = epochDay(2024, 12, 1);
      // Mostly positive NAVs (a bad one now and then), days one apart or skipped, and on some funds repeated.
      const dates = Int32Array.from(rows, ([step]) => (day += repeats && step === 4 ? 0 : step + 1));
      const values = Float64Array.from(rows, ([, value], k) => (everyNth > 0 && k % (everyNth * 50) === 7 ? value : Math.abs(value) + 1 || 100));
      return { dates, values };
    });

  it('give the sample points of the plain scan', () => {
    fc.assert(
      fc.property(aFund, fc.constantFrom<Frequency>('weekly', 'daily'), fc.nat(), fc.nat(), (fund, frequency, a, b) => {
        const [first, last] = [a % fund.dates.length, b % fund.dates.length].sort((x, y) => x - y);
        const periods = new FundPeriods(fund, frequency);
        expect([...periods.samplePoints(first, last)]).toEqual([...samplePoints(fund.dates, Int32Array.of(first, last), frequency)]);
      }),
      { numRuns: 500 },
    );
  });

  it('give the very sample of the plain path, or its reason, for every window and frequency', () => {
    fc.assert(
      fc.property(aFund, fc.constantFrom<Frequency>('weekly', 'daily', 'monthly'), fc.integer({ min: 1, max: 12 }), fc.integer({ min: -3, max: 0 }), (fund, frequency, months, windowEnd) => {
        const asOf = fund.dates[fund.dates.length - 1];
        const span = windowMonths(asOf, months, windowEnd);
        const fast = sampleFund({ fund, span, asOf, frequency });
        const plain = plainSampleFund(fund, span, asOf, frequency);
        expect(fast.ok).toBe(plain.ok);
        if (!fast.ok || !plain.ok) {
          expect(fast.ok ? '' : fast.reason).toBe(plain.ok ? '' : plain.reason);
          return;
        }
        for (const part of ['fund', 'navPath', 'pointDays'] as const) {
          expect(fast.value[part].length).toBe(plain.value[part].length);
          fast.value[part].forEach((value, k) => expect(Object.is(value, plain.value[part][k]), `${part}[${k}]`).toBe(true));
        }
      }),
      { numRuns: 500 },
    );
  });
});

/** sampleFund as first written: the scan for the points, then the returns and days gathered from them. */
function plainSampleFund(fund: { dates: Int32Array; values: Float64Array }, span: ReturnType<typeof windowMonths>, asOf: number, frequency: Frequency) {
  const monthEnds = coverWindow(fund, span, asOf, 'NAV');
  if (!monthEnds.ok) return monthEnds;
  const points = samplePoints(fund.dates, monthEnds.value, frequency);
  for (const index of points) {
    const value = fund.values[index];
    if (!(value > 0 && value < Infinity)) return { ok: false as const, reason: `NAV ${value} on ${formatIsoDate(fund.dates[index])} is not a positive number` };
  }
  return {
    ok: true as const,
    value: { fund: returnsAt(fund.values, points), navPath: fund.values.subarray(points[0], points[points.length - 1] + 1), pointDays: Int32Array.from(points, (k) => fund.dates[k]) },
  };
}

describe('Σ ln(1 + r) without an array of logarithms', () => {
  it('is the sum of log1pAll to the last bit', () => {
    const aReturn = fc.oneof(fc.double({ min: -0.99, max: 5, noNaN: true }), fc.constantFrom(0, -0, -1, NaN, 1e-17));
    fc.assert(
      fc.property(fc.array(aReturn, { maxLength: 300 }), (returns) => {
        const values = Float64Array.from(returns);
        expect(Object.is(sumOfLog1p(values), sum(log1pAll(values)))).toBe(true);
      }),
    );
  });
});

describe('half a unit of the printed precision', () => {
  it('is 5 / 10^(decimals + 1), two places more in percent, for every printed form', () => {
    const printed = fc.oneof(
      fc.tuple(fc.integer({ min: -999, max: 999 }), fc.nat({ max: 30 })).map(([whole, decimals]) => (decimals === 0 ? `${whole}` : `${whole}.${'7'.repeat(decimals)}`)),
      fc.tuple(fc.nat({ max: 9 }), fc.integer({ min: -40, max: 40 })).map(([digit, exponent]) => `1.${digit}e${exponent}`),
      fc.constantFrom('14.1%', ' 0.1412 ', '1,25', '-0.5 %'),
    );
    fc.assert(
      fc.property(printed, fc.constantFrom<'decimal' | 'percent'>('decimal', 'percent'), (raw_value, unit) => {
        const text = raw_value.trim();
        const places = printedDecimals(text) + 1 + (unit === 'percent' || text.includes('%') ? 2 : 0);
        expect(Object.is(halfUnitOfPrinted({ raw_value, unit }), 5 / 10 ** places)).toBe(true);
      }),
    );
  });
});
