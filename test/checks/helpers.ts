import { BusinessCalendars } from '../../src/calendar/business-calendar.js';
import { formatIsoDate, isoWeekday, parseIsoDate } from '../../src/calendar/days.js';
import type { SeriesContext } from '../../src/checks/check.js';
import { analyseMoves } from '../../src/checks/move-analysis.js';
import { dateShift } from '../../checks/date-shift.js';
import { spikeReversal } from '../../checks/spike-reversal.js';
import { splitLikeJump } from '../../checks/split-like-jump.js';
import type { CorporateActionRecord, SeriesMasterRecord } from '../../src/ingest/records.js';
import { frameFromSeries, seriesAt, type SeriesFrame, type SeriesSlice } from '../../src/series/frame.js';
import { SeededRandom as Random } from '../../src/random.js';

export const day = (iso: string): number => {
  const parsed = parseIsoDate(iso);
  if (parsed === null) throw new Error(`bad date ${iso}`);
  return parsed;
};

export const iso = formatIsoDate;

/** A one-series frame's slice from [date, value] rows (rows keep their order; lines are 2, 3, …). */
export function seriesOf(id: string, rows: Array<[string, number]>): SeriesSlice {
  return seriesAt(frameOf([{ id, rows }]), 0);
}

export function frameOf(series: Array<{ id: string; rows: Array<[string, number]> }>): SeriesFrame {
  return frameFromSeries(series.map((s) => ({ id: s.id, dates: s.rows.map(([d]) => day(d)), values: s.rows.map(([, v]) => v) })));
}

export function frameOfArrays(series: Array<{ id: string; dates: number[]; values: number[] }>): SeriesFrame {
  return frameFromSeries(series);
}

/** Monday to Friday dates starting on (or after) `start`. */
export function weekdays(start: string, count: number): number[] {
  const days: number[] = [];
  for (let d = day(start); days.length < count; d++) if (isoWeekday(d) <= 5) days.push(d);
  return days;
}

export function master(id: string, overrides: Partial<SeriesMasterRecord> = {}): SeriesMasterRecord {
  return {
    series_id: id,
    benchmark_id: null,
    name: null,
    category: null,
    currency: 'EUR',
    calendar: null,
    rate_id: null,
    stable_value: false,
    inception: null,
    line: 2,
    ...overrides,
  };
}

export function contextFor(overrides: Partial<SeriesContext> = {}): SeriesContext {
  return {
    asOf: day('2026-12-31'),
    calendars: new BusinessCalendars(),
    master: undefined,
    benchmark: undefined,
    benchmarks: undefined,
    actions: [],
    previous: undefined,
    ...overrides,
  };
}

export function action(id: string, exDate: string, kind: 'split' | 'distribution', value: number): CorporateActionRecord {
  return { series_id: id, ex_date: day(exDate), kind, value, line: 2 };
}

/**
 * A benchmark and a fund that tracks it (beta 1, small noise) on the same weekdays, as plain
 * arrays so a test can plant one fault at a known position before building slices.
 */
export function trackingPair(seed: number, count = 300, noise = 0.001) {
  const random = new Random(seed);
  const dates = weekdays('2025-06-02', count);
  const bench: number[] = [];
  const fund: number[] = [];
  let b = 1000;
  let f = 100;
  for (let i = 0; i < count; i++) {
    if (i > 0) {
      const r = 0.0003 + 0.01 * random.normal();
      b *= Math.exp(r);
      f *= Math.exp(r + noise * random.normal());
    }
    bench.push(Math.round(b * 100) / 100);
    fund.push(Math.round(f * 10000) / 10000);
  }
  return { dates, bench, fund };
}

/**
 * Slices for a fund and its benchmark, plus a context that links them, with the move analysis
 * the runner would build under default settings (every check on, default parameters). The benchmark shares the
 * fund's dates unless `benchDates` gives its own (a benchmark holiday, say).
 */
export function linked(dates: number[], fund: number[], bench: number[], overrides: Partial<SeriesContext> = {}, benchDates: number[] = dates) {
  const benchmarks = frameOfArrays([{ id: 'BM1', dates: benchDates, values: bench }]);
  const series = seriesAt(frameOfArrays([{ id: 'F1', dates, values: fund }]), 0);
  const base = contextFor({
    asOf: dates[dates.length - 1],
    master: master('F1', { benchmark_id: 'BM1' }),
    benchmark: seriesAt(benchmarks, 0),
    benchmarks,
    ...overrides,
  });
  const claiming = { date_shift: dateShift.defaults, split_like_jump: splitLikeJump.defaults, spike_reversal: spikeReversal.defaults };
  const context: SeriesContext = { ...base, moves: analyseMoves(series, base, claiming) };
  return { series, context };
}
