import type { SeriesCheck, SeriesContext } from '../src/checks/check.js';
import type { CorporateActionRecord } from '../src/ingest/records.js';
import type { SeriesSlice } from '../src/series/frame.js';
import { movesOf } from '../src/checks/move-analysis.js';
import { GROSS_Z, sharedWithMarket, type ResidualMoves } from '../src/checks/residual-moves.js';
import { isoDate, makeFinding, round } from '../src/checks/support.js';

export interface SplitParams {
  ratio_tolerance: number;
  persist_days: number;
  [key: string]: number;
}

/** Split, consolidation and quoting-unit ratios seen in practice (cents ↔ units is 100). */
export const SIMPLE_RATIOS = [2, 3, 4, 5, 10, 100].flatMap((r) => [r, 1 / r]);

/**
 * Splits of a few units for a few, also common practice: 3-for-2 (a NAV ×2/3), 2-for-3 (×1.5),
 * 4-for-3, 5-for-4 and their consolidations. Their moves (12–41 %) are within reach of a real
 * day or a lasting mispricing, so they are matched more tightly (see `fractionalBand`).
 */
export const FRACTIONAL_RATIOS = [3 / 2, 4 / 3, 5 / 4].flatMap((r) => [r, 1 / r]);

export const SPLIT_DEFAULTS: SplitParams = { ratio_tolerance: 0.02, persist_days: 3 };

/** A benchmark day beyond this is itself suspect and is not used to explain a fund's move. */
const PLAUSIBLE_BENCHMARK_DAY = 0.15;

/**
 * A one-day move whose ratio, once the benchmark's move is taken out, lies within
 * `ratio_tolerance` of a simple ratio, that the benchmark did not make, and that persists for
 * `persist_days` observations. When the corporate-actions file has a split or distribution
 * inside the step that accounts for the move, the finding is kept as `info` with the action
 * as evidence; otherwise it is an `error`.
 */
export const splitLikeJump: SeriesCheck<SplitParams> = {
  id: 'split_like_jump',
  scope: 'series',
  purpose: 'A one-day move by a split ratio (2, 10, 100, 3:2, 4:3, 5:4 … or inverses) that persists and the benchmark did not make.',
  defaults: SPLIT_DEFAULTS,
  readsMoves: true,
  run(series, context, params) {
    const returns = movesOf(series, context).model;
    const findings = [];
    for (let k = 0; k < returns.count; k++) {
      const ratio = splitLikeRatio(returns, k, params);
      if (ratio === null) continue;
      // A fall of a fifth or a third that some benchmark in the feed made too is a market day
      // seen by a fund whose own benchmark is missing or wrong, not a split.
      if (FRACTIONAL_RATIOS.includes(ratio) && sharedWithMarket(series, returns, context.benchmarks, [k])) continue;
      findings.push(describe(series, context, returns, k, ratio, params));
    }
    return findings;
  },
};

/** The simple ratio step `k` resembles, or null when it is not a persisting split-like jump. */
export function splitLikeRatio(returns: ResidualMoves, k: number, params: SplitParams): number | null {
  const bench = returns.bench[k];
  const market = Number.isFinite(bench) && Math.abs(bench) < PLAUSIBLE_BENCHMARK_DAY ? returns.beta * bench : 0;
  const move = returns.raw[k] - market;
  const ratio = nearestSimpleRatio(move, params.ratio_tolerance) ?? (Math.abs(returns.z[k]) >= GROSS_Z ? nearestFractionalRatio(move, fractionalBand(returns, k, params.ratio_tolerance)) : null);
  if (ratio === null) return null;
  if (Number.isFinite(bench) && Math.abs(bench - Math.log(ratio)) < Math.log(1 + params.ratio_tolerance)) return null;
  return persists(returns, k, Math.log(ratio), params.persist_days) && !undoesPrevious(returns, k) ? ratio : null;
}

/**
 * How close (in log terms) a move, once beta × the benchmark is taken out, must come to a
 * fractional ratio: `ratio_tolerance`, narrowed to 3 robust standard deviations of the step's
 * residual (of the series' own moves when the benchmark cannot price the step). A 3-for-2 split leaves only the fund's ordinary residual around ln(2/3); a genuine
 * −33 % day or a lasting mispricing lands there only by coincidence, and 3 standard deviations
 * keep that coincidence rare while still taking in nearly every real split. The step must also
 * be a gross error against the benchmark (|z| ≥ 8): a fractional move the benchmark made too
 * (a wild market day, even one too wild to be used to explain the fund) is no split.
 */
function fractionalBand(returns: ResidualMoves, k: number, tolerance: number): number {
  // The step's own standard unit: the fit's residual scale, or the series' own spread on a
  // step the benchmark cannot price.
  const spread = 3 * Math.abs(returns.residual[k] / returns.z[k]);
  // Even a perfect tracker's split leaves a few basis points: the NAV's rounding and the
  // estimated beta times the benchmark's day.
  return Math.min(Math.log(1 + tolerance), Math.max(MIN_FRACTIONAL_BAND, spread));
}

