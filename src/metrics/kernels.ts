import { failure, success, type Outcome } from '../outcome.js';
import { annualizationOf, perPeriodRate, type Methodology } from './methodology.js';
import {
  correlation,
  divisor,
  interceptYonX,
  isNegligibleVariance,
  residualSumOfSquares,
  slopeYonX,
  variance,
  varianceY,
  type PairMoments,
  type TargetSums,
} from './moments.js';
import { fixedTargetSums, type BasisStatistics, type WindowStatistics } from './statistics.js';
import { METRIC_IDS, type MetricId } from '../ingest/schema.js';

/**
 * The metrics as arithmetic on a window's statistics under a methodology. docs/methodology.md
 * states each formula; the functions here follow it line by line.
 */

/** The metric identifiers are interface.md's; they live with the other canonical names. */
export { METRIC_IDS, type MetricId };

export function isMetricId(text: string): text is MetricId {
  return (METRIC_IDS as readonly string[]).includes(text);
}

const METRIC_ID_OF = new Map<string, MetricId>(METRIC_IDS.map((id) => [id, id]));

/**
 * The metric id a text names, as the one string this module holds, or null. Reconciliation reads
 * its metrics from the vendor's file: each figure's text is then looked up by object keys again
 * and again (formulas, tolerances, affected metrics), which is quicker for the constant string
 * than for text read from a file.
 */
export function metricIdOf(text: string): MetricId | null {
  return METRIC_ID_OF.get(text) ?? null;
}

/** A figure, or the reason it cannot be computed. */
export type MetricOutcome = Outcome<number>;

/**
 * Thrown inside a formula when a figure cannot be computed; caught at the metric's boundary.
 * Deliberately not an Error: a methodology search meets many refusals, and capturing a stack
 * trace for each would cost more than the arithmetic.
 */
class NotComputable {
  constructor(readonly reason: string) {}
}

function refuse(reason: string): never {
  throw new NotComputable(reason);
}

export function metricFromStatistics(metric: MetricId, stats: WindowStatistics, methodology: Methodology): MetricOutcome {
  const figure = figureOrReason(metric, stats, methodology);
  return typeof figure === 'number' ? success(figure) : failure(figure.reason);
}

/** Why a figure cannot be computed: what `figureOrReason` gives instead of a number. */
export interface Refusal {
  readonly reason: string;
}

/**
 * metricFromStatistics without the outcome around it: the figure, or why there is none. The
 * metrics stage and reconciliation ask for hundreds of thousands of figures, and an outcome
 * object and a closure for each cost more than most formulas.
 */
export function figureOrReason(metric: MetricId, stats: WindowStatistics, methodology: Methodology): number | Refusal {
  if (needsBenchmark(metric) && stats.benchmarkReason !== null) return { reason: stats.benchmarkReason };
  if (needsRiskFree(metric, methodology) && stats.riskFreeReason !== null) return { reason: stats.riskFreeReason };
  try {
    const value = FORMULAS[metric](stats, methodology);
    return Number.isFinite(value) ? value : { reason: notFiniteReason(value) };
  } catch (error) {
    if (error instanceof NotComputable) return error;
    throw error;
  }
}

function notFiniteReason(value: number): string {
  return `the result is not a finite number (${value})`;
}

/** Runs a formula, turning a refusal or a non-finite answer into a reason. */
export function guarded(formula: () => number): MetricOutcome {
  try {
    const value = formula();
    return Number.isFinite(value) ? success(value) : failure(notFiniteReason(value));
  } catch (error) {
    if (error instanceof NotComputable) return failure(error.reason);
    throw error;
  }
}

export function needsBenchmark(metric: MetricId): boolean {
  switch (metric) {
    case 'beta':
    case 'alpha':
    case 'r_squared':
    case 'tracking_error':
    case 'information_ratio':
    case 'treynor':
      return true;
    default:
      return false;
  }
}

export function needsRiskFree(metric: MetricId, methodology: Methodology): boolean {
  switch (metric) {
    case 'sharpe':
    case 'treynor':
      return true;
    case 'sortino':
    case 'downside_deviation':
      return methodology.mar === 'risk_free';
    case 'beta':
    case 'r_squared':
      return methodology.regression === 'excess';
    case 'alpha':
      if (methodology.alpha_form === 'excess_return') return false;
      return methodology.alpha_form === 'jensen_geometric' || methodology.regression === 'excess';
    default:
      return false;
  }
}

