import { epochDay, isoWeekday } from '../../src/calendar/days.js';
import type { VendorFigureRecord } from '../../src/ingest/records.js';
import { MetricCalculator, type MetricInputs } from '../../src/metrics/compute.js';
import type { MetricId } from '../../src/metrics/kernels.js';
import { DEFAULT_METHODOLOGY, withChanges, type MethodologyChanges } from '../../src/metrics/methodology.js';
import { SeededRandom } from '../../src/random.js';
import { frameFromSeries } from '../../src/series/frame.js';
import { masterRecord } from '../metrics/builders.js';

/**
 * An invented universe for reconciliation tests: three funds (FUND-A, FUND-B, FUND-C) on two
 * benchmarks (BMK-WIDE, BMK-NARROW), business-day NAVs from 2020-06-01 to 2026-11-30, and a
 * daily risk-free rate drifting between about 1 % and 4 %. Funds follow their benchmark with a
 * beta of 0.6–1.1 and their own noise.
 */
export const AS_OF = epochDay(2026, 11, 30);

export interface Universe {
  readonly days: number[];
  readonly navs: Record<string, number[]>;
  readonly data: MetricInputs;
}

export function universe(seed = 20261202): Universe {
  const random = new SeededRandom(seed);
  const days: number[] = [];
  for (let day = epochDay(2020, 6, 1); day <= AS_OF; day++) if (isoWeekday(day) <= 5) days.push(day);
  const wide = walk(random, days.length, 0.0003, 0.011, () => 0);
  const narrow = walk(random, days.length, 0.0002, 0.008, () => 0);
  const benchmarkReturns = { 'BMK-WIDE': wide.returns, 'BMK-NARROW': narrow.returns };
  const funds: Array<[string, 'BMK-WIDE' | 'BMK-NARROW', number]> = [
    ['FUND-A', 'BMK-WIDE', 0.9],
    ['FUND-B', 'BMK-WIDE', 1.1],
    ['FUND-C', 'BMK-NARROW', 0.6],
  ];
  const navs: Record<string, number[]> = {};
  for (const [id, benchmark, beta] of funds) {
    const market = benchmarkReturns[benchmark];
    navs[id] = walk(random, days.length, 0.0001, 0.006, (k) => beta * market[k]).levels;
  }
  let rate = 0.02;
  const rates = days.map(() => (rate = Math.min(0.04, Math.max(0.01, rate + random.normal() * 0.0005))));
  const data: MetricInputs = {
    nav: frameFromSeries(Object.entries(navs).map(([id, values]) => ({ id, dates: days, values }))),
    benchmarks: frameFromSeries([
      { id: 'BMK-WIDE', dates: days, values: wide.levels },
      { id: 'BMK-NARROW', dates: days, values: narrow.levels },
    ]),
    master: funds.map(([id, benchmark]) => masterRecord(id, benchmark, 'RATE-X')),
    rates: frameFromSeries([{ id: 'RATE-X', dates: days, values: rates }]),
  };
  return { days, navs, data };
}

function walk(random: SeededRandom, count: number, drift: number, volatility: number, shared: (k: number) => number) {
  const levels = [100];
  const returns = [0];
  for (let k = 1; k < count; k++) {
    const r = shared(k) + drift + volatility * random.normal();
    returns.push(r);
    levels.push(levels[k - 1] * (1 + r));
  }
  return { levels, returns };
}

/** A figure computed by the engine under some changes to the default methodology. */
export function figureUnder(data: MetricInputs, seriesId: string, window: string, metric: MetricId, changes: MethodologyChanges = {}): number {
  const calculator = new MetricCalculator(data);
  const value = calculator.metric({ seriesId, asOf: AS_OF, window, metric, methodology: withChanges(DEFAULT_METHODOLOGY, changes) }).value;
  if (value === null) throw new Error(`the test universe cannot compute ${seriesId} ${window} ${metric}`);
  return value;
}

let nextLine = 2;

/** A vendor's row as the reader makes it: the text as written, the value as a decimal. */
export function vendorRow(seriesId: string, window: string, metric: VendorFigureRecord['metric'], text: string, unit: 'decimal' | 'percent' = 'decimal'): VendorFigureRecord {
  const written = Number(text);
  return { series_id: seriesId, as_of: AS_OF, window, metric, value: unit === 'percent' ? written / 100 : written, unit, raw_value: text, line: nextLine++ };
}
