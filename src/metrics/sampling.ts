import type { Outcome } from '../outcome.js';
import { firstAbove } from '../numeric/search.js';
import { formatIsoDate, isoWeekStart, monthEndDay, monthIndex } from '../calendar/days.js';
import type { Frequency } from './methodology.js';
import { formatMonth, monthStartDay, type WindowMonths } from './windows.js';

/**
 * From a series' observations to the returns of one window. The window is first covered by
 * month-end values (the last observation inside each month, on or before its last day and on or
 * before the as-of day); every frequency then samples inside the same calendar span, from the
 * window's first month-end value to its last.
 */

/** Dates ascending with their values: a series slice, or any view like it. */
export interface Observations {
  readonly dates: Int32Array;
  readonly values: Float64Array;
}

export type { Outcome };

/** A series' benchmark levels, or the reason it has none. */
export type BenchmarkSource = Outcome<{ readonly id: string; readonly levels: Observations }>;

/** A series' risk-free rates (observed, or one constant annual rate), or the reason it has none. */
export type RiskFreeSource = Outcome<{ readonly id: string; readonly rates: Observations } | { readonly annualRate: number }>;

export interface WindowRequest {
  readonly fund: Observations;
  readonly benchmark: BenchmarkSource;
  readonly riskFree: RiskFreeSource;
  readonly span: WindowMonths;
  /** Observations after this epoch day are not used. */
  readonly asOf: number;
  readonly frequency: Frequency;
  /** An annual risk-free rate as the rate of one period (the methodology's `ratePeriodsOf` and conversion). */
  readonly ratePerPeriod: (annualRate: number) => number;
}

export interface WindowSample {
  /** Simple returns of the fund, one per period. */
  readonly fund: Float64Array;
  /** Simple returns of the benchmark over the same periods, or null with `benchmarkReason`. */
  readonly benchmark: Float64Array | null;
  readonly benchmarkReason: string | null;
  /** Risk-free return of each period, or null with `riskFreeReason`. */
  readonly riskFree: Float64Array | null;
  readonly riskFreeReason: string | null;
  /** Every NAV observation from the window's first month-end value to its last. */
  readonly navPath: Float64Array;
  /** Epoch days of the fund's sample points (periods + 1): the first is the window's start. */
  readonly pointDays: Int32Array;
}

/** A weekly or daily period without a rate may take the latest one observed this many days before its end. */
export const RATE_LOOKBACK_DAYS = 31;

/**
 * The fund's part of a window's sample: it depends on the fund, the window and the frequency
 * only. `points` are the sample points' indices in the fund's observations (null when they are
 * every index from the first to the last).
 */
export interface FundSample extends Pick<WindowSample, 'fund' | 'navPath' | 'pointDays'> {
  readonly points: Int32Array | null;
}

/**
 * Where a caller may keep the three parts of a window's sample between calls. The convention
 * search asks for the same window under many methodologies: another benchmark leaves the fund's
 * returns and the risk-free returns as they were, another rate conversion the fund's and the
 * benchmark's. Each function gets the part's computation and returns its result, computed or kept.
 * The benchmark's and the rate's parts depend on the fund only through its sample days, which
 * they are given: funds on one calendar have the same days, so those parts can be kept across series.
 */
export interface SampleParts {
  readonly fund: (compute: () => Outcome<FundSample>) => Outcome<FundSample>;
  readonly benchmark: (pointDays: Int32Array, compute: () => Outcome<Float64Array>) => Outcome<Float64Array>;
  readonly riskFree: (pointDays: Int32Array, compute: () => Outcome<Float64Array>) => Outcome<Float64Array>;
}

const COMPUTED_EACH_TIME: SampleParts = {
  fund: (compute) => compute(),
  benchmark: (_pointDays, compute) => compute(),
  riskFree: (_pointDays, compute) => compute(),
};

