import type { SeriesCheck } from '../src/checks/check.js';
import type { SeriesSlice } from '../src/series/frame.js';
import type { SeriesContext } from '../src/checks/check.js';
import { movesOf } from '../src/checks/move-analysis.js';
import { benchmarkStepMoves } from '../src/checks/series-tables.js';
import { tailDensity, type ResidualMoves } from '../src/checks/residual-moves.js';
import { calendarOf, isoDate, makeFinding, median, orderByKey, robustScale } from '../src/checks/support.js';

interface StaleParams {
  min_days: number;
  max_chance: number;
  accrual_max_daily: number;
  [key: string]: number;
}

/**
 * The same NAV on `min_days` or more consecutive business days. Three days is the default: a
 * fund priced to four or more significant decimals practically never shows the same NAV three
 * days running, while feeds do go stale for just a few days.
 *
 * The bar rises for series that often repeat by rounding alone: a run must also be unlikely
 * by chance given how often the series repeats outside suspect runs (chance of such a run
 * anywhere in the series below `max_chance`). Series marked `stable_value` in the master, and
 * smoothly accruing ones (at least 98 % of changes upward and a median daily change below
 * `accrual_max_daily`), are not checked.
 */
export const staleValue: SeriesCheck<StaleParams> = {
  id: 'stale_value',
  scope: 'series',
  purpose: 'The same NAV repeated on several consecutive business days.',
  defaults: { min_days: 3, max_chance: 0.01, accrual_max_daily: 0.0005 },
  readsMoves: true,
  run(series, context, params) {
    if (context.master?.stable_value) return [];
    // Only runs of two or more equal values are judged, and most series have none: one pass
    // that builds nothing says so before the rows and runs are listed.
    if (!repeatsAValue(series, context.asOf)) return [];
    const rows = positiveFirstRows(series, context.asOf);
    if (rows.length < 2) return [];
    const runStarts = equalValueRuns(series, rows);
    // Only runs of two or more equal values are judged, and most series have none (a run per
    // observation): those need no accrual test and no chance model, the largest cost of the check.
    if (runStarts.length - 1 === rows.length || accruesSmoothly(series, rows, params.accrual_max_daily)) return [];
    const model = chanceModel(series, rows, runStarts, context, params);
    const calendar = calendarOf(context);
    const judged: Array<{ first: number; last: number; length: number; days: number; chance: number; required: number }> = [];
    const shiftStarts = shiftStartDays(series, context);
    const shiftedSpans = shiftedDateSpans(series, context);
    for (let r = 0; r + 1 < runStarts.length; r++) {
      const at = runStarts[r];
      const length = runStarts[r + 1] - at;
      if (length < 2) continue;
      const first = rows[at];
      const last = rows[at + length - 1];
      const days = context.calendars.businessDayDistance(calendar, series.dates[first], series.dates[last]) + 1;
      // Stamping a day late from some date on repeats that date's value once: the shift is the cause.
      if (shiftStarts.some((day) => Math.abs(day - series.dates[last]) <= 7)) continue;
      if (days >= params.min_days) {
        const { chance, required } = runChance(model, at, length, rows.length, params);
        if (rows.length * chance <= params.max_chance) {
          judged.push({ first, last, length, days, chance: rows.length * chance, required: Math.max(params.min_days, required) });
          continue;
        }
      }
      if (shiftedSpans.some(([from, to]) => series.dates[first] >= from && series.dates[first] <= to)) continue;
      const glaring = glaringRepeatChance(model, at, length);
      if (glaring !== undefined && rows.length * glaring <= params.max_chance) judged.push({ first, last, length, days, chance: rows.length * glaring, required: days });
    }
    return judged
      .map(({ first, last, length, days, chance, required }) => {
        return makeFinding({
          check: 'stale_value',
          severity: 'warning',
          seriesId: series.id,
          start: series.dates[first],
          end: series.dates[last],
          message: `${series.id} shows the same NAV ${series.values[first]} on ${days} consecutive business days, ${isoDate(series.dates[first])} to ${isoDate(series.dates[last])}; the price may not have been updated.`,
          evidence: {
            value: series.values[first],
            business_days: days,
            observations: length,
            first: { date: isoDate(series.dates[first]), line: series.lines[first] },
            last: { date: isoDate(series.dates[last]), line: series.lines[last] },
            required_days: required,
            chance_by_rounding: Number(chance.toPrecision(3)),
          },
          identity: [isoDate(series.dates[first])],
        });
      });
  },
};

