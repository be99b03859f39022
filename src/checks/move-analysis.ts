/**
 * What the check runner works out once per series for the move-based checks, and hands them
 * in the series' context: the residual model of the series' moves, and which steps other
 * checks claim, judged with the run's resolved parameters for those checks (not their
 * built-in defaults). A date-shifted span silences spikes and outliers inside it only when
 * `date_shift` is enabled for the series, and with the parameters the run gives it; a split or
 * spike silences an outlier on its day only when `split_like_jump` or `spike_reversal` is on.
 */
import type { SeriesSlice } from '../series/frame.js';
import type { SeriesContext } from './check.js';
import { residualMoves, type MoveScratch, type ResidualMoves } from './residual-moves.js';
import { benchmarkStepMoves } from './series-tables.js';
import { findShifts, type Shift, type ShiftParams } from '../../checks/date-shift.js';
import type { SplitParams } from '../../checks/split-like-jump.js';
import type { SpikeParams } from '../../checks/spike-reversal.js';

export interface MoveAnalysis {
  readonly model: ResidualMoves;
  /** Date-shifted spans found with `shiftParams`; empty when date_shift is off or there is no benchmark. */
  readonly shifts: readonly Shift[];
  /** A lag the whole history shows (a valuation point, not a fault): claims no steps. */
  readonly constantLag?: Shift;
  /** The run's date_shift parameters for this series; absent when the check is off. */
  readonly shiftParams?: ShiftParams;
  /** The run's split_like_jump parameters for this series; absent when the check is off. */
  readonly split?: SplitParams;
  /** The run's spike_reversal parameters for this series; absent when the check is off. */
  readonly spike?: SpikeParams;
}

/** The resolved parameters of the checks that claim steps, each absent when that check is off. */
export interface ClaimingParams {
  readonly date_shift?: ShiftParams;
  readonly split_like_jump?: SplitParams;
  readonly spike_reversal?: SpikeParams;
}

/**
 * Builds the series' analysis: one model, and the spans and parameters that claim its steps.
 * With `scratch`, the model's arrays live in it and are valid only until the next series'
 * analysis with the same scratch (see `MoveScratch`).
 */
export function analyseMoves(series: SeriesSlice, context: SeriesContext, claiming: ClaimingParams, scratch?: MoveScratch): MoveAnalysis {
  const model = residualMoves(series, context, scratch);
  const shiftParams = claiming.date_shift;
  const benchmark = context.benchmark;
  const found = shiftParams && benchmark ? findShifts(series, model, benchmark, shiftParams, benchmarkStepMoves(context, benchmark)) : [];
  const shifts = found.filter((shift) => !shift.constant);
  const constantLag = found.find((shift) => shift.constant);
  return { model, shifts, constantLag, shiftParams, split: claiming.split_like_jump, spike: claiming.spike_reversal };
}


/**
 * The analysis the runner put in the context, or, for a check called on its own outside the
 * runner, the bare model with no step claimed by any other check.
 */
export function movesOf(series: SeriesSlice, context: SeriesContext): MoveAnalysis {
  return context.moves ?? { model: residualMoves(series, context), shifts: [] };
}

/** True when step `k` lies in a span the run's date_shift finds shifted. */
export function inShiftedSpan(analysis: MoveAnalysis, k: number): boolean {
  return analysis.shifts.some((shift) => k >= shift.firstStep && k <= shift.lastStep);
}
