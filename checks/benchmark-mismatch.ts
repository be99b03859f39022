import type { SeriesCheck } from '../src/checks/check.js';
import type { SeriesSlice } from '../src/series/frame.js';
import { isoWeekStart } from '../src/calendar/days.js';
import { seriesAt } from '../src/series/frame.js';
import { movesOf } from '../src/checks/move-analysis.js';
import { GROSS_Z, type ResidualMoves } from '../src/checks/residual-moves.js';
import { FrameTables, indexInFrame, searchTable, spanLogMove, spansMoves, type DayTable } from '../src/checks/series-tables.js';
import { isoDate, makeFinding, round } from '../src/checks/support.js';

interface MismatchParams {
  index_r2: number;
  poor_r2: number;
  good_r2: number;
  min_gain: number;
  min_sibling_gain: number;
  window_weeks: number;
  min_weeks: number;
  [key: string]: number;
}

/** Categories that promise to track an index; matched case-insensitively on whole words. */
const INDEX_CATEGORY = /\b(index|indexed|tracker|passive|etf)\b/i;

export interface Week {
  start: number;
  end: number;
  fund: number;
}

/**
 * The fund fits its assigned benchmark poorly while another benchmark in the feed fits it
 * well: the signature of a mapping fault. Fit is R² of weekly log returns (weekly returns
 * forgive the one-day timing differences between a fund's valuation point and an index
 * close) over the last `window_weeks` weeks. An index fund (category containing "index",
 * "indexed", "tracker", "passive" or "ETF") is expected to reach R² ≥ `index_r2` (0.99); it is
 * flagged when it falls short and another benchmark reaches it. Any other fund is flagged when
 * another benchmark reaches `good_r2` (0.7) and either
 * - the assigned R² is below `poor_r2` (0.6, well under the 0.80–0.95 usual for an active fund
 *   against a fitting benchmark) and the other beats it by `min_gain` (0.2), or
 * - the other fits better by `min_sibling_gain` (0.1 of R²: smaller gaps between indices of
 *   one asset class move with the period chosen, and funds are not re-mapped for them) and
 *   explains what the assigned one cannot: its t in a
 *   regression on both at least 3.719, a chance of about 0.01 over the whole search (see
 *   `addedByOther`). A sibling index of the same asset class (R²
 *   0.74 where the right one gives 0.94) is caught this way, while two indices that explain
 *   the fund about equally well never trade places.
 * Active funds are also judged on the weeks since each quarter (13 weeks) of the window, with
 * at least `min_weeks` weeks after it: a fund that moved to another index's universe from
 * some date on, its master left as it was, is reported from the quarter where the other index
 * starts to explain it best (the largest t).
 */
export const benchmarkMismatch: SeriesCheck<MismatchParams> = {
  id: 'benchmark_mismatch',
  scope: 'series',
  purpose: 'The fund fits its assigned benchmark poorly while another benchmark fits it well.',
  defaults: { index_r2: 0.99, poor_r2: 0.6, good_r2: 0.7, min_gain: 0.2, min_sibling_gain: 0.1, window_weeks: 156, min_weeks: 26 },
  readsMoves: true,
  run(series, context, params) {
    const { benchmark, benchmarks, master } = context;
    if (!benchmark || !benchmarks) return [];
    // The runner's tables, shared by every fund; a check run on its own makes its own.
    const tables = context.benchmarkTables ?? new FrameTables(benchmarks);
    const weeks = lastWeeklyReturns(series, movesOf(series, context).model, params.window_weeks);
    if (weeks.length < params.min_weeks) return [];
    const isIndexFund = INDEX_CATEGORY.test(master?.category ?? '');
    const verdict = isIndexFund ? judgeIndexFund(weeks, benchmark, tables, params) : judgeActiveFund(weeks, benchmark, tables, params);
    if (!verdict) return [];
    const { assigned, better, from } = verdict;
    const start = weeks[from].start;
    const end = weeks[weeks.length - 1].end;
    const since = from > 0 ? ` since ${isoDate(start).slice(0, 7)}` : '';
    return [
      makeFinding({
        check: 'benchmark_mismatch',
        severity: 'error',
        seriesId: series.id,
        start,
        end,
        message: since
          ? `${series.id} fits ${better.id} better than its assigned benchmark ${benchmark.id}${since} (R² ${round(better.r2, 3)} against ${round(assigned, 3)} on weekly returns); the fund looks re-mapped or its benchmark mapping out of date.`
          : `${series.id} fits its assigned benchmark ${benchmark.id} poorly (R² ${round(assigned, 3)} on weekly returns${isIndexFund ? ', below the 0.99 an index fund should reach' : ''}) while ${better.id} fits it with R² ${round(better.r2, 3)}; the benchmark mapping looks wrong.`,
        evidence: {
          assigned_benchmark: benchmark.id,
          assigned_r2: round(assigned, 4),
          better_benchmark: better.id,
          better_r2: round(better.r2, 4),
          index_fund: isIndexFund,
          category: master?.category ?? null,
          weeks: weeks.length - from,
          from: isoDate(start),
          to: isoDate(end),
          master_line: master?.line ?? null,
        },
        identity: [benchmark.id, better.id],
      }),
    ];
  },
};