export function sampleWindow(request: WindowRequest, parts: SampleParts = COMPUTED_EACH_TIME): Outcome<WindowSample> {
  const sampled = parts.fund(() => sampleFund(request));
  if (!sampled.ok) return sampled;
  const { pointDays } = sampled.value;
  const benchmark = parts.benchmark(pointDays, () => benchmarkReturns(request, pointDays));
  const riskFree = parts.riskFree(pointDays, () => riskFreeReturns(request, pointDays));
  return {
    ok: true,
    value: {
      fund: sampled.value.fund,
      benchmark: benchmark.ok ? benchmark.value : null,
      benchmarkReason: benchmark.ok ? null : benchmark.reason,
      riskFree: riskFree.ok ? riskFree.value : null,
      riskFreeReason: riskFree.ok ? null : riskFree.reason,
      navPath: sampled.value.navPath,
      pointDays,
    },
  };
}

export function sampleFund(request: Pick<WindowRequest, 'fund' | 'span' | 'asOf' | 'frequency'>): Outcome<FundSample> {
  const { fund, span, asOf, frequency } = request;
  const fundMonthEnds = coverWindow(fund, span, asOf, 'NAV');
  if (!fundMonthEnds.ok) return fundMonthEnds;
  const monthEnds = fundMonthEnds.value;
  if (frequency !== 'monthly') {
    const periods = periodsOf(fund, frequency);
    const sameDays = periods.contiguousSample(monthEnds[0], monthEnds[monthEnds.length - 1]);
    if (sameDays !== null) return { ok: true, value: sameDays };
  }
  const candidates = frequency === 'monthly' ? monthEnds : periodsOf(fund, frequency).samplePoints(monthEnds[0], monthEnds[monthEnds.length - 1]);
  // Monthly, the points are the month-end values coverWindow has already found positive.
  const sampled = candidates === monthEnds ? fundMonthEnds : positiveAt(fund, candidates, 'NAV');
  if (!sampled.ok) return sampled;
  const points = sampled.value;
  return {
    ok: true,
    value: {
      fund: returnsAt(fund.values, points),
      navPath: fund.values.subarray(points[0], points[points.length - 1] + 1),
      pointDays: gatherDays(fund.dates, points),
      points,
    },
  };
}

/**
 * The monthly sample of a window that ends in the same month as `longer`'s and starts `months`
 * months later, cut from it. A month's month-end value is found from its own month alone
 * (monthEndIndices), so the shorter window's points are the longer one's last points, all
 * positive, and its returns, days and NAV path are the longer one's last ones: the same numbers
 * sampleFund would compute, without computing them. Monthly only: at other frequencies the first
 * point (a month-end value) need not be one of the longer window's points.
 */
export function laterMonthlyStart(fund: Observations, longer: FundSample & { readonly points: Int32Array }, months: number): FundSample {
  const points = longer.points.subarray(months);
  return {
    fund: longer.fund.subarray(months),
    navPath: fund.values.subarray(points[0], points[points.length - 1] + 1),
    pointDays: longer.pointDays.subarray(months),
    points,
  };
}

// ---------------------------------------------------------------------------------------------
// Month-end values

/**
 * firstAbove(sorted, x, start) found by steps doubling from `start` (1, 2, 4 …), then a binary
 * search between the last two: a few comparisons when the answer lies near `start`, as it does
 * for the next month's or the next day's point.
 */
export function firstAboveNear(sorted: Int32Array, x: number, start: number): number {
  let low = start;
  let high = start;
  let step = 1;
  while (high < sorted.length && sorted[high] <= x) {
    low = high + 1;
    high = low + step;
    step *= 2;
  }
  return firstAbove(sorted, x, low, Math.min(high, sorted.length));
}

/** Index of the first date above `day` (binary search). */
export function upperBound(dates: Int32Array, day: number): number {
  return firstAbove(dates, day);
}

/** Index of the first date on or after `day`. */
export function lowerBound(dates: Int32Array, day: number): number {
  return upperBound(dates, day - 1);
}

