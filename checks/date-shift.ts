import type { SeriesCheck } from '../src/checks/check.js';
import type { SeriesSlice } from '../src/series/frame.js';
import { monthIndex } from '../src/calendar/days.js';
import { GROSS_Z, seriesReturns, type SeriesReturns } from '../src/checks/returns.js';
import { correlation, isoDate, makeFinding, round } from '../src/checks/support.js';

interface ShiftParams {
  max_lag: number;
  min_correlation: number;
  min_gain: number;
  min_steps: number;
  [key: string]: number;
}

interface QuarterVerdict {
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
 * Consecutive shifted quarters with the same lag make one finding. Calendar quarters (not
 * positions in the file) keep the key stable as the feed grows.
 */
export const dateShift: SeriesCheck<ShiftParams> = {
  id: 'date_shift',
  scope: 'series',
  purpose: 'Returns line up with the benchmark’s some business days earlier or later than stamped.',
  defaults: { max_lag: 3, min_correlation: 0.5, min_gain: 0.3, min_steps: 40 },
  run(series, context, params) {
    const benchmark = context.benchmark;
    if (!benchmark) return [];
    const returns = seriesReturns(series, context);
    const verdicts = quarterSteps(series, returns).map((steps) => judgeQuarter(series, returns, benchmark, steps, params));
    return shiftedSpans(verdicts).map((span) => describe(series, returns, span, context.master?.benchmark_id ?? benchmark.id));
  },
};

function quarterSteps(series: SeriesSlice, returns: SeriesReturns): number[][] {
  const quarters: number[][] = [];
  let current = NaN;
  for (let k = 0; k < returns.count; k++) {
    if (returns.benchFrom[k] < 0 || returns.benchTo[k] < 0 || Math.abs(returns.z[k]) >= GROSS_Z) continue;
    const quarter = Math.floor(monthIndex(series.dates[returns.to[k]]) / 3);
    if (quarter !== current) quarters.push([]);
    current = quarter;
    quarters[quarters.length - 1].push(k);
  }
  return quarters;
}

function judgeQuarter(series: SeriesSlice, returns: SeriesReturns, benchmark: SeriesSlice, steps: number[], params: ShiftParams): QuarterVerdict {
  const quarter = Math.floor(monthIndex(series.dates[returns.to[steps[0]]]) / 3);
  const correlations = new Map<number, number>();
  if (steps.length < params.min_steps) return { quarter, steps, lag: 0, correlations };
  const fund = new Float64Array(steps.length);
  const bench = new Float64Array(steps.length);
  for (let lag = -params.max_lag; lag <= params.max_lag; lag++) {
    let n = 0;
    for (const k of steps) {
      const p = returns.benchFrom[k] + lag;
      const q = returns.benchTo[k] + lag;
      if (p < 0 || q >= benchmark.values.length) continue;
      fund[n] = returns.fund[k];
      bench[n++] = Math.log(benchmark.values[q] / benchmark.values[p]);
    }
    if (n >= params.min_steps) correlations.set(lag, correlation(fund, bench, n));
  }
  const atZero = correlations.get(0) ?? NaN;
  let best = 0;
  for (const [lag, value] of correlations) if (value > (correlations.get(best) ?? -Infinity)) best = lag;
  const bestValue = correlations.get(best) ?? NaN;
  const shifted = best !== 0 && bestValue >= params.min_correlation && !(bestValue - atZero < params.min_gain);
  return { quarter, steps, lag: shifted ? best : 0, correlations };
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

function describe(series: SeriesSlice, returns: SeriesReturns, span: QuarterVerdict[], benchmarkId: string) {
  const first = returns.to[span[0].steps[0]];
  const lastSteps = span[span.length - 1].steps;
  const last = returns.to[lastSteps[lastSteps.length - 1]];
  const lateBy = -span[0].lag;
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
      quarters: span.map((v) => ({
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