type Formula = (stats: WindowStatistics, methodology: Methodology) => number;

const FORMULAS: Readonly<Record<MetricId, Formula>> = {
  return_annualized: (stats, m) => annualizedReturn(stats.growth.fund, stats, m),
  std_dev: (stats, m) => annualizedDeviation(fundVariance(basisOf(stats, m).raw, stats.n, m), m),
  downside_deviation: (stats, m) => downsideDeviation(stats, m),
  beta: (stats, m) => beta(stats, m),
  alpha: (stats, m) => alpha(stats, m),
  r_squared: (stats, m) => rSquared(regressionOf(stats, m)),
  sharpe: (stats, m) => sharpe(stats, m),
  sortino: (stats, m) => sortino(stats, m),
  tracking_error: (stats, m) => trackingError(stats, m),
  information_ratio: (stats, m) => informationRatio(stats, m),
  treynor: (stats, m) => treynor(stats, m),
  max_drawdown: (stats, m) => maxDrawdownOf(stats, m),
};

// ---------------------------------------------------------------------------------------------
// Building blocks

export function basisOf(stats: WindowStatistics, m: Methodology): BasisStatistics {
  return m.return_type === 'log' ? stats.log : stats.simple;
}

/** The benchmark–fund pair the regression runs on: excess returns or raw returns. */
export function regressionOf(stats: WindowStatistics, m: Methodology): PairMoments {
  const basis = basisOf(stats, m);
  return m.regression === 'excess' ? basis.excess : basis.raw;
}

/** (Π(1 + r))^(A/N) − 1, from Σ ln(1 + r). */
export function annualizedGrowth(logGrowth: number, periods: number, annualization: number): number {
  if (periods < 1) refuse('the window has no periods');
  return Math.expm1((logGrowth * annualization) / periods);
}

/** DAYS_A_YEAR: the mean Gregorian calendar year (common practice for calendar-time annualising). */
export const DAYS_A_YEAR = 365.25;

/**
 * An annualised geometric return from Σ ln(1 + r): over the window's periods,
 * (Π(1 + r))^(A/n) − 1, or with `return_annualization: calendar_days` over its calendar days,
 * (Π(1 + r))^(365.25/days) − 1.
 */
export function annualizedReturn(logGrowth: number, stats: WindowStatistics, m: Methodology): number {
  if (m.return_annualization === 'periods') return annualizedGrowth(logGrowth, stats.n, annualizationOf(m));
  if (stats.days < 1) refuse('the window spans no calendar days');
  return Math.expm1((logGrowth * DAYS_A_YEAR) / stats.days);
}

/** A ratio of per-period figures as the methodology reports it: × √A annualised, or as it is per period. */
function scaledRatio(perPeriod: number, m: Methodology): number {
  return m.ratio_scale === 'per_period' ? perPeriod : perPeriod * Math.sqrt(annualizationOf(m));
}

function annualizedDeviation(perPeriodVariance: number, m: Methodology): number {
  return Math.sqrt(perPeriodVariance * annualizationOf(m));
}

function requirePeriods(n: number, m: Methodology): void {
  if (divisor(n, m.sd_denominator) < 1) refuse(`${n} period(s) are too few for a ${m.sd_denominator} deviation`);
}

function fundVariance(pair: PairMoments, n: number, m: Methodology): number {
  requirePeriods(n, m);
  return varianceY(pair, m.sd_denominator);
}

/** The sums about the methodology's minimum acceptable return, in its return basis. */
function targetSums(stats: WindowStatistics, m: Methodology): TargetSums {
  if (m.mar === 'risk_free') return basisOf(stats, m).belowRiskFree;
  if (m.mar === 'zero') return basisOf(stats, m).belowZero;
  return fixedTargetSums(stats, m.return_type, perPeriodRate(m.mar, m));
}

/**
 * Mean of r − MAR per period: the excess mean for a risk-free MAR, the plain mean for zero, the
 * plain mean less the per-period rate for a fixed annual MAR.
 */
function meanOverTarget(stats: WindowStatistics, m: Methodology): number {
  const basis = basisOf(stats, m);
  if (m.mar === 'risk_free') return basis.excess.meanY;
  if (m.mar === 'zero') return basis.raw.meanY;
  return basis.raw.meanY - perPeriodRate(m.mar, m);
}

// ---------------------------------------------------------------------------------------------
// Metrics

