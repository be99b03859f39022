import type { SeriesCheck } from '../src/checks/check.js';
import type { SeriesFrame, SeriesSlice } from '../src/series/frame.js';
import { isoWeekStart } from '../src/calendar/days.js';
import { seriesAt } from '../src/series/frame.js';
import { movesOf } from '../src/checks/move-analysis.js';
import { GROSS_Z, type ResidualMoves } from '../src/checks/residual-moves.js';
import { correlation, exactPosition, isoDate, makeFinding, round } from '../src/checks/support.js';

interface MismatchParams {
  index_r2: number;
  poor_r2: number;
  good_r2: number;
  min_gain: number;
  window_weeks: number;
  min_weeks: number;
  [key: string]: number;
}

/** Categories that promise to track an index; matched case-insensitively on whole words. */
const INDEX_CATEGORY = /\b(index|indexed|tracker|passive|etf)\b/i;

interface Week {
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
 * its R² is below `poor_r2` (0.6, well under the 0.80–0.95 usual for an active fund against a
 * fitting benchmark) and another benchmark reaches `good_r2` (0.7) and beats the assigned one
 * by `min_gain` (0.2), so two loosely related indices do not trade places on noise.
 */
export const benchmarkMismatch: SeriesCheck<MismatchParams> = {
  id: 'benchmark_mismatch',
  scope: 'series',
  purpose: 'The fund fits its assigned benchmark poorly while another benchmark fits it well.',
  defaults: { index_r2: 0.99, poor_r2: 0.6, good_r2: 0.7, min_gain: 0.2, window_weeks: 156, min_weeks: 26 },
  readsMoves: true,
  run(series, context, params) {
    const { benchmark, benchmarks, master } = context;
    if (!benchmark || !benchmarks) return [];
    const weeks = weeklyReturns(series, movesOf(series, context).model).slice(-params.window_weeks);
    const assigned = rSquared(weeks, benchmark, params.min_weeks);
    const isIndexFund = INDEX_CATEGORY.test(master?.category ?? '');
    const expected = isIndexFund ? params.index_r2 : params.poor_r2;
    if (!(assigned < expected)) return [];
    const better = bestAlternative(weeks, benchmarks, benchmark.id, params.min_weeks);
    const bar = isIndexFund ? params.index_r2 : Math.max(params.good_r2, assigned + params.min_gain);
    if (!better || better.r2 < bar) return [];
    const start = weeks[0].start;
    const end = weeks[weeks.length - 1].end;
    return [
      makeFinding({
        check: 'benchmark_mismatch',
        severity: 'error',
        seriesId: series.id,
        start,
        end,
        message: `${series.id} fits its assigned benchmark ${benchmark.id} poorly (R² ${round(assigned, 3)} on weekly returns${isIndexFund ? ', below the 0.99 an index fund should reach' : ''}) while ${better.id} fits it with R² ${round(better.r2, 3)}; the benchmark mapping looks wrong.`,
        evidence: {
          assigned_benchmark: benchmark.id,
          assigned_r2: round(assigned, 4),
          better_benchmark: better.id,
          better_r2: round(better.r2, 4),
          index_fund: isIndexFund,
          category: master?.category ?? null,
          weeks: weeks.length,
          from: isoDate(start),
          to: isoDate(end),
          master_line: master?.line ?? null,
        },
        identity: [benchmark.id, better.id],
      }),
    ];
  },
};

/** Sums of the steps ending in each ISO week; weeks holding a gross error are left out. */
function weeklyReturns(series: SeriesSlice, returns: ResidualMoves): Week[] {
  const weeks: Week[] = [];
  let currentWeek = NaN;
  let gross = false;
  for (let k = 0; k < returns.count; k++) {
    const end = series.dates[returns.to[k]];
    const week = isoWeekStart(end);
    if (week !== currentWeek) {
      if (gross) weeks.pop();
      weeks.push({ start: series.dates[returns.from[k]], end, fund: 0 });
      currentWeek = week;
      gross = false;
    }
    const current = weeks[weeks.length - 1];
    current.end = end;
    current.fund += returns.fund[k];
    if (Math.abs(returns.z[k]) >= GROSS_Z && Math.abs(returns.residual[k]) > 0.05) gross = true;
  }
  if (gross) weeks.pop();
  return weeks;
}

function rSquared(weeks: Week[], benchmark: SeriesSlice, minWeeks: number): number {
  const fund = new Float64Array(weeks.length);
  const bench = new Float64Array(weeks.length);
  let n = 0;
  for (const week of weeks) {
    // Exact dates only: a level carried over a benchmark gap would misalign the whole week.
    const p = exactPosition(benchmark.dates, week.start);
    const q = exactPosition(benchmark.dates, week.end);
    if (p < 0 || q <= p || !(benchmark.values[p] > 0) || !(benchmark.values[q] > 0)) continue;
    fund[n] = week.fund;
    bench[n++] = Math.log(benchmark.values[q] / benchmark.values[p]);
  }
  if (n < minWeeks) return NaN;
  const r = correlation(fund, bench, n);
  return r * r;
}

function bestAlternative(weeks: Week[], benchmarks: SeriesFrame, assignedId: string, minWeeks: number) {
  let best: { id: string; r2: number } | undefined;
  for (let i = 0; i < benchmarks.ids.length; i++) {
    if (benchmarks.ids[i] === assignedId) continue;
    const r2 = rSquared(weeks, seriesAt(benchmarks, i), minWeeks);
    if (Number.isFinite(r2) && (!best || r2 > best.r2)) best = { id: benchmarks.ids[i], r2 };
  }
  return best;
}