/** Index of a month's month-end observation, or −1 when the month has none (up to `cutoff`). */
export function monthEndIndex(dates: Int32Array, month: number, cutoff: number): number {
  const last = upperBound(dates, Math.min(monthEndDay(month), cutoff)) - 1;
  return last >= 0 && dates[last] >= monthStartDay(month) ? last : -1;
}

/** Month-end indices for every month of the span (start month included), −1 where missing. */
export function monthEndIndices(dates: Int32Array, span: WindowMonths, cutoff: number): Int32Array {
  const indices = new Int32Array(span.months + 1);
  // The months ascend, so each month's search starts where the previous one ended.
  let above = 0;
  for (let k = 0; k <= span.months; k++) {
    above = firstAboveNear(dates, Math.min(span.lastDays[k + 1], cutoff), above);
    const last = above - 1;
    indices[k] = last >= 0 && dates[last] > span.lastDays[k] ? last : -1;
  }
  return indices;
}

/** Reasons name at most this many missing months or periods. */
const LISTED_AT_MOST = 12;

/** The span's month-end indices, or the reason the series cannot cover it. */
export function coverWindow(series: Observations, span: WindowMonths, cutoff: number, what: string): Outcome<Int32Array> {
  if (series.dates.length === 0 || series.dates[0] > cutoff) {
    return { ok: false, reason: `no ${what} observations on or before the as-of day` };
  }
  const indices = monthEndIndices(series.dates, span, cutoff);
  if (indices.includes(-1)) return { ok: false, reason: missingMonthsReason(series, span, missingMonths(indices, span), what) };
  return positiveAt(series, indices, what);
}

function missingMonths(indices: Int32Array, span: WindowMonths): number[] {
  const missing: number[] = [];
  for (let k = 0; k < indices.length; k++) if (indices[k] < 0) missing.push(span.startMonth + k);
  return missing;
}

/** The sample points, or the reason one of their values cannot start or end a return. */
function positiveAt(series: Observations, points: Int32Array, what: string): Outcome<Int32Array> {
  for (let k = 0; k < points.length; k++) {
    const index = points[k];
    const value = series.values[index];
    if (!(value > 0 && value < Infinity)) {
      return { ok: false, reason: `${what} ${value} on ${formatIsoDate(series.dates[index])} is not a positive number` };
    }
  }
  return { ok: true, value: points };
}

function missingMonthsReason(series: Observations, span: WindowMonths, missing: number[], what: string): string {
  const firstDay = series.dates[0];
  if (monthIndex(firstDay) > span.startMonth && missing[0] === span.startMonth) {
    return (
      `history too short: the window needs a ${what} month-end value for ${formatMonth(span.startMonth)}, ` +
      `the first ${what} observation is on ${formatIsoDate(firstDay)}`
    );
  }
  const listed = missing.slice(0, LISTED_AT_MOST).map(formatMonth).join(', ');
  const more = missing.length > LISTED_AT_MOST ? ` and ${missing.length - LISTED_AT_MOST} more` : '';
  return `missing ${what} month-end values for ${listed}${more}`;
}

// ---------------------------------------------------------------------------------------------
// Sample points

/** The calendar period an observation belongs to at a frequency, as a sortable number. */
export function periodKey(day: number, frequency: Frequency): number {
  if (frequency === 'monthly') return monthIndex(day);
  return frequency === 'weekly' ? isoWeekStart(day) : day;
}

/**
 * Indices of the sample points: the window's first month-end value, then the last observation of
 * each period up to the window's last month-end value (which always closes the window).
 */