/** Dates where a span the run's date_shift finds shifted begins. */
function shiftStartDays(series: SeriesSlice, context: SeriesContext): number[] {
  const moves = context.moves;
  return moves ? moves.shifts.map((shift) => series.dates[moves.model.from[shift.firstStep]]) : [];
}

/** First and last date of each span the run's date_shift finds shifted: there the benchmark's implied moves are of other days. */
function shiftedDateSpans(series: SeriesSlice, context: SeriesContext): Array<[number, number]> {
  const moves = context.moves;
  return moves ? moves.shifts.map((shift) => [series.dates[moves.model.from[shift.firstStep]], series.dates[moves.model.to[shift.lastStep]]]) : [];
}

/** The first row of each date up to `asOf` whose value is positive. */
function positiveFirstRows(series: SeriesSlice, asOf: number): number[] {
  const rows: number[] = [];
  for (let i = 0; i < series.dates.length; i++) {
    if (series.dates[i] > asOf) break;
    if ((i === 0 || series.dates[i] !== series.dates[i - 1]) && series.values[i] > 0) rows.push(i);
  }
  return rows;
}

/** True when two consecutive rows of `positiveFirstRows` have the same value: a run of two or more. */
export function repeatsAValue(series: SeriesSlice, asOf: number): boolean {
  const dates = series.dates;
  const values = series.values;
  let previous = NaN;
  for (let i = 0; i < dates.length; i++) {
    if (dates[i] > asOf) break;
    if ((i === 0 || dates[i] !== dates[i - 1]) && values[i] > 0) {
      if (values[i] === previous) return true;
      previous = values[i];
    }
  }
  return false;
}

/**
 * The runs of equal values among `rows`, as positions in `rows`: run r is rows[starts[r]] to
 * rows[starts[r + 1] − 1], and the last entry is rows.length. Positions, not an array per run:
 * a series has thousands of runs, most of one value.
 */
function equalValueRuns(series: SeriesSlice, rows: number[]): Int32Array {
  const starts = new Int32Array(rows.length + 1);
  let count = 0;
  for (let k = 0; k < rows.length; k++) {
    if (k === 0 || series.values[rows[starts[count - 1]]] !== series.values[rows[k]]) starts[count++] = k;
  }
  starts[count] = rows.length;
  return starts.subarray(0, count + 1);
}

/**
 * The chance that the run's repeats all happen by rounding alone: the product of its steps'
 * chances, each raised by the series' calibration factor (observed over expected repeats
 * outside suspect runs and outside this run, with one pseudo-observation of each so a series
 * with a single chance repeat is not over-corrected). Also the run length a run with this
 * run's typical step chance would need (for the evidence).
 */
function runChance(model: ChanceModel | undefined, at: number, length: number, observations: number, params: StaleParams): { chance: number; required: number } {
  if (!model) return { chance: 0, required: params.min_days };
  let observed = model.observed;
  let expected = model.expected;
  for (let j = Math.max(0, at - 1); j < at + length - 1; j++) {
    if (!model.counted[j]) continue;
    expected -= model.chance[j];
    if (j >= at) observed--;
  }
  const factor = Math.max(1, (observed + 1) / (expected + 1));
  // The series' plain repeat rate is the floor on days the benchmark implied less than
  // IMPLIED_TICKS ticks of move: there a repeat is ordinary for a coarsely printed fund. On
  // days it implied more, the floor is the repeat share of the days most alike (see there).
  let pairs = 0;
  for (let j = 0; j < model.counted.length; j++) if (model.counted[j] && (j < at - 1 || j >= at + length - 1)) pairs++;
  const plain = pairs > 0 ? observed / pairs : 0;
  let logChance = 0;
  for (let j = at; j < at + length - 1; j++) {
    const floor = model.implied[j] >= IMPLIED_TICKS ? alikeRepeatShare(model, j, at - 1, at + length - 1) : plain;
    logChance += Math.log(Math.min(1, Math.max(floor, factor * model.chance[j])));
  }
  const perStep = Math.exp(logChance / (length - 1));
  const required = perStep >= 1 ? Infinity : Math.ceil(Math.log(params.max_chance / observations) / Math.log(perStep)) + 1;
  return { chance: Math.exp(logChance), required };
}

