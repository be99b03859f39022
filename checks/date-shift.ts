import type { SeriesCheck } from '../src/checks/check.js';
import type { SeriesSlice } from '../src/series/frame.js';
import { monthIndex } from '../src/calendar/days.js';
import { movesOf } from '../src/checks/move-analysis.js';
import type { ResidualMoves } from '../src/checks/residual-moves.js';
import { correlation, isoDate, makeFinding, median, robustScale, round } from '../src/checks/support.js';

export interface ShiftParams {
  max_lag: number;
  min_correlation: number;
  min_gain: number;
  min_steps: number;
  [key: string]: number;
}

export interface QuarterVerdict {
  quarter: number;
  steps: number[];
  lag: number;
  correlations: Map<number, number>;
}

/**
 * Returns that line up with the benchmark's one or more business days earlier or later than
 * stamped. For each calendar quarter the fund's daily returns are correlated with the
 * benchmark's at lags −`max_lag`…`max_lag` (in benchmark observations); a quarter is shifted
 * when another lag correlates at least `min_correlation` and beats lag 0 by `min_gain`.
 * Consecutive shifted quarters with the same lag make one finding. Returns are winsorised at
 * four robust standard deviations before correlating, so fat tails do not decide the lag. Calendar quarters (not
 * positions in the file) keep the key stable as the feed grows.
 */
export const dateShift: SeriesCheck<ShiftParams> = {
  id: 'date_shift',
  scope: 'series',
  purpose: 'Returns line up with the benchmark’s some business days earlier or later than stamped.',
  defaults: { max_lag: 3, min_correlation: 0.5, min_gain: 0.3, min_steps: 40 },
  readsMoves: true,
  run(series, context, params) {
    const benchmark = context.benchmark;
    if (!benchmark) return [];
    const analysis = movesOf(series, context);
    const returns = analysis.model;
    // The runner already found the spans with these very parameters.
    const shifts = analysis.shiftParams === params ? analysis.shifts : findShifts(series, returns, benchmark, params);
    return shifts.map((shift) => describe(series, returns, shift, context.master?.benchmark_id ?? benchmark.id));
  },
};

/** A day's log move beyond this is a jump for other checks to explain, not market timing. */
const SPLIT_SIZED_MOVE = 0.25;

export const DATE_SHIFT_DEFAULTS: ShiftParams = { max_lag: 3, min_correlation: 0.5, min_gain: 0.3, min_steps: 40 };

export interface Shift {
  /** First and last step (indices into the series' returns) that carry the shift. */
  readonly firstStep: number;
  readonly lastStep: number;
  readonly lag: number;
  readonly quarters: QuarterVerdict[];
}

/** Shifted spans of the series, their edges placed where the lagged fit starts and stops winning. */
export function findShifts(series: SeriesSlice, returns: ResidualMoves, benchmark: SeriesSlice, params: ShiftParams): Shift[] {
  const verdicts = quarterSteps(series, returns).map((steps) => judgeQuarter(series, returns, benchmark, steps, params));
  return shiftedSpans(verdicts).map((span) => {
    const lag = span[0].lag;
    const at = verdicts.indexOf(span[0]);
    const until = verdicts.indexOf(span[span.length - 1]);
    const gain = (k: number) => lagGain(returns, benchmark, k, lag);
    const before = at > 0 && verdicts[at - 1].quarter === span[0].quarter - 1 ? verdicts[at - 1].steps : [];
    const after = until + 1 < verdicts.length && verdicts[until + 1].quarter === span[span.length - 1].quarter + 1 ? verdicts[until + 1].steps : [];
    const firstStep = bestStart([...before, ...span[0].steps], gain);
    const lastStep = bestEnd([...span[span.length - 1].steps, ...after], gain);
    // A shift that reaches the first or last judged step runs to the series' edge, gross steps included.
    const firstJudged = verdicts[0].steps[0];
    const lastJudged = verdicts[verdicts.length - 1].steps[verdicts[verdicts.length - 1].steps.length - 1];
    return { firstStep: firstStep <= firstJudged ? 0 : firstStep, lastStep: lastStep >= lastJudged ? returns.count - 1 : lastStep, lag, quarters: span };
  });
}

/** How much better lag `lag` explains step k than the dates as stamped (positive: lag wins). */
function lagGain(returns: ResidualMoves, benchmark: SeriesSlice, k: number, lag: number): number {
  const p = returns.benchFrom[k];
  const q = returns.benchTo[k];
  if (p + lag < 0 || q + lag >= benchmark.values.length) return 0;
  const asStamped = returns.fund[k] - returns.beta * Math.log(benchmark.values[q] / benchmark.values[p]);
  const lagged = returns.fund[k] - returns.beta * Math.log(benchmark.values[q + lag] / benchmark.values[p + lag]);
  return asStamped * asStamped - lagged * lagged;
}

/** The step from which the summed gain to the end of `steps` is largest. */
function bestStart(steps: number[], gain: (k: number) => number): number {
  let total = 0, best = -Infinity, at = steps[0];
  for (let i = steps.length - 1; i >= 0; i--) {
    total += gain(steps[i]);
    if (total > best) [best, at] = [total, steps[i]];
  }
  return at;
}

/** The step up to which the summed gain from the start of `steps` is largest. */
function bestEnd(steps: number[], gain: (k: number) => number): number {
  let total = 0, best = -Infinity, at = steps[steps.length - 1];
  for (const k of steps) {
    total += gain(k);
    if (total > best) [best, at] = [total, k];
  }
  return at;
}