export function samplePoints(dates: Int32Array, monthEnds: Int32Array, frequency: Frequency): Int32Array {
  if (frequency === 'monthly') return monthEnds;
  const first = monthEnds[0];
  const last = monthEnds[monthEnds.length - 1];
  // At most one point per observation: written into an array of that size, then cut to the count.
  const points = new Int32Array(Math.max(last - first, 0) + 1);
  let count = 0;
  points[count++] = first;
  // Each observation's period is computed once, as the next one's is compared with it.
  let period = first + 1 < last ? periodKey(dates[first + 1], frequency) : 0;
  for (let i = first + 1; i < last; i++) {
    const next = periodKey(dates[i + 1], frequency);
    if (next !== period) points[count++] = i;
    period = next;
  }
  if (last > first) points[count++] = last;
  return count === points.length ? points : points.slice(0, count);
}

/**
 * A fund's periods at one frequency, found once per fund (its observations object) and read by
 * every window sampled at that frequency: the convention search samples a breach's fund daily
 * and weekly under four window ends, each over up to five years of days.
 */
export class FundPeriods {
  /** Indices i whose next observation lies in another period: each period's last observation but the series' last. */
  private readonly ends: Int32Array;
  private dailyReturns: Float64Array | null = null;
  private notPositive: Int32Array | null = null;

  constructor(
    private readonly fund: Observations,
    frequency: Frequency,
  ) {
    const { dates } = fund;
    const ends = new Int32Array(Math.max(dates.length - 1, 0));
    let count = 0;
    let period = dates.length > 0 ? periodKey(dates[0], frequency) : 0;
    for (let i = 0; i + 1 < dates.length; i++) {
      const next = periodKey(dates[i + 1], frequency);
      if (next !== period) ends[count++] = i;
      period = next;
    }
    this.ends = ends.subarray(0, count);
  }

  /** samplePoints(dates, [first, …, last], frequency), read from the periods' ends. */
  samplePoints(first: number, last: number): Int32Array {
    const from = firstAbove(this.ends, first);
    const to = Math.max(from, firstAbove(this.ends, last - 1));
    const points = new Int32Array(1 + (to - from) + (last > first ? 1 : 0));
    points[0] = first;
    points.set(this.ends.subarray(from, to), 1);
    if (last > first) points[points.length - 1] = last;
    return points;
  }

  /**
   * The sample when its points are every observation from `first` to `last` (daily, on a series
   * without two observations on one day) and each is a positive number: its returns, days and
   * path are views of the fund's, its returns those of consecutive observations, computed once
   * per fund. Null otherwise, and the window is sampled as usual.
   */
  contiguousSample(first: number, last: number): FundSample | null {
    if (last <= first) return null;
    const from = firstAbove(this.ends, first);
    if (firstAbove(this.ends, last - 1) - from !== last - first - 1) return null;
    const notPositive = (this.notPositive ??= notPositiveIndices(this.fund.values));
    const firstNotPositive = firstAbove(notPositive, first - 1);
    if (firstNotPositive < notPositive.length && notPositive[firstNotPositive] <= last) return null;
    const returns = (this.dailyReturns ??= consecutiveReturns(this.fund.values));
    return {
      fund: returns.subarray(first + 1, last + 1),
      navPath: this.fund.values.subarray(first, last + 1),
      pointDays: this.fund.dates.subarray(first, last + 1),
      points: null,
    };
  }
}

/**
 * Each fund's periods, made on first use and dropped with the fund's observations object (the
 * calculator makes one per series it reads; observations are never written after they are sampled).
 */
const fundPeriods = { weekly: new WeakMap<Observations, FundPeriods>(), daily: new WeakMap<Observations, FundPeriods>() };

function periodsOf(fund: Observations, frequency: 'weekly' | 'daily'): FundPeriods {
  let periods = fundPeriods[frequency].get(fund);
  if (periods === undefined) fundPeriods[frequency].set(fund, (periods = new FundPeriods(fund, frequency)));
  return periods;
}

/** values[i] / values[i − 1] − 1 at every i ≥ 1, as returnsAt computes it (index 0 unused). */
function consecutiveReturns(values: Float64Array): Float64Array {
  const returns = new Float64Array(values.length);
  for (let i = 1; i < values.length; i++) returns[i] = values[i] / values[i - 1] - 1;
  return returns;
}