interface Verdict {
  assigned: number;
  better: { id: string; r2: number };
  /** First week of the judged weeks. */
  from: number;
}

/** A benchmark of the feed with its day table, and its place in the tables when it has one (see `weekMove`). */
interface Priced {
  readonly series: SeriesSlice;
  readonly days: DayTable;
  readonly tables?: FrameTables;
  readonly index: number;
}

function pricedAt(tables: FrameTables, index: number): Priced {
  return { series: seriesAt(tables.frame, index), days: tables.dayTable(index), tables, index };
}

/** The assigned benchmark, a series of the feed's benchmark frame (the runner looked it up there). */
function assignedOf(benchmark: SeriesSlice, tables: FrameTables): Priced {
  const index = indexInFrame(tables.frame, benchmark);
  return index >= 0 ? pricedAt(tables, index) : { series: benchmark, days: searchTable(benchmark), index: -1 };
}

function judgeIndexFund(weeks: Week[], benchmark: SeriesSlice, tables: FrameTables, params: MismatchParams): Verdict | null {
  const assigned = suffixFits(weeks, assignedOf(benchmark, tables), params.min_weeks)[0];
  if (!(assigned < params.index_r2)) return null;
  const better = bestOther(everyBenchmarkFits(weeks, tables, params.min_weeks), benchmark.id, 0);
  return better && better.r2 >= params.index_r2 ? { assigned, better, from: 0 } : null;
}

/** The weeks from the quarter where another benchmark explains the fund best, if one does. */
function judgeActiveFund(weeks: Week[], benchmark: SeriesSlice, tables: FrameTables, params: MismatchParams): Verdict | null {
  const priced = assignedOf(benchmark, tables);
  const fits = everyBenchmarkFits(weeks, tables, params.min_weeks);
  // The assigned benchmark's row of the fits is made of the very moves `weekMove` gives it.
  const assignedFits = priced.index >= 0 ? fits.of(priced.index) : suffixFits(weeks, priced, params.min_weeks);
  let verdict: Verdict | null = null;
  let bestScore = 0;
  for (let quarter = 0; quarter < assignedFits.length; quarter++) {
    const from = quarter * QUARTER_WEEKS;
    const assigned = assignedFits[quarter];
    if (!Number.isFinite(assigned)) break;
    const better = bestOther(fits, benchmark.id, quarter);
    if (!better || better.r2 < params.good_r2 || !(better.r2 >= assigned + params.min_sibling_gain)) continue;
    const poorAndBeaten = from === 0 && assigned < params.poor_r2 && better.r2 >= assigned + params.min_gain;
    const t = addedByOther(weeks, from, priced, pricedAt(tables, better.index));
    if (!poorAndBeaten && !(t >= Z_PER_COMPARISON)) continue;
    // The start where the evidence for the other benchmark is strongest.
    const score = poorAndBeaten ? Infinity : t;
    if (score > bestScore) [bestScore, verdict] = [score, { assigned, better, from }];
  }
  return verdict;
}

const QUARTER_WEEKS = 13;

/**
 * Standard normal quantile for a chance of 1 in 10,000 (3.719, from normal tables): about 0.01
 * over the whole search, 7 other benchmarks × 12 starting quarters ≈ 100 comparisons.
 */
