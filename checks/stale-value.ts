import type { SeriesCheck } from '../src/checks/check.js';
import type { SeriesSlice } from '../src/series/frame.js';
import { calendarOf, firstRowOfEachDate, isoDate, makeFinding, median } from '../src/checks/support.js';

interface StaleParams {
  min_days: number;
  max_chance: number;
  accrual_max_daily: number;
  [key: string]: number;
}

/**
 * The same NAV on `min_days` or more consecutive business days. Four days is the default: a
 * fund priced to four or more significant decimals practically never shows the same NAV four
 * days running, while two or three repeats do happen to coarsely rounded low-volatility funds.
 *
 * The bar rises for series that often repeat by rounding alone: a run must also be unlikely
 * by chance given how often the series repeats outside long runs (chance of such a run
 * anywhere in the series below `max_chance`). Series marked `stable_value` in the master, and
 * smoothly accruing ones (at least 98 % of changes upward and a median daily change below
 * `accrual_max_daily`), are not checked.
 */
export const staleValue: SeriesCheck<StaleParams> = {
  id: 'stale_value',
  scope: 'series',
  purpose: 'The same NAV repeated on several consecutive business days.',
  defaults: { min_days: 3, max_chance: 0.01, accrual_max_daily: 0.0005 },
  run(series, context, params) {
    if (context.master?.stable_value) return [];
    const rows = firstRowOfEachDate(series, context.asOf).filter((i) => series.values[i] > 0);
    if (rows.length < 2 || accruesSmoothly(series, rows, params.accrual_max_daily)) return [];
    const runs = equalValueRuns(series, rows);
    const required = requiredRunLength(runs, rows.length, params);
    const calendar = calendarOf(context);
    return runs
      .filter((run) => run.length >= 2)
      .map((run) => ({ run, days: context.calendars.businessDayDistance(calendar, series.dates[run[0]], series.dates[run[run.length - 1]]) + 1 }))
      .filter(({ days }) => days >= required)
      .map(({ run, days }) => {
        const first = run[0];
        const last = run[run.length - 1];
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
            observations: run.length,
            first: { date: isoDate(series.dates[first]), line: series.lines[first] },
            last: { date: isoDate(series.dates[last]), line: series.lines[last] },
            required_days: required,
          },
          identity: [isoDate(series.dates[first])],
        });
      });
  },
};

function equalValueRuns(series: SeriesSlice, rows: number[]): number[][] {
  const runs: number[][] = [];
  for (const row of rows) {
    const run = runs[runs.length - 1];
    if (run && series.values[run[0]] === series.values[row]) run.push(row);
    else runs.push([row]);
  }
  return runs;
}

/** Runs of this many equal values or more are left out when measuring how often a series repeats by rounding. */
const SUSPECT_RUN = 4;

/** The shortest run that is both long enough by rule and unlikely for this series by chance. */
function requiredRunLength(runs: number[][], observations: number, params: StaleParams): number {
  let repeats = 0;
  let pairs = 0;
  for (const run of runs) {
    // Runs long enough to be suspect do not teach how often the series repeats by rounding.
    if (run.length >= Math.max(params.min_days, SUSPECT_RUN)) continue;
    repeats += run.length - 1;
    pairs += run.length;
  }
  const repeatChance = pairs > 0 ? repeats / pairs : 0;
  if (repeatChance <= 0) return params.min_days;
  const repeatsNeeded = Math.log(params.max_chance / observations) / Math.log(repeatChance);
  return Math.max(params.min_days, Math.ceil(repeatsNeeded) + 1);
}

function accruesSmoothly(series: SeriesSlice, rows: number[], maxDaily: number): boolean {
  const changes: number[] = [];
  let falls = 0;
  for (let k = 1; k < rows.length; k++) {
    const change = series.values[rows[k]] / series.values[rows[k - 1]] - 1;
    if (change < 0) falls++;
    changes.push(Math.abs(change));
  }
  return falls <= 0.02 * changes.length && median(changes) <= maxDaily;
}