/**
 * Indices of the values that are not a positive finite number (positiveAt refuses them): counted,
 * then written. (Gathered in a list turned into an Int32Array at the end, the optimised loop was
 * deoptimised at that last step on almost every fund: about 300 times a run of the standard universe.)
 */
function notPositiveIndices(values: Float64Array): Int32Array {
  let count = 0;
  for (let i = 0; i < values.length; i++) if (!isPositive(values[i])) count++;
  const indices = new Int32Array(count);
  for (let i = 0, k = 0; k < count; i++) if (!isPositive(values[i])) indices[k++] = i;
  return indices;
}

const isPositive = (value: number) => value > 0 && value < Infinity;

function gatherDays(dates: Int32Array, points: Int32Array): Int32Array {
  const days = new Int32Array(points.length);
  for (let k = 0; k < points.length; k++) days[k] = dates[points[k]];
  return days;
}

/** Simple returns between consecutive sample points. */
export function returnsAt(values: Float64Array, points: Int32Array): Float64Array {
  const returns = new Float64Array(points.length - 1);
  for (let k = 1; k < points.length; k++) returns[k - 1] = values[points[k]] / values[points[k - 1]] - 1;
  return returns;
}

// ---------------------------------------------------------------------------------------------
// Benchmark

function benchmarkReturns(request: WindowRequest, pointDays: Int32Array): Outcome<Float64Array> {
  if (!request.benchmark.ok) return request.benchmark;
  const source = request.benchmark.value;
  const label = `benchmark ${source.id}`;
  const monthEnds = coverWindow(source.levels, request.span, request.asOf, `${label} level`);
  if (!monthEnds.ok) return monthEnds;
  const points = benchmarkPointsOnFundDates(source.levels.dates, monthEnds.value, pointDays, request);
  const aligned = positiveAt(source.levels, points, `${label} level`);
  return aligned.ok ? { ok: true, value: returnsAt(source.levels.values, aligned.value) } : aligned;
}

/**
 * The benchmark read on the fund's own sample dates (docs/methodology.md, "The benchmark and the
 * rate on the fund's dates"): at each fund sample point, the benchmark's latest level on or
 * before that day. At a point that is a month-end value (every monthly point, and the window's
 * two ends at every frequency) that level must lie in the same month; when the benchmark has
 * none there up to the fund's day, its own month-end value of the month counts instead.
 */
export function benchmarkPointsOnFundDates(
  dates: Int32Array,
  monthEnds: Int32Array,
  fundDays: Int32Array,
  request: Pick<WindowRequest, 'frequency' | 'span'>,
): Int32Array {
  const points = new Int32Array(fundDays.length);
  const last = fundDays.length - 1;
  // The fund's days ascend, so each point's search starts where the previous one ended: a short
  // walk for daily points, a narrowed binary search for monthly ones. `above` is upperBound(dates, fundDays[k]).
  let above = 0;
  for (let k = 0; k <= last; k++) {
    above = firstAboveNear(dates, fundDays[k], above);
    const latest = above - 1;
    const month = monthOfPoint(k, last, request);
    if (month === null) {
      points[k] = Math.max(latest, points[k - 1]);
    } else {
      const sameMonth = latest >= 0 && dates[latest] >= monthStartDay(request.span.startMonth + month);
      points[k] = sameMonth ? latest : monthEnds[month];
    }
  }
  return points;
}

/** The window month (0 = the start month) whose month-end value point k is, or null for a point inside the window. */
function monthOfPoint(k: number, last: number, request: Pick<WindowRequest, 'frequency' | 'span'>): number | null {
  if (request.frequency === 'monthly') return k;
  if (k === 0) return 0;
  return k === last ? request.span.months : null;
}

// ---------------------------------------------------------------------------------------------
// Risk-free rate