const Z_PER_COMPARISON = 3.719;

/**
 * How much `other` adds to `assigned` in explaining the fund's weekly returns over the weeks
 * from `from` that both price: the t statistic of other's coefficient when the fund's returns
 * are regressed on both benchmarks at once (an encompassing test). When the assigned index is
 * the fund's own, a sibling's own moves are unrelated to the fund and its t is about standard
 * normal; when the fund follows the sibling, the sibling's moves explain what the assigned
 * index cannot and its t runs to 10 and more within a few quarters.
 */
function addedByOther(weeks: Week[], from: number, assigned: Priced, other: Priced): number {
  let n = 0, sy = 0, sa = 0, sb = 0, syy = 0, saa = 0, sbb = 0, sab = 0, sya = 0, syb = 0;
  for (let i = from; i < weeks.length; i++) {
    const a = weekMove(weeks[i], assigned);
    const b = weekMove(weeks[i], other);
    if (!Number.isFinite(a) || !Number.isFinite(b)) continue;
    const y = weeks[i].fund;
    n++;
    sy += y; sa += a; sb += b;
    syy += y * y; saa += a * a; sbb += b * b; sab += a * b; sya += y * a; syb += y * b;
  }
  if (n < 4) return NaN;
  const caa = saa - (sa * sa) / n, cbb = sbb - (sb * sb) / n, cab = sab - (sa * sb) / n;
  const cya = sya - (sy * sa) / n, cyb = syb - (sy * sb) / n, cyy = syy - (sy * sy) / n;
  const det = caa * cbb - cab * cab;
  if (!(det > 0)) return NaN;
  const betaA = (cbb * cya - cab * cyb) / det;
  const betaB = (caa * cyb - cab * cya) / det;
  const residualVariance = (cyy - betaA * cya - betaB * cyb) / (n - 3);
  return residualVariance > 0 ? betaB / Math.sqrt((residualVariance * caa) / det) : NaN;
}

/** The benchmark's log move over the week's two dates; NaN unless it has both exactly. */
function weekMove(week: Week, benchmark: Priced): number {
  // Exact dates only: a level carried over a benchmark gap would misalign the whole week.
  const p = benchmark.days.at(week.start);
  const q = benchmark.days.at(week.end);
  const values = benchmark.series.values;
  if (!(p >= 0 && q > p && values[p] > 0 && values[q] > 0)) return NaN;
  // Funds of one calendar share their weeks: the tables remember each benchmark's move over them.
  return benchmark.tables ? spanLogMove(benchmark.tables, benchmark.index, p, q) : Math.log(values[q] / values[p]);
}

/**
 * The fund's last `count` weekly returns: sums of the steps ending in each ISO week, weeks
 * holding a gross error left out, the latest `count` of those kept (all when fewer). Found from
 * the end, so the years before the window are never read; each week's steps are still summed
 * from its first, as a pass from the start sums them.
 */
export function lastWeeklyReturns(series: SeriesSlice, returns: ResidualMoves, count: number): Week[] {
  const weeks: Week[] = [];
  for (let last = returns.count - 1; last >= 0 && weeks.length < count; ) {
    const first = firstStepOfWeek(series, returns, last);
    if (!holdsGrossError(returns, first, last)) {
      let fund = 0;
      for (let k = first; k <= last; k++) fund += returns.fund[k];
      weeks.push({ start: series.dates[returns.from[first]], end: series.dates[returns.to[last]], fund });
    }
    last = first - 1;
  }
  return weeks.reverse();
}

/** The first of the steps that end in the same ISO week as step `last`. */
function firstStepOfWeek(series: SeriesSlice, returns: ResidualMoves, last: number): number {
  const week = isoWeekStart(series.dates[returns.to[last]]);
  let first = last;
  while (first > 0 && isoWeekStart(series.dates[returns.to[first - 1]]) === week) first--;
  return first;
}

/** True when a step of `first`…`last` is a gross error: |z| ≥ GROSS_Z and a residual beyond 0.05. */
function holdsGrossError(returns: ResidualMoves, first: number, last: number): boolean {
  for (let k = first; k <= last; k++) if (Math.abs(returns.z[k]) >= GROSS_Z && Math.abs(returns.residual[k]) > 0.05) return true;
  return false;
}

