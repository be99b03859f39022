import { daysInMonth, epochDay } from '../../src/calendar/days.js';
import type { SeriesMasterRecord } from '../../src/ingest/records.js';
import { frameFromSeries, type SeriesFrame } from '../../src/series/frame.js';

/** Invented test data: month-end dates, compounded levels, master records. */

export function monthEnd(year: number, month: number): number {
  return epochDay(year, month, daysInMonth(year, month));
}

/** `count` consecutive month-end epoch days starting at (year, month). */
export function monthEnds(year: number, month: number, count: number): number[] {
  const days: number[] = [];
  for (let k = 0; k < count; k++) {
    const m = month - 1 + k;
    days.push(monthEnd(year + Math.floor(m / 12), (m % 12) + 1));
  }
  return days;
}

/** Levels compounded from `start` by the returns: one more level than returns. */
export function compound(returns: readonly number[], start = 100): number[] {
  const levels = [start];
  for (const r of returns) levels.push(levels[levels.length - 1] * (1 + r));
  return levels;
}

export function frame(series: Record<string, { dates: number[]; values: number[] }>): SeriesFrame {
  return frameFromSeries(Object.entries(series).map(([id, s]) => ({ id, dates: s.dates, values: s.values })));
}

export function masterRecord(series_id: string, benchmark_id: string | null, rate_id: string | null = null): SeriesMasterRecord {
  return {
    series_id,
    benchmark_id,
    name: null,
    category: null,
    currency: null,
    calendar: null,
    rate_id,
    stable_value: false,
    inception: null,
    line: 2,
  };
}

// Naive reference formulas, written independently of src/metrics.

export function mean(x: readonly number[]): number {
  return x.reduce((s, v) => s + v, 0) / x.length;
}

export function covarianceNaive(x: readonly number[], y: readonly number[], population = false): number {
  const mx = mean(x);
  const my = mean(y);
  let s = 0;
  for (let i = 0; i < x.length; i++) s += (x[i] - mx) * (y[i] - my);
  return s / (population ? x.length : x.length - 1);
}

export function sdNaive(x: readonly number[], population = false): number {
  return Math.sqrt(covarianceNaive(x, x, population));
}

export function minus(x: readonly number[], y: readonly number[]): number[] {
  return x.map((v, i) => v - y[i]);
}

export function geometricAnnualized(returns: readonly number[], periodsPerYear: number): number {
  const growth = returns.reduce((g, r) => g * (1 + r), 1);
  return growth ** (periodsPerYear / returns.length) - 1;
}