/**
 * Unchanged prices on a coarsely printed fund on days its benchmark implied several ticks of
 * move, while the fund's own residual move spans only a few ticks: one such day implying
 * `GLARING_TICKS` ticks or more, or two or more implying `IMPLIED_TICKS` or more, are evidence
 * however short the run (a run shorter than `min_days` is judged only this way). The chance is
 * the product over those steps of the chance of rounding to the same price, raised by the
 * series' calibration factor, with the fund's own fitted tail as its floor; undefined when the
 * run has no such steps. (The floor of the days most alike, which `runChance` uses for grids
 * the tick estimate does not see, is not needed here: on such a grid the residual spans many
 * estimated ticks and the step does not qualify, while two other brief stale prices on the same
 * fund would wrongly raise it.) Finely printed funds (a residual move of more than
 * `COARSE_SPREAD_TICKS` ticks) are left to the run rule: a single repeat there is more often
 * another fault's trace (a date stamped late, a row copied) than a price left unchanged.
 */
function glaringRepeatChance(model: ChanceModel | undefined, at: number, length: number): number | undefined {
  if (!model) return undefined;
  const factor = Math.max(1, (model.observed + 1) / (model.expected + 1));
  let steps = 0, glaring = false, logChance = 0;
  for (let j = at; j < at + length - 1; j++) {
    if (model.implied[j] < IMPLIED_TICKS || model.spread[j] > COARSE_SPREAD_TICKS) continue;
    // Daily residuals are fat-tailed: the fund's own tail, not a normal curve, says how often
    // its residual cancels a move this many spreads wide.
    const tail = model.tail(model.implied[j] / model.spread[j], j);
    const rounding = Math.max(model.chance[j], tail === undefined ? 0 : tail / model.spread[j]);
    logChance += Math.log(Math.min(1, factor * rounding));
    steps++;
    glaring ||= model.implied[j] >= GLARING_TICKS;
  }
  return glaring || steps >= 2 ? Math.exp(logChance) : undefined;
}

/** A benchmark-implied move of this many printed ticks makes one unchanged price a defect (common practice, from memory). */
const GLARING_TICKS = 8;

/** A fund whose typical residual move is at most this many printed ticks is coarsely printed. */
const COARSE_SPREAD_TICKS = 10;

/**
 * A day on which the benchmark implied a move of this many printed ticks or more should have
 * moved the NAV: 4 ticks is where a careful reader of a 2-decimal fund's history starts to call
 * an unchanged price a defect (common practice, from memory).
 */
const IMPLIED_TICKS = 4;

/** Steps of the series' own history that a run's step is compared with (see `alikeRepeatShare`). */
const ALIKE_STEPS = 40;

/**
 * The floor of a step's chance: how often the series repeated on the `ALIKE_STEPS` other days
 * the model rated most alike (nearest in modelled chance, outside the steps from `skipFrom` to
 * `skipTo` − 1, the run judged and the step into it). When the series' values sit on a grid
 * the tick estimate does not see (a 2-decimal NAV rescaled by a distribution), it repeats even
 * on days the model calls unlikely, and this floor says so; an honest 2-decimal fund repeats
 * often on days its benchmark barely moved and almost never on days it implied several ticks
 * of move, so a repeat on such a day is judged by the benchmark, not by the fund's overall
 * repeat rate.
 */
function alikeRepeatShare(model: ChanceModel, j: number, skipFrom: number, skipTo: number): number {
  const order = model.byChance;
  const target = model.chance[j];
  // First position whose chance is ≥ the step's own, then widen both ways, nearest first.
  let lo = 0, hi = order.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (model.chance[order[mid]] < target) lo = mid + 1;
    else hi = mid;
  }
  let left = lo - 1, right = lo, taken = 0, repeats = 0;
  const distance = (k: number) => Math.abs(Math.log((model.chance[order[k]] + 1e-300) / (target + 1e-300)));
  while (taken < ALIKE_STEPS && (left >= 0 || right < order.length)) {
    const useLeft = right >= order.length || (left >= 0 && distance(left) <= distance(right));
    const step = order[useLeft ? left-- : right++];
    if (step >= skipFrom && step < skipTo) continue;
    taken++;
    repeats += model.repeated[step];
  }
  // One coincidence among the alike days is not evidence of a hidden grid; two or more are.
  return taken > 0 && repeats >= 2 ? repeats / taken : 0;
}

