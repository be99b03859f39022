import type { SeriesCheck } from '../src/checks/check.js';
import type { SeriesSlice } from '../src/series/frame.js';
import { calendarOf, firstRowOfEachDate, isoDate, makeFinding, median, robustScale } from '../src/checks/support.js';

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
  run(series, context, params) {
    if (context.master?.stable_value) return [];
    const rows = firstRowOfEachDate(series, context.asOf).filter((i) => series.values[i] > 0);
    if (rows.length < 2 || accruesSmoothly(series, rows, params.accrual_max_daily)) return [];
    const runs = equalValueRuns(series, rows);
    const required = requiredRunLengths(runs, rows.length, params, roundingRepeatChance(series, rows));
    const calendar = calendarOf(context);
    return runs
      .map((run, i) => ({ run, required: required[i] }))
      .filter(({ run }) => run.length >= 2)
      .map(({ run, required }) => ({ run, required, days: context.calendars.businessDayDistance(calendar, series.dates[run[0]], series.dates[run[run.length - 1]]) + 1 }))
      .filter(({ days, required }) => days >= required)
      .map(({ run, days, required }) => {
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

/**
 * For each run, the shortest stale run that is both long enough by rule and unlikely for this
 * series by chance. How often the series repeats by rounding is measured on every run except
 * suspect ones (four values or more) and except the run being judged, so a lone short stale
 * run does not excuse itself on a series that otherwise never repeats.
 */
function requiredRunLengths(runs: number[][], observations: number, params: StaleParams, modelled: number): number[] {
  const cutoff = Math.max(params.min_days, SUSPECT_RUN);
  let repeats = 0;
  let pairs = 0;
  for (const run of runs) {
    if (run.length >= cutoff) continue;
    repeats += run.length - 1;
    pairs += run.length;
  }
  return runs.map((run) => {
    const own = run.length < cutoff;
    const r = repeats - (own ? run.length - 1 : 0);
    const n = pairs - (own ? run.length : 0);
    const repeatChance = Math.max(n > 0 ? r / n : 0, modelled);
    if (repeatChance <= 0) return params.min_days;
    const repeatsNeeded = Math.log(params.max_chance / observations) / Math.log(repeatChance);
    return Math.max(params.min_days, Math.ceil(repeatsNeeded) + 1);
  });
}

/**
 * The chance that the printed NAV repeats by rounding alone, from the series' printed
 * precision (the most decimals any of its values shows, up to 8) and its typical daily move:
 * for a move of standard deviation s much larger than the tick, about tick / (s·√(2π)).
 * A 4-decimal fund at 100 moving 1 % a day repeats one day in 25,000; a 2-decimal fund at 50
 * moving 0.1 % a day, one day in 12.
 */
function roundingRepeatChance(series: SeriesSlice, rows: number[]): number {
  let decimals = 0;
  const changes = new Float64Array(Math.max(0, rows.length - 1));
  // The precision from a sample of at most 64 values is plenty, and keeps this cheap.
  const every = Math.max(1, Math.floor(rows.length / 64));
  for (let k = 0; k < rows.length; k++) {
    const value = series.values[rows[k]];
    if (k % every === 0) {
      let scaled = value * 10 ** decimals;
      while (decimals < 8 && Math.abs(scaled - Math.round(scaled)) > 1e-6) scaled = value * 10 ** ++decimals;
    }
    if (k > 0) changes[k - 1] = value - series.values[rows[k - 1]];
  }
  if (changes.length < 20) return 0;
  const spread = robustScale(changes, 0);
  const tick = 10 ** -decimals;
  return spread > 0 ? Math.min(1, tick / (spread * Math.sqrt(2 * Math.PI))) : 1;
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