/** 0.2 % in log terms: the narrowest band a fractional ratio is matched within. */
const MIN_FRACTIONAL_BAND = 0.002;

const LOG_FRACTIONAL = FRACTIONAL_RATIOS.map(Math.log);

function nearestFractionalRatio(logMove: number, band: number): number | null {
  for (let i = 0; i < LOG_FRACTIONAL.length; i++) if (Math.abs(logMove - LOG_FRACTIONAL[i]) < band) return FRACTIONAL_RATIOS[i];
  return null;
}

/** The step brings the level back to where it was before the previous step: the end of a spike. */
function undoesPrevious(returns: ResidualMoves, k: number): boolean {
  return k > 0 && returns.to[k - 1] === returns.from[k] && Math.abs(returns.raw[k - 1] + returns.raw[k]) < Math.abs(returns.raw[k]) / 2;
}

const LOG_RATIOS = SIMPLE_RATIOS.map(Math.log);

/**
 * ln(1 + tolerance), kept for the last tolerance asked: `nearestSimpleRatio` runs on every
 * step of every series with the same tolerance, and the logarithm was most of its cost.
 */
let lastTolerance = NaN;
let lastBand = NaN;

function logBand(tolerance: number): number {
  if (tolerance !== lastTolerance) {
    lastBand = Math.log(1 + tolerance);
    lastTolerance = tolerance;
  }
  return lastBand;
}

function nearestSimpleRatio(logMove: number, tolerance: number): number | null {
  const band = logBand(tolerance);
  if (Math.abs(logMove) < Math.LN2 - band) return null;
  for (let i = 0; i < LOG_RATIOS.length; i++) if (Math.abs(logMove - LOG_RATIOS[i]) < band) return SIMPLE_RATIOS[i];
  return null;
}

/** The level stays nearer the new level than the old one for the next `days` steps. */
function persists(returns: ResidualMoves, k: number, jump: number, days: number): boolean {
  let cumulative = 0;
  for (let j = k; j < Math.min(returns.count, k + 1 + days); j++) {
    cumulative += returns.raw[j];
    if (Math.abs(cumulative) < Math.abs(jump) / 2) return false;
  }
  return true;
}

function describe(series: SeriesSlice, context: SeriesContext, returns: ResidualMoves, k: number, ratio: number, params: SplitParams) {
  const before = returns.from[k];
  const after = returns.to[k];
  const actions = context.actions.filter((a) => a.ex_date > series.dates[before] && a.ex_date <= series.dates[after]);
  const explained = actions.length > 0 && nearestSimpleRatio(returns.fund[k], params.ratio_tolerance) === null && nearestFractionalRatio(returns.fund[k], fractionalBand(returns, k, params.ratio_tolerance)) === null;
  const day = series.dates[after];
  const move = `from ${series.values[before]} on ${isoDate(series.dates[before])} to ${series.values[after]} on ${isoDate(day)}`;
  const ratioText = ratioName(ratio);
  return makeFinding({
    check: 'split_like_jump',
    severity: explained ? 'info' : 'error',
    seriesId: series.id,
    start: day,
    end: day,
    message: explained
      ? `${series.id}'s NAV moved ${move} (${ratioText}), explained by the announced ${actions.map(actionText).join(' and ')}.`
      : `${series.id}'s NAV moved ${move}, close to ${ratioText}, the benchmark did not, and no split or distribution is on file; check for an unannounced split or a change of quoting unit.`,
    evidence: {
      previous: { date: isoDate(series.dates[before]), value: series.values[before], line: series.lines[before] },
      current: { date: isoDate(day), value: series.values[after], line: series.lines[after] },
      ratio: round(Math.exp(returns.raw[k]), 6),
      nearest_simple_ratio: round(ratio, 6),
      benchmark_return: Number.isFinite(returns.bench[k]) ? round(Math.expm1(returns.bench[k]), 6) : null,
      corporate_actions: actions.map((a) => ({ kind: a.kind, ex_date: isoDate(a.ex_date), value: a.value, line: a.line })),
    },
    identity: [isoDate(day)],
  });
}

function actionText(action: CorporateActionRecord): string {
  return action.kind === 'split'
    ? `split of ${action.value} new units per old unit (ex-date ${isoDate(action.ex_date)})`
    : `distribution of ${action.value} per unit (ex-date ${isoDate(action.ex_date)})`;
}

/** ×2, ÷10, or for a fractional ratio its split terms: ×3/2 (a 2-for-3 consolidation), ×2/3 (a 3-for-2 split). */
function ratioName(ratio: number): string {
  for (const [a, b] of [[3, 2], [4, 3], [5, 4]]) {
    if (Math.abs(ratio - a / b) < 1e-9) return `×${a}/${b} (a ${b}-for-${a} consolidation)`;
    if (Math.abs(ratio - b / a) < 1e-9) return `×${b}/${a} (a ${a}-for-${b} split)`;
  }
  return ratio >= 1 ? `×${round(ratio, 4)}` : `÷${round(1 / ratio, 4)}`;
}