/** Σ min(r − MAR, 0)² / D: the downside variance of one period. */
function downsideVariance(stats: WindowStatistics, m: Methodology): number {
  if (stats.n < 1) refuse('the window has no periods');
  const sums = targetSums(stats, m);
  const count = m.dd_denominator === 'full' ? stats.n : Math.max(sums.countBelow, 1);
  return sums.sumSqBelow / count;
}

function downsideDeviation(stats: WindowStatistics, m: Methodology): number {
  return annualizedDeviation(downsideVariance(stats, m), m);
}

function sortino(stats: WindowStatistics, m: Methodology): number {
  const perPeriodDeviation = Math.sqrt(downsideVariance(stats, m));
  if (perPeriodDeviation === 0) refuse('no period fell below the minimum acceptable return, so the downside deviation is zero');
  return scaledRatio(meanOverTarget(stats, m) / perPeriodDeviation, m);
}

function maxDrawdownOf(stats: WindowStatistics, m: Methodology): number {
  if (m.drawdown === 'sampled') return stats.sampledMaxDrawdown;
  return Number.isNaN(stats.maxDrawdown) ? refuse('a NAV in the window is not a positive number') : stats.maxDrawdown;
}

/** The regression's pair, once it is known a slope can be fitted to it. */
function fittableRegression(stats: WindowStatistics, m: Methodology): PairMoments {
  const pair = regressionOf(stats, m);
  if (pair.n < 2) refuse('a regression needs at least 2 periods');
  if (isNegligibleVariance(pair.sumSqX / pair.n, pair.meanX)) refuse('the benchmark returns have zero variance');
  return pair;
}

function beta(stats: WindowStatistics, m: Methodology): number {
  return slopeYonX(fittableRegression(stats, m));
}

function alpha(stats: WindowStatistics, m: Methodology): number {
  const A = annualizationOf(m);
  if (m.alpha_form === 'excess_return') {
    return annualizedReturn(stats.growth.fund, stats, m) - annualizedReturn(stats.growth.benchmark, stats, m);
  }
  if (m.alpha_form === 'jensen') return A * interceptYonX(fittableRegression(stats, m));
  if (m.alpha_form === 'compounded') {
    const intercept = interceptYonX(fittableRegression(stats, m));
    if (!(intercept > -1)) refuse(`the per-period intercept ${intercept} cannot be compounded`);
    return Math.expm1(A * Math.log1p(intercept));
  }
  const slope = beta(stats, m);
  const riskFree = annualizedReturn(stats.growth.riskFree, stats, m);
  const fund = annualizedReturn(stats.growth.fund, stats, m);
  const benchmark = annualizedReturn(stats.growth.benchmark, stats, m);
  return fund - riskFree - slope * (benchmark - riskFree);
}

export function rSquared(pair: PairMoments): number {
  if (pair.n < 2) refuse('a correlation needs at least 2 periods');
  if (isNegligibleVariance(pair.sumSqX / pair.n, pair.meanX)) refuse('the benchmark returns have zero variance');
  if (isNegligibleVariance(pair.sumSqY / pair.n, pair.meanY)) refuse('the fund returns have zero variance');
  const r = correlation(pair);
  return r * r;
}

function sharpe(stats: WindowStatistics, m: Methodology): number {
  const excess = basisOf(stats, m).excess;
  const perPeriodVariance = fundVariance(excess, stats.n, m);
  if (isNegligibleVariance(perPeriodVariance, excess.meanY)) refuse('the excess returns have zero variance');
  return scaledRatio(excess.meanY / Math.sqrt(perPeriodVariance), m);
}

function trackingError(stats: WindowStatistics, m: Methodology): number {
  requirePeriods(stats.n, m);
  return annualizedDeviation(variance(basisOf(stats, m).active, m.sd_denominator), m);
}

function informationRatio(stats: WindowStatistics, m: Methodology): number {
  const active = basisOf(stats, m).active;
  requirePeriods(stats.n, m);
  const perPeriodVariance = variance(active, m.sd_denominator);
  if (isNegligibleVariance(perPeriodVariance, active.mean)) refuse('the tracking error is zero');
  return scaledRatio(active.mean / Math.sqrt(perPeriodVariance), m);
}

/** Excess return per unit of beta: × A annualised (a return, so not × √A), or per period. */
function treynor(stats: WindowStatistics, m: Methodology): number {
  const slope = beta(stats, m);
  if (slope === 0) refuse('beta is zero');
  const perPeriod = basisOf(stats, m).excess.meanY / slope;
  return m.ratio_scale === 'per_period' ? perPeriod : annualizationOf(m) * perPeriod;
}