/**
 * The risk-free return of each period: the mean of the annual rates observed in the period,
 * made a per-period rate by the methodology (c / P by default, P the frequency's periods a year). Monthly, a period is the calendar month (interface.md: "the mean
 * of that month's annual rates"), and a month without a rate makes the window's rate unknown.
 * Weekly and daily, a period is the days its return covers: after its start point, up to and
 * including its end point; a period without a rate takes the latest earlier rate when that was
 * observed within `RATE_LOOKBACK_DAYS` days before the period's end (docs/methodology.md,
 * "Readings of the interface where its text leaves a choice").
 */
function riskFreeReturns(request: WindowRequest, pointDays: Int32Array): Outcome<Float64Array> {
  if (!request.riskFree.ok) return request.riskFree;
  const source = request.riskFree.value;
  const periods = pointDays.length - 1;
  if ('annualRate' in source) {
    return { ok: true, value: new Float64Array(periods).fill(request.ratePerPeriod(source.annualRate)) };
  }

  const perPeriod = new Float64Array(periods);
  const missing: string[] = [];
  // Periods follow one another, so each one's first and last rate are searched from the previous
  // period's: begin = lowerBound(dates, from); end = upperBound(dates, to), or begin when the
  // period holds no rate (the mean is then unknown either way).
  const dates = source.rates.dates;
  let begin = 0;
  let end = 0;
  for (let k = 0; k < periods; k++) {
    const [from, to] = periodDays(request, pointDays, k);
    // Epoch days are whole numbers: the first rate on or after `from` is the first above from − 1.
    begin = firstAboveNear(dates, from - 1, begin);
    end = firstAboveNear(dates, to, Math.max(end, begin));
    const rate = meanRate(source.rates, begin, end) ?? lookBackRate(source.rates, begin, to, request.frequency);
    if (rate === null) missing.push(describePeriod(pointDays[k + 1], request.frequency));
    else perPeriod[k] = request.ratePerPeriod(rate);
  }
  if (missing.length === 0) return { ok: true, value: perPeriod };
  const listed = missing.slice(0, LISTED_AT_MOST).join(', ');
  const more = missing.length > LISTED_AT_MOST ? ` and ${missing.length - LISTED_AT_MOST} more` : '';
  return { ok: false, reason: `no risk-free rate ${source.id} for ${listed}${more}` };
}

/**
 * First and last epoch day whose rates period k averages, cut at the as-of day: the calendar
 * month monthly; weekly and daily the days after the period's start point up to its end point.
 */
function periodDays(request: WindowRequest, pointDays: Int32Array, k: number): [number, number] {
  const { frequency, asOf, span } = request;
  if (frequency === 'monthly') return [span.lastDays[k + 1] + 1, Math.min(span.lastDays[k + 2], asOf)];
  return [pointDays[k] + 1, Math.min(pointDays[k + 1], asOf)];
}

/** The mean of the rates at indices [begin, end), or null when there are none. */
function meanRate(rates: Observations, begin: number, end: number): number | null {
  if (end <= begin) return null;
  let sum = 0;
  for (let i = begin; i < end; i++) sum += rates.values[i];
  return sum / (end - begin);
}

/**
 * Weekly and daily: the latest rate before the period, if observed within the lookback before its
 * end. `begin` is the period's first rate index (lowerBound of its first day), so the one before
 * it is the latest earlier rate.
 */
function lookBackRate(rates: Observations, begin: number, periodEnd: number, frequency: Frequency): number | null {
  if (frequency === 'monthly') return null;
  const before = begin - 1;
  return before >= 0 && rates.dates[before] >= periodEnd - RATE_LOOKBACK_DAYS ? rates.values[before] : null;
}

function describePeriod(day: number, frequency: Frequency): string {
  if (frequency === 'monthly') return formatMonth(monthIndex(day));
  return frequency === 'weekly' ? `the week of ${formatIsoDate(isoWeekStart(day))}` : formatIsoDate(day);
}
