import type { SeriesCheck } from '../src/checks/check.js';
import { inShiftedSpan, movesOf } from '../src/checks/move-analysis.js';
import { endsOnConflict, sharedWithMarket, type ResidualMoves } from '../src/checks/residual-moves.js';
import { isoDate, makeFinding, percent, round } from '../src/checks/support.js';
import { swappedDigits, type DigitSwap } from '../src/checks/digit-swap.js';
import type { SeriesSlice } from '../src/series/frame.js';

export interface SpikeParams {
  min_move: number;
  min_z: number;
  reversal_tolerance: number;
  tail_multiple: number;
  [key: string]: number;
}

export const SPIKE_DEFAULTS: SpikeParams = { min_move: 0.01, min_z: 5, reversal_tolerance: 0.25, tail_multiple: 1.9 };

/**
 * A large one-day move, relative to the benchmark, that the next observation undoes: the
 * signature of a keying error. "Large" means both at least `min_move` (1 %) and at least the
 * bar in robust standard deviations of the series' own residual moves, the bar being `min_z`
 * or `tail_multiple` × the series' 99th-percentile |z| when that is higher (fat-tailed series
 * reach 5 on ordinary days); "undoes" means the way back is nearly as large and the two days
 * together leave less than `reversal_tolerance` of the first move. Two such days in a row are
 * rare enough by chance that the bar can sit lower than `return_outlier`'s. Left alone: days
 * in a date-shifted span, steps touching a date with conflicting duplicate rows, and a fall
 * and rebound some benchmark in the feed made too. A move out and back of any size that two
 * adjacent digits put back would undo (`src/checks/digit-swap.ts`) is reported too, named as
 * swapped digits.
 */
export const spikeReversal: SeriesCheck<SpikeParams> = {
  id: 'spike_reversal',
  scope: 'series',
  purpose: 'A large one-day move that reverses the next day, as a keying error does.',
  defaults: SPIKE_DEFAULTS,
  readsMoves: true,
  run(series, context, params) {
    const analysis = movesOf(series, context);
    const returns = analysis.model;
    const findings = [];
    for (let k = 0; k + 1 < returns.count; k++) {
      const swap = swappedDigitsSpike(series, returns, k, params);
      if (!(swap || isSpikeReversal(returns, k, params)) || inShiftedSpan(analysis, k)) continue;
      // Two rows disagree on the spike's date: one finding (duplicate_conflict) for one cause.
      if (endsOnConflict(series, returns, k)) continue;
      // A crash and rebound that some benchmark in the feed made too, on both days.
      if (sharedWithMarket(series, returns, context.benchmarks, [k, k + 1])) continue;
      const before = returns.from[k];
      const spike = returns.to[k];
      const after = returns.to[k + 1];
      const day = series.dates[spike];
      findings.push(
        makeFinding({
          check: 'spike_reversal',
          severity: 'error',
          seriesId: series.id,
          start: day,
          end: day,
          message: swap
            ? `${series.id}'s NAV of ${swap.typed} on ${isoDate(day)} looks like ${swap.intended} with two adjacent digits swapped: it is ${percent(Math.expm1(returns.raw[k]))} away from the day before and back the next day (${series.values[after]} on ${isoDate(series.dates[after])}), and ${swap.intended} fits both days.`
            : `${series.id}'s NAV of ${series.values[spike]} on ${isoDate(day)} is ${percent(Math.expm1(returns.raw[k]))} away from the day before and back the next day (${series.values[after]} on ${isoDate(series.dates[after])}); likely a keying error.`,
          evidence: {
            before: { date: isoDate(series.dates[before]), value: series.values[before], line: series.lines[before] },
            spike: { date: isoDate(day), value: series.values[spike], line: series.lines[spike] },
            after: { date: isoDate(series.dates[after]), value: series.values[after], line: series.lines[after] },
            move: round(Math.expm1(returns.raw[k]), 6),
            reversal: round(Math.expm1(returns.raw[k + 1]), 6),
            robust_z: round(returns.z[k], 2),
            ...(swap ? { likely_cause: 'swapped_digits', likely_intended: swap.intendedValue } : {}),
          },
          identity: [isoDate(day)],
        }),
      );
      k++;
    }
    return findings;
  },
};

/** The digit swap that explains a spike at step `k` beyond the series' bar, of any size (see `src/checks/digit-swap.ts`). */
export function swappedDigitsSpike(series: SeriesSlice, returns: ResidualMoves, k: number, params: SpikeParams): DigitSwap | null {
  const bar = spikeBar(returns, params);
  return swappedDigits(series, returns, k, bar, bar * (1 - params.reversal_tolerance));
}

/**
 * A series whose ordinary days are wild needs a wilder spike: 1.9 × its 99th-percentile |z|
 * is about 5 for normal residuals (the floor) and 7–9 for Student-t(4–5) ones.
 */
function spikeBar(returns: ResidualMoves, params: SpikeParams): number {
  return Math.max(params.min_z, params.tail_multiple * returns.extreme);
}

/** Step `k` is a large move and step `k + 1` takes it back. */
export function isSpikeReversal(returns: ResidualMoves, k: number, params: SpikeParams): boolean {
  if (k + 1 >= returns.count || returns.to[k] !== returns.from[k + 1]) return false;
  const out = returns.residual[k];
  const back = returns.residual[k + 1];
  const bar = spikeBar(returns, params);
  return (
    Math.abs(out) >= params.min_move &&
    Math.abs(returns.z[k]) >= bar &&
    Math.abs(returns.z[k + 1]) >= bar * (1 - params.reversal_tolerance) &&
    Math.sign(back) === -Math.sign(out) &&
    Math.abs(out + back) <= params.reversal_tolerance * Math.abs(out)
  );
}
