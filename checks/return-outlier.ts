import type { SeriesCheck } from '../src/checks/check.js';
import type { SeriesSlice } from '../src/series/frame.js';
import { inShiftedSpan, movesOf, type MoveAnalysis } from '../src/checks/move-analysis.js';
import { bridgedStep, endsOnConflict, tailBar, sharedWithMarket, type Bridge, type ResidualMoves } from '../src/checks/residual-moves.js';
import { isoDate, makeFinding, percent, round } from '../src/checks/support.js';
import { isSpikeReversal, isTightReversal, swappedDigitsSpike } from './spike-reversal.js';
import { splitLikeRatio } from './split-like-jump.js';

interface OutlierParams {
  threshold: number;
  tail_multiple: number;
  min_move: number;
  tail_chance: number;
  [key: string]: number;
}

/**
 * A day far outside the series' usual behaviour relative to its benchmark: the residual of
 * the day's return against beta × benchmark return lies `threshold` robust standard
 * deviations (MAD × 1.4826) from normal, and at least `min_move` in size. Daily residuals are
 * fat-tailed, so the bar is 8 rather than the 3–4 that normal data would suggest, and it rises
 * to `tail_multiple` × the series' own 99th-percentile |z| when that is higher: a series whose
 * ordinary days are wild needs a wilder day to stand out, and to the series' extrapolated tail
 * (`tailBar`): the |z| its ordinary days would reach with chance `tail_chance` over its whole
 * history, estimated without the day being judged (leave-one-out), so a fault never widens
 * the tail that judges it. A day the benchmark cannot price (it has no level on one of the two
 * dates) must also clear the bar over the shortest surrounding window the benchmark does price
 * (at most 5 steps each way): a fund day the benchmark explains over that bridged window is
 * not an outlier. Steps touching a date with conflicting duplicate rows, and moves some benchmark in
 * the feed made too (a market-wide day), are left alone. Days that
 * are split-like jumps or spike reversals (judged with those checks' defaults) are left to
 * those checks, and so are days inside a date-shifted span. Without a benchmark the series is judged against its own typical move.
 */
export const returnOutlier: SeriesCheck<OutlierParams> = {
  id: 'return_outlier',
  scope: 'series',
  purpose: 'A one-day move far outside the series’ usual behaviour relative to its benchmark.',
  defaults: { threshold: 8, tail_multiple: 3.5, min_move: 0.005, tail_chance: 0.02 },
  readsMoves: true,
  run(series, context, params) {
    const analysis = movesOf(series, context);
    const returns = analysis.model;
    const findings = [];
    for (let k = 0; k < returns.count; k++) {
      if (!clearsBar(returns, returns.z[k], returns.residual[k], k, params)) continue;
      const bridge = bridgedStep(returns, context.benchmark, k);
      if (bridge && !clearsBar(returns, bridge.z, bridge.residual, k, params)) continue;
      if (explainedElsewhere(series, analysis, k)) continue;
      if (inShiftedSpan(analysis, k)) continue;
      if (endsOnConflict(series, returns, k) || sharedWithMarket(series, returns, context.benchmarks, [k])) continue;
      const before = returns.from[k];
      const day = returns.to[k];
      const benchmarkMove = Number.isFinite(returns.bench[k]) ? Math.expm1(returns.bench[k]) : null;
      findings.push(
        makeFinding({
          check: 'return_outlier',
          severity: 'warning',
          seriesId: series.id,
          start: series.dates[day],
          end: series.dates[day],
          message:
            `${series.id} moved ${percent(Math.expm1(returns.fund[k]))} on ${isoDate(series.dates[day])}` +
            (benchmarkMove === null ? '' : ` while its benchmark moved ${percent(benchmarkMove)}`) +
            `, ${round(Math.abs(returns.z[k]), 1)} times its usual spread; check the price.`,
          evidence: {
            previous: { date: isoDate(series.dates[before]), value: series.values[before], line: series.lines[before] },
            current: { date: isoDate(series.dates[day]), value: series.values[day], line: series.lines[day] },
            return: round(Math.expm1(returns.fund[k]), 6),
            benchmark_return: benchmarkMove === null ? null : round(benchmarkMove, 6),
            beta: round(returns.beta, 4),
            residual: round(returns.residual[k], 6),
            robust_scale: round(returns.scale, 6),
            robust_z: round(returns.z[k], 2),
            ...(bridge ? { bridged: bridgeEvidence(series, returns, bridge) } : {}),
          },
          identity: [isoDate(series.dates[day])],
        }),
      );
    }
    return findings;
  },
};

/**
 * True when a move of robust z `z` and residual `residual`, judged for step `k`, clears every
 * bar: the floor, `tail_multiple` × the 99th-percentile |z|, `min_move`, and the extrapolated
 * tail of the series' other days (step `k` left out of the estimate).
 */
function clearsBar(returns: ResidualMoves, z: number, residual: number, k: number, params: OutlierParams): boolean {
  if (!(Math.abs(z) >= params.threshold) || Math.abs(residual) < params.min_move) return false;
  return Math.abs(z) >= params.tail_multiple * returns.extreme && Math.abs(z) >= tailBar(returns, params.tail_chance, k);
}

function bridgeEvidence(series: SeriesSlice, returns: ResidualMoves, bridge: Bridge) {
  return {
    from: isoDate(series.dates[returns.from[bridge.first]]),
    to: isoDate(series.dates[returns.to[bridge.last]]),
    benchmark_return: round(Math.expm1(bridge.bench), 6),
    residual: round(bridge.residual, 6),
    robust_z: round(bridge.z, 2),
  };
}

/** Step `k` is a split-like jump or part of a spike reversal, judged with the run's parameters of those checks (when they are on). */
function explainedElsewhere(series: SeriesSlice, analysis: MoveAnalysis, k: number): boolean {
  const { model, split, spike } = analysis;
  const spikeAt = (j: number) => j >= 0 && (isSpikeReversal(model, j, spike!) || isTightReversal(model, j, spike!) || swappedDigitsSpike(series, model, j, spike!) !== null);
  return (split !== undefined && splitLikeRatio(model, k, split) !== null) || (spike !== undefined && (spikeAt(k) || spikeAt(k - 1)));
}