/** Runs of this many equal values or more are left out when measuring how often a series repeats by rounding. */
const SUSPECT_RUN = 4;

/** Observations on each side of a run whose values give the printed tick near it. */
const TICK_WINDOW = 32;

/** Observations on each side of a step whose values give the grid right around it. */
const NEAR_TICK = 8;

/**
 * The chance model of a series: for each step between consecutive observations, the chance
 * that its printed NAV stays the same by rounding alone, given the level, the printed tick near
 * it, the fund's typical residual move and what its benchmark did over the same dates; and a
 * calibration factor from how often the series actually repeats compared with what the model
 * expects (outside suspect runs), so a series that is stickier than its moves suggest asks for
 * longer runs.
 */
interface ChanceModel {
  /** chance[k]: the step from rows[k] to rows[k + 1] repeats the value by rounding alone. */
  readonly chance: Float64Array;
  /** The move the benchmark implied for the step, in printed ticks (0 without a benchmark price). */
  readonly implied: Float64Array;
  /** The spread of the step's move around that, in printed ticks. */
  readonly spread: Float64Array;
  /** One side's density of the fund's residual at x robust standard deviations (its tail fitted without step `j`), when known. */
  readonly tail: (x: number, j: number) => number | undefined;
  readonly observed: number;
  readonly expected: number;
  /** Steps counted in `observed` and `expected` (outside suspect runs). */
  readonly counted: Uint8Array;
  /** 1 for a counted step that repeats the value. */
  readonly repeated: Uint8Array;
  /** The counted steps, by ascending chance. */
  readonly byChance: Int32Array;
}

function chanceModel(series: SeriesSlice, rows: number[], runStarts: Int32Array, context: SeriesContext, params: StaleParams): ChanceModel | undefined {
  const n = rows.length;
  if (n < 21) return undefined;
  // The typical one-day move in log terms, of the series alone (for steps the benchmark
  // cannot price) and of its residual against the benchmark.
  const returns = movesOf(series, context).model;
  const alone = robustScale(logChanges(series, rows, returns), 0);
  const fitted = returns.hasBenchmark && returns.count >= 20 && returns.scale > 0;
  const benchmark = context.benchmark;
  const benchMoves = benchmark ? benchmarkStepMoves(context, benchmark) : undefined;
  const calendar = calendarOf(context);
  const shown = decimalsShown(series, rows);
  const blockTick = blockTicks(series, rows, shown);
  // The grid right around a step: a 2-decimal stretch next to values re-rounded to 4 decimals
  // (after a mispricing or a rescaling) keeps its own coarser tick.
  const nearTick = nearTicks(series, rows, shown);
  const chance = new Float64Array(n - 1);
  const implied = new Float64Array(n - 1);
  const spread = new Float64Array(n - 1);
  let cursor = 0;
  for (let k = 0; k < n - 1; k++) {
    const a = rows[k];
    const b = rows[k + 1];
    const dayA = series.dates[a];
    const dayB = series.dates[b];
    const span = dayB - dayA === 1 ? 1 : Math.max(1, context.calendars.businessDayDistance(calendar, dayA, dayB));
    let mean = 0;
    let sd = alone * Math.sqrt(span);
    if (fitted && benchmark) {
      // Positions of both dates in the benchmark (a merge: both are ascending).
      const dates = benchmark.dates;
      while (cursor < dates.length && dates[cursor] < dayA) cursor++;
      const p = cursor < dates.length && dates[cursor] === dayA ? cursor : -1;
      let next = cursor;
      while (next < dates.length && dates[next] < dayB) next++;
      const q = next < dates.length && dates[next] === dayB ? next : -1;
      if (p >= 0 && q >= 0 && benchmark.values[p] > 0 && benchmark.values[q] > 0) {
        mean = returns.beta * (q === p + 1 && benchMoves ? benchMoves[p] : Math.log(benchmark.values[q] / benchmark.values[p]));
        sd = returns.scale * Math.sqrt(Math.max(span, q - p));
      }
    }
    const level = series.values[a];
    const tick = Math.max(blockTick[Math.floor(k / BLOCK_SIZE)], nearTick[k]);
    chance[k] = sameBinChance(level * mean, level * sd, tick);
    implied[k] = Math.abs(level * mean) / tick;
    spread[k] = (level * sd) / tick;
  }
  const counted = new Uint8Array(n - 1);
  const repeated = new Uint8Array(n - 1);
  let observed = 0;
  let expected = 0;
  const cutoff = Math.max(params.min_days, SUSPECT_RUN);
  for (let r = 0; r + 1 < runStarts.length; r++) {
    const position = runStarts[r];
    const length = runStarts[r + 1] - position;
    // Steps inside the run and the step into it.
    const suspect = length >= cutoff;
    for (let j = position; j < position + length - 1; j++) {
      if (suspect) continue;
      counted[j] = 1;
      repeated[j] = 1;
      observed++;
      expected += chance[j];
    }
    const into = position + length - 1;
    if (!suspect && into < n - 1) {
      counted[into] = 1;
      expected += chance[into];
    }
  }
  const steps: number[] = [];
  for (let j = 0; j < n - 1; j++) if (counted[j]) steps.push(j);
  // The tail that judges a repeat is fitted without it: the repeat's own residual (the implied
  // move cancelled) is among the largest and would fatten it.
  const tail = (x: number, j: number) => {
    if (!fitted) return undefined;
    const step = stepOf(returns, rows[j], rows[j + 1]);
    return tailDensity(returns, x, step < 0 ? [] : [step]);
  };
  // Ordered on first use: only a run that is judged reads it, and most series have none.
  let byChance: Int32Array | undefined;
  return {
    chance, implied, spread, tail, observed, expected, counted, repeated,
    get byChance() {
      return (byChance ??= orderByKey(steps, chance));
    },
  };
}

