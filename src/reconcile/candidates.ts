import type { MetricId } from '../ingest/schema.js';
import { annualizationOf, COMMON_ANNUALIZATIONS, DIMENSION_CHOICES, type Methodology } from '../metrics/methodology.js';

/**
 * The changes the explanation search tries: every place a vendor's convention may differ from
 * the configured methodology. This file is the one list; to search a new dimension, add a line
 * to SEARCHED_VALUES (a dimension with a fixed set of choices in DIMENSION_CHOICES is searched
 * already) and, if it touches only some metrics, a line to AFFECTED_METRICS.
 */

/** One change from the configured methodology: a dimension and the value it takes. */
export interface Candidate {
  readonly dimension: string;
  readonly value: unknown;
}

/**
 * `scale` is how the vendor's number is read, not a computation setting: `percent` means the
 * vendor wrote 12.3 for 0.123 (whatever its unit column said), `decimal` that it wrote 0.123.
 */
export const SCALE = 'scale';

/**
 * Fixed annual minimum acceptable returns tried for downside deviation and Sortino, besides the
 * named ones: round annual targets (common practice: a MAR is a target the investor sets, and
 * published ones are round numbers). A fixed MAR is made per-period like the risk-free rate.
 */
const FIXED_MARS: readonly number[] = [0.02, 0.03, 0.05];

/**
 * Values tried for each dimension, besides the configured one, in the order ties are broken
 * (conventions vendors commonly differ by first); the benchmarks come from the files, last.
 */
const LISTED_VALUES: Readonly<Record<string, readonly unknown[]>> = {
  [SCALE]: ['percent', 'decimal'],
  sd_denominator: DIMENSION_CHOICES.sd_denominator,
  annualization: COMMON_ANNUALIZATIONS,
  frequency: DIMENSION_CHOICES.frequency,
  window_end: [-1, -2, -3],
  regression: DIMENSION_CHOICES.regression,
  mar: [...DIMENSION_CHOICES.mar, ...FIXED_MARS],
  dd_denominator: DIMENSION_CHOICES.dd_denominator,
  alpha_form: DIMENSION_CHOICES.alpha_form,
  return_type: DIMENSION_CHOICES.return_type,
};

/** Every other dimension with a fixed set of choices, so a new one is searched without a line here. */
const SEARCHED_VALUES: Readonly<Record<string, readonly unknown[]>> = {
  ...LISTED_VALUES,
  ...Object.fromEntries(Object.entries(DIMENSION_CHOICES).filter(([dimension]) => !(dimension in LISTED_VALUES))),
};

const BENCHMARK_FIGURES: readonly MetricId[] = ['beta', 'alpha', 'r_squared', 'tracking_error', 'information_ratio', 'treynor'];
/** Figures the per-period risk-free rate enters (excess returns, or the MAR of `mar: risk_free` or a fixed rate). */
const RATE_FIGURES: readonly MetricId[] = ['downside_deviation', 'beta', 'alpha', 'r_squared', 'sharpe', 'sortino', 'treynor'];

/**
 * The metrics a dimension can change (docs/methodology.md, formulas); a dimension not listed
 * may change any metric. The search skips a dimension for the other metrics.
 */
const AFFECTED_METRICS: Readonly<Record<string, readonly MetricId[]>> = {
  // Returns, risks and R² are printed in percent by many vendors; beta and the ratios never are.
  [SCALE]: ['return_annualized', 'std_dev', 'downside_deviation', 'alpha', 'r_squared', 'tracking_error', 'treynor', 'max_drawdown'],
  sd_denominator: ['std_dev', 'sharpe', 'tracking_error', 'information_ratio'],
  return_type: ['std_dev', 'downside_deviation', 'beta', 'alpha', 'r_squared', 'sharpe', 'sortino', 'tracking_error', 'information_ratio', 'treynor'],
  regression: ['beta', 'alpha', 'r_squared', 'treynor'],
  alpha_form: ['alpha'],
  mar: ['downside_deviation', 'sortino'],
  dd_denominator: ['downside_deviation', 'sortino'],
  benchmark: BENCHMARK_FIGURES,
  annualization: ['return_annualized', 'std_dev', 'downside_deviation', 'alpha', 'sharpe', 'sortino', 'tracking_error', 'information_ratio', 'treynor'],
  // max_drawdown too: under `drawdown: sampled` the sample points are the frequency's.
  frequency: ['return_annualized', 'std_dev', 'downside_deviation', 'beta', 'alpha', 'r_squared', 'sharpe', 'sortino', 'tracking_error', 'information_ratio', 'treynor', 'max_drawdown'],
  rate_periods: RATE_FIGURES,
  rate_conversion: RATE_FIGURES,
  drawdown: ['max_drawdown'],
  ratio_scale: ['sharpe', 'sortino', 'information_ratio', 'treynor'],
  // The annualised geometric returns: the return itself, and the alpha forms built on G.
  return_annualization: ['return_annualized', 'alpha'],
};

export interface CandidateContext {
  readonly metric: MetricId;
  readonly base: Methodology;
  /** The unit the vendor's file gave the figure. */
  readonly unit: 'decimal' | 'percent';
  /** The benchmark the series is measured against under the configured methodology. */
  readonly benchmark: string | null;
  /** Every benchmark id in the master or the benchmark file. */
  readonly benchmarks: readonly string[];
}

/** The single changes worth trying for one figure, in the order ties are broken. */
export function candidatesFor(context: CandidateContext): Candidate[] {
  const candidates: Candidate[] = [];
  const searched: Record<string, readonly unknown[]> = { ...SEARCHED_VALUES, benchmark: context.benchmarks };
  for (const [dimension, values] of Object.entries(searched)) {
    if (!affects(dimension, context.metric)) continue;
    for (const value of values) if (!isCurrent(dimension, value, context)) candidates.push({ dimension, value });
  }
  return candidates;
}

export function affects(dimension: string, metric: MetricId): boolean {
  const metrics = AFFECTED_METRICS[dimension];
  return metrics === undefined || metrics.includes(metric);
}

/** The value the figure already has for a dimension: trying it would change nothing. */
function isCurrent(dimension: string, value: unknown, context: CandidateContext): boolean {
  switch (dimension) {
    case SCALE:
      return value === context.unit;
    case 'annualization':
      return value === annualizationOf(context.base);
    case 'benchmark':
      return value === context.benchmark;
    default:
      return (context.base as unknown as Record<string, unknown>)[dimension] === value;
  }
}