// ---------------------------------------------------------------------------------------------
// Further measures of the same statistics (Bacon 2008), not among the published metric ids

/** σ_fund / σ_benchmark, the ratio of total risks (the denominator convention cancels). */
export function famaBeta(stats: WindowStatistics, m: Methodology): MetricOutcome {
  return guarded(() => {
    const pair = basisOf(stats, m).raw;
    if (isNegligibleVariance(pair.sumSqX / pair.n, pair.meanX)) refuse('the benchmark returns have zero variance');
    return Math.sqrt(pair.sumSqY / pair.sumSqX);
  });
}

/** Annualised standard deviation of the regression residuals (the risk beta does not explain). */
export function specificRisk(stats: WindowStatistics, m: Methodology): MetricOutcome {
  return guarded(() => {
    const pair = fittableRegression(stats, m);
    requirePeriods(stats.n, m);
    return annualizedDeviation(residualSumOfSquares(pair) / divisor(pair.n, m.sd_denominator), m);
  });
}

/** Alpha (in the methodology's form) per unit of specific risk. */
export function appraisalRatio(stats: WindowStatistics, m: Methodology): MetricOutcome {
  const a = metricFromStatistics('alpha', stats, m);
  const risk = specificRisk(stats, m);
  if (!a.ok) return a;
  if (!risk.ok) return risk;
  const alpha = a.value;
  const riskValue = risk.value;
  return guarded(() => (riskValue === 0 ? refuse('the specific risk is zero') : alpha / riskValue));
}

/**
 * M²: the fund's excess (geometric, annualised) return rescaled to the benchmark's total risk,
 * plus the risk-free return: G_f + (G_p − G_f) × σ_b / σ_p.
 */
export function modiglianiM2(stats: WindowStatistics, m: Methodology): MetricOutcome {
  return guarded(() => {
    const pair = basisOf(stats, m).raw;
    if (isNegligibleVariance(pair.sumSqY / pair.n, pair.meanY)) refuse('the fund returns have zero variance');
    const riskFree = annualizedReturn(stats.growth.riskFree, stats, m);
    const fund = annualizedReturn(stats.growth.fund, stats, m);
    return riskFree + (fund - riskFree) * Math.sqrt(pair.sumSqX / pair.sumSqY);
  });
}

/** Share of periods below the minimum acceptable return. */
export function downsideFrequency(stats: WindowStatistics, m: Methodology): number {
  return targetSums(stats, m).countBelow / stats.n;
}

/** Mean shortfall below the minimum acceptable return, per period (not annualised). */
export function downsidePotential(stats: WindowStatistics, m: Methodology): number {
  return targetSums(stats, m).shortfallBelow / stats.n;
}

/** √(Σ max(r − MAR, 0)² / N), per period (not annualised). */
export function upsideRisk(stats: WindowStatistics, m: Methodology): number {
  return Math.sqrt(targetSums(stats, m).sumSqAbove / stats.n);
}

/** Mean of |x − mean x|; two passes, as the mean must be known first. */
export function meanAbsoluteDeviation(values: ArrayLike<number>): number {
  const mean = arithmeticMean(values);
  let total = 0;
  for (let i = 0; i < values.length; i++) total += Math.abs(values[i] - mean);
  return total / values.length;
}

/**
 * Sample excess kurtosis, the bias-corrected estimator
 * n(n+1)/((n−1)(n−2)(n−3)) Σ((x − x̄)/s)⁴ − 3(n−1)²/((n−2)(n−3)), with s the sample deviation.
 */
export function sampleExcessKurtosis(values: ArrayLike<number>): number {
  const n = values.length;
  if (n < 4) return NaN;
  const mean = arithmeticMean(values);
  let sumSq = 0;
  let sumFourth = 0;
  for (let i = 0; i < n; i++) {
    const d2 = (values[i] - mean) ** 2;
    sumSq += d2;
    sumFourth += d2 * d2;
  }
  const sampleVariance = sumSq / (n - 1);
  const scaled = sumFourth / (sampleVariance * sampleVariance);
  return ((n * (n + 1)) / ((n - 1) * (n - 2) * (n - 3))) * scaled - (3 * (n - 1) ** 2) / ((n - 2) * (n - 3));
}

function arithmeticMean(values: ArrayLike<number>): number {
  let total = 0;
  for (let i = 0; i < values.length; i++) total += values[i];
  return total / values.length;
}