function quarterSteps(series: SeriesSlice, returns: ResidualMoves): number[][] {
  const quarters: number[][] = [];
  let current = NaN;
  for (let k = 0; k < returns.count; k++) {
    // Not the z filter other checks use: against a misdated benchmark every shifted day looks gross.
    if (returns.benchFrom[k] < 0 || returns.benchTo[k] < 0 || Math.abs(returns.fund[k]) > SPLIT_SIZED_MOVE) continue;
    const quarter = Math.floor(monthIndex(series.dates[returns.to[k]]) / 3);
    if (quarter !== current) quarters.push([]);
    current = quarter;
    quarters[quarters.length - 1].push(k);
  }
  return quarters;
}

function judgeQuarter(series: SeriesSlice, returns: ResidualMoves, benchmark: SeriesSlice, steps: number[], params: ShiftParams): QuarterVerdict {
  const quarter = Math.floor(monthIndex(series.dates[returns.to[steps[0]]]) / 3);
  const correlations = new Map<number, number>();
  if (steps.length < params.min_steps) return { quarter, steps, lag: 0, correlations };
  // Only steps every lag can price, so that all lags compare the same days.
  const usable: number[] = [];
  for (const k of steps) {
    if (returns.benchFrom[k] - params.max_lag >= 0 && returns.benchTo[k] + params.max_lag < benchmark.values.length) usable.push(k);
  }
  if (usable.length < params.min_steps) return { quarter, steps, lag: 0, correlations };
  const fund = new Float64Array(usable.length);
  const bench = new Float64Array(usable.length);
  for (let i = 0; i < usable.length; i++) {
    fund[i] = returns.fund[usable[i]];
    bench[i] = returns.bench[usable[i]];
  }
  // Fast exit for the common case: when the dates as stamped already correlate this well,
  // no other lag can beat them by min_gain.
  const asStamped = correlation(fund, bench);
  if (asStamped >= 1 - params.min_gain + 0.1) {
    correlations.set(0, asStamped);
    return { quarter, steps, lag: 0, correlations };
  }
  clipInPlace(fund, clipLimits(fund));
  const levels = benchmark.values;
  let limits: [number, number] | undefined;
  for (const lag of lagsFromZero(params.max_lag)) {
    for (let i = 0; i < usable.length; i++) bench[i] = Math.log(levels[returns.benchTo[usable[i]] + lag] / levels[returns.benchFrom[usable[i]] + lag]);
    limits ??= clipLimits(bench);
    clipInPlace(bench, limits);
    correlations.set(lag, correlation(fund, bench));
  }
  const atZero = correlations.get(0) ?? NaN;
  let best = 0;
  for (const [lag, value] of correlations) if (value > (correlations.get(best) ?? -Infinity)) best = lag;
  const bestValue = correlations.get(best) ?? NaN;
  const shifted = best !== 0 && bestValue >= params.min_correlation && !(bestValue - atZero < params.min_gain);
  return { quarter, steps, lag: shifted ? best : 0, correlations };
}

/** 0, then −max…max without 0: lag 0 comes first because its spread sets the clip limits for all. */
function lagsFromZero(maxLag: number): number[] {
  const lags = [0];
  for (let lag = -maxLag; lag <= maxLag; lag++) if (lag !== 0) lags.push(lag);
  return lags;
}

/** Limits 4 robust standard deviations from the median, so one wild day cannot make or break a correlation. */
function clipLimits(values: Float64Array): [number, number] {
  const centre = median(values);
  const limit = 4 * robustScale(values, centre);
  return [centre - limit, centre + limit];
}

function clipInPlace(values: Float64Array, [low, high]: [number, number]): void {
  for (let i = 0; i < values.length; i++) values[i] = values[i] < low ? low : values[i] > high ? high : values[i];
}

function shiftedSpans(verdicts: QuarterVerdict[]): QuarterVerdict[][] {
  const spans: QuarterVerdict[][] = [];
  let previous: QuarterVerdict | undefined;
  for (const verdict of verdicts) {
    if (verdict.lag !== 0) {
      const span = spans[spans.length - 1];
      const continues = previous && previous.lag === verdict.lag && previous.quarter === verdict.quarter - 1 && span?.includes(previous);
      if (continues) span.push(verdict);
      else spans.push([verdict]);
    }
    previous = verdict;
  }
  return spans;
}

function describe(series: SeriesSlice, returns: ResidualMoves, shift: Shift, benchmarkId: string) {
  const first = returns.to[shift.firstStep];
  const last = returns.to[shift.lastStep];
  const lateBy = -shift.lag;
  const days = Math.abs(lateBy);
  const plural = days > 1 ? 's' : '';
  return makeFinding({
    check: 'date_shift',
    severity: 'error',
    seriesId: series.id,
    start: series.dates[first],
    end: series.dates[last],
    message: `From ${isoDate(series.dates[first])} to ${isoDate(series.dates[last])}, ${series.id}'s returns match ${benchmarkId}'s returns ${days} business day${plural} ${lateBy > 0 ? 'earlier' : 'later'}; the NAVs look stamped ${days} business day${plural} ${lateBy > 0 ? 'after' : 'before'} their valuation date.`,
    evidence: {
      stamped_late_by_business_days: lateBy,
      benchmark_id: benchmarkId,
      quarters: shift.quarters.map((v) => ({
        from: isoDate(series.dates[returns.to[v.steps[0]]]),
        to: isoDate(series.dates[returns.to[v.steps[v.steps.length - 1]]]),
        correlation_as_stamped: round(v.correlations.get(0) ?? NaN, 3),
        correlation_at_lag: round(v.correlations.get(v.lag) ?? NaN, 3),
        observations: v.steps.length,
      })),
      first_line: series.lines[first],
      last_line: series.lines[last],
    },
    identity: [lateBy, isoDate(series.dates[first])],
  });
}