/**
 * ln(v[rows[k]] / v[rows[k − 1]]) for each k ≥ 1. Where the value changes, the residual model
 * mostly has a step ending on rows[k] that starts from a row of the same value as rows[k − 1]:
 * its raw move is the logarithm of the very same quotient, so it is read, not computed again.
 */
export function logChanges(series: SeriesSlice, rows: number[], returns: ResidualMoves): Float64Array {
  const changes = new Float64Array(rows.length - 1);
  let step = 0;
  for (let k = 1; k < rows.length; k++) {
    const before = series.values[rows[k - 1]];
    const after = series.values[rows[k]];
    while (step < returns.count && returns.to[step] < rows[k]) step++;
    const same = step < returns.count && returns.to[step] === rows[k] && series.values[returns.from[step]] === before;
    changes[k - 1] = same ? returns.raw[step] : Math.log(after / before);
  }
  return changes;
}

/** The residual model's step from slice row `from` to row `to`, or −1 (a binary search: its steps are in date order). */
function stepOf(returns: ResidualMoves, from: number, to: number): number {
  let lo = 0, hi = returns.count;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (returns.from[mid] < from) lo = mid + 1;
    else hi = mid;
  }
  return lo < returns.count && returns.from[lo] === from && returns.to[lo] === to ? lo : -1;
}

/**
 * The chance that a level moving by D ~ N(mean, sd²) (in currency) prints the same value on a
 * grid of `tick`: with the previous unrounded level anywhere in its bin, E[(1 − |D|/tick)+].
 * In closed form [G(mean + tick) − 2G(mean) + G(mean − tick)] / tick with
 * G(a) = a·Φ(a/sd) + sd·φ(a/sd); for sd well above the tick, tick·φ(mean/sd)/sd.
 */
export function sameBinChance(mean: number, sd: number, tick: number): number {
  if (!(sd > 0)) return Math.abs(mean) < tick ? 1 - Math.abs(mean) / tick : 0;
  if (sd > 5 * tick) return Math.min(1, (tick * normalDensity(mean / sd)) / sd);
  const g = (a: number) => a * normalCdf(a / sd) + sd * normalDensity(a / sd);
  return Math.max(0, Math.min(1, (g(mean + tick) - 2 * g(mean) + g(mean - tick)) / tick));
}

function normalDensity(x: number): number {
  return Math.exp(-0.5 * x * x) / Math.sqrt(2 * Math.PI);
}