/** Starts judged: a whole number of quarters into the weeks. */
function quartersIn(weeks: readonly Week[]): number {
  return Math.ceil(weeks.length / QUARTER_WEEKS);
}

/**
 * R² of the fund's weekly returns against the benchmark's over the weeks from each judged start
 * (quarter q: weeks 13q…end) to the end, the only starts the judges read; NaN where fewer than
 * `minWeeks` weeks the benchmark prices exactly remain.
 */
function suffixFits(weeks: Week[], benchmark: Priced, minWeeks: number): Float64Array {
  const moves = new Float64Array(weeks.length);
  for (let i = 0; i < weeks.length; i++) moves[i] = weekMove(weeks[i], benchmark);
  const fits = new Float64Array(quartersIn(weeks));
  suffixFitsOf(weeks, moves, minWeeks, fits, 0);
  return fits;
}

/**
 * `suffixFits` with the benchmark's move over each week given (`moves[i]` over week i, NaN when
 * it has not both dates), written to `fits` from `at` on, one per quarter. One pass from the end
 * with running sums.
 */
function suffixFitsOf(weeks: Week[], moves: Float64Array, minWeeks: number, fits: Float64Array, at: number): void {
  fits.fill(NaN, at, at + quartersIn(weeks));
  let n = 0, sx = 0, sy = 0, sxx = 0, syy = 0, sxy = 0;
  for (let i = weeks.length - 1; i >= 0; i--) {
    const y = moves[i];
    if (Number.isFinite(y)) {
      const x = weeks[i].fund;
      n++;
      sx += x;
      sy += y;
      sxx += x * x;
      syy += y * y;
      sxy += x * y;
    }
    if (n < minWeeks || i % QUARTER_WEEKS !== 0) continue;
    const cxy = sxy - (sx * sy) / n;
    const cxx = sxx - (sx * sx) / n;
    const cyy = syy - (sy * sy) / n;
    fits[at + i / QUARTER_WEEKS] = cxx > 0 && cyy > 0 ? (cxy * cxy) / (cxx * cyy) : NaN;
  }
}

/** `suffixFits` of every benchmark of the frame, in one array: benchmark b's fit from quarter q at `b × quarters + q` (exported for its test). */
export class BenchmarkFits {
  readonly r2: Float64Array;

  constructor(readonly ids: readonly string[], readonly quarters: number) {
    this.r2 = new Float64Array(ids.length * quarters);
  }

  /** Benchmark `b`'s fits, by quarter. */
  of(b: number): Float64Array {
    return this.r2.subarray(b * this.quarters, (b + 1) * this.quarters);
  }
}

/**
 * `suffixFits` of every benchmark of the frame. The benchmarks' moves over each week come from
 * the tables' rows (`spansMoves`): funds of one calendar share their weeks, so each week's moves
 * of every benchmark are computed once, not once per fund and benchmark.
 */
export function everyBenchmarkFits(weeks: Week[], tables: FrameTables, minWeeks: number): BenchmarkFits {
  const fits = new BenchmarkFits(tables.frame.ids, quartersIn(weeks));
  const rows = weeks.map((week) => spansMoves(tables, week.start, week.end));
  const moves = new Float64Array(weeks.length);
  for (let b = 0; b < fits.ids.length; b++) {
    for (let i = 0; i < weeks.length; i++) moves[i] = rows[i][b];
    suffixFitsOf(weeks, moves, minWeeks, fits.r2, b * fits.quarters);
  }
  return fits;
}

/** The benchmark other than the assigned one with the highest R² from quarter `quarter`. */
function bestOther(fits: BenchmarkFits, assignedId: string, quarter: number): { id: string; index: number; r2: number } | undefined {
  let best: { id: string; index: number; r2: number } | undefined;
  for (let b = 0; b < fits.ids.length; b++) {
    const r2 = fits.r2[b * fits.quarters + quarter];
    if (fits.ids[b] !== assignedId && Number.isFinite(r2) && (!best || r2 > best.r2)) best = { id: fits.ids[b], index: b, r2 };
  }
  return best;
}
