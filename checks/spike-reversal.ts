import type { SeriesCheck } from '../src/checks/check.js';
import { inShiftedSpan, movesOf } from '../src/checks/move-analysis.js';
import { endsOnConflict, fitAgainstBenchmark, sharedWithMarket, tailAt, type Fit, type ResidualMoves } from '../src/checks/residual-moves.js';
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
    let atLag: LaggedFit | undefined;
    // Every test below asks the way out for at least the spike bar or TIGHT_MIN_Z: smaller steps,
    // nearly all of them, are passed over at once.
    const quiet = Math.min(spikeBar(returns, params), TIGHT_MIN_Z);
    for (let k = 0; k + 1 < returns.count; k++) {
      if (Math.abs(returns.z[k]) < quiet) continue;
      const swap = swappedDigitsSpike(series, returns, k, params);
      if (!(swap || isSpikeReversal(returns, k, params) || isTightReversal(returns, k, params)) || inShiftedSpan(analysis, k)) continue;
      // Two rows disagree on the spike's date: one finding (duplicate_conflict) for one cause.
      if (endsOnConflict(series, returns, k)) continue;
      // A crash and rebound that some benchmark in the feed made too, on both days.
      if (sharedWithMarket(series, returns, context.benchmarks, [k, k + 1])) continue;
      // A fund valued a day behind its benchmark carries the market's move of the business day
      // before: its out-and-back is judged against the benchmark at that lag (a digit swap too,
      // which a crash read a day early can mimic).
      const lag = analysis.constantLag?.lag;
      if (lag !== undefined && context.benchmark) {
        atLag ??= laggedFit(returns, context.benchmark, lag);
        if (!isSpikeReversalAtLag(returns, atLag, k, params)) continue;
      }
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
  return outAndBack(returns.residual[k], returns.residual[k + 1], returns.z[k], returns.z[k + 1], spikeBar(returns, params), params);
}

/** A move `out` (robust z `zOut`) beyond the bar that `back` takes nearly all back. */
function outAndBack(out: number, back: number, zOut: number, zBack: number, bar: number, params: SpikeParams): boolean {
  return (
    Math.abs(out) >= params.min_move &&
    Math.abs(zOut) >= bar &&
    Math.abs(zBack) >= bar * (1 - params.reversal_tolerance) &&
    Math.sign(back) === -Math.sign(out) &&
    Math.abs(out + back) <= params.reversal_tolerance * Math.abs(out)
  );
}

/** The benchmark's log move over each step's dates moved `lag` business days, and the fund's fit against it. */
interface LaggedFit {
  readonly bench: Float64Array;
  readonly fit: Fit;
}

function laggedFit(returns: ResidualMoves, benchmark: SeriesSlice, lag: number): LaggedFit {
  const bench = new Float64Array(returns.count).fill(NaN);
  const levels = benchmark.values;
  for (let k = 0; k < returns.count; k++) {
    const p = returns.benchFrom[k] + lag;
    const q = returns.benchTo[k] + lag;
    if (returns.benchFrom[k] >= 0 && returns.benchTo[k] >= 0 && p >= 0 && q < levels.length && levels[p] > 0 && levels[q] > 0) bench[k] = Math.log(levels[q] / levels[p]);
  }
  return { bench, fit: fitAgainstBenchmark(returns.fund, bench, returns.span) };
}

/** Step `k` is still a spike that step `k + 1` takes back when the benchmark is read at the fund's lag (unknown moves count as none). */
function isSpikeReversalAtLag(returns: ResidualMoves, lagged: LaggedFit, k: number, params: SpikeParams): boolean {
  const { bench, fit } = lagged;
  const residual = (j: number) => returns.fund[j] - fit.intercept * returns.span[j] - fit.beta * (Number.isFinite(bench[j]) ? bench[j] : 0);
  const z = (j: number) => residual(j) / (fit.scale * Math.sqrt(returns.span[j]));
  const [out, back, zOut, zBack] = [residual(k), residual(k + 1), z(k), z(k + 1)];
  return outAndBack(out, back, zOut, zBack, spikeBar(returns, params), params) || tightPair(returns, k, out, back, zOut, zBack, params);
}

/**
 * Step `k` is a move below the spike bar that step `k + 1` takes back almost exactly, as a
 * mistyped NAV corrected the next day does: the way back misses the way out by about the two
 * days' own noise (at most `reversal_tolerance` of the move, or `TIGHT_MISS`), where two honest
 * moves of that size in a row are independent. Judged by the chance of such a pair on the
 * series' own fitted tail (fat tails included): two days both at least as large as the smaller
 * move, the second this close to the first's mirror image, over the whole history at most
 * `TIGHT_PAIR_CHANCE`.
 */
export function isTightReversal(returns: ResidualMoves, k: number, params: SpikeParams): boolean {
  if (k + 1 >= returns.count || returns.to[k] !== returns.from[k + 1]) return false;
  return tightPair(returns, k, returns.residual[k], returns.residual[k + 1], returns.z[k], returns.z[k + 1], params);
}

/** The pair of steps `k`, `k + 1` with these residuals and robust z (as published, or at a lag). */
function tightPair(returns: ResidualMoves, k: number, out: number, back: number, zOut: number, zBack: number, params: SpikeParams): boolean {
  if (Math.abs(out) < params.min_move || Math.sign(back) !== -Math.sign(out)) return false;
  const x = Math.abs(zOut);
  if (x < TIGHT_MIN_Z || Math.abs(zBack) < TIGHT_MIN_Z) return false;
  const miss = Math.abs(zOut + zBack);
  // The way back carries both days' own noise: it may miss by three standard deviations of
  // two days' noise (3√2 robust units) even where that is more than the tolerance's share.
  if (!(miss <= Math.max(params.reversal_tolerance * x, TIGHT_MISS))) return false;
  // Two honest days at least as large as the smaller move m, of opposite signs, the second
  // within w = max(1, miss) of the first's mirror image: 2 · ∫ₘ^∞ f(x) · 2w · f(x) dx with the
  // Pareto tail's one-sided density f(x) ∝ x^−(α+1), which is 4w · m · f(m)² / (2α + 1).
  const smaller = Math.min(x, Math.abs(zBack));
  // The tail is fitted without the pair judged: its two days would fatten the tail that judges them.
  const tail = tailAt(returns, smaller, [k, k + 1]);
  if (!tail) return false;
  const chance = Math.min(1, (4 * Math.max(1, miss) * smaller * tail.density * tail.density) / (2 * tail.alpha + 1));
  return returns.count * chance <= TIGHT_PAIR_CHANCE;
}

/** How far the way back may miss the way out, in robust units: three standard deviations of the sum of two days' noise. */
const TIGHT_MISS = 3 * Math.SQRT2;

/** Both moves of a tight pair at least this many robust standard deviations: below it a pair of ordinary days, whatever the tail says. */
const TIGHT_MIN_Z = 4;

/**
 * Chance over a series' whole history of an honest pair of moves that tight: a tenth of
 * `stale_value`'s `max_chance`, because the pair is judged out where the tail is extrapolated
 * from the top 5 % of moves, and that extrapolation understates Student-t(4–5) tails several
 * times over at 5 standard deviations.
 */
const TIGHT_PAIR_CHANCE = 0.0003;