/** Φ by Abramowitz and Stegun 7.1.26 (error below 1.5e-7). */
function normalCdf(x: number): number {
  const t = 1 / (1 + 0.3275911 * (Math.abs(x) / Math.SQRT2));
  const erf = 1 - ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-(x * x) / 2);
  return x >= 0 ? 0.5 * (1 + erf) : 0.5 * (1 - erf);
}

/**
 * The printed tick of each block of 2·TICK_WINDOW observations (step k reads block
 * ⌊k / BLOCK_SIZE⌋): the finest grid the block's values sit on (decimals shown, then the greatest common divisor of the values in
 * units of the last decimal, so prices quoted in half-cents, or a 2-decimal NAV halved by a
 * split, have a tick of 0.005). Blocks, not the whole series, because the printed precision
 * can change within a history (a new administrator, a split printed to more decimals).
 */
function blockTicks(series: SeriesSlice, rows: number[], shown: Uint8Array): Float64Array {
  const ticks = new Float64Array(Math.ceil(rows.length / BLOCK_SIZE));
  for (let block = 0; block < ticks.length; block++) {
    const start = block * BLOCK_SIZE;
    const end = Math.min(rows.length, start + BLOCK_SIZE);
    // A short last block borrows the values before it.
    ticks[block] = printedTick(series, rows, Math.max(0, Math.min(start, end - BLOCK_SIZE)), end, shown);
  }
  return ticks;
}

/** Observations in a block of `blockTicks`. */
const BLOCK_SIZE = 2 * TICK_WINDOW;

/** 10^k and 10^−k for the decimals a printed value can show, computed once (a power per value was a hot spot). */
const POWERS_OF_TEN = Array.from({ length: 9 }, (_, k) => 10 ** k);
const INVERSE_POWERS_OF_TEN = Array.from({ length: 9 }, (_, k) => 10 ** -k);

/**
 * The decimals each observation shows (`decimalsOf`), once per series: the windows of every
 * step overlap, and counting them again per window was the largest cost of the checks.
 */
function decimalsShown(series: SeriesSlice, rows: number[]): Uint8Array {
  const shown = new Uint8Array(rows.length);
  // A series mostly shows one number of decimals: tried first, it usually settles a value in one step.
  let guess = -1;
  for (let k = 0; k < rows.length; k++) {
    const value = series.values[rows[k]];
    shown[k] = guess >= 0 && showsExactly(value, guess) ? guess : decimalsOf(value);
    guess = shown[k] <= MAX_PROVEN_DECIMALS ? shown[k] : -1;
  }
  return shown;
}

/** The most decimals `showsExactly` can prove (see there). */
const MAX_PROVEN_DECIMALS = 5;

/**
 * True when `decimalsOf(value)` is `decimals` (at most MAX_PROVEN_DECIMALS), proven from that
 * one power of ten instead of trying every smaller one first: scaled, the value is whole to
 * within `decimalsOf`'s tolerance, below 1e9, and its last decimal is not 0. Then with d fewer
 * decimals it lies at least 10^−d ≥ 1e−5 from a whole number, less rounding errors below
 * 3e−7: far beyond the tolerance of 1e−6, so `decimalsOf` would pass every smaller count and
 * stop at this one.
 */
function showsExactly(value: number, decimals: number): boolean {
  const scaled = decimals === 0 ? value : value * POWERS_OF_TEN[decimals];
  const whole = Math.round(scaled);
  return scaled < 1e9 && Math.abs(scaled - whole) <= 1e-6 * Math.max(1, scaled * 1e-9) && whole % 10 !== 0;
}

/** `shown[k]`: the decimals observation `rows[k]` shows (`decimalsShown`). */
function printedTick(series: SeriesSlice, rows: number[], from: number, to: number, shown: Uint8Array): number {
  const byDecimals = new Int32Array(9);
  for (let k = from; k < to; k++) byDecimals[shown[k]]++;
  return tickOfWindow(series, rows, from, to, shown, byDecimals);
}

/**
 * `printedTick` of the window around each step k (observations k − NEAR_TICK to
 * k + NEAR_TICK + 1), with the count of decimals slid along instead of counted again per step.
 *
 * Most windows' values have no common divisor above one (a fund printed to 4 decimals), and
 * the windows overlap: a stretch of observations whose values have none stays inside the next
 * dozen windows, which then need no greatest common divisor at all. The divisor is exact on
 * whole numbers, so finding it from the window's end instead of its start changes nothing.
 */
function nearTicks(series: SeriesSlice, rows: number[], shown: Uint8Array): Float64Array {
  const ticks = new Float64Array(Math.max(0, rows.length - 1));
  const byDecimals = new Int32Array(9);
  let from = 0, to = 0;
  // Observations coprimeFrom … coprimeTo, at coprimeDecimals, have no common divisor above one.
  let coprimeFrom = -1, coprimeTo = -1, coprimeDecimals = -1;
  for (let k = 0; k < ticks.length; k++) {
    const nextFrom = Math.max(0, k - NEAR_TICK);
    const nextTo = Math.min(rows.length, k + NEAR_TICK + 2);
    for (; to < nextTo; to++) byDecimals[shown[to]]++;
    for (; from < nextFrom; from++) byDecimals[shown[from]]--;
    const decimals = gridDecimals(byDecimals, to - from);
    if (decimals === coprimeDecimals && coprimeFrom >= from && coprimeTo < to) {
      ticks[k] = INVERSE_POWERS_OF_TEN[decimals];
      continue;
    }
    let divisor = 0, at = to;
    while (at > from && divisor !== 1) {
      at--;
      if (shown[at] <= decimals) divisor = gcd(divisor, Math.round(series.values[rows[at]] * POWERS_OF_TEN[decimals]));
    }
    if (divisor === 1) {
      coprimeFrom = at;
      coprimeTo = to - 1;
      coprimeDecimals = decimals;
    }
    ticks[k] = Math.max(1, divisor) * INVERSE_POWERS_OF_TEN[decimals];
  }
  return ticks;
}

/** The tick of the window [from, to) whose observations show `byDecimals[d]` values with d decimals. */
function tickOfWindow(series: SeriesSlice, rows: number[], from: number, to: number, shown: Uint8Array, byDecimals: Int32Array): number {
  const decimals = gridDecimals(byDecimals, to - from);
  let divisor = 0;
  for (let k = from; k < to && divisor !== 1; k++) {
    const value = series.values[rows[k]];
    if (shown[k] <= decimals) divisor = gcd(divisor, Math.round(value * POWERS_OF_TEN[decimals]));
  }
  return Math.max(1, divisor) * INVERSE_POWERS_OF_TEN[decimals];
}

/**
 * Decimals shown, as most of a window's `count` values show them (`byDecimals[d]` show d): one
 * odd value (a keying error re-rounded to 4 decimals) does not make a 2-decimal fund's grid finer.
 */
function gridDecimals(byDecimals: Int32Array, count: number): number {
  let decimals = 0;
  for (let seen = byDecimals[0]; decimals < 8 && seen < GRID_SHARE * count; seen += byDecimals[++decimals]);
  return decimals;
}

/** Share of a window's values whose printed decimals set its grid. */
const GRID_SHARE = 0.9;

function decimalsOf(value: number): number {
  let decimals = 0;
  let scaled = value;
  while (decimals < 8 && Math.abs(scaled - Math.round(scaled)) > 1e-6 * Math.max(1, scaled * 1e-9)) scaled = value * POWERS_OF_TEN[++decimals];
  return decimals;
}

function gcd(a: number, b: number): number {
  // Whole numbers that fit 32 bits take integer remainders (the same answer, much quicker).
  if (a >= 0 && b >= 0 && (a | 0) === a && (b | 0) === b) {
    let x = a | 0, y = b | 0;
    while (y !== 0) {
      const rest = x % y;
      x = y;
      y = rest;
    }
    return x;
  }
  while (b) {
    const rest = a % b;
    a = b;
    b = rest;
  }
  return Math.abs(a);
}

function accruesSmoothly(series: SeriesSlice, rows: number[], maxDaily: number): boolean {
  let falls = 0;
  for (let k = 1; k < rows.length; k++) if (series.values[rows[k]] / series.values[rows[k - 1]] - 1 < 0) falls++;
  // Most series fall on far more days than an accruing one may: their changes need no median.
  if (!(falls <= 0.02 * (rows.length - 1))) return false;
  const changes = new Float64Array(rows.length - 1);
  for (let k = 1; k < rows.length; k++) changes[k - 1] = Math.abs(series.values[rows[k]] / series.values[rows[k - 1]] - 1);
  return median(changes) <= maxDaily;
}
